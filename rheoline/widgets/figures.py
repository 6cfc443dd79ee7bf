"""Figure builders shared by the views, and :class:`Chart`, the widget that shows one.

A view keeps plain ``go.Figure`` objects (``view.figures``) and sets their trace data
inside ``fig.batch_update()``.  A :class:`Chart` shows a figure on the page as a whole:
after each update it hands the browser the figure's complete current state (plotly's
JSON in an ``Output`` widget, drawn by plotly's renderer, which the page loads once), so
what a chart shows never depends on an earlier message having arrived.

Why not plotly's ``FigureWidget``: it sends each change as a one-off message
(``_py2js_restyle`` set, then reset to None) that the browser applies to its copy of
the figure, and its synced state (``_widget_data``) keeps the figure as it was built.
Its browser code (an anywidget module carrying plotly.js, about 5 MB per chart) takes
seconds to start under load; messages sent before it listens are lost, and the chart
then shows its first state beside updated numbers.
"""

from __future__ import annotations

import base64
import json

import ipywidgets as widgets
import numpy as np
import plotly.graph_objects as go
import plotly.io as pio

from rheoline.widgets.style import PALETTE

__all__ = ["BASE_LAYOUT", "LOOK", "Chart", "PLOTLY_MIME", "curve_and_point_figure"]

#: The MIME type of plotly's renderer (the ``jupyterlab-plotly`` extension Voila loads).
PLOTLY_MIME = "application/vnd.plotly.v1+json"
#: Chart options: fill the container's width and follow it, no plotly logo or link out.
CHART_CONFIG = {"responsive": True, "displaylogo": False, "showLink": False}


class Chart(widgets.Output):
    """One figure on the page, always showing the figure's current state.

    Parameters
    ----------
    figure : plotly.graph_objects.Figure
        The figure to show; :meth:`draw` shows its state now.

    Notes
    -----
    The state sent is the whole figure (``outputs``, a synced trait), so a page that
    connects late, a chart drawn late, or a lost message never leaves old data on screen.
    A draw with nothing changed sends nothing.
    """

    def __init__(self, figure: go.Figure, **kwargs):
        super().__init__(**kwargs)
        self.figure = figure
        self.add_class("rl-chart")
        self._sent = None

    def draw(self) -> bool:
        """Send the figure's current state if it changed; True when it was sent."""
        text = pio.to_json(self.figure, validate=False)
        if text == self._sent:
            return False
        spec = json.loads(text, object_hook=_plain_array)
        spec["config"] = CHART_CONFIG
        title = spec.get("layout", {}).get("title", {})
        plain = title.get("text", "chart") if isinstance(title, dict) else str(title)
        self.outputs = (
            {
                "output_type": "display_data",
                "data": {PLOTLY_MIME: spec, "text/plain": plain},
                "metadata": {},
            },
        )
        self._sent = text
        return True


_INK = "rgb(36,36,36)"
_AXIS = dict(
    gridcolor="rgb(232,232,232)",
    linecolor=_INK,
    showgrid=False,
    showline=True,
    ticks="outside",
    title=dict(standoff=15),
    zerolinecolor=_INK,
    automargin=True,
    zeroline=False,
)
#: The charts' look (a plotly template, as a plain dict): white background, axis lines,
#: ticks outside, no grid.  It is the part of plotly's "simple_white" template that the
#: views' 2-D line, marker and bar charts use (``tests/test_widgets_style.py`` holds it to
#: that template).  The named template carries defaults for every trace type (maps, 3-D,
#: polar, ...): a layout built with it costs some 11 ms (plotly copies and checks it all),
#: with this one under 2 ms, and each chart sent to the page carries 1.2 kB of template
#: instead of 8.6 kB.
LOOK = dict(
    layout=dict(
        autotypenumbers="strict",
        colorway=[
            "#1F77B4",
            "#FF7F0E",
            "#2CA02C",
            "#D62728",
            "#9467BD",
            "#8C564B",
            "#E377C2",
            "#7F7F7F",
            "#BCBD22",
            "#17BECF",
        ],
        font=dict(color=_INK),
        hovermode="closest",
        hoverlabel=dict(align="left"),
        paper_bgcolor="white",
        plot_bgcolor="white",
        xaxis=_AXIS,
        yaxis=_AXIS,
        shapedefaults=dict(fillcolor="black", line=dict(width=0), opacity=0.3),
        annotationdefaults=dict(arrowhead=0, arrowwidth=1),
        title=dict(x=0.05),
    ),
    data=dict(
        scatter=[dict(type="scatter", fillpattern=dict(fillmode="overlay", size=10, solidity=0.2))],
        bar=[
            dict(
                type="bar",
                error_x=dict(color=_INK),
                error_y=dict(color=_INK),
                marker=dict(
                    line=dict(color="white", width=0.5),
                    pattern=dict(fillmode="overlay", size=10, solidity=0.2),
                ),
            )
        ],
    ),
)

#: Layout shared by the views' charts.
BASE_LAYOUT = dict(
    margin=dict(l=70, r=20, t=40, b=50),
    height=320,
    template=LOOK,
    legend=dict(orientation="h", y=-0.25),
)


def _plain_array(obj: dict):
    """A typed array plotly encoded (``{"dtype": "f8", "bdata": ...}``) as a plain list,
    so the page's copy of a trace reads as numbers; other objects unchanged."""
    if obj.keys() == {"dtype", "bdata"}:
        values = np.frombuffer(base64.b64decode(obj["bdata"]), dtype=np.dtype(obj["dtype"]))
        return values.tolist()
    if obj.keys() == {"dtype", "bdata", "shape"}:
        values = np.frombuffer(base64.b64decode(obj["bdata"]), dtype=np.dtype(obj["dtype"]))
        shape = [int(n) for n in str(obj["shape"]).split(",")]
        return values.reshape(shape).tolist()
    return obj


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
