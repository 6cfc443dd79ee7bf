"""Vessel networks: Kirchhoff solve against series/parallel formulas, mass balance, errors."""

import numpy as np
import pytest
import scipy.sparse as sp
from hypothesis import given
from hypothesis import strategies as st

from rheoline.errors import InputRangeError, NetworkError
from rheoline.model.network import (
    NetworkSolution,
    VesselNetwork,
    parallel_resistance,
    series_resistance,
)
from rheoline.model.vessels import Vessel


def capillary(radius=4e-6, length=5e-4, hematocrit=0.45):
    """Demo data: a microvessel with the Pries 1992 law."""
    return Vessel(radius=radius, length=length, hematocrit=hematocrit)


def test_two_equal_parallel_segments_halve_the_resistance():
    # Kirchhoff 1847 / Poiseuille: two equal conductances in parallel add, so R_eq = R / 2
    v = capillary()
    net = VesselNetwork.from_vessels(
        [("left", "a", "b", v), ("right", "a", "b", v)], pressures={"a": 2000.0, "b": 500.0}
    )
    assert net.equivalent_resistance("a", "b") == pytest.approx(v.resistance / 2, rel=1e-12)
    sol = net.solve()
    # each branch carries 1500 Pa / R; the shares are equal
    assert sol.flow("left") == pytest.approx(1500.0 / v.resistance, rel=1e-12)
    np.testing.assert_allclose(sol.resistance_share, [0.5, 0.5], rtol=1e-12)
    assert sol.total_inflow == pytest.approx(2 * 1500.0 / v.resistance, rel=1e-12)


def test_sparse_solve_matches_series_parallel_formula():
    # Series/parallel reduction by hand: R1 then (R2 || R3) then R4:
    # R = R1 + R2 R3 / (R2 + R3) + R4 = 1 + 2*3/5 + 4 = 6.2 (units of 1e9 Pa s/m^3)
    r = np.array([1.0, 2.0, 3.0, 4.0]) * 1e9
    net = VesselNetwork(
        ["in", "m", "m", "n"],
        ["m", "n", "n", "out"],
        r,
        pressures={"in": 6200.0, "out": 0.0},
        names=["r1", "r2", "r3", "r4"],
    )
    expected = 1e9 + 2e9 * 3e9 / 5e9 + 4e9
    assert net.equivalent_resistance("in", "out") == pytest.approx(expected, rel=1e-12)
    sol = net.solve()
    q = 6200.0 / expected  # 1e-6 m^3/s
    assert sol.flow("r1") == pytest.approx(q, rel=1e-12)
    # current divider: the 2e9 branch takes 3/5 of the flow
    assert sol.flow("r2") == pytest.approx(0.6 * q, rel=1e-12)
    assert sol.pressure("m") == pytest.approx(6200.0 - q * 1e9, rel=1e-12)
    assert series_resistance(1e9, parallel_resistance(2e9, 3e9), 4e9) == pytest.approx(expected)


def test_series_shares_are_resistance_fractions():
    # in series the flow is common, so each share of the dissipated power is R_k / sum(R)
    r = np.array([1.0, 3.0, 6.0]) * 1e8
    sol = VesselNetwork([0, 1, 2], [1, 2, 3], r, pressures={0: 1000.0, 3: 0.0}).solve()
    np.testing.assert_allclose(sol.resistance_share, r / r.sum(), rtol=1e-12)
    assert sol.pressure_drop.sum() == pytest.approx(1000.0, rel=1e-12)


def test_balanced_wheatstone_bridge_carries_no_bridge_flow():
    # Wheatstone bridge (a loop, not series/parallel): with R1/R2 = R3/R4 the bridge
    # segment between the two mid nodes carries no flow.
    up = ["a", "c", "a", "d", "c"]
    down = ["c", "b", "d", "b", "d"]
    r = np.array([1.0, 2.0, 3.0, 6.0, 5.0]) * 1e9
    sol = VesselNetwork(
        up, down, r, pressures={"a": 100.0, "b": 0.0}, names=["r1", "r2", "r3", "r4", "bridge"]
    ).solve()
    assert abs(sol.flow("bridge")) < 1e-12 * sol.total_inflow


def test_inflow_boundary():
    # a set inflow of 1e-9 m^3/s through R = 2e12 to a 0 Pa outlet needs 2000 Pa (by hand)
    net = VesselNetwork(["in"], ["out"], [2e12], pressures={"out": 0.0}, inflows={"in": 1e-9})
    sol = net.solve()
    assert sol.pressure("in") == pytest.approx(2000.0, rel=1e-12)
    assert sol.boundary_inflow["out"] == pytest.approx(-1e-9, rel=1e-12)


def test_segment_viscosity_uses_its_own_diameter_and_hematocrit():
    radius = np.array([3e-6, 10e-6, 40e-6])
    hematocrit = np.array([0.2, 0.45, 0.6])
    net = VesselNetwork.from_arrays(
        ["a", "b", "c"],
        ["b", "c", "d"],
        radius,
        1e-3,
        hematocrit,
        pressures={"a": 3000.0, "d": 0.0},
    )
    for i in range(3):
        single = Vessel(radius=radius[i], length=1e-3, hematocrit=hematocrit[i]).resistance
        assert net.resistance[i] == pytest.approx(single, rel=1e-12)


