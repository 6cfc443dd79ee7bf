"""The files view: load a scenario file into the views, save what is on screen as a
scenario file, and write the review pack of what is on screen.

What is on screen becomes a scenario set: the line view's line is the scenario
"line view", and each comparison candidate is a scenario of its own with the
comparison's shared fluid, drive and tolerances.  The set is validated, saved and
solved by the scenario layer (:func:`rheoline.scenario.files.parse_scenarios`,
:func:`~rheoline.scenario.files.save_scenarios`,
:func:`~rheoline.scenario.compare.run_scenarios`,
:func:`~rheoline.scenario.export.write_pack`), so a saved file re-runs with
``rheoline run`` to the same numbers.

Every file the view loads or writes lives in one workspace folder (a
:class:`~rheoline.scenario.workspace.Workspace`, shown in the view): a name is taken
inside it, and a path that leaves it (directly, through ``..`` or through a symbolic
link) is refused before any file is opened.  The served app gets its folder from the
launcher (:mod:`rheoline.widgets.serve`); the default is ``./rheoline-workspace``.

Loading fills the line view with the file's first scenario (the first point of
any sweep) and the comparison with one candidate per scenario and sweep point of
the parts (up to :data:`MAX_LOADED_CANDIDATES`).
"""

from __future__ import annotations

from pathlib import Path

import ipywidgets as widgets

from rheoline.errors import RheolineError, ScenarioError
from rheoline.scenario.files import (
    MAX_FILE_BYTES,
    Axis,
    load_scenarios,
    loads_scenarios,
    parse_scenarios,
    save_scenarios,
    sweep_points,
)
from rheoline.scenario.workspace import Workspace
from rheoline.units import MMHG
from rheoline.widgets.base import _STYLE, View, labelled
from rheoline.widgets.compare_view import sized_part_index
from rheoline.widgets.style import flag_html, user_text

__all__ = [
    "FilesView",
    "scenario_data",
    "apply_scenarios",
    "descriptions_from_scenario",
    "MAX_LOADED_CANDIDATES",
]

#: Most comparison candidates a loaded file fills in.
MAX_LOADED_CANDIDATES = 7


def _q(value, unit):
    return f"{float(value):.6g} {unit}"


def _part_table(description: dict, tolerance_percent: float = 0.0) -> dict:
    """A part description as a scenario file's part table (quantities with units)."""
    kind = description["type"]
    if "raw" in description:
        return dict(description["raw"])
    out = {"type": kind}
    if description.get("label"):
        out["label"] = description["label"]
    if kind in ("catheter", "needle"):
        out["gauge"] = int(description["gauge"])
    if kind == "needle" and description.get("wall"):
        out["wall"] = description["wall"]
    if kind == "cannula":
        out["french"] = float(description["french"])
    if description.get("inner_diameter_mm") and kind != "needle":
        out["inner_diameter"] = _q(description["inner_diameter_mm"], "mm")
    if description.get("length_cm"):
        out["length"] = _q(description["length_cm"], "cm")
    if kind == "fitting":
        out["k"] = float(description.get("k", 0.0))
    if tolerance_percent:
        out["tolerance"] = {"inner_diameter": f"{float(tolerance_percent):.6g} %"}
    return out


def _fluid_fields(controls):
    from rheoline.widgets.line_view import fluid_options

    fluid = controls["fluid"].value
    out = {"fluid": fluid, "temperature": _q(controls["temperature_c"].value, "degC")}
    options = fluid_options(fluid)
    if "hematocrit" in options:
        out["hematocrit"] = float(controls["hematocrit"].value)
    if "mass_fraction" in options:
        out["mass_fraction"] = float(controls["mass_fraction"].value)
    return out


def scenario_data(line_view=None, compare_view=None, title="Saved from the rheoline views"):
    """What is on screen as a scenario file's data (a dict ready for TOML)."""
    scenarios = []
    if line_view is not None:
        c = line_view.controls
        sc = {
            "name": "line view",
            **_fluid_fields(c),
            "back_pressure": _q(c["back_pressure_mmhg"].value, "mmHg"),
        }
        if c["mode"].value == "set flow (pump)":  # a pump drive: no head, as in the views
            sc["flow"] = _q(c["flow_ml_min"].value, "mL/min")
            if c["pressure_limit_mmhg"].value > 0:
                sc["pressure_limit"] = _q(c["pressure_limit_mmhg"].value, "mmHg")
        else:
            sc["head"] = _q(c["head_cm"].value, "cm")
            sc["source_pressure"] = _q(c["source_pressure_mmhg"].value, "mmHg")
        sc["part"] = [_part_table(d) for d in line_view.editor.descriptions()]
        scenarios.append(sc)
    if compare_view is not None:
        c = compare_view.controls
        shared = {
            **_fluid_fields(c),
            "head": _q(c["head_cm"].value, "cm"),
            "source_pressure": _q(c["source_pressure_mmhg"].value, "mmHg"),
            "back_pressure": _q(c["back_pressure_mmhg"].value, "mmHg"),
        }
        bore_tol = c["bore_tolerance_percent"].value
        temperature_tol = c["temperature_tolerance_c"].value
        for candidate in compare_view.candidates:
            sized = sized_part_index(candidate["parts"])
            parts = [
                _part_table(d, bore_tol if i == sized else 0.0)
                for i, d in enumerate(candidate["parts"])
            ]
            sc = {"name": f"compare: {candidate['name']}", **shared, "part": parts}
            if temperature_tol:
                sc["tolerance"] = {"temperature": _q(temperature_tol, "degC")}
            scenarios.append(sc)
    return {"format_version": 1, "title": title, "scenario": scenarios}


