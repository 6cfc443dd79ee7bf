"""Blood: plasma, whole-blood viscosity, shear-thinning models and Pries 1992."""

import numpy as np
import pytest
from hypothesis import assume, given
from hypothesis import strategies as st

from rheoline.errors import InputRangeError, RangeWarning
from rheoline.model import blood
from rheoline.model.rheology import Carreau, CarreauYasuda, Casson, Newtonian, PowerLaw
from rheoline.model.viscosity import water_viscosity

hematocrits = st.floats(0.0, 0.8)
temperatures = st.floats(0.0, 42.0)


# ---------------------------------------------------------------- published / trade values


def test_whole_blood_high_shear_at_normal_hematocrit():
    # common practice, no source: whole blood, H 0.45, 37 degC, high shear: 3-4 mPa s
    assert 3.0e-3 <= blood.blood_viscosity(0.45, 37.0) <= 4.0e-3
    assert 3.0e-3 <= blood.whole_blood_high_shear_viscosity(0.45) <= 4.0e-3


def test_plasma_viscosity_normal_range():
    # common practice, no source: plasma viscosity 1.10-1.35 mPa s at 37 degC
    assert 1.10e-3 <= blood.plasma_viscosity(37.0) <= 1.35e-3
    # plasma follows water's temperature dependence (the stated assumption)
    assert blood.plasma_viscosity(20.0) / blood.plasma_viscosity(37.0) == pytest.approx(
        water_viscosity(20.0) / water_viscosity(37.0), rel=1e-12
    )


def test_carreau_shapes_are_cho_kensey_and_limits_are_pries_and_the_fit():
    # source: Cho & Kensey 1991, Biorheology 28:241 (from memory): Carreau lambda 3.313 s,
    # n 0.3568; Carreau-Yasuda lambda 1.902 s, n 0.22, a 1.25.  High-shear limit: plasma x
    # Pries 1992 at its largest tube (3.2 at H 0.45, Pries 1992 eq. 7 evaluated by hand);
    # zero-shear limit: mu_inf (1 + c H) with c fitted to Wells & Merrill 1962 (see
    # tests/test_validation.py, which refits c from the packaged data)
    c = blood.blood_rheology(0.45, 37.0, "carreau")
    assert isinstance(c, Carreau)
    assert (c.relaxation_time, c.flow_index) == (3.313, 0.3568)
    assert c.mu_inf == pytest.approx(blood.plasma_viscosity(37.0) * 3.2, rel=1e-3)
    assert c.mu_zero == pytest.approx(c.mu_inf * (1 + 0.45 * 42.58), rel=1e-12)
    cy = blood.blood_rheology(0.45, 37.0, "carreau-yasuda")
    assert isinstance(cy, CarreauYasuda)
    assert (cy.relaxation_time, cy.flow_index, cy.a) == (1.902, 0.22, 1.25)
    assert cy.mu_zero == pytest.approx(cy.mu_inf * (1 + 0.45 * 50.50), rel=1e-12)


def test_red_cells_in_additive_solution_do_not_aggregate():
    # the suspending medium sets the scale; only plasma makes red cells aggregate, so a
    # stored red-cell unit (additive solution) has no low-shear rise and no yield stress
    rbc = blood.blood_rheology(0.65, 4.0, "carreau", medium="additive-solution")
    assert rbc.mu_zero == pytest.approx(rbc.mu_inf, rel=1e-12)
    ratio = blood.medium_viscosity(4.0, "additive-solution") / blood.plasma_viscosity(4.0)
    assert ratio == pytest.approx(1.15 / 1.8, rel=1e-12)
    assert blood.blood_rheology(0.65, 4.0, "casson", medium="additive-solution").yield_stress == 0
    with pytest.raises(InputRangeError, match="not a suspending medium"):
        blood.blood_rheology(0.65, 4.0, medium="saline")


def test_carreau_tends_to_its_limits():
    # Carreau model (Bird et al. 1987): mu -> mu0 as shear rate -> 0, mu -> mu_inf as shear rate -> inf
    for model in ("carreau", "carreau-yasuda"):
        m = blood.blood_rheology(0.45, 37.0, model)
        assert m.viscosity(1e-7) == pytest.approx(m.mu_zero, rel=1e-6)
        assert m.viscosity(1e9) == pytest.approx(m.mu_inf, rel=1e-3)
        assert m.zero_shear_viscosity == m.mu_zero


def test_low_shear_blood_is_much_thicker():
    # from memory (Chien 1970 viscometry): H 0.45 blood at 0.1 1/s is roughly 30-100 mPa s
    mu = blood.blood_viscosity(0.45, 37.0, shear_rate=0.1)
    assert 0.03 < mu < 0.1


