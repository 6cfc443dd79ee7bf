"""The widget views: they build, follow their controls with the layers' own numbers,
carry the caution banner, flag in words and symbols, and hold no physics."""

from __future__ import annotations

import ast
import html
from pathlib import Path

import numpy as np
import pytest

import rheoline
from rheoline.units import ML_PER_H, ML_PER_MIN, MMHG
from rheoline.widgets import style
from rheoline.widgets.banner import BANNER_CLASS

WIDGETS_DIR = Path(rheoline.__file__).parent / "widgets"


# --- the blood and vessel view ---------------------------------------------------------------
@pytest.fixture()
def blood_view():
    from rheoline.widgets.blood_view import BloodVesselView

    return BloodVesselView()


def test_blood_view_builds_with_banner_first_and_figures_filled(blood_view):
    assert BANNER_CLASS in blood_view.children[0]._dom_classes
    for fig in blood_view.figures.values():
        assert len(fig.data[0].y) > 10 and len(fig.data[1].y) == 1
    assert blood_view.messages.value == ""


def test_blood_view_hematocrit_change_redraws_with_the_layers_values(blood_view):
    from rheoline.widgets.blood_view import FAHRAEUS_DIAMETERS, VISCOSITY_AXES

    blood_view.set_control("hematocrit", 0.30)
    assert np.isfinite(blood_view.last_update_seconds)
    fahraeus = blood_view.figures["fahraeus"].data[0]
    expected = rheoline.pries_1992_relative_viscosity(FAHRAEUS_DIAMETERS, 0.30)
    assert np.allclose(fahraeus.y, expected, rtol=1e-12)
    blood_view.set_control("axis", "temperature")
    grid = VISCOSITY_AXES["temperature"][1]
    expected = rheoline.blood_viscosity(0.30, grid, 100.0) * 1e3  # mPa s on the chart
    assert np.allclose(blood_view.figures["viscosity"].data[0].y, expected, rtol=1e-12)
    assert blood_view.figures["viscosity"].layout.xaxis.title.text == "temperature [degC]"


def test_blood_view_vessel_radius_moves_the_resistance_point(blood_view):
    blood_view.set_control("vessel_radius_um", 25.0)
    vessel = rheoline.Vessel(radius=25e-6, length=1e-3, hematocrit=0.45, temperature_c=37.0)
    point = blood_view.figures["resistance"].data[1]
    assert point.x == (25.0,)
    # chart unit mmHg min/mL: 1 mmHg min/mL = 133.322387415 Pa * 60 s / 1e-6 m^3
    assert point.y[0] == pytest.approx(vessel.resistance / (MMHG * 60 / 1e-6), rel=1e-12)


def test_blood_view_resistance_calculator_uses_the_hemodynamics_layer(blood_view):
    from rheoline.model import hemodynamics

    c = blood_view.controls
    c["upstream_mmhg"].value, c["downstream_mmhg"].value = 25.0, 10.0
    blood_view.set_control("bed", "pulmonary")
    # (25 - 10) mmHg / 5 L/min = 3 Wood units, worked by hand
    assert "PVR <span class='rl-wood'>3.00 WU</span>" in blood_view.calculator_output.value
    expected = hemodynamics.pulmonary_vascular_resistance(25.0, 10.0, 5.0).dyn_s_per_cm5
    assert style.significant(expected) in blood_view.calculator_output.value


def test_a_bad_input_is_shown_as_a_flag_and_keeps_the_last_figure(blood_view):
    before = blood_view.figures["fahraeus"].data[0].y
    blood_view.controls["cardiac_output_l_min"].value = 0.0
    assert (
        "[X]" in blood_view.messages.value and "cardiac_output_l_min" in blood_view.messages.value
    )
    assert np.array_equal(blood_view.figures["fahraeus"].data[0].y, before)


# --- no physics in the widget layer --------------------------------------------------------
FORBIDDEN_IN_WIDGETS = {
    "scipy",
    "rheoline.model.lumen",
    "rheoline.model.losses",
    "rheoline.model.rheology",
    "rheoline.model.blood",
    "rheoline.model.viscosity",
}


