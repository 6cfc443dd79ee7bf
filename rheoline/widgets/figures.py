"""Figure builders shared by the views (initial state set here, in the constructor).

A FigureWidget that Voila shows must be complete when the page connects: state
changed in the kernel after the widget is built but before the page connects does
not reach the page.  So a view builds plain ``go.Figure`` objects with every trace
and axis in place, fills them with its first update, and only then turns them into
FigureWidgets (:meth:`rheoline.widgets.base.View._widgetize`), whose constructor
carries the filled state; later updates set trace data inside ``fig.batch_update()``.
"""

from __future__ import annotations

import plotly.graph_objects as go

from rheoline.widgets.style import PALETTE

__all__ = ["BASE_LAYOUT", "curve_and_point_figure"]

#: Layout shared by the views' charts.
BASE_LAYOUT = dict(
    margin=dict(l=70, r=20, t=40, b=50),
    height=320,
    template="simple_white",
    legend=dict(orientation="h", y=-0.25),
)


def curve_and_point_figure(
    title: str, curve_name: str, point_name: str, xaxis=None, yaxis=None, extra_traces=()
) -> go.Figure:
    """A figure with a curve (trace 0) and the current point (trace 1), plus any extras.

    The point is a large diamond with a dark outline, so it stands out by shape,
    not by colour alone.
    """
    data = [
        go.Scatter(name=curve_name, mode="lines", line=dict(color=PALETTE[0], width=3)),
        go.Scatter(
            name=point_name,
            mode="markers",
            marker=dict(
                color=PALETTE[1], size=13, symbol="diamond", line=dict(color="#1a1a1a", width=1)
            ),
        ),
        *extra_traces,
    ]
    layout = go.Layout(title=title, xaxis=xaxis or {}, yaxis=yaxis or {}, **BASE_LAYOUT)
    return go.Figure(data=data, layout=layout)
