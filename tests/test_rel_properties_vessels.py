"""Reliability: property-based tests (hypothesis) of vessels, delivery and fitted parts.

Budget: the "ci" profile of tests/conftest.py, 200 examples per property.  Each property
counts the examples it ran (tests/rel_record.py); the figures in README's "Reliability"
section come from a dedicated run.  The strategies are shared with the other
tests/test_rel_properties_*.py modules (tests/rel_model_strategies.py).

Kinds of property checked here:

* stenoses: the pressure drop and the flow lost rise with flow and severity, and stay
  finite at zero drive; vascular resistance scales and converts; body surface area;
* vessel networks: series and parallel equivalent resistances;
* delivery: falling-head and decaying-bag times against their bounds and closed forms;
* tolerance bands bracket the nominal; a measured part recovers its coefficients;
* any rheology parameters (a user's own fitted model) solve to the line residual, and
  blood through any line round-trips.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, example, given
from hypothesis import strategies as st
from rel_model_strategies import (
    MMHG,
    _blood_models,
    _count,
    _finite,
    _log_uniform,
    bores,
    catheter_gauges,
    hematocrits,
    lengths,
    lines,
)
from rel_record import module_recorder

import rheoline
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import GRAVITY, Line
from rheoline.model.network import VesselNetwork
from rheoline.model.parts import Catheter, MeasuredPart, Tube
from rheoline.model.vessels import Vessel

_record = module_recorder("properties", "prop:")


# --------------------------------------------------------------------------- vessels, delivery
@given(
    d=_log_uniform(1e-3, 1e-2),
    q1=_log_uniform(1e-8, 1e-4),
    q2=_log_uniform(1e-8, 1e-4),
    ratio=st.floats(0.2, 0.95),
    mu=_log_uniform(2e-3, 6e-3),
)
def test_stenosis_drop_rises_with_flow_and_narrowing(d, q1, q2, ratio, mu):
    # Young & Tsai 1973: viscous term ~ U, expansion term ~ U^2 (A0/A1 - 1)^2
    _count("stenosis_monotonic")
    from rheoline.model.stenosis import young_tsai_1973_pressure_drop

    assume(abs(q1 - q2) > 1e-6 * max(q1, q2))
    lo, hi = sorted((q1, q2))
    dp = young_tsai_1973_pressure_drop(np.array([lo, hi]), d, ratio * d, 2 * d, mu)
    assert 0 < dp[0] < dp[1]
    narrower = young_tsai_1973_pressure_drop(lo, d, 0.9 * ratio * d, 2 * d, mu)
    assert narrower > dp[0]


@given(
    r=_log_uniform(1e-3, 5e-3),
    dp=st.floats(100.0, 2e4),
    reductions=st.lists(st.floats(0.0, 95.0), min_size=2, max_size=6),
)
def test_flow_lost_to_a_stenosis_rises_with_its_severity(r, dp, reductions):
    _count("stenosis_flow_lost")
    from rheoline.model.stenosis import stenosis_flow_fraction_lost

    vessel = Vessel(radius=r, length=0.05, viscosity_law="newtonian", viscosity=3.5e-3)
    values = np.array(sorted(reductions))
    lost = np.asarray(stenosis_flow_fraction_lost(vessel, dp, values))
    assert _finite(lost) and np.all((lost >= -1e-12) & (lost < 1))
    assert np.all(np.diff(lost) >= -1e-9)


@given(dp=st.floats(0.1, 200.0), q=st.floats(0.1, 20.0), k=st.floats(1.1, 5.0))
def test_vascular_resistance_scales_and_converts(dp, q, k):
    # (upstream - downstream) / flow; 1 Wood unit = 79.99 dyn s cm^-5 (NIST SP 811 factors)
    _count("vascular_resistance")
    r = rheoline.vascular_resistance(dp + 5.0, 5.0, q)
    assert r.wood_units == pytest.approx(dp / q, rel=1e-12)
    assert rheoline.vascular_resistance(dp + 5.0, 5.0, k * q).wood_units == pytest.approx(
        r.wood_units / k, rel=1e-12
    )
    assert r.dyn_s_per_cm5 == pytest.approx(79.993 * r.wood_units, rel=1e-4)
    # NIST SP 811 gives 1 mmHg = 1.333224e2 Pa: agreement to its 6 digits
    assert r.pa_s_per_m3 == pytest.approx(r.wood_units * MMHG / (1e-3 / 60.0), rel=1e-5)


@given(
    h1=st.floats(100.0, 220.0),
    h2=st.floats(100.0, 220.0),
    w=st.floats(30.0, 200.0),
    method=st.sampled_from(["mosteller", "dubois"]),
)
def test_body_surface_area_rises_with_height(h1, h2, w, method):
    _count("body_surface_area")
    assume(abs(h1 - h2) > 0.1)
    lo, hi = sorted((h1, h2))
    assert rheoline.body_surface_area(lo, w, method) < rheoline.body_surface_area(hi, w, method)


@given(r=st.lists(_log_uniform(1e6, 1e13), min_size=2, max_size=6))
def test_network_equivalent_resistance_of_series_and_parallel(r):
    # Kirchhoff: series resistances add, parallel conductances add
    _count("network_series_parallel")
    n = len(r)
    series = VesselNetwork(list(range(n)), list(range(1, n + 1)), np.array(r))
    # rounding of the sparse solve grows with the spread of the resistances (up to 1e7 here)
    assert series.equivalent_resistance(0, n) == pytest.approx(sum(r), rel=1e-6)
    parallel = VesselNetwork(["a"] * n, ["b"] * n, np.array(r))
    assert parallel.equivalent_resistance("a", "b") == pytest.approx(
        1.0 / sum(1.0 / x for x in r), rel=1e-6
    )


@given(
    d=_log_uniform(5e-4, 3e-3),
    h_full=st.floats(0.5, 2.0),
    fall=st.floats(0.0, 0.4),
    volume=st.floats(1e-5, 1e-3),
    fluid_name=st.sampled_from(["water", "saline-0.9"]),
)
def test_falling_head_time_lies_between_the_full_and_empty_times(
    d, h_full, fall, volume, fluid_name
):
    _count("delivery_bounds")
    from rheoline.model.delivery import falling_head_delivery_time

    fl = rheoline.fluid(fluid_name, temperature_c=22.0)
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Tube(inner_diameter=d, length=0.05)])
    h_empty = h_full * (1 - fall)
    t = falling_head_delivery_time(line, fl, volume, h_full, h_empty).time
    q_full = line.solve(fl, head=h_full).flow
    q_empty = line.solve(fl, head=h_empty).flow
    assert volume / q_full * (1 - 1e-6) <= t <= volume / q_empty * (1 + 1e-6)


@given(tol=st.floats(0.005, 0.1), seed=st.integers(0, 2**32 - 1), gauge=catheter_gauges)
def test_tolerance_band_brackets_the_nominal(tol, seed, gauge):
    _count("tolerance_band")
    from rheoline.model.tolerance import flow_tolerance

    fl = rheoline.fluid("saline-0.9", temperature_c=22.0)
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=gauge)])
    band = flow_tolerance(line, fl, head=1.0, diameter_tolerance={1: tol}, n_samples=400, seed=seed)
    assert _finite(band.samples)
    p5, p50, p95 = (band.percentiles[p] for p in (5.0, 50.0, 95.0))
    assert p5 <= band.nominal * (1 + 1e-9) and band.nominal * (1 - 1e-9) <= p95
    assert p5 <= p50 <= p95


@given(ratio=_log_uniform(1e-4, 0.9), volume=_log_uniform(1e-7, 1e-5))
@example(ratio=1e-3, volume=1e-6)  # bug B5 in the reliability notes
def test_falling_head_time_matches_the_closed_form_for_a_linear_line(ratio, volume):
    # Creeping flow through a long narrow tube (Re < 10): Q = c h, so the bag empties in
    # T = V ln(h_full / h_empty) / (c (h_full - h_empty))   (by hand: dV/dt = -c h, h linear in V)
    _count("delivery_closed_form")
    from rheoline.model.delivery import falling_head_delivery_time

    water = newtonian_fluid("water", 1e-3, 1000.0)
    line = Line([Tube(inner_diameter=3e-4, length=1.0)])
    c = line.solve(water, head=1.0).flow  # m^3/s per metre of head
    t = falling_head_delivery_time(line, water, volume, 1.0, ratio).time
    exact = volume * math.log(1.0 / ratio) / (c * (1.0 - ratio))
    assert t == pytest.approx(exact, rel=1e-2)


def test_decaying_bag_time_matches_the_closed_form_for_a_linear_line():
    # p = p0 exp(-t/tau) and Q = c p give V(t) = c p0 tau (1 - exp(-t/tau)), so a volume
    # fraction phi of c p0 tau takes t = -tau ln(1 - phi)   (by hand).  A grid in one
    # vectorized call (each solve_ivp integration is too slow for 200 examples).
    from rheoline.model.delivery import pressure_bag_delivery_time

    water = newtonian_fluid("water", 1e-3, 1000.0)
    line = Line([Tube(inner_diameter=3e-4, length=1.0)])
    p0 = 300 * MMHG
    c = line.solve(water, source_pressure=p0).flow / p0
    taus = np.geomspace(10.0, 1e4, 6)[:, None]
    fractions = np.linspace(0.01, 0.99, 25)[None, :]
    t = pressure_bag_delivery_time(
        line, water, fractions * c * p0 * taus, p0, time_constant=taus
    ).time
    np.testing.assert_allclose(t, -taus * np.log(1.0 - fractions), rtol=1e-2)
    beyond = pressure_bag_delivery_time(line, water, 1.02 * c * p0 * 100.0, p0, time_constant=100.0)
    assert beyond.time == math.inf


@given(
    a=_log_uniform(1e6, 1e12),
    b=_log_uniform(1e9, 1e16),
    flows=st.lists(_log_uniform(1e-8, 1e-4), min_size=2, max_size=8, unique=True),
    k_mu=st.floats(0.2, 5.0),
    k_rho=st.floats(0.5, 2.0),
)
def test_measured_part_recovers_its_coefficients_and_rescales(a, b, flows, k_mu, k_rho):
    # exact bench data dp = a Q + b Q^2; the laminar term scales with viscosity and the
    # quadratic term with density (dimensional analysis, common practice, no source)
    _count("measured_part_fit")
    q = np.array(sorted(flows))
    assume(q[-1] / q[0] > 1.5)
    part = MeasuredPart(
        flows=q, pressure_drops=a * q + b * q * q, test_viscosity=1e-3, test_density=1000.0
    )
    fitted = part.a * q + part.b * q * q
    np.testing.assert_allclose(fitted, a * q + b * q * q, rtol=1e-6)
    a2, b2 = part.scaled_coefficients(k_mu * 1e-3, k_rho * 1000.0)
    assert float(np.asarray(a2)) == pytest.approx(k_mu * part.a, rel=1e-9)
    assert float(np.asarray(b2)) == pytest.approx(k_rho * part.b, rel=1e-9)


@given(r=_log_uniform(1e-3, 5e-3), reduction=st.floats(0.0, 99.0), small=_log_uniform(1e-12, 1e-6))
def test_flow_lost_to_a_stenosis_is_finite_at_zero_drive(r, reduction, small):
    # zero drive is valid input: the fraction lost tends to its creeping-flow limit
    _count("stenosis_zero_drive")
    from rheoline.model.stenosis import stenosis_flow_fraction_lost

    vessel = Vessel(radius=r, length=0.05, viscosity_law="newtonian", viscosity=3.5e-3)
    at_zero, near_zero = np.asarray(stenosis_flow_fraction_lost(vessel, [0.0, small], reduction))
    assert np.isfinite(at_zero)
    assert at_zero <= near_zero + 1e-12  # the loss only grows with the drive (U^2 term)
    assert at_zero == pytest.approx(near_zero, abs=1e-6)


def _rheologies():
    from rheoline.model.rheology import CarreauYasuda, Casson, PowerLaw

    return st.one_of(
        st.builds(PowerLaw, _log_uniform(1e-4, 1.0), st.floats(0.2, 2.0)),  # thinning/thickening
        st.builds(
            lambda m0, ratio, lam, n, a: CarreauYasuda(m0, m0 * ratio, lam, n, a),
            _log_uniform(1e-3, 1.0),
            st.floats(0.001, 1.0),
            _log_uniform(1e-3, 100.0),
            st.floats(0.1, 1.0),
            st.floats(0.3, 4.0),
        ),
        st.builds(Casson, _log_uniform(1e-4, 1.0), _log_uniform(1e-3, 0.1)),
    )


@given(
    rheology=_rheologies(),
    d=bores,
    length=lengths,
    ps=st.floats(1.0, 2000 * MMHG),
    head=st.floats(0.0, 3.0),
)
def test_any_rheology_parameters_solve_to_the_line_residual(rheology, d, length, ps, head):
    # the engine must converge for a user's own fitted model, not only the library's
    _count("random_rheology_converges")
    from rheoline.model.fluid_base import Fluid

    fl = Fluid(name="user", temperature_c=22.0, density=1050.0, rheology=rheology)
    line = Line([Tube(inner_diameter=d, length=length)])
    r = line.solve(fl, head=head, source_pressure=ps)
    residual = line.pressure_residual(fl, r.flow, head=head, source_pressure=ps)
    drive = ps + 1050.0 * GRAVITY * head
    assert np.isfinite(r.flow) and r.flow >= 0
    assert abs(residual) <= 1e-6 * drive or (r.flow == 0 and residual >= 0)


def _extreme_carreau_yasuda_case():
    # found by Hypothesis (test_any_rheology_parameters_solve_to_the_line_residual)
    from rheoline.model.fluid_base import Fluid
    from rheoline.model.rheology import CarreauYasuda

    rh = CarreauYasuda(0.03162277660168379, 3.1622776601683795e-05, 0.03162277660168379, 0.25, 1.0)
    fl = Fluid(name="user", temperature_c=22.0, density=1050.0, rheology=rh)
    line = Line([Tube(inner_diameter=1e-4, length=10.0 ** (-0.75))])
    return fl, line, line.solve(fl, head=3.0, source_pressure=98057.0)


def test_a_solve_that_stops_short_says_so():
    fl, line, r = _extreme_carreau_yasuda_case()
    assert r.converged or any("solver did not reach full convergence" in f for f in r.flags)


@pytest.mark.xfail(
    strict=True,
    reason="known: the joint Rabinowitsch-Mooney iteration stops 3e-6 short of the root "
    "(residual 1.4 Pa of 129 kPa) for this extreme shear-thinning fluid in the transition "
    "zone of a 0.1 mm tube; flagged not converged (test above), kept so a fix is noticed",
)
def test_known_extreme_carreau_yasuda_case_converges():
    fl, line, r = _extreme_carreau_yasuda_case()
    residual = line.pressure_residual(fl, r.flow, head=3.0, source_pressure=98057.0)
    assert r.converged and abs(residual) <= 1e-6 * (98057.0 + 1050.0 * GRAVITY * 3.0)


@given(line=lines(), h=hematocrits, model=_blood_models(), ps=st.floats(10 * MMHG, 2000 * MMHG))
def test_blood_through_any_line_round_trips(line, h, model, ps):
    # non-Newtonian flow through fittings and measured parts too: the budget adds up and the
    # pump solve at the flow found gives the source pressure back (0.1 %)
    _count("blood_any_line_round_trip")
    fl = rheoline.fluid("whole-blood", hematocrit=h, model=model)
    forward = line.solve(fl, source_pressure=ps)
    assert np.isfinite(forward.flow) and forward.flow >= 0
    total = forward.part_pressure_drops.sum(axis=0) + forward.exit_pressure_drop
    if forward.flow > 0:
        assert total == pytest.approx(ps, rel=1e-6)
        back = line.solve(fl, flow=forward.flow)
        assert back.required_pressure == pytest.approx(ps, rel=1e-3)
