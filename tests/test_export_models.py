"""Review packs: what a pack states about its basis, the inputs sheet, streamed tables, charts.

A saline pack names no blood model, no Pries law and no hemolysis law; a whole-blood pack
names the blood model it used; a correction is named only where it was applied; hemolysis
and cold-blood cautions only for red cells; the inputs sheet echoes the scenario
description; the streamed workbook and CSV keep every cell type; charts beyond a few
hundred cases show a sample and say so.  Neutralization, escaping and atomic writes:
tests/test_export.py.
"""

import json
from html.parser import HTMLParser

import numpy as np
import openpyxl
import pandas as pd

import rheoline
from rheoline.scenario import pack_report, pack_tables
from rheoline.scenario.export import write_pack
from rheoline.scenario.files import loads_scenarios

# --------------------------------------------------------------------------- models used
# What a pack states about its basis must be exactly what the run computed (issue 11): the
# assumptions sheet (assumptions.csv, the workbook's "assumptions" sheet) and the report's
# "Models used" section list the run's models_used, read from the provenance registry.
SALINE_FILE = """format_version = 1
title = "saline only"
[[scenario]]
name = "saline by gravity"
fluid = "saline-0.9"
head = ["50 cm", "1 m"]
[[scenario.part]]
type = "tube"
inner_diameter = "3 mm"
length = "1.8 m"
[[scenario.part]]
type = "catheter"
gauge = [18, 20]
"""

BLOOD_FILE = """format_version = 1
title = "whole blood"
[[scenario]]
name = "blood bag"
fluid = "whole-blood"
hematocrit = 0.45
temperature = "37 degC"
head = "1 m"
source_pressure = "300 mmHg"
[[scenario.part]]
type = "tube"
inner_diameter = "3 mm"
length = "1.8 m"
[[scenario.part]]
type = "catheter"
gauge = 18
"""


def _blood_only_keys():
    """Registry keys that only a fluid with red cells, or a vessel, would use."""
    from rheoline.model.provenance import REGISTRY

    blood = rheoline.fluid("whole-blood", temperature_c=37.0, hematocrit=0.45).models_used
    saline = rheoline.fluid("saline-0.9", temperature_c=22.0).models_used
    keys = (set(blood) | {"pries-1992", "pries-1994", "giersiepen-1990"}) - set(saline)
    assert keys <= set(REGISTRY)
    return keys


def _pack_of(text, name, folder):
    from rheoline.scenario.compare import run_scenarios

    run = run_scenarios(loads_scenarios(text, source=name))
    return run, write_pack(run, folder)


class _Text(HTMLParser):
    """The visible text of a page (scripts and styles left out), and of one section."""

    def __init__(self, section_id):
        super().__init__(convert_charrefs=True)
        self.section_id, self.text, self.section = section_id, [], []
        self._skip = self._in_section = False
        self._cell = None

    def handle_starttag(self, tag, attrs):
        self._skip = tag in ("script", "style")
        if tag == "h2":
            self._in_section = dict(attrs).get("id") == self.section_id
        if self._in_section and tag == "tr":
            self.section.append([])

    def handle_endtag(self, tag):
        self._skip = False

    def handle_data(self, data):
        if not self._skip:
            self.text.append(data)
            if self._in_section and self.section:
                self.section[-1].append(data)


def _stated(folder):
    """What each file of a pack says the run used: (keys per file, all of its text)."""
    csv_table = pd.read_csv(folder / "assumptions.csv", skiprows=1, keep_default_na=False)
    wb = openpyxl.load_workbook(folder / "results.xlsx", read_only=True)
    rows = list(wb["assumptions"].iter_rows(min_row=2, values_only=True))
    sheet = [dict(zip(rows[0], r, strict=True)) for r in rows[1:]]
    xlsx_text = " ".join(
        str(c) for ws in wb.worksheets for r in ws.iter_rows(values_only=True) for c in r if c
    )
    page = _Text("models-used")
    page.feed((folder / "report.html").read_text(encoding="utf-8"))
    html_rows = [r for r in page.section if r][1:]  # the header row first
    keys = {
        "csv": csv_table["model"].tolist(),
        "xlsx": [r["model"] for r in sheet],
        "html": [r[0] for r in html_rows],
    }
    texts = {
        "csv": (folder / "assumptions.csv").read_text(encoding="utf-8"),
        "xlsx": xlsx_text,
        "html": " ".join(page.text),
    }
    return keys, texts, csv_table