@pytest.mark.parametrize("module", sorted(p.name for p in WIDGETS_DIR.glob("*.py")))
def test_widget_modules_call_the_layers_and_import_no_physics(module):
    tree = ast.parse((WIDGETS_DIR / module).read_text())
    imported = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            imported |= {alias.name for alias in node.names}
        elif isinstance(node, ast.ImportFrom) and node.module:
            imported.add(node.module)
    bad = {
        name
        for name in imported
        if any(name == f or name.startswith(f + ".") for f in FORBIDDEN_IN_WIDGETS)
    }
    assert not bad, f"{module} imports physics modules directly: {sorted(bad)}"
    # no numpy maths beyond grids and array plumbing
    maths = {"exp", "log", "log10", "sqrt", "power", "sinh", "cosh", "tanh"}
    calls = {
        node.attr
        for node in ast.walk(tree)
        if isinstance(node, ast.Attribute)
        and isinstance(node.value, ast.Name)
        and node.value.id == "np"
    }
    assert not calls & maths, f"{module} does maths itself: {sorted(calls & maths)}"


def test_the_model_layer_never_imports_widget_libraries():
    model_dir = Path(rheoline.__file__).parent / "model"
    for path in model_dir.glob("*.py"):
        text = path.read_text()
        for library in ("ipywidgets", "plotly", "anywidget"):
            assert f"import {library}" not in text and f"from {library}" not in text, path


# --- the line view -------------------------------------------------------------------------
def _api_line(gauge=18):
    return rheoline.Line(
        [rheoline.Tube(inner_diameter=3.0e-3, length=1.8), rheoline.Catheter(gauge=gauge)]
    )


@pytest.fixture()
def line_view():
    from rheoline.widgets.line_view import LineView

    return LineView()


def test_line_view_starts_with_the_apis_numbers_in_its_figures(line_view):
    saline = rheoline.fluid("saline-0.9", temperature_c=22.0)
    expected = _api_line().solve(saline, head=1.0)
    assert BANNER_CLASS in line_view.children[0]._dom_classes
    assert f"data-flow-ml-min='{expected.flow / ML_PER_MIN!r}'" in line_view.results.value
    budget = line_view.figures["budget"].data[0]
    drops = np.append(expected.part_pressure_drops, expected.exit_pressure_drop) / MMHG
    assert np.allclose(budget.x, drops, rtol=1e-12)
    assert budget.y[-1] == "exit" and "(dominant)" in "".join(budget.text)


def test_line_view_gauge_change_updates_figures_to_the_apis_values(line_view):
    row = line_view.editor.rows[1]
    row.size.value = 14
    assert np.isfinite(line_view.last_update_seconds)
    saline = rheoline.fluid("saline-0.9", temperature_c=22.0)
    expected = _api_line(14).solve(saline, head=1.0)
    assert line_view.result.flow == pytest.approx(expected.flow, rel=1e-12)
    heads = np.linspace(0.0, 2.0, 41)
    curve = _api_line(14).solve(saline, head=heads).flow / ML_PER_MIN
    assert np.allclose(line_view.figures["drive"].data[0].y, curve, rtol=1e-12)
    assert line_view.figures["drive"].data[1].y == pytest.approx([expected.flow / ML_PER_MIN])


def test_line_view_pump_mode_shows_the_required_pressure_and_the_limit(line_view):
    line_view.controls["pressure_limit_mmhg"].value = 50.0
    line_view.controls["fluid"].value = "packed-red-cells"
    line_view.set_control("mode", "set flow (pump)")
    cells = rheoline.fluid("packed-red-cells", temperature_c=22.0, hematocrit=0.45)
    expected = _api_line().solve(cells, flow=100.0 * ML_PER_MIN, pressure_limit=50.0 * MMHG)
    assert line_view.result.required_pressure == pytest.approx(
        expected.required_pressure, rel=1e-12
    )
    assert expected.exceeds_pressure_limit
    assert "[X] limit exceeded" in line_view.results.value
    assert line_view.figures["drive"].data[2].y == (50.0, 50.0)
    assert line_view.figures["drive"].layout.yaxis.title.text.endswith("[mmHg]")
    assert not line_view.controls["hematocrit"].disabled  # blood: the hematocrit counts


