"""The review pack's CSV writer against pandas' ``DataFrame.to_csv`` (the writer it
replaced): the same bytes for the same frame, hostile cells included."""

from __future__ import annotations

import csv

import numpy as np
import pandas as pd

from rheoline.scenario import pack_tables


def _frame():
    return pd.DataFrame(
        {
            "text": ["=1+2", "a\x01b", 'q"uote,comma', " lead", "line\nbreak", "é😀", None, "x"],
            "number [mm]": [1.0, np.inf, np.nan, -0.0, 1e-300, 123456789.123456789, 1e16, 1e-5],
            "flag": [True, False] * 4,
            "mixed": ["x", 1, 2.5, True, None, np.nan, float("inf"), "-y"],
            "count": pd.array([1, None, 3, 4, 5, 6, 7, 8], dtype="Int64"),
            "string": pd.array(["a", None, "=b", "c", "d", "e", "f", "@g"], dtype="string"),
        }
    )


def test_same_bytes_as_dataframe_to_csv(tmp_path):
    frame = _frame()
    pack_tables.write_csv(frame, tmp_path / "new.csv", "caution: =x")
    safe = pack_tables._finite_numbers(pack_tables.neutralize_frame(frame))
    with (tmp_path / "ref.csv").open("w", encoding="utf-8", newline="") as fh:
        csv.writer(fh).writerow(["caution: =x"])
        safe.to_csv(fh, index=False, na_rep="", lineterminator="\r\n")
    assert (tmp_path / "new.csv").read_bytes() == (tmp_path / "ref.csv").read_bytes()
    rows = list(csv.reader((tmp_path / "new.csv").open(encoding="utf-8", newline="")))
    assert rows[2][:4] == ["'=1+2", "1.0", "True", "x"]
    assert rows[3][1] == "" and rows[4][1] == ""  # infinite and missing: empty cells
    assert rows[9][3] == "'-y" and rows[9][5] == "'@g"