def test_a_saline_pack_names_no_blood_model_no_pries_and_no_hemolysis_law(tmp_path):
    from rheoline.model.provenance import REGISTRY

    run, folder = _pack_of(SALINE_FILE, "saline.toml", tmp_path / "pack")
    used = list(run.models_used)
    assert used and "hagen-poiseuille" in used
    keys, texts, table = _stated(folder)
    assert keys == {"csv": used, "xlsx": used, "html": used}
    for key in _blood_only_keys():
        entry = REGISTRY[key]
        for where, text in texts.items():
            assert entry.title not in text, (key, where)
            assert entry.reference[:40] not in text, (key, where)
    for where, text in texts.items():
        for word in ("Pries", "Giersiepen", "Carreau", "Casson", "Quemada", "Cho & Kensey"):
            assert word not in text, (word, where)
    # the rows are the registry's own words
    first = REGISTRY[used[0]]
    assert table.iloc[0][["title", "reference", "validity"]].tolist() == [
        first.title,
        first.reference,
        first.validity,
    ]
    manifest = json.loads((folder / "manifest.json").read_text(encoding="utf-8"))
    assert manifest["models_used"] == used and manifest["version"] == rheoline.__version__


def test_a_whole_blood_pack_names_the_blood_model_it_used(tmp_path):
    from rheoline.model.provenance import REGISTRY

    run, folder = _pack_of(BLOOD_FILE, "blood.toml", tmp_path / "pack")
    used = list(run.models_used)
    blood = rheoline.fluid("whole-blood", temperature_c=37.0, hematocrit=0.45).models_used
    assert set(blood) <= set(used) and "giersiepen-1990" in used
    keys, texts, table = _stated(folder)
    assert keys == {"csv": used, "xlsx": used, "html": used}
    for key in set(blood) - set(rheoline.fluid("saline-0.9").models_used):
        for where, text in texts.items():
            assert REGISTRY[key].title in text, (key, where)
    # DOIs where the registry has one, a mark where its values were recalled
    for row in table.itertuples(index=False):
        entry = REGISTRY[row.model]
        assert row.DOI == (entry.doi or "")
        assert bool(row[table.columns.get_loc("recalled values")]) == entry.recalled


def test_a_correction_is_named_only_where_it_was_applied(tmp_path):
    # Churchill 1977 corrects the friction beyond laminar flow: a laminar saline file's pack
    # does not name it; the same line driven hard enough to be turbulent does
    from rheoline.model.provenance import REGISTRY

    churchill = REGISTRY["churchill-1977"].title
    hard = SALINE_FILE.replace('head = ["50 cm", "1 m"]', 'source_pressure = "300 mmHg"')
    # heads low enough that no lumen nears the transition (Re 1800 and up), where the model
    # band would apply Churchill's turbulent friction as an alternative
    calm = SALINE_FILE.replace('head = ["50 cm", "1 m"]', 'head = ["30 cm", "50 cm"]')
    for text, name in ((calm, "laminar.toml"), (hard, "turbulent.toml")):
        run, folder = _pack_of(text, name, tmp_path / name)
        beyond_laminar = bool((run.table["regime"] != "laminar").any())
        assert beyond_laminar is (name == "turbulent.toml")  # the files do what they say
        keys, texts, _ = _stated(folder)
        for where in ("csv", "xlsx", "html"):
            assert ("churchill-1977" in keys[where]) is beyond_laminar, (name, where)
            assert (churchill in texts[where]) is beyond_laminar, (name, where)


def test_hemolysis_and_cold_blood_cautions_only_for_red_cells(tmp_path):
    _, saline = _pack_of(SALINE_FILE, "saline.toml", tmp_path / "saline")
    _, blood = _pack_of(BLOOD_FILE, "blood.toml", tmp_path / "blood")
    for folder, expected in ((saline, False), (blood, True)):
        wb = openpyxl.load_workbook(folder / "results.xlsx", read_only=True)
        cautions = " ".join(
            str(c) for r in wb["cautions"].iter_rows(values_only=True) for c in r if c
        )
        page = (folder / "report.html").read_text(encoding="utf-8")
        assert ("Hemolysis: the indicator" in cautions) is expected
        assert ("Cold blood products" in page) is expected
        assert "Air embolism" in cautions and "Air embolism" in page


