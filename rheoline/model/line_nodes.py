"""A line cut into compliant nodes and flow segments, for the time solve.

Nodes sit at the part boundaries of the main line and at each injection port's syringe;
each holds half of the compliance of the parts beside it (:func:`part_law`), the syringe's
own, and a port's line's half.  A boundary that stores nothing or next to nothing
(:data:`QUASI_STATIC`), or whose segment would have no laminar loss (a constant-K fitting
alone has an infinite conductance at rest), joins the segment upstream.  :func:`build_network` returns the
:class:`~rheoline.model.line_dynamics.Network` with its tables of the lines' own
pressure-flow laws, and :func:`steady_flows` / :func:`steady_pressures` the steady state at
given set rates.  Scenario arrays are flattened to one axis (N,) here (:func:`flat`) and
shaped back for results (:func:`shaped`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.compliance import LIQUID_COMPRESSIBILITY, VolumeLaw
from rheoline.model.line import GRAVITY
from rheoline.model.line_dynamics import Network, tabulate

__all__ = [
    "Layout",
    "build_network",
    "steady_flows",
    "steady_pressures",
    "part_law",
    "flat",
    "flat_law",
    "shaped",
    "head_drive",
    "QUASI_STATIC",
]

#: A boundary whose compliance is at most this fraction of the whole line's (the syringes'
#: and every part's) is quasi-static, not a node: typically a junction of rigid parts that
#: stores only the compression of its liquid (1e-17 m^3/Pa beside a syringe's 1e-11).  Its
#: time constant is then sub-microsecond (where the liquid's inertia, not modelled, would
#: govern) and made the time solve stiff beyond use; its pressure instead follows from the
#: flow balance of the parts beside it (they carry one flow: the joined segment's law is the
#: sum of their losses, solved once per step), and its stored volume is held by the node
#: upstream.  Figures move by about that share (tests/test_transient_stiff.py holds them to
#: 2e-4 of a tight solve that keeps the node).
QUASI_STATIC = 1e-4


def part_law(part, compliance):
    """The volume law of one part: its given compliance, else its liquid's compressibility."""
    if compliance is not None:
        length = part.length if compliance.per_length else None
        if compliance.per_length and getattr(part, "kind", "") != "lumen":
            raise InputRangeError(
                f"part {part.name!r} has tubing compliance per metre but is not a lumen; give "
                "it a lumped Compliance(value) [m^3/Pa]",
                field="part_compliance",
                value=compliance,
            )
        return compliance.law(length)
    return VolumeLaw.constant(LIQUID_COMPRESSIBILITY * np.asarray(part.internal_volume, float))


def flat_law(law, shape, n):
    """A :class:`VolumeLaw` with its compliances broadcast to the flat scenario axis (m, N)."""
    c = law.compliances
    c = c.reshape(c.shape[:1] + (1,) * (len(shape) - (c.ndim - 1)) + c.shape[1:])
    c = np.broadcast_to(c, (c.shape[0], *shape)).reshape(c.shape[0], n)
    return VolumeLaw(law.pressures, c.copy())


def flat(value, shape, n):
    """A scenario array broadcast to ``shape`` and flattened to (N,)."""
    return np.broadcast_to(np.asarray(value, dtype=float), shape).reshape(n).copy()


def shaped(values, shape):
    """A flat (N,) array, or one that broadcasts, as an array of the scenario shape."""
    arr = np.asarray(values, dtype=float)
    if arr.ndim == 1 and arr.size == int(np.prod(shape)) and arr.shape != tuple(shape):
        arr = arr.reshape(shape)
    arr = np.broadcast_to(arr, shape).copy()
    return float(arr) if arr.ndim == 0 else arr


def head_drive(fluid, head, shape, n):
    """rho g h [Pa] of a syringe ``head`` [m] above the outlet, flat (N,)."""
    return flat(np.asarray(fluid.density) * GRAVITY * np.asarray(head, dtype=float), shape, n)


@dataclass
class Layout:
    """A built network and how it maps onto the line, its pumps and its ports."""

    net: Network
    node_boundary: list  # main-line boundary of each node (None: a port's syringe)
    seg_parts: list  # main-line part indices of each segment (() for a port's line)
    main_segments: list  # segments along the main line, upstream first
    port_nodes: list  # node of each port's syringe
    port_segments: list  # segment of each port's line (-1: its syringe joins the line)
    boundary_node: dict  # main boundary -> node
    initial_pressures: np.ndarray  # (nn, N) [Pa] at rest
    pump_heads: list  # rho g h [Pa] (N,) of each pump, main first
    models: tuple = ()  # provenance keys of the lines' pressure-flow laws


