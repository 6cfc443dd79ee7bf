"""The whole app: the views in tabs over one scenario set, plus the file panel.

:func:`build_app` is what the served notebook (``notebooks/app.ipynb``) shows.  The line,
comparison, network and files views share one
:class:`~rheoline.widgets.document.ScenarioDocument`: the line view edits one of its line
scenarios, the comparison draws them all, the network view draws and edits its branched
scenarios (the shipped branched examples while it holds none), and the files view loads a
file into it and saves it; the time view shows and edits its scenarios that ask
for the time solve (else its own demo).  The app starts from invented demo scenarios: the line
view's line ("line view") and three catheters behind the same set.  Each tab is a view that
carries its own caution banner at the top, so the banner is on screen whichever tab is open.
"""

from __future__ import annotations

import gc
from collections.abc import Mapping

import ipywidgets as widgets

from rheoline.errors import RheolineError

__all__ = ["App", "TAB_TITLES", "Views", "build_app", "demo_document"]


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


#: Each tab's title, shown before its view is built (a view's ``title`` says the same).
TAB_TITLES = {
    "line": "Line",
    "compare": "Compare",
    "network": "Network",
    "blood": "Blood and vessels",
    "time": "Infusion in time",
    "files": "Files",
}


class Views(Mapping):
    """The app's views by tab name, each built the first time it is asked for.

    ``views[name]`` builds the view if it is not built yet (a view that fails to build is
    a stand-in that says why, and the error is kept in ``app.failures``);
    :meth:`built` answers without building.
    """

    def __init__(self, builders: dict):
        self._builders = builders
        self._built: dict = {}
        self.failures: dict = {}

    def __getitem__(self, name):
        if name not in self._built:
            builder = self._builders[name]  # KeyError for a tab the app does not have
            self._built[name] = self._build(name, builder)
        return self._built[name]

    def __iter__(self):
        return iter(self._builders)

    def __contains__(self, name):  # Mapping's own would build the view to answer
        return name in self._builders

    def __len__(self):
        return len(self._builders)

    def built(self, name):
        """The view of tab ``name`` if it is built, else None."""
        return self._built.get(name)

    def _build(self, name, builder):
        """Build one view; a view that fails shows why instead of taking the app down."""
        try:
            return builder()
        except Exception as exc:  # noqa: BLE001 - shown on the page, and kept for tests
            from rheoline.widgets.base import View

            self.failures[name] = exc
            text = f"the {name} view could not be built: {type(exc).__name__}: {exc}"
            return View.stand_in(name, text)


class App(widgets.VBox):
    """The views in tabs: line, comparison, branched line, blood and vessels, the infusion in time,
    files.

    Only the first tab's view is built with the app; each other tab's view is built when
    the tab is first opened (or first asked for in ``app.views``), so the page loads only
    what it shows.

    Parameters
    ----------
    tabs : sequence of str, optional
        Which tabs to build (default all): any of "line", "compare", "network", "blood",
        "time", "files".
    workspace : str or os.PathLike, optional
        The folder the files tab reads and writes (see
        :class:`~rheoline.widgets.files_view.FilesView`).
    """

    def __init__(
        self, tabs=("line", "compare", "network", "blood", "time", "files"), workspace=None
    ):
        super().__init__()
        self.add_class("rl-app")
        self.document = demo_document()
        builders = {
            "line": lambda: self._line_view(),
            "compare": lambda: self._comparison_view(),
            "network": lambda: self._network_view(),
            "blood": _blood,
            "time": lambda: self._time_view(),
            "files": lambda: _files(  # a load's summary asks these views (built then)
                lambda: self.views.get("line"),
                lambda: self.views.get("compare"),
                self.document,
                workspace,
                lambda: self.views.get("network"),
            ),
        }
        self.views = Views({name: builders[name] for name in tabs if name in builders})
        self.failures = self.views.failures
        self._slots = {}
        for name in self.views:
            self._slots[name] = widgets.VBox()
            self._slots[name].add_class(f"rl-tab-{name}")
        self.tabs = widgets.Tab(children=list(self._slots.values()))
        self.tabs.titles = tuple(TAB_TITLES[name] for name in self.views)
        self.tabs.add_class("rl-tabs")
        self.tabs.observe(self._opened, names="selected_index")
        header = widgets.HTML("<h2 class='rl-title'>rheoline: infusion lines and vessels</h2>")
        self.children = [header, self.tabs]
        if self._slots:
            self._show(next(iter(self.views)))

    def prepare(self, *, freeze: bool = False):
        """Ready what the other tabs need when first opened, without building their
        widgets (the page fetches every widget that exists): the modules they import and
        the time view's first solve.  The app's notebook calls it, so the served app does
        this in its preheated kernel, before anyone opens the page.

        With ``freeze=True`` (the served page's kernel, which holds nothing but the app),
        what is alive then (modules, plotly's and the widgets' classes, the document) is
        taken out of the garbage collector's full passes (``gc.freeze``), which would
        otherwise scan all of it (some 165,000 objects, about 100 ms) in the middle of
        whichever control change sets one off.  Not in a notebook of your own: frozen
        objects in reference cycles are never freed, yours included."""
        from rheoline.widgets import blood_view, compare_view, files_view, network_view  # noqa: F401
        from rheoline.widgets.transient_view import prepare_first_run

        if "time" in self.views and self.views.built("time") is None:
            try:
                prepare_first_run(self.document)
            except RheolineError:
                pass  # only a head start: the tab solves again when opened and says why
        if freeze:
            gc.collect()  # so that only what is alive is frozen
            gc.freeze()

    def _line_view(self):
        from rheoline.widgets.line_view import LineView

        return LineView(lazy=True, document=self.document)

    def _comparison_view(self):
        from rheoline.widgets.compare_view import ComparisonView

        line = self.views.built("line")
        source = None if line is None else (lambda: line.scenario)
        return ComparisonView(lazy=True, line_source=source, document=self.document)

    def _network_view(self):
        from rheoline.widgets.network_view import NetworkView

        return NetworkView(lazy=True, document=self.document)

    def _time_view(self):
        from rheoline.widgets.transient_view import TransientView

        return TransientView(document=self.document, lazy=True)

    def _opened(self, change):
        """A tab's view is built, placed and drawn when the tab is first opened."""
        if change.new is not None:
            self._show(list(self.views)[change.new])

    def _show(self, name):
        view = self.views[name]
        slot = self._slots[name]
        if not slot.children:
            slot.children = [view]
        view.show_figures()


def _blood():
    from rheoline.widgets.blood_view import BloodVesselView

    return BloodVesselView(lazy=True)


def _files(line_view, compare_view, document, workspace=None, network_view=None):
    from rheoline.widgets.files_view import FilesView

    return FilesView(
        line_view,
        compare_view,
        document=document,
        workspace=workspace,
        network_view=network_view,
    )


def build_app(tabs=("line", "compare", "network", "blood", "time", "files"), workspace=None) -> App:
    """Build the app (see :class:`App`)."""
    return App(tabs, workspace=workspace)
