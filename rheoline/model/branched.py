r"""Branched lines: networks of parts between named nodes, solved by Kirchhoff's laws.

A branch is a chain of parts in series (a :class:`~rheoline.model.line.Line`) from a start
node to an end node.  Nodes where a bag, reservoir or outlet holds the pressure are
*pressure nodes*; a pump pushes a set flow into a node; every other node conserves mass.
Pressures are *piezometric*, :math:`P = p + \rho g z` with z the height above the reference
level (the outlet's, usually), so that gravity enters only through the pressure nodes:
a gravity bag whose fluid surface stands h above the reference is a pressure node at
:math:`\rho g h`, a vein at pressure p and height 0 one at p.

Each branch obeys its own line's pressure-flow law in the direction its flow takes,

.. math::

    P_{start} - P_{end} = h_b(Q_b), \qquad
    h_b(Q) = \begin{cases} \text{losses of the line at } Q & Q \ge 0\\
    -\text{losses of the reversed line at } |Q| & Q < 0 \end{cases}

(the reversed line is the same parts in the opposite order, so entrance, contraction and
exit losses fall where reversed flow meets them), and the nodes conserve mass,
:math:`A^T Q = q_{pump}`.  Every node is a plenum: a branch's outlet jet is lost at the node
it enters (the Line's exit loss), as at a Y-site or manifold.

The equations are solved for all scenarios at once by the global gradient method of
Todini & Pilati (1988): Newton's method on the branch and node equations together, each
step a linear solve of the node-pressure system :math:`A^T G^{-1} A\,P = \ldots` (G the
branches' slopes dh/dQ).  The first step, from zero flow where each law is its laminar
resistance, is the exact solution of the linearized network (the "linearized start").
A branch holding a :class:`~rheoline.model.parts.CheckValve` is one-way: closed (no flow)
while its end's pressure exceeds its start's, reopened when the drop turns positive again;
a valve carrying no flow (within rounding) is left as it is, open or shut (a dead end
behind it, as a pump at zero set flow, is at rest either way).  A part of the network cut
off by closed valves rests at the pressure it fills to through them
(:class:`~rheoline.model.network_result.NetworkResult`).
A pump whose every way out is shut by such a valve has no solution with its set flow (an
occlusion); those scenarios are solved again, all at once, with that pump delivering nothing.

References
----------
Todini, E., Pilati, S., "A gradient algorithm for the analysis of pipe networks", in
Computer Applications in Water Supply, Vol. 1, Research Studies Press, 1988, pp. 1-20.
Kirchhoff, G., Ann. Phys. Chem. 72 (1847) 497-508.
"""

from __future__ import annotations

from collections.abc import Hashable
from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError, NetworkError
from rheoline.model.line import GRAVITY, Line, _check_fluid
from rheoline.model.network_result import (
    ZERO_FLOW,
    NetworkResult,
    blocked_pump_nodes,
    branch_ends,
    reached_nodes,
)
from rheoline.model.network_topology import Topology
from rheoline.model.parts import Part
from rheoline.model.validation import check_finite, check_nonnegative

__all__ = ["Branch", "PressureNode", "Pump", "PartNetwork", "NetworkResult"]

_MAX_ITER = 60
_TOL = 1e-11  # relative change of every branch flow at convergence
#: Flows [m^3/s] below this take each law's laminar slope (a straight line through zero).
_FLOOR = 1e-18


@dataclass
class _State:
    """The solver's arrays: flows (m, *shape), closed one-way branches, settled scenarios,
    free-node pressures of the last step, Newton steps and residual passes ([count])."""

    flows: np.ndarray
    closed: np.ndarray
    done: np.ndarray
    pressures: np.ndarray | None
    steps: int
    counter: list


@dataclass(frozen=True)
class Branch:
    """A chain of parts from node ``start`` to node ``end`` (flow positive start -> end).

    Parameters
    ----------
    name : str
        Unique label.
    start, end : hashable
        Node labels (str, int, ...); different from each other.
    line : Line or sequence of Part
        The parts in series, upstream (``start``) first.
    """

    name: str
    start: Hashable
    end: Hashable
    line: Line

    def __post_init__(self):
        line = self.line
        if not isinstance(line, Line):
            if isinstance(line, Part):
                line = [line]
            line = Line(line)
        object.__setattr__(self, "line", line)
        object.__setattr__(self, "name", str(self.name))

    @property
    def one_way(self):
        """True if any part is one-way (a check valve): no flow from ``end`` to ``start``."""
        return any(getattr(p, "one_way", False) for p in self.line.parts)


