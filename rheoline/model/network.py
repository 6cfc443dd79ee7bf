r"""Vessel networks: segments joined at nodes, solved by Kirchhoff's laws.

Each segment k runs from an upstream node to a downstream node with a
resistance R_k [Pa s/m^3] (Hagen-Poiseuille with its own apparent viscosity,
see :class:`~rheoline.model.vessels.Vessel`).  Boundary nodes carry a pressure
[Pa] or an inflow [m^3/s] from outside; every other node conserves mass.  With
the incidence matrix A (A[k, up] = +1, A[k, down] = -1) and G = diag(1/R_k),

.. math::

    q = G A p, \qquad A^T q = s \quad\Longrightarrow\quad (A^T G A)\, p = s,

a sparse weighted graph Laplacian.  Nodes with a known pressure move to the
right-hand side and the rest are solved with :func:`scipy.sparse.linalg.spsolve`.
Series, parallel and general graphs (loops, several inlets and outlets) are all
the same solve.

A segment's *share of the resistance* is its share of the viscous power
dissipated, q_k^2 R_k / sum(q^2 R): for segments in series it is R_k / sum(R),
for equal segments in parallel it is equal, and it sums to 1 over the network.

Each segment's hematocrit is an input: red-cell phase separation at
bifurcations (which sets hematocrits in real microvascular networks) is not
modelled, and flows are steady.

References
----------
Kirchhoff, G., "Ueber die Aufloesung der Gleichungen, auf welche man bei der
Untersuchung der linearen Vertheilung galvanischer Stroeme gefuehrt wird",
Ann. Phys. Chem. 72 (1847) 497-508.
Pries, A.R., Secomb, T.W., Gaehtgens, P., Gross, J.F., "Blood flow in
microvascular networks: experiments and simulation", Circ. Res. 67 (1990)
826-834 (the network approach for microcirculation).
"""

from __future__ import annotations

import warnings
from collections.abc import Hashable, Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np
import scipy.sparse as sp
from scipy.sparse.csgraph import connected_components
from scipy.sparse.linalg import MatrixRankWarning, spsolve

from rheoline.errors import InputRangeError, NetworkError
from rheoline.model.validation import check_finite, check_positive, scalar_or_array
from rheoline.model.vessels import Vessel

__all__ = [
    "series_resistance",
    "parallel_resistance",
    "VesselNetwork",
    "NetworkSolution",
]


def series_resistance(*resistances):
    """Resistance [Pa s/m^3] of segments in series: the sum.

    Examples
    --------
    >>> series_resistance(1.0, 2.0, 3.0)
    6.0
    """
    rs = [check_positive(f"resistances[{i}]", r) for i, r in enumerate(resistances)]
    if not rs:
        raise InputRangeError("series_resistance needs at least one resistance")
    return scalar_or_array(np.sum(np.broadcast_arrays(*rs), axis=0))


def parallel_resistance(*resistances):
    """Resistance [Pa s/m^3] of segments in parallel: 1 / sum(1 / R).

    Examples
    --------
    >>> parallel_resistance(2.0, 2.0)
    1.0
    """
    rs = [check_positive(f"resistances[{i}]", r) for i, r in enumerate(resistances)]
    if not rs:
        raise InputRangeError("parallel_resistance needs at least one resistance")
    return scalar_or_array(1.0 / np.sum(1.0 / np.stack(np.broadcast_arrays(*rs)), axis=0))


def _names_preview(items, most=8):
    items = list(items)
    text = ", ".join(repr(x) for x in items[:most])
    return text + (f", ... ({len(items)} in all)" if len(items) > most else "")


