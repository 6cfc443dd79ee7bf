"""Listings and review questions: the fluid and part catalogues as tables, and the helpers
that rank, filter and pick cases of a run's table.

:func:`smallest_reaching`, :func:`rank` and :func:`filter_cases` answer the usual review
questions (e.g. the smallest catheter that reaches 100 mL/min at 1 m head).  They count only
the cases that satisfy their constraints (:func:`within_limits`): a pump case that needs more
than its pressure limit, or a case with no forward flow, does not "reach" any flow and never
ranks ahead of a case that does.

Examples
--------
>>> import pandas as pd
>>> t = pd.DataFrame({
...     "case": ["14G pump", "18G pump", "18G bag"],
...     "flow [mL/min]": [150.0, 150.0, 90.0],
...     "smallest bore [mm]": [1.7, 0.9, 0.9],
...     "over pressure limit": [False, True, None],
... })
>>> smallest_reaching(t, 100)["case"].tolist()   # 18G needs more than its pump's limit
['14G pump']
>>> rank(t)["case"].tolist()
['14G pump', '18G bag', '18G pump']
"""

from __future__ import annotations

import difflib

import numpy as np

from rheoline.errors import ScenarioError
from rheoline.scenario.schema import FLUID_OPTION_KEYS

__all__ = [
    "fluid_table",
    "parts_table",
    "within_limits",
    "filter_cases",
    "rank",
    "smallest_reaching",
]


def fluid_table():
    """The fluid library as a table (``rheoline fluids``)."""
    import pandas as pd

    from rheoline.model.fluids import fluid_catalogue

    rows = []
    for e in fluid_catalogue():
        opts = ", ".join(FLUID_OPTION_KEYS.get(k, k) for k in e["options"]) or "-"
        rows.append([e["name"], e["description"], e["default_temperature_c"], opts, e["source"]])
    return pd.DataFrame(
        rows, columns=["fluid", "description", "default [degC]", "options", "source"]
    )


def parts_table(kind=None):
    """The part catalogue as a table (``rheoline parts``); ``kind`` picks one catalogue."""
    import pandas as pd

    from rheoline.model import catalogue as cat

    rows = []
    for g, (od, d, length, _) in cat.CATHETER_GAUGES.items():
        rows.append(
            ["catheter", f"{g}G", od * 1e3, d * 1e3, length * 1e3, "typical nominal, from memory"]
        )
    needle_mm = _default_needle_length() * 1e3
    for g, (od, d_reg, d_thin) in cat.NEEDLE_GAUGES.items():
        for wall, bore in (("regular", d_reg), ("thin", d_thin)):
            rows.append(
                [
                    "needle",
                    f"{g}G {wall}",
                    od * 1e3,
                    bore * 1e3,
                    needle_mm,
                    "ISO 9626 minimum bore, from memory",
                ]
            )
    for k, (d, length) in cat.EXTENSION_SETS.items():
        rows.append(["set", k, np.nan, d * 1e3, length * 1e3, "typical, from memory"])
    for k, d in cat.CIRCUIT_TUBING.items():
        rows.append(["tubing", f"{k} inch", np.nan, d * 1e3, np.nan, "exact by definition"])
    frame = pd.DataFrame(
        rows,
        columns=[
            "catalogue",
            "size",
            "outer diameter [mm]",
            "inner diameter [mm]",
            "length [mm]",
            "source",
        ],
    )
    if kind:
        kinds = sorted(set(frame["catalogue"]))
        if kind not in kinds:
            near = difflib.get_close_matches(kind, kinds, n=1)
            hint = f"; did you mean '{near[0]}'?" if near else ""
            raise ScenarioError(
                f"no catalogue '{kind}'{hint} Catalogues: {', '.join(kinds)}", field="--kind"
            )
        frame = frame[frame["catalogue"] == kind].reset_index(drop=True)
    return frame


def _default_needle_length():
    """The length [m] a needle has when the file gives none (the model's default)."""
    import inspect

    from rheoline.model.parts import Needle

    return inspect.signature(Needle).parameters["length"].default


# --------------------------------------------------------------------------- questions
def within_limits(table):
    """Per row of a run's table, whether the case satisfies its constraints: not over its
    pressure limit (``over pressure limit`` is not True) and a forward flow.

    A boolean Series aligned with ``table``.
    """
    import pandas as pd

    ok = np.ones(len(table), dtype=bool)
    if "over pressure limit" in table:  # None where the case has no limit
        ok &= [not (v is not None and v == v and bool(v)) for v in table["over pressure limit"]]
    if "flow [mL/min]" in table:
        ok &= table["flow [mL/min]"].to_numpy(dtype=float) > 0
    return pd.Series(ok, index=table.index)


def filter_cases(table, within=True, **conditions):
    """Rows whose columns equal the given values (floats within 1e-9 relative).

    Column names with spaces and units are passed through a dict:
    ``filter_cases(t, **{"head [cm]": 100, "fluid": "saline-0.9"})``.  Only the cases within
    their limits (:func:`within_limits`) unless ``within`` is false.
    """
    mask = within_limits(table).to_numpy(copy=True) if within else np.ones(len(table), dtype=bool)
    for col, value in conditions.items():
        _check_column(table, col)
        if isinstance(value, float | int) and not isinstance(value, bool):
            mask &= np.isclose(table[col].astype(float), value, rtol=1e-9, atol=0.0)
        else:
            mask &= (table[col] == value).to_numpy()
    return table[mask]


def _check_column(table, col):
    if col not in table.columns:
        near = difflib.get_close_matches(col, list(table.columns), n=1)
        hint = f"; did you mean '{near[0]}'?" if near else ""
        raise ScenarioError(f"no column '{col}'{hint}", field=col)


def rank(table, by="flow [mL/min]", ascending=False, within=True):
    """The table sorted by one column (highest flow first by default).

    Every row is kept; with ``within`` (the default) the cases outside their limits
    (:func:`within_limits`) come after all the others, so the first row is always a case
    that satisfies its constraints.
    """
    _check_column(table, by)
    if not within:
        return table.sort_values(by, ascending=ascending, kind="stable").reset_index(drop=True)
    order = table.assign(_outside=~within_limits(table))
    order = order.sort_values(["_outside", by], ascending=[True, ascending], kind="stable")
    return order.drop(columns="_outside").reset_index(drop=True)


def smallest_reaching(table, flow_ml_min, by="smallest bore [mm]", **conditions):
    """The case with the smallest ``by`` that reaches ``flow_ml_min`` within its limits.

    A case reaches the flow when its flow is at least ``flow_ml_min`` and it satisfies its
    constraints (:func:`within_limits`: a pump case over its pressure limit does not).
    Example: the smallest catheter reaching 100 mL/min at 1 m head:
    ``smallest_reaching(run.table, 100, **{"head [cm]": 100, "fluid": "saline-0.9"})``.
    Returns a one-row DataFrame, empty when no case reaches the flow.
    """
    cand = filter_cases(table, **conditions)
    cand = cand[cand["flow [mL/min]"] >= flow_ml_min]
    return cand.sort_values([by, "flow [mL/min]"], kind="stable").head(1)