def test_line_view_every_number_shown_carries_a_unit(line_view):
    import re

    text = re.sub(r"<[^>]+>", " ", line_view.results.value)
    text = re.sub(
        r"\d+G\b|Re \d+-\d+|\(Re up to \d+\)|Giersiepen 1990|Churchill 1977|"
        r"Shah 1978|\d+\. ",
        " ",
        text,
    )
    for match in re.finditer(r"(-?\d[\d,.e+-]*)\s*(\S+)", text):
        number, after = match.groups()
        assert (
            after.strip("(),;") in {"mL/min", "mL/h", "mmHg", "kPa", "Pa", "%"}
            or "Reynolds" in text[max(0, match.start() - 30) : match.start()]
        ), (number, after)


def test_line_view_added_and_removed_parts_reach_the_line(line_view):
    from rheoline.widgets.parts_editor import part_spec

    line_view.editor.add(part_spec("fitting", k=2.0))
    assert [p.name for p in line_view.line().parts][-1].lower().startswith("fitting")
    assert len(line_view.figures["budget"].data[0].y) == 4  # 3 parts and the exit
    line_view.editor.remove(line_view.editor.rows[-1])
    assert len(line_view.figures["budget"].data[0].y) == 3


def test_line_view_bad_part_shows_an_error_flag_not_a_traceback(line_view):
    line_view.editor.rows[1].bore.value = 5.0  # wider than an 18G catheter's wall allows
    assert "[X] not computed" in line_view.messages.value
    assert "inner_diameter" in line_view.messages.value
    assert "no result for these inputs" in line_view.results.value  # no stale number


# --- the comparison view ---------------------------------------------------------------------
@pytest.fixture()
def compare_view():
    from rheoline.widgets.compare_view import ComparisonView

    return ComparisonView(points=50)


def test_comparison_curves_are_the_line_engines_flows(compare_view):
    saline = rheoline.fluid("saline-0.9", temperature_c=22.0)
    heads_cm = compare_view.sweep_values()
    assert BANNER_CLASS in compare_view.children[0]._dom_classes
    for i, gauge in enumerate((16, 18, 20)):
        trace = compare_view.figures["curves"].data[3 + i]
        expected = _api_line(gauge).solve(saline, head=heads_cm / 100.0).flow / ML_PER_MIN
        assert trace.name == f"set + {gauge}G"
        assert np.allclose(trace.y, expected, rtol=1e-12)
    assert "rl-compare-flow" in compare_view.table.value


def test_comparison_band_brackets_the_curve_and_is_seeded(compare_view):
    compare_view.set_control("bore_tolerance_percent", 5.0)
    band = compare_view.figures["curves"].data[1]  # the 18G candidate's band
    curve = compare_view.figures["curves"].data[4]
    n = len(band.x) // 2
    upper, lower = np.asarray(band.y[:n]), np.asarray(band.y[n:])[::-1]
    nominal = np.interp(band.x[:n], curve.x, curve.y)
    assert np.all(lower[1:] < nominal[1:]) and np.all(nominal[1:] < upper[1:])
    first = np.array(band.y)
    compare_view.solver.clear()  # solve the band again from nothing: the same numbers
    compare_view.set_control("sweep_to", 150.0)
    compare_view.set_control("sweep_to", 200.0)
    assert np.array_equal(compare_view.figures["curves"].data[1].y, first)
    assert "p5-p95" in compare_view.figures["curves"].layout.title.text
    assert "flow p5-p95 [mL/min]" in compare_view.table.value


def test_comparison_adds_and_removes_candidates_solving_only_the_new_one(compare_view):
    from rheoline.widgets.parts_editor import part_spec

    compare_view.controls["sweep"].value = "bore"
    before = len(compare_view.solver.solved)
    compare_view.add_candidate("14G alone", [part_spec("catheter", gauge=14)])
    assert set(compare_view.solver.solved[before:]) == {"14G alone"}
    assert len(compare_view.figures["curves"].data) == 8
    assert compare_view.figures["curves"].layout.xaxis.title.text.startswith("inner diameter")
    compare_view.remove_candidates(["set + 16G", "set + 20G"])
    assert [t.name for t in compare_view.figures["curves"].data[2:]] == ["set + 18G", "14G alone"]