@dataclass(frozen=True)
class NetworkSolution:
    """Node pressures and segment flows of a solved :class:`VesselNetwork`.

    Attributes
    ----------
    nodes : tuple
        Node labels, in the order of ``node_pressure``.
    node_pressure : ndarray
        Pressure at each node [Pa].
    segment_names : tuple of str
    segment_flow : ndarray
        Flow in each segment [m^3/s], positive from its upstream to its downstream node.
    pressure_drop : ndarray
        Upstream minus downstream pressure of each segment [Pa].
    resistance : ndarray
        Each segment's resistance [Pa s/m^3].
    resistance_share : ndarray
        Each segment's share of the viscous power dissipated [-] (sums to 1).
    boundary_inflow : dict
        Flow entering the network from outside at each boundary node [m^3/s]
        (negative where it leaves).
    """

    nodes: tuple
    node_pressure: np.ndarray
    segment_names: tuple
    segment_flow: np.ndarray
    pressure_drop: np.ndarray
    resistance: np.ndarray
    resistance_share: np.ndarray
    boundary_inflow: dict = field(default_factory=dict)

    @property
    def models_used(self) -> tuple:
        """Provenance keys of the solve: Kirchhoff's laws on the segment resistances."""
        return ("kirchhoff-1847",)

    def pressure(self, node) -> float:
        """Pressure [Pa] at ``node``."""
        try:
            return float(self.node_pressure[self.nodes.index(node)])
        except ValueError:
            raise NetworkError(
                f"unknown node {node!r}; the network's nodes are {_names_preview(self.nodes)}"
            ) from None

    def flow(self, segment: str) -> float:
        """Flow [m^3/s] in the segment named ``segment``."""
        try:
            return float(self.segment_flow[self.segment_names.index(segment)])
        except ValueError:
            raise NetworkError(
                f"unknown segment {segment!r}; the segments are "
                f"{_names_preview(self.segment_names)}"
            ) from None

    @property
    def total_inflow(self) -> float:
        """Sum of the flows entering from outside [m^3/s]."""
        return float(sum(q for q in self.boundary_inflow.values() if q > 0))

    def to_frame(self):
        """Segment table with units in the column names (imports pandas here)."""
        import pandas as pd

        return pd.DataFrame(
            {
                "segment": self.segment_names,
                "flow [m^3/s]": self.segment_flow,
                "pressure drop [Pa]": self.pressure_drop,
                "resistance [Pa s/m^3]": self.resistance,
                "share of resistance [-]": self.resistance_share,
            }
        )


