"""The files view: load a scenario file into the views, save the set the views show as a
scenario file, and write the review pack of that set.

The views share one scenario set (a :class:`~rheoline.widgets.document.ScenarioDocument`):
the line view shows and edits one of its scenarios, the comparison compares them.  Loading
a file replaces the set; saving writes the set as it stands, so a file loaded and saved
again loads to the same scenarios (every sweep, second drive, tolerance, volume and vein
kept, whether a view shows it or not), and a saved file re-runs with ``rheoline run`` to
the numbers the views show.  The set is saved and solved by the scenario layer
(:func:`~rheoline.scenario.writing.save_scenarios`,
:func:`~rheoline.scenario.compare.run_scenarios`, :func:`~rheoline.scenario.export.write_pack`).

After a load the status line says what each view shows of the file and names what it does
not (a sweep shown at its first point, a field with no control, scenarios beyond what the
comparison draws); it says "ok" only when the views show all of it.

Every file the view loads or writes lives in one workspace folder (a
:class:`~rheoline.scenario.workspace.Workspace`, shown in the view): a name is taken
inside it, and a path that leaves it (directly, through ``..`` or through a symbolic
link) is refused before any file is opened.  The served app gets its folder from the
launcher (:mod:`rheoline.widgets.serve`); the default is ``./rheoline-workspace``.
"""

from __future__ import annotations

from pathlib import Path

import ipywidgets as widgets

from rheoline.errors import OutputError, PackExistsError, ScenarioError
from rheoline.scenario.files import MAX_FILE_BYTES, load_scenarios, loads_scenarios, save_scenarios
from rheoline.scenario.workspace import Workspace
from rheoline.widgets.base import _STYLE, View, labelled
from rheoline.widgets.style import user_text

__all__ = ["FilesView"]

_AUTO = widgets.Layout(width="auto")
#: What did not happen when an action fails, in the user's words (the status line's start).
NOT_DONE = {
    "load": "nothing was loaded",
    "save": "the scenario file was not saved",
    "pack": "the review pack was not written",
}


