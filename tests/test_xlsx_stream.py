"""The review pack's streaming XLSX writer (rheoline.scenario.xlsx_stream).

The reference is XlsxWriter (used here only as a reference library) in the constant-memory
mode the pack used before: the same frames written by both read back cell for cell the
same through openpyxl (the SpreadsheetML reader of the ECMA-376 format), with the same
frozen rows, column widths and bold header.
"""

from __future__ import annotations

import zipfile
from xml.etree import ElementTree

import numpy as np
import openpyxl
import pandas as pd
import pytest

from rheoline.errors import OutputError
from rheoline.scenario import pack_tables
from rheoline.scenario.xlsx_stream import number_fragment, write_workbook


def _hostile():
    return pd.DataFrame(
        {
            "text": ["=1+2", "a\x01b", "_x0041_ x", " lead", "tail\t", "é€😀", "a&b<c>", None],
            "number [mm]": [1.0, np.inf, np.nan, -0.0, 1e-300, 123456789.123456789, 2, -7.5e12],
            "flag": [True, False] * 4,
            "mixed": ["x", 1, 2.5, True, None, np.nan, float("inf"), "@SUM(A1)"],
        }
    )


def _reference_xlsx(path, sheets, title_row):
    """The pack's earlier writer: XlsxWriter, constant memory, one call per cell."""
    import xlsxwriter

    options = {"constant_memory": True, "strings_to_formulas": False, "strings_to_urls": False}
    book = xlsxwriter.Workbook(str(path), {**options, "strings_to_numbers": False})
    bold = book.add_format({"bold": True})
    for name, frame in sheets.items():
        title, header, columns, widths, n = pack_tables._sheet(frame, title_row)
        sheet = book.add_worksheet(name)
        for k, width in enumerate(widths):
            sheet.set_column(k, k, width)
        sheet.freeze_panes(2, 0)
        sheet.write_string(0, 0, title, bold)
        sheet.write_row(1, 0, header, bold)
        for r in range(n):
            for k, (_, values) in enumerate(columns):
                v = values[r]
                if isinstance(v, str):
                    sheet.write_string(r + 2, k, v)
                elif isinstance(v, bool):
                    sheet.write_boolean(r + 2, k, v)
                elif v is not None:
                    sheet.write_number(r + 2, k, v)
    book.close()


def _widths(sheet):
    """Column widths by 1-based column (XlsxWriter merges equal neighbours into a range)."""
    return {
        k: d.width
        for d in sheet.column_dimensions.values()
        if d.min is not None
        for k in range(d.min, d.max + 1)
    }


def test_reads_back_as_xlsxwriter_writes_it(tmp_path):
    from rheoline.scenario.compare import run_scenarios
    from rheoline.scenario.files import example_path, load_scenarios

    run = run_scenarios(load_scenarios(example_path("bench-sweep")))
    sheets = {"results": run.table, "parts": run.parts, "hostile": _hostile()}
    pack_tables.write_xlsx(tmp_path / "new.xlsx", sheets, "caution: =x")
    _reference_xlsx(tmp_path / "ref.xlsx", sheets, "caution: =x")
    new = openpyxl.load_workbook(tmp_path / "new.xlsx")
    ref = openpyxl.load_workbook(tmp_path / "ref.xlsx")
    assert new.sheetnames == ref.sheetnames == ["results", "parts", "hostile"]
    for name in new.sheetnames:
        a, b = new[name], ref[name]
        assert list(a.iter_rows(values_only=True)) == list(b.iter_rows(values_only=True))
        assert a.freeze_panes == b.freeze_panes == "A3"
        assert a.dimensions == b.dimensions
        assert _widths(a) == _widths(b) and len(_widths(a)) == a.max_column
        assert a["A1"].font.b and a["B2"].font.b and not a["A3"].font.b
    rows = list(new["hostile"].iter_rows(values_only=True))
    assert rows[2] == ("'=1+2", 1, True, "x")  # neutralized, never a formula
    assert rows[3][:2] == ("a\ufffdb", None)  # control character replaced; inf: empty
    # a literal "_x0041_" gets its underscore escaped (ECMA-376 part 1, ST_Xstring; as
    # XlsxWriter does), so a spreadsheet shows it as written; openpyxl reads the escape raw
    assert rows[4][0] == "_x005F_x0041_ x"


def test_text_shaped_like_xml_stays_text(tmp_path):
    # XlsxWriter's constant-memory mode writes a string "<r>...</r>" as raw rich-text XML;
    # here every string is escaped text
    frame = pd.DataFrame({"t": ["<r>x</r>", "<r><t>y</t></r>", "</t></is></c>"]})
    pack_tables.write_xlsx(tmp_path / "t.xlsx", {"s": frame}, "title")
    rows = list(openpyxl.load_workbook(tmp_path / "t.xlsx")["s"].iter_rows(values_only=True))
    assert [r[0] for r in rows[2:]] == ["<r>x</r>", "<r><t>y</t></r>", "</t></is></c>"]


