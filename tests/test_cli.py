"""The command line: exit codes, one-line errors, JSON against the Python API, the demo pack."""

import csv
import html
import json
import os
import subprocess
import sys
from html.parser import HTMLParser
from pathlib import Path

import openpyxl
import pandas as pd
import pytest

import rheoline
from rheoline import cli
from rheoline.scenario.files import example_names, example_path

MALFORMED = Path(__file__).with_name("malformed")
EXPECTED = json.loads((MALFORMED / "expected.json").read_text())
MMHG = 133.322387415  # Pa, NIST SP 811 (2008) Appendix B.8


def call(capsys, *argv):
    """Run the command line in-process; return (exit status, stdout, stderr)."""
    try:
        status = cli.main([str(a) for a in argv])
    except SystemExit as exc:  # --help and --version exit through argparse
        status = exc.code
    out, err = capsys.readouterr()
    return status, out, err


def assert_one_line_error(err, expected=None):
    assert err.startswith("rheoline: error: ")
    assert err.count("\n") == 1, err
    assert "Traceback" not in err
    if expected:
        assert expected.lower() in err.lower()


# --------------------------------------------------------------------------- malformed corpus
@pytest.mark.parametrize("name", sorted(EXPECTED))
def test_malformed_file_exits_2_names_the_field_and_writes_nothing(
    name, capsys, tmp_path, monkeypatch
):
    monkeypatch.chdir(tmp_path)
    status, out, err = call(capsys, "check", MALFORMED / name)
    assert status == 2 and out == ""
    assert_one_line_error(err, EXPECTED[name])
    status, out, err = call(capsys, "run", MALFORMED / name, "--out", "pack")
    assert status == 2 and out == ""
    assert_one_line_error(err, EXPECTED[name])
    assert list(tmp_path.iterdir()) == []


def test_oversized_file_exits_2(capsys, tmp_path):
    big = tmp_path / "big.toml"
    big.write_text("format_version = 1\n# " + "x" * 2_000_000)
    status, _, err = call(capsys, "check", big)
    assert status == 2
    assert_one_line_error(err, "above the limit")


def test_missing_file_exits_2(capsys, tmp_path):
    status, _, err = call(capsys, "run", tmp_path / "nope.toml")
    assert status == 2
    assert_one_line_error(err, "cannot read the file")


# --------------------------------------------------------------------------- usage
@pytest.mark.parametrize("argv", [["bogus"], ["run"], ["run", "a.toml", "--colour"], []])
def test_usage_errors_exit_2(argv, capsys):
    status, _, err = call(capsys, *argv)
    assert status == 2
    if argv:
        assert_one_line_error(err)


@pytest.mark.parametrize(
    "command", ["run", "check", "fluids", "parts", "fields", "demo", "examples"]
)
def test_help_on_every_command(command, capsys):
    status, out, _ = call(capsys, command, "--help")
    assert status == 0 and f"usage: rheoline {command}" in out


def test_internal_fault_exits_1_without_traceback(capsys, monkeypatch):
    from rheoline.scenario import compare

    def broken(*a, **k):
        raise RuntimeError("simulated fault")

    monkeypatch.setattr(compare, "run_scenarios", broken)
    status, _, err = call(capsys, "run", example_path("minimal"))
    assert status == 1
    assert err.startswith("rheoline: internal error (RuntimeError: simulated fault)")
    assert "Traceback" not in err and err.count("\n") == 1


def test_entry_point_exits_2_in_a_real_process(tmp_path):
    # the tree under test, whatever copy of rheoline is installed
    root = Path(cli.__file__).resolve().parents[1]
    pyproject = (root / "pyproject.toml").read_text()
    assert 'rheoline = "rheoline.cli:main"' in pyproject
    env = {**os.environ, "PYTHONPATH": str(root)}
    done = subprocess.run(
        [
            sys.executable,
            "-m",
            "rheoline.cli",
            "run",
            str(MALFORMED / "pressure_in_ml.toml"),
            "--out",
            str(tmp_path / "p"),
        ],
        capture_output=True,
        text=True,
        timeout=120,
        env=env,
        cwd=tmp_path,
    )
    assert done.returncode == 2 and done.stdout == ""
    assert_one_line_error(done.stderr, "field 'source_pressure'")
    assert not (tmp_path / "p").exists()


# --------------------------------------------------------------------------- output
def test_every_command_output_carries_the_caution(capsys):
    for argv in (
        ["run", example_path("minimal")],
        ["check", example_path("minimal")],
        ["fluids"],
        ["parts"],
        ["fields"],
        ["examples"],
    ):
        status, out, _ = call(capsys, *argv)
        assert status == 0, argv
        assert rheoline.CAUTION in out, argv


