"""Golden tests: the shipped examples' tables and the malformed-file messages, pinned.

The files under ``tests/golden/`` were written by ``tests/golden/regen.py`` from the code as
it stood before the scenario layer was reorganized.  Every value of every example's
comparison table and parts table must stay equal (numbers to rtol 1e-12, text exactly), and
every malformed file must keep its message (the time solve's columns to ten times its own rtol:
``TIME_SOLVE_RTOL``).  A deliberate change rewrites the files with
``python tests/golden/regen.py`` and names the change in its commit message.
"""

from __future__ import annotations

import json
import math
import re
import warnings
from pathlib import Path

import numpy as np
import pytest

from rheoline.errors import RheolineError
from rheoline.scenario.compare import check_scenarios, run_scenarios
from rheoline.scenario.files import example_names, example_path, load_scenarios
from rheoline.scenario.transient_step import TRANSIENT_COLUMNS  # [0]: the internal volume

GOLDEN = Path(__file__).with_name("golden")
MALFORMED = Path(__file__).with_name("malformed")
EXAMPLES = json.loads((GOLDEN / "examples.json").read_text())
MESSAGES = json.loads((GOLDEN / "malformed_messages.json").read_text())


def _cell(value):
    if hasattr(value, "item"):
        value = value.item()
    if isinstance(value, str) and value in ("NaN", "inf", "-inf"):
        return float(value.replace("NaN", "nan"))
    return value


#: Relative tolerance of the time solve's columns: ten times the solve's own step tolerance
#: (simulate_infusion's rtol = 1e-6).  Its event times (start-up, alarm, rate change, drug
#: delays through the transport) come from an adaptive ODE solve whose steps follow
#: last-bit changes of the platform's math: the same code on this machine gave a start-up
#: time 1.5e-11, a rate change t90 4e-9 and a drug delay 1.2e-6 apart on two runs an hour
#: apart.  A change of the answer moves them far more.
TIME_SOLVE_RTOL = 1e-5


def _same(got, want, where, rtol=1e-12):
    got, want = _cell(got), _cell(want)
    if isinstance(want, bool) or want is None or isinstance(want, str):
        if want is None and isinstance(got, float) and math.isnan(got):
            return
        assert got == want, f"{where}: {got!r} != {want!r}"
    elif isinstance(want, (int, float)):
        assert isinstance(got, (int, float)) and not isinstance(got, bool), (
            f"{where}: {got!r} is not a number (golden {want!r})"
        )
        np.testing.assert_allclose(got, want, rtol=rtol, atol=0, equal_nan=True, err_msg=where)
    else:  # pragma: no cover - the golden files hold JSON scalars only
        raise AssertionError(f"{where}: unexpected golden value {want!r}")


def _check_frame(frame, golden, where):
    assert [str(c) for c in frame.columns] == golden["columns"], f"{where}: columns changed"
    rows = list(frame.itertuples(index=False))
    assert len(rows) == len(golden["rows"]), f"{where}: row count changed"
    for i, (row, want) in enumerate(zip(rows, golden["rows"], strict=True)):
        for column, got, value in zip(golden["columns"], row, want, strict=True):
            rtol = TIME_SOLVE_RTOL if column in TRANSIENT_COLUMNS[1:] else 1e-12
            _same(got, value, f"{where} row {i} column {column!r}", rtol)


def test_golden_files_cover_every_example_and_malformed_file():
    assert sorted(EXAMPLES) == sorted(example_names())
    files = sorted(p.name for p in MALFORMED.iterdir() if p.name != "expected.json")
    assert sorted(MESSAGES) == files


@pytest.mark.parametrize("name", sorted(EXAMPLES))
def test_example_tables_unchanged(name):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        run = run_scenarios(load_scenarios(example_path(name)))
    _check_frame(run.table, EXAMPLES[name]["table"], f"{name} table")
    _check_frame(run.parts, EXAMPLES[name]["parts"], f"{name} parts")


@pytest.mark.parametrize("name", sorted(MESSAGES))
def test_malformed_message_unchanged(name):
    with pytest.raises(RheolineError, match=re.escape(MESSAGES[name])) as info:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            check_scenarios(load_scenarios(MALFORMED / name))
    assert str(info.value) == MESSAGES[name]
