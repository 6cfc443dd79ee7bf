"""What every view shares: the banner on top, named controls, timed and guarded updates.

A view is an ``ipywidgets.VBox`` whose first child is the caution banner.  Its
controls live in ``view.controls`` (name -> widget) and its figures in
``view.figures`` (name -> plotly ``Figure``), each shown by a
:class:`~rheoline.widgets.figures.Chart` in ``view.charts``.  Each control is wired to the
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
    "CONTROL_FIELDS",
    "View",
    "labelled",
    "number_field",
    "fluid_controls",
    "drive_controls",
    "time_control_change",
]

_STYLE = {"description_width": "initial"}

#: The scenario field each fluid and drive control (:func:`fluid_controls`,
#: :func:`drive_controls`) shows.
CONTROL_FIELDS = {
    "fluid": "fluid",
    "temperature_c": "temperature",
    "hematocrit": "hematocrit",
    "mass_fraction": "mass_fraction",
    "head_cm": "head",
    "source_pressure_mmhg": "source_pressure",
    "back_pressure_mmhg": "back_pressure",
}


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


def _ranged_field(path, value, step, description, css_class):
    """A number box bounded by what a scenario file accepts for ``path``, in the control's
    unit (:func:`rheoline.widgets.edits.control_range`)."""
    from rheoline.widgets.edits import control_range

    low, high = control_range(path)
    return number_field(value, low, high, step, description, css_class)


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
        "temperature_c": _ranged_field(
            "temperature", temperature_c, 0.5, "temperature [degC]", "rl-temperature"
        ),
        "hematocrit": _ranged_field(
            "hematocrit", hematocrit, 0.01, "hematocrit [-]", "rl-hematocrit"
        ),
        "mass_fraction": _ranged_field(
            "mass_fraction", mass_fraction, 0.01, "glycerol mass fraction [-]", "rl-mass-fraction"
        ),
    }


def drive_controls(head_cm, source_pressure_mmhg, back_pressure_mmhg) -> dict:
    """The gravity-and-pressure drive controls the line and comparison views share."""
    return {
        "head_cm": _ranged_field("head", head_cm, 5.0, "head [cm]", "rl-head"),
        "source_pressure_mmhg": _ranged_field(
            "source_pressure",
            source_pressure_mmhg,
            10.0,
            "source pressure [mmHg]",
            "rl-source-pressure",
        ),
        "back_pressure_mmhg": _ranged_field(
            "back_pressure", back_pressure_mmhg, 1.0, "back pressure [mmHg]", "rl-back-pressure"
        ),
    }


class View(widgets.VBox):
    """Base of the views: banner, body, message area, guarded and timed updates.

    Subclasses build ``self.controls`` and ``self.figures`` (plain ``go.Figure``) in
    their constructor, run the first update, call :meth:`_widgetize`, then
    :meth:`_finish` with the body, placing each figure with :meth:`figure_box`.  After
    every update (:meth:`_run`) each changed figure is sent whole to its chart.
    """

    title = "view"
    #: True where a view says a failed update in its status line alone (no message flag).
    errors_in_status = False

    def __init__(self, **kwargs):
        super().__init__(**kwargs)
        self.controls: dict[str, widgets.Widget] = {}
        self.figures: dict = {}
        self.last_update_seconds = float("nan")
        self.last_update_ok = True  # False while the last update ended in an error flag
        self._paused = False  # True while a view sets several controls at once
        self._shown = False  # charts send their figures (after show_figures)
        self._figure_boxes: dict = {}
        self.charts: dict = {}  # name -> Chart showing self.figures[name]
        self.banner = caution_banner()
        self.messages = widgets.HTML(value="")
        self.messages.add_class("rl-messages")
        self.status = widgets.HTML(value="")
        self.status.add_class("rl-status")
        self.add_class("rl-view")

    def figure_box(self, name: str) -> widgets.Box:
        """The box in the layout that holds figure ``name`` (a :class:`Chart`)."""
        if name not in self._figure_boxes:
            from rheoline.widgets.figures import Chart

            self.charts[name] = Chart(self.figures[name], layout=widgets.Layout(width="100%"))
            box = widgets.Box([self.charts[name]], layout=widgets.Layout(min_height="60px"))
            box.add_class(f"rl-figure-{name}")
            self._figure_boxes[name] = box
            if self._shown:
                self.charts[name].draw()
        return self._figure_boxes[name]

    def _widgetize(self, lazy: bool = False):
        """Show the figures now, or at :meth:`show_figures` (``lazy``)."""
        if not lazy:
            self.show_figures()

    def show_figures(self):
        """Show the charts: from now on each update sends each changed figure whole.

        The app does this per tab, when the tab is first opened, so a tab not looked at
        sends nothing to the page.
        """
        self._shown = True
        self.redraw()

    def replace_figure(self, name: str, figure):
        """Put a new figure in place of figure ``name`` (drawn at the next redraw)."""
        self.figures[name] = figure
        if name in self.charts:
            self.charts[name].figure = figure

    def redraw(self):
        """Send every changed figure to its chart (nothing before :meth:`show_figures`)."""
        if self._shown:
            for chart in self.charts.values():
                chart.draw()

    @staticmethod
    def two_columns(inputs: list, outputs: list) -> widgets.Box:
        """Inputs in the left column, results and charts in the right; the right column
        goes below the left when the window is too narrow for both."""
        left = widgets.VBox(inputs, layout=widgets.Layout(flex="1 1 420px", min_width="0"))
        right = widgets.VBox(
            outputs, layout=widgets.Layout(flex="1.4 1 480px", min_width="0", padding="0 0 0 12px")
        )
        left.add_class("rl-inputs")
        right.add_class("rl-outputs")
        box = widgets.Box(
            [left, right], layout=widgets.Layout(display="flex", flex_flow="row wrap", width="100%")
        )
        box.add_class("rl-columns")
        return box

    def _finish(self, body: list):
        self.children = [self.banner, self.status, *body, self.messages]

    @classmethod
    def stand_in(cls, title: str, text: str) -> View:
        """A view that only says ``text`` (an error flag): what the app shows in place of
        a view that could not be built."""
        view = cls()
        view.title = title
        view.say("error", text)
        view.children = [view.banner, view.status]
        return view

    def say(self, level: str, text: str):
        """Replace the status line: a flag of ``level`` (``"ok"``, ``"note"``, ...) and
        ``text`` (escaped).  The status says what the view shows of its scenarios."""
        self.status.value = flag_html(level, text)

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

    def _on_edit(self, names, handler):
        """Wire each named control to ``handler(name)``, guarded and timed by :meth:`_run`
        (not while the view sets its own controls)."""
        for name in names:

            def observer(change, name=name):
                if not self._paused:
                    self._run(lambda: handler(name))

            self.controls[name].observe(observer, names="value")

    def _follow(self, document):
        """Redraw after every change of ``document`` (:meth:`_document_changed`): guarded
        by the view's own :meth:`_run`, except for the view's own edits, which already run
        inside one."""

        def changed(by):
            if by is self:
                self._document_changed()
            else:
                self._run(self._document_changed)

        document.observe(changed)

    def _document_changed(self):  # pragma: no cover - views that follow a document override it
        raise NotImplementedError

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
                notes = [] if self.errors_in_status else [flag_html("error", str(exc))]
                self._failed(exc)
        notes += [
            flag_html("caution", str(w.message))
            for w in caught
            if issubclass(w.category, RheolineWarning)
        ]
        self.messages.value = "".join(notes)
        self.redraw()
        self.last_update_ok = ok
        self.last_update_seconds = time.perf_counter() - start
        return ok

    def _failed(self, exc):
        """Called when an update ends in an error flag (a view may say so in its status)."""

    def set_control(self, name: str, value) -> float:
        """Set a control as a user would; return the update's Python time [s]."""
        self.last_update_seconds = float("nan")
        self.controls[name].value = value
        return self.last_update_seconds


def time_control_change(view: View, name: str, value) -> float:
    """Python time [s] of one control change in ``view``, observer call to figure data set."""
    return view.set_control(name, value)
