"""Loss coefficients against the fluids library (fluids.fittings) and Crane TP-410."""

import fluids.fittings
import fluids.friction
import numpy as np
import pytest

from rheoline.errors import InputRangeError
from rheoline.model.losses import (
    CRANE_L_OVER_D,
    ENTRANCE_K,
    EXIT_K,
    HOOPER_1981_2K,
    borda_carnot_expansion_k,
    crane_fitting_k,
    crane_sudden_contraction_k,
    crane_turbulent_friction,
    entrance_k,
    equivalent_length,
    hooper_1981_2k_k,
    transition_k,
)


def test_entrance_and_exit_against_fluids():
    # Crane TP-410 (2009) via fluids.fittings.entrance_sharp(method="Crane"), exit_normal
    assert entrance_k("sharp-edged") == pytest.approx(
        fluids.fittings.entrance_sharp(method="Crane")
    )
    assert EXIT_K == pytest.approx(fluids.fittings.exit_normal())
    # rounded entrance r/d >= 0.15: Crane's 0.04 (fluids.fittings.entrance_rounded, Crane)
    assert ENTRANCE_K["rounded"] == pytest.approx(
        fluids.fittings.entrance_rounded(Di=1.0, rc=0.2, method="Crane")
    )
    # inward projecting (Borda) 0.78: Crane TP-410 p. A-29 (from memory)
    assert ENTRANCE_K["inward-projecting"] == 0.78


@pytest.mark.parametrize("beta", [0.1, 0.3, 0.5, 0.7, 0.9, 0.99])
def test_contraction_against_fluids_crane(beta):
    # fluids.fittings.contraction_sharp(method="Crane"): K2 = 0.5 (1 - beta^2)
    d1, d2 = 1e-2, beta * 1e-2
    assert crane_sudden_contraction_k(d1, d2) == pytest.approx(
        fluids.fittings.contraction_sharp(d1, d2, method="Crane"), rel=1e-9
    )


@pytest.mark.parametrize("beta", [0.1, 0.3, 0.5, 0.7, 0.9])
def test_expansion_against_fluids_rennels(beta):
    # Borda-Carnot (1 - beta^2)^2 equals fluids.fittings.diffuser_sharp (Rennels 2012)
    d1, d2 = beta * 1e-2, 1e-2
    assert borda_carnot_expansion_k(d1, d2) == pytest.approx(
        fluids.fittings.diffuser_sharp(d1, d2), rel=1e-9
    )


def test_transition_refers_to_downstream_velocity():
    # expansion 1 -> 2 mm: K1 = (1 - 1/4)^2 = 0.5625 on u1 = 4 u2, so K2 = 0.5625 * 16 = 9
    assert transition_k(1e-3, 2e-3) == pytest.approx(9.0)
    assert transition_k(2e-3, 1e-3) == pytest.approx(0.5 * (1 - 0.25))
    assert transition_k(1e-3, 1e-3) == 0.0


def test_crane_friction_and_fittings_against_fluids():
    # Crane TP-410 f_T table, 2 inch: 0.019 (from memory); fluids.friction.ft_Crane fits it
    assert crane_turbulent_friction(0.0525) == pytest.approx(0.019, abs=0.0005)
    for d in (0.02, 0.05, 0.1, 0.3):
        assert crane_turbulent_friction(d) == pytest.approx(fluids.friction.ft_Crane(d), rel=0.06)
    # plug valves, fluids.fittings.K_plug_valve_Crane with the same f_T (styles 0, 1, 2)
    for kind, style in (
        ("plug-valve-straight", 0),
        ("stopcock-straight", 1),
        ("stopcock-branch", 2),
    ):
        expected = fluids.fittings.K_plug_valve_Crane(0.05, 0.05, 0.0, fd=0.02, style=style)
        assert crane_fitting_k(kind, 0.05, friction_factor=0.02) == pytest.approx(expected)


def test_equivalent_length():
    # L_eq = K D / f: 0.6 * 2 mm / 0.04 = 30 mm (by hand)
    assert equivalent_length(0.6, 2e-3, 0.04) == pytest.approx(0.03)
    assert np.all(np.asarray(list(CRANE_L_OVER_D.values())) > 0)


