"""Rewrite the golden files (run only for a deliberate change, and name it in the commit).

    python tests/golden/regen.py

The golden files pin, before any refactoring of the scenario layer, every value of the
shipped examples' comparison and parts tables and every malformed-file message, so that a
change of layout that alters an answer is caught (tests/test_golden.py).
"""

from __future__ import annotations

import json
import math
import sys
import warnings
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parents[1]))

from rheoline.errors import RheolineError  # noqa: E402
from rheoline.scenario.compare import check_scenarios, run_scenarios  # noqa: E402
from rheoline.scenario.files import example_names, example_path, load_scenarios  # noqa: E402

MALFORMED = HERE.parent / "malformed"


def plain(value):
    """A JSON-able cell: floats as repr-exact numbers (NaN/inf as strings), numpy scalars unwrapped."""
    if hasattr(value, "item"):
        value = value.item()
    if isinstance(value, float):
        if math.isnan(value):
            return "NaN"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
    if value is None:
        return None
    return value


def frame_data(frame):
    return {
        "columns": [str(c) for c in frame.columns],
        "rows": [[plain(v) for v in row] for row in frame.itertuples(index=False)],
    }


def example_tables():
    out = {}
    for name in example_names():
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            run = run_scenarios(load_scenarios(example_path(name)))
        out[name] = {"table": frame_data(run.table), "parts": frame_data(run.parts)}
    return out


def malformed_messages():
    out = {}
    for path in sorted(MALFORMED.iterdir()):
        if path.name == "expected.json":
            continue
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                check_scenarios(load_scenarios(path))
        except RheolineError as exc:
            out[path.name] = str(exc)
        else:  # pragma: no cover - a malformed file that loads is a defect in the corpus
            out[path.name] = None
    return out


def main():
    (HERE / "examples.json").write_text(json.dumps(example_tables(), indent=1) + "\n")
    (HERE / "malformed_messages.json").write_text(
        json.dumps(malformed_messages(), indent=1, ensure_ascii=False) + "\n"
    )


if __name__ == "__main__":
    main()