class FilesView(View):
    """Load and save scenario files and write review packs of the views' scenario set.

    Parameters
    ----------
    line_view, compare_view : View or callable, optional
        The views that show the set (their status lines are summed up after a load); a
        callable returns the view, or None while the app has not built it.
    network_view : NetworkView or callable, optional
        The view that shows the set's branched scenarios (summed up after a load too, while
        the set holds any), given as the other views are.
    document : ScenarioDocument, optional
        The set to load into and save (default: the line view's, else the comparison's).
    workspace : str or os.PathLike, optional
        The folder every load, save and pack stays in (default
        :func:`rheoline.widgets.serve.workspace_folder`: the launcher's choice, else
        ``./rheoline-workspace``); created when the first file is written.
    """

    title = "Files"

    def __init__(
        self, line_view=None, compare_view=None, document=None, workspace=None, network_view=None
    ):
        super().__init__()
        from rheoline.widgets.serve import workspace_folder

        self._views = (line_view, compare_view, network_view)
        views = [v for v in (self.line_view, self.compare_view) if v is not None]
        if document is None:
            document = views[0].document if views else _own_document()
        self.document = document
        self.workspace = Workspace(workspace_folder() if workspace is None else workspace)
        c = self.controls
        c["scenario_path"] = labelled(
            widgets.Text(
                value="rheoline-scenarios.toml",
                description="scenario file",
                style=_STYLE,
                layout=widgets.Layout(width="520px"),
            ),
            "rl-scenario-path",
        )
        c["pack_path"] = labelled(
            widgets.Text(
                value="rheoline-pack",
                description="review pack folder",
                style=_STYLE,
                layout=widgets.Layout(width="520px"),
            ),
            "rl-pack-path",
        )
        c["overwrite"] = widgets.Checkbox(
            value=False,
            description="replace an existing file or pack",
            indent=False,
            layout=widgets.Layout(width="auto"),
        )
        self.load_button = labelled(
            widgets.Button(description="load scenario file", icon="folder-open", layout=_AUTO),
            "rl-load",
        )
        self.save_button = labelled(
            widgets.Button(description="save as scenario file", icon="save", layout=_AUTO),
            "rl-save",
        )
        self.pack_button = labelled(
            widgets.Button(description="write review pack", icon="file-export", layout=_AUTO),
            "rl-pack",
        )
        self.upload = widgets.FileUpload(
            accept=".toml,.json", multiple=False, description="upload a file", layout=_AUTO
        )
        self.status.add_class("rl-files-status")
        self.load_button.on_click(lambda b: self._run(self.load))
        self.save_button.on_click(lambda b: self._run(self.save))
        self.pack_button.on_click(lambda b: self._run(self.write_pack))
        self.upload.observe(lambda change: self._run(self._uploaded), names="value")
        from rheoline.scenario.reading import example_names

        c["example"] = labelled(
            widgets.Dropdown(
                options=list(example_names()), description="shipped example", style=_STYLE
            ),
            "rl-example",
        )
        self.example_button = labelled(
            widgets.Button(description="open example", icon="folder-open", layout=_AUTO),
            "rl-open-example",
        )
        self.example_button.on_click(lambda b: self._run(self.open_example))
        self._finish(
            [
                widgets.HTML(
                    "<b>Scenario files</b> (TOML or JSON, the format the command line reads) "
                    "and <b>review packs</b> (CSV, XLSX, HTML) of the scenarios the line and "
                    "comparison views show."
                ),
                widgets.HBox([c["example"], self.example_button]),
                labelled(
                    widgets.HTML(
                        "workspace folder <code>"
                        f"{user_text(self.workspace.root)}</code>: every file "
                        "named here is read from and written to this folder only"
                    ),
                    "rl-workspace",
                ),
                c["scenario_path"],
                widgets.HBox([self.load_button, self.save_button, self.upload]),
                c["pack_path"],
                widgets.HBox([self.pack_button, c["overwrite"]]),
            ]
        )

    @property
    def line_view(self):
        """The line view that shows the set, or None (not built, or none)."""
        return _view(self._views[0])

    @property
    def compare_view(self):
        """The comparison view that shows the set, or None (not built, or none)."""
        return _view(self._views[1])

    @property
    def network_view(self):
        """The network view that shows the set's branched scenarios, or None."""
        return _view(self._views[2])

    #: A failed load, save or pack is said in the status line alone (it replaces the last).
    errors_in_status = True

    _action = "load"  # the action under way: "load", "save" or "pack" (NOT_DONE)

    def _failed(self, exc):
        # the action did not happen: its status replaces the previous one, in the page's
        # words (the checkbox, never a command-line flag), rendered from the error's data
        self.say("failed", f"{NOT_DONE[self._action]}: {self._words(exc)}")

    def _words(self, exc) -> str:
        """What failed, from the error's data: the pack's case, a write's path and reason,
        else the reader's message (which names the file and the field)."""
        if isinstance(exc, PackExistsError):
            return self._pack_words(exc)
        if isinstance(exc, OutputError) and exc.field == "force":  # a file came in the way
            return f"{self.workspace.relative(exc.source)}: {self._exists_words()}"
        if isinstance(exc, OutputError) and exc.source is not None:
            return f"{self.workspace.relative(exc.source)}: {exc.reason}"
        return str(exc)

    def _pack_words(self, exc) -> str:
        shown = self.workspace.relative(exc.source)
        tick = self.controls["overwrite"].description
        return {
            "link": f"{shown} is a symbolic link, and a pack is never written through one; "
            "choose another folder name",
            "not a folder": f"{shown} is a file, not a folder; choose another folder name",
            "not a pack": f"the folder {shown} is not an unchanged rheoline review pack "
            f"({exc.detail}), so it is kept as it is even with '{tick}' ticked (that box "
            "replaces only an earlier pack); choose another folder name",
        }.get(exc.kind, f"{shown}: {self._exists_words()}")

    def open_example(self, name=None):
        """Load the shipped example ``name`` (default: the one chosen) into the views."""
        from rheoline.scenario.reading import example_path

        self._action = "load"
        name = name or self.controls["example"].value
        sset = load_scenarios(example_path(name))
        self._loaded(sset, f"the shipped example {name!r}")
        return sset

    def current_set(self):
        """The set the views show and edit (a :class:`ScenarioSet`), as it will be saved."""
        return self.document.scenario_set

    def load(self, path=None):
        """Load the scenario file at ``path`` (default: the path field) into the views.

        ``path`` is taken inside the workspace folder; one outside it is refused unread.
        """
        self._action = "load"
        path = self.workspace.resolve(path or self.controls["scenario_path"].value)
        sset = load_scenarios(path)
        self._loaded(sset, self.workspace.relative(path))
        return sset

    def _loaded(self, sset, name):
        self.document.load(sset, by=self)
        level, account = self.views_summary()
        n = len(sset.scenarios)
        self.say(
            level,
            f"loaded {name}: {n} scenario{'s' * (n != 1)}, every field kept for saving. {account}",
        )

    def views_summary(self):
        """``(level, text)``: what each view shows of the set, and what it does not."""
        levels, texts = [], []
        network = self.network_view
        if network is not None and not network.from_document:
            network = None  # it shows the shipped examples, not this set
        for view in (self.line_view, self.compare_view, network):
            if view is None:
                continue
            level, text = view.shown_summary()
            if not view.last_update_ok:
                level, text = "error", f"{text}; not computed (see that view's message)"
            levels.append(level)
            texts.append(text)
        order = ("ok", "note", "caution", "error")
        worst = max(levels, key=order.index, default="ok")
        return worst, ". ".join(texts)

    def _uploaded(self):
        self._action = "load"
        if not self.upload.value:
            return
        item = self.upload.value[0]
        name = item["name"]
        raw = bytes(item["content"])
        if len(raw) > MAX_FILE_BYTES:
            raise ScenarioError(
                f"{len(raw)} bytes is more than the {MAX_FILE_BYTES} bytes a "
                "scenario file may hold; split it into smaller files",
                source=name,
            )
        try:
            text = raw.decode("utf-8")
        except UnicodeDecodeError:
            raise ScenarioError(
                "is not UTF-8 text; save the scenario file as UTF-8 TOML or "
                "JSON and upload it again",
                source=name,
            ) from None
        sset = loads_scenarios(text, source=name, fmt="json" if name.endswith(".json") else "toml")
        self._loaded(sset, name)

    def save(self, path=None):
        """Save the views' set as a scenario file in the workspace; returns its path."""
        self._action = "save"
        path = self._target(path or self.controls["scenario_path"].value)
        self._refuse_existing(path)
        sset = self.current_set()
        written = save_scenarios(sset, path, force=self.controls["overwrite"].value)
        n = len(sset.scenarios)
        shown = self.workspace.relative(written)
        self.say("ok", f"saved {n} scenario{'s' * (n != 1)} to {shown}")
        return written

    def write_pack(self, folder=None):
        """Solve the views' set with the scenario layer and write its review pack."""
        from rheoline.scenario.compare import run_scenarios
        from rheoline.scenario.export import write_pack
        from rheoline.scenario.pack_folder import check_target

        self._action = "pack"
        folder = self._target(folder or self.controls["pack_path"].value)
        # before the run: a link, a file, a folder that is not a pack, or an earlier pack
        # with the box not ticked is refused (in the page's words, from the error's kind)
        check_target(folder, force=self.controls["overwrite"].value)
        run = run_scenarios(self.current_set())
        written = write_pack(run, folder, force=self.controls["overwrite"].value)
        shown, n = self.workspace.relative(written), len(run.table)
        self.say("ok", f"wrote the review pack to {shown} ({n} case{'s' * (n != 1)})")
        return written

    def _refuse_existing(self, path):
        """An existing file or folder is replaced only with the box ticked (said in the
        box's words)."""
        if path.exists() and not self.controls["overwrite"].value:
            shown = self.workspace.relative(path)
            raise OutputError(self._exists_words(), source=str(path), value=shown)

    def _exists_words(self) -> str:
        tick = self.controls["overwrite"].description
        return f"exists already; choose another name, or tick '{tick}' to replace it"

    def _target(self, user_path) -> Path:
        """Where to write ``user_path``: inside the workspace (made if missing), or refused."""
        path = self.workspace.resolve(user_path, for_writing=True)
        self.workspace.create()
        return path


def _view(given):
    """A view given as itself or as a callable returning it (or None)."""
    return given() if callable(given) else given


def _own_document():
    """The set of a files view shown without the other views: the line view's demo line."""
    from rheoline.scenario.description import ScenarioSet
    from rheoline.widgets.document import ScenarioDocument
    from rheoline.widgets.line_view import line_scenario

    return ScenarioDocument(ScenarioSet((line_scenario(),), source="<views>"))