def _random_tree(seed, n_nodes):
    rng = np.random.default_rng(seed)
    parent = np.array([rng.integers(0, i) for i in range(1, n_nodes)])
    child = np.arange(1, n_nodes)
    radius = rng.uniform(5e-6, 100e-6, n_nodes - 1)
    hematocrit = rng.uniform(0.2, 0.55, n_nodes - 1)
    leaves = sorted(set(range(n_nodes)) - set(parent.tolist()))
    pressures = {0: 8000.0}
    inflows = {}
    for k, leaf in enumerate(leaves):
        if k % 3 == 2:
            inflows[int(leaf)] = float(rng.uniform(-1e-12, 1e-12))
        else:
            pressures[int(leaf)] = float(rng.uniform(0.0, 2000.0))
    return VesselNetwork.from_arrays(
        parent.tolist(),
        child.tolist(),
        radius,
        2e-4,
        hematocrit,
        pressures=pressures,
        inflows=inflows,
    )


@given(st.integers(0, 2**32 - 1), st.integers(2, 120))
def test_random_tree_conserves_mass_at_every_node(seed, n_nodes):
    # Kirchhoff's current law: at each internal node inflow equals outflow; at an inflow
    # node the net outflow equals the set inflow.  Checked to machine precision.
    net = _random_tree(seed, n_nodes)
    sol = net.solve()
    n = len(sol.nodes)
    index = {node: i for i, node in enumerate(sol.nodes)}
    a = sp.csr_matrix(
        (
            np.tile([1.0, -1.0], len(net.upstream)),
            (
                np.repeat(np.arange(len(net.upstream)), 2),
                [index[x] for pair in zip(net.upstream, net.downstream, strict=True) for x in pair],
            ),
        ),
        shape=(len(net.upstream), n),
    )
    net_out = a.T @ sol.segment_flow
    expected = np.zeros(n)
    for node, q in net.inflows.items():
        expected[index[node]] = q
    internal = [i for i, node in enumerate(sol.nodes) if node not in net.pressures]
    # the flow scale at which rounding acts: largest pressure over smallest resistance
    scale = np.max(np.abs(sol.node_pressure)) / np.min(net.resistance)
    residual = np.abs(net_out[internal] - expected[internal])
    assert residual.size == 0 or residual.max() <= 1e-14 * scale
    # and what enters at the boundaries leaves at the boundaries
    assert abs(sum(sol.boundary_inflow.values())) <= 1e-14 * scale * n


def test_solution_table_has_units():
    sol = VesselNetwork(["a"], ["b"], [1e9], pressures={"a": 1.0, "b": 0.0}).solve()
    assert isinstance(sol, NetworkSolution)
    assert "flow [m^3/s]" in sol.to_frame().columns


# --- bad input ---------------------------------------------------------------------------


def test_disconnected_network_raises():
    with pytest.raises(NetworkError, match="disconnected: 2 separate parts"):
        VesselNetwork(
            ["a", "c"], ["b", "d"], [1e9, 1e9], pressures={"a": 1.0, "b": 0.0, "c": 1.0}
        ).solve()


def test_no_pressure_node_is_singular():
    with pytest.raises(NetworkError, match="singular: no node has a known pressure"):
        VesselNetwork(["a"], ["b"], [1e9], inflows={"a": 1e-9, "b": -1e-9}).solve()


def test_unknown_node_raises():
    with pytest.raises(NetworkError, match="pressures name unknown node"):
        VesselNetwork(["a"], ["b"], [1e9], pressures={"z": 1.0})
    sol = VesselNetwork(["a"], ["b"], [1e9], pressures={"a": 1.0, "b": 0.0}).solve()
    with pytest.raises(NetworkError, match="unknown node 'q'"):
        sol.pressure("q")
    with pytest.raises(NetworkError, match="unknown segment 'x'"):
        sol.flow("x")


def test_pressure_and_inflow_on_one_node_raises():
    with pytest.raises(NetworkError, match="both a pressure and an inflow"):
        VesselNetwork(["a"], ["b"], [1e9], pressures={"a": 1.0}, inflows={"a": 1e-9})


def test_self_loop_raises():
    with pytest.raises(NetworkError, match="joins node 'a' to itself"):
        VesselNetwork(["a"], ["a"], [1e9], pressures={"a": 1.0})


def test_mismatched_lengths_raise():
    with pytest.raises(InputRangeError, match="one entry per segment"):
        VesselNetwork(["a", "b"], ["b"], [1e9, 1e9])


def test_duplicate_names_raise():
    with pytest.raises(NetworkError, match="segment names must be unique"):
        VesselNetwork(["a", "a"], ["b", "b"], [1e9, 1e9], names=["x", "x"])


def test_non_positive_resistance_raises():
    with pytest.raises(InputRangeError, match="resistance must be greater than 0"):
        VesselNetwork(["a"], ["b"], [0.0])


def test_from_arrays_wrong_count_raises():
    with pytest.raises(InputRangeError, match="one value per segment"):
        VesselNetwork.from_arrays(["a", "b"], ["b", "c"], np.array([1e-5, 2e-5, 3e-5]), 1e-3)


def test_bad_segment_tuple_raises():
    with pytest.raises(InputRangeError, match="each segment must be"):
        VesselNetwork.from_vessels([("only", "a")])


def test_equivalent_resistance_same_node_raises():
    net = VesselNetwork(["a"], ["b"], [1e9])
    with pytest.raises(NetworkError, match="inlet and outlet must differ"):
        net.equivalent_resistance("a", "a")
