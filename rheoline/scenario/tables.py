"""The run's tables for people and programs: the printed summary, JSON records and the echo
of the inputs.

:func:`summary` picks the columns ``rheoline run`` prints; :func:`records` turns the table
and the parts table into JSON-ready dicts (one per case, with its parts and the caution);
:func:`inputs_table` echoes the scenario description field by field as the writer writes it.
The models a run used, with their references, are the run's ``models_used`` (provenance
keys); the review pack lists them (:mod:`rheoline.scenario.pack_sources`).
"""

from __future__ import annotations

import json

import numpy as np

from rheoline.scenario.json_text import (
    Texts,
    array_text,
    numbers,
    object_texts,
    objects_array_pieces,
)
from rheoline.scenario.writing import scenario_data

__all__ = ["summary", "records", "records_json_pieces", "inputs_table"]


def summary(t, flow_unit: str = "mL/min"):
    """The columns of the table ``t`` printed by ``rheoline run``, flows in ``flow_unit``
    (a key of :data:`rheoline.units.FLOW_UNITS`), numbers in ranges to three significant
    figures.

    ``source pressure [mmHg]`` is the given bag or infuser pressure for a drive, and the
    pressure the pump must supply (above the gravity head) for a prescribed flow.
    """
    from rheoline.units import per_ml_min, significant

    scale = {"mL/min": per_ml_min(flow_unit), "mmHg": 1.0}
    shown = {"mL/min": flow_unit, "mmHg": "mmHg"}
    out = t[["case"]].copy()
    out[f"flow [{flow_unit}]"] = t["flow [mL/min]"] * scale["mL/min"]
    out["source pressure [mmHg]"] = t["required pressure [mmHg]"]
    out["max Re"] = t["max Reynolds number"].round().astype("Int64")
    out["regime"] = t["regime"]
    out["dominant part (share)"] = [
        f"{p} ({significant(s)} %)"
        for p, s in zip(t["dominant part"], t["dominant share [%]"], strict=True)
    ]
    out["max wall shear [Pa]"] = t["max wall shear stress [Pa]"]
    # the tolerance band, then the model band: each as "low-high" and what leads it
    for low, high, label, leader, led_by in (
        ("p5", "p95", "p5-p95", "dominant tolerance", "spread led by"),
        ("model low", "model high", "model band", "model band driver", "model band led by"),
    ):
        for what, unit in (("flow", "mL/min"), ("pressure", "mmHg")):
            lo, hi = t[f"{what} {low} [{unit}]"], t[f"{what} {high} [{unit}]"]
            if lo.notna().any():
                out[f"{what} {label} [{shown[unit]}]"] = [
                    ""
                    if np.isnan(a)
                    else f"{significant(a * scale[unit])}-{significant(b * scale[unit])}"
                    for a, b in zip(lo, hi, strict=True)
                ]
        if t[leader].astype(bool).any():
            out[led_by] = t[leader]
    if t["time to deliver [min]"].notna().any():
        out["deliver [min]"] = t["time to deliver [min]"]
    if t["reversed flow [mL/min]"].notna().any():  # branched cases
        out["reversed [mL/min]"] = t["reversed flow [mL/min]"]
    out = out.assign(**_transient_summary(t))
    out["flags"] = t["flags"]
    return out


def records(table, parts, flags=None, branches=None, nodes=None, not_computed=None):
    """The table as a list of JSON-ready dicts (one per case), with the parts of each line.

    Keys: ``name``, ``scenario``, ``point``, ``fluid``, ``flow_ml_min``, ``flow_ml_h``,
    ``required_pressure_mmhg``, ``max_reynolds``, ``regime``, ``transition_zone``,
    ``dominant_part``,
    ``dominant_share``, ``max_wall_shear_stress_pa``, ``hemolysis_index_percent``,
    ``hemolysis_concern``, ``exceeds_pressure_limit``, ``flow_p5_ml_min``,
    ``flow_p95_ml_min``, the model band (``flow_model_low_ml_min``,
    ``flow_model_high_ml_min``, ``required_pressure_model_low_mmhg``,
    ``required_pressure_model_high_mmhg``, ``model_band_driver``),
    ``time_to_deliver_min``, the time solve's ``internal_volume_ml`` (every case),
    ``startup_time_s``, ``rate_change_50_s``, ``rate_change_90_s``, ``time_to_alarm_s``,
    ``drug_delay_50_s``, ``drug_delay_90_s``, ``bolus_ml`` and ``port_dead_volume_ml`` (null
    where not computed, and ``not_computed`` says why: record key -> reason), ``flags`` and
    ``parts`` (a list of ``part``, ``kind``, ``pressure_drop_pa``, ``reynolds``, ``regime``,
    ``wall_shear_stress_pa``, ``share``), and ``caution``.  ``flags`` maps a case to its
    flags (:attr:`rheoline.scenario.run.RunResult.flags`); ``not_computed`` maps a case to
    why its time-solve values are null (:attr:`rheoline.scenario.run.RunResult.not_computed`).

    A branched case (a row of ``branches``) adds ``reversed_flow_ml_min``,
    ``reversed_branch``, ``branches`` (a list of ``name``, ``from``, ``to``,
    ``flow_ml_min``, ``reversed``, ``closed``, ``pressure_drop_mmhg``, ``max_reynolds``,
    ``regime``) and ``nodes`` (``name``, ``type``, ``pressure_mmhg``, ``flow_in_ml_min``,
    ``exceeds_pressure_limit``); its ``flow_ml_min`` is the total flow into the outlets.
    """
    from rheoline import CAUTION

    fields, part_cases, part_fields, branched = _record_columns(
        table, parts, flags, branches, nodes, not_computed
    )
    by_case = {}
    names = list(part_fields)
    for case, *values in zip(part_cases, *part_fields.values(), strict=True):
        by_case.setdefault(case, []).append(dict(zip(names, values, strict=True)))
    fields["parts"] = [by_case.get(case, []) for case in fields["name"]]
    keys = list(fields)
    return [
        {**dict(zip(keys, values, strict=True)), **more, "caution": CAUTION}
        for values, more in zip(zip(*fields.values(), strict=True), branched, strict=True)
    ]


