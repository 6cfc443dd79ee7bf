"""Drug transport: Levenspiel's laminar distribution, Taylor-Aris dispersion, paths."""

import numpy as np
import pytest

from rheoline.errors import InputRangeError
from rheoline.model.parts import Catheter, Fitting, Tube
from rheoline.model.transport import (
    TAYLOR_RADIAL_NUMBER,
    gaussian_dispersion_fraction,
    levenspiel_laminar_fraction,
    outlet_concentration,
    plug_flow_delay,
    radial_diffusion_number,
    taylor_aris_dispersion,
    transport_path,
)

ML_H = 1e-6 / 3600.0


def test_levenspiel_laminar_flow_values():
    # Levenspiel, Chemical Reaction Engineering 3rd ed. (1999): F = 1 - 1/(4 theta^2)
    # for theta >= 1/2; the first fluid arrives at half the mean residence time
    theta = np.array([0.25, 0.5, 0.75, 1.0, 1.5, 2.0, 5.0])
    expected = np.array([0.0, 0.0, 1 - 1 / 2.25, 0.75, 1 - 1 / 9.0, 0.9375, 0.99])
    assert np.allclose(levenspiel_laminar_fraction(theta), expected, rtol=1e-14, atol=0)
    # its mean is the tube's volume: int (1 - F) dtheta = 1/2 + int_1/2^inf 1/(4 t^2) dt = 1
    assert 0.5 + 0.25 / 0.5 == pytest.approx(1.0)


def test_taylor_aris_coefficient_against_taylor_and_aris():
    # Taylor 1953 (Proc. R. Soc. A 219, 186): k = a^2 u0^2 / (192 D) with u0 the centre-line
    # velocity (from memory), i.e. a^2 u^2 / (48 D) with the mean u = u0 / 2; Aris 1956
    # (Proc. R. Soc. A 235, 67) adds the molecular D
    a, u, d = 0.4e-3, 2e-3, 7e-10
    u0 = 2.0 * u
    assert taylor_aris_dispersion(u, a, d) == pytest.approx(d + a * a * u0 * u0 / (192 * d))


def test_taylor_aris_against_a_random_walk_in_poiseuille_flow():
    # Taylor 1953's result checked by simulation: tracers diffusing across a tube while the
    # parabolic profile carries them spread axially with variance 2 D_eff t once t >> a^2/D
    rng = np.random.default_rng(1953)
    n, a, d, u = 20000, 1.0, 1.0, 12.0  # Peclet u a / D = 12: D_eff = D (1 + 144/48) = 4 D
    dt, steps = 1e-3, 3000
    xy = rng.uniform(-a, a, (n, 2))
    while np.any(outside := (xy**2).sum(1) > a * a):
        xy[outside] = rng.uniform(-a, a, (int(outside.sum()), 2))
    z = np.zeros(n)
    spread = {}
    for k in range(1, steps + 1):
        r2 = (xy**2).sum(1)
        z += 2.0 * u * (1.0 - r2 / (a * a)) * dt + np.sqrt(2 * d * dt) * rng.standard_normal(n)
        trial = xy + np.sqrt(2 * d * dt) * rng.standard_normal((n, 2))
        out = (trial**2).sum(1) > a * a
        trial[out] = xy[out]  # a step through the wall is refused (reflecting wall)
        xy = trial
        if k in (steps // 2, steps):
            spread[k * dt] = np.var(z)
    (t1, v1), (t2, v2) = sorted(spread.items())
    d_eff = (v2 - v1) / (2.0 * (t2 - t1))
    assert d_eff == pytest.approx(taylor_aris_dispersion(u, a, d), rel=0.08)


def test_gaussian_dispersion_and_plug_delay():
    # Levenspiel 1999: small dispersion, F symmetric about theta = 1
    assert gaussian_dispersion_fraction(1.0, 0.005) == pytest.approx(0.5)
    d = 0.01
    assert gaussian_dispersion_fraction(1.0 + np.sqrt(2 * d), d) == pytest.approx(0.8413, abs=1e-4)
    assert plug_flow_delay(1.2e-6, 1.0 * ML_H) == pytest.approx(4320.0)


def test_radial_number_is_residence_over_diffusion_time():
    length, q, dm, d = 1.5, 2 * ML_H, 6e-10, 0.8e-3
    tau = (np.pi * d * d / 4 * length) / q
    assert radial_diffusion_number(length, q, dm) == pytest.approx(dm * tau / (d / 2) ** 2)


def test_transport_path_chooses_by_taylor_criterion():
    tube = Tube(inner_diameter=1e-3, length=1.5)
    cath = Catheter(gauge=24)
    fit = Fitting(k=1.0, internal_volume=0.1e-6)
    q = 1.0 * ML_H
    path = transport_path([fit, tube, cath], q, 5e-10)
    numbers = path.radial_number
    assert bool(path.dispersive[0]) == bool(numbers[0] >= TAYLOR_RADIAL_NUMBER)  # the tube
    assert not path.dispersive[1]  # the short catheter: radial diffusion too slow
    assert path.choice() == "taylor-aris + laminar"
    assert path.plug_volume == pytest.approx(0.1e-6)
    assert path.volume == pytest.approx(0.1e-6 + tube.internal_volume + cath.internal_volume)
    a = 0.5e-3
    u = q / (np.pi * a * a)
    d_eff = taylor_aris_dispersion(u, a, 5e-10)
    area = np.pi * a * a
    assert path.dispersed_variance == pytest.approx(2 * d_eff * 1.5 * area * area / u)
    fast = transport_path([tube], 100 * ML_H, 5e-10)
    assert fast.choice() == "laminar"
    assert transport_path([tube], q, 5e-10, model="plug").choice() == "plug"


def test_outlet_of_a_step_at_constant_flow_is_the_distribution():
    tube = Tube(inner_diameter=0.5e-3, length=2.0)
    path = transport_path([tube], np.array([10 * ML_H]), np.array([5e-10]), model="laminar")
    v = tube.internal_volume
    w_in = np.linspace(0.0, 4 * v, 401)[:, None]
    c_in = np.ones_like(w_in)
    w_out = np.array([0.4, 0.75, 1.0, 2.0, 3.0])[:, None] * v
    c_out = outlet_concentration(path, w_in, c_in, w_out)
    assert np.allclose(c_out[:, 0], levenspiel_laminar_fraction(w_out[:, 0] / v), atol=2e-3)


def test_bad_transport_input():
    with pytest.raises(InputRangeError, match="transport model 'mixing'"):
        transport_path([Tube(inner_diameter=1e-3, length=1.0)], 1e-9, 5e-10, model="mixing")
    with pytest.raises(InputRangeError, match="diffusivity must be greater than 0"):
        taylor_aris_dispersion(1e-3, 1e-3, 0.0)
    with pytest.raises(InputRangeError, match="flow must be greater than 0"):
        plug_flow_delay(1e-6, 0.0)
