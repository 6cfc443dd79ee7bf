"""Review packs: formula neutralization, HTML escaping, atomic writes, cautions in every file.

What a pack states about the models a run used, and the streamed workbook and charts:
tests/test_export_models.py.
"""

import csv
import hashlib
import html
import json
from html.parser import HTMLParser

import numpy as np
import openpyxl
import pandas as pd
import pytest

import rheoline
from rheoline.scenario import export, pack_report, pack_tables
from rheoline.scenario.compare import _COLUMNS, _PART_COLUMNS, Note, RunResult
from rheoline.scenario.export import (
    PACK_FILES,
    PackExistsError,
    neutralize_cell,
    neutralize_frame,
    write_pack,
)
from rheoline.scenario.files import loads_scenarios

# Formula-injection payloads of the kinds OWASP's "CSV Injection" page describes
# (leading =, +, -, @, tab and carriage return).
HOSTILE = [
    '=HYPERLINK("http://example.invalid/x","click")',
    "+1+cmd|' /C calc'!A0",
    "-2+3",
    "@SUM(1+1)*cmd|' /C calc'!A0",
    "\t=1+1",
    "\r=1+1",
]
HTML_HOSTILE = '</script><script>alert("x")</script><img src=x onerror=alert(1)>'


class _Tags(HTMLParser):
    def __init__(self):
        super().__init__()
        self.tags, self.attrs, self.body_first = [], [], None
        self._in_body = False

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)
        self.attrs += [(tag, k, v) for k, v in attrs]
        if tag == "body":
            self._in_body = True
        elif self._in_body and self.body_first is None:
            self.body_first = (tag, dict(attrs))


def _toml_name(name):
    return json.dumps(name)  # a JSON string is a valid TOML basic string


def fake_run(names):
    """A RunResult with the real column layout, built without the line engine."""
    doc = "format_version = 1\n" + "".join(
        f'[[scenario]]\nname = {_toml_name(n)}\nfluid = "water"\nhead = "1 m"\n'
        f'[[scenario.part]]\ntype = "catheter"\ngauge = 18\nlabel = {_toml_name(n[:100])}\n'
        for n in names
    )
    sset = loads_scenarios(doc, source="hostile.toml")
    rows, prow = [], []
    for i, n in enumerate(names):
        row = dict.fromkeys(_COLUMNS, np.nan)
        row.update(
            {
                "case": n,
                "scenario": n,
                "point": "",
                "fluid": "water",
                "drive": "gravity",
                "regime": "laminar",
                "dominant part": n[:100],
                "flags": n,
                "flow [mL/min]": 50.0 + i,
                "hemolysis concern": False,
                "over pressure limit": None,
                "gauge": 18,
            }
        )
        rows.append(row)
        p = dict.fromkeys(_PART_COLUMNS, np.nan)
        p.update(
            {
                "case": n,
                "part": n[:100],
                "kind": "lumen",
                "regime": "laminar",
                "pressure drop [mmHg]": 70.0,
            }
        )
        prow.append(p)
    table = pd.DataFrame(rows, columns=_COLUMNS)
    parts = pd.DataFrame(prow, columns=_PART_COLUMNS)
    inputs = pd.DataFrame(
        {"scenario": names, "field": ["name"] * len(names), "value as written": names}
    )
    return RunResult(
        sset,
        table,
        parts,
        inputs,
        models_used=("iapws-2008", "kell-1975", "hagen-poiseuille", "shah-1978"),
        notes=(Note("", None, "warning", HOSTILE[1]),),
    )


# --------------------------------------------------------------------------- neutralization
@pytest.mark.parametrize("payload", HOSTILE)
def test_formula_payloads_become_text(payload):
    safe = neutralize_cell(payload)
    assert safe.startswith("'")
    assert "\t" not in safe[:2] and "\r" not in safe[:2] or safe[0] == "'"


def test_plain_text_and_numbers_pass_unchanged():
    assert neutralize_cell("18G catheter, 45 mm") == "18G catheter, 45 mm"
    assert neutralize_cell(-3.5) == -3.5 and neutralize_cell(None) is None


def test_control_characters_are_replaced():
    assert neutralize_cell("a\x00b\x1bc") == "a\ufffdb\ufffdc"