def test_run_prints_a_readable_table(capsys):
    status, out, err = call(capsys, "run", example_path("bench-sweep"), "--width", "100")
    assert status == 0 and err == ""  # no progress bar when not a terminal
    lines = out.splitlines()
    assert lines[0] == f"CAUTION: {rheoline.CAUTION}"
    assert lines[-1] == f"CAUTION: {rheoline.CAUTION}"
    header = next(line for line in lines if "flow [mL/min]" in line)
    assert "source pressure [mmHg]" in header and "flags" in header
    assert "NaN" not in out
    assert sum(" | 50 cm, 14G" in line for line in lines) == 1
    assert sum("water, gauge x height |" in line for line in lines) == 30
    status, out, _ = call(capsys, "run", example_path("bench-sweep"), "--columns", "all")
    header = next(line for line in out.splitlines() if "flow [mL/min]" in line)
    assert "max Re" in header and "max wall shear [Pa]" in header


def _table_lines(out):
    """The printed lines between the title's blank line and the caution at the end."""
    lines = out.splitlines()
    return [line for line in lines[1:-1] if not line.startswith("CAUTION: ")]


@pytest.mark.parametrize("width", [80, 100])
def test_the_table_fits_the_width_and_says_what_it_left_out(capsys, width):
    status, out, _ = call(capsys, "demo", "--width", str(width))
    assert status == 0
    assert max(len(line) for line in _table_lines(out)) <= width
    assert "flags" in next(line for line in out.splitlines() if line.startswith("case "))
    assert "hemolysis concern" in out  # the flags are printed, wrapped within the width
    assert "not printed, to fit" in out and "--columns" in out
    status, wide, _ = call(capsys, "demo", "--columns", "all")
    assert max(len(line) for line in _table_lines(wide)) > 200  # what no terminal fits


def test_columns_choose_the_printed_columns(capsys):
    status, out, _ = call(capsys, "demo", "--columns", "flow,regime,max wall")
    assert status == 0
    header = next(line for line in out.splitlines() if line.startswith("case "))
    assert header.split("  ")[0] == "case" and header.split()[-3:] == ["wall", "shear", "[Pa]"]
    assert "flags" not in header and "not printed" not in out
    status, _, err = call(capsys, "demo", "--columns", "flow,max")
    assert status == 2
    assert_one_line_error(err, "--columns: 'max' matches several columns")


@pytest.mark.parametrize("unit, per_ml_min", [("mL/h", 60.0), ("L/min", 1e-3), ("mL/s", 1 / 60)])
def test_flow_unit_converts_the_printed_flows(capsys, unit, per_ml_min):
    # 1 mL/min = 60 mL/h = 0.001 L/min = 1/60 mL/s (NIST SP 811 litre and minute)
    from rheoline.scenario.compare import run_scenarios
    from rheoline.scenario.files import load_scenarios
    from rheoline.units import significant

    table = run_scenarios(load_scenarios(example_path("bench-sweep"))).table
    status, out, _ = call(
        capsys, "run", example_path("bench-sweep"), "--flow-unit", unit, "--columns", "flow"
    )
    assert status == 0
    rows = [line for line in out.splitlines() if line.startswith("water, gauge x height |")]
    shown = [line.split()[-1] for line in rows]
    assert shown == [significant(f * per_ml_min) for f in table["flow [mL/min]"]]
    assert f"flow [{unit}]" in out


def test_examples_print_loadable_files(capsys, tmp_path):
    from rheoline.scenario.files import load_scenarios

    for name in example_names():
        status, out, _ = call(capsys, "examples", name)
        assert status == 0
        (tmp_path / f"{name}.toml").write_text(out)
        assert load_scenarios(tmp_path / f"{name}.toml").scenarios
    status, _, err = call(capsys, "examples", "minimul")
    assert status == 2
    assert_one_line_error(err, "did you mean 'minimal'")


def test_parts_filters_one_catalogue(capsys):
    status, out, _ = call(capsys, "parts", "--kind", "needle")
    assert status == 0 and "27G thin" in out and "catheter" not in out.split("\n")[1]
    status, _, err = call(capsys, "parts", "--kind", "nedle")
    assert status == 2
    assert_one_line_error(err, "did you mean 'needle'")


# --------------------------------------------------------------------------- JSON
def _api_result(fluid_name, temperature_c, parts, **drive):
    line = rheoline.Line(parts)
    return line.solve(rheoline.fluid(fluid_name, temperature_c=temperature_c), **drive)