def records_json_pieces(
    table, parts, flags=None, branches=None, nodes=None, not_computed=None, size=2048
):
    """The text of ``json.dumps(records(...), allow_nan=False)``, byte for byte, in pieces
    of at most ``size`` records (their concatenation is that text; ``rheoline run --json``
    writes them one by one), rendered by columns: each column's values written once as
    JSON (numbers as Python's shortest round-trip repr, as :mod:`json` writes them; a value
    that repeats, such as a regime or a reason, encoded once), then each record's text put
    together from them, without building the records (:mod:`rheoline.scenario.json_text`)."""
    from rheoline import CAUTION

    fields, part_cases, part_fields, branched = _record_columns(
        table, parts, flags, branches, nodes, not_computed
    )
    by_case = {}
    for case, text in zip(part_cases, object_texts(part_fields), strict=True):
        by_case.setdefault(case, []).append(text)
    fields["parts"] = Texts(array_text(by_case.get(case, ())) for case in fields["name"])
    caution = _json_object({"caution": CAUTION})
    tails = Texts(
        _json_object({**more, "caution": CAUTION}) if more else caution for more in branched
    )
    return objects_array_pieces(fields, tails, size)


def _json_object(value):
    return json.dumps(value, allow_nan=False)


def _record_columns(table, parts, flags, branches, nodes, not_computed):
    """The records' fields by column: ``(fields, part cases, part fields, branched)``;
    ``fields`` ends with ``not_computed`` and ``flags`` (``parts`` is added by the caller),
    ``branched`` holds each case's branched keys (``{}`` for a line)."""
    part_fields = {
        "part": _column(parts, "part"),
        "kind": _column(parts, "kind"),
        "pressure_drop_pa": _numbers(parts, "pressure drop [Pa]"),
        "reynolds": _numbers(parts, "reynolds"),
        "regime": _column(parts, "regime"),
        "wall_shear_stress_pa": _numbers(parts, "wall shear stress [Pa]"),
        "share": _numbers(parts, "share [%]", 100.0),
    }
    cases = _column(table, "case")
    flags = flags or {}
    fields = {
        "name": cases,
        "scenario": _column(table, "scenario"),
        "point": _column(table, "point"),
        "fluid": _column(table, "fluid"),
        "flow_ml_min": _numbers(table, "flow [mL/min]"),
        "flow_ml_h": _numbers(table, "flow [mL/h]"),
        "required_pressure_mmhg": _numbers(table, "required pressure [mmHg]"),
        "max_reynolds": _numbers(table, "max Reynolds number"),
        "regime": _column(table, "regime"),
        "transition_zone": _booleans(table, "transition zone"),
        "dominant_part": _column(table, "dominant part"),
        "dominant_share": _numbers(table, "dominant share [%]", 100.0),
        "max_wall_shear_stress_pa": _numbers(table, "max wall shear stress [Pa]"),
        "hemolysis_index_percent": _numbers(table, "hemolysis index [%]"),
        "hemolysis_concern": _booleans(table, "hemolysis concern"),
        "exceeds_pressure_limit": [
            None if v is None else bool(v) for v in table["over pressure limit"].tolist()
        ],
        "flow_p5_ml_min": _numbers(table, "flow p5 [mL/min]"),
        "flow_p95_ml_min": _numbers(table, "flow p95 [mL/min]"),
        "required_pressure_p5_mmhg": _numbers(table, "pressure p5 [mmHg]"),
        "required_pressure_p95_mmhg": _numbers(table, "pressure p95 [mmHg]"),
        "dominant_tolerance": [v or None for v in _column(table, "dominant tolerance")],
        "flow_model_low_ml_min": _numbers(table, "flow model low [mL/min]"),
        "flow_model_high_ml_min": _numbers(table, "flow model high [mL/min]"),
        "required_pressure_model_low_mmhg": _numbers(table, "pressure model low [mmHg]"),
        "required_pressure_model_high_mmhg": _numbers(table, "pressure model high [mmHg]"),
        "model_band_driver": [v or None for v in _column(table, "model band driver")],
        "time_to_deliver_min": _numbers(table, "time to deliver [min]"),
        "catheter_to_vein_ratio": _numbers(table, "catheter-to-vein ratio [-]"),
        **_transient_fields(table),
        "not_computed": [dict((not_computed or {}).get(case, {})) for case in cases],
        "flags": [list(flags.get(case, ())) for case in cases],
    }
    network = _network_records(branches, nodes)
    branched = [
        _reversed(case, flow, branch, network)
        for case, flow, branch in zip(
            cases,
            _numbers(table, "reversed flow [mL/min]"),
            _column(table, "reversed branch"),
            strict=True,
        )
    ]
    return fields, _column(parts, "case"), part_fields, branched