def descriptions_from_scenario(scenario, point=None):
    """Part descriptions of one scenario at one sweep point (``sweep_points`` entry)."""
    from rheoline.model import parts as model_parts

    point = point or {}
    out = []
    for j, spec in enumerate(scenario.parts, start=1):
        values = {
            k: (
                point[f"part[{j}].{k}"][0]
                if f"part[{j}].{k}" in point
                else (v.values[0] if isinstance(v, Axis) else v)
            )
            for k, v in spec.values.items()
        }
        label = "" if spec.name == spec.type else spec.name
        d = {"type": spec.type}
        if label:
            d["label"] = label
        raw = {"type": spec.type, **({"label": label} if label else {})}
        if spec.type in ("catheter", "needle"):
            d["gauge"] = int(values["gauge"])
            if spec.type == "needle" and "wall" in values:
                d["wall"] = values["wall"]
        if spec.type == "cannula":
            d["french"] = float(values["french"])
        if "inner_diameter" in values:
            d["inner_diameter_mm"] = values["inner_diameter"] * 1e3
        if "length" in values:
            d["length_cm"] = values["length"] * 1e2
        if spec.type == "fitting":
            d["k"] = float(values.get("k", 0.0))
        if spec.type == "set":
            d["part"] = model_parts.extension_set(
                values["kind"], length=values.get("length"), name=label or None
            )
            d["raw"] = {**raw, "kind": values["kind"]}
            if "length" in values:
                d["raw"]["length"] = _q(values["length"], "m")
        if spec.type == "measured":
            d["part"] = model_parts.MeasuredPart(
                flows=values["flows"], pressure_drops=values["pressure_drops"], name=label or None
            )
            d["raw"] = {
                **raw,
                "flows": [_q(q * 6e7, "mL/min") for q in values["flows"]],
                "pressure_drops": [_q(p / MMHG, "mmHg") for p in values["pressure_drops"]],
            }
        out.append(d)
    return out


def _first(values, key, default=None):
    v = values.get(key, default)
    return v.values[0] if isinstance(v, Axis) else v


def _set_shared(controls, values):
    """Set the fluid and drive controls a view shares from a scenario's values."""
    fluid = _first(values, "fluid")
    if fluid in controls["fluid"].options:
        controls["fluid"].value = fluid
    controls["temperature_c"].value = _first(values, "temperature", 22.0)
    for key in ("hematocrit", "mass_fraction"):
        if _first(values, key) is not None:
            controls[key].value = _first(values, key)
    controls["head_cm"].value = _first(values, "head", 0.0) * 100
    controls["back_pressure_mmhg"].value = _first(values, "back_pressure", 0.0) / MMHG
    if "source_pressure_mmhg" in controls and "flow" not in values:
        controls["source_pressure_mmhg"].value = _first(values, "source_pressure", 0.0) / MMHG


def apply_scenarios(sset, line_view=None, compare_view=None):
    """Fill the views from a scenario set; returns a short account in words."""
    if not sset.scenarios:
        raise RheolineError("the scenario file holds no scenario; add a [[scenario]] table")
    notes = []
    first = sset.scenarios[0]
    values = first.values
    if line_view is not None:
        c = line_view.controls
        line_view._paused = True
        try:
            line_view.editor.set_descriptions(descriptions_from_scenario(first), notify=False)
            _set_shared(c, values)
            if first.mode == "flow":
                c["mode"].value = "set flow (pump)"
                c["flow_ml_min"].value = _first(values, "flow") * 6e7
                c["pressure_limit_mmhg"].value = _first(values, "pressure_limit", 0.0) / MMHG
            else:
                c["mode"].value = "gravity and pressure"
        finally:
            line_view._paused = False
        line_view._run(lambda: line_view._refresh({"solve"}))
        notes.append(
            f"line view: scenario '{first.name}'"
            + (" (first point of its sweep)" if first.axes else "")
        )
    if compare_view is not None:
        candidates = []
        ours = [sc for sc in sset.scenarios if sc.name.startswith("compare: ")]
        for sc in ours or sset.scenarios:
            part_axes = [p for p, _ in sc.axes if p.startswith("part[")]
            points = sweep_points(sc) if part_axes else [{}]
            seen = set()
            for point in points:
                key = tuple(point.get(p, (None, None))[1] for p in part_axes)
                if key in seen:
                    continue
                seen.add(key)
                name = sc.name.removeprefix("compare: ")
                name += f" {' '.join(str(k) for k in key)}" if part_axes else ""
                candidates.append({"name": name, "parts": descriptions_from_scenario(sc, point)})
        if len(candidates) > MAX_LOADED_CANDIDATES:
            notes.append(
                f"comparison: the first {MAX_LOADED_CANDIDATES} of {len(candidates)} candidates"
            )
            candidates = candidates[:MAX_LOADED_CANDIDATES]
        drive = next((sc for sc in sset.scenarios if sc.mode != "flow"), None)
        compare_view._paused = True
        try:
            if drive is not None:
                _set_shared(compare_view.controls, drive.values)
        finally:
            compare_view._paused = False
        compare_view.set_candidates(candidates)
        notes.append(f"comparison: {len(candidates)} candidates")
    return "; ".join(notes)


