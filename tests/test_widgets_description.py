"""The views edit the one scenario description and never drop input (issue 11).

Loading any file into the app and saving it again gives a file that loads to the same
scenarios; a pump case shows as a pump case with its limit; what a view cannot show, its
status line names; an edit changes the field edited and nothing else; and no view reaches
into another view's private attributes.  Everything goes through the views' public API
(the files view's load and save, controls set as a user sets them).
"""

from __future__ import annotations

import ast
import html
import re
import shutil
from dataclasses import replace
from pathlib import Path

import pytest

import rheoline
from rheoline.scenario.files import example_names, example_path, load_scenarios
from rheoline.units import MMHG

pytest.importorskip("ipywidgets")

WIDGETS_DIR = Path(rheoline.__file__).parent / "widgets"

# Invented demo file: a pump case with a limit, sweeps, scenario and part tolerances, a
# delivery, a vein, and part fields no control of the views shows.
RICH = """\
format_version = 1
title = "Pump, sweeps and tolerances (invented)"
notes = "A file the views cannot show all of at once."

[[scenario]]
name = "pump with a limit"
notes = "A pump against its occlusion limit."
fluid = "whole-blood"
hematocrit = 0.40
temperature = "37 degC"
flow = ["50 mL/min", "150 mL/min"]
pressure_limit = "300 mmHg"
back_pressure = "8 mmHg"
volume = "250 mL"
tolerance = { temperature = "1 degC", hematocrit = 0.02, viscosity = "5 %", distribution = "normal", samples = 500, seed = 3 }

[[scenario.part]]
type = "tube"
label = "pump line"
inner_diameter = "1.5 mm"
length = "2 m"
roughness = "0.0015 mm"
tolerance = { inner_diameter = "0.02 mm", length = "1 %" }

[[scenario.part]]
type = "needle"
gauge = [18, 20]
wall = "thin"
tolerance = { inner_diameter = "3 %" }

[[scenario]]
name = "bag with a vein"
fluid = "glycerol-water"
mass_fraction = 0.3
head = { start = "60 cm", stop = "120 cm", count = 3 }
source_pressure = "200 mmHg"
source_pressure_when_empty = "100 mmHg"
volume = "500 mL"
vein_diameter = "4 mm"

[[scenario.part]]
type = "set"
kind = "standard-extension"

[[scenario.part]]
type = "fitting"
label = "stopcock"
equivalent_length = "0.2 m"
inner_diameter = "2.5 mm"

[[scenario.part]]
type = "catheter"
gauge = 20
tolerance = { inner_diameter = "4 %" }
"""


@pytest.fixture()
def app(tmp_path):
    from rheoline.widgets.app import build_app

    built = build_app(workspace=tmp_path)  # the files view reads and writes there only
    assert built.failures == {}
    return built


@pytest.fixture()
def rich_file(tmp_path):
    path = tmp_path / "rich.toml"
    path.write_text(RICH, encoding="utf-8")
    return path


def _example(tmp_path, name):
    """A shipped example, copied into the app's workspace."""
    path = tmp_path / f"{name}.toml"
    shutil.copy(example_path(name), path)
    return path


def _status(view):
    return html.unescape(view.status.value)


# --- load -> save -> load ------------------------------------------------------------------
@pytest.mark.parametrize("name", [*example_names(), "rich"])
def test_a_file_survives_app_load_save_load_unchanged(app, name, rich_file, tmp_path):
    path = rich_file if name == "rich" else _example(tmp_path, name)
    files = app.views["files"]
    loaded = files.load(path)
    saved = files.save(tmp_path / "saved.toml")
    assert load_scenarios(saved) == load_scenarios(example_path(name) if name != "rich" else path)
    assert load_scenarios(saved) == loaded
    # and again: a saved file loads and saves to itself
    files.load(saved)
    again = files.save(tmp_path / "again.toml")
    assert load_scenarios(again) == loaded


def test_the_rich_file_keeps_what_no_control_shows(rich_file):
    # the check above means something only if the file holds those fields
    sset = load_scenarios(rich_file)
    pump, bag = sset.scenarios
    assert pump.mode == "flow" and pump.drive.pressure_limit.written == "300 mmHg"
    assert pump.tolerance.distribution.si == "normal"
    assert pump.parts[0].tolerance["inner_diameter"].kind == "absolute"
    assert pump.parts[1].fields["wall"].si == "thin"
    assert [p for p, _ in bag.axes] == ["head"] and bag.site is not None