def _column(frame, name):
    """A column's values as Python objects (None where missing)."""
    col = frame[name].astype(object)
    return col.where(col.notna(), None).tolist()


def _numbers(frame, name, divisor=1.0):
    """A numeric column (divided by ``divisor``) as finite floats or None (JSON has no
    NaN), vectorized."""
    values = frame[name].to_numpy(dtype=float, na_value=np.nan) / divisor
    finite = np.isfinite(values)
    out = values.tolist()
    if not finite.all():
        out = [v if ok else None for v, ok in zip(out, finite.tolist(), strict=True)]
    return numbers(out)


def _booleans(frame, name):
    return [bool(v) for v in frame[name].tolist()]


def _reversed(case, flow, branch, network):
    """A branched case's reversed flow and branch, branches and nodes (nothing for a line)."""
    if case not in network:
        return {}
    return {"reversed_flow_ml_min": flow, "reversed_branch": branch or None, **network[case]}


def _network_records(branches, nodes):
    """Per branched case: its reversed flow, branches and nodes as JSON-ready dicts."""
    out = {}
    if branches is None or not len(branches):
        return out
    for r in branches.to_dict("records"):
        case = out.setdefault(r["case"], {"branches": [], "nodes": []})
        case["branches"].append(
            {
                "name": r["branch"],
                "from": r["from"],
                "to": r["to"],
                "flow_ml_min": _num(r["flow [mL/min]"]),
                "reversed": bool(r["reversed"]),
                "closed": bool(r["check valve closed"]),
                "pressure_drop_mmhg": _num(r["pressure drop [mmHg]"]),
                "max_reynolds": _num(r["max Reynolds number"]),
                "regime": r["regime"],
            }
        )
    for r in nodes.to_dict("records"):
        out[r["case"]]["nodes"].append(
            {
                "name": r["node"],
                "type": r["type"],
                "pressure_mmhg": _num(r["pressure [mmHg]"]),
                "flow_in_ml_min": _num(r["flow in [mL/min]"]),
                "exceeds_pressure_limit": None
                if r["over pressure limit"] is None
                else bool(r["over pressure limit"]),
            }
        )
    return out


#: Printed columns of the time solve: (short name, table column), shown where any case has one.
_TRANSIENT_SUMMARY = (
    ("start-up [min]", "start-up time [min]"),
    ("alarm [min]", "time to alarm [min]"),
    ("bolus [mL]", "bolus [mL]"),
    ("drug t90 [min]", "drug delay t90 [min]"),
)


def _transient_summary(t):
    return {short: t[name] for short, name in _TRANSIENT_SUMMARY if t[name].notna().any()}


def _transient_fields(table):
    """The time solve's record keys, by column (null where not computed)."""
    from rheoline.scenario.transient_step import RECORD_KEYS

    return {key: _numbers(table, name, 1.0 / f) for key, (name, f) in RECORD_KEYS.items()}


def _num(v):
    """A finite float, or None (JSON has no NaN)."""
    if v is None:
        return None
    v = float(v)
    return v if np.isfinite(v) else None


def _text_of(value):
    if isinstance(value, dict):
        return "{" + ", ".join(f"{k} = {_text_of(v)}" for k, v in value.items()) + "}"
    if isinstance(value, list):
        return "[" + ", ".join(_text_of(v) for v in value) + "]"
    return str(value)


def inputs_table(sset):
    """The scenario description echoed, one row per field: ``scenario``, ``field`` (a dotted
    path such as ``part[2].gauge``) and ``value as written`` (as the writer writes it)."""
    import pandas as pd

    rows = []
    for sc in sset.scenarios:
        rows += [[sc.name, path, text] for path, text in _flat_fields(scenario_data(sc))]
    return pd.DataFrame(rows, columns=["scenario", "field", "value as written"])


def _flat_fields(data, prefix=""):
    """``(dotted path, text)`` of every field of a scenario's plain data; lists of tables
    (parts, nodes, branches and their parts) numbered from 1 and after the other fields."""
    tables = {k: v for k, v in data.items() if isinstance(v, list) and v and isinstance(v[0], dict)}
    out = [(prefix + k, _text_of(v)) for k, v in data.items() if k not in tables]
    for k, items in tables.items():
        for j, item in enumerate(items, start=1):
            out += _flat_fields(item, f"{prefix}{k}[{j}].")
    return out