def _boundary_laws(line, ports, part_compliance, shape, n):
    """Laws of the main line's boundaries 0..n_parts from its parts and the ports' lines."""
    n_parts = len(line.parts)
    zero = VolumeLaw.constant(np.zeros(n))
    laws = [zero for _ in range(n_parts + 1)]
    for i, part in enumerate(line.parts):
        half = flat_law(part_law(part, part_compliance.get(i)), shape, n).scaled(0.5)
        laws[i] = laws[i] + half
        laws[i + 1] = laws[i + 1] + half
    for port in ports:
        if port.line is not None:
            laws[port.boundary] = laws[port.boundary] + _port_line_law(port, shape, n).scaled(0.5)
        elif port.pump.compliance is not None:
            laws[port.boundary] = laws[port.boundary] + flat_law(
                port.pump.compliance.law(), shape, n
            )
    return laws


def _port_line_law(port, shape, n):
    """The whole compliance of a port's own line (given, else its liquid's), flat."""
    parts = port.line.parts
    if port.line_compliance is not None:
        length = sum(np.asarray(p.length, float) for p in parts if p.kind == "lumen")
        law = port.line_compliance.law(length if port.line_compliance.per_length else None)
    else:
        volume = sum(np.asarray(p.internal_volume, float) for p in parts)
        law = VolumeLaw.constant(LIQUID_COMPRESSIBILITY * volume)
    return flat_law(law, shape, n)


def _laminar(part):
    """True for a part whose losses have a term linear in flow (so a finite conductance at rest)."""
    if part.kind == "lumen":
        return True
    if part.kind == "fitting":
        return part.equivalent_length is not None or part.laminar_k is not None
    return bool(getattr(part, "a", 0.0) > 0)


def _main_nodes(line, laws, ports):
    """Main-line nodes and their laws: the inlet, every port's junction, every boundary that
    stores more than :data:`QUASI_STATIC` of the line's compliance in some scenario (lifted to
    that share in the others), except where a segment would have no laminar loss (a constant-K fitting alone
    has an infinite conductance at rest): such boundaries join the segment upstream, and
    what they store goes to the node upstream.
    """
    n_parts = len(line.parts)
    required = {0} | {p.boundary for p in ports if p.boundary < n_parts}
    laminar = [_laminar(p) for p in line.parts]
    total = sum(law.compliance(0.0) for law in laws)
    nodes = [0]
    laws = list(laws)
    floor = QUASI_STATIC * total
    for b in range(1, n_parts + 1):
        must = b == n_parts or b in required
        stored = laws[b].compliance(0.0)
        if not (must or np.any(stored > floor)):
            continue  # negligible in every scenario: quasi-static
        if not must and np.any(stored < floor):
            # negligible in some scenarios only (a sweep from rigid to compliant tubing):
            # kept as a node in all, its compliance lifted to the floor where it is below,
            # so a scenario's figures never depend on the others' (the lift, at most
            # QUASI_STATIC of the line's storage, keeps the node from being stiff)
            laws[b] = laws[b] + VolumeLaw.constant(np.maximum(floor - stored, 0.0))
        if not must and not any(laminar[nodes[-1] : b]):
            continue  # joins the segment that follows
        while not any(laminar[nodes[-1] : b]):
            if nodes[-1] in required:
                raise InputRangeError(
                    f"parts {nodes[-1]} to {b - 1} have no laminar loss (constant-K fittings "
                    "only), so their flow at rest is undefined; give a fitting Fitting.hooper, "
                    "an equivalent_length, or include a lumen",
                    field=f"part[{nodes[-1]}]",
                    value=line.part_names[nodes[-1]],
                )
            nodes.pop()
        if b < n_parts:
            nodes.append(b)
    merged = []
    for j, node in enumerate(nodes):
        stop = nodes[j + 1] if j + 1 < len(nodes) else n_parts
        law = laws[node]
        for b in range(node + 1, stop):
            law = law + laws[b]
        if not np.all(law.compliance(0.0) > 0):
            raise InputRangeError(
                f"boundary {node} holds no volume in some scenarios, but a port joins or the "
                "syringe sits there; give the parts beside it an internal_volume [m^3], or the "
                "pump a Compliance",
                field="part_compliance" if node else "pump.compliance",
                value=node,
            )
        merged.append(law)
    return nodes, merged