# --- a pump case is a pump case ----------------------------------------------------------
def test_a_pump_case_loads_as_a_pump_case_with_its_limit(app, rich_file):
    from rheoline.scenario.compare import run_scenarios

    app.views["files"].load(rich_file)
    line = app.views["line"]
    c = line.controls
    assert line.scenario.name == "pump with a limit"
    assert c["mode"].value == "set flow (pump)"
    assert c["flow_ml_min"].value == pytest.approx(50.0)
    assert c["pressure_limit_mmhg"].value == pytest.approx(300.0)
    assert c["head_cm"].disabled and not c["flow_ml_min"].disabled
    # the view's numbers are the scenario run's for the case it shows (the first point)
    table = run_scenarios(load_scenarios(rich_file)).table
    row = table[table["scenario"] == "pump with a limit"].iloc[0]
    assert row["point"] == "50 mL/min, 18G"
    shown = line.result.required_pressure / MMHG
    assert shown == pytest.approx(row["required pressure [mmHg]"], rel=1e-9)
    assert "required pump pressure" in line.results.value


# --- status lines --------------------------------------------------------------------------
def test_status_lines_name_what_each_view_does_not_show(app, rich_file):
    files = app.views["files"]
    files.load(rich_file)
    line, compare = app.views["line"], app.views["compare"]
    text = _status(line)
    assert "[ok]" not in text and "[i] note" in text
    for words in (
        "flow 50 mL/min (1 of 2)",
        "part[2].gauge 18G (1 of 2)",
        "volume 250 mL",
        "tolerance.temperature 1 degC",
        "tolerance.distribution normal",
        "tolerance.seed 3",
    ):
        assert words in text, words
    extras = [row.extra.value for row in line.editor.rows]
    assert "roughness 0.0015 mm" in extras[0] and "inner_diameter 0.02 mm" in extras[0]
    assert "wall thin" in extras[1] and "gauge 18G, 20G (shown at 18G)" in extras[1]
    # the comparison: the pump is not a candidate, the bag is drawn without its vein
    text = _status(compare)
    assert "pump scenarios, not compared here: 'pump with a limit'" in text
    assert "head 60 cm (1 of 3)" in text
    for words in ("volume 500 mL", "source_pressure_when_empty 100 mmHg", "vein_diameter 4 mm"):
        assert words in text, words
    assert "[ok]" not in _status(files) and "[i] note" in _status(files)


def test_a_file_the_views_show_whole_reports_ok(app, tmp_path):
    files = app.views["files"]
    files.load(_example(tmp_path, "minimal"))
    assert "[ok] ok" in _status(files) and "[ok] ok" in _status(app.views["line"])


def test_a_status_replaces_the_previous_one(app, tmp_path):
    files = app.views["files"]
    files.load(_example(tmp_path, "minimal"))
    assert "[ok]" in _status(files)
    bad = tmp_path / "bad.toml"
    bad.write_text('format_version = 1\n[[scenario]]\nname = "x"\nfluid = "salty"\n')
    files.controls["scenario_path"].value = str(bad)
    files.load_button.click()
    assert _status(files).count("<div") == 1
    assert "[ok]" not in _status(files) and "nothing was loaded" in _status(files)
    # the views still show the file loaded before
    assert app.views["line"].scenario.name == "18G on a gravity set"


# --- edits ---------------------------------------------------------------------------------
def test_an_edit_changes_the_field_edited_and_nothing_else(app, rich_file, tmp_path):
    files, line = app.views["files"], app.views["line"]
    loaded = files.load(rich_file)
    line.set_control("scenario", "bag with a vein")
    line.set_control("head_cm", 90.0)
    line.editor.rows[2].size.value = 18  # the catheter: 20G -> 18G
    assert line.messages.value == "" or "[X]" not in line.messages.value
    saved = load_scenarios(files.save(tmp_path / "edited.toml"))
    pump, bag = loaded.scenarios
    head = saved.scenarios[1].drive.head
    assert (head.si, head.written) == (0.9, "90 cm")
    gauge = saved.scenarios[1].parts[2].fields["gauge"]
    assert (gauge.si, gauge.written) == (18, 18)
    catheter = replace(bag.parts[2], fields={"gauge": gauge})
    expected = replace(
        bag,
        drive=replace(bag.drive, head=head),
        parts=(*bag.parts[:2], catheter),
    )
    assert saved.scenarios == (pump, expected)
    assert saved.title == loaded.title and saved.notes == loaded.notes


