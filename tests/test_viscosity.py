"""Water, infusion solutions and glycerol-water: checked against references outside rheoline."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from rheoline.errors import InputRangeError, RangeWarning
from rheoline.model import viscosity as v

# ---------------------------------------------------------------- water: published values


@pytest.mark.parametrize("temperature_c", np.arange(0.0, 60.1, 5.0))
def test_water_viscosity_matches_iapws_package_0_to_60_c(temperature_c):
    # source: IAPWS-95 density + IAPWS 2008 viscosity as the `iapws` package implements them
    iapws = pytest.importorskip("iapws")
    ref = iapws.IAPWS95(T=temperature_c + 273.15, P=0.101325)
    assert v.water_viscosity(temperature_c) == pytest.approx(ref.mu, rel=1e-3)


@pytest.mark.parametrize("temperature_c", [0.5, 4.0, 20.0, 37.0, 60.0, 80.0, 99.0])
def test_water_density_matches_iapws95(temperature_c):
    # source: IAPWS-95 (Wagner & Pruss 2002) via the `iapws` package; Kell 1975 fit within 0.01 %
    iapws = pytest.importorskip("iapws")
    ref = iapws.IAPWS95(T=temperature_c + 273.15, P=0.101325)
    assert v.water_density(temperature_c) == pytest.approx(ref.rho, rel=1e-4)


def test_water_viscosity_matches_coolprop():
    # source: CoolProp (IAPWS formulations), a second independent implementation
    coolprop = pytest.importorskip("CoolProp.CoolProp")
    for t in (5.0, 25.0, 50.0):
        ref = coolprop.PropsSI("V", "T", t + 273.15, "P", 101325.0, "Water")
        assert v.water_viscosity(t) == pytest.approx(ref, rel=1e-3)


@pytest.mark.parametrize(
    ("temperature_k", "density", "expected_upa_s"),
    [
        (298.15, 998.0, 889.735100),
        (298.15, 1200.0, 1437.649467),
        (373.15, 1000.0, 307.883622),
        (433.15, 1.0, 14.538324),
        (873.15, 600.0, 77.430195),
    ],
)
def test_iapws_2008_check_values(temperature_k, density, expected_upa_s):
    # source: IAPWS R12-08, Table 4 (check values without critical enhancement)
    # the table gives six decimals: agree to the last one
    assert v.iapws_2008_viscosity(temperature_k, density) * 1e6 == pytest.approx(
        expected_upa_s, abs=1e-6
    )


def test_water_trade_values():
    # common practice, no source: water is about 1.8 mPa s at 0 degC and 1.0 mPa s at 20 degC
    assert v.water_viscosity(0.0) * 1e3 == pytest.approx(1.8, abs=0.01)
    assert v.water_viscosity(20.0) * 1e3 == pytest.approx(1.0, abs=0.01)


def test_water_outside_range_warns_with_range():
    with pytest.warns(RangeWarning, match=r"0\.\.100 degC"):
        v.water_viscosity(105.0)
    with pytest.warns(RangeWarning, match=r"outside the validated range 0\.\.100"):
        v.water_density(-5.0)


@pytest.mark.parametrize("bad", [float("nan"), float("inf")])
def test_water_rejects_nan_naming_argument(bad):
    with pytest.raises(InputRangeError, match="temperature_c must be finite"):
        v.water_viscosity(bad)


def test_water_rejects_below_absolute_zero():
    with pytest.raises(InputRangeError, match=r"temperature_c must be above absolute zero.*kelvin"):
        v.water_viscosity(-300.0)


# ---------------------------------------------------------------- water: properties


@given(st.floats(0.0, 99.0), st.floats(0.01, 1.0))
def test_water_viscosity_falls_with_temperature(t, dt):
    assert v.water_viscosity(t + dt) < v.water_viscosity(t)


@given(st.lists(st.floats(0.0, 100.0), min_size=1, max_size=12))
def test_water_vectorized_equals_scalar(ts):
    arr = v.water_viscosity(np.array(ts))
    rho = v.water_density(np.array(ts))
    assert np.all(np.isfinite(arr)) and np.all(np.isfinite(rho))
    assert np.allclose(arr, [v.water_viscosity(t) for t in ts], rtol=1e-13, atol=0)
    assert np.allclose(rho, [v.water_density(t) for t in ts], rtol=1e-13, atol=0)


def test_water_density_maximum_near_4_c():
    # source: Kell 1975 - density maximum of water at 3.98 degC
    t = np.linspace(0.0, 10.0, 1001)
    assert t[np.argmax(v.water_density(t))] == pytest.approx(3.98, abs=0.02)


# ---------------------------------------------------------------- electrolyte solutions

NACL = "7647-14-5"
KCL = "7447-40-7"
CACL2 = "10043-52-4"


@pytest.mark.parametrize("temperature_c", [5.0, 20.0, 25.0, 37.0, 60.0])
@pytest.mark.parametrize("mass_fraction", [0.009, 0.05, 0.15])
def test_laliberte_nacl_matches_thermo(temperature_c, mass_fraction):
    # source: Laliberte 2007 viscosity / Laliberte & Cooper 2004 density as thermo.electrochem implements them
    electrochem = pytest.importorskip("thermo.electrochem")
    t_k = temperature_c + 273.15
    mu_ref = electrochem.Laliberte_viscosity(t_k, [mass_fraction], [NACL])
    rho_ref = electrochem.Laliberte_density(t_k, [mass_fraction], [NACL])
    assert v.laliberte_2007_viscosity({"NaCl": mass_fraction}, temperature_c) == pytest.approx(
        mu_ref, rel=0.01
    )
    assert v.laliberte_cooper_2004_density({"NaCl": mass_fraction}, temperature_c) == pytest.approx(
        rho_ref, rel=0.001
    )


@pytest.mark.parametrize("temperature_c", [20.0, 37.0])
def test_saline_0_9_matches_thermo(temperature_c):
    # source: thermo.electrochem Laliberte models at the mass fraction of 9 g/L NaCl
    electrochem = pytest.importorskip("thermo.electrochem")
    w = float(v.solution_mass_fractions({"NaCl": 9.0})["NaCl"])
    assert w == pytest.approx(9.0 / 1004.6, rel=2e-3)  # 9 g in a litre of ~1.0046 kg
    ref = electrochem.Laliberte_viscosity(temperature_c + 273.15, [w], [NACL])
    assert v.saline_viscosity(temperature_c) == pytest.approx(ref, rel=0.01)


@pytest.mark.parametrize("temperature_c", [5.0, 20.0, 37.0])
def test_saline_matches_coolprop_incompressible_nacl(temperature_c):
    # source: CoolProp INCOMP::MNA (aqueous NaCl, Melinder 2010 fit), a second reference:
    # viscosity within 2 %, density within 0.1 %
    coolprop = pytest.importorskip("CoolProp.CoolProp")
    w = float(v.solution_mass_fractions({"NaCl": 9.0})["NaCl"])
    fluid = f"INCOMP::MNA[{w}]"
    mu = coolprop.PropsSI("V", "T", temperature_c + 273.15, "P", 101325.0, fluid)
    rho = coolprop.PropsSI("D", "T", temperature_c + 273.15, "P", 101325.0, fluid)
    assert v.saline_viscosity(temperature_c) == pytest.approx(mu, rel=0.02)
    assert v.saline_density(temperature_c) == pytest.approx(rho, rel=1e-3)


def test_lactated_ringers_salts_match_thermo_mixture():
    # source: thermo.electrochem.Laliberte_viscosity mixture rule for NaCl + KCl + CaCl2
    electrochem = pytest.importorskip("thermo.electrochem")
    ws = v.solution_mass_fractions(v.LACTATED_RINGERS_G_PER_L)
    ref = electrochem.Laliberte_viscosity(
        310.15, [float(ws["NaCl"]), float(ws["KCl"]), float(ws["CaCl2"])], [NACL, KCL, CACL2]
    )
    assert v.lactated_ringers_viscosity(37.0) == pytest.approx(ref, rel=0.01)
    rho_ref = electrochem.Laliberte_density(
        310.15, [float(ws["NaCl"]), float(ws["KCl"]), float(ws["CaCl2"])], [NACL, KCL, CACL2]
    )
    assert v.lactated_ringers_density(37.0) == pytest.approx(rho_ref, rel=1e-3)


def test_solutions_a_little_thicker_than_water():
    # common practice, no source: crystalloids are within a few percent of water; dextrose 5 % ~10-15 % more
    for t in (20.0, 37.0):
        mu_w = v.water_viscosity(t)
        assert 1.0 < v.saline_viscosity(t) / mu_w < 1.03
        assert 1.0 < v.lactated_ringers_viscosity(t) / mu_w < 1.03
        assert 1.08 < v.dextrose_5_viscosity(t) / mu_w < 1.18  # from memory: ~1.13 at 20 degC


def test_albumin_orders_and_density():
    # from memory: 5 % albumin ~1.2-1.3 x saline; 20-25 % albumin ~2.5-5 x saline
    for t in (20.0, 37.0):
        r5 = v.albumin_viscosity(50.0, t) / v.saline_viscosity(t)
        r20 = v.albumin_viscosity(200.0, t) / v.saline_viscosity(t)
        r25 = v.albumin_viscosity(250.0, t) / v.saline_viscosity(t)
        assert 1.15 < r5 < 1.35
        assert 2.3 < r20 < r25 < 5.5
    # partial specific volume 0.733 mL/g (from memory): 5 % albumin is ~13 kg/m^3 denser than saline
    assert v.albumin_density(50.0, 20.0) - v.saline_density(20.0) == pytest.approx(13.2, abs=0.5)


def test_laliberte_unknown_solute_names_choices():
    with pytest.raises(
        InputRangeError, match=r"solute 'NaBr'.*choose from \['CaCl2', 'KCl', 'NaCl'\]"
    ):
        v.laliberte_2007_viscosity({"NaBr": 0.01}, 20.0)


def test_laliberte_mass_fractions_must_leave_water():
    with pytest.raises(InputRangeError, match="add up to less than 1"):
        v.laliberte_2007_viscosity({"NaCl": 0.6, "KCl": 0.5}, 20.0)
    with pytest.raises(InputRangeError, match=r"mass fraction of NaCl must lie between 0 and 1"):
        v.laliberte_2007_viscosity({"NaCl": -0.1}, 20.0)


def test_albumin_concentration_range():
    with pytest.raises(
        InputRangeError, match=r"concentration must lie between 0 and 300 kg/m\^3.*50 for a 5 %"
    ):
        v.albumin_viscosity(500.0, 20.0)


@given(st.floats(0.0, 100.0), st.floats(0.0, 250.0))
def test_saline_concentration_raises_viscosity(t, c):
    mu = v.saline_viscosity(t, concentration=c)
    assert np.isfinite(mu)
    assert v.saline_viscosity(t, concentration=c + 10.0) > mu


# ---------------------------------------------------------------- glycerol-water

# Segur & Oberstar, Ind. Eng. Chem. 43 (1951) 2117, viscosity at 20 degC [mPa s] (from memory)
SEGUR_OBERSTAR_20C = {0.40: 3.72, 0.50: 6.00, 0.60: 10.8, 0.70: 22.5, 0.80: 60.1}


@pytest.mark.parametrize(("mass_fraction", "mpa_s"), sorted(SEGUR_OBERSTAR_20C.items()))
def test_glycerol_water_matches_segur_oberstar_20c(mass_fraction, mpa_s):
    # source: Segur & Oberstar 1951 table (values from memory), within 5 %
    assert v.glycerol_water_viscosity(mass_fraction, 20.0) * 1e3 == pytest.approx(mpa_s, rel=0.05)


@pytest.mark.parametrize("mass_fraction", [0.1, 0.2, 0.3, 0.4, 0.5, 0.6])
@pytest.mark.parametrize("temperature_c", [20.0, 30.0])
def test_glycerol_water_matches_coolprop_incompressible(mass_fraction, temperature_c):
    # source: CoolProp INCOMP::MGL (aqueous glycerol, Melinder 2010 fit, valid to 60 wt %):
    # viscosity within 5 % (the two correlations' own scatter), density within 0.3 %
    coolprop = pytest.importorskip("CoolProp.CoolProp")
    fluid = f"INCOMP::MGL[{mass_fraction}]"
    mu = coolprop.PropsSI("V", "T", temperature_c + 273.15, "P", 101325.0, fluid)
    rho = coolprop.PropsSI("D", "T", temperature_c + 273.15, "P", 101325.0, fluid)
    assert v.glycerol_water_viscosity(mass_fraction, temperature_c) == pytest.approx(mu, rel=0.05)
    assert v.glycerol_water_density(mass_fraction, temperature_c) == pytest.approx(rho, rel=3e-3)


def test_glycerol_pure_and_water_ends():
    # source: Segur & Oberstar 1951 - pure glycerol 1410 mPa s at 20 degC (from memory), within 5 %
    assert v.glycerol_water_viscosity(1.0, 20.0) == pytest.approx(1.410, rel=0.05)
    # Cheng 2008 at C_m = 0 reduces to water (IAPWS 2008 here)
    assert v.glycerol_water_viscosity(0.0, 25.0) == pytest.approx(
        v.water_viscosity(25.0), rel=1e-12
    )


@pytest.mark.parametrize(
    ("mass_fraction", "density"), [(0.4, 1099.3), (0.5, 1126.3), (0.8, 1208.5), (1.0, 1261.3)]
)
def test_glycerol_water_density_20c(mass_fraction, density):
    # source: Segur & Oberstar 1951 density table at 20 degC (values from memory), within 0.3 %
    assert v.glycerol_water_density(mass_fraction, 20.0) == pytest.approx(density, rel=3e-3)


def test_glycerol_density_warns_outside_fitted_range():
    with pytest.warns(RangeWarning, match=r"0\.\.40 degC of Volk & Kaehler 2018"):
        v.glycerol_water_density(0.5, 60.0)


@pytest.mark.parametrize("temperature_c", [5.0, 10.0, 37.0, 40.0])
def test_glycerol_density_over_the_warned_range(temperature_c):
    # source: CoolProp INCOMP::MGL (Melinder 2010): within 0.3 % over 5-40 degC
    coolprop = pytest.importorskip("CoolProp.CoolProp")
    for w in (0.2, 0.4, 0.6):
        rho = coolprop.PropsSI("D", "T", temperature_c + 273.15, "P", 101325.0, f"INCOMP::MGL[{w}]")
        assert v.glycerol_water_density(w, temperature_c) == pytest.approx(rho, rel=3e-3)


@given(st.floats(0.0, 1.0), st.floats(0.0, 100.0))
def test_glycerol_inverse_round_trips(w, t):
    mu = v.glycerol_water_viscosity(w, t)
    assert v.glycerol_fraction_for_viscosity(mu, t) == pytest.approx(w, abs=1e-9)


@given(st.floats(0.0, 0.99), st.floats(0.0, 100.0))
def test_glycerol_viscosity_rises_with_fraction_and_falls_with_temperature(w, t):
    mu = v.glycerol_water_viscosity(w, t)
    assert np.isfinite(mu)
    assert v.glycerol_water_viscosity(w + 0.01, t) > mu
    if t < 99.0:
        assert v.glycerol_water_viscosity(w, t + 1.0) < mu


def test_glycerol_vectorized_equals_scalar():
    w = np.array([0.1, 0.4, 0.6])
    t = np.array([[10.0], [25.0]])
    out = v.glycerol_water_viscosity(w, t)
    assert out.shape == (2, 3)
    assert out[1, 2] == v.glycerol_water_viscosity(0.6, 25.0)
    inv = v.glycerol_fraction_for_viscosity(out, t)
    assert np.allclose(inv, np.broadcast_to(w, (2, 3)), atol=1e-9)


def test_glycerol_inverse_out_of_reach_names_limits():
    with pytest.raises(
        InputRangeError, match=r"cannot be reached.*between 0\.001002 \(water\) and 1\.4\d* Pa s"
    ):
        v.glycerol_fraction_for_viscosity(0.5e-3, 20.0)
    with pytest.raises(InputRangeError, match=r"cannot be reached"):
        v.glycerol_fraction_for_viscosity(5.0, 20.0)


def test_glycerol_fraction_as_percent_suggests_fraction():
    with pytest.raises(
        InputRangeError,
        match=r"mass_fraction must be a fraction.*got 40; if that is wt %, pass 0\.4",
    ):
        v.glycerol_water_viscosity(40.0, 20.0)


def test_laliberte_warns_above_fitted_concentration():
    # Laliberte 2009 compilation: NaCl coefficients fitted up to a mass fraction of about 0.26
    with pytest.warns(
        RangeWarning,
        match=r"mass fraction of NaCl 0\.3\.\.0\.3 is outside the validated range 0\.\.0\.2645",
    ):
        v.laliberte_2007_viscosity({"NaCl": 0.3}, 20.0)


def test_a_recipes_kept_mass_fractions_are_the_computed_ones():
    # a w/v recipe's mass fractions are fixed at 20 degC and kept for the next fluid built
    # from it; what is kept equals a fresh solve, and a caller's edit does not reach it
    from rheoline.model import solutions

    fresh = solutions.solution_mass_fractions({"NaCl": 9.0}, 20.0)
    kept = solutions._recipe_mass_fractions({"NaCl": 9.0})
    assert float(kept["NaCl"]) == float(fresh["NaCl"])
    kept["NaCl"] = -1.0
    assert float(solutions._recipe_mass_fractions({"NaCl": 9.0})["NaCl"]) == float(fresh["NaCl"])
    vector = solutions._recipe_mass_fractions({"NaCl": np.array([4.5, 9.0])})
    np.testing.assert_array_equal(vector["NaCl"][1], fresh["NaCl"])
    # 0.9 % saline at two temperatures: the same recipe, so the same viscosity as before
    assert v.saline_viscosity(37.0) < v.saline_viscosity(20.0)
