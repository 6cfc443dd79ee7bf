"""Lumen physics against worked examples, closed forms and the fluids library."""

import warnings

import fluids.friction
import numpy as np
import pytest

from rheoline.errors import InputRangeError
from rheoline.model.fluid_base import Fluid, newtonian_fluid
from rheoline.model.lumen import (
    apparent_darcy_friction,
    churchill_1977_friction,
    entrance_length,
    lumen_pressure_drop,
    poiseuille_flow,
    poiseuille_pressure_drop,
    power_law_tube_flow,
    rabinowitsch_flow,
    regime_of,
    reynolds_number,
    shah_1978_apparent_friction,
    velocity_profile,
    wall_shear_rate_for_flow,
)
from rheoline.model.rheology import Carreau, Casson, Newtonian, PowerLaw

ML_PER_MIN = 1e-6 / 60.0


# --- Hagen-Poiseuille -------------------------------------------------------------------


def test_poiseuille_worked_example():
    # Worked by hand (Hagen-Poiseuille, Q = pi r^4 dp / (8 mu L)):
    # dp = 1000 Pa, r = 0.5 mm, L = 0.1 m, mu = 1.0 mPa s
    # r^4 = (5e-4)^4 = 6.25e-14 m^4; pi * 6.25e-14 * 1000 = 1.9635e-10
    # 8 * 1e-3 * 0.1 = 8e-4;  Q = 1.9635e-10 / 8e-4 = 2.4544e-7 m^3/s = 14.726 mL/min
    q = poiseuille_flow(1000.0, 0.5e-3, 0.1, 1.0e-3)
    assert q == pytest.approx(2.4544e-7, rel=1e-4)
    assert q / ML_PER_MIN == pytest.approx(14.726, rel=1e-4)


def test_poiseuille_scalings():
    # Hagen-Poiseuille: Q ~ r^4, 1/L, 1/mu
    base = poiseuille_flow(500.0, 1e-3, 1.0, 1e-3)
    assert poiseuille_flow(500.0, 2e-3, 1.0, 1e-3) == pytest.approx(16 * base)
    assert poiseuille_flow(500.0, 1e-3, 3.0, 1e-3) == pytest.approx(base / 3)
    assert poiseuille_flow(500.0, 1e-3, 1.0, 4e-3) == pytest.approx(base / 4)
    assert poiseuille_pressure_drop(base, 1e-3, 1.0, 1e-3) == pytest.approx(500.0)


def test_poiseuille_bad_input():
    with pytest.raises(InputRangeError, match="radius must be greater than 0"):
        poiseuille_flow(100.0, 0.0, 1.0, 1e-3)
    with pytest.raises(InputRangeError, match="pressure_drop must be 0 Pa or more"):
        poiseuille_flow(-1.0, 1e-3, 1.0, 1e-3)
    with pytest.raises(InputRangeError, match="viscosity must be finite"):
        poiseuille_flow(1.0, 1e-3, 1.0, np.nan)


def test_reynolds_number():
    # Re = rho u D / mu, by hand: 998 * 0.5 * 2e-3 / 1e-3 = 998
    assert reynolds_number(0.5, 2e-3, 998.0, 1e-3) == pytest.approx(998.0)


# --- friction across regimes --------------------------------------------------------------


@pytest.mark.parametrize("relative_roughness", [0.0, 1e-5, 1e-4, 1e-3, 1e-2, 0.05])
def test_churchill_matches_fluids_library(relative_roughness):
    # reference: fluids.friction.Churchill_1977 (Churchill, Chem. Eng. 84 (1977) 91-92)
    for re in np.logspace(0, 8, 41):
        expected = fluids.friction.Churchill_1977(re, relative_roughness)
        assert churchill_1977_friction(re, relative_roughness) == pytest.approx(expected, rel=1e-9)


def test_churchill_against_colebrook_turbulent():
    # Colebrook (1939) via fluids.friction.Colebrook; Churchill states ~1 % agreement
    for re in np.logspace(4, 7, 13):
        for rr in (0.0, 1e-4, 1e-3):
            with warnings.catch_warnings():  # fluids' own overflow note in its explicit form
                warnings.simplefilter("ignore", RuntimeWarning)
                expected = fluids.friction.Colebrook(re, rr)
            assert churchill_1977_friction(re, rr) == pytest.approx(expected, rel=0.03)


