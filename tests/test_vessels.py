"""Vessel segments: Pries laws, Poiseuille scaling, sensitivities, the infusion-site bridge."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy.linalg import solve_banded

import rheoline
from rheoline.errors import InputRangeError, RangeWarning, RegimeWarning
from rheoline.model.blood import plasma_viscosity, pries_1992_relative_viscosity
from rheoline.model.vessels import (
    Vessel,
    annulus_resistance_factor,
    apparent_blood_viscosity,
    fahraeus_lindqvist_curve,
    infusion_site_context,
    pries_1994_relative_viscosity,
    resistance_curve,
    resistance_elasticity,
    resistance_vs_hematocrit,
    resistance_vs_radius,
    resistance_vs_temperature,
)


def newtonian_vessel(radius=1e-3, length=0.1, viscosity=3.5e-3):
    return Vessel(radius=radius, length=length, viscosity_law="newtonian", viscosity=viscosity)


# --- Pries 1992 in vitro, from the published equations -----------------------------------


@pytest.mark.parametrize(
    ("diameter_um", "hematocrit", "expected"),
    [
        # Pries, Neuhaus & Gaehtgens 1992, eqs. for mu_0.45 and C (D in um).
        # D = 10, H = 0.45: mu_rel = mu_0.45 = 220 e^-13 + 3.2 - 2.44 e^(-0.06 * 10^0.645)
        #   = 0.0005 + 3.2 - 2.44 * e^(-0.06 * 4.41570) = 3.2005 - 2.44 * 0.767250 = 1.32841
        (10.0, 0.45, 1.32841),
        # D = 100, H = 0.30: mu_0.45 = 3.2 - 2.44 e^(-0.06 * 19.4984) = 3.2 - 2.44 * 0.310396
        #   = 2.44263; C = (0.8 + e^-7.5)(-1 + ~0) + ~0 = -0.800553;
        #   0.7^C - 1 = 0.330477, 0.55^C - 1 = 0.613814, ratio 0.538399;
        #   mu_rel = 1 + 1.44263 * 0.538399 = 1.77671
        (100.0, 0.30, 1.77671),
        # D = 500, H = 0.60: mu_0.45 = 3.2 - 2.44 e^(-0.06 * 55.0599) = 3.2 - 2.44 * 0.0367508
        #   = 3.11033; C = -0.8; 0.4^-0.8 - 1 = 1.08138, 0.55^-0.8 - 1 = 0.613280,
        #   ratio 1.76328; mu_rel = 1 + 2.11033 * 1.76328 = 4.72110
        (500.0, 0.60, 4.72110),
    ],
)
def test_pries_1992_relative_viscosity_from_published_equations(diameter_um, hematocrit, expected):
    vessel = Vessel(radius=diameter_um * 0.5e-6, length=1e-3, hematocrit=hematocrit)
    # hand arithmetic above carries 6 digits
    assert vessel.relative_viscosity == pytest.approx(expected, rel=2e-5)
    # the apparent viscosity is the relative one times plasma viscosity at 37 degC
    assert vessel.apparent_viscosity == pytest.approx(
        pries_1992_relative_viscosity(diameter_um * 1e-6, hematocrit) * plasma_viscosity(37.0),
        rel=1e-12,
    )


def test_pries_1992_plasma_only_is_plasma():
    # Pries 1992: at H_D = 0 the relative viscosity is exactly 1 for every diameter
    v = Vessel(radius=np.array([5e-6, 50e-6, 500e-6]), length=1e-3, hematocrit=0.0)
    np.testing.assert_allclose(v.relative_viscosity, 1.0, rtol=1e-12)


def test_pries_1992_below_fitted_diameters_warns():
    # Pries 1992 fitted tubes of 3.3 to 1978 um
    with pytest.warns(RangeWarning, match="Pries 1992"):
        _ = Vessel(radius=1e-6, length=1e-4).resistance


# --- Pries 1994 in vivo -----------------------------------------------------------------------


def test_pries_1994_from_published_equation():
    # Pries et al. 1994 (Circ. Res. 75:904), in vivo law, recalled form (from memory):
    # D = 20 um, H = 0.45: mu*_0.45 = 6 e^(-0.085 * 20) + 3.2 - 2.44 e^(-0.06 * 20^0.645)
    #   = 6 * 0.182684 + 3.2 - 2.44 * 0.660802 = 2.68374; wall = (20 / 18.9)^2 = 1.119789;
    #   mu = (1 + 1.68374 * 1 * 1.119789) * 1.119789 = 3.23108
    assert pries_1994_relative_viscosity(20e-6, 0.45) == pytest.approx(3.23108, rel=2e-5)


def test_pries_1994_higher_in_microvessels_and_joins_in_vitro_when_large():
    # Pries et al. 1994: resistance in microvascular networks in vivo is well above the
    # in-vitro prediction in small vessels; the laws join at large diameters (from memory).
    small = np.array([8e-6, 15e-6, 30e-6])
    assert np.all(
        pries_1994_relative_viscosity(small, 0.45)
        > 1.3 * pries_1992_relative_viscosity(small, 0.45)
    )
    assert pries_1994_relative_viscosity(1.5e-3, 0.45) == pytest.approx(
        pries_1992_relative_viscosity(1.5e-3, 0.45), rel=0.005
    )


def test_vessel_uses_pries_1994_when_asked():
    v = Vessel(radius=10e-6, length=1e-3, viscosity_law="pries-1994")
    assert v.relative_viscosity == pytest.approx(
        pries_1994_relative_viscosity(20e-6, 0.45), rel=1e-12
    )


# --- Poiseuille scaling ---------------------------------------------------------------------


def test_poiseuille_worked_example():
    # Hagen-Poiseuille by hand: R = 8 mu L / (pi r^4) = 8 * 3.5e-3 * 0.1 / (pi * 1e-12)
    #   = 2.8e-3 / 3.14159e-12 = 8.91268e8 Pa s/m^3; Q at 1 kPa = 1000 / 8.91268e8
    #   = 1.12200e-6 m^3/s; U = Q / (pi 1e-6) = 0.357143 m/s; tau_w = dp r / (2 L) = 5 Pa.
    v = newtonian_vessel()
    assert v.resistance == pytest.approx(8.91268e8, rel=1e-5)
    assert v.flow(1000.0) == pytest.approx(1.12200e-6, rel=1e-5)
    assert v.mean_velocity(1000.0) == pytest.approx(0.357143, rel=1e-5)
    assert v.wall_shear_stress(1000.0) == pytest.approx(5.0, rel=1e-12)
    # tau_w = mu * 4 Q / (pi r^3) for a Newtonian fluid
    assert 3.5e-3 * v.wall_shear_rate(1000.0) == pytest.approx(5.0, rel=1e-12)
    assert v.pressure_drop(v.flow(1000.0)) == pytest.approx(1000.0, rel=1e-12)


def test_public_vessel_name():
    assert rheoline.Vessel is Vessel


@given(st.floats(5e-6, 5e-3), st.floats(1e-4, 0.5))
def test_newtonian_radius_doubling_is_sixteen_fold(radius, length):
    # Hagen-Poiseuille: R ~ r^-4, so doubling r divides R by 2^4 = 16
    r1 = newtonian_vessel(radius, length).resistance
    r2 = newtonian_vessel(2 * radius, length).resistance
    assert r1 / r2 == pytest.approx(16.0, rel=1e-12)


def test_newtonian_blood_viscosity_is_one_viscosity_across_diameters():
    v = Vessel(radius=np.array([5e-6, 5e-4]), length=1e-3, viscosity_law="newtonian")
    mu = np.asarray(v.apparent_viscosity)
    assert mu[0] == pytest.approx(mu[1], rel=1e-15)
    assert resistance_elasticity(v, "radius") == pytest.approx(-4.0, rel=1e-6)


def test_pries_radius_doubling_in_capillaries_falls_more_than_sixteen_fold():
    # Pries 1992: below the viscosity minimum (about 6-7 um) apparent viscosity rises
    # steeply as the tube narrows, so doubling D from 4 to 8 um cuts R by more than 16.
    # (By hand: mu_rel(4 um) = 2.307, mu_rel(8 um) = 1.267, so about 16 * 1.82 = 29.)
    ratio = (
        Vessel(radius=2e-6, length=1e-4).resistance / Vessel(radius=4e-6, length=1e-4).resistance
    )
    assert ratio > 16.0
    assert ratio == pytest.approx(16.0 * 2.307 / 1.267, rel=2e-3)


def test_pries_radius_doubling_in_arterioles_falls_less_than_sixteen_fold():
    # Fahraeus & Lindqvist 1931, Pries 1992: from about 10 um to 1 mm apparent viscosity
    # grows with diameter, so the fall on doubling is less than Poiseuille's 16.
    ratio = (
        Vessel(radius=25e-6, length=1e-3).resistance / Vessel(radius=50e-6, length=1e-3).resistance
    )
    assert 10.0 < ratio < 16.0


# --- sensitivities ----------------------------------------------------------------------------


def test_resistance_vs_radius_curve():
    curve = resistance_vs_radius(newtonian_vessel(), [0.5e-3, 1e-3, 2e-3])
    np.testing.assert_allclose(curve.relative_resistance, [16.0, 1.0, 1 / 16], rtol=1e-12)
    assert curve.unit == "m"


def test_resistance_vs_hematocrit_hemodilution_lowers_resistance():
    # Pries 1992: relative viscosity rises with hematocrit at every diameter
    curve = resistance_vs_hematocrit(Vessel(radius=50e-6, length=1e-3), [0.0, 0.2, 0.3, 0.45, 0.6])
    assert np.all(np.diff(curve.resistance) > 0)
    assert curve.relative_resistance[3] == pytest.approx(1.0)
    assert curve.resistance[0] == pytest.approx(
        8 * plasma_viscosity(37.0) * 1e-3 / (np.pi * (50e-6) ** 4), rel=1e-12
    )


def test_resistance_vs_temperature_follows_plasma_viscosity():
    # With a Pries law the relative viscosity does not depend on temperature, so the
    # resistance ratio equals the plasma viscosity ratio.
    curve = resistance_vs_temperature(Vessel(radius=50e-6, length=1e-3), [25.0, 37.0])
    assert curve.relative_resistance[0] == pytest.approx(
        plasma_viscosity(25.0) / plasma_viscosity(37.0), rel=1e-12
    )
    # hypothermia raises resistance (plasma thickens on cooling)
    assert curve.relative_resistance[0] > 1.0


def test_resistance_elasticity_length_is_one():
    assert resistance_elasticity(Vessel(radius=50e-6, length=1e-3), "length") == pytest.approx(
        1.0, rel=1e-9
    )


def test_sensitivity_table_has_units_in_columns():
    frame = resistance_vs_radius(newtonian_vessel(), [1e-3, 2e-3]).to_frame()
    assert list(frame.columns) == ["radius [m]", "resistance [Pa s/m^3]", "relative resistance [-]"]


def test_fahraeus_lindqvist_curve_minimum_and_rise():
    # Pries 1992: at H_D 0.45 the minimum lies near 6-7 um (from memory);
    # Fahraeus & Lindqvist 1931: apparent viscosity falls as the tube narrows below ~1 mm.
    curve = fahraeus_lindqvist_curve(np.geomspace(4e-6, 1e-3, 400))
    assert 5e-6 < curve.minimum_diameter < 8e-6
    big = curve.diameter > 20e-6
    assert np.all(np.diff(curve.relative_viscosity[big]) > 0)
    assert curve.to_frame().shape == (400, 3)


# --- vectorization ------------------------------------------------------------------------------


def test_vessel_broadcasts_over_arrays():
    radius = np.array([10e-6, 50e-6, 200e-6])
    hematocrit = np.array([[0.3], [0.45]])
    v = Vessel(radius=radius, length=1e-3, hematocrit=hematocrit)
    assert np.shape(v.resistance) == (2, 3)
    single = Vessel(radius=50e-6, length=1e-3, hematocrit=0.3).resistance
    assert v.resistance[0, 1] == pytest.approx(single, rel=1e-12)
    assert np.shape(v.flow(np.array([[10.0], [20.0]]))) == (2, 3)


def test_large_artery_flow_flags_turbulence():
    # common practice, no source: Re above about 2000 departs from laminar flow
    v = Vessel(radius=0.01, length=0.1, viscosity_law="newtonian", viscosity=3.5e-3)
    with pytest.warns(RegimeWarning, match="Reynolds number"):
        v.flow(500.0)


# --- the bridge to the infusion line ---------------------------------------------------------


def test_annulus_factor_bird_stewart_lightfoot():
    # Bird, Stewart & Lightfoot 2002, eq. 2.4-17: Q ~ 1 - k^4 - (1 - k^2)^2 / ln(1/k);
    # k = 0.5: 1 - 0.0625 - 0.5625 / 0.693147 = 0.9375 - 0.811516 = 0.125984 -> 7.93751
    assert annulus_resistance_factor(0.5) == pytest.approx(7.93751, rel=1e-5)
    assert annulus_resistance_factor(0.0) == 1.0


def test_annulus_factor_matches_a_numerical_annulus_profile():
    # Independent check: finite-difference solution of (1/r) d/dr (r du/dr) = -1 between
    # r = k and r = 1, flow by the trapezoid rule, against the open tube's pi / 8.
    k = 0.3
    r = np.linspace(k, 1.0, 4001)
    h = r[1] - r[0]
    ri = r[1:-1]
    bands = np.zeros((3, ri.size))
    bands[0, 1:] = ri[:-1] + h / 2  # upper diagonal: r_{i+1/2}
    bands[1] = -2.0 * ri
    bands[2, :-1] = ri[1:] - h / 2  # lower diagonal: r_{i-1/2}
    u = np.zeros(r.size)
    u[1:-1] = solve_banded((1, 1), bands, -ri * h**2)
    flow = np.trapezoid(2 * np.pi * r * u, r)
    assert annulus_resistance_factor(k) == pytest.approx((np.pi / 8) / flow, rel=1e-4)


def test_infusion_site_small_catheter_no_flag():
    c = infusion_site_context(1.1e-3, 4e-3)
    assert not c.large_ratio
    assert c.diameter_ratio == pytest.approx(0.275)
    assert c.area_fraction == pytest.approx(0.275**2)
    # default back pressure 10 mmHg = 1333.224 Pa (NIST SP 811 Appendix B.8, seven digits);
    # common practice value
    assert c.back_pressure == pytest.approx(1333.224, rel=1e-6)
    assert c.drive_after_back_pressure(40000.0) == pytest.approx(40000.0 - 1333.224, rel=1e-6)


def test_infusion_site_large_catheter_warns_and_flags():
    # common practice, no source: catheter above about 45 % of the vein diameter is flagged
    vein = Vessel(radius=1.5e-3, length=0.05)
    with pytest.warns(RangeWarning, match="67% of the vein diameter"):
        c = vein.infusion_context(2e-3, vein_pressure=800.0)
    assert c.large_ratio
    assert c.back_pressure == 800.0
    # quiet mode keeps the flag
    c = infusion_site_context(np.array([1e-3, 2e-3]), 3e-3, warn=False)
    np.testing.assert_array_equal(c.large_ratio, [False, True])


# --- bad input ----------------------------------------------------------------------------


def test_negative_radius_raises():
    with pytest.raises(InputRangeError, match="radius must be greater than 0"):
        Vessel(radius=-1e-3, length=0.1)


def test_radius_in_millimetres_gets_a_hint():
    with pytest.raises(InputRangeError, match="pass metres"):
        Vessel(radius=2.0, length=0.1)


def test_hematocrit_as_percent_gets_a_hint():
    with pytest.raises(InputRangeError, match="pass 0.45"):
        Vessel(radius=1e-3, length=0.1, hematocrit=45)


def test_shapes_that_do_not_broadcast_raise():
    with pytest.raises(InputRangeError, match="must broadcast together"):
        Vessel(radius=np.array([1e-4, 2e-4, 3e-4]), length=0.01, hematocrit=np.array([0.3, 0.4]))


@given(st.floats(2e-6, 5e-4), st.floats(0.0, 0.6), st.floats(0.01, 0.3))
def test_pries_resistance_rises_with_hematocrit(radius, hematocrit, step):
    # Pries 1992 and 1994: relative viscosity grows with discharge hematocrit at every diameter
    for law in ("pries-1992", "pries-1994"):
        low = Vessel(radius=radius, length=1e-3, hematocrit=hematocrit, viscosity_law=law)
        high = Vessel(radius=radius, length=1e-3, hematocrit=hematocrit + step, viscosity_law=law)
        assert high.resistance > low.resistance


def test_unknown_viscosity_law_raises():
    with pytest.raises(InputRangeError, match="viscosity_law must be one of"):
        Vessel(radius=1e-3, length=0.1, viscosity_law="casson")


def test_viscosity_with_a_pries_law_raises():
    with pytest.raises(InputRangeError, match="only with viscosity_law='newtonian'"):
        Vessel(radius=1e-3, length=0.1, viscosity=3e-3)
    with pytest.raises(InputRangeError, match="only with viscosity_law='newtonian'"):
        apparent_blood_viscosity(1e-3, viscosity=3e-3)


def test_pries_1994_pole_raises():
    with pytest.raises(InputRangeError, match="more than 1.1 um"):
        pries_1994_relative_viscosity(1e-6, 0.45)


def test_bad_sensitivity_parameter_raises():
    with pytest.raises(InputRangeError, match="parameter must be one of"):
        resistance_curve(newtonian_vessel(), "viscosity", [1e-3])
    with pytest.raises(InputRangeError, match="must be a single value"):
        resistance_vs_radius(newtonian_vessel(radius=np.array([1e-3, 2e-3])), [1e-3])
    with pytest.raises(InputRangeError, match="non-zero"):
        resistance_elasticity(Vessel(radius=1e-4, length=1e-2, hematocrit=0.0), "hematocrit")


def test_fahraeus_lindqvist_curve_needs_a_pries_law():
    with pytest.raises(InputRangeError, match="no diameter effect"):
        fahraeus_lindqvist_curve(viscosity_law="newtonian")


def test_catheter_wider_than_vein_raises():
    with pytest.raises(InputRangeError, match="smaller than vein_diameter"):
        infusion_site_context(3e-3, 2e-3)
    with pytest.raises(InputRangeError, match="diameter_ratio must be below 1"):
        annulus_resistance_factor(1.0)


def test_public_names_of_vessels_and_hemodynamics_resolve():
    # every name this area adds to rheoline's lazy map loads from its module
    names = [
        name
        for name, module in rheoline._LAZY.items()
        if module
        in (
            "rheoline.model.vessels",
            "rheoline.model.stenosis",
            "rheoline.model.network",
            "rheoline.model.hemodynamics",
        )
    ]
    assert len(names) >= 20
    for name in names:
        assert callable(getattr(rheoline, name)), name