def test_every_member_is_well_formed_xml_and_text_is_cut_at_excels_limit(tmp_path):
    long = "ab" * 20000 + "😀"
    frame = pd.DataFrame({"t": [long, "x"], "n [-]": [1.5, None]})
    pack_tables.write_xlsx(tmp_path / "t.xlsx", {"one": frame, "two": frame.iloc[:0]}, "title")
    with zipfile.ZipFile(tmp_path / "t.xlsx") as zf:
        assert zf.testzip() is None
        for member in zf.namelist():
            ElementTree.fromstring(zf.read(member))  # raises when malformed
    book = openpyxl.load_workbook(tmp_path / "t.xlsx")
    assert book["one"]["A3"].value == long[:32767]  # Excel's cell limit (UTF-16 units)
    assert book["one"]["B4"].value is None
    assert [c.value for c in book["two"][2]] == ["t", "n [-]"]


@pytest.mark.parametrize("name", ["", "x" * 32, "a/b", "dup"])
def test_sheet_names_are_checked(tmp_path, name):
    sheet = ("title", ["x"], [("number", [1.0])], [8], 1)
    sheets = {name: sheet, "DUP": sheet} if name == "dup" else {name: sheet}
    with pytest.raises(OutputError, match="sheet name"):
        write_workbook(tmp_path / "t.xlsx", sheets)


def test_a_sheet_beyond_a_spreadsheets_grid_is_refused(tmp_path):
    rows = ("title", ["x"], [("number", [])], [8], 1_048_575)  # + title and header rows
    with pytest.raises(OutputError, match="1,048,577 rows x 1 columns exceed"):
        write_workbook(tmp_path / "t.xlsx", {"s": rows})
    wide = ("title", ["x"] * 16_385, [], [], 0)
    with pytest.raises(ValueError, match="16,385 columns exceed"):
        write_workbook(tmp_path / "t.xlsx", {"s": wide})
    fits = ("title", ["x"], [("number", [1.0])], [8], 1)
    write_workbook(tmp_path / "t.xlsx", {"s": fits})
    assert openpyxl.load_workbook(tmp_path / "t.xlsx")["s"]["A3"].value == 1.0


def test_no_zip64_records_in_a_workbook_of_ordinary_size(tmp_path):
    # APPNOTE.TXT (PKWARE, zip format specification) 4.3.7: a local file header is the
    # signature PK\x03\x04, "version needed to extract" (2 bytes), ..., the extra field
    # length at offset 28; ZIP64 records need version 45 and extra field id 0x0001.
    # Spreadsheet programs are reported to refuse ZIP64 records in small files, and
    # XlsxWriter never writes them there (the reference writer below).
    frame = pd.DataFrame({"n [-]": [1.5, 2.5], "t": ["a", "b"]})
    pack_tables.write_xlsx(tmp_path / "t.xlsx", {"one": frame}, "title")
    data = (tmp_path / "t.xlsx").read_bytes()
    with zipfile.ZipFile(tmp_path / "t.xlsx") as zf:
        infos = zf.infolist()
    assert any(i.filename.startswith("xl/worksheets/") for i in infos)
    for info in infos:
        head = data[info.header_offset : info.header_offset + 30]
        assert head[:4] == b"PK\x03\x04"
        version = int.from_bytes(head[4:6], "little")
        assert version < 45, (info.filename, version)
        name_len = int.from_bytes(head[26:28], "little")
        extra_len = int.from_bytes(head[28:30], "little")
        extra = data[
            info.header_offset + 30 + name_len : info.header_offset + 30 + name_len + extra_len
        ]
        assert b"\x01\x00" not in extra[:2], info.filename  # no ZIP64 extended information


def test_a_number_a_cell_cannot_hold_is_an_empty_cell(tmp_path):
    nan, inf = float("nan"), float("inf")
    assert number_fragment(nan) is None and number_fragment(-inf) is None
    sheet = ("title", ["x"], [("number", [1.0, nan, inf])], [8], 3)
    write_workbook(tmp_path / "t.xlsx", {"s": sheet})
    sheet = openpyxl.load_workbook(tmp_path / "t.xlsx")["s"]  # loads: no NAN in a <v>
    assert [sheet.cell(r, 1).value for r in (3, 4, 5)] == [1.0, None, None]
    with zipfile.ZipFile(tmp_path / "t.xlsx") as zf:
        xml = zf.read("xl/worksheets/sheet1.xml").decode()
    assert "<v>1</v>" in xml and "NAN" not in xml and "INF" not in xml
