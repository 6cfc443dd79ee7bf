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

__all__ = ["BALANCE_TOL", "NetworkResult", "NETWORK_MODELS", "ZERO_FLOW"]

#: Provenance keys this module's solve adds to those of the lines' own models.
NETWORK_MODELS = ("kirchhoff-1847", "todini-pilati-1988")
_ML_MIN = 6e7  # m^3/s -> mL/min
#: A branch flow within this fraction of its scenario's largest is rounding: it has no sign.
ZERO_FLOW = 1e-12
#: The largest mass-balance error at a node, over its scenario's largest flow, of an answer
#: called converged.
BALANCE_TOL = 1e-5


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


def reached_nodes(network, topo, closed, seeds=None):
    """(n_nodes, *scenario_shape): the nodes joined to a bag, source or outlet by open
    branches (a closed check valve cuts its branch), spread out from the pressure nodes;
    from the nodes true in ``seeds`` ((n_nodes, *scenario_shape) bool) instead, if given."""
    closed = np.asarray(closed, bool)
    if seeds is None:
        reach = np.zeros((len(topo.nodes), *closed.shape[1:]), bool)
        for p in topo.pressure_nodes:
            reach[topo.nodes.index(p.node)] = True
    else:
        reach = np.array(seeds, bool)
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


def _behind_closed_valves(network, topo, closed, stuck_at, nodes_p, drop):
    """Node pressures, branch drops, closed valves and undetermined nodes of the answer,
    where closed check valves cut nodes off from every bag, source and outlet.

    Behind a closed valve no flow runs, so each part cut off rests at one pressure, and the
    solve's number there is only what the closed valve's near-zero conductance left (its
    rounding, amplified 1e14 times, Pa off).  Joined to a blocked pump (``stuck_at``) that
    pressure rises without bound: NaN.  Otherwise any pressure that keeps every valve on the
    part's edge shut is an answer; the part is given the one it would fill to through them:
    the highest pressure in front of a valve facing into it (the valve then at rest, no
    drop, and no longer called closed: it holds nothing back), else the lowest behind a valve
    facing out of it.  A part behind another settles from it, pass by pass.
    """
    unknown = reached_nodes(network, topo, closed, seeds=stuck_at)
    rest = ~reached_nodes(network, topo, closed) & ~unknown
    starts, ends = branch_ends(network, topo)
    if np.any(rest):
        part = _cut_off_parts(network, topo, closed, rest)
        for _ in topo.nodes:  # each pass settles at least one more part, or none changes
            before = nodes_p.copy()
            for label in range(len(topo.nodes)):
                member = part == label
                if np.any(member):
                    nodes_p = _settle(member, closed, starts, ends, nodes_p)
            if np.array_equal(nodes_p, before, equal_nan=True):
                break
        unknown = unknown | (rest & np.isnan(nodes_p))
        touching = rest[starts] | rest[ends]
        drop = np.where(touching, nodes_p[starts] - nodes_p[ends], drop)
        closed = closed & ~(touching & (drop == 0.0))
    nodes_p = np.where(unknown, np.nan, nodes_p)
    drop = np.where(unknown[starts] | unknown[ends], np.nan, drop)
    return nodes_p, drop, closed, unknown


def _cut_off_parts(network, topo, closed, rest):
    """(n_nodes, *shape) int: per ``rest`` node the lowest node index of its part (nodes
    joined by open branches), -1 elsewhere."""
    n = len(topo.nodes)
    index = np.arange(n).reshape((n,) + (1,) * (rest.ndim - 1))
    part = np.where(rest, index, -1)
    starts, ends = branch_ends(network, topo)
    for _ in topo.nodes:
        before = part.copy()
        for k, (s, e) in enumerate(zip(starts, ends, strict=True)):
            joined = ~closed[k] & rest[s] & rest[e]
            low = np.minimum(part[s], part[e])
            part[s] = np.where(joined, low, part[s])
            part[e] = np.where(joined, low, part[e])
        if np.array_equal(part, before):
            break
    return part


def _settle(member, closed, starts, ends, nodes_p):
    """``nodes_p`` with the part ``member`` ((n_nodes, *shape) bool) at the pressure it
    fills to through the closed valves on its edge (see :func:`_behind_closed_valves`)."""
    shape = member.shape[1:]
    low, high = np.full(shape, -np.inf), np.full(shape, np.inf)
    facing_in, facing_out = np.zeros(shape, bool), np.zeros(shape, bool)
    for k, (s, e) in enumerate(zip(starts, ends, strict=True)):
        into = closed[k] & member[e] & ~member[s]  # the valve lets flow from s into the part
        low = np.where(into, np.maximum(low, nodes_p[s]), low)
        out = closed[k] & member[s] & ~member[e]
        high = np.where(out, np.minimum(high, nodes_p[e]), high)
        facing_in, facing_out = facing_in | into, facing_out | out
    value = np.where(facing_in, low, high)
    return np.where(member & (facing_in | facing_out), value, nodes_p)


