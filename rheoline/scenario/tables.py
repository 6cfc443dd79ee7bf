"""The run's tables for people and programs: the printed summary, JSON records and the echo
of the inputs.

:func:`summary` picks the columns ``rheoline run`` prints; :func:`records` turns the table
and the parts table into JSON-ready dicts (one per case, with its parts and the caution);
:func:`inputs_table` echoes the scenario description field by field as the writer writes it.
The models a run used, with their references, are the run's ``models_used`` (provenance
keys); the review pack lists them (:mod:`rheoline.scenario.pack_sources`).
"""

from __future__ import annotations

import numpy as np

from rheoline.scenario.writing import scenario_data

__all__ = ["summary", "records", "inputs_table"]


def summary(t):
    """The columns of the table ``t`` printed by ``rheoline run``.

    ``source pressure [mmHg]`` is the given bag or infuser pressure for a drive, and the
    pressure the pump must supply (above the gravity head) for a prescribed flow.
    """
    out = t[["case", "flow [mL/min]", "required pressure [mmHg]"]].copy()
    out.columns = ["case", "flow [mL/min]", "source pressure [mmHg]"]
    out["max Re"] = t["max Reynolds number"].round().astype("Int64")
    out["regime"] = t["regime"]
    out["dominant part (share)"] = [
        f"{p} ({s:.0f} %)" for p, s in zip(t["dominant part"], t["dominant share [%]"], strict=True)
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
                out[f"{what} {label} [{unit}]"] = [
                    "" if np.isnan(a) else f"{a:.4g}-{b:.4g}" for a, b in zip(lo, hi, strict=True)
                ]
        if t[leader].astype(bool).any():
            out[led_by] = t[leader]
    if t["time to deliver [min]"].notna().any():
        out["deliver [min]"] = t["time to deliver [min]"]
    out["flags"] = t["flags"]
    return out


def records(table, parts, flags=None):
    """The table as a list of JSON-ready dicts (one per case), with the parts of each line.

    Keys: ``name``, ``scenario``, ``point``, ``fluid``, ``flow_ml_min``, ``flow_ml_h``,
    ``required_pressure_mmhg``, ``max_reynolds``, ``regime``, ``transition_zone``,
    ``dominant_part``,
    ``dominant_share``, ``max_wall_shear_stress_pa``, ``hemolysis_index_percent``,
    ``hemolysis_concern``, ``exceeds_pressure_limit``, ``flow_p5_ml_min``,
    ``flow_p95_ml_min``, the model band (``flow_model_low_ml_min``,
    ``flow_model_high_ml_min``, ``required_pressure_model_low_mmhg``,
    ``required_pressure_model_high_mmhg``, ``model_band_driver``),
    ``time_to_deliver_min``, ``flags`` and ``parts`` (a list of
    ``part``, ``kind``, ``pressure_drop_pa``, ``reynolds``, ``regime``,
    ``wall_shear_stress_pa``, ``share``), and ``caution``.  ``flags`` maps a case to its
    flags (:attr:`rheoline.scenario.run.RunResult.flags`).
    """
    from rheoline import CAUTION

    by_case = {}
    for row in parts.itertuples(index=False):
        by_case.setdefault(row.case, []).append(
            {
                "part": row.part,
                "kind": row.kind,
                "pressure_drop_pa": _num(row[parts.columns.get_loc("pressure drop [Pa]")]),
                "reynolds": _num(row.reynolds),
                "regime": row.regime,
                "wall_shear_stress_pa": _num(row[parts.columns.get_loc("wall shear stress [Pa]")]),
                "share": _num(row[parts.columns.get_loc("share [%]")] / 100.0),
            }
        )
    out = []
    for r in table.to_dict("records"):
        out.append(
            {
                "name": r["case"],
                "scenario": r["scenario"],
                "point": r["point"],
                "fluid": r["fluid"],
                "flow_ml_min": _num(r["flow [mL/min]"]),
                "flow_ml_h": _num(r["flow [mL/h]"]),
                "required_pressure_mmhg": _num(r["required pressure [mmHg]"]),
                "max_reynolds": _num(r["max Reynolds number"]),
                "regime": r["regime"],
                "transition_zone": bool(r["transition zone"]),
                "dominant_part": r["dominant part"],
                "dominant_share": _num(r["dominant share [%]"] / 100.0),
                "max_wall_shear_stress_pa": _num(r["max wall shear stress [Pa]"]),
                "hemolysis_index_percent": _num(r["hemolysis index [%]"]),
                "hemolysis_concern": bool(r["hemolysis concern"]),
                "exceeds_pressure_limit": None
                if r["over pressure limit"] is None
                else bool(r["over pressure limit"]),
                "flow_p5_ml_min": _num(r["flow p5 [mL/min]"]),
                "flow_p95_ml_min": _num(r["flow p95 [mL/min]"]),
                "required_pressure_p5_mmhg": _num(r["pressure p5 [mmHg]"]),
                "required_pressure_p95_mmhg": _num(r["pressure p95 [mmHg]"]),
                "dominant_tolerance": r["dominant tolerance"] or None,
                "flow_model_low_ml_min": _num(r["flow model low [mL/min]"]),
                "flow_model_high_ml_min": _num(r["flow model high [mL/min]"]),
                "required_pressure_model_low_mmhg": _num(r["pressure model low [mmHg]"]),
                "required_pressure_model_high_mmhg": _num(r["pressure model high [mmHg]"]),
                "model_band_driver": r["model band driver"] or None,
                "time_to_deliver_min": _num(r["time to deliver [min]"]),
                "catheter_to_vein_ratio": _num(r["catheter-to-vein ratio [-]"]),
                "flags": list((flags or {}).get(r["case"], ())),
                "parts": by_case.get(r["case"], []),
                "caution": CAUTION,
            }
        )
    return out


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
        data = scenario_data(sc)
        for k, v in data.items():
            if k != "part":
                rows.append([sc.name, k, _text_of(v)])
        for j, p in enumerate(data["part"], start=1):
            for k, v in p.items():
                rows.append([sc.name, f"part[{j}].{k}", _text_of(v)])
    return pd.DataFrame(rows, columns=["scenario", "field", "value as written"])
