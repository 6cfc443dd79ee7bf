"""Wall shear stress in developing flow (issue 13): the length-averaged stress consistent with
the friction the line used, checked by a force balance, by Shah's published equation and by
Hagen-Poiseuille in long lumens; the hemolysis index rests on it."""

from __future__ import annotations

import math

import numpy as np
import pytest

import rheoline
from rheoline import Catheter, Line, Tube
from rheoline.model.conversions import MMHG
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.hemolysis import giersiepen_1990_hemolysis_index

WATER = newtonian_fluid("water", viscosity=0.955e-3, density=997.8, temperature_c=22)


def _shah_1978_fanning(re, length, diameter):
    """Shah 1978, J. Fluids Eng. 100, 177-179, eq. (the correlation as printed):
    f_app Re = 3.44/sqrt(x) + (1.25/(4x) + 16 - 3.44/sqrt(x)) / (1 + 0.00021 x^-2),
    x = L / (D Re).  Written out here, independently of rheoline.model.friction."""
    x = length / (diameter * re)
    fre = 3.44 / math.sqrt(x) + (1.25 / (4 * x) + 16 - 3.44 / math.sqrt(x)) / (1 + 0.00021 / x**2)
    return fre / re


def _frictional_drop(result, line, i, k_minor):
    """A lumen's drop without its entrance/contraction loss K rho u^2 / 2."""
    u = float(result.part_mean_velocity[i])
    return float(result.part_pressure_drops[i]) - k_minor * result.fluid.density * u * u / 2


def test_force_balance_of_each_lumen():
    # dp_f * A = tau_avg * (pi D) * L for every lumen: the entrance K 0.5 (Crane TP-410
    # 2009, p. A-29, flush sharp-edged) and the contraction K2 = 0.5 (1 - beta^2)
    # (Crane TP-410 2009, p. A-26) are taken off the lumens' drops first
    d_set, d_cath = 3.0e-3, 1.1e-3
    line = Line([Tube(inner_diameter=d_set, length=1.8), Catheter(gauge=18, inner_diameter=d_cath)])
    for head in (0.3, 1.0, 4.0):  # laminar, near transition, transitional
        r = line.solve(WATER, head=head)
        ks = (0.5, 0.5 * (1 - (d_cath / d_set) ** 2))
        for i, (k, d) in enumerate(zip(ks, (d_set, d_cath), strict=True)):
            length = line.parts[i].length
            dp_f = _frictional_drop(r, line, i, k)
            tau = float(r.part_wall_shear_stress[i])
            assert tau * math.pi * d * length == pytest.approx(dp_f * math.pi * d * d / 4, rel=1e-9)


def test_short_laminar_lumen_follows_shah_1978():
    # Re about 500 (Churchill's transition term is 1e-12 of the laminar one there): the
    # stress is Shah's Fanning f_app rho u^2 / 2 to the equation's own digits
    line = Line([Catheter(gauge=18, inner_diameter=1.1e-3, length=0.032)])
    r = line.solve(WATER, head=0.05)
    re, u = float(r.part_reynolds[0]), float(r.part_mean_velocity[0])
    assert 300 < re < 800
    f_app = _shah_1978_fanning(re, 0.032, 1.1e-3)
    assert float(r.part_wall_shear_stress[0]) == pytest.approx(
        f_app * WATER.density * u * u / 2, rel=1e-9
    )
    # a short catheter: well above the fully developed value 16/Re rho u^2 / 2
    developed = 16 / re * WATER.density * u * u / 2
    assert float(r.part_developed_wall_shear_stress[0]) == pytest.approx(developed, rel=1e-9)
    assert float(r.part_wall_shear_stress[0]) > 1.2 * developed


@pytest.mark.parametrize("fluid_name", ["water", "whole-blood"])
def test_long_lumen_tends_to_the_fully_developed_value(fluid_name):
    # x+ = L/(D Re) far above 1: Shah's excess 1.25/(4 x+) over 16 vanishes, and the stress
    # is Hagen-Poiseuille's 4 mu Q / (pi R^3) (Newtonian) / the developed value
    f = rheoline.fluid(fluid_name, temperature_c=37)
    line = Line([Tube(inner_diameter=1.0e-3, length=20.0)])
    r = line.solve(f, head=0.5)
    re = float(r.part_reynolds[0])
    assert 20.0 / (1.0e-3 * re) > 50
    tau = float(r.part_wall_shear_stress[0])
    assert tau == pytest.approx(float(r.part_developed_wall_shear_stress[0]), rel=2e-3)
    if fluid_name == "water":
        radius = 0.5e-3
        poiseuille = 4 * float(f.viscosity()) * float(r.flow) / (math.pi * radius**3)
        assert tau == pytest.approx(poiseuille, rel=2e-3)


def test_hemolysis_index_rests_on_the_length_averaged_stress():
    # Giersiepen 1990 at the averaged wall stress and the residence time L / u, per lumen
    blood = rheoline.fluid("packed-red-cells", temperature_c=37)
    line = Line([Tube(inner_diameter=3.0e-3, length=1.8), Catheter(gauge=20)])
    r = line.solve(blood, source_pressure=300 * MMHG)
    for i in range(2):
        tau = float(r.part_wall_shear_stress[i])
        t = line.parts[i].length / float(r.part_mean_velocity[i])
        want = giersiepen_1990_hemolysis_index(tau, t, warn=False)
        assert float(r.part_hemolysis_index[i]) == pytest.approx(want, rel=1e-12)
    # the catheter develops: its averaged stress, and so its index, exceed the developed ones
    assert r.part_wall_shear_stress[1] > r.part_developed_wall_shear_stress[1]
    assert float(r.max_wall_shear_stress) == pytest.approx(
        float(np.nanmax(r.part_wall_shear_stress)), rel=1e-12
    )


def test_force_balance_for_shear_thinning_blood():
    # Rabinowitsch-Mooney apparent viscosity: the same balance dp_f A = tau P L holds
    blood = rheoline.fluid("whole-blood", temperature_c=37, hematocrit=0.45)
    d = 1.1e-3
    line = Line([Catheter(gauge=18, inner_diameter=d, length=0.032)])
    r = line.solve(blood, head=1.5)
    dp_f = _frictional_drop(r, line, 0, 0.5)
    tau = float(r.part_wall_shear_stress[0])
    assert tau * math.pi * d * 0.032 == pytest.approx(dp_f * math.pi * d * d / 4, rel=1e-9)


def test_fittings_and_measured_parts_have_no_wall_stress():
    line = Line([Tube(inner_diameter=3e-3, length=1.0), rheoline.Fitting(k=0.9)])
    r = line.solve(WATER, head=1.0)
    assert math.isnan(float(r.part_wall_shear_stress[1]))
    assert math.isnan(float(r.part_developed_wall_shear_stress[1]))