@dataclass(frozen=True)
class NetworkResult:
    """Node pressures and branch flows of a solved :class:`~rheoline.model.branched.PartNetwork`.

    Attributes
    ----------
    node_names : tuple
        Every node, the order of ``node_pressure``.
    node_pressure : ndarray
        (n_nodes, *scenario_shape) piezometric pressure [Pa], p + rho g z referred to the
        reference level (a gauge pressure at that level); NaN where it has no finite value
        (``node_conditions["undetermined"]``).
    branch_names : tuple of str
    branch_flow : ndarray
        (n_branches, *scenario_shape) [m^3/s], positive from a branch's start to its end.
    branch_drop : ndarray
        Start minus end pressure of each branch [Pa].
    reversed : ndarray of bool
        Flow against the branch's start -> end direction.
    closed : ndarray of bool
        A one-way branch (check valve) held shut (one resting with no flow and no drop
        across it, as in front of a stopped pump's dead end, holds nothing back: not shut).
    pressure_node_inflow : ndarray
        (n_pressure_nodes, *scenario_shape) flow [m^3/s] entering the network at each
        pressure node (negative: leaving it, at an outlet or back into a bag).
    pump_pressure : ndarray
        (n_pumps, *scenario_shape) pressure [Pa] at each pump's node; NaN where the pump is
        blocked (``node_conditions["blocked"]``): its pressure would rise without bound (and
        at a pump joined to a blocked one by open branches).
    conditions : dict
        Scenario-shaped boolean arrays: ``reversed_flow`` (some branch), ``backflow_into_source``
        (some bag or reservoir takes fluid in), ``check_valve_closed``, ``over_pressure_limit``
        (some pump; a blocked pump with a limit counts as over it), ``pump_blocked`` (a
        pump's set flow has no open way out: every path from its node to a bag, source or
        outlet is shut by a check valve closed against it, an occlusion whose pressure has
        no finite answer and no solution with that set flow; these scenarios are solved
        again with the blocked pumps delivering nothing, as an occluded pump does at steady
        state, and their flows and other pressures are that solution; ``converged`` is
        False), ``not_converged`` (the solver's own: its Newton steps did not settle, or
        they settled with a node's mass balance off by more than :data:`BALANCE_TOL` of the
        scenario's largest flow).
    branch_conditions : dict
        (n_branches, *scenario_shape) boolean arrays ``reversed`` and ``closed``.
    node_conditions : dict
        (n_nodes, *scenario_shape) boolean arrays: ``blocked``, true only at the node of a
        pump whose set flow finds no open way out; ``undetermined``, true there and at every
        node joined to such a pump by open branches (behind the check valve that shuts it
        in: no flow runs between them, so they share its pressure, which rises without
        bound).  ``node_pressure`` (and ``pump_pressure``) is NaN wherever ``undetermined``
        holds, and so is the ``branch_drop`` of every branch ending at such a node.
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
        # a flow within rounding of zero (ZERO_FLOW of its scenario's largest) has no sign:
        # it is zero (a pump branch at zero pump flow comes out of the linear solve as +-1e-23)
        flows = np.where(np.abs(flows) <= ZERO_FLOW * scale, 0.0, flows)
        inflow = np.tensordot(topo.a_fixed.T, flows, axes=(1, 0))  # into the network
        balance = np.tensordot(topo.a_free.T, flows, axes=(1, 0)) - injection
        unbalanced = np.max(np.abs(balance), axis=0) / scale if len(topo.free_nodes) else 0.0
        imbalance = float(np.max(unbalanced))
        # settled, but a node's mass balance is off (an ill-conditioned step: a branch of
        # constant-K losses alone at rest beside laminar ones): not a converged answer
        unbalanced = np.asarray(unbalanced > BALANCE_TOL)
        blocked = np.any(stuck_at, axis=0)
        nodes_p, drop, closed, unknown = _behind_closed_valves(
            network, topo, closed, stuck_at, nodes_p, topo.branch_drop(free_p, fixed)
        )
        reversed_ = (flows < 0.0) & ~closed
        pump_rows = [topo.nodes.index(p.node) for p in topo.pumps]
        pump_p = nodes_p[pump_rows]  # (n_pumps, *shape), empty without pumps
        over = np.zeros(shape, bool)
        for row, pump in enumerate(topo.pumps):
            if pump.pressure_limit is not None:
                limit = np.asarray(pump.pressure_limit, dtype=float)
                # shut in with a blocked pump (pressure undetermined: it rises with that
                # pump's), this pump's pressure passes its limit too
                shut_in = stuck_at[pump_rows[row]] | np.isnan(pump_p[row])
                over = over | (pump_p[row] > limit) | shut_in
        is_source = np.array([not p.outlet for p in topo.pressure_nodes], bool)
        is_source = is_source.reshape((-1,) + (1,) * len(shape))
        conditions = {
            "reversed_flow": np.any(reversed_, axis=0),
            "backflow_into_source": np.any(is_source & (inflow < 0.0), axis=0),
            "check_valve_closed": np.any(closed, axis=0),
            "over_pressure_limit": over,
            "pump_blocked": blocked,
            "not_converged": ~np.asarray(done, bool) | unbalanced,
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
            node_conditions={"blocked": stuck_at, "undetermined": unknown},
            iterations=int(state.steps),
            residual_passes=int(state.counter[0]),
            converged=bool(np.all(done & ~blocked & ~unbalanced)),
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
