"""The model band (issue 13): laminar loss forms checked against the fluids library, and each
alternative of the band against an independent solve."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.optimize import brentq

import rheoline
from rheoline import Catheter, Fitting, Line, Tube
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.laminar_losses import (
    hooper_1981_inlet_k,
    hooper_1988_contraction_k,
    hooper_1988_expansion_k,
)
from rheoline.model.line import GRAVITY
from rheoline.model.model_band import (
    BAND_CHOICES,
    churchill_1977_turbulent_friction,
    model_band,
)

fittings = pytest.importorskip("fluids.fittings")
fluids_friction = pytest.importorskip("fluids.friction")

WATER = newtonian_fluid("water", viscosity=0.955e-3, density=997.8, temperature_c=22)


# ------------------------------------------------------------------ the loss forms
@pytest.mark.parametrize("re1", [50.0, 700.0, 2400.0, 2600.0, 1e4, 1e5])
@pytest.mark.parametrize("d1, d2", [(3e-3, 1e-3), (2e-3, 1.6e-3), (4e-3, 0.6e-3)])
def test_contraction_matches_fluids_hooper(re1, d1, d2):
    # Hooper 1988 (Chem. Eng. 95 (16) 89) as implemented by fluids.fittings.contraction_sharp
    # (method "Hooper"), downstream velocity basis; the turbulent branch with f1 given
    f1 = 0.03
    want = fittings.contraction_sharp(Di1=d1, Di2=d2, fd=f1, Re=re1, method="Hooper")
    assert hooper_1988_contraction_k(d1, d2, re1, f1) == pytest.approx(want, rel=1e-12)


@pytest.mark.parametrize("re1", [50.0, 700.0, 3900.0, 4100.0, 1e5])
@pytest.mark.parametrize("d1, d2", [(1e-3, 3e-3), (1.6e-3, 2e-3)])
def test_expansion_matches_fluids_hooper(re1, d1, d2):
    # fluids.fittings.diffuser_sharp (method "Hooper") refers K to the upstream velocity;
    # ours to the downstream one: K2 = K1 (D2/D1)^4
    f1 = 0.025
    want = fittings.diffuser_sharp(Di1=d1, Di2=d2, Re=re1, fd=f1, method="Hooper")
    assert hooper_1988_expansion_k(d1, d2, re1, f1) == pytest.approx(
        want * (d2 / d1) ** 4, rel=1e-12
    )


def test_steps_that_do_not_change_bore_lose_nothing_and_branch_can_be_held():
    assert hooper_1988_contraction_k(1e-3, 1e-3, 500.0) == 0.0
    assert hooper_1988_expansion_k(1e-3, 1e-3, 500.0) == 0.0
    assert hooper_1988_contraction_k(2e-3, 3e-3, 500.0) == 0.0  # grows: not a contraction
    # the laminar branch held at Re 3000 keeps its 160/Re term
    held = hooper_1988_contraction_k(3e-3, 1e-3, 3000.0, 0.03, laminar=True)
    assert held == pytest.approx((1.2 + 160 / 3000) * (1 - (1 / 3) ** 4), rel=1e-12)


def test_inlet_two_k():
    # Hooper 1981, inlet K1 = 160 (from memory), K_inf 0.5 for a flush inlet
    assert hooper_1981_inlet_k(400.0) == pytest.approx(0.9)
    assert hooper_1981_inlet_k(1e7, 0.78) == pytest.approx(0.78, abs=1e-4)


@pytest.mark.parametrize("re", [2000.0, 3000.0, 4000.0, 1e4, 1e5, 1e6])
@pytest.mark.parametrize("rough", [0.0, 1e-4, 1e-3])
def test_churchill_turbulent_term_follows_colebrook(re, rough):
    # Churchill 1977 states his turbulent term reproduces Colebrook (1939); fluids'
    # Colebrook solves the implicit equation exactly.  Within 4 % from Re 2000 up.
    want = fluids_friction.Colebrook(re, rough)
    assert churchill_1977_turbulent_friction(re, rough) == pytest.approx(want, rel=0.04)


# ------------------------------------------------------------------ the band
def _hooper_line(d_set, d_cath, l_set, l_cath):
    """The same line with Hooper's laminar inlet and contraction written as 2-K fittings
    (the line engine's Hooper 1981 fitting path: K = K1/Re + k at the fitting's bore).

    Inlet: +160/Re at the set's bore.  Contraction, laminar branch (Hooper 1988): K2 =
    (1.2 + 160/Re1)(1 - beta^4) with Re1 = beta Re2, beta = d_cath/d_set, so over Crane's
    0.5 (1 - beta^2) the extra is k = 1.2 (1 - beta^4) - 0.5 (1 - beta^2) and
    K1 = 160 (1 - beta^4) / beta at the catheter's bore.
    """
    b = d_cath / d_set
    return Line(
        [
            Fitting(k=0.0, laminar_k=160.0, inner_diameter=d_set, name="inlet 2-K"),
            Tube(inner_diameter=d_set, length=l_set),
            Fitting(
                k=1.2 * (1 - b**4) - 0.5 * (1 - b**2),
                laminar_k=160.0 * (1 - b**4) / b,
                inner_diameter=d_cath,
                name="step 2-K",
            ),
            Catheter(gauge=18, inner_diameter=d_cath, length=l_cath),
        ]
    )


def test_step_losses_alternative_equals_an_independent_solve():
    # laminar set and catheter (Re below 2500 upstream): the band's Hooper alternative is
    # the flow of the line with the same losses written as 2-K fittings
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18, inner_diameter=1.1e-3)])
    heads = np.array([0.3, 0.8, 1.5])
    band = model_band(line, WATER, head=heads)
    other = _hooper_line(3e-3, 1.1e-3, 1.8, line.parts[1].length)
    want = other.solve(WATER, head=heads).flow
    np.testing.assert_allclose(band.alternatives["step-losses:hooper"], want, rtol=1e-9)
    assert np.all(band.alternatives["step-losses:hooper"] < band.nominal)
    assert "hooper-1988" in band.models_used and "hooper-1981" in band.models_used


def test_step_losses_in_the_readme_line_move_the_flow_by_about_12_percent():
    # the figure: README's 18G line (3 mm x 1.8 m set, 18G catheter, 1 m head)
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18)])
    band = model_band(line, WATER, head=1.0)
    move = 1 - band.alternatives["step-losses:hooper"] / band.nominal
    assert 0.09 < move < 0.15
    assert band.driver == "step-losses" and band.spread == pytest.approx(move, rel=1e-12)
    assert band.low == band.alternatives["step-losses:hooper"] and band.high >= band.nominal


def test_pump_pressure_band_equals_an_independent_solve():
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18, inner_diameter=1.1e-3)])
    q = np.array([0.5e-6, 1.5e-6])
    band = model_band(line, WATER, flow=q)
    assert band.quantity == "required_pressure"
    other = _hooper_line(3e-3, 1.1e-3, 1.8, line.parts[1].length)
    want = other.solve(WATER, flow=q).required_pressure
    np.testing.assert_allclose(band.alternatives["step-losses:hooper"], want, rtol=1e-9)
    np.testing.assert_allclose(band.nominal, line.solve(WATER, flow=q).required_pressure)


def _tube_flow(head, d, length, f_darcy):
    """Flow of one tube from a reservoir: rho g h = (f(Re) L/D + 0.5 + 1) rho u^2 / 2
    (flush inlet K 0.5, Crane TP-410 p. A-29; exit jet K 1)."""
    rho, mu = WATER.density, float(WATER.viscosity())

    def residual(u):
        re = rho * u * d / mu
        return (f_darcy(re) * length / d + 1.5) * u * u / 2 - GRAVITY * head

    u = brentq(residual, 1e-6, 20.0, xtol=1e-15, rtol=1e-14)
    return u * math.pi * d * d / 4


def _shah_darcy(length, d):
    """Shah 1978 (J. Fluids Eng. 100, 177) apparent friction, Darcy, as printed."""

    def f(re):
        x = length / (d * re)
        fre = 3.44 / math.sqrt(x) + (1.25 / (4 * x) + 16 - 3.44 / math.sqrt(x)) / (
            1 + 0.00021 / x**2
        )
        return 4 * fre / re

    return f


def test_transitional_alternatives_equal_independent_tube_solves():
    # one 4 mm x 3 m tube of water near Re 2000-3000: laminar friction continued (Shah 1978)
    # and turbulent friction continued down ((f_lam^12 + f_A^12)^(1/12)), each solved
    # here with brentq on the tube's energy balance
    d, length = 4e-3, 3.0
    line = Line([Tube(inner_diameter=d, length=length)])
    for head in (0.35, 0.6):
        band = model_band(line, WATER, head=head)
        assert set(band.choices()) == {"step-losses", "transitional-friction"}
        shah = _shah_darcy(length, d)
        lam = _tube_flow(head, d, length, shah)

        def turbulent(re, shah=shah):
            return (shah(re) ** 12 + churchill_1977_turbulent_friction(re) ** 12) ** (1 / 12)

        turb = _tube_flow(head, d, length, turbulent)
        alt = band.alternatives
        assert alt["transitional-friction:laminar"] == pytest.approx(lam, rel=1e-8)
        assert alt["transitional-friction:turbulent"] == pytest.approx(turb, rel=1e-8)
        assert turb < band.nominal < lam
        assert band.low <= band.alternatives["step-losses:hooper"] and band.low <= turb * (1 + 1e-9)
        assert band.high == pytest.approx(lam, rel=1e-8)


def test_no_transitional_choice_outside_the_zone():
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18)])
    band = model_band(line, WATER, head=0.2)
    assert band.choices() == ("step-losses",)


def test_blood_alternatives_are_solved_as_given():
    blood = rheoline.fluid("whole-blood", temperature_c=37)
    other = blood.at(model="carreau-yasuda")
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18)])
    band = model_band(line, blood, head=1.0, alternative_fluids={"carreau-yasuda": other})
    assert band.alternatives["blood-rheology:carreau-yasuda"] == pytest.approx(
        line.solve(other, head=1.0).flow, rel=1e-12
    )
    assert "carreau-yasuda" in band.models_used
    assert set(band.choices()) <= set(BAND_CHOICES)


def test_no_forward_flow_gives_a_zero_band():
    line = Line([Tube(inner_diameter=3e-3, length=1.8)])
    band = model_band(line, WATER, head=np.array([0.0, 0.5]))
    assert band.low[0] == band.high[0] == 0.0 and band.driver[0] == ""
    assert band.low[1] < band.nominal[1]


def test_bad_fluid_is_refused_with_the_fix():
    line = Line([Tube(inner_diameter=3e-3, length=1.8)])
    with pytest.raises(rheoline.errors.InputRangeError, match=r"rheoline.fluid\('water'\)"):
        model_band(line, "water", head=1.0)


@pytest.mark.parametrize(
    "fluid, line, head",
    [
        # whole blood (Carreau): the apparent viscosity moves with the flow
        (
            rheoline.fluid("whole-blood", temperature_c=37),
            Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18)]),
            np.array([0.3, 1.0, 1.5]),
        ),
        # water in a 4 mm x 3 m tube in the transition zone: every correction applies
        (WATER, Line([Tube(inner_diameter=4e-3, length=3.0)]), np.array([0.35, 0.6])),
    ],
)
def test_correction_slope_equals_a_difference_of_full_evaluations(fluid, line, head):
    # the Newton step's slope of each correction, taken along the flow's path from one
    # evaluation of the losses, equals a central difference of the correction with every
    # lumen's viscosity and Reynolds number solved again at Q e^(+-h)
    from rheoline.model.line_layout import build_layout
    from rheoline.model.line_solvers import exact_losses
    from rheoline.model.model_band import _correction_slope, _corrections

    nominal = line.solve(fluid, head=head)
    layout = build_layout(line, fluid, nominal.scenario_shape, False)
    corrections, _ = _corrections(line, layout, nominal)
    assert len(corrections) == (3 if fluid is WATER else 1)
    q = np.asarray(nominal.flow, dtype=float)

    def extra(correction, flow):
        _, _, pieces, mu, _ = exact_losses(layout, fluid, flow)
        return correction(flow, pieces[4], pieces[5], mu)

    _, _, pieces, mu, dlog_mu = exact_losses(layout, fluid, q)
    h = 1e-5  # the Churchill blend curves sharply in the transition zone
    for correction in corrections.values():
        got = _correction_slope(correction, q, pieces[4], pieces[5], mu, dlog_mu)
        want = (extra(correction, q * np.exp(h)) - extra(correction, q * np.exp(-h))) / (2 * h)
        assert np.all(np.abs(want) > 0)
        np.testing.assert_allclose(got, want, rtol=1e-6)
