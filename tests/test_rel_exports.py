"""Reliability: exports under hostile text and failing disks.

Adds to the scenario owner's tests/test_export.py and tests/test_cli.py what they lack:

* properties (hypothesis): no text of any kind leaves :func:`neutralize_cell` starting a
  formula, and :func:`frame_html` shows any text exactly, as text, inside its own tags only;
* hostile title, notes, part labels and file name through a real solved pack (HTML escaped,
  CSV and every XLSX sheet free of formulas);
* forced failures at the last step (the swap of the new pack into place) and an interrupt
  midway: the earlier pack survives byte for byte and no temporary folder is left;
* the command line never overwrites without --force, and never replaces a file.
"""

from __future__ import annotations

import csv
import os
from html.parser import HTMLParser
from pathlib import Path

import openpyxl
import pandas as pd
import pytest
from hypothesis import given
from hypothesis import strategies as st
from rel_record import bump, hostile_scenario_file, module_recorder

from rheoline import cli
from rheoline.scenario import export, pack_report
from rheoline.scenario.compare import run_scenarios
from rheoline.scenario.export import frame_html, neutralize_cell, write_pack
from rheoline.scenario.files import load_scenarios

_record = module_recorder("exports", "exports:")

FORMULA_START = ("=", "+", "-", "@", "\t", "\r", "\n")
HOSTILE_HTML = '"><script>alert(1)</script><img src=x onerror=alert(2)>'
HOSTILE_CELL = '=HYPERLINK("http://example.invalid","x")'

any_text = st.text(st.characters(codec="utf-8", exclude_categories=("Cs",)), max_size=60)
formula_text = st.builds(lambda a, b: a + b, st.sampled_from(FORMULA_START), any_text)


@given(text=st.one_of(any_text, formula_text))
def test_no_text_leaves_neutralization_as_a_formula(text):
    bump("exports:neutralize_examples")
    safe = neutralize_cell(text)
    assert isinstance(safe, str)
    assert not safe.startswith(FORMULA_START)
    assert not any(ord(c) < 32 and c not in "\t\r\n" for c in safe)
    if text and not text.startswith(FORMULA_START) and text.isprintable():
        assert safe == text  # ordinary text is left alone


class _Collect(HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.tags, self.text = [], []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)

    def handle_data(self, data):
        self.text.append(data)


@given(text=any_text)
def test_html_table_shows_any_text_as_text(text):
    bump("exports:html_examples")
    page = frame_html(pd.DataFrame({"name": [text], "flow [mL/min]": [1.0]}))
    parsed = _Collect()
    parsed.feed(page)
    parsed.close()
    assert set(parsed.tags) <= {"table", "thead", "tbody", "tr", "th", "td", "div"}
    shown = "".join(parsed.text)
    if text.strip():
        assert (
            text.replace("\r\n", "\n").replace("\r", "\n") in shown.replace("\r\n", "\n")
            or text in shown
        )


HOSTILE_FILE = hostile_scenario_file(
    title=HOSTILE_HTML,
    notes=HOSTILE_CELL + " " + HOSTILE_HTML,
    name="@SUM(1+1) " + HOSTILE_HTML[:60],
    scenario_notes="-2+3 " + HOSTILE_HTML,
    tube_label=HOSTILE_CELL[:60],
    catheter_label="+cmd|' /C calc'!A0",
)


@pytest.fixture(scope="module")
def hostile_pack(tmp_path_factory):
    folder = tmp_path_factory.mktemp("hostile")
    src = folder / "<img src=x onerror=alert(3)>.toml"
    src.write_text(HOSTILE_FILE, encoding="utf-8")
    run = run_scenarios(load_scenarios(src))
    return write_pack(run, folder / "pack")


def test_hostile_text_in_every_field_is_escaped_in_html(hostile_pack):
    page = (hostile_pack / "report.html").read_text(encoding="utf-8")
    for raw in ("<script>alert(1)", "<img src=x onerror=alert(2)", "<img src=x onerror=alert(3)"):
        assert raw not in page
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in page
    parsed = _Collect()
    parsed.feed(page)
    assert "img" not in parsed.tags  # the report's own scripts are plotly's; no image tags


def test_hostile_text_in_every_field_is_neutralized_in_csv_and_xlsx(hostile_pack):
    cells = []
    for path in sorted(hostile_pack.glob("*.csv")):
        with path.open(newline="", encoding="utf-8") as fh:
            cells += [c for row in csv.reader(fh) for c in row]
    wb = openpyxl.load_workbook(hostile_pack / "results.xlsx")
    for ws in wb.worksheets:
        for row in ws.iter_rows():
            for cell in row:
                assert cell.data_type != "f", (ws.title, cell.coordinate)
                if isinstance(cell.value, str):
                    cells.append(cell.value)
    bump("exports:cells_checked", len(cells))
    assert [c for c in cells if c.startswith(FORMULA_START)] == []
    assert any(HOSTILE_CELL[:20] in c for c in cells)  # the text is kept, only disarmed


