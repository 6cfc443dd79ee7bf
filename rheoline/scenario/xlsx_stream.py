"""A streaming XLSX writer for the review pack: whole columns turned into sheet XML at once.

The pack's workbook is plain tables: per sheet a bold title row, a bold header row and
cells that are numbers, booleans or text (never a formula), the first two rows frozen and
column widths fitted to the data.  :func:`write_workbook` writes exactly that as an Office
Open XML package (ECMA-376 part 1, SpreadsheetML) with :mod:`zipfile`: each column's cells
are rendered once as XML fragments (text fragments memoized per distinct value), rows are
joined from them and streamed into the sheet's zip member in blocks, so the cost is a few
string operations per cell instead of a library's per-cell call chain.  At the documented
file limit (20,000 points: 1.26 million cells) XlsxWriter's constant-memory mode took most
of the review pack's time (measured in this project, issue 14).

Cells are written as XlsxWriter's constant-memory mode writes them, so the workbook reads
back the same: numbers as ``%.16G``, text as inline strings with control characters
escaped as ``_xHHHH_`` (a literal ``_xHHHH_`` gets its underscore escaped), ``&``, ``<``
and ``>`` as entities, leading or trailing white space preserved, text longer than Excel's
32,767 UTF-16 units cut there.  Every string is written as text; nothing is parsed.

Examples
--------
>>> import tempfile, pathlib, zipfile
>>> with tempfile.TemporaryDirectory() as tmp:
...     path = pathlib.Path(tmp) / "t.xlsx"
...     sheet = ("a title", ["x [mm]", "y"], [("number", [1.5]), ("text", ["a<b"])], [8, 8], 1)
...     write_workbook(path, {"one": sheet})
...     names = zipfile.ZipFile(path).namelist()
>>> "xl/worksheets/sheet1.xml" in names
True
"""

from __future__ import annotations

import re
import zipfile
from math import isfinite
from pathlib import Path

from rheoline.errors import OutputError

__all__ = ["write_workbook", "text_fragment", "number_fragment", "column_letters"]

#: Rows of sheet XML joined and written at a time.
_BLOCK_ROWS = 2000
#: zlib's level: 1 deflates sheet XML some three times faster than the default 6, for a
#: file about a quarter larger (measured on a pack at the documented limit).
_DEFLATE_LEVEL = 1
#: A sheet's grid in Excel: rows, columns (the last column is XFD).
_MAX_ROWS, _MAX_COLUMNS = 1_048_576, 16_384  # from memory
#: Excel's longest cell text [UTF-16 code units].
_MAX_TEXT = 32767
_SHEET_NAME_BAD = re.compile(r"[\[\]:*?/\\]")
_ESCAPED_ESCAPE = re.compile("(_x[0-9a-fA-F]{4}_)")
_CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f]")
_EDGE_SPACE = re.compile(r"^\s|\s$")
_MAIN = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
_PKG_REL = "http://schemas.openxmlformats.org/package/2006/relationships"
_HEAD = '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n'
_STYLES = (
    f'{_HEAD}<styleSheet xmlns="{_MAIN}">'
    '<fonts count="2"><font><sz val="11"/><name val="Calibri"/><family val="2"/></font>'
    '<font><b/><sz val="11"/><name val="Calibri"/><family val="2"/></font></fonts>'
    '<fills count="2"><fill><patternFill patternType="none"/></fill>'
    '<fill><patternFill patternType="gray125"/></fill></fills>'
    '<borders count="1"><border><left/><right/><top/><bottom/><diagonal/></border></borders>'
    '<cellStyleXfs count="1"><xf numFmtId="0" fontId="0" fillId="0" borderId="0"/></cellStyleXfs>'
    '<cellXfs count="2"><xf numFmtId="0" fontId="0" fillId="0" borderId="0" xfId="0"/>'
    '<xf numFmtId="0" fontId="1" fillId="0" borderId="0" xfId="0" applyFont="1"/></cellXfs>'
    '<cellStyles count="1"><cellStyle name="Normal" xfId="0" builtinId="0"/></cellStyles>'
    "</styleSheet>"
)
#: The style index of bold cells (the title and header rows).
_BOLD = 1


def column_letters(k):
    """The letters of 0-based column ``k`` (0 -> "A", 26 -> "AA").

    >>> column_letters(0), column_letters(25), column_letters(26), column_letters(16383)
    ('A', 'Z', 'AA', 'XFD')
    """
    out = ""
    k += 1
    while k:
        k, rem = divmod(k - 1, 26)
        out = chr(65 + rem) + out
    return out


def _utf16_cut(text):
    if (
        len(text) <= _MAX_TEXT // 2
        or len(text.encode("utf-16-le", "surrogatepass")) <= 2 * _MAX_TEXT
    ):
        return text
    used = 0
    for i, ch in enumerate(text):
        used += 2 if ord(ch) > 0xFFFF else 1
        if used > _MAX_TEXT:
            return text[:i]
    return text