def test_casson_yield_stress_merrill():
    # from memory (Merrill et al. 1963/1965): tau_y ~ 0.001-0.01 Pa at H 0.45; zero below H ~0.05
    assert 1e-3 < blood.merrill_1965_yield_stress(0.45) < 1e-2
    assert blood.merrill_1965_yield_stress(0.04) == 0.0
    m = blood.blood_rheology(0.45, 37.0, "casson")
    assert isinstance(m, Casson)
    assert m.shear_rate_at_stress(0.5 * m.yield_stress) == 0.0


def test_power_law_blood_follows_carreau_in_its_window():
    # the power law is the log-least-squares fit to the Carreau curve over 10-1e4 1/s:
    # within that window it stays within 25 % of it, and it is shear-thinning
    m = blood.blood_rheology(0.45, 37.0, "power-law")
    c = blood.blood_rheology(0.45, 37.0, "carreau")
    assert isinstance(m, PowerLaw)
    g = np.logspace(1, 4, 13)
    assert np.all(np.abs(m.viscosity(g) / c.viscosity(g) - 1) < 0.25)
    assert 0.5 < m.flow_index < 1.0
    # plasma (H = 0) is Newtonian in every model
    assert blood.blood_rheology(0.0, 37.0, "power-law").flow_index == pytest.approx(1.0, abs=1e-9)
    assert blood.blood_rheology(0.0, 37.0, "carreau").mu_zero == pytest.approx(
        blood.plasma_viscosity(37.0)
    )


def test_newtonian_blood_model():
    m = blood.blood_rheology(0.45, 37.0, "newtonian")
    assert isinstance(m, Newtonian) and m.mu == pytest.approx(blood.blood_viscosity(0.45))


def test_quemada_formula():
    # source: Quemada 1978, mu_rel = (1 - k H / 2)^-2, evaluated by hand: k 2, H 0.5 -> 4
    assert blood.quemada_1978_relative_viscosity(0.5, 2.0) == pytest.approx(4.0)
    with pytest.raises(InputRangeError, match="maximum packing"):
        blood.quemada_1978_relative_viscosity(0.9, 2.5)


def test_blood_density():
    # common practice, no source: whole blood about 1050-1065 kg/m^3
    assert 1050.0 <= blood.blood_density(0.45) <= 1065.0


# ---------------------------------------------------------------- properties


@given(hematocrits, st.floats(0.01, 0.1), temperatures)
def test_viscosity_rises_with_hematocrit(h, dh, t):
    h2 = min(h + dh, 0.8)
    assume(h2 - h >= 1e-3)
    assert blood.blood_viscosity(h2, t) > blood.blood_viscosity(h, t)
    assert blood.blood_viscosity(h2, t, shear_rate=10.0) > blood.blood_viscosity(
        h, t, shear_rate=10.0
    )


@given(hematocrits, temperatures, st.floats(0.5, 10.0))
def test_viscosity_rises_as_temperature_falls(h, t, dt):
    cold = max(t - dt, 0.0)
    assume(t - cold >= 0.01)
    assert blood.blood_viscosity(h, cold) > blood.blood_viscosity(h, t)
    assert blood.plasma_viscosity(cold) > blood.plasma_viscosity(t)


@given(st.floats(0.05, 0.8), temperatures, st.floats(1e-3, 1e5))
def test_shear_thinning_and_finite(h, t, g):
    for model in blood.BLOOD_RHEOLOGY_MODELS:
        m = blood.blood_rheology(h, t, model)
        mu = m.viscosity(g)
        assert np.isfinite(mu) and mu > 0
        assert m.viscosity(2.0 * g) <= mu * (1 + 1e-12)


@given(st.lists(st.tuples(hematocrits, temperatures, st.floats(0.01, 1e4)), min_size=1, max_size=8))
def test_vectorized_equals_scalar(rows):
    h, t, g = (np.array(c) for c in zip(*rows, strict=True))
    for model in blood.BLOOD_RHEOLOGY_MODELS:
        vec = blood.blood_viscosity(h, t, shear_rate=g, model=model)
        scal = [blood.blood_viscosity(a, b, shear_rate=c, model=model) for a, b, c in rows]
        assert np.allclose(vec, scal, rtol=1e-10, atol=0)
    assert np.allclose(
        blood.blood_viscosity(h, t),
        [blood.blood_viscosity(a, b) for a, b, _ in rows],
        rtol=1e-12,
        atol=0,
    )


def test_rheology_parameters_broadcast():
    h = np.array([0.3, 0.45, 0.6])
    t = np.array([[20.0], [37.0]])
    m = blood.blood_rheology(h, t, "carreau")
    assert np.shape(m.mu_zero) == (2, 3) and np.shape(m.mu_inf) == (2, 3)
    tau = m.stress(50.0)
    assert tau.shape == (2, 3)
    assert np.allclose(m.shear_rate_at_stress(tau), 50.0, rtol=1e-9)


# ---------------------------------------------------------------- bad input