@dataclass(frozen=True)
class PressureNode:
    """A node whose pressure is held: a gravity or pressure bag, a reservoir, an outlet.

    Parameters
    ----------
    node : hashable
        The node.
    pressure : float or array_like
        Gauge pressure [Pa] at the fluid surface (a bag's squeeze) or at the outlet (a vein).
    head : float or array_like
        Height [m] of that surface or outlet above the reference level (negative below).
    label : str, optional
        Words for the flags, e.g. "gravity bag" or "vein"; default the node's name.
    outlet : bool
        True for an outlet (a vein, a beaker), where fluid leaving the network is expected;
        False (default) for a source, into which flow back is reported as backflow.
    """

    node: Hashable
    pressure: float | np.ndarray = 0.0
    head: float | np.ndarray = 0.0
    label: str | None = None
    outlet: bool = False

    def __post_init__(self):
        check_finite(f"pressure of node {self.node!r}", self.pressure)
        check_finite(f"head of node {self.node!r}", self.head)
        if self.label is None:
            object.__setattr__(self, "label", str(self.node))


@dataclass(frozen=True)
class Pump:
    """A pump that pushes a set flow into a node (its pressure is solved).

    Parameters
    ----------
    node : hashable
    flow : float or array_like
        [m^3/s], >= 0.
    pressure_limit : float or array_like, optional
        Pressure [Pa] (referred to the reference level) above which the pump would alarm.
    label : str, optional
        Words for the flags, e.g. "syringe pump"; default "pump at <node>".
    """

    node: Hashable
    flow: float | np.ndarray
    pressure_limit: float | np.ndarray | None = None
    label: str | None = None

    def __post_init__(self):
        check_nonnegative(f"flow of pump at {self.node!r}", self.flow, "m^3/s")
        if self.pressure_limit is not None:
            check_finite(f"pressure_limit of pump at {self.node!r}", self.pressure_limit)
        if self.label is None:
            object.__setattr__(self, "label", f"pump at {self.node}")