def _xml_text(text):
    """Text as SpreadsheetML cell text: control characters as ``_xHHHH_``, entities."""
    text = _ESCAPED_ESCAPE.sub(r"_x005F\1", text)
    text = _CONTROL.sub(lambda m: f"_x{ord(m.group(0)):04X}_", text)
    text = text.replace("\ufffe", "_xFFFE_").replace("\uffff", "_xFFFF_")
    return text.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def text_fragment(text, style=""):
    """The rest of a text cell after ``<c r="A1"`` (an inline string).

    >>> text_fragment(" a<b ")
    ' t="inlineStr"><is><t xml:space="preserve"> a&lt;b </t></is></c>'
    """
    text = _xml_text(_utf16_cut(text))
    space = ' xml:space="preserve"' if _EDGE_SPACE.search(text) else ""
    return f'{style} t="inlineStr"><is><t{space}>{text}</t></is></c>'


def number_fragment(value):
    """The rest of a number cell after ``<c r="A1"`` (``%.16G``, as XlsxWriter writes);
    None (an empty cell) for NaN or an infinity, which a cell cannot hold (``NAN`` in
    ``<v>`` makes the workbook unreadable).

    >>> number_fragment(0.1), number_fragment(2.0), number_fragment(1e-7)
    ('><v>0.1</v></c>', '><v>2</v></c>', '><v>1E-07</v></c>')
    >>> number_fragment(float("nan")) is None
    True
    """
    return f"><v>{value:.16G}</v></c>" if isfinite(value) else None


_TRUE, _FALSE = ' t="b"><v>1</v></c>', ' t="b"><v>0</v></c>'


def _fragments(kind, values):
    """Per cell of a column of ``kind`` ("bool", "number", "text"), its fragment or None."""
    if kind == "bool":
        return [_TRUE if v else _FALSE for v in values]
    if kind == "number":
        return [None if v is None else number_fragment(v) for v in values]
    memo = {}
    out = []
    for v in values:
        if v is None:
            out.append(None)
        elif type(v) is str:
            frag = memo.get(v)
            if frag is None:
                frag = memo[v] = text_fragment(v)
            out.append(frag)
        elif isinstance(v, bool):
            out.append(_TRUE if v else _FALSE)
        else:
            out.append(number_fragment(v))
    return out


def _width_xml(widths):
    """``<cols>`` of column widths in characters, as Excel stores them (Calibri 11:
    7-pixel digits, 5 pixels of padding)."""
    cols = []
    for k, width in enumerate(widths, start=1):
        pixels = int(width * 7 + 0.5) + 5
        cols.append(
            f'<col min="{k}" max="{k}" width="{(pixels * 256 // 7) / 256:.16g}" customWidth="1"/>'
        )
    return f"<cols>{''.join(cols)}</cols>" if cols else ""


def _sheet_rows(fh, title, header, columns, n_rows):
    """Stream the rows of one sheet into ``fh`` (bytes): the title, the header, the data."""
    letters = [column_letters(k) for k in range(max(1, len(header)))]
    bold = f' s="{_BOLD}"'
    head = "".join(
        f'<c r="{c}2"{text_fragment(h, bold)}' for c, h in zip(letters, header, strict=False)
    )
    fh.write(
        f'<row r="1"><c r="A1"{text_fragment(title, bold)}</row><row r="2">{head}</row>'.encode()
    )
    frags = [_fragments(kind, values) for kind, values in columns]
    for start in range(0, n_rows, _BLOCK_ROWS):
        rows = []
        for r in range(start, min(n_rows, start + _BLOCK_ROWS)):
            number = r + 3
            cells = "".join(
                f'<c r="{c}{number}"{f[r]}'
                for c, f in zip(letters, frags, strict=False)
                if f[r] is not None
            )
            rows.append(f'<row r="{number}">{cells}</row>')
        fh.write("".join(rows).encode())


def _sheet(zf, index, sheet):
    title, header, columns, widths, n_rows = sheet
    last = column_letters(max(1, len(header)) - 1)
    dimension = f"A1:{last}{n_rows + 2}"
    selected = ' tabSelected="1"' if index == 1 else ""
    start = (
        f'{_HEAD}<worksheet xmlns="{_MAIN}" xmlns:r="{_REL}"><dimension ref="{dimension}"/>'
        f'<sheetViews><sheetView{selected} workbookViewId="0"><pane ySplit="2" topLeftCell="A3" '
        'activePane="bottomLeft" state="frozen"/><selection pane="bottomLeft"/></sheetView>'
        f'</sheetViews><sheetFormatPr defaultRowHeight="15"/>{_width_xml(widths)}<sheetData>'
    )
    end = (
        '</sheetData><pageMargins left="0.7" right="0.7" top="0.75" bottom="0.75" '
        'header="0.3" footer="0.3"/></worksheet>'
    )
    # no ZIP64 records: spreadsheet programs are reported to refuse them in a small file,
    # and a sheet within the file limits (20,000 points) is far below zip's 2 GiB
    with zf.open(f"xl/worksheets/sheet{index}.xml", "w") as fh:
        fh.write(start.encode())
        _sheet_rows(fh, title, header, columns, n_rows)
        fh.write(end.encode())


