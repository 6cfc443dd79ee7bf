"""The review pack's tables: cells made safe for spreadsheets, and the CSV and XLSX writers.

Text cells that a spreadsheet would run as a formula (starting with ``=``, ``+``, ``-``,
``@``, tab, carriage return or line feed) get a leading apostrophe, and control characters
are replaced, in CSV and XLSX alike (:func:`neutralize_cell`).  Every file and sheet starts
with a title row (the pack writes the caution there), then a header row with the units in
the column names; numbers stay numbers and missing values are empty cells.
"""

from __future__ import annotations

import csv
import functools
import math
import re
from collections.abc import Mapping
from pathlib import Path

import numpy as np

__all__ = [
    "neutralize_cell",
    "neutralize_frame",
    "plain_value",
    "write_csv",
    "write_xlsx",
]

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r", "\n")
_FIRST_OF_FORMULA = frozenset(_FORMULA_START)
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
    """A copy of a DataFrame with every text cell and column name neutralized.

    Vectorized by column (:func:`neutralize_cell` applied through pandas' string methods):
    only text cells change; numbers, booleans and missing values in a text column pass.
    """
    out = frame.copy()
    out.columns = [neutralize_cell(str(c)) for c in out.columns]
    for k in range(out.shape[1]):
        col = out.iloc[:, k]
        if col.dtype == object or str(col.dtype) in ("string", "str"):
            out.isetitem(k, _neutralized_column(col))
    return out


def _neutralized_column(col):
    """A text column with :func:`neutralize_cell` applied to its strings (object dtype).

    One regular-expression search over the column's joined text and a check of first
    characters find whether any cell changes (the common case: none); only then are cells
    neutralized, once per distinct text."""
    values = col.astype(object)
    cells = values.to_numpy()
    text = [v for v in cells if isinstance(v, str)]
    if not text or (
        _CONTROL.search("\n".join(text)) is None
        and _FIRST_OF_FORMULA.isdisjoint({v[:1] for v in text})
    ):
        return values
    done = {}
    out = [
        (done[v] if v in done else done.setdefault(v, neutralize_cell(v)))
        if isinstance(v, str)
        else v
        for v in cells
    ]
    return _series(out, values)


def _series(cells, like):
    """``cells`` as an object Series with the index and name of ``like``."""
    import pandas as pd

    return pd.Series(cells, index=like.index, name=like.name, dtype=object)


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
def _finite_numbers(frame):
    """``frame`` with infinities in its float columns made missing (empty cells)."""
    floats = [k for k in range(frame.shape[1]) if frame.dtypes.iloc[k].kind == "f"]
    for k in floats:
        col = frame.iloc[:, k]
        if not np.isfinite(col.to_numpy()[col.notna().to_numpy()]).all():
            frame.isetitem(k, col.where(np.isfinite(col.to_numpy()), np.nan))
    return frame


def write_csv(frame, path: Path, title_row: str):
    """CSV with ``title_row`` on its first line, then a header row; numbers as numbers.

    Cells are neutralized by column (:func:`neutralize_frame`), taken out of the frame a
    column at a time and written by :func:`csv.writer` (numbers as ``repr``, as
    ``DataFrame.to_csv`` writes them, at a fraction of its cost); missing and infinite
    numbers are empty cells.
    """
    safe = _finite_numbers(neutralize_frame(frame))
    columns = [_csv_cells(safe.iloc[:, k]) for k in range(safe.shape[1])]
    with Path(path).open("w", encoding="utf-8", newline="") as fh:
        out = csv.writer(fh, lineterminator="\r\n")
        out.writerow([neutralize_cell(title_row)])
        out.writerow(list(safe.columns))
        out.writerows(zip(*columns, strict=True))


def _csv_cells(col):
    """A column's cells as Python objects, None where missing (an empty cell)."""
    values = col.tolist()
    missing = col.isna().to_numpy()
    if not missing.any():
        return values
    return [None if gone else v for v, gone in zip(values, missing.tolist(), strict=True)]


# --------------------------------------------------------------------------- XLSX
def _xlsx_column(col):
    """A column as ``(kind, values)`` for :func:`rheoline.scenario.xlsx_stream.write_workbook`:
    booleans, numbers (missing and infinite ones None) or text (neutralized at once; the
    column's other values one by one, None where missing)."""
    kind = col.dtype.kind
    if kind == "b" and not col.isna().any():
        return "bool", col.tolist()
    if kind in "iuf":
        values = col.to_numpy(dtype=float)
        values = np.where(np.isfinite(values), values, np.nan).tolist()
        return "number", [None if v != v else v for v in values]
    missing = col.isna().to_numpy().tolist()
    values = _neutralized_column(col).tolist()
    return "text", [
        None if gone else (v if type(v) is str else _xlsx_value(v))
        for v, gone in zip(values, missing, strict=True)
    ]


def _xlsx_value(v):
    """A cell of a mixed (text) column: a number, a boolean, neutralized text or None."""
    v = plain_value(v)
    if isinstance(v, float) and not math.isfinite(v):
        return None
    if isinstance(v, (bool, int, float)) or v is None:
        return v
    return neutralize_cell(str(v))


def _column_width(name, values):
    low, high = _WIDTH_RANGE
    width = max((len(str(v)) for v in values if v is not None), default=low)
    return min(max(max(width, len(name)) + 2, low), high)


def _sheet(frame, title_row):
    header = [neutralize_cell(str(c)) for c in frame.columns]
    columns = [_xlsx_column(frame.iloc[:, k]) for k in range(frame.shape[1])]
    # widths from the data (at most the first 2,000 rows: a width, not a census)
    widths = [
        _column_width(name, values[:2000])
        for name, (_, values) in zip(header, columns, strict=True)
    ]
    return neutralize_cell(title_row), header, columns, widths, len(frame)


def write_xlsx(path: Path, sheets: Mapping[str, object], title_row: str):
    """A workbook with one sheet per ``(name, DataFrame)``, each headed by ``title_row``.

    Written by :func:`rheoline.scenario.xlsx_stream.write_workbook`, which renders whole
    columns to sheet XML and streams the rows to disk: at the documented file limit
    (20,000 points, 1.26 million cells) XlsxWriter's constant-memory mode took some 10 s of
    per-cell calls and most of a pack's time (and openpyxl's write-only mode 1.8 times
    more).  No cell holds a formula: every string is written as text, after
    :func:`neutralize_cell`.
    """
    from rheoline.scenario.xlsx_stream import write_workbook

    write_workbook(
        path,
        {name: functools.partial(_sheet, frame, title_row) for name, frame in sheets.items()},
    )