def test_json_is_compact_unless_pretty_is_asked(capsys):
    status, compact, _ = call(capsys, "run", example_path("bench-sweep"), "--json")
    assert status == 0 and compact.count("\n") == 1  # one line: no indentation
    status, pretty, _ = call(capsys, "run", example_path("bench-sweep"), "--json", "--pretty")
    assert status == 0 and pretty.count("\n") > 100 and '\n  {\n    "name"' in pretty
    assert json.loads(compact) == json.loads(pretty)


def test_json_agrees_with_the_python_api_for_a_drive(capsys):
    status, out, err = call(capsys, "run", example_path("minimal"), "--json")
    assert status == 0 and rheoline.CAUTION in err
    [obj] = json.loads(out)
    res = _api_result(
        "saline-0.9",
        22.0,
        [
            rheoline.Tube(inner_diameter=3.0e-3, length=1.8, name="administration set"),
            rheoline.Catheter(gauge=18),
        ],
        head=1.0,
    )
    assert obj["name"] == "18G on a gravity set"
    assert obj["flow_ml_min"] == pytest.approx(res.flow * 6e7, rel=1e-9)
    assert obj["max_reynolds"] == pytest.approx(res.max_reynolds, rel=1e-9)
    assert obj["regime"] == res.regime
    assert obj["caution"] == rheoline.CAUTION
    api_parts = res.parts
    assert [p["part"] for p in obj["parts"]] == list(api_parts["part"])
    for p, (_, row) in zip(obj["parts"], api_parts.iterrows(), strict=True):
        assert p["pressure_drop_pa"] == pytest.approx(row["pressure_drop [Pa]"], rel=1e-9)
        assert (
            p["wall_shear_stress_pa"]
            == pytest.approx(row["wall_shear_stress [Pa]"], rel=1e-9, nan_ok=True)
            if p["wall_shear_stress_pa"] is not None
            else pd.isna(row["wall_shear_stress [Pa]"])
        )


def test_json_agrees_with_the_python_api_for_a_pump(capsys):
    status, out, _ = call(capsys, "run", example_path("syringe-pump"), "--json")
    assert status == 0
    objs = json.loads(out)
    assert len(objs) == 5
    first = objs[0]  # 40 % glycerol-water, 60 mL/h, 25G regular-wall needle
    assert first["point"] == "60 mL/h, 25G"
    fl = rheoline.fluid("glycerol-water", temperature_c=22.0, mass_fraction=0.4)
    res = rheoline.Line(
        [
            rheoline.Tube(inner_diameter=1.0e-3, length=1.5),
            rheoline.Needle(gauge=25, wall="regular"),
        ]
    ).solve(fl, flow=60e-6 / 3600)
    assert first["required_pressure_mmhg"] == pytest.approx(res.required_pressure / MMHG, rel=1e-9)
    assert first["flow_ml_h"] == pytest.approx(60.0, rel=1e-12)
    assert first["exceeds_pressure_limit"] == bool(res.required_pressure > 900 * MMHG)


# --------------------------------------------------------------------------- demo
class _Page(HTMLParser):
    def __init__(self):
        super().__init__()
        self.first_in_body, self.in_body, self.tables, self.text = None, False, 0, []

    def handle_starttag(self, tag, attrs):
        if tag == "body":
            self.in_body = True
        elif self.in_body and self.first_in_body is None:
            self.first_in_body = dict(attrs).get("id")
        self.tables += tag == "table"

    def handle_data(self, data):
        self.text.append(data)


