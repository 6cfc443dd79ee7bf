"""What every view shares: the banner on top, named controls, timed and guarded updates.

A view is an ``ipywidgets.VBox`` whose first child is the caution banner.  Its
controls live in ``view.controls`` (name -> widget) and its figures in
``view.figures`` (name -> plotly ``FigureWidget``).  Each control is wired to the
handlers of the figures it affects only, so a change recomputes what depends on
it and nothing else.

An update runs inside a guard: a :class:`~rheoline.errors.RheolineError` from the
layers below (a negative length, a percent typed as a fraction) is shown in the
view's message area as a flag in words, and the figures keep their last good
state; rheoline warnings raised during the update are shown as caution flags.
``view.last_update_seconds`` holds the Python time of the last update, from the
observer call until the figure data were set; :meth:`View.set_control` returns it,
which is the hook the benchmarks time.
"""

from __future__ import annotations

import time
import warnings

import ipywidgets as widgets

from rheoline.errors import RheolineError, RheolineWarning
from rheoline.widgets.banner import caution_banner
from rheoline.widgets.style import flag_html

__all__ = [
    "View",
    "labelled",
    "number_field",
    "fluid_controls",
    "drive_controls",
    "time_control_change",
]

_STYLE = {"description_width": "initial"}


def labelled(widget: widgets.Widget, css_class: str) -> widgets.Widget:
    """Give ``widget`` a CSS class (for styling and for the browser test) and return it."""
    widget.add_class(css_class)
    return widget


def number_field(value, low, high, step, description, css_class):
    """A bounded number box with its unit in the description (e.g. ``"head [cm]"``)."""
    return labelled(
        widgets.BoundedFloatText(
            value=value, min=low, max=high, step=step, description=description, style=_STYLE
        ),
        css_class,
    )


def fluid_controls(fluid, temperature_c, hematocrit, mass_fraction=0.4) -> dict:
    """The fluid controls the line and comparison views share."""
    import rheoline

    return {
        "fluid": labelled(
            widgets.Dropdown(
                options=list(rheoline.fluid_names()), value=fluid, description="fluid", style=_STYLE
            ),
            "rl-fluid",
        ),
        "temperature_c": number_field(
            temperature_c, 0.0, 60.0, 0.5, "temperature [degC]", "rl-temperature"
        ),
        "hematocrit": number_field(hematocrit, 0.0, 0.8, 0.01, "hematocrit [-]", "rl-hematocrit"),
        "mass_fraction": number_field(
            mass_fraction, 0.0, 1.0, 0.01, "glycerol mass fraction [-]", "rl-mass-fraction"
        ),
    }


def drive_controls(head_cm, source_pressure_mmhg, back_pressure_mmhg) -> dict:
    """The gravity-and-pressure drive controls the line and comparison views share."""
    return {
        "head_cm": number_field(head_cm, 0.0, 1000.0, 5.0, "head [cm]", "rl-head"),
        "source_pressure_mmhg": number_field(
            source_pressure_mmhg, 0.0, 20000.0, 10.0, "source pressure [mmHg]", "rl-source-pressure"
        ),
        "back_pressure_mmhg": number_field(
            back_pressure_mmhg, -200.0, 1000.0, 1.0, "back pressure [mmHg]", "rl-back-pressure"
        ),
    }


class View(widgets.VBox):
    """Base of the views: banner, body, message area, guarded and timed updates.

    Subclasses build ``self.controls`` and ``self.figures`` (plain ``go.Figure``) in
    their constructor, run the first update, call :meth:`_widgetize` (a FigureWidget
    shown by Voila must be complete when it is built), then :meth:`_finish` with the
    body, placing each figure with :meth:`figure_box`.
    """

    title = "view"

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.controls: dict[str, widgets.Widget] = {}
        self.figures: dict = {}
        self.last_update_seconds = float("nan")
        self._paused = False  # True while a view sets several controls at once
        self._shown = False  # figures are FigureWidgets in their boxes
        self._figure_boxes: dict = {}
        self.banner = caution_banner()
        self.messages = widgets.HTML(value="")
        self.messages.add_class("rl-messages")
        self.add_class("rl-view")

    def figure_box(self, name: str) -> widgets.Box:
        """The box in the layout that holds figure ``name`` once it is a FigureWidget."""
        if name not in self._figure_boxes:
            box = widgets.Box(layout=widgets.Layout(min_height="60px"))
            box.add_class(f"rl-figure-{name}")
            self._figure_boxes[name] = box
            if self._shown:
                box.children = [self.figures[name]]
        return self._figure_boxes[name]

    def _widgetize(self, lazy: bool = False):
        """Turn the filled figures into FigureWidgets now, or at :meth:`show_figures`."""
        if not lazy:
            self.show_figures()

    def show_figures(self):
        """Make the figures FigureWidgets (their constructor carries the current state).

        Each FigureWidget makes the browser load and start plotly's widget code within a
        short deadline, so the app does this per tab, when the tab is first opened, rather
        than for every chart at once when the page loads.
        """
        import plotly.graph_objects as go

        for name, fig in self.figures.items():
            if not isinstance(fig, go.FigureWidget):
                self.figures[name] = go.FigureWidget(fig)
        self._shown = True
        for name, box in self._figure_boxes.items():
            box.children = [self.figures[name]]

    def _finish(self, body: list):
        self.children = [self.banner, *body, self.messages]

    # -- wiring ------------------------------------------------------------------
    def _watch(self, dependencies: dict):
        """Wire controls to what they affect: ``{control name: set of part names}``.

        A change of the control calls ``self._refresh(parts)`` (guarded and timed)
        with only the parts that depend on it.
        """
        for name, parts in dependencies.items():
            frozen = frozenset(parts)

            def observer(change, frozen=frozen):
                if not self._paused:
                    self._run(lambda: self._refresh(frozen))

            self.controls[name].observe(observer, names="value")

    def _refresh(self, parts):  # pragma: no cover - every view overrides it
        raise NotImplementedError

    def _run(self, handler) -> bool:
        """Run one update; show errors and warnings as flags. True when it succeeded."""
        start = time.perf_counter()
        ok = True
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", RheolineWarning)
            try:
                handler()
                notes = []
            except RheolineError as exc:
                ok = False
                notes = [flag_html("error", str(exc))]
        notes += [
            flag_html("caution", str(w.message))
            for w in caught
            if issubclass(w.category, RheolineWarning)
        ]
        self.messages.value = "".join(notes)
        self.last_update_seconds = time.perf_counter() - start
        return ok

    def set_control(self, name: str, value) -> float:
        """Set a control as a user would; return the update's Python time [s]."""
        self.last_update_seconds = float("nan")
        self.controls[name].value = value
        return self.last_update_seconds


def time_control_change(view: View, name: str, value) -> float:
    """Python time [s] of one control change in ``view``, observer call to figure data set."""
    return view.set_control(name, value)