def test_unknown_names():
    with pytest.raises(InputRangeError, match="entrance 'bevelled' is not known; choose one of"):
        entrance_k("bevelled")
    with pytest.raises(InputRangeError, match="fitting kind 'elbow' is not known"):
        crane_fitting_k("elbow", 1e-3)


#: Our kinds and the names of the same fittings in fluids' table of Hooper 1981 constants.
HOOPER_NAMES = {
    "gate-valve-open": "Valve, Gate, Full line size, Beta = 1",
    "elbow-90-standard": "Elbow, 90°, Standard (R/D = 1), Screwed",
    "tee-through-run": "Tee, Run, Screwed",
    "tee-through-branch": "Elbow, Used as, Standard, Screwed",
}


@pytest.mark.parametrize("kind", sorted(HOOPER_NAMES))
def test_hooper_2k_against_fluids(kind):
    # Hooper 1981, Chem. Eng. 88: K = K1/Re + Kinf (1 + 1 in / D); reference fluids.fittings
    assert set(HOOPER_NAMES) == set(HOOPER_1981_2K)
    re = np.array([10.0, 300.0, 2000.0, 1e5])
    for d in (1.0e-3, 3.0e-3, 0.05):
        ref = [fluids.fittings.Hooper2K(Di=d / 0.0254, Re=r, name=HOOPER_NAMES[kind]) for r in re]
        np.testing.assert_allclose(hooper_1981_2k_k(re, d, kind), ref, rtol=1e-12)
    k1, k_inf = HOOPER_1981_2K[kind]
    assert hooper_1981_2k_k(500.0, 2e-3, k1=k1, k_infinity=k_inf) == pytest.approx(
        hooper_1981_2k_k(500.0, 2e-3, kind)
    )


@pytest.mark.parametrize("n_heads", [3, 300])  # the Newton path and the shared characteristic
def test_line_uses_the_2k_coefficient_at_the_solved_reynolds_number(n_heads):
    from rheoline.model.fluid_base import newtonian_fluid
    from rheoline.model.line import Line
    from rheoline.model.parts import Fitting, Tube

    water = newtonian_fluid("water", viscosity=1.0e-3, density=998.0)
    d = 2.0e-3
    line = Line([Tube(inner_diameter=d, length=1.0), Fitting.hooper("elbow-90-standard", d)])
    res = line.solve(water, head=np.geomspace(0.01, 2.0, n_heads))
    u = res.flow / (np.pi * d * d / 4.0)
    re = 998.0 * u * d / 1.0e-3
    k = res.part_pressure_drops[1] / (0.5 * 998.0 * u * u)
    ref = [
        fluids.fittings.Hooper2K(Di=d / 0.0254, Re=r, name=HOOPER_NAMES["elbow-90-standard"])
        for r in re
    ]
    np.testing.assert_allclose(k, ref, rtol=1e-7)
    # the default (constant, turbulent handbook) K does not change with the Reynolds number
    crane = Line([Tube(inner_diameter=d, length=1.0), Fitting.crane("elbow-90-standard", d)])
    res = crane.solve(water, head=np.array([0.01, 2.0]))
    u = res.flow / (np.pi * d * d / 4.0)
    k = res.part_pressure_drops[1] / (0.5 * 998.0 * u * u)
    assert k[0] == pytest.approx(k[1], rel=1e-9)


def test_hooper_bad_input():
    from rheoline.model.parts import Fitting

    with pytest.raises(InputRangeError, match="fitting kind 'stopcock-branch' is not known"):
        hooper_1981_2k_k(100.0, 2e-3, "stopcock-branch")
    with pytest.raises(InputRangeError, match="needs kind .* or both k1 and k_infinity"):
        hooper_1981_2k_k(100.0, 2e-3, k1=500.0)
    with pytest.raises(
        InputRangeError, match="Hooper 1981 fitting kind 'stopcock-branch' is not in"
    ):
        Fitting.hooper("stopcock-branch", 2e-3)
    with pytest.raises(InputRangeError, match="laminar_k .* goes with k"):
        Fitting(equivalent_length=0.1, inner_diameter=2e-3, laminar_k=500.0)
