"""Bench-data reduction: plate drag, rheology fits on synthetic seeded data, temperature fits.

The fitted data are generated here from known parameters with seeded multiplicative
noise, so each check says what the fit must recover.
"""

import numpy as np
import pytest

from rheoline.errors import InputRangeError, RangeWarning, RegimeWarning
from rheoline.model.fitting import (
    RheologyFit,
    couette_viscosity,
    fit_rheology,
    fit_viscosity_temperature,
    plate_drag_viscosity,
)
from rheoline.model.rheology import Carreau, Casson, Newtonian, PowerLaw
from rheoline.model.viscosity import water_viscosity


def noisy(model, rate, scatter, seed):
    rng = np.random.default_rng(seed)
    return model.stress(rate) * np.exp(rng.normal(0.0, scatter, np.size(rate)))


# ---------------------------------------------------------------- plate drag


def test_plate_drag_newton_law_by_hand():
    # source: Newton's law of viscosity, tau = mu U / h (Bird, Stewart & Lightfoot 2002, sec. 1.1):
    # water 1.002 mPa s, plate 0.01 m^2 at 0.05 m/s over 0.5 mm: F = 1.002e-3 * 0.01 * 0.05 / 5e-4 = 1.002e-3 N
    assert plate_drag_viscosity(1.002e-3, 0.01, 0.05, 5e-4) == pytest.approx(1.002e-3, rel=1e-12)


def test_plate_drag_vectorized():
    out = plate_drag_viscosity(np.array([1e-3, 2e-3]), 0.01, 0.05, 5e-4)
    assert out.shape == (2,) and out[1] == pytest.approx(2 * out[0])


@pytest.mark.parametrize("arg", ["force", "area", "speed", "gap"])
def test_plate_drag_rejects_nonpositive_naming_argument(arg):
    kwargs = {"force": 1e-3, "area": 0.01, "speed": 0.05, "gap": 5e-4}
    kwargs[arg] = -1.0
    with pytest.raises(InputRangeError, match=f"{arg} must be greater than 0"):
        plate_drag_viscosity(**kwargs)


def test_plate_drag_warns_when_film_may_be_turbulent():
    # water film 5 mm thick at 1 m/s: Re = 998 * 1 * 5e-3 / 1e-3 ~ 5000 > ~1400
    # (plane Couette transition, Tillmark & Alfredsson 1992, from memory)
    force = 1.0e-3 * 0.01 * 1.0 / 5e-3
    with pytest.warns(RegimeWarning, match="may not be laminar"):
        plate_drag_viscosity(force, 0.01, 1.0, 5e-3, density=998.0)
    plate_drag_viscosity(1.002e-3, 0.01, 0.05, 5e-4, density=998.0)  # Re = 25: silent


def test_couette_by_hand_and_narrow_gap_limit():
    # Bird, Stewart & Lightfoot 2002, Example 3.6-3: mu = T (Ro^2 - Ri^2) / (4 pi L Omega Ri^2 Ro^2)
    # T 1e-4 N m, Ri 20 mm, Ro 21 mm, L 50 mm, Omega 2 rad/s: 4.1e-9 / 2.2167e-7 = 0.018496 Pa s
    assert couette_viscosity(1.0e-4, 0.02, 0.021, 0.05, 2.0) == pytest.approx(0.018496, rel=1e-4)
    # narrow gap: the annulus reduces to a plate of area 2 pi R L sliding at Omega R over the gap
    r, gap, length, omega, torque = 0.02, 1e-5, 0.05, 2.0, 1e-4
    plate = plate_drag_viscosity(torque / r, 2 * np.pi * r * length, omega * r, gap)
    assert couette_viscosity(torque, r, r + gap, length, omega) == pytest.approx(plate, rel=1e-3)
    with pytest.raises(InputRangeError, match="outer_radius must be larger than inner_radius"):
        couette_viscosity(1e-4, 0.02, 0.02, 0.05, 2.0)


# ---------------------------------------------------------------- rheology fits


def test_newtonian_data_called_newtonian():
    rate = np.logspace(0, 3, 16)
    tau = noisy(Newtonian(3.0e-3), rate, 0.02, seed=11)
    fit = fit_rheology(rate, tau)
    assert isinstance(fit, RheologyFit)
    assert fit.is_newtonian
    assert fit.flow_index_interval[0] <= 1.0 <= fit.flow_index_interval[1]
    assert fit.fits["newtonian"].parameters["mu"] == pytest.approx(3.0e-3, rel=0.02)
    # the 2 % scatter on 16 points gives a standard error of about 0.5 % on mu
    assert 0.001 < fit.fits["newtonian"].standard_errors["mu"] / 3.0e-3 < 0.02
    assert fit.best in ("newtonian", "power-law", "casson")
    assert "newtonian=True" in repr(fit) and "AICc" in repr(fit)


def test_power_law_data_not_newtonian_and_recovered():
    rate = np.logspace(0, 3, 20)
    tau = noisy(PowerLaw(0.02, 0.7), rate, 0.03, seed=7)
    fit = fit_rheology(rate, tau, models=["newtonian", "power-law", "casson"])
    assert not fit.is_newtonian
    assert fit.best == "power-law"
    n, se = fit.parameters["flow_index"], fit.standard_errors["flow_index"]
    assert abs(n - 0.7) < 3 * se + 1e-3
    assert fit.parameters["consistency"] == pytest.approx(0.02, rel=0.05)
    assert fit.flow_index == pytest.approx(
        n, rel=1e-6
    )  # the straight-line fit is the power-law fit


