"""Branched lines (model/branched.py): Kirchhoff networks of parts with nonlinear laws."""

import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

import rheoline
from rheoline.errors import InputRangeError, NetworkError
from rheoline.model.branched import Branch, PartNetwork, PressureNode, Pump
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import GRAVITY, Line
from rheoline.model.network import VesselNetwork
from rheoline.model.parts import Catheter, CheckValve, MeasuredPart, Tube
from rheoline.model.rheology import Casson

WATER = newtonian_fluid("water", viscosity=1.0e-3, density=998.0)
ML_MIN = 1e-6 / 60


def _linear(resistance, name):
    """A measured part whose law is exactly dp = R Q (the fit of exact linear pairs)."""
    q = np.array([1e-7, 2e-7, 4e-7])
    return MeasuredPart(flows=q, pressure_drops=resistance * q, name=name)


def _linear_network(resistances, pressures):
    """A Wheatstone-like network with a loop: a->b, a->c, b->c, b->d, c->d."""
    ends = [("a", "b"), ("a", "c"), ("b", "c"), ("b", "d"), ("c", "d")]
    branches = [
        Branch(f"s{k}", s, e, [_linear(r, f"R{k}")])
        for k, ((s, e), r) in enumerate(zip(ends, resistances, strict=True))
    ]
    nodes = [PressureNode(n, pressure=p, outlet=(p == 0.0)) for n, p in pressures.items()]
    return PartNetwork(branches, nodes), ends


def test_linear_network_matches_the_exact_solution_and_the_vessel_network():
    # Kirchhoff's laws for linear resistances (Kirchhoff 1847): the nodal system solved
    # exactly by numpy, and by the project's own VesselNetwork (scipy.sparse).
    r = np.array([1.0e9, 2.0e9, 0.5e9, 3.0e9, 1.5e9])
    net, ends = _linear_network(r, {"a": 4000.0, "d": 0.0})
    result = net.solve(WATER)
    # exact: unknown p_b, p_c from the two node equations
    g = 1 / r
    m = np.array([[g[0] + g[2] + g[3], -g[2]], [-g[2], g[1] + g[2] + g[4]]])
    rhs = np.array([g[0] * 4000.0, g[1] * 4000.0])
    p_b, p_c = np.linalg.solve(m, rhs)
    p = {"a": 4000.0, "b": p_b, "c": p_c, "d": 0.0}
    exact = np.array([(p[s] - p[e]) / rk for (s, e), rk in zip(ends, r, strict=True)])
    np.testing.assert_allclose(result.branch_flow, exact, rtol=1e-9)
    vessels = VesselNetwork(
        [s for s, _ in ends], [e for _, e in ends], r, pressures={"a": 4000.0, "d": 0.0}
    ).solve()
    np.testing.assert_allclose(result.branch_flow, vessels.segment_flow, rtol=1e-9)
    for node in "abcd":
        assert result.pressure(node) == pytest.approx(vessels.pressure(node), rel=1e-9)
    assert result.converged and result.iterations <= 3


def test_one_branch_is_the_series_line():
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18)])
    heads = np.array([0.3, 0.8, 1.5])
    net = PartNetwork(
        [Branch("set", "bag", "vein", line)],
        [PressureNode("bag", head=heads), PressureNode("vein", pressure=1000.0, outlet=True)],
    )
    result = net.solve(WATER)
    expected = line.solve(WATER, head=heads, back_pressure=1000.0).flow
    np.testing.assert_allclose(result.branch_flow[0], expected, rtol=1e-9)


def test_two_identical_lumens_in_parallel_carry_twice_one():
    # the same drop across each: any law, any regime (here turbulent-ish 3 mm tube at 50 kPa)
    tube = Tube(inner_diameter=1.0e-3, length=0.5)
    one = PartNetwork(
        [Branch("one", "in", "out", [tube])],
        [PressureNode("in", pressure=5e4), PressureNode("out", outlet=True)],
    ).solve(WATER)
    two = PartNetwork(
        [Branch("one", "in", "out", [tube]), Branch("two", "in", "out", [tube])],
        [PressureNode("in", pressure=5e4), PressureNode("out", outlet=True)],
    ).solve(WATER)
    assert two.branch_flow.sum() == pytest.approx(2 * one.branch_flow[0], rel=1e-10)
    assert -two.pressure_node_inflow[1] == pytest.approx(2 * one.branch_flow[0], rel=1e-10)


