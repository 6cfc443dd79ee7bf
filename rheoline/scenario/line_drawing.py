"""A drawing of a line to scale: each part's length along one axis and its bore across the
other, labelled with its name and its share of the pressure drop.

The line view draws it beside its results and the review pack's report draws it for each
scenario's first case, from the same function (:func:`line_drawing`).  Nothing here
computes physics: the shares are the solved pressure drops the caller passes.

The dominant part (the largest pressure drop) is marked by a cross-hatched fill, a star and
the word "dominant", never by colour alone.  Parts with no length of their own (a fitting,
a measured part, the exit) are drawn as a tick at their place along the line.

Examples
--------
>>> fig = line_drawing(["set", "18G catheter", "exit"], [3.0, 1.0, None], [1.8, 0.045, None],
...                    [11.1, 46.4, 16.4])
>>> fig.layout.xaxis.title.text, fig.layout.yaxis.title.text
('distance from the source [cm]', 'bore [mm] (centreline at 0)')
>>> [a.text for a in fig.layout.annotations]
['set: 15.0 %', '<b>18G catheter: 62.8 % (dominant)</b>', 'exit: 22.2 %']
"""

from __future__ import annotations

import math

__all__ = ["DRAWING_TITLE", "line_drawing", "shares_percent"]

#: The drawing's title.
DRAWING_TITLE = "The line to scale: length along, bore across"
_FILL = "#9fc3e6"  # a part's fill
_EDGE = "#1f2f4a"  # outlines and ticks
_DOMINANT_FILL = "#f2b45a"
# Labels are placed for the narrowest drawing the app and the report show (the plot area in
# a 1024 px window); on a wider drawing every label is narrower about its anchor, so what
# cleared at this width clears at any larger one.  Text widths are estimated generously.
_NARROWEST_PX = 340.0
_CHAR_PX, _BOLD_CHAR_PX, _BOX_PX = 6.6, 7.2, 10.0
_CLEAR_PX = 6.0  # the least gap between two labels in a row
_ROW_PX = 22.0
_PLOT_PX = 156.0  # the drawing's own height, between the labels and the axis
_SIDES = ("center", "right", "left")  # plotly's xanchor: where the box sits on its leader


def shares_percent(drops) -> list[float]:
    """Each drop's share of their sum [%] (zeros when the sum is not positive).

    >>> shares_percent([1.0, 3.0])
    [25.0, 75.0]
    """
    values = [max(float(d), 0.0) if math.isfinite(float(d)) else 0.0 for d in drops]
    total = sum(values)
    return [100.0 * v / total if total > 0 else 0.0 for v in values]


def _three_figures(value: float) -> str:
    if value == 0 or not math.isfinite(value):
        return "0" if value == 0 else "n/a"
    place = 2 - math.floor(math.log10(abs(value)))
    return f"{round(value, place):,.{max(place, 0)}f}"