@dataclass(frozen=True)
class VesselNetwork:
    """Segments joined at nodes, with pressures or inflows at boundary nodes.

    Parameters
    ----------
    upstream, downstream : sequence of hashable
        The two end nodes of each segment (any labels: str, int, ...).  Flow is
        reported positive from ``upstream`` to ``downstream``.
    resistance : array_like
        Each segment's resistance [Pa s/m^3], > 0.
    pressures : mapping node -> float
        Known node pressures [Pa]; at least one is needed.
    inflows : mapping node -> float
        Flow entering from outside at a node [m^3/s] (negative: leaving).
    names : sequence of str, optional
        Segment names; default ``"s0"``, ``"s1"``, ...

    Build one from vessels with :meth:`from_vessels` or from arrays of radius,
    length and hematocrit with :meth:`from_arrays`.

    Examples
    --------
    Two equal segments in parallel between nodes "a" and "b":

    >>> net = VesselNetwork(["a", "a"], ["b", "b"], [2.0e9, 2.0e9], pressures={"a": 100.0, "b": 0.0})
    >>> sol = net.solve()
    >>> sol.total_inflow, net.equivalent_resistance("a", "b")
    (1e-07, 1000000000.0)
    """

    upstream: Sequence[Hashable]
    downstream: Sequence[Hashable]
    resistance: np.ndarray
    pressures: Mapping = field(default_factory=dict)
    inflows: Mapping = field(default_factory=dict)
    names: Sequence[str] | None = None

    def __post_init__(self):
        up, down = tuple(self.upstream), tuple(self.downstream)
        for node in (*up, *down):
            try:
                hash(node)
            except TypeError:
                raise NetworkError(
                    f"node {node!r} cannot be a node label ({type(node).__name__} is mutable); "
                    "use a str, int or tuple, e.g. 'artery'"
                ) from None
        res = np.atleast_1d(check_positive("resistance", self.resistance, "Pa s/m^3"))
        if res.ndim != 1 or not (len(up) == len(down) == res.size):
            raise InputRangeError(
                f"upstream, downstream and resistance must have one entry per segment; got "
                f"{len(up)}, {len(down)} and {res.size}"
            )
        if res.size == 0:
            raise NetworkError("the network has no segments; add at least one")
        names = (
            tuple(f"s{i}" for i in range(res.size))
            if self.names is None
            else tuple(str(n) for n in self.names)
        )
        if len(names) != res.size:
            raise InputRangeError(f"names must have {res.size} entries, got {len(names)}")
        if len(set(names)) != len(names):
            dup = sorted({n for n in names if names.count(n) > 1})
            raise NetworkError(f"segment names must be unique; repeated: {_names_preview(dup)}")
        loops = [n for n, a, b in zip(names, up, down, strict=True) if a == b]
        if loops:
            raise NetworkError(
                f"segment {loops[0]!r} joins node {up[names.index(loops[0])]!r} to itself; "
                "a segment needs two different end nodes"
            )
        set_ = object.__setattr__
        set_(self, "upstream", up)
        set_(self, "downstream", down)
        set_(self, "resistance", res)
        set_(self, "names", names)
        set_(
            self,
            "pressures",
            {
                k: float(check_finite(f"pressures[{k!r}]", v))
                for k, v in dict(self.pressures).items()
            },
        )
        set_(
            self,
            "inflows",
            {k: float(check_finite(f"inflows[{k!r}]", v)) for k, v in dict(self.inflows).items()},
        )
        known = set(self.nodes)
        for kind, mapping in (("pressures", self.pressures), ("inflows", self.inflows)):
            unknown = [k for k in mapping if k not in known]
            if unknown:
                raise NetworkError(
                    f"{kind} name unknown node(s) {_names_preview(unknown)}; the network's "
                    f"nodes are {_names_preview(self.nodes)}"
                )
        both = [k for k in self.pressures if k in self.inflows]
        if both:
            raise NetworkError(
                f"node(s) {_names_preview(both)} have both a pressure and an inflow; "
                "give each boundary node one or the other"
            )

    # --- constructors --------------------------------------------------------------------------
    @classmethod
    def from_vessels(cls, segments, pressures=None, inflows=None):
        """Build from ``(name, upstream, downstream, vessel_or_resistance)`` tuples.

        Each element may be a :class:`~rheoline.model.vessels.Vessel` (its own
        radius, length, hematocrit, temperature and viscosity law) or a
        resistance [Pa s/m^3].
        """
        names, up, down, res = [], [], [], []
        for item in segments:
            try:
                name, a, b, part = item
            except (TypeError, ValueError):
                raise InputRangeError(
                    f"each segment must be (name, upstream, downstream, vessel or resistance), "
                    f"got {item!r}"
                ) from None
            r = part.resistance if isinstance(part, Vessel) else part
            if np.ndim(r) != 0:
                raise InputRangeError(
                    f"segment {name!r} must have one resistance, got shape {np.shape(r)}; "
                    "use one Vessel per segment"
                )
            names.append(name)
            up.append(a)
            down.append(b)
            res.append(float(check_positive(f"resistance of segment {name!r}", r, "Pa s/m^3")))
        return cls(up, down, np.array(res), pressures or {}, inflows or {}, names)

    @classmethod
    def from_arrays(
        cls,
        upstream,
        downstream,
        radius,
        length,
        hematocrit=0.45,
        temperature_c=37.0,
        viscosity_law="pries-1992",
        pressures=None,
        inflows=None,
        names=None,
    ):
        """Build from per-segment arrays; each segment's viscosity uses its own diameter
        and hematocrit (one vectorized :class:`~rheoline.model.vessels.Vessel`).

        Parameters
        ----------
        upstream, downstream : sequence of hashable
            End nodes of each segment.
        radius, length : array_like
            [m], one per segment (or broadcastable).
        hematocrit, temperature_c : array_like
            [-] and [degC], per segment or one for all.
        viscosity_law : str
            See :data:`~rheoline.model.vessels.VISCOSITY_LAWS`.
        """
        n = len(upstream)
        vessel = Vessel(
            radius=radius,
            length=length,
            hematocrit=hematocrit,
            temperature_c=temperature_c,
            viscosity_law=viscosity_law,
        )
        res = np.asarray(vessel.resistance, dtype=float)
        if res.ndim > 1 or res.size not in (1, n):
            raise InputRangeError(
                f"radius, length, hematocrit and temperature_c must give one value per "
                f"segment ({n}), got shape {res.shape}"
            )
        res = np.broadcast_to(res, (n,))
        return cls(upstream, downstream, np.array(res), pressures or {}, inflows or {}, names)

    # --- structure ------------------------------------------------------------------------------
    @property
    def nodes(self) -> tuple:
        """Node labels in order of first appearance."""
        seen = {}
        for a, b in zip(self.upstream, self.downstream, strict=True):
            seen.setdefault(a, None)
            seen.setdefault(b, None)
        return tuple(seen)

    def _incidence(self):
        nodes = self.nodes
        index = {n: i for i, n in enumerate(nodes)}
        m = len(self.upstream)
        rows = np.repeat(np.arange(m), 2)
        cols = np.array(
            [[index[a], index[b]] for a, b in zip(self.upstream, self.downstream, strict=True)]
        ).ravel()
        vals = np.tile([1.0, -1.0], m)
        return nodes, index, sp.csr_matrix((vals, (rows, cols)), shape=(m, len(nodes)))

    def _check_connected(self, nodes, incidence):
        adjacency = incidence.T @ incidence
        n_parts, labels = connected_components(adjacency, directed=False)
        if n_parts > 1:
            main = labels[0]
            apart = [nodes[i] for i in np.flatnonzero(labels != main)]
            raise NetworkError(
                f"the network is disconnected: {n_parts} separate parts; node(s) "
                f"{_names_preview(apart)} are not joined to node {nodes[0]!r}. Join the parts "
                "with a segment or solve each part as its own network"
            )

    # --- solving --------------------------------------------------------------------------------
    def solve(self) -> NetworkSolution:
        """Node pressures and segment flows by Kirchhoff's laws (sparse solve).

        Raises
        ------
        NetworkError
            If the network is disconnected, has no node with a known pressure
            (the pressure level is then undetermined: singular), or the sparse
            system is singular or gives non-finite pressures.
        """
        nodes, index, a = self._incidence()
        self._check_connected(nodes, a)
        if not self.pressures:
            raise NetworkError(
                "the network is singular: no node has a known pressure, so the pressures are "
                "fixed only up to a constant; give at least one boundary node a pressure"
            )
        g = sp.diags(1.0 / self.resistance)
        lap = (a.T @ g @ a).tocsr()
        n = len(nodes)
        known = np.array([index[k] for k in self.pressures], dtype=int)
        p = np.zeros(n)
        p[known] = list(self.pressures.values())
        source = np.zeros(n)
        for k, q in self.inflows.items():
            source[index[k]] = q
        free = np.setdiff1d(np.arange(n), known)
        if free.size:
            lap_ff = lap[free][:, free].tocsc()
            rhs = source[free] - lap[free][:, known] @ p[known]
            with warnings.catch_warnings():
                warnings.simplefilter("error", MatrixRankWarning)
                try:
                    p_free = np.atleast_1d(spsolve(lap_ff, rhs))
                except (MatrixRankWarning, RuntimeError) as exc:
                    raise NetworkError(
                        f"the network's equations are singular ({exc}); check for segments "
                        "with extreme resistances or nodes only reached through them"
                    ) from None
            if not np.all(np.isfinite(p_free)):
                raise NetworkError(
                    "the network's equations gave non-finite pressures (singular system); "
                    "check the resistances and boundary conditions"
                )
            p[free] = p_free
        dp = a @ p
        q = dp / self.resistance
        balance = a.T @ q  # net flow out of each node through segments = inflow from outside
        boundary = {nodes[i]: float(balance[i]) for i in known}
        boundary.update({k: v for k, v in self.inflows.items()})
        power = q * dp
        total = power.sum()
        share = power / total if total > 0 else np.zeros_like(power)
        return NetworkSolution(
            nodes=nodes,
            node_pressure=p,
            segment_names=tuple(self.names),
            segment_flow=q,
            pressure_drop=dp,
            resistance=self.resistance.copy(),
            resistance_share=share,
            boundary_inflow=boundary,
        )

    def equivalent_resistance(self, inlet, outlet) -> float:
        """Resistance [Pa s/m^3] between two nodes, all other nodes internal.

        The network's own boundary conditions are set aside: ``inlet`` is held at
        1 Pa, ``outlet`` at 0 Pa, and the result is 1 / (flow entering at inlet).
        """
        if inlet == outlet:
            raise NetworkError(f"inlet and outlet must differ, both are {inlet!r}")
        probe = VesselNetwork(
            self.upstream,
            self.downstream,
            self.resistance,
            pressures={inlet: 1.0, outlet: 0.0},
            names=self.names,
        )
        return 1.0 / probe.solve().boundary_inflow[inlet]