def test_the_inputs_sheet_echoes_the_scenario_description(tmp_path):
    from rheoline.scenario.files import dump_scenarios

    run, folder = _pack_of(BLOOD_FILE, "blood.toml", tmp_path / "pack")
    wb = openpyxl.load_workbook(folder / "results.xlsx", read_only=True)
    rows = {
        tuple(str(c) for c in r)
        for r in wb["scenario inputs"].iter_rows(min_row=3, values_only=True)
    }
    for row in [
        ("blood bag", "fluid", "whole-blood"),
        ("blood bag", "hematocrit", "0.45"),
        ("blood bag", "temperature", "37 degC"),
        ("blood bag", "source_pressure", "300 mmHg"),
        ("blood bag", "part[1].type", "tube"),
        ("blood bag", "part[2].gauge", "18"),
    ]:
        assert row in rows, row
    # the description the pack echoes writes back to the same scenarios
    again = loads_scenarios(dump_scenarios(run.scenario_set), source="again.toml")
    assert again == run.scenario_set


def test_streamed_workbook_and_csv_keep_every_cell_type(tmp_path):
    # numbers stay numbers, missing and infinite numbers are empty, text that a spreadsheet
    # would run is neutralized (OWASP, CSV injection), booleans stay booleans, a mixed text
    # column keeps its numbers
    import math

    import openpyxl
    import pandas as pd

    frame = pd.DataFrame(
        {
            "flow [mL/min]": [1.5, math.nan, math.inf, -2.25],
            "count": [1, 2, 3, 4],
            "ok": [True, False, True, False],
            "note": ["=1+2", None, 3.5, "a\x07b"],
            "-lead": ["plain", "@cmd", "+x", "\tt"],
        }
    )
    pack_tables.write_xlsx(tmp_path / "t.xlsx", {"sheet one": frame}, "=title")
    rows = list(openpyxl.load_workbook(tmp_path / "t.xlsx").active.iter_rows(values_only=True))
    assert rows[0][0] == "'=title"
    assert rows[1] == ("flow [mL/min]", "count", "ok", "note", "'-lead")
    assert rows[2] == (1.5, 1, True, "'=1+2", "plain")
    assert rows[3] == (None, 2, False, None, "'@cmd")
    assert rows[4] == (None, 3, True, 3.5, "'+x")
    assert rows[5] == (-2.25, 4, False, "a\ufffdb", "'\tt")
    pack_tables.write_csv(frame, tmp_path / "t.csv", "=title")
    lines = (tmp_path / "t.csv").read_text(encoding="utf-8").splitlines()
    assert lines[0] == "'=title"
    assert lines[1] == "flow [mL/min],count,ok,note,'-lead"
    assert lines[2:4] == ["1.5,1,True,'=1+2,plain", ",2,False,,'@cmd"]
    assert lines[4] == ",3,True,3.5,'+x"
    assert lines[5] == "-2.25,4,False,a\ufffdb,'\tt"  # a tab needs no quotes (RFC 4180)


def test_charts_beyond_a_few_hundred_cases_show_a_sample_and_say_so():
    from rheoline.scenario.run import run_scenarios

    doc = """format_version = 1
[[scenario]]
name = "head sweep"
fluid = "water"
head = { start = "10 cm", stop = "209.5 cm", step = "0.5 cm" }
[[scenario.part]]
type = "catheter"
gauge = 18
"""
    run = run_scenarios(loads_scenarios(doc, source="sweep.toml"))
    assert len(run.table) == 400
    rows = pack_report.chart_rows(run.table)
    flows = run.table["flow [mL/min]"].to_numpy()
    assert len(rows) <= pack_report.CHART_MAX_CASES + 2
    assert {int(np.argmin(flows)), int(np.argmax(flows))} <= set(rows.tolist())
    figures = pack_report.pack_figures(run)
    assert len(figures[0].data[0].x) == len(rows)
    assert set(figures[1].data[0].y) == set(run.table["case"].iloc[rows])
    page = pack_report._charts_html(run)
    assert f"The charts show {len(rows):,} of 400 cases" in page
    small = run_scenarios(loads_scenarios(doc.replace("209.5 cm", "59.5 cm"), source="s.toml"))
    assert len(small.table) == 100 and "The charts show" not in pack_report._charts_html(small)