def test_carreau_blood_like_data_recovered():
    # parameters of Cho & Kensey 1991 (from memory) used only to generate the data
    truth = Carreau(mu_zero=0.056, mu_inf=0.00345, relaxation_time=3.313, flow_index=0.3568)
    rate = np.logspace(-2, 3, 30)
    fit = fit_rheology(
        rate,
        viscosity=truth.viscosity(rate) * np.exp(np.random.default_rng(3).normal(0, 0.01, 30)),
        models=["newtonian", "power-law", "carreau", "carreau-yasuda"],
    )
    assert fit.best in ("carreau", "carreau-yasuda")
    c = fit.fits["carreau"].parameters
    assert c["mu_zero"] == pytest.approx(0.056, rel=0.05)
    assert c["mu_inf"] == pytest.approx(0.00345, rel=0.05)
    assert c["relaxation_time"] == pytest.approx(3.313, rel=0.15)
    assert c["flow_index"] == pytest.approx(0.3568, rel=0.1)
    assert fit.model.viscosity(10.0) == pytest.approx(truth.viscosity(10.0), rel=0.02)
    assert not fit.is_newtonian
    assert fit.residuals.shape == (30,) and np.all(np.abs(fit.residuals) < 0.05)


def test_casson_data_recovered():
    truth = Casson(yield_stress=0.005, casson_viscosity=0.0035)
    rate = np.logspace(-1, 3, 25)
    fit = fit_rheology(
        rate, noisy(truth, rate, 0.01, seed=5), models=["newtonian", "power-law", "casson"]
    )
    assert fit.best == "casson"
    assert fit.parameters["yield_stress"] == pytest.approx(0.005, rel=0.05)
    assert fit.parameters["casson_viscosity"] == pytest.approx(0.0035, rel=0.03)


def test_fit_on_noise_free_newtonian_picks_simplest():
    rate = np.logspace(0, 3, 8)
    fit = fit_rheology(rate, viscosity=np.full(8, 1.0e-3), models=["newtonian", "power-law"])
    assert fit.best == "newtonian" and fit.is_newtonian


def test_flow_index_tolerance_widens_newtonian_test():
    rate = np.logspace(0, 3, 12)
    tau = PowerLaw(1e-3, 0.99).stress(rate)  # noise-free, n = 0.99
    assert not fit_rheology(rate, tau, models=["newtonian"]).is_newtonian
    assert fit_rheology(rate, tau, models=["newtonian"], flow_index_tolerance=0.02).is_newtonian


def test_fit_input_errors():
    rate = np.array([1.0, 10.0, 100.0])
    with pytest.raises(InputRangeError, match="exactly one of shear_stress="):
        fit_rheology(rate)
    with pytest.raises(InputRangeError, match="exactly one of shear_stress="):
        fit_rheology(rate, rate, viscosity=rate)
    with pytest.raises(InputRangeError, match="same length, got 3 and 2"):
        fit_rheology(rate, [1.0, 2.0])
    with pytest.raises(
        InputRangeError, match="at least 3 points at 2 or more distinct shear rates"
    ):
        fit_rheology([5.0, 5.0, 5.0], [1.0, 1.1, 0.9])
    with pytest.raises(InputRangeError, match="shear_stress must be greater than 0"):
        fit_rheology(rate, [1.0, -2.0, 3.0])
    with pytest.raises(
        InputRangeError, match=r"'carrau' is not a rheology model; did you mean 'carreau'"
    ):
        fit_rheology(rate, rate, models=["carrau"])
    with pytest.raises(InputRangeError, match="confidence must lie between"):
        fit_rheology(rate, rate, confidence=1.5)


# ---------------------------------------------------------------- temperature fits


def test_andrade_two_points_exact():
    # Andrade through two points reproduces both exactly (two equations, two unknowns)
    fit = fit_viscosity_temperature([10.0, 50.0], [1.3e-3, 0.55e-3])
    assert fit.viscosity(10.0) == pytest.approx(1.3e-3, rel=1e-12)
    assert fit.viscosity(50.0) == pytest.approx(0.55e-3, rel=1e-12)


def test_andrade_on_water_interpolates():
    # source: IAPWS 2008 water (this package, checked against iapws): Andrade over 15-45 degC
    # interpolates water within 1 % (water's ln(mu) is nearly linear in 1/T over 30 K)
    temps = np.array([15.0, 25.0, 35.0, 45.0])
    fit = fit_viscosity_temperature(temps, water_viscosity(temps))
    assert fit.viscosity(30.0) == pytest.approx(water_viscosity(30.0), rel=0.01)
    assert np.all(np.isfinite(list(fit.standard_errors.values())))
    with pytest.warns(RangeWarning, match=r"15\.\.45 degC"):
        fit.viscosity(5.0)


def test_vft_on_glycerol_like_data():
    # synthetic VFT data with seeded 0.5 % noise: a = -11, b = 1500 K, t0 = -150 degC
    temps = np.linspace(0.0, 60.0, 9)
    mu = np.exp(-11.0 + 1500.0 / (temps + 150.0)) * np.exp(
        np.random.default_rng(2).normal(0, 0.005, 9)
    )
    fit = fit_viscosity_temperature(temps, mu, "vft")
    assert fit.viscosity(30.0) == pytest.approx(np.exp(-11.0 + 1500.0 / 180.0), rel=0.01)
    assert np.all(np.isfinite(list(fit.standard_errors.values())))
