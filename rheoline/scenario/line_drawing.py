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
_LABEL_ROWS = 3  # labels of neighbouring parts are staggered over this many rows


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
        row = i % _LABEL_ROWS
        annotations.append(
            dict(
                x=middle,
                y=0.5 * widest,
                ax=0,
                ay=-(34 + 22 * row),
                text=label,
                showarrow=True,
                arrowhead=0,
                arrowcolor=_EDGE,
                font=dict(size=12, color=_EDGE),
                bgcolor="rgba(255,255,255,0.85)",
            )
        )
        position = end
    axis = dict(showline=True, linecolor=_EDGE, ticks="outside", showgrid=False, zeroline=False)
    layout = dict(
        title=dict(text=title),
        template="none",  # an empty template: a drawing is made at every update, keep it cheap
        plot_bgcolor="white",
        paper_bgcolor="white",
        font=dict(family="sans-serif", size=12, color="#2b2b2b"),
        showlegend=False,
        height=300,
        margin=dict(l=60, r=30, t=50 + 22 * _LABEL_ROWS, b=50),
        annotations=annotations,
        xaxis=dict(axis, title=dict(text="distance from the source [cm]"), rangemode="tozero"),
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