class PartNetwork:
    """Branches of parts between named nodes, with pressure nodes and pumps.

    Parameters
    ----------
    branches : sequence of Branch
    pressure_nodes : sequence of PressureNode
        Bags, reservoirs and outlets; at least one.
    pumps : sequence of Pump
        Set flows into nodes that are not pressure nodes.
    name : str, optional

    Raises
    ------
    NetworkError
        A branch or node named twice, a branch from a node to itself, a boundary at an
        unknown node, a pump at a pressure node, or a part of the network (a branch, a
        loop) joined to no pressure node.

    Examples
    --------
    A pump joins a gravity line at a Y-site; the catheter runs to a vein at 10 cmH2O:

    >>> from rheoline.model.fluid_base import newtonian_fluid
    >>> from rheoline.model.parts import Catheter, Tube
    >>> water = newtonian_fluid("water", viscosity=1.0e-3, density=998.0)
    >>> net = PartNetwork(
    ...     [
    ...         Branch("gravity set", "bag", "y-site", [Tube(inner_diameter=3e-3, length=1.5)]),
    ...         Branch("pump line", "pump", "y-site", [Tube(inner_diameter=1e-3, length=1.0)]),
    ...         Branch("catheter", "y-site", "vein", [Catheter(gauge=22)]),
    ...     ],
    ...     pressure_nodes=[PressureNode("bag", head=0.8, label="gravity bag"),
    ...                     PressureNode("vein", pressure=980.665, outlet=True)],
    ...     pumps=[Pump("pump", flow=60e-6 / 60, label="syringe pump")],
    ... )
    >>> result = net.solve(water)
    >>> [round(float(q) * 6e7, 1) for q in result.branch_flow]          # mL/min
    [-26.9, 60.0, 33.1]
    >>> result.flags[0]
    'syringe pump pushes 26.9 mL/min back into the gravity bag at the y-site (branch gravity set)'
    >>> bool(result.reversed[0]), bool(result.pressure("y-site") > result.pressure("bag"))
    (True, True)
    """

    def __init__(self, branches, pressure_nodes=(), pumps=(), name=None):
        self.branches = tuple(branches)
        for i, b in enumerate(self.branches):
            if not isinstance(b, Branch):
                raise NetworkError(
                    f"branches[{i}] is {b!r}, not a Branch; use Branch(name, start, end, parts)"
                )
        self.pressure_nodes = tuple(pressure_nodes)
        self.pumps = tuple(pumps)
        self.name = name or "network"
        self.topology = Topology.build(self.branches, self.pressure_nodes, self.pumps)
        self._reversed = tuple(
            Line(b.line.parts[::-1], entrance=b.line.entrance) for b in self.branches
        )

    def __repr__(self):
        return f"PartNetwork({[b.name for b in self.branches]!r})"

    # ------------------------------------------------------------------ inputs
    def _scenario_shape(self, fluid):
        named = {"fluid.density": fluid.density}
        for p in self.pressure_nodes:
            named[f"pressure of {p.node!r}"] = p.pressure
            named[f"head of {p.node!r}"] = p.head
        for p in self.pumps:
            named[f"flow of {p.label}"] = p.flow
        shapes = [b.line._check_inputs(fluid) for b in self.branches]
        try:
            return np.broadcast_shapes(*shapes, *(np.shape(v) for v in named.values()))
        except ValueError:
            raise InputRangeError(
                "the network's array inputs (node pressures and heads, pump flows, part sizes, "
                "fluid properties) have shapes that do not broadcast together; give them one "
                "shape, or shapes that broadcast"
            ) from None

    # ------------------------------------------------------------------ laws
    def _laws(self, fluid, shape):
        """Per branch and direction: a function q >= 0 -> (losses [Pa], d losses / dQ)."""
        laws = []
        for line in (*(b.line for b in self.branches), *self._reversed):
            layout = line._layout(fluid, shape)
            laws.append((line, layout))
        return laws

    @staticmethod
    def _drop(law, fluid, q_abs):
        """Losses [Pa] and slope [Pa s/m^3] of one direction's law at flows >= 0."""
        line, layout = law
        q = np.maximum(q_abs, _FLOOR)
        total, slope_log, _, _ = line._exact_losses(layout, fluid, q)
        # below the floor: the straight line through zero with the laminar slope
        small = q_abs < _FLOOR
        secant = total / q
        return np.where(small, secant * q_abs, total), np.where(small, secant, slope_log / q)

    def _evaluate(self, laws, fluid, flows, counter):
        """h(Q) and dh/dQ of every branch, (m, *shape) each; counts the residual passes."""
        m = len(self.branches)
        h = np.zeros(flows.shape)
        g = np.ones(flows.shape)
        counter[0] += 1
        for b in range(m):
            q = flows[b]
            forward, backward = q >= 0, q < 0
            if np.any(forward):
                hf, gf = self._drop(laws[b], fluid, np.abs(q))
                h[b] = np.where(forward, hf, h[b])
                g[b] = np.where(forward, gf, g[b])
            if np.any(backward):
                hr, gr = self._drop(laws[m + b], fluid, np.abs(q))
                h[b] = np.where(backward, -hr, h[b])
                g[b] = np.where(backward, gr, g[b])
        return h, g

    # ------------------------------------------------------------------ solve
    def solve(self, fluid, *, max_iterations=_MAX_ITER):
        """Node pressures and branch flows of every scenario.

        Parameters
        ----------
        fluid : Fluid
            The one fluid in every branch (density and rheology may be arrays).
        max_iterations : int
            Newton steps at most (each one residual pass and one node solve).

        Returns
        -------
        NetworkResult

        Notes
        -----
        Convergence: every branch flow changes by less than 1e-11 of the largest flow of
        its scenario.  Scenarios that have converged are frozen; ``result.converged`` and
        ``result.conditions["not_converged"]`` say which did not.
        """
        _check_fluid(fluid)
        if getattr(fluid.rheology, "yield_stress", None) is not None:
            raise InputRangeError(
                f"fluid {fluid.name!r} has a yield stress ({fluid.rheology.name}); the network "
                "solve needs a pressure-flow law without a threshold: use a blood model "
                "without a yield stress (e.g. Carreau) or a Newtonian fluid"
            )
        shape = self._scenario_shape(fluid)
        topo = self.topology
        laws = self._laws(fluid, shape)
        fixed = np.stack(
            [
                np.broadcast_to(p.pressure + fluid.density * GRAVITY * np.asarray(p.head), shape)
                for p in topo.pressure_nodes
            ]
        )
        m = len(self.branches)
        one_way = np.array([b.one_way for b in self.branches]).reshape((m,) + (1,) * len(shape))
        state = _State(
            flows=np.zeros((m, *shape)),
            closed=np.zeros((m, *shape), bool),
            done=np.zeros(shape, bool),
            pressures=None,
            steps=0,
            counter=[0],
        )
        self._iterate(laws, fluid, fixed, topo.injection(shape), one_way, state, max_iterations)
        stuck = blocked_pump_nodes(self, topo, state.closed)
        stalled = np.zeros((len(topo.pumps), *shape), bool)
        rows = [topo.nodes.index(p.node) for p in topo.pumps]
        for _ in topo.pumps:  # each round stalls at least one more pump, or none is new
            if not np.any(stuck[rows] & ~stalled):
                break
            stalled = stalled | stuck[rows]
            self._resolve_stalled(laws, fluid, fixed, one_way, state, stalled, max_iterations)
            stuck = stuck | blocked_pump_nodes(self, topo, state.closed)
        h, _ = self._evaluate(laws, fluid, state.flows, state.counter)
        return NetworkResult.build(
            self, fluid, topo, state, fixed, h, stuck, topo.injection(shape, stalled)
        )

    def _resolve_stalled(self, laws, fluid, fixed, one_way, state, stalled, max_iterations):
        """Solve again the scenarios where a pump is blocked, with the blocked pumps' set
        flow taken as zero (an occluded pump delivers nothing at steady state), from zero
        flow, the valves that shut them in held closed; the others stay as they are."""
        topo = self.topology
        again = np.any(stalled, axis=0)
        cut_off = ~reached_nodes(self, topo, state.closed)
        starts, ends = branch_ends(self, topo)
        pinned = state.closed & (cut_off[starts] | cut_off[ends]) & again
        state.flows = np.where(again, 0.0, state.flows)
        state.closed = np.where(again, pinned, state.closed)
        settled = state.done
        state.done = ~again
        injection = topo.injection(state.flows.shape[1:], stalled)
        self._iterate(laws, fluid, fixed, injection, one_way, state, max_iterations, pinned)
        state.done = np.where(again, state.done, settled)

    def _iterate(self, laws, fluid, fixed, injection, one_way, state, max_iterations, pinned=None):
        """Newton steps on ``state`` (flows, closed, done, pressures, steps) until every
        scenario has settled or ``max_iterations`` steps; ``pinned`` one-way branches stay
        closed.  Scenarios already done are frozen (their pressures too)."""
        topo = self.topology
        flows, closed, done = state.flows, state.closed, state.done
        frozen = done.copy()
        pinned = np.zeros_like(closed) if pinned is None else pinned
        undriven = _undriven(fixed, injection)
        for _ in range(max_iterations):
            h, g = self._evaluate(laws, fluid, flows, state.counter)
            new_flows, pressures = topo.gradient_step(flows, h, g, fixed, injection, closed)
            state.steps += 1
            # one-way branches: close on reverse flow, reopen when the drop turns positive.
            # A flow within rounding of zero has no sign: an open valve carrying none (a dead
            # end behind it, a pump at zero flow) is as much a fixed point as a closed one
            # whose drop is not positive, so it stays open (closing it on a -1e-23 flow left
            # the dead end's pressure to the closed valve's tiny conductance, whose rounding
            # reopened it: the state toggled every step and never settled).
            drop = topo.branch_drop(pressures, fixed)
            rounding = np.where(undriven, np.inf, ZERO_FLOW * np.max(np.abs(new_flows), axis=0))
            closed_next = pinned | (one_way & np.where(closed, drop <= 0.0, new_flows < -rounding))
            # rounding is no flow: a dead end's -1e-22 would otherwise set, through the closed
            # valve's near-zero conductance, the pressure behind the valve (Pa off)
            new_flows = np.where(closed_next | (np.abs(new_flows) <= rounding), 0.0, new_flows)
            scale = np.maximum(np.max(np.abs(new_flows), axis=0), 1e-300)
            change = np.max(np.abs(new_flows - flows), axis=0) / scale
            step_done = (change < _TOL) & np.all(closed_next == closed, axis=0)
            flows = np.where(done, flows, new_flows)
            closed = np.where(done, closed, closed_next)
            old = pressures if state.pressures is None else state.pressures
            state.pressures = np.where(frozen, old, pressures)
            done = done | step_done
            if np.all(done):
                break
        state.flows, state.closed, state.done = flows, closed, done


def _undriven(fixed, injection):
    """Scenarios nothing drives: no pump flow and every pressure node at one pressure
    (within rounding, heads included).  Passive parts then carry no flow at all, and the
    linear solve's rounding flows (1e-23 m^3/s at 1 kPa) are no flow: relative to flows that
    are all rounding they would be read as flows, signed, and never settle."""
    quiet = ~np.any(injection != 0.0, axis=0) if len(injection) else True
    spread = np.max(fixed, axis=0) - np.min(fixed, axis=0)
    return quiet & (spread <= ZERO_FLOW * np.max(np.abs(fixed), axis=0))