def line_drawing(names, bores_mm, lengths_m, drops_mmhg, title: str = DRAWING_TITLE):
    """The line drawn to scale (a plotly figure).

    Parameters
    ----------
    names : sequence of str
        Each part's name, source to outlet (the exit last, if any), already escaped for a
        chart by the caller (plotly reads tags in annotations and hover labels).
    bores_mm : sequence of float or None
        Each part's inner diameter [mm]; None or NaN for a part without a bore of its own.
    lengths_m : sequence of float or None
        Each part's length [m]; None, NaN or 0 for a part without a length of its own.
    drops_mmhg : sequence of float
        Each part's pressure drop [mmHg] at the operating point drawn.
    title : str, optional
        The figure's title.

    Returns
    -------
    plotly.graph_objects.Figure
        Lengths in cm along x, bores in mm across y (the centreline at 0), one filled
        outline per part with a length, a tick for each part without one; an annotation
        per part "name: share %", the dominant part's bold with "(dominant)", its fill
        cross-hatched and a star above it.
    """
    import plotly.graph_objects as go

    shares = shares_percent(drops_mmhg)
    dominant = max(range(len(shares)), key=shares.__getitem__) if shares else -1
    widest = max((_number(b) for b in bores_mm), default=0.0) or 1.0
    position, traces, annotations = 0.0, [], []
    for i, name in enumerate(names):
        length_cm = 100.0 * _number(lengths_m[i])
        bore = _number(bores_mm[i])
        start, end = position, position + length_cm
        dom = i == dominant
        if length_cm > 0 and bore > 0:
            traces.append(_outline(start, end, bore, dom, name))
            middle = 0.5 * (start + end)
        else:
            traces.append(_tick(start, widest, dom, name))
            middle = start
        if dom:
            traces.append(_star(middle, widest))
        label = f"{name}: {_three_figures(shares[i])} %"
        if dom:
            label = f"<b>{label} (dominant)</b>"
        annotations.append(
            dict(
                x=middle,
                y=0.5 * widest,
                ax=0,
                text=label,
                showarrow=True,
                arrowhead=0,
                arrowcolor=_EDGE,
                font=dict(size=12, color=_EDGE),
                bgcolor="rgba(255,255,255,0.85)",
            )
        )
        position = end
    span = position * 1.04 or 1.0
    places = _label_places(
        [a["x"] / span for a in annotations],
        [_text_px(a["text"]) / _NARROWEST_PX for a in annotations],
    )
    for annotation, (row, side) in zip(annotations, places, strict=True):
        annotation.update(ay=-(34 + _ROW_PX * row), xanchor=side)
    rows = 1 + max((row for row, _ in places), default=0)
    axis = dict(showline=True, linecolor=_EDGE, ticks="outside", showgrid=False, zeroline=False)
    layout = dict(
        # the title at the top of the figure, above every row of labels
        title=dict(text=title, y=1.0, yref="container", yanchor="top", pad=dict(t=12)),
        template="none",  # an empty template: a drawing is made at every update, keep it cheap
        plot_bgcolor="white",
        paper_bgcolor="white",
        font=dict(family="sans-serif", size=12, color="#2b2b2b"),
        showlegend=False,
        # the plot keeps its height (156 px) whatever the rows of labels above it take
        height=_PLOT_PX + 100 + _ROW_PX * max(rows, 2),
        margin=dict(l=60, r=30, t=50 + _ROW_PX * max(rows, 2), b=50),
        annotations=annotations,
        xaxis=dict(axis, title=dict(text="distance from the source [cm]"), range=[0.0, span]),
        yaxis=dict(
            axis,
            title=dict(text="bore [mm] (centreline at 0)"),
            range=[-0.75 * widest, 0.95 * widest],
            zeroline=True,
            zerolinecolor="#bbbbbb",
        ),
    )
    return go.Figure(data=traces, layout=layout)


def _number(value) -> float:
    """A finite float, or 0 for None and NaN."""
    if value is None:
        return 0.0
    number = float(value)
    return number if math.isfinite(number) else 0.0


def _outline(start, end, bore, dominant, name):
    half = 0.5 * bore
    return dict(
        type="scatter",
        x=[start, end, end, start, start],
        y=[-half, -half, half, half, -half],
        mode="lines",
        fill="toself",
        fillcolor=_DOMINANT_FILL if dominant else _FILL,
        fillpattern=dict(shape="x", fgcolor=_EDGE, size=8) if dominant else {},
        line=dict(color=_EDGE, width=1.5),
        name=str(name),
        hoverinfo="name",
    )


def _tick(at, widest, dominant, name):
    return dict(
        type="scatter",
        x=[at, at],
        y=[-0.5 * widest, 0.5 * widest],
        mode="lines+markers",
        line=dict(color=_EDGE, width=4 if dominant else 2, dash="solid" if dominant else "dot"),
        marker=dict(symbol="line-ew", size=12, line=dict(color=_EDGE, width=2)),
        name=str(name),
        hoverinfo="name",
    )


def _star(x, widest):
    return dict(
        type="scatter",
        x=[x],
        y=[0.62 * widest],
        mode="markers",
        marker=dict(
            symbol="star", size=16, color=_DOMINANT_FILL, line=dict(color=_EDGE, width=1.5)
        ),
        name="dominant part",
        hoverinfo="name",
    )


def _text_px(text: str) -> float:
    """A generous estimate of a label's width [px] at 12 px (tags are not shown)."""
    bold = text.startswith("<b>")
    shown = text.replace("<b>", "").replace("</b>", "")
    return len(shown) * (_BOLD_CHAR_PX if bold else _CHAR_PX) + _BOX_PX


