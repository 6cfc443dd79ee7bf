"""The whole app: the views in tabs, plus the file panel (scenario files and review packs).

:func:`build_app` is what the served notebook (``notebooks/app.ipynb``) shows.
Each tab is a view that carries its own caution banner at the top, so the banner
is on screen whichever tab is open.
"""

from __future__ import annotations

import ipywidgets as widgets

__all__ = ["App", "build_app"]


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
        self.views = {}
        self.failures = {}
        builders = {"line": _line, "compare": self._comparison_view, "blood": _blood}
        first = True
        for name in tabs:
            if name in builders:
                self.views[name] = self._build(name, lambda b=builders[name], f=first: b(not f))
                first = False
        if "files" in tabs:
            self.views["files"] = self._build(
                "files",
                lambda: _files(self.views.get("line"), self.views.get("compare"), workspace),
            )
        self.tabs = widgets.Tab(children=list(self.views.values()))
        self.tabs.titles = tuple(view.title for view in self.views.values())
        self.tabs.add_class("rl-tabs")
        self.tabs.observe(self._opened, names="selected_index")
        header = widgets.HTML("<h2 style='margin:4px 0'>rheoline: infusion lines and vessels</h2>")
        self.children = [header, self.tabs]

    def _comparison_view(self, lazy=False):
        from rheoline.widgets.compare_view import ComparisonView

        line = self.views.get("line")
        source = None if line is None else (lambda: line.editor.descriptions())
        return ComparisonView(lazy=lazy, line_source=source)

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
            from rheoline.widgets.style import flag_html

            self.failures[name] = exc
            stand_in = View()
            stand_in.title = name
            stand_in.messages.value = flag_html(
                "error", f"the {name} view could not be built: {type(exc).__name__}: {exc}"
            )
            stand_in._finish([])
            return stand_in


def _line(lazy=False):
    from rheoline.widgets.line_view import LineView

    return LineView(lazy=lazy)


def _blood(lazy=False):
    from rheoline.widgets.blood_view import BloodVesselView

    return BloodVesselView(lazy=lazy)


def _files(line_view, compare_view, workspace=None):
    from rheoline.widgets.files_view import FilesView

    return FilesView(line_view, compare_view, workspace=workspace)


def build_app(tabs=("line", "compare", "blood", "files"), workspace=None) -> App:
    """Build the app (see :class:`App`)."""
    return App(tabs, workspace=workspace)