class FilesView(View):
    """Load and save scenario files, write review packs, for the views it is given.

    Parameters
    ----------
    line_view, compare_view : View, optional
        The views whose state is saved and which a loaded file fills.
    workspace : str or os.PathLike, optional
        The folder every load, save and pack stays in (default
        :func:`rheoline.widgets.serve.workspace_folder`: the launcher's choice, else
        ``./rheoline-workspace``); created when the first file is written.
    """

    title = "Files"

    def __init__(self, line_view=None, compare_view=None, workspace=None):
        super().__init__()
        from rheoline.widgets.serve import workspace_folder

        self.line_view, self.compare_view = line_view, compare_view
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
            description="replace an existing file or an earlier review pack",
            indent=False,
        )
        self.load_button = labelled(
            widgets.Button(description="load scenario file", icon="folder-open"), "rl-load"
        )
        self.save_button = labelled(
            widgets.Button(description="save as scenario file", icon="save"), "rl-save"
        )
        self.pack_button = labelled(
            widgets.Button(description="write review pack", icon="file-export"), "rl-pack"
        )
        self.upload = widgets.FileUpload(
            accept=".toml,.json", multiple=False, description="upload a scenario file"
        )
        self.status = labelled(widgets.HTML(), "rl-files-status")
        self.load_button.on_click(lambda b: self._run(self.load))
        self.save_button.on_click(lambda b: self._run(self.save))
        self.pack_button.on_click(lambda b: self._run(self.write_pack))
        self.upload.observe(lambda change: self._run(self._uploaded), names="value")
        self._finish(
            [
                widgets.HTML(
                    "<b>Scenario files</b> (TOML or JSON, as <code>rheoline run</code> "
                    "reads them) and <b>review packs</b> (CSV, XLSX, HTML) of what the "
                    "line and comparison views show."
                ),
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
                self.status,
            ]
        )

    def current_set(self):
        """What is on screen as a validated scenario set."""
        return parse_scenarios(scenario_data(self.line_view, self.compare_view), source="<views>")

    def _say(self, level, text):
        self.status.value = flag_html(level, text)

    def load(self, path=None):
        """Load the scenario file at ``path`` (default: the path field) into the views.

        ``path`` is taken inside the workspace folder; one outside it is refused unread.
        """
        path = self.workspace.resolve(path or self.controls["scenario_path"].value)
        sset = load_scenarios(path)
        account = apply_scenarios(sset, self.line_view, self.compare_view)
        self._say("ok", f"loaded {self.workspace.relative(path)}: {account}")
        return sset

    def _uploaded(self):
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
        account = apply_scenarios(sset, self.line_view, self.compare_view)
        self._say("ok", f"loaded {name}: {account}")

    def save(self, path=None):
        """Save the views' set as a scenario file in the workspace; returns its path."""
        path = self._target(path or self.controls["scenario_path"].value)
        written = save_scenarios(self.current_set(), path, force=self.controls["overwrite"].value)
        shown = self.workspace.relative(written)
        self._say("ok", f"saved {len(self.current_set().scenarios)} scenarios to {shown}")
        return written

    def write_pack(self, folder=None):
        """Solve the views' set with the scenario layer and write its review pack."""
        from rheoline.scenario.compare import run_scenarios
        from rheoline.scenario.export import write_pack

        folder = self._target(folder or self.controls["pack_path"].value)
        run = run_scenarios(self.current_set())
        written = write_pack(run, folder, force=self.controls["overwrite"].value)
        shown = self.workspace.relative(written)
        self._say("ok", f"wrote the review pack to {shown} ({len(run.table)} cases)")
        return written

    def _target(self, user_path) -> Path:
        """Where to write ``user_path``: inside the workspace (made if missing), or refused."""
        path = self.workspace.resolve(user_path, for_writing=True)
        self.workspace.create()
        return path