def build_network(line, fluid, pump, ports, part_compliance, back_pressure, shape, n, q_range):
    """The :class:`Layout` of a line with its pump, ports and compliances (flat scenarios)."""
    n_parts = len(line.parts)
    laws_b = _boundary_laws(line, ports, part_compliance, shape, n)
    if pump.compliance is not None:
        laws_b[0] = laws_b[0] + flat_law(pump.compliance.law(), shape, n)
    nodes_b, laws = _main_nodes(line, laws_b, ports)
    p_back = flat(back_pressure, shape, n)
    labels = ["syringe" if b == 0 else f"boundary {b}" for b in nodes_b]
    boundary_node = {b: j for j, b in enumerate(nodes_b)}
    ends = nodes_b[1:] + [n_parts]
    seg_parts = [tuple(range(a, b)) for a, b in zip(nodes_b, ends, strict=True)]
    seg_up = list(range(len(nodes_b)))
    seg_down = list(range(1, len(nodes_b))) + [-1]
    heads = [head_drive(fluid, pump.head, shape, n)]
    gravity = [heads[0]] + [np.zeros(n)] * (len(seg_parts) - 1)
    init = [p_back - heads[0]] + [p_back] * (len(nodes_b) - 1)
    tables, models = tabulate(line, fluid, seg_parts, len(seg_parts) - 1, *q_range, n, shape)
    port_nodes, port_segments = [], []
    for port in ports:
        junction = boundary_node.get(port.boundary, -1)
        head = head_drive(fluid, port.pump.head, shape, n)
        heads.append(head)
        if port.line is None:
            if port.boundary >= n_parts:
                raise InputRangeError(
                    "a port at the outlet needs its own line (the tubing from its syringe)",
                    field="ports.line",
                    value=None,
                )
            port_nodes.append(junction)
            port_segments.append(-1)
            continue
        law = _port_line_law(port, shape, n).scaled(0.5)
        if port.pump.compliance is not None:
            law = law + flat_law(port.pump.compliance.law(), shape, n)
        laws.append(law)
        labels.append(f"{port.name} syringe")
        init.append(p_back - head)
        port_nodes.append(len(laws) - 1)
        port_segments.append(len(seg_parts))
        seg_parts.append(())
        seg_up.append(len(laws) - 1)
        seg_down.append(junction)
        gravity.append(head)
        port_tables, port_models = tabulate(
            port.line, fluid, [tuple(range(len(port.line)))], 0, *q_range, n, shape
        )
        tables += port_tables
        models += tuple(k for k in port_models if k not in models)
    net = Network(
        n=n,
        laws=laws,
        labels=labels,
        seg_up=np.array(seg_up),
        seg_down=np.array(seg_down),
        tables=tables,
        gravity=gravity,
        back_pressure=p_back,
        pumps=[],
        seg_labels=[f"parts {p[0]}-{p[-1]}" if p else "port line" for p in seg_parts],
    )
    return Layout(
        net=net,
        node_boundary=nodes_b + [None] * (len(laws) - len(nodes_b)),
        seg_parts=seg_parts,
        main_segments=list(range(len(nodes_b))),
        port_nodes=port_nodes,
        port_segments=port_segments,
        boundary_node=boundary_node,
        initial_pressures=np.stack(init),
        pump_heads=heads,
        models=models,
    )


def steady_flows(layout, ports, main_rate, port_rates):
    """Segment flows (ns, N) [m^3/s] at steady set rates (every port adds downstream)."""
    net = layout.net
    q = np.zeros((net.ns, net.n))
    for s in layout.main_segments:
        start = layout.node_boundary[net.seg_up[s]]
        q[s] = main_rate + sum(
            r for port, r in zip(ports, port_rates, strict=True) if port.boundary <= start
        )
    for s, r in zip(layout.port_segments, port_rates, strict=True):
        if s >= 0:
            q[s] = r
    return q


def steady_pressures(layout, flows):
    """Node pressures (nn, N) [Pa] at steady segment ``flows``, from the outlet upward."""
    net = layout.net
    p = np.zeros((net.nn, net.n))
    order = list(reversed(layout.main_segments)) + [s for s in layout.port_segments if s >= 0]
    for s in order:
        down = net.seg_down[s]
        p_down = net.back_pressure if down < 0 else p[down]
        p[net.seg_up[s]] = p_down + net.tables[s].drop(flows[s]) - net.gravity[s]
    return p
