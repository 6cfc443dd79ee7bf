"""The graph of a branched line: nodes, incidence, checks, and the gradient-method step.

:class:`Topology` is built once per :class:`~rheoline.model.branched.PartNetwork`: it checks
the graph (each name once, no branch from a node to itself, every part of the network joined
to a pressure node) and holds the incidence matrices split into solved ("free") and held
("fixed") nodes.  :meth:`Topology.gradient_step` is one Newton step of Todini & Pilati (1988)
for every scenario at once (a batched dense solve of the node-pressure system).

References
----------
Todini, E., Pilati, S., "A gradient algorithm for the analysis of pipe networks", in
Computer Applications in Water Supply, Vol. 1, Research Studies Press, 1988, pp. 1-20.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rheoline.errors import NetworkError

__all__ = ["Topology", "sourceless_parts"]

#: Conductance of a closed one-way branch relative to the largest open one: keeps a node
#: reached only through a closed valve solvable without letting flow through (1e-14 of it).
_CLOSED_CONDUCTANCE = 1e-14


def _network_error(message, field=None, value=None):
    """A NetworkError carrying ``field`` (the branch or list at fault) and ``value``."""
    err = NetworkError(message)
    err.field, err.value = field, value
    return err


def _preview(items, most=6):
    items = [repr(x) for x in items]
    return ", ".join(items[:most]) + (f", ... ({len(items)} in all)" if len(items) > most else "")


def _once(labels, what):
    """NetworkError for the first label used twice."""
    seen = set()
    for label in labels:
        if label in seen:
            raise _network_error(
                f"{what} {label!r} is named twice; give each {what} one entry",
                what,
                label,
            )
        seen.add(label)


def _check_nodes(branches):
    for b in branches:
        for node in (b.start, b.end):
            try:
                hash(node)
            except TypeError:
                raise _network_error(
                    f"branch {b.name!r}: node {node!r} cannot be a node label (it is mutable); "
                    "use a str such as 'y-site'",
                    f"branch[{b.name}]",
                    node,
                ) from None
        if b.start == b.end:
            raise _network_error(
                f"branch {b.name!r} runs from node {b.start!r} to itself, a loop with no "
                "source; give it two different end nodes",
                f"branch[{b.name}]",
                b.start,
            )


def _components(nodes, branches):
    """Connected components (union-find): node -> root."""
    parent = {n: n for n in nodes}

    def find(n):
        while parent[n] != n:
            parent[n] = parent[parent[n]]
            n = parent[n]
        return n

    for b in branches:
        parent[find(b.start)] = find(b.end)
    return {n: find(n) for n in nodes}


def sourceless_parts(nodes, branches, held):
    """The connected parts of a network that reach no held (pressure) node.

    Parameters
    ----------
    nodes : sequence
        Every node.
    branches : sequence
        Objects with ``name``, ``start`` and ``end``.
    held : collection
        The nodes whose pressure is held (bags, reservoirs, outlets).

    Returns
    -------
    list of (nodes, branch names, kind)
        One entry per part joined to no held node; ``kind`` is "a loop with no source"
        when the part has as many branches as nodes or more, else "a disconnected branch".

    Examples
    --------
    >>> from types import SimpleNamespace as B
    >>> sourceless_parts("abcd", [B(name="x", start="a", end="b"),
    ...                           B(name="y", start="c", end="d")], {"a"})
    [(['c', 'd'], ['y'], 'a disconnected branch')]
    """
    root = _components(nodes, branches)
    reached = {root[n] for n in held}
    out = []
    for r in dict.fromkeys(root.values()):
        if r in reached:
            continue
        part_nodes = [n for n in nodes if root[n] == r]
        part_branches = [b.name for b in branches if root[b.start] == r]
        what = (
            "a loop with no source"
            if len(part_branches) >= len(part_nodes)
            else "a disconnected branch"
        )
        out.append((part_nodes, part_branches, what))
    return out


def _check_sources(nodes, branches, held):
    """Every connected part of the network must reach a pressure node."""
    for part_nodes, part_branches, what in sourceless_parts(nodes, branches, held)[:1]:
        raise _network_error(
            f"branch(es) {_preview(part_branches)} (nodes {_preview(part_nodes)}) are joined to "
            f"no bag, reservoir or outlet: {what}, whose pressures and flows are undetermined. "
            "Join them to the rest of the network or hold one of their nodes with a PressureNode",
            f"branch[{part_branches[0]}]",
            part_branches,
        )


@dataclass(frozen=True)
class Topology:
    """Nodes and incidence of a network; see the module docstring."""

    nodes: tuple  # every node, in order of first appearance in the branches
    free_nodes: tuple  # nodes whose pressure is solved
    pressure_nodes: tuple  # the PressureNode objects, in the order of ``a_fixed``'s columns
    pumps: tuple
    a_free: np.ndarray  # (m, n_free): +1 at a branch's start, -1 at its end
    a_fixed: np.ndarray  # (m, n_fixed)
    pump_rows: tuple  # index into free_nodes of each pump's node

    @classmethod
    def build(cls, branches, pressure_nodes, pumps):
        """Check the graph and build the incidence; NetworkError naming what is wrong."""
        if not branches:
            raise _network_error("the network has no branches; add at least one Branch", "branches")
        _once([b.name for b in branches], "branch")
        _check_nodes(branches)
        nodes = tuple(dict.fromkeys(n for b in branches for n in (b.start, b.end)))
        if not pressure_nodes:
            raise _network_error(
                "the network has no pressure node (bag, reservoir or outlet): its pressures are "
                "undetermined; hold at least one node with a PressureNode",
                "pressure_nodes",
            )
        held = [p.node for p in pressure_nodes]
        pumped = [p.node for p in pumps]
        _once(held + pumped, "node")
        for node in held + pumped:
            if node not in nodes:
                raise _network_error(
                    f"node {node!r} (a pressure node or pump) is on no branch; the network's "
                    f"nodes are {_preview(nodes)}",
                    "node",
                    node,
                )
        _check_sources(nodes, branches, held)
        free = tuple(n for n in nodes if n not in held)

        def incidence(columns):
            index = {n: i for i, n in enumerate(columns)}
            a = np.zeros((len(branches), len(columns)))
            for k, b in enumerate(branches):
                if b.start in index:
                    a[k, index[b.start]] = 1.0
                if b.end in index:
                    a[k, index[b.end]] = -1.0
            return a

        return cls(
            nodes=nodes,
            free_nodes=free,
            pressure_nodes=tuple(pressure_nodes),
            pumps=tuple(pumps),
            a_free=incidence(free),
            a_fixed=incidence(held),
            pump_rows=tuple(free.index(p.node) for p in pumps),
        )

    def injection(self, shape, stalled=None):
        """Flow pushed into each free node [m^3/s], shape (n_free, *shape); ``stalled``
        ((n_pumps, *shape) bool, optional) marks pumps taken as delivering nothing."""
        inj = np.zeros((len(self.free_nodes), *shape))
        for k, (row, pump) in enumerate(zip(self.pump_rows, self.pumps, strict=True)):
            flow = np.asarray(pump.flow, dtype=float)
            if stalled is not None:
                flow = np.where(stalled[k], 0.0, flow)
            inj[row] = inj[row] + flow
        return inj

    def _fixed_drop(self, fixed):
        """(A10 H0) per branch: start minus end pressure from the held nodes only."""
        return np.tensordot(self.a_fixed, fixed, axes=(1, 0))

    def branch_drop(self, free_pressure, fixed):
        """P_start - P_end of every branch [Pa], shape (m, *shape)."""
        drop = self._fixed_drop(fixed)
        if len(self.free_nodes):
            drop = drop + np.tensordot(self.a_free, free_pressure, axes=(1, 0))
        return drop

    def node_pressure(self, free_pressure, fixed):
        """Pressure of every node in ``nodes`` order, shape (n_nodes, *shape)."""
        out = {p.node: fixed[i] for i, p in enumerate(self.pressure_nodes)}
        out.update({n: free_pressure[i] for i, n in enumerate(self.free_nodes)})
        return np.stack([out[n] for n in self.nodes])

    def gradient_step(self, flows, h, g, fixed, injection, closed):
        r"""One Todini-Pilati step: new branch flows and free-node pressures.

        With :math:`G^{-1}` the branches' inverse slopes (a closed one-way branch nearly 0),

        .. math::

            (A_{12}^T G^{-1} A_{12})\,H = q - A_{12}^T\left[Q + G^{-1}(A_{10}H_0 - h)\right],
            \qquad Q' = Q + G^{-1}(A_{12}H + A_{10}H_0 - h)

        solved as one batched dense system per scenario.
        """
        g_inv = 1.0 / g
        largest = np.max(np.where(closed, 0.0, g_inv), axis=0)
        g_inv = np.where(closed, _CLOSED_CONDUCTANCE * largest, g_inv)
        known = self._fixed_drop(fixed) - h
        n = len(self.free_nodes)
        if n == 0:
            return flows + g_inv * known, np.zeros((0, *flows.shape[1:]))
        a = self.a_free
        matrix = np.einsum("bi,bj,b...->...ij", a, a, g_inv)
        rhs = np.moveaxis(injection, 0, -1) - np.einsum("bi,b...->...i", a, flows + g_inv * known)
        pressure = np.linalg.solve(matrix, rhs[..., None])[..., 0]
        pressure = np.moveaxis(pressure, -1, 0)
        new_flows = flows + g_inv * (np.tensordot(a, pressure, axes=(1, 0)) + known)
        return new_flows, pressure