def _y_site(check_valve=False, pump_flow=60 * ML_MIN, head=0.8):
    gravity = [Tube(inner_diameter=3e-3, length=1.5)]
    if check_valve:
        gravity.append(CheckValve(k=2.0))
    return PartNetwork(
        [
            Branch("gravity set", "bag", "y-site", gravity),
            Branch("pump line", "pump", "y-site", [Tube(inner_diameter=1e-3, length=1.0)]),
            Branch("catheter", "y-site", "vein", [Catheter(gauge=22)]),
        ],
        [
            PressureNode("bag", head=head, label="gravity bag"),
            PressureNode("vein", pressure=800.0, outlet=True, label="vein"),
        ],
        [Pump("pump", flow=pump_flow, label="syringe pump")],
    )


def test_pump_pushes_back_into_the_bag_exactly_when_the_junction_exceeds_the_bag_head():
    flows = np.linspace(0.0, 120.0, 241) * ML_MIN
    result = _y_site(pump_flow=flows).solve(WATER)
    bag = 998.0 * GRAVITY * 0.8
    junction = result.node_pressure[result.node_names.index("y-site")]
    # keep clear of the tie (within 1e-9 of the head), where the sign is rounding
    clear = np.abs(junction - bag) > 1e-9 * bag
    assert np.array_equal(result.reversed[0][clear], (junction > bag)[clear])
    assert np.any(result.reversed[0]) and not np.all(result.reversed[0])
    assert np.array_equal(result.conditions["backflow_into_source"], result.reversed[0])
    assert any(
        "syringe pump pushes up to" in f and "gravity bag at the y-site" in f for f in result.flags
    )
    # with a check valve: never reversed, the gravity branch simply stops
    valved = _y_site(check_valve=True, pump_flow=flows).solve(WATER)
    assert not np.any(valved.reversed)
    assert np.all(valved.branch_flow[0] >= 0.0)
    shut = valved.closed[0]
    assert np.any(shut)
    np.testing.assert_allclose(valved.branch_flow[1][shut], valved.branch_flow[2][shut], rtol=1e-12)
    assert any("check valve in branch gravity set closed" in f for f in valved.flags)
    assert not np.any(valved.conditions["pump_blocked"]) and valved.converged


