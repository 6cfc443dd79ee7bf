"""Reliability: property-based tests (hypothesis) of the model layer's laws.

Budget: the "ci" profile of tests/conftest.py, 200 examples per property.  Each property
counts the examples it ran (tests/rel_record.py); the figures in README's "Reliability"
section come from a dedicated run.  The strategies are shared with the other
tests/test_rel_properties_*.py modules (tests/rel_model_strategies.py).

Kinds of property checked here:

* monotonic trends: flow with drive, bore, length, viscosity, temperature and hematocrit;
  blood viscosity with hematocrit and temperature; water viscosity with temperature;
* scaling laws where they hold: Hagen-Poiseuille Q ~ r^4, ~ 1/L, ~ 1/mu (exact for the
  lumen formula; within 1 % for a whole line in creeping flow, where entrance, contraction
  and exit losses scale with Re and vanish);
* invariants: part pressure drops plus the exit jet add up to the net drive; in a vessel
  network, flow is conserved at every internal node and the boundary flows balance;
* inverse round trips: flow-solve then pressure-solve (and back) within 0.1 %
  (the line engine's stated tolerance, issue 3); glycerol fraction for a viscosity;
* vectorized equals scalar.

Finite answers and invalid input: tests/test_rel_properties_inputs.py; vessels, delivery,
fitted parts and user rheologies: tests/test_rel_properties_vessels.py.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, given
from hypothesis import strategies as st
from rel_model_strategies import (
    MMHG,
    _assume_not_transitional,
    _blood_models,
    _count,
    _finite,
    _log_uniform,
    blood_temperatures,
    bores,
    densities,
    fluid_temperatures,
    heads,
    hematocrits,
    lengths,
    lines,
    simple_fluids,
    source_pressures,
    viscosities,
    water_temperatures,
)
from rel_record import module_recorder

import rheoline
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import GRAVITY, Line
from rheoline.model.lumen import poiseuille_flow, poiseuille_pressure_drop
from rheoline.model.network import VesselNetwork
from rheoline.model.parts import Catheter, Tube
from rheoline.model.vessels import Vessel

_record = module_recorder("properties", "prop:")


# --------------------------------------------------------------------------- scaling laws
@given(
    dp=st.floats(1.0, 1e6),
    r=_log_uniform(5e-5, 5e-3),
    length=lengths,
    mu=viscosities,
    k=st.floats(1.1, 4.0),
)
def test_poiseuille_scales_with_r4_inverse_length_and_viscosity(dp, r, length, mu, k):
    # Hagen-Poiseuille, Q = pi r^4 dp / (8 mu L) (Sutera & Skalak 1993)
    _count("poiseuille_scaling")
    q = poiseuille_flow(dp, r, length, mu)
    assert poiseuille_flow(dp, k * r, length, mu) == pytest.approx(k**4 * q, rel=1e-12)
    assert poiseuille_flow(dp, r, k * length, mu) == pytest.approx(q / k, rel=1e-12)
    assert poiseuille_flow(dp, r, length, k * mu) == pytest.approx(q / k, rel=1e-12)
    assert poiseuille_flow(k * dp, r, length, mu) == pytest.approx(k * q, rel=1e-12)
    assert poiseuille_pressure_drop(q, r, length, mu) == pytest.approx(dp, rel=1e-12)


@given(d=_log_uniform(1e-4, 2e-3), fluid_name=simple_fluids, t=st.floats(5.0, 40.0))
def test_line_in_creeping_flow_follows_r4(d, fluid_name, t):
    # A 1 m lumen at Re = 0.05: entrance, contraction and exit losses scale with Re and are
    # below 0.1 % of the viscous drop, so the required pressure follows Poiseuille's 1/r^4.
    _count("line_r4_creeping")
    fl = rheoline.fluid(fluid_name, temperature_c=t)
    mu, rho = fl.viscosity(), fl.density
    q = 0.05 * math.pi * d * mu / (4.0 * rho)  # Re = 4 rho Q / (pi d mu)
    thin = Line([Tube(inner_diameter=d, length=1.0)]).solve(fl, flow=q)
    wide = Line([Tube(inner_diameter=2 * d, length=1.0)]).solve(fl, flow=q)
    assert thin.required_pressure / wide.required_pressure == pytest.approx(16.0, rel=1e-2)
    expected = poiseuille_pressure_drop(q, d / 2, 1.0, mu)
    assert thin.required_pressure == pytest.approx(expected, rel=1e-2)


@given(r=_log_uniform(5e-6, 5e-3), length=lengths, mu=_log_uniform(1e-3, 1e-2))
def test_newtonian_vessel_resistance_scales_with_inverse_r4(r, length, mu):
    # Poiseuille resistance 8 mu L / (pi r^4) of a vessel segment
    _count("vessel_r4")
    v1 = Vessel(radius=r, length=length, viscosity_law="newtonian", viscosity=mu)
    v2 = Vessel(radius=2 * r, length=length, viscosity_law="newtonian", viscosity=mu)
    assert v1.resistance / v2.resistance == pytest.approx(16.0, rel=1e-12)
    assert v1.resistance == pytest.approx(8 * mu * length / (math.pi * r**4), rel=1e-12)


# --------------------------------------------------------------------------- monotonic trends
@given(line=lines(), fluid_name=simple_fluids, h1=heads, h2=heads, ps=source_pressures)
def test_flow_rises_with_drive(line, fluid_name, h1, h2, ps):
    _count("flow_vs_drive")
    lo, hi = sorted((h1, h2))
    fl = rheoline.fluid(fluid_name, temperature_c=22.0)
    r = line.solve(fl, head=np.array([lo, hi]), source_pressure=ps)
    assert r.flow[0] <= r.flow[1] * (1 + 1e-9)
    p = line.solve(fl, head=lo, source_pressure=np.array([ps, ps + 100 * MMHG]))
    assert p.flow[0] < p.flow[1]


@given(d1=bores, d2=bores, length=lengths, head=heads, fluid_name=simple_fluids)
def test_flow_rises_with_bore_and_falls_with_length(d1, d2, length, head, fluid_name):
    _count("flow_vs_bore_length")
    assume(abs(d1 - d2) > 1e-3 * max(d1, d2))
    small, big = sorted((d1, d2))
    fl = rheoline.fluid(fluid_name, temperature_c=22.0)
    r = Line([Tube(inner_diameter=np.array([small, big]), length=length)]).solve(fl, head=head)
    assert r.flow[0] < r.flow[1]
    s = Line([Tube(inner_diameter=small, length=np.array([length, 1.5 * length]))]).solve(
        fl, head=head
    )
    assert s.flow[0] > s.flow[1]


@given(line=lines(), mu1=viscosities, mu2=viscosities, rho=densities, head=heads)
def test_flow_falls_with_viscosity(line, mu1, mu2, rho, head):
    _count("flow_vs_viscosity")
    assume(abs(mu1 - mu2) > 1e-3 * max(mu1, mu2))
    lo, hi = sorted((mu1, mu2))
    thin = line.solve(newtonian_fluid("thin", lo, rho), head=head)
    thick = line.solve(newtonian_fluid("thick", hi, rho), head=head)
    _assume_not_transitional(thin, thick)
    assert thick.flow <= thin.flow * (1 + 1e-9)


@given(
    d=bores,
    length=lengths,
    head=heads,
    t1=water_temperatures,
    t2=water_temperatures,
    fluid_name=st.sampled_from(["water", "saline-0.9"]),
)
def test_gravity_flow_rises_with_temperature(d, length, head, t1, t2, fluid_name):
    # Warmer water is thinner (IAPWS 2008); under a gravity head the density cancels from
    # the kinetic losses, so flow can only rise with temperature.
    _count("flow_vs_temperature")
    lo, hi = sorted((t1, t2))
    assume(hi - lo > 0.5)
    line = Line([Tube(inner_diameter=d, length=length)])
    cold = line.solve(rheoline.fluid(fluid_name, temperature_c=lo), head=head)
    warm = line.solve(rheoline.fluid(fluid_name, temperature_c=hi), head=head)
    _assume_not_transitional(cold, warm)
    assert warm.flow >= cold.flow * (1 - 1e-9)


@given(
    d=_log_uniform(3e-4, 5e-3),
    length=_log_uniform(0.01, 3.0),
    h1=hematocrits,
    h2=hematocrits,
    t=blood_temperatures,
    ps=st.floats(10 * MMHG, 600 * MMHG),
    model=_blood_models(),
)
def test_blood_flow_falls_with_hematocrit(d, length, h1, h2, t, ps, model):
    # Thicker blood (more red cells) is more viscous and denser: under a source pressure
    # both effects lower the flow.
    _count("flow_vs_hematocrit")
    assume(abs(h1 - h2) > 0.01)
    lo, hi = sorted((h1, h2))
    fl = rheoline.fluid("whole-blood", temperature_c=t, hematocrit=np.array([lo, hi]), model=model)
    r = Line([Tube(inner_diameter=d, length=length)]).solve(fl, source_pressure=ps)
    _assume_not_transitional(r)
    assert r.flow[1] <= r.flow[0] * (1 + 1e-6)


@given(h1=hematocrits, h2=hematocrits, t=blood_temperatures)
def test_blood_viscosity_rises_with_hematocrit(h1, h2, t):
    _count("blood_viscosity_vs_hematocrit")
    assume(abs(h1 - h2) > 1e-3)
    lo, hi = sorted((h1, h2))
    mu = rheoline.blood_viscosity(np.array([lo, hi]), temperature_c=t)
    assert mu[0] < mu[1]


@given(t1=blood_temperatures, t2=blood_temperatures, h=hematocrits)
def test_blood_viscosity_falls_with_temperature(t1, t2, h):
    _count("blood_viscosity_vs_temperature")
    assume(abs(t1 - t2) > 0.1)
    lo, hi = sorted((t1, t2))
    mu = rheoline.blood_viscosity(h, temperature_c=np.array([lo, hi]))
    assert mu[1] < mu[0]


@given(t1=st.floats(0.0, 100.0), t2=st.floats(0.0, 100.0))
def test_water_viscosity_falls_with_temperature(t1, t2):
    _count("water_viscosity_vs_temperature")
    assume(abs(t1 - t2) > 1e-3)
    lo, hi = sorted((t1, t2))
    mu = rheoline.water_viscosity(np.array([lo, hi]))
    assert mu[1] < mu[0]


# --------------------------------------------------------------------------- invariants
@given(
    line=lines(),
    fluid_name=simple_fluids,
    head=heads,
    ps=source_pressures,
    pb=st.floats(0.0, 20 * MMHG),
)
def test_part_drops_add_up_to_the_drive(line, fluid_name, head, ps, pb):
    _count("drops_sum_to_drive")
    fl = rheoline.fluid(fluid_name, temperature_c=22.0)
    drive = ps + fl.density * GRAVITY * head - pb
    assume(drive > 0)
    r = line.solve(fl, head=head, source_pressure=ps, back_pressure=pb)
    total = r.part_pressure_drops.sum(axis=0) + r.exit_pressure_drop
    assert total == pytest.approx(r.net_drive, rel=1e-9)
    assert r.net_drive == pytest.approx(drive, rel=1e-6)
    frame_total = r.parts["pressure_drop [Pa]"].sum()
    assert frame_total == pytest.approx(drive, rel=1e-6)


@given(
    line=lines(),
    fluid_name=simple_fluids,
    q=_log_uniform(1e-9, 1e-4),
    head=heads,
    pb=st.floats(0.0, 20 * MMHG),
)
def test_pressure_solve_budget_adds_up(line, fluid_name, q, head, pb):
    _count("pressure_solve_budget")
    fl = rheoline.fluid(fluid_name, temperature_c=22.0)
    r = line.solve(fl, flow=q, head=head, back_pressure=pb)
    total = r.part_pressure_drops.sum(axis=0) + r.exit_pressure_drop
    assert total == pytest.approx(
        r.required_pressure + fl.density * GRAVITY * head - pb, rel=1e-9, abs=1e-9
    )


@st.composite
def networks(draw):
    """A connected random network: a spanning tree plus extra chords, pressures at two nodes."""
    n = draw(st.integers(3, 12))
    up, down = [], []
    for j in range(1, n):
        up.append(draw(st.integers(0, j - 1)))
        down.append(j)
    for _ in range(draw(st.integers(0, n))):
        a, b = draw(st.integers(0, n - 1)), draw(st.integers(0, n - 1))
        if a != b:
            up.append(a)
            down.append(b)
    res = draw(st.lists(_log_uniform(1e6, 1e14), min_size=len(up), max_size=len(up)))
    inlet_pressure = draw(st.floats(1.0, 2e4))
    inflow_node = draw(st.integers(1, n - 1))
    inflows = {}
    if inflow_node != n - 1 and draw(st.booleans()):
        inflows[inflow_node] = draw(_log_uniform(1e-10, 1e-5))
    return VesselNetwork(
        up, down, np.array(res), pressures={0: inlet_pressure, n - 1: 0.0}, inflows=inflows
    )


@given(net=networks())
def test_network_conserves_mass(net):
    _count("network_mass_conservation")
    sol = net.solve()
    q = sol.segment_flow
    assert _finite(q, sol.node_pressure)
    up = np.array([sol.nodes.index(u) for u in net.upstream])
    down = np.array([sol.nodes.index(d) for d in net.downstream])
    out = np.zeros(len(sol.nodes))
    np.add.at(out, up, q)
    np.add.at(out, down, -q)
    # rounding scale: the largest flow a pressure difference can drive through the
    # least resistive segment
    scale = max(np.abs(sol.node_pressure).max(), 1.0) / net.resistance.min()
    scale = max(scale, max((abs(v) for v in net.inflows.values()), default=0.0))
    for i, node in enumerate(sol.nodes):
        expected = sol.boundary_inflow.get(node, 0.0)
        assert out[i] == pytest.approx(expected, abs=1e-9 * scale)
    assert sum(sol.boundary_inflow.values()) == pytest.approx(0.0, abs=1e-9 * scale)
    assert sol.resistance_share.sum() == pytest.approx(1.0, rel=1e-9) or np.all(q == 0)


# --------------------------------------------------------------------------- inverse round trips
@given(line=lines(), fluid_name=simple_fluids, head=heads, ps=source_pressures)
def test_flow_solve_and_pressure_solve_invert_each_other(line, fluid_name, head, ps):
    _count("round_trip_newtonian")
    fl = rheoline.fluid(fluid_name, temperature_c=22.0)
    forward = line.solve(fl, head=head, source_pressure=ps)
    assume(forward.flow > 0)
    back = line.solve(fl, flow=forward.flow, head=head)
    assert back.required_pressure == pytest.approx(
        ps, rel=1e-3, abs=1e-3 * fl.density * GRAVITY * head
    )
    again = line.solve(fl, head=head, source_pressure=max(back.required_pressure, 0.0))
    assert again.flow == pytest.approx(forward.flow, rel=1e-3)


@given(
    d=_log_uniform(3e-4, 5e-3),
    length=_log_uniform(0.01, 3.0),
    h=hematocrits,
    t=blood_temperatures,
    ps=st.floats(10 * MMHG, 2000 * MMHG),
    model=_blood_models(),
)
def test_blood_round_trip(d, length, h, t, ps, model):
    # flow-solve then pressure-solve for every blood rheology model, within 0.1 %
    _count("round_trip_blood")
    fl = rheoline.fluid("whole-blood", temperature_c=t, hematocrit=h, model=model)
    line = Line([Tube(inner_diameter=d, length=length), Catheter(gauge=18)])
    forward = line.solve(fl, source_pressure=ps)
    assume(forward.flow > 0)
    back = line.solve(fl, flow=forward.flow)
    assert back.required_pressure == pytest.approx(ps, rel=1e-3)


@given(w=st.floats(0.0, 0.95), t=st.floats(0.0, 100.0))
def test_glycerol_fraction_round_trip(w, t):
    # Cheng 2008 viscosity and its inverse
    _count("glycerol_round_trip")
    mu = rheoline.glycerol_water_viscosity(w, t)
    assert rheoline.glycerol_fraction_for_viscosity(mu, t) == pytest.approx(w, abs=1e-6)


# --------------------------------------------------------------------------- vectorized == scalar
@given(
    line=lines(max_parts=3),
    fluid_name=simple_fluids,
    hs=st.lists(heads, min_size=2, max_size=4),
    ps=source_pressures,
)
def test_vectorized_solve_equals_scalar_solves(line, fluid_name, hs, ps):
    _count("vectorized_equals_scalar")
    fl = rheoline.fluid(fluid_name, temperature_c=22.0)
    vec = line.solve(fl, head=np.array(hs), source_pressure=ps)
    for i, h in enumerate(hs):
        one = line.solve(fl, head=h, source_pressure=ps)
        assert vec.flow[i] == pytest.approx(one.flow, rel=1e-9)
        assert vec.max_reynolds[i] == pytest.approx(one.max_reynolds, rel=1e-6)
        assert vec.regime[i] == one.regime


@given(
    ts=st.lists(blood_temperatures, min_size=2, max_size=4),
    h=hematocrits,
    model=_blood_models(),
    d=_log_uniform(3e-4, 5e-3),
)
def test_vectorized_blood_equals_scalar(ts, h, model, d):
    _count("vectorized_blood_equals_scalar")
    line = Line([Tube(inner_diameter=d, length=0.5)])
    fl = rheoline.fluid("whole-blood", temperature_c=np.array(ts), hematocrit=h, model=model)
    vec = line.solve(fl, source_pressure=300 * MMHG)
    for i, t in enumerate(ts):
        one = line.solve(
            rheoline.fluid("whole-blood", temperature_c=t, hematocrit=h, model=model),
            source_pressure=300 * MMHG,
        )
        assert vec.flow[i] == pytest.approx(one.flow, rel=1e-6)
    mu = rheoline.blood_viscosity(h, temperature_c=np.array(ts))
    for i, t in enumerate(ts):
        assert mu[i] == pytest.approx(rheoline.blood_viscosity(h, temperature_c=t), rel=1e-12)


@given(ts=st.lists(fluid_temperatures, min_size=1, max_size=5), fluid_name=simple_fluids)
def test_vectorized_fluid_properties_equal_scalar(ts, fluid_name):
    _count("vectorized_fluid_equals_scalar")
    vec = rheoline.fluid(fluid_name, temperature_c=np.array(ts))
    for i, t in enumerate(ts):
        one = rheoline.fluid(fluid_name, temperature_c=t)
        assert np.ravel(vec.viscosity())[i] == pytest.approx(one.viscosity(), rel=1e-12)
        assert np.ravel(vec.density)[i] == pytest.approx(one.density, rel=1e-12)
