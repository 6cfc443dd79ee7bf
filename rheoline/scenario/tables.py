"""The run's tables for people and programs: the printed summary, JSON records, the echo of
the inputs and the assumptions sheet.

:func:`summary` picks the columns ``rheoline run`` prints; :func:`records` turns the table
and the parts table into JSON-ready dicts (one per case, with its parts and the caution);
:func:`inputs_table` echoes the scenario description field by field as the writer writes it;
:func:`assumptions_table` lists the models the line engine uses (:data:`ASSUMPTIONS`) and
the sources of the fluids a set names.
"""

from __future__ import annotations

import numpy as np

from rheoline.scenario.description import Axis
from rheoline.scenario.steps import HEMOLYSIS_CONCERN_STRESS
from rheoline.scenario.writing import scenario_data

__all__ = ["ASSUMPTIONS", "summary", "records", "inputs_table", "assumptions_table"]

#: The models the line engine uses, with their references (the pack's "assumptions" sheet).
ASSUMPTIONS = (
    (
        "laminar lumen flow",
        "Hagen-Poiseuille",
        "Poiseuille 1840s; any fluid mechanics text",
        "fully developed, rigid straight lumen, Newtonian",
    ),
    (
        "developing laminar flow",
        "apparent friction of the entrance region",
        "Shah, J. Fluids Eng. 100 (1978) 177-179",
        "short lumens such as catheters",
    ),
    (
        "transitional and turbulent flow",
        "Darcy-Weisbach with the Churchill friction factor",
        "Churchill, Chem. Eng. 84 (1977) 91-92",
        "laminar below Re 2300, turbulent above 4000 (common practice)",
    ),
    (
        "minor losses",
        "entrance, contraction, expansion, fitting and exit coefficients",
        "Idelchik, Handbook of Hydraulic Resistance; Crane Technical Paper 410",
        "K values of fittings are the user's or typical",
    ),
    (
        "non-Newtonian flow",
        "Rabinowitsch-Mooney wall-shear integral of the rheology model",
        "Rabinowitsch 1929; Mooney 1931",
        "blood as Carreau, Carreau-Yasuda, Casson or power law per fluid",
    ),
    (
        "blood viscosity",
        "medium x Pries 1992 large-bore viscosity; shear-thinning fitted to Wells & Merrill 1962",
        "Pries et al., Am. J. Physiol. 263 (1992); Cho & Kensey, Biorheology 28 (1991); Wells & "
        "Merrill, J. Clin. Invest. 41 (1962)",
        "packed red cells in an additive solution (medium from memory, no aggregation); "
        "measured accuracy: rheoline validate",
    ),
    (
        "hemolysis indicator",
        "Giersiepen power law with wall stress and mean residence time",
        "Giersiepen et al., Int. J. Artif. Organs 13 (1990) 300-306",
        "screening only; concern "
        f"flag above {HEMOLYSIS_CONCERN_STRESS:g} Pa wall stress (Leverett et al. 1972, from "
        "memory)",
    ),
    (
        "catalogue sizes",
        "typical nominal catheter, needle and set dimensions",
        "ISO 9626 for needles (from memory); catheters and sets typical, from memory",
        "a maker's dimensions differ: measure the bore for a decision",
    ),
    (
        "catheter-to-vein ratio",
        "outer diameter over vein diameter, flagged above 0.45",
        "rheoline.model.vessels.infusion_site_context",
        "common practice, no source; no prediction of thrombosis or vein injury",
    ),
    (
        "units",
        "NIST SP 811 conversions",
        "NIST SP 811 (2008) Appendix B",
        "1 mmHg = 133.322 Pa, 1 cmH2O = 98.0665 Pa",
    ),
)


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
    for what, unit in (("flow", "mL/min"), ("pressure", "mmHg")):
        lo, hi = t[f"{what} p5 [{unit}]"], t[f"{what} p95 [{unit}]"]
        if lo.notna().any():
            out[f"{what} p5-p95 [{unit}]"] = [
                "" if np.isnan(a) else f"{a:.4g}-{b:.4g}" for a, b in zip(lo, hi, strict=True)
            ]
    if t["dominant tolerance"].astype(bool).any():
        out["spread led by"] = t["dominant tolerance"]
    if t["time to deliver [min]"].notna().any():
        out["deliver [min]"] = t["time to deliver [min]"]
    out["flags"] = t["flags"]
    return out


def records(table, parts, flags=None):
    """The table as a list of JSON-ready dicts (one per case), with the parts of each line.

    Keys: ``name``, ``scenario``, ``point``, ``fluid``, ``flow_ml_min``, ``flow_ml_h``,
    ``required_pressure_mmhg``, ``max_reynolds``, ``regime``, ``dominant_part``,
    ``dominant_share``, ``max_wall_shear_stress_pa``, ``hemolysis_index_percent``,
    ``hemolysis_concern``, ``exceeds_pressure_limit``, ``flow_p5_ml_min``,
    ``flow_p95_ml_min``, ``time_to_deliver_min``, ``flags`` and ``parts`` (a list of
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


def assumptions_table(sset):
    """The models the line engine uses (:data:`ASSUMPTIONS`) and the source of each
    library fluid the set names: columns ``topic``, ``model``, ``reference``, ``notes``."""
    import pandas as pd

    from rheoline.model.fluids import FLUID_LIBRARY

    rows = [list(a) for a in ASSUMPTIONS]
    names = []
    for sc in sset.scenarios:
        f = sc.values["fluid"]
        names += list(f.values) if isinstance(f, Axis) else [f]
    for name in dict.fromkeys(names):
        entry = FLUID_LIBRARY.get(name.strip().lower().replace("_", "-").replace(" ", "-"))
        if entry is not None:
            rows.append(
                [
                    f"fluid: {name}",
                    entry.description,
                    entry.source,
                    f"default temperature {entry.default_temperature_c:g} degC",
                ]
            )
    return pd.DataFrame(rows, columns=["topic", "model", "reference", "notes"])