def test_hematocrit_percent_suggests_fraction():
    with pytest.raises(
        ValueError,
        match=r"hematocrit must be a fraction from 0 to 1, got 45; if that is a percent, pass 0\.45",
    ):
        blood.blood_viscosity(45, 37.0)


@pytest.mark.parametrize(
    ("value", "pattern"),
    [
        (-0.1, r"hematocrit must lie between 0 and 0\.95"),
        (float("nan"), "hematocrit must be finite"),
    ],
)
def test_bad_hematocrit_names_argument(value, pattern):
    with pytest.raises(InputRangeError, match=pattern):
        blood.blood_viscosity(value)


def test_bad_shear_rate_and_temperature():
    with pytest.raises(InputRangeError, match=r"shear_rate must be greater than 0 1/s"):
        blood.blood_viscosity(0.45, 37.0, shear_rate=-1.0)
    with pytest.raises(InputRangeError, match="temperature_c must be finite"):
        blood.plasma_viscosity(float("nan"))


def test_temperature_outside_range_warns_with_range():
    with pytest.warns(
        RangeWarning,
        match=r"temperature_c 45\.\.45 degC is outside the validated range 0\.\.42 degC",
    ):
        blood.blood_viscosity(0.45, 45.0)


def test_high_hematocrit_warns():
    with pytest.warns(
        RangeWarning, match=r"hematocrit 0\.9\.\.0\.9 is outside the validated range 0\.\.0\.8"
    ):
        blood.blood_viscosity(0.9)


def test_unknown_model_suggests():
    with pytest.raises(
        InputRangeError,
        match=r"model 'carreu' is not a blood rheology model.*did you mean 'carreau'",
    ):
        blood.blood_rheology(0.45, 37.0, "carreu")


# ---------------------------------------------------------------- Pries 1992


def pries_in_vitro(d_um, h):
    """Pries, Neuhaus & Gaehtgens 1992, Am. J. Physiol. 263:H1770, eqs. for mu_0.45 and C (written here)."""
    mu45 = 220.0 * np.exp(-1.3 * d_um) + 3.2 - 2.44 * np.exp(-0.06 * d_um**0.645)
    c = (0.8 + np.exp(-0.075 * d_um)) * (-1.0 + 1.0 / (1.0 + 1e-11 * d_um**12)) + 1.0 / (
        1.0 + 1e-11 * d_um**12
    )
    return 1.0 + (mu45 - 1.0) * ((1.0 - h) ** c - 1.0) / ((1.0 - 0.45) ** c - 1.0)


@pytest.mark.parametrize("d_um", [4.0, 6.0, 10.0, 20.0, 50.0, 100.0, 300.0, 1000.0])
@pytest.mark.parametrize("h", [0.2, 0.45, 0.6])
def test_pries_matches_published_equations(d_um, h):
    # source: Pries et al. 1992 in-vitro law, equations evaluated independently above
    assert blood.pries_1992_relative_viscosity(d_um * 1e-6, h) == pytest.approx(
        pries_in_vitro(d_um, h), rel=1e-12
    )


def test_pries_hand_value():
    # source: Pries et al. 1992 at D = 10 um, H 0.45: mu_rel = mu_0.45
    # = 220 e^-13 + 3.2 - 2.44 e^(-0.06 * 10^0.645) = 0.0005 + 3.2 - 2.44 * 0.76726 = 1.3284
    assert blood.pries_1992_relative_viscosity(10e-6, 0.45) == pytest.approx(1.3284, abs=1e-4)


def test_pries_minimum_between_5_and_10_um():
    # source: Pries et al. 1992 - minimum apparent viscosity near 5-7 um (Fahraeus-Lindqvist)
    d = np.linspace(3.5e-6, 100e-6, 2000)
    rel = blood.pries_1992_relative_viscosity(d, 0.45)
    assert 5e-6 <= d[np.argmin(rel)] <= 10e-6


def test_pries_large_tube_limit():
    # source: Pries et al. 1992 - mu_0.45 -> 3.2 for large tubes; above 1 mm within 0.5 %
    for d in (1e-3, 1.5e-3, 1.9e-3):
        assert blood.pries_1992_relative_viscosity(d, 0.45) == pytest.approx(3.2, rel=5e-3)


def test_pries_warns_outside_diameter_range():
    with pytest.warns(RangeWarning, match=r"3\.3\.\.1978 um"):
        blood.pries_1992_relative_viscosity(5e-3, 0.45)


@given(st.floats(3.5, 1900.0), st.floats(0.05, 0.8), st.floats(0.01, 0.1))
def test_pries_rises_with_hematocrit(d_um, h, dh):
    h2 = min(h + dh, 0.9)
    assert blood.pries_1992_relative_viscosity(
        d_um * 1e-6, h2
    ) > blood.pries_1992_relative_viscosity(d_um * 1e-6, h)