def test_neutralize_frame_covers_cells_and_column_names():
    frame = pd.DataFrame({"=bad": ["=1", "ok"], "n": [1.0, -2.0]})
    safe = neutralize_frame(frame)
    assert list(safe.columns) == ["'=bad", "n"]
    assert list(safe["'=bad"]) == ["'=1", "ok"]
    assert list(safe["n"]) == [1.0, -2.0]


# --------------------------------------------------------------------------- a hostile pack
@pytest.fixture
def hostile_pack(tmp_path):
    run = fake_run(HOSTILE[:4] + [HTML_HOSTILE, "plain 18G"])
    return run, write_pack(run, tmp_path / "pack")


def test_pack_has_every_file_and_the_scenario_copy(hostile_pack):
    run, folder = hostile_pack
    names = {p.name for p in folder.iterdir()}
    assert set(PACK_FILES) <= names
    copy = folder / "scenario-hostile.toml"
    assert copy.read_text(encoding="utf-8") == run.scenario_set.text


def test_csv_cells_never_start_a_formula(hostile_pack):
    _, folder = hostile_pack
    for name in ("results.csv", "parts.csv"):
        with (folder / name).open(encoding="utf-8", newline="") as fh:
            cells = [c for row in csv.reader(fh) for c in row]
        assert cells, name
        assert not [c for c in cells if c[:1] in ("=", "+", "-", "@", "\t", "\r")], name
        assert "'" + HOSTILE[0] in cells


def test_csv_reads_back_with_pandas(hostile_pack):
    run, folder = hostile_pack
    back = pd.read_csv(folder / "results.csv", skiprows=1)
    assert list(back.columns) == list(run.table.columns)
    assert back["flow [mL/min]"].tolist() == pytest.approx(run.table["flow [mL/min]"].tolist())


def test_xlsx_holds_no_formula_and_every_sheet(hostile_pack):
    _, folder = hostile_pack
    wb = openpyxl.load_workbook(folder / "results.xlsx")
    assert wb.sheetnames == [
        "results",
        "parts",
        "scenario inputs",
        "assumptions",
        "model evidence",
        "cautions",
        "about",
    ]
    for ws in wb.worksheets:
        assert ws["A1"].value == "caution: " + rheoline.CAUTION
        for row in ws.iter_rows():
            for cell in row:
                assert cell.data_type != "f", (ws.title, cell.coordinate, cell.value)
                if isinstance(cell.value, str):
                    assert cell.value[:1] not in ("=", "+", "-", "@", "\t", "\r")
    results = wb["results"]
    names = [results.cell(row=r, column=1).value for r in range(3, results.max_row + 1)]
    assert "'" + HOSTILE[0] in names and "plain 18G" in names


def test_html_escapes_hostile_text(hostile_pack):
    _, folder = hostile_pack
    page = (folder / "report.html").read_text(encoding="utf-8")
    assert HTML_HOSTILE not in page
    assert "<img src=x" not in page and "alert(1)>" not in page
    assert "&lt;/script&gt;&lt;script&gt;alert(&quot;x&quot;)" in page
    parser = _Tags()
    parser.feed(page)
    assert "img" not in parser.tags
    assert not [a for a in parser.attrs if a[1].startswith("on")]
    # the only scripts are plotly's, as many as in a pack of harmless names; none external
    assert not [a for a in parser.attrs if a[0] == "script" and a[1] == "src"]
    benign = write_pack(fake_run([f"case {i}" for i in range(6)]), folder.parent / "benign")
    plain = _Tags()
    plain.feed((benign / "report.html").read_text(encoding="utf-8"))
    assert parser.tags.count("script") == plain.tags.count("script") >= 2


def test_html_is_self_contained_with_cautions_first(hostile_pack):
    run, folder = hostile_pack
    page = (folder / "report.html").read_text(encoding="utf-8")
    parser = _Tags()
    parser.feed(page)
    assert parser.body_first == ("div", {"class": "caution", "id": "caution", "role": "note"})
    assert page.count(html.escape(rheoline.CAUTION)) >= 2
    assert "cdn.plot.ly" not in page.split("<body>")[0]
    assert len(page) > 1_000_000  # plotly.js is embedded, not fetched
    assert hashlib.sha256(run.scenario_set.text.encode()).hexdigest() in page
    assert f"rheoline {rheoline.__version__}" in page


