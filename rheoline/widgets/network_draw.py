"""The drawn diagram of a branched line: nodes, branches, flows, and reversed flow by shape.

:func:`network_figure` draws a :class:`~rheoline.scenario.topology.TopologySpec` with the
solved rows of one case (``RunResult.branches`` and ``RunResult.nodes``): each node a
marker whose symbol says its type (bag a square, source a square with a cross, pump a
diamond, outlet a triangle pointing down, junction a circle) with its name; each branch a
path from its ``from`` node to its ``to`` node (parallel branches bow apart) with an arrow
in the direction the flow actually takes and its flow in words.  A branch whose flow runs
backwards is drawn dashed, its arrow points back toward its ``from`` node and its label
says "REVERSED"; a branch held shut by a check valve is dotted and says "closed".  Colour
only repeats what shape and words say.

Nothing here computes physics: positions are a drawing layout (:func:`node_positions`), and
every number comes from the rows.  Every user string (node and branch names) is escaped.

Examples
--------
>>> from rheoline.scenario.reading import example_path, load_scenarios
>>> from rheoline.scenario.run import run_scenarios
>>> sset = load_scenarios(example_path("ward-y-site"))
>>> run = run_scenarios(sset)
>>> case = run.table["case"].iloc[2]                       # 1500 mL/h, no check valve
>>> fig = network_figure(sset.scenarios[0].topology, run.branches[run.branches["case"] == case],
...                      run.nodes[run.nodes["case"] == case], "ward")
>>> [t.line.dash for t in fig.data if t.name == "gravity set"]
['dash']
>>> any("REVERSED" in a.text for a in fig.layout.annotations)
True
"""

from __future__ import annotations

import numpy as np
import plotly.graph_objects as go

from rheoline.units import per_ml_min
from rheoline.widgets.figures import LOOK
from rheoline.widgets.style import PALETTE, significant, user_text

__all__ = ["NODE_SYMBOLS", "node_positions", "branch_paths", "network_figure", "branch_words"]

#: Marker symbol of each node type (shape carries the type; the legend's words say it).
NODE_SYMBOLS = {
    "bag": "square",
    "source": "square-x",
    "pump": "diamond",
    "outlet": "triangle-down",
    "junction": "circle",
}
#: Line dash of a branch by what its flow does.
_DASH = {"forward": "solid", "reversed": "dash", "closed": "dot"}
_COLOUR = {"forward": PALETTE[0], "reversed": PALETTE[3], "closed": PALETTE[6]}
_UPSTREAM = ("bag", "source", "pump")
_BOW = 0.4  # sideways offset between parallel branches, in layout units
_ROW = 1.4  # vertical distance between the nodes of one column, in layout units
_SAMPLES = 24


def node_positions(topology):
    """``{node name: (x, y)}``: columns by the number of branches from the nearest bag,
    source or pump (following each branch's from -> to), nodes of a column spread in y.

    Examples
    --------
    >>> from rheoline.scenario.topology import BranchSpec, NodeSpec, TopologySpec
    >>> t = TopologySpec([NodeSpec("bag", "bag"), NodeSpec("y", "junction"),
    ...                   NodeSpec("vein", "outlet")],
    ...                  [BranchSpec("a", "bag", "y"), BranchSpec("b", "y", "vein")])
    >>> node_positions(t)
    {'bag': (0.0, 0.0), 'y': (1.0, 0.0), 'vein': (2.0, 0.0)}
    """
    names = [n.name for n in topology.nodes]
    level = {n.name: 0 for n in topology.nodes if n.type in _UPSTREAM}
    frontier = list(level)
    while frontier:
        nxt = []
        for b in topology.branches:
            if b.start in frontier and b.end not in level:
                level[b.end] = level[b.start] + 1
                nxt.append(b.end)
        frontier = nxt
    last = max(level.values(), default=0) + 1
    for n in names:
        level.setdefault(n, last)
    columns = {}
    for n in names:
        columns.setdefault(level[n], []).append(n)
    out = {}
    for x, members in enumerate(sorted(columns)):
        k = len(columns[members])
        for i, n in enumerate(columns[members]):
            out[n] = (float(x), float(((k - 1) / 2.0 - i) * _ROW))
    return {n: out[n] for n in names}


def _sibling_rank(topology):
    """Per branch, its place among the branches joining the same two nodes, centred on 0."""
    pairs = {}
    for b in topology.branches:
        pairs.setdefault(frozenset((b.start, b.end)), []).append(b.name)
    return {
        b.name: pairs[frozenset((b.start, b.end))].index(b.name)
        - (len(pairs[frozenset((b.start, b.end))]) - 1) / 2.0
        for b in topology.branches
    }


def branch_paths(topology, positions):
    """Per branch, ``(xs, ys)`` of its drawn path: a straight line, or a bow when several
    branches join the same two nodes (each bowed to its own side)."""
    ranks = _sibling_rank(topology)
    t = np.linspace(0.0, 1.0, _SAMPLES)
    out = {}
    for b in topology.branches:
        (x0, y0), (x1, y1) = positions[b.start], positions[b.end]
        dx, dy = x1 - x0, y1 - y0
        length = max(np.hypot(dx, dy), 1e-9)
        sign = 1.0 if (b.start, b.end) <= (b.end, b.start) else -1.0  # same side both ways
        nx, ny = -dy / length * sign, dx / length * sign
        bow = 4.0 * t * (1.0 - t) * ranks[b.name] * _BOW
        out[b.name] = (x0 + dx * t + nx * bow, y0 + dy * t + ny * bow)
    return out


def _column_size(positions):
    xs = [x for x, _ in positions.values()]
    return max(xs.count(x) for x in xs)


