"""The review pack's tables: cells made safe for spreadsheets, and the CSV and XLSX writers.

Text cells that a spreadsheet would run as a formula (starting with ``=``, ``+``, ``-``,
``@``, tab, carriage return or line feed) get a leading apostrophe, and control characters
are replaced, in CSV and XLSX alike (:func:`neutralize_cell`).  Every file and sheet starts
with a title row (the pack writes the caution there), then a header row with the units in
the column names; numbers stay numbers and missing values are empty cells.
"""

from __future__ import annotations

import csv
import math
import re
from collections.abc import Mapping
from pathlib import Path

__all__ = [
    "neutralize_cell",
    "neutralize_frame",
    "plain_value",
    "write_csv",
    "write_xlsx",
]

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r", "\n")
_CONTROL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f\x7f]")
#: Column widths of a sheet [characters]: at least, at most.
_WIDTH_RANGE = (8, 60)


def neutralize_cell(value):
    """Make a cell safe for a spreadsheet: no formula, no control characters.

    Strings starting with ``=``, ``+``, ``-``, ``@``, tab, carriage return or line feed get a
    leading apostrophe (shown as text by spreadsheet programs, OWASP's advice for CSV
    injection); other control characters become U+FFFD.  Numbers pass unchanged.

    Examples
    --------
    >>> neutralize_cell("=HYPERLINK(\\"http://x\\")")
    '\\'=HYPERLINK("http://x")'
    >>> neutralize_cell("18G catheter"), neutralize_cell(-3.5)
    ('18G catheter', -3.5)
    """
    if not isinstance(value, str):
        return value
    value = _CONTROL.sub("\ufffd", value)
    if value.startswith(_FORMULA_START):
        value = "'" + value
    return value


def neutralize_frame(frame):
    """A copy of a DataFrame with every text cell and column name neutralized."""
    out = frame.copy()
    out.columns = [neutralize_cell(str(c)) for c in out.columns]
    for col in out.columns:
        if out[col].dtype == object or str(out[col].dtype) in ("string", "str"):
            out[col] = out[col].map(neutralize_cell).astype(object)
    return out


def plain_value(v):
    """numpy scalars to Python scalars; missing values (None, NaN, NA) to None.

    >>> import numpy as np
    >>> plain_value(np.float64(2.5)), plain_value(np.nan), plain_value("x")
    (2.5, None, 'x')
    """
    if hasattr(v, "item") and not isinstance(v, str):
        try:
            v = v.item()
        except (ValueError, AttributeError):
            pass
    if v is None:
        return None
    try:
        import pandas as pd

        if pd.isna(v):
            return None
    except (TypeError, ValueError):
        pass
    return v


# --------------------------------------------------------------------------- CSV
def _csv_value(v):
    if isinstance(v, float) and not math.isfinite(v):
        return ""
    return neutralize_cell(v)


def write_csv(frame, path: Path, title_row: str):
    """CSV with ``title_row`` on its first line, then a header row; numbers as numbers."""
    safe = neutralize_frame(frame)
    with Path(path).open("w", encoding="utf-8", newline="") as fh:
        w = csv.writer(fh)
        w.writerow([neutralize_cell(title_row)])
        w.writerow(list(safe.columns))
        for row in safe.itertuples(index=False):
            w.writerow([_csv_value(plain_value(v)) for v in row])


# --------------------------------------------------------------------------- XLSX
def _xlsx_value(v):
    v = plain_value(v)
    if isinstance(v, float) and not math.isfinite(v):
        return None
    if isinstance(v, (bool, int, float)) or v is None:
        return v
    return neutralize_cell(str(v))


def _write_sheet(ws, frame, title_row):
    from openpyxl.styles import Font

    ws.append([neutralize_cell(title_row)])
    ws["A1"].font = Font(bold=True)
    ws.append([neutralize_cell(str(c)) for c in frame.columns])
    for cell in ws[2]:
        cell.font = Font(bold=True)
    for row in frame.itertuples(index=False):
        ws.append([_xlsx_value(v) for v in row])
    ws.freeze_panes = "A3"
    low, high = _WIDTH_RANGE
    for col in ws.columns:
        width = max((len(str(c.value)) for c in col[1:] if c.value is not None), default=low)
        ws.column_dimensions[col[0].column_letter].width = min(max(width + 2, low), high)


def write_xlsx(path: Path, sheets: Mapping[str, object], title_row: str):
    """A workbook with one sheet per ``(name, DataFrame)``, each headed by ``title_row``.

    No cell holds a formula: text goes through :func:`neutralize_cell`, and any cell the
    writer still typed as a formula is turned into text before saving.
    """
    from openpyxl import Workbook

    wb = Workbook()
    wb.remove(wb.active)
    for name, frame in sheets.items():
        _write_sheet(wb.create_sheet(name), frame, title_row)
    for sheet in wb.worksheets:  # every cell: no formula may survive
        for row in sheet.iter_rows():
            for cell in row:
                if cell.data_type == "f":  # pragma: no cover - neutralize_cell prevents it
                    cell.value = "'" + str(cell.value)
                    cell.data_type = "s"
    wb.save(path)