def test_comparison_temperature_sweep_uses_the_fluid_library(compare_view):
    compare_view.set_control("sweep", "temperature")
    temperatures = compare_view.sweep_values()
    saline = rheoline.fluid("saline-0.9", temperature_c=temperatures)
    expected = _api_line(18).solve(saline, head=1.0).flow / ML_PER_MIN
    assert np.allclose(compare_view.figures["curves"].data[4].y, expected, rtol=1e-12)


# --- files: scenario files and review packs ----------------------------------------------------
@pytest.fixture()
def app(tmp_path):
    from rheoline.widgets.app import build_app

    return build_app(workspace=tmp_path)  # the files tab reads and writes there only


def test_app_builds_every_view_with_a_banner(app):
    assert app.failures == {}
    for view in app.views.values():
        assert BANNER_CLASS in view.children[0]._dom_classes


def test_prepare_takes_what_is_alive_out_of_full_garbage_collections(app):
    import gc

    gc.unfreeze()  # an earlier test's freeze must not make this pass
    app.prepare()
    assert gc.get_freeze_count() == 0  # a notebook of the user's own: nothing frozen
    app.prepare(freeze=True)  # the served page's kernel
    assert gc.get_freeze_count() > 10_000  # modules, classes, the app: tens of thousands
    gc.unfreeze()


def test_saved_scenario_file_reruns_to_the_views_numbers(app, tmp_path):
    from rheoline.scenario.compare import run_scenarios
    from rheoline.scenario.files import load_scenarios

    files = app.views["files"]
    path = files.save(tmp_path / "views.toml")
    table = run_scenarios(load_scenarios(path)).table.set_index("case")
    line_flow = app.views["line"].result.flow / ML_PER_MIN
    assert table.loc["line view", "flow [mL/min]"] == pytest.approx(line_flow, rel=1e-6)
    for candidate in app.views["compare"].candidates:
        shown = app.views["compare"].operating_point(candidate).flow / ML_PER_MIN
        row = table.loc[candidate.name, "flow [mL/min]"]
        assert row == pytest.approx(shown, rel=1e-6)


def test_loading_an_example_file_fills_both_views(app, tmp_path):
    import shutil

    from rheoline.scenario.files import example_path

    shutil.copy(example_path("rapid-transfusion-cart"), tmp_path / "cart.toml")
    app.views["files"].load("cart.toml")
    line = app.views["line"]
    assert line.controls["back_pressure_mmhg"].value == pytest.approx(8.0)
    assert [p.type for p in line.editor.parts()] == ["set", "fitting", "catheter"]
    assert len(app.views["compare"].candidates) == 7
    # the comparison draws 7 of 9 candidates and no pump: the status names the others
    status = html.unescape(app.views["files"].status.value)
    assert "[i] note" in status and "[ok]" not in status
    assert "'18G bore tolerance, warm red cells, bag'" in status
    assert line.messages.value == "" or "[X]" not in line.messages.value


def test_review_pack_is_written_by_the_scenario_layer(app, tmp_path):
    from rheoline.scenario.export import PACK_FILES

    folder = app.views["files"].write_pack(tmp_path / "pack")
    assert {p.name for p in folder.iterdir()} >= set(PACK_FILES)
    with pytest.raises(rheoline.ScenarioError, match="exist"):
        app.views["files"].write_pack(tmp_path / "pack")