def _state(row):
    if row["check valve closed"]:
        return "closed"
    return "reversed" if row["reversed"] else "forward"


def _in_unit(row, unit):
    """The branch's flow (its size) in ``unit``, a key of :data:`rheoline.units.FLOW_UNITS`."""
    return significant(abs(float(row["flow [mL/min]"])) * per_ml_min(unit))


def branch_words(row, unit: str = "mL/min") -> str:
    """What a branch does, in words (plain text), from its row of ``RunResult.branches``;
    its flow in ``unit`` (mL/min, mL/h, L/min or mL/s).

    Examples
    --------
    >>> branch_words({"branch": "gravity set", "from": "bag", "to": "y-site", "reversed": True,
    ...               "check valve closed": False, "flow [mL/min]": -6.37})
    'gravity set: REVERSED, 6.37 mL/min flows back from y-site to bag'
    """
    words = {
        "closed": "{b}: closed by its check valve (no flow from {t} to {f})",
        "reversed": "{b}: REVERSED, {q} {u} flows back from {t} to {f}",
        "forward": "{b}: {q} {u} from {f} to {t}",
    }[_state(row)]
    q = _in_unit(row, unit)
    return words.format(b=row["branch"], f=row["from"], t=row["to"], q=q, u=unit)


#: A branch's label on the diagram after its (escaped) name, by what its flow does.
_LABELS = {
    "closed": "closed (check valve)",
    "reversed": "<b>REVERSED</b> {q} {u}",
    "forward": "{q} {u}",
}


def _label(row, unit):
    words = _LABELS[_state(row)].format(q=_in_unit(row, unit), u=unit)
    return f"{user_text(str(row['branch']))}<br>" + words


def network_figure(topology, branches, nodes, title, flow_unit="mL/min") -> go.Figure:
    """The diagram of one case (see the module docstring).

    Parameters
    ----------
    topology : TopologySpec
    branches, nodes : pandas.DataFrame
        The case's rows of ``RunResult.branches`` and ``RunResult.nodes``.
    title : str
        Shown above the diagram (escaped).
    flow_unit : str
        The unit of the branches' flows (a key of :data:`rheoline.units.FLOW_UNITS`).
    """
    positions = node_positions(topology)
    paths = branch_paths(topology, positions)
    ranks = _sibling_rank(topology)
    rows = {r["branch"]: r for r in branches.to_dict("records")}
    traces, notes = [], []
    for b in topology.branches:
        row = rows[b.name]
        state = _state(row)
        xs, ys = paths[b.name]
        traces.append(
            dict(
                type="scatter",
                x=xs,
                y=ys,
                mode="lines",
                name=user_text(b.name),
                line=dict(color=_COLOUR[state], width=3, dash=_DASH[state]),
                hovertext=user_text(branch_words(row, flow_unit)),
                hoverinfo="text",
                showlegend=False,
            )
        )
        head, tail = (0.85, 0.7) if state != "reversed" else (0.15, 0.3)
        if state != "closed":
            k_head, k_tail = int(head * (_SAMPLES - 1)), int(tail * (_SAMPLES - 1))
            notes.append(
                dict(
                    x=xs[k_head],
                    y=ys[k_head],
                    ax=xs[k_tail],
                    ay=ys[k_tail],
                    xref="x",
                    yref="y",
                    axref="x",
                    ayref="y",
                    text="",
                    showarrow=True,
                    arrowhead=2,
                    arrowsize=1.8,
                    arrowwidth=2.5,
                    arrowcolor=_COLOUR[state],
                )
            )
        mid = int(round((0.5 + 0.12 * ranks[b.name]) * (_SAMPLES - 1)))  # siblings staggered
        notes.append(
            dict(
                x=xs[mid],
                y=ys[mid],
                text=_label(row, flow_unit),
                showarrow=False,
                yshift=16,
                font=dict(size=11),
                bgcolor="rgba(255,255,255,0.85)",
            )
        )
    pressure = {r["node"]: r["pressure [mmHg]"] for r in nodes.to_dict("records")}
    xs = [p[0] for p in positions.values()]
    # a name beside its node at the drawing's left and right edges (where no branch label
    # is), below it elsewhere
    edge = {min(xs): "middle left", max(xs): "middle right"}
    for kind, symbol in NODE_SYMBOLS.items():
        members = [n for n in topology.nodes if n.type == kind]
        if not members:
            continue
        traces.append(
            dict(
                type="scatter",
                x=[positions[n.name][0] for n in members],
                y=[positions[n.name][1] for n in members],
                mode="markers+text",
                name=kind,
                text=[user_text(n.name) for n in members],
                textposition=[edge.get(positions[n.name][0], "bottom center") for n in members],
                cliponaxis=False,
                hovertext=[
                    f"{user_text(n.name)} ({kind}): {significant(pressure[n.name])} mmHg"
                    for n in members
                ],
                hoverinfo="text",
                marker=dict(
                    symbol=symbol, size=18, color="white", line=dict(color="#1a1a1a", width=2)
                ),
            )
        )
    # plain dicts: plotly checks them once, in the figure (not once more per object)
    layout = dict(
        title=user_text(str(title)),
        annotations=notes,
        xaxis=dict(visible=False, range=[min(xs) - 0.6, max(xs) + 0.6]),
        yaxis=dict(visible=False, scaleanchor=None),
        template=LOOK,
        height=max(380, 140 + 110 * _ROW * _column_size(positions)),
        margin=dict(l=20, r=20, t=50, b=20),
        legend=dict(orientation="h", y=-0.05, title="node types: "),
    )
    return go.Figure(data=traces, layout=layout)