def test_manifest_hashes_every_file(hostile_pack):
    _, folder = hostile_pack
    manifest = json.loads((folder / "manifest.json").read_text())
    assert manifest["caution"] == rheoline.CAUTION
    for name, digest in manifest["files_sha256"].items():
        assert hashlib.sha256((folder / name).read_bytes()).hexdigest() == digest


# --------------------------------------------------------------------------- atomic writes
def _snapshot(folder):
    return {p.name: p.read_bytes() for p in folder.iterdir()}


def test_existing_pack_is_kept_without_force(tmp_path):
    run = fake_run(["a"])
    folder = write_pack(run, tmp_path / "pack")
    before = _snapshot(folder)
    with pytest.raises(PackExistsError, match="pass --force"):
        write_pack(fake_run(["b"]), folder)
    assert _snapshot(folder) == before


def test_a_failure_midway_leaves_the_earlier_pack_intact(tmp_path, monkeypatch):
    folder = write_pack(fake_run(["first"]), tmp_path / "pack")
    before = _snapshot(folder)
    written = []
    real_csv = pack_tables.write_csv

    def csv_then_count(frame, path, title_row):
        real_csv(frame, path, title_row)
        written.append(path)

    def disk_full(*args, **kwargs):
        assert written, "the failure must come after some files were written"
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(pack_tables, "write_csv", csv_then_count)
    monkeypatch.setattr(pack_report, "write_html", disk_full)
    with pytest.raises(OSError, match="No space left"):
        write_pack(fake_run(["second"]), folder, force=True)
    assert _snapshot(folder) == before
    assert [p.name for p in tmp_path.iterdir()] == ["pack"]  # no temporary folder left


def test_a_failure_in_a_new_pack_leaves_nothing(tmp_path, monkeypatch):
    monkeypatch.setattr(
        pack_tables, "write_xlsx", lambda *a: (_ for _ in ()).throw(OSError("boom"))
    )
    with pytest.raises(OSError, match="boom"):
        write_pack(fake_run(["x"]), tmp_path / "pack")
    assert list(tmp_path.iterdir()) == []


def test_force_replaces_a_pack_once_the_new_one_is_complete(tmp_path):
    folder = write_pack(fake_run(["first"]), tmp_path / "pack")
    write_pack(fake_run(["second"]), folder, force=True)
    back = pd.read_csv(folder / "results.csv", skiprows=1)
    assert back["case"].tolist() == ["second"]
    assert [p.name for p in tmp_path.iterdir()] == ["pack"]


def _edit_added_file(folder):
    (folder / "my notes.txt").write_text("mine")


def _edit_changed_file(folder):
    with (folder / "results.csv").open("a", encoding="utf-8") as fh:
        fh.write("my own row\n")


def _edit_subfolder(folder):
    (folder / "drafts").mkdir()


def _edit_foreign_manifest(folder):
    manifest = json.loads((folder / "manifest.json").read_text(encoding="utf-8"))
    (folder / "manifest.json").write_text(json.dumps({**manifest, "tool": "other"}))


def _edit_manifest_lists_outside(folder):
    manifest = json.loads((folder / "manifest.json").read_text(encoding="utf-8"))
    manifest["files_sha256"]["../outside.txt"] = "0" * 64
    (folder / "manifest.json").write_text(json.dumps(manifest))


def _edit_no_manifest(folder):
    (folder / "manifest.json").unlink()


@pytest.mark.parametrize(
    "edit",
    [
        _edit_added_file,
        _edit_changed_file,
        _edit_subfolder,
        _edit_foreign_manifest,
        _edit_manifest_lists_outside,
        _edit_no_manifest,
    ],
)
def test_force_replaces_only_an_unchanged_pack(tmp_path, edit):
    folder = write_pack(fake_run(["first"]), tmp_path / "pack")
    assert export.is_review_pack(folder)
    edit(folder)
    before = _tree(folder)
    assert not export.is_review_pack(folder)
    with pytest.raises(
        PackExistsError,
        match=r"pack.*is not a rheoline review pack.*choose a "
        r"new folder",
    ):
        write_pack(fake_run(["second"]), folder, force=True)
    assert _tree(folder) == before
    assert [p.name for p in tmp_path.iterdir()] == ["pack"]