def test_a_check_valve_closed_against_a_pump_is_an_occlusion_not_a_solution():
    # The pump line's check valve fitted the wrong way round: the set flow has no way out,
    # so no flows balance it (the pump's pressure would rise to its alarm).  Those scenarios
    # are marked, not reported as a backflow; at zero pump flow the valve is simply shut and
    # the bag feeds the catheter as if the pump line were not there.
    bag_line = Tube(inner_diameter=3e-3, length=1.5)
    catheter = Catheter(gauge=22)
    net = PartNetwork(
        [
            Branch("gravity set", "bag", "y-site", [bag_line]),
            Branch(
                "pump line",
                "y-site",
                "pump",
                [Tube(inner_diameter=1e-3, length=1.0), CheckValve(k=2.0)],
            ),
            Branch("catheter", "y-site", "vein", [catheter]),
        ],
        [PressureNode("bag", head=0.8), PressureNode("vein", pressure=800.0, outlet=True)],
        [Pump("pump", flow=np.array([0.0, 5.0, 60.0]) * ML_MIN, label="syringe pump")],
    )
    result = net.solve(WATER)
    assert result.conditions["pump_blocked"].tolist() == [False, True, True]
    # the solver itself settled (a closed valve and balanced other nodes): not_converged is
    # its own word, while the result as a whole is not converged to a solution
    assert result.conditions["not_converged"].tolist() == [False, False, False]
    assert not result.converged and not np.any(result.reversed)
    assert not np.any(result.conditions["backflow_into_source"])
    # only the pump's node is blocked, not the y-site its leak fed
    assert result.node_conditions["blocked"].sum(axis=0).tolist() == [0, 1, 1]
    pump = result.node_names.index("pump")
    assert result.node_conditions["blocked"][pump].tolist() == [False, True, True]
    # no finite pressure where the pump is blocked (it was ~5e14 mmHg, the leak of the
    # closed valve's near-zero conductance); a number at zero pump flow
    assert np.isnan(result.pump_pressure[0]).tolist() == [False, True, True]
    assert np.isnan(result.node_pressure[pump]).tolist() == [False, True, True]
    assert np.isnan(result.branch_drop[1]).tolist() == [False, True, True]
    assert np.all(np.isfinite(np.delete(result.node_pressure, pump, axis=0)))
    said = " | ".join(result.flags)
    assert (
        "the set flow of syringe pump has no open way out: the check valve in branch pump line "
        "is closed against it" in said
    )
    assert not any("did not converge" in f or "back into" in f for f in result.flags)
    alone = PartNetwork(
        [
            Branch("gravity set", "bag", "y-site", [bag_line]),
            Branch("c", "y-site", "vein", catheter),
        ],
        [PressureNode("bag", head=0.8), PressureNode("vein", pressure=800.0, outlet=True)],
    ).solve(WATER)
    assert result.branch_flow[0, 0] == pytest.approx(alone.branch_flow[0], rel=1e-9)
    assert result.branch_flow[1, 0] == 0.0
    # An occluded pump delivers nothing at steady state (it stalls against the valve):
    # every scenario is the network without the pump, the outlet flow (the pump's set flow
    # once rode on it through the valve's leak) and the y-site pressure too (Kirchhoff 1847)
    np.testing.assert_allclose(
        -result.pressure_node_inflow[1], -alone.pressure_node_inflow[1], rtol=1e-9
    )
    for k in (0, 2):
        np.testing.assert_allclose(result.branch_flow[k], alone.branch_flow[k // 2], rtol=1e-9)
    np.testing.assert_allclose(result.pressure("y-site"), alone.pressure("y-site"), rtol=1e-9)
    assert np.all(result.branch_flow[1] == 0.0)
    # mass balance at every node, the pump's node balanced at zero set flow
    assert result.max_imbalance < 1e-12
    np.testing.assert_allclose(
        result.branch_flow[0], result.branch_flow[1] + result.branch_flow[2], rtol=1e-12
    )
    assert "no solution with its set flow; shown with the pump delivering nothing" in said


def test_of_two_pumps_only_the_one_shut_in_is_blocked_and_named():
    # Kirchhoff 1847: what a pump feeds into a node must leave it; pump A's only branch
    # holds a check valve facing it, so its set flow has no way out, while pump B's line
    # is open.  Only A is blocked: its node alone is marked, the flag names A alone,
    # A's pressure is NaN and B's, which has an answer, stays a number.
    tube = Tube(inner_diameter=1e-3, length=1.0)
    net = PartNetwork(
        [
            Branch("gravity set", "bag", "y-site", [Tube(inner_diameter=3e-3, length=1.5)]),
            Branch("line A", "y-site", "pump A", [tube, CheckValve(k=2.0)]),
            Branch("line B", "pump B", "y-site", [tube]),
            Branch("catheter", "y-site", "vein", [Catheter(gauge=22)]),
        ],
        [PressureNode("bag", head=0.8), PressureNode("vein", pressure=800.0, outlet=True)],
        [
            Pump("pump A", flow=60.0 * ML_MIN, pressure_limit=40000.0, label="syringe pump A"),
            Pump("pump B", flow=60.0 * ML_MIN, pressure_limit=40000.0, label="syringe pump B"),
        ],
    )
    result = net.solve(WATER)
    assert bool(result.conditions["pump_blocked"]) and not result.converged
    assert not bool(result.conditions["not_converged"])
    blocked = dict(zip(result.node_names, result.node_conditions["blocked"], strict=True))
    assert [n for n, on in blocked.items() if on] == ["pump A"]
    assert np.isnan(result.pump_pressure[0]) and np.isfinite(result.pump_pressure[1])
    assert result.pump_pressure[1] == pytest.approx(result.pressure("pump B"), rel=1e-12)
    assert result.pump_pressure[1] > result.pressure("y-site") > 800.0  # B pushes through its line
    said = " | ".join(result.flags)
    assert (
        "the set flow of syringe pump A has no open way out: the check valve in branch line A "
        "is closed against it" in said
    )
    [occlusion] = [f for f in result.flags if "no open way out" in f]
    assert "syringe pump B" not in occlusion
    # a blocked pump with a limit counts as over it (its pressure rises to the alarm)
    assert bool(result.conditions["over_pressure_limit"])
    # A delivers nothing: B's network as if A and its line were absent (Kirchhoff 1847)
    without_a = PartNetwork(
        [net.branches[0], net.branches[2], net.branches[3]],
        net.pressure_nodes,
        [net.pumps[1]],
    ).solve(WATER)
    assert result.max_imbalance < 1e-12 and result.branch_flow[1] == 0.0
    np.testing.assert_allclose(result.branch_flow[[0, 2, 3]], without_a.branch_flow, rtol=1e-9)
    for node in ("pump B", "y-site"):
        assert result.pressure(node) == pytest.approx(without_a.pressure(node), rel=1e-9)
    assert result.pump_pressure[1] == pytest.approx(without_a.pump_pressure[0], rel=1e-9)
    # B pushes back into the bag; the flag names B alone, not the blocked A
    assert result.branch_flow[0] < 0.0 and bool(result.conditions["backflow_into_source"])
    assert [f for f in result.flags if "back into" in f] == [
        f for f in without_a.flags if "back into" in f
    ]
    assert any(f.startswith("syringe pump B pushes") for f in result.flags)


def test_a_pump_shut_in_behind_a_junction_is_blocked_at_the_pump_only():
    # The closed valve need not touch the pump's node: pump -> tube -> junction -> valve
    # facing the pump.  The set flow still has no way out (Kirchhoff 1847); the pump's
    # node is marked, not the junction between it and the valve.
    net = PartNetwork(
        [
            Branch("bag line", "bag", "y-site", [Tube(inner_diameter=3e-3, length=1.5)]),
            Branch(
                "valve",
                "y-site",
                "joint",
                [Tube(inner_diameter=1e-3, length=0.1), CheckValve(k=2.0)],
            ),
            Branch("pump line", "pump", "joint", [Tube(inner_diameter=1e-3, length=1.0)]),
            Branch("catheter", "y-site", "vein", [Catheter(gauge=22)]),
        ],
        [PressureNode("bag", head=0.8), PressureNode("vein", pressure=800.0, outlet=True)],
        [Pump("pump", flow=np.array([0.0, 20.0]) * ML_MIN, label="syringe pump")],
    )
    result = net.solve(WATER)
    assert result.conditions["pump_blocked"].tolist() == [False, True]
    blocked = dict(zip(result.node_names, result.node_conditions["blocked"], strict=True))
    assert blocked["pump"].tolist() == [False, True] and not np.any(blocked["joint"])
    assert any("check valve in branch valve is closed against it" in f for f in result.flags)


def test_mass_balance_at_every_node_and_vectorized_equals_scalar():
    flows = np.array([5.0, 40.0, 90.0]) * ML_MIN
    heads = np.array([0.5, 0.9, 1.2])
    net = _y_site(pump_flow=flows, head=heads)
    result = net.solve(WATER)
    assert result.max_imbalance < 1e-12
    q = result.branch_flow
    # y-site: gravity + pump = catheter; the pump node passes its set flow
    np.testing.assert_allclose(q[0] + q[1], q[2], rtol=1e-12, atol=1e-20)
    np.testing.assert_allclose(q[1], flows, rtol=1e-12)
    for k in range(3):
        one = _y_site(pump_flow=flows[k], head=heads[k]).solve(WATER)
        np.testing.assert_allclose(one.branch_flow, q[:, k], rtol=1e-10)
        np.testing.assert_allclose(one.node_pressure, result.node_pressure[:, k], rtol=1e-10)


def test_blood_through_two_catheters_in_parallel():
    blood = rheoline.fluid("whole-blood")
    net = PartNetwork(
        [
            Branch("set", "bag", "hub", [Tube(inner_diameter=4e-3, length=2.0)]),
            Branch(
                "left", "hub", "vein", [Tube(inner_diameter=3e-3, length=0.3), Catheter(gauge=16)]
            ),
            Branch(
                "right", "hub", "vein", [Tube(inner_diameter=3e-3, length=0.3), Catheter(gauge=18)]
            ),
        ],
        [
            PressureNode("bag", pressure=40000.0, head=1.0),
            PressureNode("vein", pressure=1000.0, outlet=True),
        ],
    )
    result = net.solve(blood)
    assert result.converged and result.max_imbalance < 1e-12
    left, right = result.branch_flow[1], result.branch_flow[2]
    assert left > right > 0
    # each branch obeys its own line at the solved junction pressure
    hub = result.pressure("hub")
    line = net.branches[1].line
    assert line.solve(blood, source_pressure=hub, back_pressure=1000.0).flow == pytest.approx(
        left, rel=1e-8
    )


def test_topology_errors_name_what_is_wrong():
    tube = Tube(inner_diameter=1e-3, length=1.0)
    out = PressureNode("out", outlet=True)
    with pytest.raises(NetworkError, match="branch 'a' is named twice"):
        PartNetwork([Branch("a", "x", "out", tube), Branch("a", "x", "out", tube)], [out])
    with pytest.raises(NetworkError, match="node 'out' is named twice"):
        PartNetwork([Branch("a", "x", "out", tube)], [out, PressureNode("out")])
    with pytest.raises(
        NetworkError, match=r"'b' \(nodes 'p', 'q'\) are joined to no bag.*a disconnected branch"
    ):
        PartNetwork([Branch("a", "x", "out", tube), Branch("b", "p", "q", tube)], [out])
    with pytest.raises(
        NetworkError, match="joined to no bag, reservoir or outlet: a loop with no source"
    ) as err:
        PartNetwork(
            [
                Branch("a", "x", "out", tube),
                Branch("b", "p", "q", tube),
                Branch("c", "q", "p", tube),
            ],
            [out],
        )
    assert err.value.field == "branch[b]"
    with pytest.raises(NetworkError, match="runs from node 'x' to itself"):
        PartNetwork([Branch("a", "x", "x", tube)], [out])
    with pytest.raises(NetworkError, match="no pressure node"):
        PartNetwork([Branch("a", "x", "out", tube)], [])
    with pytest.raises(NetworkError, match="node 'nowhere' .* is on no branch"):
        PartNetwork([Branch("a", "x", "out", tube)], [out], [Pump("nowhere", flow=1e-6)])
    with pytest.raises(NetworkError, match="node 'out' is named twice"):
        PartNetwork([Branch("a", "x", "out", tube)], [out], [Pump("out", flow=1e-6)])
    paste = newtonian_fluid("p", 1e-3, 1000.0)
    paste = type(paste)("paste", temperature_c=20.0, density=1000.0, rheology=Casson(0.01, 3e-3))
    with pytest.raises(InputRangeError, match="has a yield stress"):
        PartNetwork([Branch("a", "x", "out", tube)], [out, PressureNode("x", pressure=1e3)]).solve(
            paste
        )


def test_network_benchmark_runs_alone_and_agrees_with_scipy():
    # benchmarks/network.py on its own at a tiny N: one JSON object with the machine's load,
    # the solve's counts and the per-scenario scipy.optimize.root reference agreeing
    script = Path(__file__).resolve().parents[1] / "benchmarks" / "network.py"
    out = subprocess.run(
        [sys.executable, str(script), "--n", "40", "--repeats", "1", "--subset-scale", "0.05"],
        capture_output=True,
        text=True,
        timeout=300,
        check=True,
    ).stdout
    report = json.loads(out)
    assert report["n"] == 40 and report["branches"] == 4 and report["agree"]
    assert report["max_relative_difference"] < 1e-6 and report["residual_passes"] >= 1
    assert {"machine", "load_average_before", "load_average_after"} <= set(report)


def test_two_pumps_both_shut_in_are_named_in_one_plural_sentence():
    # both pumps' only branches hold a check valve facing them: both set flows are blocked,
    # and the words say valves and pumps in the plural
    tube = Tube(inner_diameter=1e-3, length=1.0)
    net = PartNetwork(
        [
            Branch("gravity set", "bag", "y-site", [Tube(inner_diameter=3e-3, length=1.5)]),
            Branch("line A", "y-site", "pump A", [tube, CheckValve(k=2.0)]),
            Branch("line B", "y-site", "pump B", [tube, CheckValve(k=2.0)]),
            Branch("catheter", "y-site", "vein", [Catheter(gauge=22)]),
        ],
        [PressureNode("bag", head=0.8), PressureNode("vein", pressure=800.0, outlet=True)],
        [
            Pump("pump A", flow=30.0 * ML_MIN, label="syringe pump A"),
            Pump("pump B", flow=30.0 * ML_MIN, label="syringe pump B"),
        ],
    )
    result = net.solve(WATER)
    assert np.all(np.isnan(result.pump_pressure))
    [occlusion] = [f for f in result.flags if "no open way out" in f]
    assert occlusion.startswith(
        "the set flow of syringe pump A and syringe pump B has no open way out: the check "
        "valves in branches line A, line B are closed against them "
    )