def test_demo_end_to_end_and_its_pack_reads_back(capsys, tmp_path):
    out_dir = tmp_path / "demo-pack"
    status, out, err = call(capsys, "demo", "--out", out_dir)
    assert status == 0, err
    assert rheoline.CAUTION in out and f"review pack written to {out_dir}" in out
    # CSV with pandas
    table = pd.read_csv(out_dir / "results.csv", skiprows=1)
    assert len(table) == 53
    assert set(table["fluid"]) == {"saline-0.9", "packed-red-cells"}
    assert set(table["gauge"]) == {14, 16, 18, 20}
    assert (table["flow [mL/min]"] > 0).all()
    assert table["over pressure limit"].dropna().astype(bool).any()
    assert table["flow p5 [mL/min]"].notna().sum() == 1
    parts = pd.read_csv(out_dir / "parts.csv", skiprows=1)
    assert set(parts["case"]) == set(table["case"])
    # warm red cells flow faster than cold ones through the same line (common practice)
    cold = table[table["case"] == "pressure bag 300 mmHg | packed-red-cells, 4 degC, 18G"]
    warm = table[table["case"] == "pressure bag 300 mmHg | packed-red-cells, 37 degC, 18G"]
    assert float(warm["flow [mL/min]"].iloc[0]) > 1.5 * float(cold["flow [mL/min]"].iloc[0])
    # XLSX with openpyxl
    wb = openpyxl.load_workbook(out_dir / "results.xlsx", read_only=True)
    assert {"results", "scenario inputs", "assumptions", "cautions"} <= set(wb.sheetnames)
    rows = list(wb["results"].iter_rows(values_only=True))
    assert rows[0][0] == "caution: " + rheoline.CAUTION
    assert len(rows) == 2 + 53
    models = list(wb["assumptions"].iter_rows(min_row=2, values_only=True))
    refs = [dict(zip(models[0], row, strict=True))["reference"] for row in models[1:]]
    assert any("Churchill" in (r or "") for r in refs)  # the demo has turbulent cases
    # HTML parsed
    page = (out_dir / "report.html").read_text(encoding="utf-8")
    parser = _Page()
    parser.feed(page)
    assert parser.first_in_body == "caution"
    assert parser.tables >= 5
    text = " ".join(parser.text)
    assert rheoline.CAUTION in text and rheoline.__version__ in text
    manifest = json.loads((out_dir / "manifest.json").read_text())
    assert manifest["input_sha256"] in page
    # the scenario copy is the file itself
    copy = out_dir / "scenario-rapid-transfusion-cart.toml"
    assert copy.read_bytes() == example_path("rapid-transfusion-cart").read_bytes()
    assert html.escape("Rapid-transfusion cart") in page


def test_demo_never_overwrites_without_force(capsys, tmp_path):
    out_dir = tmp_path / "pack"
    assert call(capsys, "demo", "--out", out_dir)[0] == 0
    stamp = (out_dir / "manifest.json").read_text()
    status, out, err = call(capsys, "demo", "--out", out_dir)
    assert status == 2 and out == ""
    assert_one_line_error(err, "--force")
    assert (out_dir / "manifest.json").read_text() == stamp
    assert call(capsys, "demo", "--out", out_dir, "--force")[0] == 0


# --------------------------------------------------------------------------- hostile names
HOSTILE_FILE = """format_version = 1
title = "<script>alert('t')</script>"

[[scenario]]
name = "=HYPERLINK(\\"http://example.invalid\\",\\"x\\")"
fluid = "water"
head = "1 m"
[[scenario.part]]
type = "catheter"
gauge = 18
label = "@SUM(1+1)"

[[scenario]]
name = "</td><img src=x onerror=alert(1)>"
notes = "-1+1 <b>bold</b>"
fluid = "water"
head = ["50 cm", "1 m"]
[[scenario.part]]
type = "tube"
label = "+cmd|' /C calc'!A0"
inner_diameter = "3 mm"
length = "1.8 m"
"""


def test_hostile_names_through_the_whole_pipeline(capsys, tmp_path):
    src = tmp_path / "hostile.toml"
    src.write_text(HOSTILE_FILE)
    status, out, err = call(capsys, "run", src, "--out", tmp_path / "pack")
    assert status == 0, err
    pack = tmp_path / "pack"
    page = (pack / "report.html").read_text(encoding="utf-8")
    assert "<img src=x" not in page and "<script>alert" not in page and "<b>bold" not in page
    assert "&lt;img src=x onerror=alert(1)&gt;" in page
    for name in ("results.csv", "parts.csv"):
        with (pack / name).open(newline="", encoding="utf-8") as fh:
            cells = [c for row in csv.reader(fh) for c in row]
        assert '\'=HYPERLINK("http://example.invalid","x")' in cells or name == "parts.csv"
        assert not [c for c in cells if c.startswith(("=", "+", "-", "@"))], name
    wb = openpyxl.load_workbook(pack / "results.xlsx")
    for ws in wb.worksheets:
        for row in ws.iter_rows():
            for cell in row:
                assert cell.data_type != "f"
                assert not (
                    isinstance(cell.value, str) and cell.value.startswith(("=", "+", "-", "@"))
                )


