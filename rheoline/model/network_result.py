"""The answer of a branched line (:class:`NetworkResult`): arrays per node and branch, conditions.

Every field is data: per-branch and per-node arrays whose leading axis follows
``branch_names`` / ``node_names`` and whose other axes are the scenario shape, boolean
condition arrays, and the provenance keys of the models used.  :attr:`NetworkResult.flags`
renders sentences from those arrays (for Python users); nothing parses them back.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

__all__ = ["NetworkResult", "NETWORK_MODELS"]

#: Provenance keys this module's solve adds to those of the lines' own models.
NETWORK_MODELS = ("kirchhoff-1847", "todini-pilati-1988")
_ML_MIN = 6e7  # m^3/s -> mL/min


def _scalar(value):
    arr = np.asarray(value)
    return arr.item() if arr.ndim == 0 else arr


def _in_scenarios(mask):
    total = mask.size
    return "" if total == 1 else f" in {int(np.count_nonzero(mask))} of {total} scenarios"


def _amount(values, mask):
    """'12.3 mL/min' for one scenario, 'up to 12.3 mL/min' for several."""
    q = float(np.max(np.abs(np.where(mask, values, 0.0)))) * _ML_MIN
    return f"{q:.3g} mL/min" if mask.size == 1 else f"up to {q:.3g} mL/min"


def branch_ends(network, topo):
    """Per branch, the index in ``topo.nodes`` of its start and of its end (two lists)."""
    index = {n: i for i, n in enumerate(topo.nodes)}
    return [index[b.start] for b in network.branches], [index[b.end] for b in network.branches]


def reached_nodes(network, topo, closed):
    """(n_nodes, *scenario_shape): the nodes joined to a bag, source or outlet by open
    branches (a closed check valve cuts its branch), spread out from the pressure nodes."""
    closed = np.asarray(closed, bool)
    reach = np.zeros((len(topo.nodes), *closed.shape[1:]), bool)
    for p in topo.pressure_nodes:
        reach[topo.nodes.index(p.node)] = True
    starts, ends = branch_ends(network, topo)
    for _ in topo.nodes:  # each pass reaches at least one more node, or nothing changes
        before = reach.copy()
        for k, (s, e) in enumerate(zip(starts, ends, strict=True)):
            joined = ~closed[k] & (reach[s] | reach[e])
            reach[s] |= joined
            reach[e] |= joined
        if np.array_equal(reach, before):
            break
    return reach


def blocked_pump_nodes(network, topo, closed):
    """(n_nodes, *scenario_shape): true at the node of each pump whose set flow (> 0)
    reaches no bag, source or outlet through open branches, and nowhere else."""
    reach = reached_nodes(network, topo, closed)
    out = np.zeros_like(reach)
    for pump in topo.pumps:
        row = topo.nodes.index(pump.node)
        out[row] = ~reach[row] & (np.asarray(pump.flow, dtype=float) > 0.0)
    return out


@dataclass(frozen=True)
class NetworkResult:
    """Node pressures and branch flows of a solved :class:`~rheoline.model.branched.PartNetwork`.

    Attributes
    ----------
    node_names : tuple
        Every node, the order of ``node_pressure``.
    node_pressure : ndarray
        (n_nodes, *scenario_shape) piezometric pressure [Pa], p + rho g z referred to the
        reference level (a gauge pressure at that level).
    branch_names : tuple of str
    branch_flow : ndarray
        (n_branches, *scenario_shape) [m^3/s], positive from a branch's start to its end.
    branch_drop : ndarray
        Start minus end pressure of each branch [Pa].
    reversed : ndarray of bool
        Flow against the branch's start -> end direction.
    closed : ndarray of bool
        A one-way branch (check valve) held shut.
    pressure_node_inflow : ndarray
        (n_pressure_nodes, *scenario_shape) flow [m^3/s] entering the network at each
        pressure node (negative: leaving it, at an outlet or back into a bag).
    pump_pressure : ndarray
        (n_pumps, *scenario_shape) pressure [Pa] at each pump's node; NaN where the pump is
        blocked (``node_conditions["blocked"]``): its pressure would rise without bound.
    conditions : dict
        Scenario-shaped boolean arrays: ``reversed_flow`` (some branch), ``backflow_into_source``
        (some bag or reservoir takes fluid in), ``check_valve_closed``, ``over_pressure_limit``
        (some pump; a blocked pump with a limit counts as over it), ``pump_blocked`` (a
        pump's set flow has no open way out: every path from its node to a bag, source or
        outlet is shut by a check valve closed against it, an occlusion whose pressure has
        no finite answer and no solution with that set flow; these scenarios are solved
        again with the blocked pumps delivering nothing, as an occluded pump does at steady
        state, and their flows and other pressures are that solution; ``converged`` is
        False), ``not_converged`` (the solver's own: its Newton steps did not settle).
    branch_conditions : dict
        (n_branches, *scenario_shape) boolean arrays ``reversed`` and ``closed``.
    node_conditions : dict
        (n_nodes, *scenario_shape) boolean array ``blocked``: true only at the node of a
        pump whose set flow finds no open way out (its ``node_pressure`` and
        ``pump_pressure`` are NaN there, and the ``branch_drop`` of its branches).
    iterations : int
        Newton (gradient-method) steps taken (those of a solve again with blocked pumps
        delivering nothing included).
    residual_passes : int
        Evaluations of every branch's pressure-flow law (each a vectorized pass).
    converged : bool
    max_imbalance : float
        Largest mass-balance error at any solved node over its largest branch flow [-] (a
        blocked pump's node balanced at zero set flow).
    models_used : tuple of str
        Provenance keys of the network solve.
    """

    node_names: tuple
    node_pressure: np.ndarray
    branch_names: tuple
    branch_flow: np.ndarray
    branch_drop: np.ndarray
    reversed: np.ndarray
    closed: np.ndarray
    pressure_node_inflow: np.ndarray
    pump_pressure: np.ndarray
    conditions: dict
    branch_conditions: dict
    node_conditions: dict
    iterations: int
    residual_passes: int
    converged: bool
    max_imbalance: float
    models_used: tuple
    network: object = field(repr=False)
    fluid: object = field(repr=False)

    @classmethod
    def build(cls, network, fluid, topo, state, fixed, h, stuck_at, injection):
        """Assemble the result from the solver's state (see ``PartNetwork.solve``):
        ``stuck_at`` the blocked pumps' nodes, ``injection`` the set flows solved for (a
        blocked pump's taken as zero)."""
        flows, closed, done = state.flows, state.closed, state.done
        shape = flows.shape[1:]
        free_p = state.pressures
        if free_p is None:
            free_p = np.zeros((len(topo.free_nodes), *shape))
        nodes_p = topo.node_pressure(free_p, fixed)
        flows = np.where(closed, 0.0, flows)
        scale = np.maximum(np.max(np.abs(flows), axis=0), 1e-300)
        # a flow within rounding of zero (1e-12 of its scenario's largest) has no sign: it
        # is zero (a pump branch at zero pump flow comes out of the linear solve as +-1e-23)
        flows = np.where(np.abs(flows) <= 1e-12 * scale, 0.0, flows)
        inflow = np.tensordot(topo.a_fixed.T, flows, axes=(1, 0))  # into the network
        balance = np.tensordot(topo.a_free.T, flows, axes=(1, 0)) - injection
        imbalance = float(np.max(np.abs(balance) / scale)) if len(topo.free_nodes) else 0.0
        blocked = np.any(stuck_at, axis=0)
        reversed_ = (flows < 0.0) & ~closed
        pump_rows = [topo.nodes.index(p.node) for p in topo.pumps]
        pump_p = nodes_p[pump_rows]  # (n_pumps, *shape), empty without pumps
        pump_stuck = stuck_at[pump_rows]
        over = np.zeros(shape, bool)
        for row, pump in enumerate(topo.pumps):
            if pump.pressure_limit is not None:
                limit = np.asarray(pump.pressure_limit, dtype=float)
                over = over | (pump_p[row] > limit) | pump_stuck[row]
        # a blocked pump's pressure has no finite answer: NaN, not the huge number the
        # near-zero conductance of the closed valve left there
        nodes_p = np.where(stuck_at, np.nan, nodes_p)
        pump_p = np.where(pump_stuck, np.nan, pump_p)
        starts, ends = branch_ends(network, topo)
        drop = topo.branch_drop(free_p, fixed)
        drop = np.where(stuck_at[starts] | stuck_at[ends], np.nan, drop)
        is_source = np.array([not p.outlet for p in topo.pressure_nodes], bool)
        is_source = is_source.reshape((-1,) + (1,) * len(shape))
        conditions = {
            "reversed_flow": np.any(reversed_, axis=0),
            "backflow_into_source": np.any(is_source & (inflow < 0.0), axis=0),
            "check_valve_closed": np.any(closed, axis=0),
            "over_pressure_limit": over,
            "pump_blocked": blocked,
            "not_converged": ~np.asarray(done, bool),
        }
        return cls(
            node_names=topo.nodes,
            node_pressure=nodes_p,
            branch_names=tuple(b.name for b in network.branches),
            branch_flow=flows,
            branch_drop=drop,
            reversed=reversed_,
            closed=np.asarray(closed, bool),
            pressure_node_inflow=inflow,
            pump_pressure=pump_p,
            conditions=conditions,
            branch_conditions={"reversed": reversed_, "closed": np.asarray(closed, bool)},
            node_conditions={"blocked": stuck_at},
            iterations=int(state.steps),
            residual_passes=int(state.counter[0]),
            converged=bool(np.all(done & ~blocked)),
            max_imbalance=imbalance,
            models_used=NETWORK_MODELS,
            network=network,
            fluid=fluid,
        )

    @property
    def scenario_shape(self):
        """Shape of the scenario arrays (() for a single scenario)."""
        return self.branch_flow.shape[1:]

    def flow(self, branch):
        """Flow [m^3/s] of the branch named ``branch`` (float, or array of the scenario shape)."""
        return _scalar(self.branch_flow[self._branch_index(branch)])

    def pressure(self, node):
        """Pressure [Pa] at ``node`` (float, or array of the scenario shape)."""
        try:
            return _scalar(self.node_pressure[self.node_names.index(node)])
        except ValueError:
            from rheoline.errors import NetworkError

            raise NetworkError(f"unknown node {node!r}; the nodes are {self.node_names}") from None

    def _branch_index(self, branch):
        try:
            return self.branch_names.index(branch)
        except ValueError:
            from rheoline.errors import NetworkError

            raise NetworkError(
                f"unknown branch {branch!r}; the branches are {self.branch_names}"
            ) from None

    @cached_property
    def flags(self):
        """Sentences rendered from the condition arrays (tuple of str)."""
        return tuple(_backflow_flags(self) + _other_flags(self))


def _delivering(result, pump):
    """Scenario-shaped: the pump delivers (set flow > 0, not blocked)."""
    topo = result.network.topology
    stuck = result.node_conditions["blocked"][topo.nodes.index(pump.node)]
    return (np.asarray(pump.flow, dtype=float) > 0.0) & ~stuck


def _backflow_flags(result):
    """'syringe pump pushes 12 mL/min back into the gravity bag at the y-site (branch ...)'
    naming only the pumps that deliver where the flow runs back."""
    out = []
    network = result.network
    told = set()
    for node in network.topology.pressure_nodes:
        if node.outlet:
            continue
        for b, branch in enumerate(network.branches):
            if node.node not in (branch.start, branch.end):
                continue
            into = -result.branch_flow[b] if branch.start == node.node else result.branch_flow[b]
            mask = into > 0.0
            if not np.any(mask):
                continue
            told.add(b)
            pumps = [
                p.label for p in network.topology.pumps if np.any(_delivering(result, p) & mask)
            ]
            who = " and ".join(pumps) if pumps else "flow from the other sources"
            verb = "push" if len(pumps) > 1 else ("pushes" if pumps else "runs")
            other = branch.end if branch.start == node.node else branch.start
            out.append(
                f"{who} {verb} {_amount(into, mask)} back into the {node.label} at the {other} "
                f"(branch {branch.name}){_in_scenarios(mask)}"
            )
    for b, branch in enumerate(network.branches):
        mask = result.reversed[b]
        if b in told or not np.any(mask):
            continue
        out.append(
            f"flow runs backwards in branch {branch.name}, {_amount(result.branch_flow[b], mask)} "
            f"from {branch.end} to {branch.start}{_in_scenarios(mask)}"
        )
    return out


def _other_flags(result):
    out = []
    for b, branch in enumerate(result.network.branches):
        mask = result.closed[b]
        if np.any(mask):
            out.append(
                f"check valve in branch {branch.name} closed: it holds back flow from "
                f"{branch.end} to {branch.start}{_in_scenarios(mask)}"
            )
    blocked = result.conditions["pump_blocked"]
    if np.any(blocked):
        out.append(_blocked_words(result, blocked))
    over = result.conditions["over_pressure_limit"]
    if np.any(over):
        out.append(f"a pump's pressure exceeds its pressure limit{_in_scenarios(over)}")
    stuck = result.conditions["not_converged"]
    if np.any(stuck):
        out.append(
            f"the network solve did not converge{_in_scenarios(stuck)}; its flows are the last "
            "iterate"
        )
    return out


def _blocked_words(result, blocked):
    """'the set flow of syringe pump has no open way out: the check valve in branch ...'
    naming only the blocked pumps and the closed valves that shut them in."""
    network = result.network
    topo = network.topology
    stuck = result.node_conditions["blocked"]
    pumps = [p.label for p in topo.pumps if np.any(stuck[topo.nodes.index(p.node)])]
    cut_off = ~reached_nodes(network, topo, result.closed) & blocked
    starts, ends = branch_ends(network, topo)
    shut = [
        b.name
        for k, b in enumerate(network.branches)
        if np.any(result.closed[k] & (cut_off[starts[k]] | cut_off[ends[k]]))
    ]
    if len(shut) > 1:
        where = f"the check valves in branches {', '.join(shut)} are"
    else:
        where = f"the check valve in branch {shut[0]} is" if shut else "check valves are"
    whom = "them" if len(pumps) > 1 else "it"
    return (
        f"the set flow of {' and '.join(pumps)} has no open way out: {where} closed against "
        f"{whom} "
        "(an occlusion: the pump's pressure rises to its alarm, so none is given); no solution "
        "with its set flow; shown with the pump delivering nothing (its node takes in no "
        f"flow){_in_scenarios(blocked)}"
    )
