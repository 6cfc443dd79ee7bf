"""Reliability: property-based tests (hypothesis) across the model layer.

Budget: the "ci" profile of tests/conftest.py, 200 examples per property.  Each property
counts the examples it ran (tests/rel_record.py); the figures in README's "Reliability"
section come from a dedicated run.

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
* vectorized equals scalar;
* no NaN or infinity for any valid input;
* a clear library error (a RheolineError naming the field) for every invalid input.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, example, given
from hypothesis import strategies as st
from rel_record import bump, module_recorder

import rheoline
from rheoline.errors import InputRangeError, RheolineError
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import GRAVITY, Line
from rheoline.model.lumen import poiseuille_flow, poiseuille_pressure_drop
from rheoline.model.network import VesselNetwork
from rheoline.model.parts import Catheter, Fitting, MeasuredPart, Needle, Tube
from rheoline.model.vessels import Vessel

_record = module_recorder("properties", "prop:")

MMHG = 133.322387415  # NIST SP 811


def _count(name):
    bump(f"prop:{name}")
    bump("prop:examples_total")


# --------------------------------------------------------------------------- strategies
def _log_uniform(low, high):
    return st.floats(math.log10(low), math.log10(high)).map(lambda x: 10.0**x)


bores = _log_uniform(1e-4, 1e-2)  # 0.1 mm to 10 mm
lengths = _log_uniform(1e-3, 10.0)  # 1 mm to 10 m
heads = st.floats(0.01, 3.0)  # m
source_pressures = st.floats(0.0, 2000 * MMHG)  # Pa
viscosities = _log_uniform(5e-4, 0.5)  # Pa s
densities = st.floats(800.0, 1300.0)  # kg/m^3
water_temperatures = st.floats(0.0, 45.0)
fluid_temperatures = st.floats(0.0, 42.0)  # inside every simple fluid's range
blood_temperatures = st.floats(0.0, 42.0)  # the blood models' validated span
hematocrits = st.floats(0.0, 0.8)
simple_fluids = st.sampled_from(
    ["water", "saline-0.9", "dextrose-5", "lactated-ringers", "plasma", "albumin-5", "albumin-20"]
)


def _blood_models():
    from rheoline.model.blood import BLOOD_RHEOLOGY_MODELS

    return st.sampled_from(sorted(BLOOD_RHEOLOGY_MODELS))


def _catalogue_gauges():
    from rheoline.model.catalogue import CATHETER_GAUGES, NEEDLE_GAUGES

    return st.sampled_from(sorted(CATHETER_GAUGES)), st.sampled_from(sorted(NEEDLE_GAUGES))


catheter_gauges, needle_gauges = _catalogue_gauges()


@st.composite
def lines(draw, max_parts=4):
    """A line of 1..max_parts parts: lumens, K fittings and measured parts, at least one lumen."""
    n = draw(st.integers(1, max_parts))
    parts = []
    for i in range(n):
        kind = draw(
            st.sampled_from(["tube", "catheter", "needle", "fitting", "measured"])
            if i
            else st.sampled_from(["tube", "catheter", "needle"])
        )
        if kind == "fitting":
            parts.append(Fitting(k=draw(st.floats(0.05, 20.0))))
        elif kind == "measured":
            q1 = draw(_log_uniform(1e-8, 1e-4))
            a = draw(_log_uniform(1e6, 1e10))  # Pa s/m^3
            parts.append(MeasuredPart(flows=[q1, 2 * q1], pressure_drops=[a * q1, 2.2 * a * q1]))
        elif kind == "catheter":
            parts.append(Catheter(gauge=draw(catheter_gauges)))
        elif kind == "needle":
            parts.append(
                Needle(gauge=draw(needle_gauges), wall=draw(st.sampled_from(["regular", "thin"])))
            )
        else:
            parts.append(Tube(inner_diameter=draw(bores), length=draw(lengths)))
    return Line(parts)


def _assume_not_transitional(*results):
    """Skip cases with a lumen in the laminar-turbulent transition (Re 2300-4000).

    There, Churchill 1977 friction rises with Reynolds number, so a thinner fluid can flow
    less (the effect Hagen saw in 1839, common practice, no source): trends in viscosity,
    temperature and hematocrit hold only within one regime.
    """
    regimes = set()
    for r in results:
        regimes.update(np.ravel(r.part_regimes).tolist())
    regimes.discard("n/a")
    assume("transitional" not in regimes and len(regimes) <= 1)


def _finite(*arrays):
    return all(np.all(np.isfinite(np.asarray(a, dtype=float))) for a in arrays)


def _lumen_rows(result):
    return [i for i, kind in enumerate(result.part_kinds) if kind == "lumen"]


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


# --------------------------------------------------------------------------- no NaN, no inf
@given(
    line=lines(),
    fluid_name=simple_fluids,
    head=st.floats(0.0, 3.0),
    ps=source_pressures,
    t=fluid_temperatures,
)
@example(
    line=Line([Tube(inner_diameter=1e-3, length=1.0)]),
    fluid_name="water",
    head=0.0,
    ps=1e-300,
    t=20.0,
)  # a vanishing but valid drive (bug B1 in the reliability notes)
def test_no_nan_or_inf_for_valid_newtonian_input(line, fluid_name, head, ps, t):
    _count("finite_newtonian")
    fl = rheoline.fluid(fluid_name, temperature_c=t)
    r = line.solve(fl, head=head, source_pressure=ps)
    rows = _lumen_rows(r)
    assert _finite(
        r.flow,
        r.required_pressure,
        r.net_drive,
        r.max_reynolds,
        r.max_wall_shear_stress,
        r.part_pressure_drops,
        r.part_reynolds[rows],
        r.part_wall_shear_stress[rows],
        r.part_wall_shear_rate[rows],
        r.dominant_share,
    )
    assert r.flow >= 0
    # a hemolysis index only for a fluid with red cells (NaN otherwise, never a number)
    assert _finite(r.hemolysis_index) if fl.is_blood else np.isnan(r.hemolysis_index)


@given(
    d=bores,
    length=lengths,
    head=st.floats(0.0, 3.0),
    ps=source_pressures,
    h=hematocrits,
    t=blood_temperatures,
    model=_blood_models(),
    name=st.sampled_from(["whole-blood", "packed-red-cells"]),
)
def test_no_nan_or_inf_for_valid_blood_input(d, length, head, ps, h, t, model, name):
    _count("finite_blood")
    fl = rheoline.fluid(name, temperature_c=t, hematocrit=h, model=model)
    r = Line([Tube(inner_diameter=d, length=length)]).solve(fl, head=head, source_pressure=ps)
    assert _finite(
        r.flow,
        r.required_pressure,
        r.max_reynolds,
        r.max_wall_shear_stress,
        r.part_pressure_drops,
        r.part_wall_shear_rate,
    )
    assert r.flow >= 0


@given(d=_log_uniform(3e-6, 1e-2), h=st.floats(0.0, 0.95))
def test_no_nan_in_vessel_viscosity_laws(d, h):
    _count("finite_vessel_laws")
    import warnings

    from rheoline.errors import RangeWarning

    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RangeWarning)  # outside 3.3-1978 um: flagged, not here
        rel92 = rheoline.pries_1992_relative_viscosity(d, h)
        rel94 = rheoline.pries_1994_relative_viscosity(d, h)
    assert _finite(rel92, rel94)
    assert rel92 >= 1.0 - 1e-12 and rel94 >= 1.0 - 1e-12


# --------------------------------------------------------------------------- invalid input
bad_positive = st.one_of(
    st.floats(max_value=0.0, allow_nan=False),
    st.just(float("nan")),
    st.just(float("inf")),
    st.just(-float("inf")),
)
bad_finite = st.one_of(st.just(float("nan")), st.just(float("inf")), st.just(-float("inf")))


_GOOD_DIMENSIONS = {
    Tube: {"inner_diameter": 1e-3, "length": 1.0},
    Vessel: {"radius": 1e-3, "length": 0.1},
}


@pytest.mark.parametrize("cls", [Tube, Vessel], ids=["tube", "vessel"])
@given(bad=bad_positive, which=st.integers(0, 1))
def test_bad_dimension_names_the_field(cls, bad, which):
    _count(f"invalid_{cls.__name__.lower()}_dimension")
    kwargs = dict(_GOOD_DIMENSIONS[cls])
    field = list(kwargs)[which]
    kwargs[field] = bad
    with pytest.raises(InputRangeError, match=field):
        cls(**kwargs)


@given(bad=bad_finite, field=st.sampled_from(["head", "source_pressure", "back_pressure"]))
def test_non_finite_drive_names_the_field(bad, field):
    _count("invalid_drive")
    line = Line([Tube(inner_diameter=1e-3, length=1.0)])
    with pytest.raises(InputRangeError, match=field):
        line.solve(rheoline.fluid("water"), **{field: bad})


@given(bad=st.one_of(st.floats(max_value=-1e-30, allow_nan=False), bad_finite))
def test_bad_prescribed_flow_names_the_field(bad):
    _count("invalid_flow")
    line = Line([Tube(inner_diameter=1e-3, length=1.0)])
    with pytest.raises(InputRangeError, match="flow"):
        line.solve(rheoline.fluid("water"), flow=bad)


@given(pct=st.floats(1.5, 100.0))
def test_hematocrit_as_percent_suggests_the_fraction(pct):
    _count("invalid_hematocrit_percent")
    with pytest.raises(RheolineError, match=r"hematocrit.*percent, pass"):
        rheoline.fluid("whole-blood", hematocrit=pct)
    with pytest.raises(RheolineError, match=r"hematocrit.*percent"):
        rheoline.blood_viscosity(pct)
    with pytest.raises(RheolineError, match=r"hematocrit.*percent"):
        Vessel(radius=1e-3, length=0.1, hematocrit=pct)


@given(bad=st.one_of(st.floats(max_value=-1e-9, allow_nan=False), bad_finite))
def test_bad_hematocrit_names_the_field(bad):
    _count("invalid_hematocrit")
    with pytest.raises(RheolineError, match="hematocrit"):
        rheoline.blood_viscosity(bad)


@given(bad=bad_finite)
def test_non_finite_temperature_names_the_field(bad):
    _count("invalid_temperature")
    with pytest.raises(RheolineError, match="temperature"):
        rheoline.water_viscosity(bad)
    with pytest.raises(RheolineError, match="temperature"):
        rheoline.fluid("saline-0.9", temperature_c=bad)


@given(name=st.text(min_size=1, max_size=30))
def test_unknown_fluid_is_a_library_error(name):
    _count("invalid_fluid_name")
    assume(name.strip().lower().replace("_", "-").replace(" ", "-") not in rheoline.fluid_names())
    with pytest.raises(RheolineError, match="not in the library"):
        rheoline.fluid(name)


@given(bad=bad_positive, field=st.sampled_from(["pressure_drop", "radius", "length", "viscosity"]))
def test_bad_poiseuille_input_names_the_field(bad, field):
    _count("invalid_poiseuille")
    kwargs = {"pressure_drop": 100.0, "radius": 1e-3, "length": 1.0, "viscosity": 1e-3}
    if field == "pressure_drop" and bad == 0.0:
        return  # zero pressure drop is valid (no flow)
    kwargs[field] = bad
    with pytest.raises(InputRangeError, match=field):
        poiseuille_flow(**kwargs)


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


def _solve_with(fluid):
    return Line([Tube(inner_diameter=1e-3, length=1.0)]).solve(fluid, head=1.0)


#: Mistakes a user makes with the Python API: each must be a RheolineError (a ValueError)
#: whose message names the argument.  (call, regex the message must match)
API_MISTAKES = [
    ("fluid-name-instead-of-fluid", lambda: _solve_with("water"), r"fluid"),
    ("no-fluid", lambda: _solve_with(None), r"fluid"),
    ("one-part-not-a-list", lambda: Line(Tube(inner_diameter=1e-3, length=1.0)), r"part"),
    ("string-part", lambda: Line(["tube"]), r"part\[0\]"),
    ("several-catheter-gauges", lambda: Catheter(gauge=np.array([18, 20])), r"gauge"),
    ("several-needle-gauges", lambda: Needle(gauge=[18, 20]), r"gauge"),
    (
        "shapes-that-do-not-broadcast",
        lambda: Line([Tube(inner_diameter=np.full(3, 1e-3), length=1.0)]).solve(
            rheoline.fluid("water"), head=np.ones(4)
        ),
        r"broadcast|shape",
    ),
    (
        "flow-and-source-pressure",
        lambda: Line([Tube(inner_diameter=1e-3, length=1.0)]).solve(
            rheoline.fluid("water"), flow=1e-6, source_pressure=1.0
        ),
        r"flow.*source_pressure",
    ),
    ("unknown-blood-model", lambda: rheoline.fluid("whole-blood", model="bingham"), r"model"),
    (
        "unknown-entrance",
        lambda: Line([Tube(inner_diameter=1e-3, length=1.0)], entrance="rounded-ish"),
        r"entrance|rounded-ish",
    ),
    (
        "format-in-a-unit-of-another-kind",
        lambda: rheoline.format_quantity(1.0, "pressure", "m"),
        r"pressure|unit",
    ),
    (
        "format-in-an-unknown-unit",
        lambda: rheoline.format_quantity(1.0, "pressure", "furlong"),
        r"unit|furlong",
    ),
    (
        "list-as-a-network-node",
        lambda: VesselNetwork([["a"]], ["b"], [1e9], pressures={"b": 0.0}),
        r"node label",
    ),
]


@pytest.mark.parametrize(
    "call, match", [m[1:] for m in API_MISTAKES], ids=[m[0] for m in API_MISTAKES]
)
def test_api_mistakes_are_library_errors_naming_the_argument(call, match):
    bump("prop:api_mistakes_checked")
    with pytest.raises(RheolineError, match=match):
        call()


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