def _tree(folder):
    return {
        str(p.relative_to(folder)): p.read_bytes() if p.is_file() else None
        for p in sorted(folder.rglob("*"))
    }


def test_force_never_replaces_an_empty_or_linked_folder(tmp_path):
    empty = tmp_path / "empty"
    empty.mkdir()
    with pytest.raises(PackExistsError, match="empty.*not a rheoline review pack"):
        write_pack(fake_run(["x"]), empty, force=True)
    assert empty.is_dir() and list(empty.iterdir()) == []
    pack = write_pack(fake_run(["first"]), tmp_path / "pack")
    link = tmp_path / "link"
    link.symlink_to(pack, target_is_directory=True)
    before = _snapshot(pack)
    with pytest.raises(PackExistsError, match="symbolic link"):
        write_pack(fake_run(["x"]), link, force=True)
    assert link.is_symlink() and _snapshot(pack) == before


def test_a_folder_changed_while_the_pack_is_written_is_kept(tmp_path, monkeypatch):
    folder = write_pack(fake_run(["first"]), tmp_path / "pack")
    real_html = pack_report.write_html

    def html_then_user_saves_a_file(path, page):
        real_html(path, page)
        (folder / "added meanwhile.txt").write_text("mine")

    monkeypatch.setattr(pack_report, "write_html", html_then_user_saves_a_file)
    with pytest.raises(PackExistsError, match="added meanwhile"):
        write_pack(fake_run(["second"]), folder, force=True)
    assert (folder / "added meanwhile.txt").read_text() == "mine"
    assert [p.name for p in tmp_path.iterdir()] == ["pack"]


def test_a_file_in_the_way_is_not_replaced(tmp_path):
    target = tmp_path / "pack"
    target.write_text("mine")
    with pytest.raises(PackExistsError, match="not a folder"):
        write_pack(fake_run(["x"]), target, force=True)
    assert target.read_text() == "mine"


def test_the_report_shows_hidden_format_characters_of_the_file(tmp_path):
    # a comment may hold a right-to-left override (names refuse it); the echo shows it
    from rheoline.scenario.compare import run_scenarios

    text = (
        'format_version = 1\n# 18G \u202e cart\n[[scenario]]\nname = "a"\n'
        'fluid = "water"\nhead = "1 m"\n[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
    )
    folder = write_pack(run_scenarios(loads_scenarios(text, source="c.toml")), tmp_path / "p")
    page = (folder / "report.html").read_text(encoding="utf-8")
    assert "# 18G [U+202E] cart" in page and "\u202e" not in page
    assert (folder / "scenario-c.toml").read_text(encoding="utf-8") == text  # copy as given


def test_a_pack_that_cannot_be_written_is_a_scenario_error_and_an_os_error(tmp_path, monkeypatch):
    from rheoline.errors import ScenarioError

    blocker = tmp_path / "a file"
    blocker.write_text("mine")
    with pytest.raises(export.OutputError, match="a file' is a file, not a folder") as info:
        write_pack(fake_run(["x"]), blocker / "pack")
    assert isinstance(info.value, ScenarioError) and isinstance(info.value, OSError)
    assert blocker.read_text() == "mine"
    monkeypatch.setattr(
        pack_tables,
        "write_xlsx",
        lambda *a: (_ for _ in ()).throw(PermissionError(13, "Permission denied")),
    )
    with pytest.raises(
        export.OutputError,
        match=r"pack: cannot write the review pack: "
        r"Permission denied",
    ):
        write_pack(fake_run(["x"]), tmp_path / "pack")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a file"]


def test_scenario_copy_and_hash_are_of_the_bytes_as_given(tmp_path):
    from rheoline.scenario.compare import run_scenarios
    from rheoline.scenario.files import example_path, load_scenarios

    src = tmp_path / "crlf.toml"
    data = b"\xef\xbb\xbf" + example_path("minimal").read_bytes().replace(b"\n", b"\r\n")
    src.write_bytes(data)  # a BOM and Windows line ends
    folder = write_pack(run_scenarios(load_scenarios(src)), tmp_path / "pack")
    assert (folder / "scenario-crlf.toml").read_bytes() == data
    manifest = json.loads((folder / "manifest.json").read_text())
    assert manifest["input_sha256"] == hashlib.sha256(data).hexdigest()
