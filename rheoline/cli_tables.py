"""Printed tables of the command line, fitted to the terminal.

:func:`frame_text` renders a table in a given width: the case, flow and flags columns are
kept, numbers right-aligned, long text wrapped in its cell, and a line names the columns
left out (``--columns`` chooses them, ``--width`` sets the width; ``--json`` and the pack
hold everything).
"""

from __future__ import annotations

import textwrap


class BadUsage(Exception):
    """A usage error of the command line (exit 2, one line)."""


def printable(text):
    text = str(text)
    if text.isprintable():  # the common case, at C speed
        return text
    return "".join(c if c.isprintable() else "?" for c in text)


def cell_text(v):
    """(text, is_number) of one table cell."""
    import pandas as pd

    if type(v) is float:  # the common case first
        if v != v:
            return "", True
        from rheoline.units import significant

        return significant(v), True
    if type(v) is str:
        return printable(v), False
    if hasattr(v, "item") and not isinstance(v, str):
        try:
            v = v.item()
        except (ValueError, AttributeError):
            pass
    if v is None or (not isinstance(v, str | bool) and pd.isna(v)):
        return "", True
    if isinstance(v, bool):
        return ("yes" if v else "no"), False
    if isinstance(v, int | float):
        from rheoline.units import significant

        return significant(v), True
    return printable(v), False


def frame_text(frame, width=None, caps=None):
    """A plain-text table: text left-aligned, numbers right-aligned, blanks for missing
    values; with ``width``, the widest text columns wrap within their cells to fit it, and a
    text column named in ``caps`` wraps at that many characters."""
    columns = [printable(c) for c in frame.columns]
    by_column = [column_texts(frame, k) for k in range(frame.shape[1])]
    numeric = [num for _, num in by_column]
    widths = [
        max([len(c)] + [len(t) for t in texts])
        for c, (texts, _) in zip(columns, by_column, strict=True)
    ]
    widths = [min(w, (caps or {}).get(c, w)) for w, c in zip(widths, frame.columns, strict=True)]
    if width is not None:
        widths = fitted_widths(widths, numeric, width)

    def lines(texts):
        wrapped = [
            textwrap.wrap(t, w, break_long_words=True) or [""] if len(t) > w else [t]
            for t, w in zip(texts, widths, strict=True)
        ]
        out = []
        for k in range(max(len(w) for w in wrapped)):
            parts = [
                (w[k] if k < len(w) else "").rjust(n)
                if num
                else (w[k] if k < len(w) else "").ljust(n)
                for w, n, num in zip(wrapped, widths, numeric, strict=True)
            ]
            out.append("  ".join(parts).rstrip())
        return out

    body = [line for row in zip(*(t for t, _ in by_column), strict=True) for line in lines(row)]
    return "\n".join(lines(columns) + body)


def column_texts(frame, k):
    """The texts of column ``k`` of ``frame`` (:func:`cell_text`, once per distinct value)
    and whether it is numeric (every cell a number or blank; False for no rows)."""
    values = frame.iloc[:, k].tolist()
    done, texts, numeric = {}, [], bool(values)
    for v in values:
        key = (type(v), v)
        try:
            text, num = done[key]
        except KeyError:
            text, num = done[key] = cell_text(v)
        except TypeError:  # unhashable
            text, num = cell_text(v)
        texts.append(text)
        numeric = numeric and num
    return texts, numeric


#: The narrowest a wrapped text column gets, the flags column, and the case column in a
#: table fitted to the width [characters].
_MIN_WRAP, _MIN_FLAGS, _MIN_CASE = 14, 24, 24


def fitted_widths(widths, numeric, width):
    """Column widths within ``width`` (two spaces between columns): the widest text columns
    give up characters first, none below :data:`_MIN_WRAP` (numbers never wrap)."""
    widths = list(widths)
    over = sum(widths) + 2 * (len(widths) - 1) - width
    while over > 0:
        text = [j for j, num in enumerate(numeric) if not num and widths[j] > _MIN_WRAP]
        if not text:
            break
        j = max(text, key=lambda i: widths[i])
        cut = min(over, widths[j] - _MIN_WRAP)
        widths[j] -= cut
        over -= cut
    return widths


#: The columns printed when --columns is not given, most wanted first (flows are matched by
#: their start, since their unit is chosen); the others are added while they fit.
DEFAULT_COLUMNS = (
    "case",
    "flow [",
    "source pressure [mmHg]",
    "regime",
    "dominant part (share)",
    "flags",
    "max wall shear [Pa]",
    "flow p5-p95 [",
    "deliver [min]",
    "max Re",
    "flow model band [",
    "pressure model band [mmHg]",
    "pressure p5-p95 [mmHg]",
    "spread led by",
    "model band led by",
)


def columns_option(text):
    """The --columns choice: None (fit the width), "all", or a list of names."""
    if text is None:
        return None
    if text.strip().lower() == "all":
        return "all"
    return [name.strip() for name in text.split(",") if name.strip()]


def width_option(width):
    """The table width: --width, else the terminal's, else 100 characters."""
    if width is not None:
        if width < 40:
            raise BadUsage(f"--width {width} is too narrow; give 40 or more characters")
        return width
    import shutil

    return shutil.get_terminal_size((100, 24)).columns


def chosen(frame, names):
    """The columns of ``frame`` named in ``names`` (each a whole name, a name less its unit,
    or a unique start of a name; any case), after the case column."""
    chosen = ["case"]
    for name in names:
        found = [c for c in frame.columns if c.lower().startswith(name.lower())]
        # a whole name, or a name less its unit ("flow" for "flow [mL/h]")
        exact = [c for c in found if name.lower() in (c.lower(), c.split(" [")[0].lower())]
        if len(exact) == 1 or len(found) == 1:
            column = (exact or found)[0]
        else:
            what = "matches several columns" if found else "is not a column"
            raise BadUsage(
                f"--columns: {name!r} {what}; the columns are: {', '.join(frame.columns)}"
            )
        if column not in chosen:
            chosen.append(column)
    return frame[chosen]


def fitting(frame, width):
    """The default columns that fit ``width``: the case, its flow and its flags always (the
    flags wrap within their cell, at least :data:`_MIN_FLAGS` wide), then the others most
    wanted first while they fit at their full width; the names of those left out; and the
    case column's width (:func:`case_width`)."""
    wanted = [c for start in DEFAULT_COLUMNS for c in frame.columns if c.startswith(start)]
    wanted = list(dict.fromkeys(wanted))
    always = [c for c in wanted[:2]] + ["flags"]

    def natural(column):
        texts, _ = column_texts(frame, frame.columns.get_loc(column))
        return max([len(column)] + [len(t) for t in texts])

    case = case_width(natural("case"), natural(always[1]), width)
    budget = width - case - natural(always[1]) - 4 - _MIN_FLAGS
    kept = set(always)
    for column in wanted:
        if column not in kept and natural(column) + 2 <= budget:
            kept.add(column)
            budget -= natural(column) + 2
    order = [c for c in wanted if c in kept and c != "flags"] + ["flags"]
    return frame[order], [c for c in frame.columns if c not in kept], {"case": case}


def case_width(case, flow, width):
    """The case column's width: whole where the flow and the flags still fit beside it,
    else what they leave (not below :data:`_MIN_CASE`; longer names wrap)."""
    return max(min(case, width - flow - 4 - _MIN_FLAGS), _MIN_CASE)