def test_the_scenario_copy_stays_inside_the_pack(hostile_pack):
    names = [p.name for p in hostile_pack.iterdir()]
    copies = [n for n in names if n.startswith("scenario")]
    assert len(copies) == 1 and "/" not in copies[0] and "<" not in copies[0]
    assert (hostile_pack / copies[0]).read_text(encoding="utf-8") == HOSTILE_FILE


# --------------------------------------------------------------------------- forced failures
def _snapshot(folder):
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir())}


def _small_run(tmp_path, name):
    src = tmp_path / f"{name}.toml"
    src.write_text(
        HOSTILE_FILE.replace("saline-0.9", "water").replace('title = "', f'title = "{name} '),
        encoding="utf-8",
    )
    return run_scenarios(load_scenarios(src))


def test_failure_while_swapping_in_the_new_pack_keeps_the_old_one(tmp_path, monkeypatch):
    folder = write_pack(_small_run(tmp_path, "first"), tmp_path / "out" / "pack")
    before = _snapshot(folder)
    real_replace = os.replace
    calls = []

    def fail_on_swap(src, dst):
        calls.append((Path(src).name, Path(dst).name))
        if Path(dst) == folder and ".partial" in Path(src).name:
            raise OSError(5, "Input/output error")
        return real_replace(src, dst)

    monkeypatch.setattr(export.os, "replace", fail_on_swap)
    with pytest.raises(OSError, match="Input/output"):
        write_pack(_small_run(tmp_path, "second"), folder, force=True)
    assert any(".partial" in src for src, _ in calls), calls  # the failure hit the swap
    assert _snapshot(folder) == before
    assert [p.name for p in (tmp_path / "out").iterdir()] == ["pack"]


def test_an_interrupt_midway_keeps_the_old_pack(tmp_path, monkeypatch):
    folder = write_pack(_small_run(tmp_path, "first"), tmp_path / "out" / "pack")
    before = _snapshot(folder)

    def interrupted(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(pack_report, "write_html", interrupted)
    with pytest.raises(KeyboardInterrupt):
        write_pack(_small_run(tmp_path, "second"), folder, force=True)
    assert _snapshot(folder) == before
    assert [p.name for p in (tmp_path / "out").iterdir()] == ["pack"]


def _cli(capsys, *argv):
    status = cli.main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return status, out, err


def test_command_line_never_overwrites_without_force(capsys, tmp_path):
    src = tmp_path / "s.toml"
    src.write_text(HOSTILE_FILE.replace("saline-0.9", "water"), encoding="utf-8")
    assert _cli(capsys, "run", src, "--out", tmp_path / "pack")[0] == 0
    before = _snapshot(tmp_path / "pack")
    status, out, err = _cli(capsys, "run", src, "--out", tmp_path / "pack")
    assert status == 2 and out == "" and "--force" in err and err.count("\n") == 1
    assert _snapshot(tmp_path / "pack") == before
    assert _cli(capsys, "run", src, "--out", tmp_path / "pack", "--force")[0] == 0
    assert sorted(p.name for p in tmp_path.iterdir()) == ["pack", "s.toml"]


def test_command_line_never_replaces_a_file_even_with_force(capsys, tmp_path):
    src = tmp_path / "s.toml"
    src.write_text(HOSTILE_FILE.replace("saline-0.9", "water"), encoding="utf-8")
    target = tmp_path / "notes.txt"
    target.write_text("my notes")
    status, out, err = _cli(capsys, "run", src, "--out", target, "--force")
    assert status == 2 and "not a folder" in err
    assert target.read_text() == "my notes"
    status, _, err = _cli(capsys, "run", src, "--out", src, "--force")  # not even the input
    assert status == 2 and src.read_text(encoding="utf-8").startswith("format_version")


def test_force_never_replaces_a_folder_that_is_not_a_pack(capsys, tmp_path):
    # --force may replace an earlier review pack, never someone's folder of other files
    src = tmp_path / "s.toml"
    src.write_text(HOSTILE_FILE.replace("saline-0.9", "water"), encoding="utf-8")
    documents = tmp_path / "documents"
    documents.mkdir()
    (documents / "thesis.txt").write_text("years of work")
    status, out, err = _cli(capsys, "run", src, "--out", documents, "--force")
    assert status == 2 and "pack" in err, (status, err)
    assert sorted(p.name for p in documents.iterdir()) == ["thesis.txt"]
    with pytest.raises(export.PackExistsError):
        write_pack(_small_run(tmp_path, "x"), documents, force=True)
    assert (documents / "thesis.txt").read_text() == "years of work"


def test_command_line_reports_an_unwritable_pack_in_one_line(capsys, tmp_path):
    src = tmp_path / "s.toml"
    src.write_text(HOSTILE_FILE.replace("saline-0.9", "water"), encoding="utf-8")
    blocker = tmp_path / "a file"
    blocker.write_text("x")
    status, out, err = _cli(capsys, "run", src, "--out", blocker / "pack")
    assert status == 2 and err.startswith("rheoline: error: cannot write the pack")
    assert err.count("\n") == 1 and "Traceback" not in err
    assert blocker.read_text() == "x"