def test_an_edit_a_file_could_not_hold_is_refused_with_the_readers_message(app, tmp_path):
    files, line = app.views["files"], app.views["line"]
    loaded = files.load(_example(tmp_path, "bag-delivery"))
    line.set_control("mode", "set flow (pump)")  # head_when_empty needs a head
    assert "[X] not computed" in line.messages.value
    assert "head_when_empty" in line.messages.value
    assert files.current_set() == loaded


def test_the_comparisons_shared_controls_set_every_scenario_drawn(app, tmp_path):
    files, compare = app.views["files"], app.views["compare"]
    loaded = files.load(_example(tmp_path, "rapid-transfusion-cart"))
    compare.set_control("bore_tolerance_percent", 2.0)
    assert "[X]" not in compare.messages.value
    edited = files.current_set()
    drawn = {c.scenario for c in compare.candidates}
    for before, after in zip(loaded.scenarios, edited.scenarios, strict=True):
        width = after.parts[-1].tolerance.get("inner_diameter")
        if before.name in drawn:
            assert (width.kind, width.width, width.written) == ("relative", 0.02, "2 %")
        else:  # the pump and the scenario beyond the seven drawn are not touched
            assert after == before
    # every candidate now has a band, and the table its p5-p95 column
    assert all(compare.band(c) is not None for c in compare.candidates)
    assert "flow p5-p95 [mL/min]" in compare.table.value


def test_removing_a_candidate_of_a_sweep_removes_that_point(app, tmp_path):
    files, compare = app.views["files"], app.views["compare"]
    files.load(_example(tmp_path, "bench-sweep"))
    compare.remove_candidates(["water, gauge x height 16G"])
    gauge = files.current_set().scenarios[0].parts[2].fields["gauge"]
    assert gauge.values == (14, 18, 20, 22, 24) and gauge.written == (14, 18, 20, 22, 24)
    assert [c.name for c in compare.candidates][:2] == [
        "water, gauge x height 14G",
        "water, gauge x height 18G",
    ]


def test_the_standalone_views_keep_their_own_description():
    from rheoline.widgets.compare_view import ComparisonView
    from rheoline.widgets.line_view import LineView

    line = LineView(head_cm=120.0, back_pressure_mmhg=5.0)
    drive = line.scenario.drive
    assert (drive.head.written, drive.back_pressure.written, drive.source_pressure) == (
        "120 cm",
        "5 mmHg",
        None,
    )
    compare = ComparisonView(bore_tolerance_percent=5.0)
    assert [c.name for c in compare.candidates] == ["set + 16G", "set + 18G", "set + 20G"]
    widths = [c.parts[-1].tolerance["inner_diameter"].written for c in compare.candidates]
    assert widths == ["5 %"] * 3


# --- views call each other only through public methods -----------------------------------
def _private_reaches(tree):
    """``name._attr`` where ``name`` is not ``self`` or ``cls`` (dunders aside)."""
    out = []
    for node in ast.walk(tree):
        if not isinstance(node, ast.Attribute) or not node.attr.startswith("_"):
            continue
        if re.fullmatch(r"__\w+__", node.attr):
            continue
        owner = node.value
        if isinstance(owner, ast.Name) and owner.id in ("self", "cls"):
            continue
        if isinstance(owner, ast.Call) and getattr(owner.func, "id", None) == "super":
            continue
        out.append(f"line {node.lineno}: {ast.unparse(node)}")
    return out


@pytest.mark.parametrize("module", sorted(p.name for p in WIDGETS_DIR.glob("*.py")))
def test_no_view_reaches_into_another_views_private_attributes(module):
    tree = ast.parse((WIDGETS_DIR / module).read_text())
    assert _private_reaches(tree) == []


def test_the_private_reach_check_finds_one():
    tree = ast.parse("def f(self, other):\n    other.view._paused = True\n    self._x = 1\n")
    assert _private_reaches(tree) == ["line 2: other.view._paused"]