def _attribute(text):
    return (
        text.replace("&", "&amp;").replace('"', "&quot;").replace("<", "&lt;").replace(">", "&gt;")
    )


def _package_parts(names):
    sheets = range(1, len(names) + 1)
    types = "".join(
        f'<Override PartName="/xl/worksheets/sheet{i}.xml" ContentType="application/'
        'vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/>'
        for i in sheets
    )
    content_types = (
        f'{_HEAD}<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">'
        '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.'
        'relationships+xml"/><Default Extension="xml" ContentType="application/xml"/>'
        '<Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-'
        'officedocument.spreadsheetml.sheet.main+xml"/><Override PartName="/xl/styles.xml" '
        'ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.styles+xml"/>'
        f"{types}</Types>"
    )
    root_rels = (
        f'{_HEAD}<Relationships xmlns="{_PKG_REL}"><Relationship Id="rId1" Type="{_REL}/'
        'officeDocument" Target="xl/workbook.xml"/></Relationships>'
    )
    book_sheets = "".join(
        f'<sheet name="{_attribute(name)}" sheetId="{i}" r:id="rId{i}"/>'
        for i, name in zip(sheets, names, strict=True)
    )
    workbook = (
        f'{_HEAD}<workbook xmlns="{_MAIN}" xmlns:r="{_REL}"><bookViews><workbookView/>'
        f"</bookViews><sheets>{book_sheets}</sheets></workbook>"
    )
    rels = "".join(
        f'<Relationship Id="rId{i}" Type="{_REL}/worksheet" Target="worksheets/sheet{i}.xml"/>'
        for i in sheets
    )
    styles = len(names) + 1
    book_rels = (
        f'{_HEAD}<Relationships xmlns="{_PKG_REL}">{rels}<Relationship Id="rId{styles}" '
        f'Type="{_REL}/styles" Target="styles.xml"/></Relationships>'
    )
    return {
        "[Content_Types].xml": content_types,
        "_rels/.rels": root_rels,
        "xl/workbook.xml": workbook,
        "xl/_rels/workbook.xml.rels": book_rels,
        "xl/styles.xml": _STYLES,
    }


def _check_name(name, seen):
    if not name or len(name) > 31 or _SHEET_NAME_BAD.search(name) or name.lower() in seen:
        raise OutputError(
            f"sheet name {name!r}: 1-31 characters, unique, none of []:*?/\\", field="sheet"
        )
    seen.add(name.lower())


def _check_size(name, header, n_rows):
    """A sheet within a spreadsheet's grid (:data:`_MAX_ROWS` x :data:`_MAX_COLUMNS`),
    title and header rows included: never a workbook a spreadsheet cuts or refuses."""
    if n_rows + 2 > _MAX_ROWS or len(header) > _MAX_COLUMNS:
        raise OutputError(
            f"sheet {name!r}: {n_rows + 2:,} rows x {len(header):,} columns exceed a "
            f"spreadsheet's {_MAX_ROWS:,} x {_MAX_COLUMNS:,}; the CSV files hold every row",
            field="sheet",
        )


def write_workbook(path, sheets):
    """Write an XLSX workbook of ``sheets``: ``{name: (title, header, columns, widths,
    n_rows)}``, where ``columns`` is a list of ``(kind, values)`` (kind "bool", "number"
    or "text"; ``values`` a list of ``n_rows`` cells, None for an empty cell; a text
    column's non-text cells are numbers or booleans) and ``widths`` the column widths in
    characters; or a function of no arguments returning that tuple, called when the sheet
    is written (one sheet's cells in memory at a time).  Title and header are bold, the
    two rows frozen.  Text must already be
    safe for a spreadsheet (:func:`rheoline.scenario.pack_tables.neutralize_cell`)."""
    seen = set()
    for name in sheets:
        _check_name(name, seen)
    with zipfile.ZipFile(
        Path(path), "w", compression=zipfile.ZIP_DEFLATED, compresslevel=_DEFLATE_LEVEL
    ) as zf:
        for member, text in _package_parts(list(sheets)).items():
            zf.writestr(member, text)
        for index, (name, sheet) in enumerate(sheets.items(), start=1):
            sheet = sheet() if callable(sheet) else sheet
            _check_size(name, sheet[1], sheet[4])
            _sheet(zf, index, sheet)