def _label_places(anchors, widths) -> list[tuple[int, str]]:
    """Each label's row (0 nearest the drawing) and side, so that no two labels in a row
    overlap and no leader passes through a label.

    Parameters
    ----------
    anchors : sequence of float
        Each label's leader position, as a fraction of the plot's width.
    widths : sequence of float
        Each label's width, as a fraction of the plot's width.

    Returns
    -------
    list of (int, str)
        Row and side (plotly's ``xanchor``) per label.

    Notes
    -----
    A leader rises from its part to its label, so it crosses a label exactly when its anchor
    is inside that label's box and its own label is on a higher row.  Each label takes the
    first side whose box is inside the plot and holds no other anchor (centred, then
    hanging left of its leader, then right of it); failing that, a side inside the plot,
    hanging left first.  A box then sits on a higher row than every label whose anchor it
    holds, and as low as it fits.  A box hanging left holds only anchors to its left, one
    hanging right only anchors to its right, so this ordering fails only where a left-hanging and
    a right-hanging box hold each other's anchors (labels wider than half the plot at both
    ends); the later label is then placed regardless.

    Examples
    --------
    >>> _label_places([0.45, 0.92, 0.925], [0.45, 0.7, 0.3])
    [(0, 'center'), (1, 'right'), (2, 'right')]
    """
    n = len(anchors)
    sides = _sides(anchors, widths)
    boxes = [_box(a, w, side) for a, w, side in zip(anchors, widths, sides, strict=True)]
    holds = [{j for j in range(n) if j != i and _inside(anchors[j], boxes[i])} for i in range(n)]
    rows: list = [None] * n
    pending = sorted(range(n), key=lambda i: anchors[i])
    while pending:
        ready = [i for i in pending if all(rows[j] is not None for j in holds[i])]
        i = (ready or pending)[0]  # no label ready: two boxes hold each other's anchors
        pending.remove(i)
        row = 1 + max((rows[j] for j in holds[i] if rows[j] is not None), default=-1)
        while any(rows[k] == row and _overlap(boxes[i], boxes[k]) for k in range(n)):
            row += 1
        rows[i] = row
    return list(zip(rows, sides, strict=True))


def _box(anchor, width, side):
    """A label's left and right edge (fractions of the plot's width)."""
    left = {"center": anchor - 0.5 * width, "right": anchor - width, "left": anchor}[side]
    return left, left + width


def _sides(anchors, widths) -> list[str]:
    """Each label's side: the first of centred, hanging left, hanging right whose box is
    inside the plot and holds no other anchor; else, labels left of a cut hang right and the
    rest hang left, the cut chosen so that the fewest pairs of boxes hold each other's
    anchors."""
    anchors = list(anchors)
    order = sorted(range(len(anchors)), key=lambda i: anchors[i])
    best = None
    for cut in range(len(order) + 1):
        first = {i: ("left", "right") for i in order[:cut]} | {
            i: ("right", "left") for i in order[cut:]
        }
        sides = [
            _side(a, w, anchors[:i] + anchors[i + 1 :], first[i])
            for i, (a, w) in enumerate(zip(anchors, widths, strict=True))
        ]
        boxes = [_box(a, w, s) for a, w, s in zip(anchors, widths, sides, strict=True)]
        mutual = sum(
            _inside(anchors[j], boxes[i]) and _inside(anchors[i], boxes[j])
            for i in range(len(boxes))
            for j in range(i)
        )
        if best is None or mutual < best[0]:
            best = (mutual, sides)
    return best[1] if best else []


def _side(anchor, width, others, fallback):
    """A label's side; ``others`` the other labels' anchors (a part drawn at the same
    place as this one included: its leader must not cross this box either)."""
    inside_plot = [s for s in _SIDES if _box(anchor, width, s)[0] >= -0.01]
    inside_plot = [s for s in inside_plot if _box(anchor, width, s)[1] <= 1.05]
    for side in inside_plot:
        box = _box(anchor, width, side)
        if not any(_inside(a, box) for a in others):
            return side
    for side in (*fallback, "center"):
        if side in inside_plot:
            return side
    return "left" if anchor < 0.5 else "right"  # wider than the plot: clip the far end


def _inside(anchor, box) -> bool:
    edge = 1.0 / _NARROWEST_PX  # a leader along a box's edge (1 px) does not cross it
    return box[0] + edge < anchor < box[1] - edge


def _overlap(a, b) -> bool:
    gap = _CLEAR_PX / _NARROWEST_PX
    return min(a[1], b[1]) - max(a[0], b[0]) > -gap