def test_laminar_friction_is_64_over_re():
    # Hagen-Poiseuille in Darcy form: f = 64 / Re
    re = np.array([1.0, 10.0, 100.0, 1000.0, 1800.0])
    assert np.allclose(churchill_1977_friction(re), 64.0 / re, rtol=2e-3)


def test_transition_near_2000_to_2300():
    # common practice, no source: pipe flow leaves the laminar law near Re 2000-2300
    f_lam = churchill_1977_friction(1800.0) * 1800.0 / 64.0
    f_past = churchill_1977_friction(3000.0) * 3000.0 / 64.0
    assert f_lam == pytest.approx(1.0, abs=0.01)  # still laminar at 1800
    assert f_past > 1.3  # well above laminar by 3000
    assert regime_of(2000.0) == "laminar"
    assert regime_of(2400.0) == "transitional"
    assert regime_of(5000.0) == "turbulent"


# --- developing laminar flow (Shah 1978) --------------------------------------------------


def test_shah_worked_example():
    # Shah, J. Fluids Eng. 100 (1978) 177, eq. for f_app Re, by hand at x+ = 0.01:
    # 3.44/sqrt(0.01) = 34.4; numerator 1.25/0.04 + 16 - 34.4 = 12.85; denominator
    # 1 + 0.00021/1e-4 = 3.1;  f_app Re = 34.4 + 12.85/3.1 = 38.545
    re, d = 500.0, 1e-3
    length = 0.01 * d * re
    assert shah_1978_apparent_friction(re, length, d) * re == pytest.approx(38.545, rel=1e-4)


def test_shah_limits():
    # Shah & London (1978): fully developed f Re = 16 and Hagenbach K(inf) = 1.25 for a
    # circular tube (the constants of Shah's correlation); short-duct limit 3.44 / sqrt(x+)
    re, d = 100.0, 1e-3
    for x_plus in (2.0, 10.0, 50.0):
        fre = shah_1978_apparent_friction(re, x_plus * d * re, d) * re
        k_excess = 4.0 * fre * x_plus - 64.0 * x_plus
        assert k_excess == pytest.approx(1.25, rel=0.02)
    x_plus = 1e-6
    fre = shah_1978_apparent_friction(re, x_plus * d * re, d) * re
    assert fre == pytest.approx(3.44 / np.sqrt(x_plus), rel=0.01)


def test_apparent_friction_blends_shah_and_churchill():
    # laminar: Shah (Darcy = 4 x Fanning); turbulent: Churchill 1977 unchanged
    re, lod = 500.0, 20.0
    shah_darcy = 4.0 * shah_1978_apparent_friction(re, lod * 1e-3, 1e-3)
    assert apparent_darcy_friction(re, lod) == pytest.approx(shah_darcy, rel=1e-6)
    assert apparent_darcy_friction(1e5, lod, 1e-4) == pytest.approx(
        churchill_1977_friction(1e5, 1e-4), rel=1e-4
    )
    assert apparent_darcy_friction(500.0) == pytest.approx(64.0 / 500.0, rel=1e-6)


def test_entrance_length():
    # Shah & London (1978): L_hy ~ 0.056 Re D for laminar flow (from memory)
    assert entrance_length(1500.0, 2e-3) == pytest.approx(0.056 * 1500 * 2e-3, rel=0.01)
    # turbulent: 4.4 Re^(1/6) D, common practice, no source
    assert entrance_length(1e5, 1e-2) == pytest.approx(4.4 * 1e5 ** (1 / 6) * 1e-2)


# --- non-Newtonian tube flow ----------------------------------------------------------------


@pytest.mark.parametrize("n", [0.3, 0.5, 0.8, 1.0, 1.3])
def test_rabinowitsch_power_law_exact(n):
    # exact closed form Q = pi n R^3/(3n+1) (tau_w/K)^(1/n) (Bird, Armstrong & Hassager 1987)
    model, radius, length = PowerLaw(0.02, n), 0.4e-3, 0.05
    for gw in (10.0, 1e3, 1e5):
        q, tau_w = rabinowitsch_flow(model, gw, radius)
        exact = power_law_tube_flow(2 * length * tau_w / radius, radius, length, 0.02, n)
        assert q == pytest.approx(exact, rel=1e-6)


def test_wall_shear_rate_inverse_power_law():
    # Rabinowitsch-Mooney: gamma_w = (3n+1)/(4n) * 4Q/(pi R^3) for a power law
    n, radius, q = 0.45, 0.6e-3, 2e-6
    gw, _ = wall_shear_rate_for_flow(PowerLaw(0.01, n), q, radius)
    assert gw == pytest.approx((3 * n + 1) / (4 * n) * 4 * q / (np.pi * radius**3), rel=1e-8)