def test_a_bad_scenario_file_is_a_flag_in_the_files_view(app, tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text('format_version = 1\n[[scenario]]\nname = "x"\nfluid = "salty"\n')
    files = app.views["files"]
    files.controls["scenario_path"].value = str(bad)
    files.load_button.click()
    assert "[X] failed" in files.status.value and "fluid" in files.status.value
    assert files.messages.value == ""  # said once, in the status line


def test_bore_only_band_equals_solving_every_sample(compare_view):
    # The shortcut rests on flow rising strictly with the bore; solve all 2000 samples here
    # through the public API and compare the order statistics.
    from rheoline.widgets.compare_view import BAND_SAMPLES

    compare_view.set_control("bore_tolerance_percent", 5.0)
    candidate = compare_view.candidates[1]  # set + 18G
    x, p5, p95 = compare_view.band(candidate)
    scale, _ = compare_view.solver.samples(candidate.description)
    assert scale.shape == (BAND_SAMPLES, 1)
    heads = x[[0, len(x) // 2, -1]] / 100.0
    line = rheoline.Line(
        [
            rheoline.Tube(inner_diameter=3.0e-3, length=1.8),
            rheoline.Catheter(gauge=18, inner_diameter=1.0e-3 * scale),
        ]
    )
    flows = line.solve(rheoline.fluid("saline-0.9", temperature_c=22.0), head=heads).flow
    low, high = np.percentile(flows, [5.0, 95.0], axis=0, method="inverted_cdf")
    assert np.allclose(low, p5[[0, len(x) // 2, -1]], rtol=1e-9)
    assert np.allclose(high, p95[[0, len(x) // 2, -1]], rtol=1e-9)


def test_the_responsiveness_case_is_seven_candidates_with_bands():
    from rheoline.widgets.base import time_control_change
    from rheoline.widgets.compare_view import responsiveness_case

    view = responsiveness_case(points=20)
    assert len(view.candidates) == 7 and len(view.figures["curves"].data) == 14
    seconds = time_control_change(view, "temperature_c", 23.0)
    assert np.isfinite(seconds) and seconds > 0  # timed, not asserted (benchmarks/ time it)
    assert all(len(trace.y) == 40 for trace in view.figures["curves"].data[:7])


def test_line_view_flags_a_hemolysis_concern_for_blood_at_high_wall_stress():
    from rheoline.scenario.compare import HEMOLYSIS_CONCERN_STRESS
    from rheoline.widgets.line_view import LineView
    from rheoline.widgets.parts_editor import part_spec

    view = LineView(
        parts=[part_spec("needle", gauge=25)],
        fluid="packed-red-cells",
        temperature_c=37.0,
        hematocrit=0.65,
        mode="set flow (pump)",
        flow_ml_min=20.0,
        pressure_limit_mmhg=0.0,
    )
    assert view.result.max_wall_shear_stress > HEMOLYSIS_CONCERN_STRESS
    assert "hemolysis concern" in view.results.value and "[!]" in view.results.value


def _chart_trace(view, name, index, axis):
    """What the page receives for a chart's trace: the chart widget's synced state."""
    (output,) = view.charts[name].outputs
    return np.asarray(output["data"]["application/vnd.plotly.v1+json"]["data"][index][axis])


def test_app_sends_a_tabs_charts_only_when_the_tab_opens(app):
    blood = app.views["blood"]
    assert all(chart.outputs for chart in app.views["line"].charts.values())
    assert not any(chart.outputs for chart in blood.charts.values())  # nothing sent yet
    blood.set_control("hematocrit", 0.35)  # updates work before the tab opens
    app.tabs.selected_index = list(app.views).index("blood")
    from rheoline.widgets.blood_view import FAHRAEUS_DIAMETERS

    expected = rheoline.pries_1992_relative_viscosity(FAHRAEUS_DIAMETERS, 0.35)
    assert np.allclose(_chart_trace(blood, "fahraeus", 0, "y"), expected, rtol=1e-12)


def test_a_chart_never_shows_stale_data(app):
    # the page draws a chart from the chart's synced state alone; after every update that
    # state is the whole current figure (a FigureWidget kept its first state there and sent
    # changes as one-off messages, lost when its browser code started late)
    line = app.views["line"]
    fluid = rheoline.fluid("saline-0.9", temperature_c=22.0)  # the app's demo line
    demo = rheoline.Line(
        [rheoline.Tube(inner_diameter=3.0e-3, length=1.8), rheoline.Catheter(gauge=18)]
    )
    for head_cm in (80.0, 120.0, 95.0):
        line.set_control("head_cm", head_cm)
        result = demo.solve(fluid, head=head_cm / 100.0, source_pressure=0.0)
        budget = np.append(result.part_pressure_drops, result.exit_pressure_drop) / MMHG
        assert np.allclose(_chart_trace(line, "budget", 0, "x"), budget, rtol=1e-9)
        assert _chart_trace(line, "drive", 1, "y") == pytest.approx([result.flow / ML_PER_MIN])
    # a chart sent again with nothing changed sends nothing
    assert not line.charts["budget"].draw()


def test_the_line_views_line_joins_the_comparison(app):
    line, compare = app.views["line"], app.views["compare"]
    line.editor.rows[1].size.value = 16
    # the line view's scenario is in the comparison, edited as the line view edits it
    shared = next(c for c in compare.candidates if c.name == "line view")
    assert shared.parts[1].fields["gauge"].si == 16
    compare.add_line_button.click()  # a copy of it, to edit further in the line view
    added = compare.candidates[-1]
    assert added.name == "line view (2)" and added.parts[1].fields["gauge"].si == 16
    assert compare.operating_point(added).flow == pytest.approx(line.result.flow, rel=1e-12)


def test_no_view_shadows_an_ipywidgets_method():
    # App._compare once replaced ipywidgets' own Widget._compare and broke the page's sync
    import ipywidgets as widgets

    from rheoline.widgets.app import App
    from rheoline.widgets.base import View
    from rheoline.widgets.blood_view import BloodVesselView
    from rheoline.widgets.compare_view import ComparisonView
    from rheoline.widgets.files_view import FilesView
    from rheoline.widgets.line_view import LineView
    from rheoline.widgets.parts_editor import PartRow, PartsEditor

    inherited = set(dir(widgets.VBox)) | set(dir(widgets.HBox))
    allowed = {
        "__init__",
        "__doc__",
        "__module__",
        "__qualname__",
        "__firstlineno__",
        "__static_attributes__",
        "_trait_default_generators",
        "__annotations__",
        # set on every HasTraits subclass by traitlets' metaclass
        "_all_trait_default_generators",
        "_descriptors",
        "_instance_inits",
        "_static_immutable_initial_values",
        "_traits",
    }
    for cls in (
        App,
        View,
        LineView,
        ComparisonView,
        BloodVesselView,
        FilesView,
        PartsEditor,
        PartRow,
    ):
        clash = (set(vars(cls)) & inherited) - allowed
        assert not clash, f"{cls.__name__} shadows {sorted(clash)}"


def test_the_files_view_opens_every_shipped_example(app):
    from rheoline.scenario.files import load_scenarios
    from rheoline.scenario.reading import example_names, example_path

    files = app.views["files"]
    assert list(files.controls["example"].options) == list(example_names())
    for name in example_names():
        files.controls["example"].value = name
        files.example_button.click()
        assert app.document.scenario_set.scenarios == load_scenarios(example_path(name)).scenarios
        assert f"loaded the shipped example {name!r}" in html.unescape(files.status.value)


def test_a_files_status_replaces_the_one_before(app, tmp_path):
    files = app.views["files"]
    files.save("kept.toml")
    assert "[ok]" in files.status.value
    files.controls["scenario_path"].value = "kept.toml"
    files.save_button.click()  # exists, the box not ticked: refused
    status = html.unescape(files.status.value)
    assert "[ok]" not in status and "[X] failed" in status and "was not saved" in status
    files.controls["scenario_path"].value = "no-such-file.toml"
    files.load_button.click()
    status = html.unescape(files.status.value)
    assert status.count("[X] failed") == 1 and "kept.toml" not in status


@pytest.mark.parametrize("unit", ["mL/h", "L/min", "mL/s"])
def test_the_pump_flow_is_entered_and_shown_in_the_chosen_unit(unit):
    from rheoline.units import FLOW_UNITS
    from rheoline.widgets.line_view import LineView

    view = LineView(mode="set flow (pump)", flow_ml_min=100.0, pressure_limit_mmhg=0.0)
    view.set_control("flow_unit", unit)
    per = FLOW_UNITS[unit]  # m^3/s in one unit (NIST SP 811 litre and minute)
    box = view.controls["flow_ml_min"]
    assert box.description == f"set flow [{unit}]"
    assert box.value == pytest.approx(100.0 * ML_PER_MIN / per, rel=1e-11)  # same flow
    assert view.scenario.drive.flow.si == pytest.approx(100.0 * ML_PER_MIN, rel=1e-12)
    view.set_control("flow_ml_min", 2.0 * box.value)  # typed in the chosen unit
    assert view.scenario.drive.flow.si == pytest.approx(200.0 * ML_PER_MIN, rel=1e-9)
    assert view.scenario.drive.flow.written.endswith(unit)  # saved as the user wrote it
    assert view.result.flow == pytest.approx(200.0 * ML_PER_MIN, rel=1e-9)
    assert f" {unit}</span>" in view.results.value
    drive = view.figures["drive"]
    assert drive.layout.xaxis.title.text == f"flow [{unit}]"
    assert drive.data[1].x == pytest.approx([200.0 * ML_PER_MIN / per], rel=1e-9)


def test_a_gravity_lines_flow_is_shown_in_the_chosen_unit():
    from rheoline.widgets.line_view import LineView

    view = LineView()
    flow = view.result.flow
    view.set_control("flow_unit", "mL/h")
    assert view.figures["drive"].data[1].y == pytest.approx([flow / ML_PER_H], rel=1e-12)
    assert view.figures["drive"].layout.yaxis.title.text == "flow [mL/h]"
    assert f"{style.significant(flow / ML_PER_H)} mL/h</span>" in view.results.value


def test_the_line_view_draws_its_line_to_scale_with_each_parts_share():
    from rheoline.widgets.line_view import LineView

    view = LineView()  # the demo line: a 3.0 mm x 1.8 m set, then an 18G catheter
    api = rheoline.Line(
        [rheoline.Tube(inner_diameter=3.0e-3, length=1.8), rheoline.Catheter(gauge=18)]
    ).solve(rheoline.fluid("saline-0.9", temperature_c=22.0), head=1.0)
    drops = np.append(api.part_pressure_drops, api.exit_pressure_drop)
    shares = 100.0 * drops / drops.sum()
    fig = view.figures["drawing"]
    outlines = [t for t in fig.data if t.fill == "toself"]
    catheter = rheoline.Catheter(gauge=18)
    sizes = [
        (0.0, 180.0, 3.0),
        (180.0, 180.0 + catheter.length * 100, catheter.inner_diameter * 1e3),
    ]
    for trace, (start, end, bore) in zip(outlines, sizes, strict=True):
        assert min(trace.x) == pytest.approx(start) and max(trace.x) == pytest.approx(end)
        assert max(trace.y) - min(trace.y) == pytest.approx(bore)  # the bore across, to scale
    labels = [a.text for a in fig.layout.annotations]
    names = ["1. administration set", "2. 18G catheter", "exit"]
    for name, share, label in zip(names, shares, labels, strict=True):
        assert label.replace("<b>", "").startswith(f"{name}: {style.significant(share)} %")
    dominant = int(np.argmax(drops))
    assert "(dominant)" in labels[dominant] and sum("(dominant)" in t for t in labels) == 1
    assert outlines[dominant].fillpattern.shape == "x"  # a pattern, not colour alone
    assert any(t.marker.symbol == "star" for t in fig.data if t.mode == "markers")
    view.set_control("head_cm", 150.0)  # a new drawing for new inputs reaches the chart
    (output,) = view.charts["drawing"].outputs
    assert output["data"]["application/vnd.plotly.v1+json"]["layout"]["annotations"][0]["text"]
    assert view.charts["drawing"].figure is view.figures["drawing"]


def test_the_comparison_shows_flows_in_the_chosen_unit(compare_view):
    first = compare_view.candidates[0]
    flow = compare_view.operating_point(first).flow
    curve = np.asarray(compare_view.figures["curves"].data[len(compare_view.candidates)].y)
    compare_view.set_control("flow_unit", "L/min")
    fig = compare_view.figures["curves"]
    assert fig.layout.yaxis.title.text == "flow [L/min]"
    # 1 L/min = 1000 mL/min (NIST SP 811 litre)
    shown = np.asarray(fig.data[len(compare_view.candidates)].y)
    assert np.allclose(shown, curve / 1000.0, rtol=1e-12)
    table = html.unescape(compare_view.table.value)
    assert "flow [L/min]" in table and "flow [mL/h]" in table
    assert f"<td class='rl-compare-flow'>{style.significant(flow / 1e-3 * 60)}</td>" in table
