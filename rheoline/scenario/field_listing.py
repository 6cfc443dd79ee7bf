"""The list of every field a scenario file may hold (``rheoline fields``).

Read from the same specs the validator uses (:mod:`rheoline.scenario.schema` and the
topology's node and branch fields), so the list cannot go stale.
"""

from __future__ import annotations

from rheoline.scenario.schema import (
    KIND_OF,
    PART_FIELDS,
    PART_TOLERANCE_FIELDS,
    SCENARIO_FIELDS,
    SCENARIO_TOLERANCE_FIELDS,
    TOP_FIELDS,
    TRANSIENT_TABLE_FIELDS,
)
from rheoline.units import to_unit

__all__ = ["fields_table"]


def fields_table():
    """Every field a scenario file may hold, with its default unit and allowed range.

    Read from the same specs the validator uses, so the list cannot go stale
    (``rheoline fields`` prints it).

    Examples
    --------
    >>> t = fields_table()
    >>> t[(t["table"] == "[[scenario]]") & (t["field"] == "head")]["bare number in"].item()
    'm'
    """
    import pandas as pd

    data = _rows("top level", TOP_FIELDS) + _rows("[[scenario]]", SCENARIO_FIELDS)
    data += _rows("[scenario.tolerance]", SCENARIO_TOLERANCE_FIELDS)
    for ptype, specs in PART_FIELDS.items():
        data += _rows(f'part type = "{ptype}"', specs)
    data += _rows("[part].tolerance", PART_TOLERANCE_FIELDS)
    for table, specs in TRANSIENT_TABLE_FIELDS.items():
        data += _rows(_TRANSIENT_TABLE_NAMES[table], specs)
    from rheoline.scenario.topology import BRANCH_FIELDS, NODE_FIELDS

    for ntype, specs in NODE_FIELDS.items():
        data += _rows(f'node type = "{ntype}"', specs)
    data += _rows("[[scenario.branch]]", BRANCH_FIELDS)
    return pd.DataFrame(
        data, columns=["table", "field", "bare number in", "allowed", "sweeps", "what it is"]
    )


_TRANSIENT_TABLE_NAMES = {
    "rate_change": "rate_changes = [{...}]",
    "occlusion": "[scenario.occlusion]",
    "port": "[[scenario.port]]",
}


def _rows(table, specs):
    out = []
    for name, spec in specs.items():
        kind = KIND_OF.get(spec.kind) or KIND_OF.get(spec.element_kind or "")
        allowed = ""
        if spec.low is not None and spec.high is not None:
            if kind and spec.unit:
                lo = float(to_unit(spec.low, spec.unit, kind))
                hi = float(to_unit(spec.high, spec.unit, kind))
                allowed = f"{lo:.4g} to {hi:.4g} {spec.unit}"
            else:
                allowed = f"{spec.low:g} to {spec.high:g}"
        out.append([table, name, spec.unit or "", allowed, "yes" if spec.sweep else "", spec.help])
    return out