def test_casson_plug_flow_closed_form():
    # Buckingham-type closed form for Casson tube flow (Fung, Biomechanics, 1993, eq. for
    # Casson flow in a tube): Q = pi R^3 tau_w/(4 eta) [1 - 16/7 sqrt(c) + 4/3 c - 1/21 c^4],
    # c = tau_y / tau_w
    model, radius = Casson(0.004, 0.0035), 1e-3
    q, tau_w = rabinowitsch_flow(model, 50.0, radius)
    c = 0.004 / tau_w
    exact = (
        np.pi * radius**3 * tau_w / (4 * 0.0035) * (1 - 16 / 7 * np.sqrt(c) + 4 / 3 * c - c**4 / 21)
    )
    assert q == pytest.approx(exact, rel=1e-6)


def test_carreau_limits_are_poiseuille():
    # Carreau: mu -> mu_0 at low shear and mu_inf at high shear, so the tube flow tends to
    # Hagen-Poiseuille with those viscosities (Bird, Armstrong & Hassager 1987)
    model = Carreau(mu_zero=0.056, mu_inf=0.00345, relaxation_time=0.01, flow_index=0.3568)
    radius, length = 0.5e-3, 1.0
    low_q = 1e-14
    _, tau_low = wall_shear_rate_for_flow(model, low_q, radius)
    dp_low = 2 * length * tau_low / radius
    assert dp_low == pytest.approx(poiseuille_pressure_drop(low_q, radius, length, 0.056), rel=1e-3)
    high_q = 1e-1
    _, tau_high = wall_shear_rate_for_flow(model, high_q, radius)
    dp_high = 2 * length * tau_high / radius
    assert dp_high == pytest.approx(
        poiseuille_pressure_drop(high_q, radius, length, 0.00345), rel=0.02
    )


def test_lumen_pressure_drop_newtonian_long_tube():
    # developing=False and low Re: Hagen-Poiseuille exactly
    water = newtonian_fluid("water", 1e-3, 998.0)
    dp = lumen_pressure_drop(water, 1e-8, 1e-3, 2.0, developing=False)
    assert dp == pytest.approx(poiseuille_pressure_drop(1e-8, 0.5e-3, 2.0, 1e-3), rel=1e-6)


def test_lumen_pressure_drop_power_law_fluid():
    # a power-law fluid in fully developed laminar flow: the exact closed form
    fluid = Fluid(name="pl", temperature_c=20.0, density=1000.0, rheology=PowerLaw(0.05, 0.6))
    radius, length, q = 1e-3, 1.0, 1e-7
    dp = lumen_pressure_drop(fluid, q, 2 * radius, length, developing=False)
    assert power_law_tube_flow(dp, radius, length, 0.05, 0.6) == pytest.approx(q, rel=1e-6)


def test_velocity_profile_parabolic_and_blunted():
    # Newtonian: u = 2 u_mean (1 - (r/R)^2) (Hagen-Poiseuille)
    water = newtonian_fluid("water", 1e-3, 998.0)
    q, d = 1e-6, 1e-3
    mean = q / (np.pi * d**2 / 4)
    r, u = velocity_profile(water, q, d)
    assert np.allclose(u, 2 * mean * (1 - (r / (d / 2)) ** 2), rtol=1e-3, atol=1e-4 * mean)
    # power law: u/u_mean = (3n+1)/(n+1) (1 - (r/R)^((n+1)/n)) (Bird et al. 1987)
    n = 0.5
    pl = Fluid(name="pl", temperature_c=20.0, density=1000.0, rheology=PowerLaw(0.02, n))
    r, u = velocity_profile(pl, q, d)
    exact = mean * (3 * n + 1) / (n + 1) * (1 - (r / (d / 2)) ** ((n + 1) / n))
    assert np.allclose(u, exact, rtol=5e-3, atol=1e-3 * mean)
    assert u[0] < 2 * mean  # blunter than the parabola


def test_newtonian_rabinowitsch_exact():
    q, tau = rabinowitsch_flow(Newtonian(2e-3), 500.0, 1e-3)
    assert tau == pytest.approx(1.0)
    assert q == pytest.approx(np.pi * 1e-9 * 500.0 / 4.0, rel=1e-12)
