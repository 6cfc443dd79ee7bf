"""The whole app: the views in tabs over one scenario set, plus the file panel.

:func:`build_app` is what the served notebook (``notebooks/app.ipynb``) shows.  The line,
comparison and files views share one :class:`~rheoline.widgets.document.ScenarioDocument`:
the line view edits one of its scenarios, the comparison draws them all, and the files view
loads a file into it and saves it.  The app starts from invented demo scenarios: the line
view's line ("line view") and three catheters behind the same set.  Each tab is a view that
carries its own caution banner at the top, so the banner is on screen whichever tab is open.
"""

from __future__ import annotations

import ipywidgets as widgets

__all__ = ["App", "build_app", "demo_document"]


def demo_document():
    """The scenario set the app starts from: the line view's line and three candidates
    (invented demo data)."""
    from rheoline.scenario.description import ScenarioSet
    from rheoline.widgets.compare_candidates import default_candidates
    from rheoline.widgets.document import ScenarioDocument
    from rheoline.widgets.line_view import line_scenario

    line = line_scenario()
    amounts = {
        "fluid": "saline-0.9",
        "temperature_c": 22.0,
        "hematocrit": 0.45,
        "mass_fraction": 0.4,
        "head_cm": 100.0,
        "source_pressure_mmhg": 0.0,
        "back_pressure_mmhg": 0.0,
        "temperature_tolerance_c": 0.0,
        "bore_tolerance_percent": 0.0,
    }
    scenarios = (line, *default_candidates(amounts))
    return ScenarioDocument(
        ScenarioSet(scenarios, title="Saved from the rheoline views", source="<views>")
    )


class App(widgets.VBox):
    """The views in tabs: line, comparison, blood and vessels, files.

    Parameters
    ----------
    tabs : sequence of str, optional
        Which tabs to build (default all): any of "line", "compare", "blood", "files".
    workspace : str or os.PathLike, optional
        The folder the files tab reads and writes (see
        :class:`~rheoline.widgets.files_view.FilesView`).
    """

    def __init__(self, tabs=("line", "compare", "blood", "files"), workspace=None):
        super().__init__()
        self.add_class("rl-app")
        self.document = demo_document()
        self.views = {}
        self.failures = {}
        builders = {"line": self._line_view, "compare": self._comparison_view, "blood": _blood}
        first = True
        for name in tabs:
            if name in builders:
                self.views[name] = self._build(name, lambda b=builders[name], f=first: b(not f))
                first = False
        if "files" in tabs:
            self.views["files"] = self._build(
                "files",
                lambda: _files(
                    self.views.get("line"), self.views.get("compare"), self.document, workspace
                ),
            )
        self.tabs = widgets.Tab(children=list(self.views.values()))
        self.tabs.titles = tuple(view.title for view in self.views.values())
        self.tabs.add_class("rl-tabs")
        self.tabs.observe(self._opened, names="selected_index")
        header = widgets.HTML("<h2 style='margin:4px 0'>rheoline: infusion lines and vessels</h2>")
        self.children = [header, self.tabs]

    def _line_view(self, lazy=False):
        from rheoline.widgets.line_view import LineView

        return LineView(lazy=lazy, document=self.document)

    def _comparison_view(self, lazy=False):
        from rheoline.widgets.compare_view import ComparisonView

        line = self.views.get("line")
        source = None if line is None else (lambda: line.scenario)
        return ComparisonView(lazy=lazy, line_source=source, document=self.document)

    def _opened(self, change):
        """A tab's charts become FigureWidgets when the tab is first opened."""
        if change.new is not None:
            list(self.views.values())[change.new].show_figures()

    def _build(self, name, builder):
        """Build one view; a view that fails shows why instead of taking the app down."""
        try:
            return builder()
        except Exception as exc:  # noqa: BLE001 - shown on the page, and kept for tests
            from rheoline.widgets.base import View

            self.failures[name] = exc
            text = f"the {name} view could not be built: {type(exc).__name__}: {exc}"
            return View.stand_in(name, text)


def _blood(lazy=False):
    from rheoline.widgets.blood_view import BloodVesselView

    return BloodVesselView(lazy=lazy)


def _files(line_view, compare_view, document, workspace=None):
    from rheoline.widgets.files_view import FilesView

    return FilesView(line_view, compare_view, document=document, workspace=workspace)


def build_app(tabs=("line", "compare", "blood", "files"), workspace=None) -> App:
    """Build the app (see :class:`App`)."""
    return App(tabs, workspace=workspace)