# --------------------------------------------------------------------------- progress
def test_progress_bar_only_on_a_terminal_and_only_after_a_delay(monkeypatch):
    from rheoline.scenario import compare

    seen = []
    real = compare.run_scenarios
    monkeypatch.setattr(
        compare, "run_scenarios", lambda sset, progress=None: seen.append(progress) or real(sset)
    )
    from rheoline.scenario.files import load_scenarios

    sset = load_scenarios(example_path("minimal"))
    cli._solve(sset)  # pytest's captured streams are not terminals
    monkeypatch.setattr(sys.stdout, "isatty", lambda: True, raising=False)
    monkeypatch.setattr(sys.stderr, "isatty", lambda: True, raising=False)
    cli._solve(sset)
    assert seen[0] is None and seen[1] is cli._tqdm_progress
    bar = cli._tqdm_progress(10)
    try:
        assert bar.delay >= 2.0 and bar.total == 10
    finally:
        bar.close()


def test_json_objects_have_the_documented_keys(capsys):
    status, out, _ = call(capsys, "demo", "--json")
    assert status == 0
    objs = json.loads(out)
    assert len(objs) == 53
    for obj in objs:
        assert {
            "name",
            "flow_ml_min",
            "required_pressure_mmhg",
            "max_reynolds",
            "regime",
            "parts",
            "caution",
        } <= set(obj)
        assert obj["parts"] and all(
            {"pressure_drop_pa", "reynolds", "wall_shear_stress_pa"} <= set(p) for p in obj["parts"]
        )


def test_sort_and_reach(capsys):
    status, out, _ = call(
        capsys,
        "run",
        example_path("bench-sweep"),
        "--sort",
        "flow [mL/min]",
        "--reach",
        "100 mL/min",
    )
    assert status == 0
    lines = out.splitlines()
    rows = [line for line in lines if line.startswith("water, gauge x height |")]
    flows = [float(line.split()[8]) for line in rows]  # after "water, gauge x height | 150 cm, 14G"
    assert flows == sorted(flows, reverse=True)
    at = lines.index("Smallest bore reaching 100 mL/min:")
    assert lines[at + 1].startswith("  - water, gauge x height: water, gauge x height | ")
    status, _, err = call(capsys, "run", example_path("bench-sweep"), "--sort", "flow [mL/mn]")
    assert status == 2
    assert_one_line_error(err, "did you mean 'flow [mL/min]'")
    status, _, err = call(capsys, "run", example_path("bench-sweep"), "--reach", "100 mmHg")
    assert status == 2
    assert_one_line_error(err, "not a unit of flow")


def test_reach_never_names_a_case_over_its_pressure_limit(capsys):
    # the demo's pump scenario: 150 mL/min against a 300 mmHg limit; the 20G case needs
    # about 847 mmHg and the 18G case about 515 mmHg, so neither reaches the target
    from rheoline.scenario.compare import run_scenarios
    from rheoline.scenario.files import load_scenarios

    table = run_scenarios(load_scenarios(example_path("rapid-transfusion-cart"))).table
    pump = table[table["scenario"] == "pump 150 mL/min, 300 mmHg limit"]
    over = pump[pump["over pressure limit"].eq(True)]
    assert set(over["gauge"]) == {18, 20}  # the table flags them (so this test can fail)
    within = pump[pump["required pressure [mmHg]"] <= pump["pressure limit [mmHg]"]]
    best = within.sort_values("smallest bore [mm]").iloc[0]
    status, out, _ = call(capsys, "demo", "--reach", "100 mL/min")
    assert status == 0
    lines = out.splitlines()
    at = lines.index("Smallest bore reaching 100 mL/min:")
    answers = lines[at + 1 : lines.index("", at)]  # one line per scenario, then a blank line
    [named] = [s for s in answers if s.startswith("  - pump 150 mL/min, 300 mmHg limit: ")]
    assert f": {best['case']} (" in named
    for case in over["case"]:
        assert f": {case} (" not in named


def test_run_pauses_the_cycle_collector_and_restores_it(capsys, monkeypatch, tmp_path):
    import gc

    import rheoline.scenario.compare as compare

    seen, real = [], compare.run_scenarios

    def spy(*args, **kwargs):
        seen.append(gc.isenabled())
        return real(*args, **kwargs)

    monkeypatch.setattr(compare, "run_scenarios", spy)
    assert gc.isenabled()
    code, out, _ = call(capsys, "run", str(example_path("minimal")), "--json")
    assert code == 0 and json.loads(out) and seen == [False]
    assert gc.isenabled()
    bad = tmp_path / "bad.toml"
    bad.write_text('format_version = 1\n[[scenario]]\nname = "x"\nfluid = "nope"\n')
    code, _, _ = call(capsys, "run", str(bad), "--json")
    assert code == 2 and gc.isenabled()  # restored after an error as well
    gc.disable()
    try:
        call(capsys, "run", str(example_path("minimal")), "--json")
        assert not gc.isenabled()  # left as the caller had it
    finally:
        gc.enable()
