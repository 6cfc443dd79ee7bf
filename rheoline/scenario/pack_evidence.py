"""The review pack's "model evidence": how close the models behind a run came to measurements.

For each fluid and each part kind the run used, the pack lists the validation error of the
thing itself (the fluid's measured viscosity, the measured flows through that part kind)
and of every model behind it (the provenance keys of the run's ``models_used``, from
:func:`rheoline.validation.model_validation`), with the data sets that back each figure and
their role: ``fit`` (a default was fitted to that data set, so its error is a fit error, not
a prediction), ``test`` (never used to choose a default) or ``check`` (shown only).  Models
of the run that belong to no fluid or part kind (the inlet, step and exit losses, the model
band's alternatives, hemolysis, units) are listed under ``line and other models``.  A
fluid, part kind or model that no packaged measurement checks is listed as unvalidated,
never left out.

The table (:func:`evidence_table`, columns :data:`EVIDENCE_COLUMNS`) is the pack's
``model-evidence.csv``, its workbook sheet ``model evidence`` and the report's "Model
evidence" section.

Examples
--------
>>> from rheoline.scenario.reading import example_path, load_scenarios
>>> from rheoline.scenario.run import run_scenarios
>>> t = evidence_table(run_scenarios(load_scenarios(example_path("minimal"))))
>>> t[t["what"] == "measured viscosity"][["subject", "status"]].values.tolist()
[['fluid saline-0.9', 'unvalidated: no packaged measurement']]
>>> t[t["item"] == "hagen-poiseuille"]["data sets"].iloc[0]
'aguaclara-dosing-tube (test)'
"""

from __future__ import annotations

import math

__all__ = [
    "EVIDENCE_COLUMNS",
    "PART_KIND_MODELS",
    "TESTED",
    "evidence_table",
    "evidence_html",
]

#: The columns of the evidence table.
EVIDENCE_COLUMNS = (
    "subject",
    "what",
    "item",
    "title",
    "rows",
    "median abs. error [%]",
    "max abs. error [%]",
    "median error [%]",
    "data sets",
    "status",
)

_LUMEN_LAWS = (
    "hagen-poiseuille",
    "shah-1978",
    "churchill-1977",
    "rabinowitsch-mooney",
    "metzner-reed-1955",
)

#: The models behind each part type of a scenario file (those the run used are listed).
PART_KIND_MODELS = {
    "tube": _LUMEN_LAWS,
    "set": (*_LUMEN_LAWS, "typical-catalogue"),
    "catheter": (*_LUMEN_LAWS, "typical-catalogue"),
    "needle": (*_LUMEN_LAWS, "iso-9626"),
    "cannula": (*_LUMEN_LAWS, "typical-catalogue"),
    "fitting": ("crane-tp410", "hooper-1981"),
    "measured": (),
}

#: How the validation data name a part type of a scenario file.
_DATA_KIND = {"set": "administration set", "measured": "measured part"}

_UNVALIDATED = "unvalidated: no packaged measurement"


def _percent(value):
    return round(100.0 * value, 2) if math.isfinite(value) else math.nan


def _status(stats, roles):
    """ "tested" (some held-out data), "fit only" (only data a default was fitted to),
    "not independent" (only data sharing the library's own assumption) or "unvalidated"
    (no packaged measurement), by :func:`rheoline.validation.run.evidence_of`.

    "Tested" says that independent data exist, not that the errors are small: the row's
    error columns say how close the model came (5 % albumin, say, is tested and 29 % low).
    """
    from rheoline.validation.run import evidence_of

    if not stats.validated:
        return _UNVALIDATED
    evidence = evidence_of(roles.get(d, "check") for d in stats.datasets)
    if evidence == "fit data only":
        return "fit only: the error on the data it was fitted to, no independent test"
    if evidence == "not independent":
        return "not independent: data sharing the library's own assumption, no independent test"
    return TESTED


#: The status of a row with independent data; how close it came is in its error columns.
TESTED = "tested on independent data: read its errors"


def _row(subject, what, item, title, stats, roles):
    sets = ", ".join(f"{d} ({roles.get(d, '?')})" for d in stats.datasets)
    status = _status(stats, roles)
    return [
        subject,
        what,
        item,
        title,
        int(stats.n),
        _percent(stats.median_abs_error),
        _percent(stats.max_abs_error),
        _percent(stats.median_error),
        sets,
        status,
    ]


def _used_fluids(run):
    """{library fluid name: its models_used} for the fluids the run built, in order."""
    from rheoline.scenario.build import build_fluid, groups

    out = {}
    for sc in run.scenario_set.scenarios:
        for g in groups(sc):
            name = g.values["fluid"]
            if name not in out:
                import warnings

                with warnings.catch_warnings():
                    warnings.simplefilter("ignore")  # the run has noted them already
                    out[name] = tuple(build_fluid(g, run.scenario_set.source).models_used)
    return out


def _used_part_types(run):
    seen = {}
    for sc in run.scenario_set.scenarios:
        for part in sc.parts:
            seen.setdefault(part.type, None)
    return list(seen)


def evidence_table(run):
    """The model evidence of ``run`` (a :class:`~rheoline.scenario.run.RunResult`).

    Returns
    -------
    pandas.DataFrame
        :data:`EVIDENCE_COLUMNS`; one row for each fluid's measured viscosity and each part
        kind's measured flows, and one per model behind them (only models the run used),
        then the run's other models.  Errors are relative, in per cent, over the rows that
        were measured (recalled rows never count); ``rows`` 0 and ``status`` "unvalidated"
        where no packaged measurement checks it.
    """
    import pandas as pd

    from rheoline.model.provenance import REGISTRY
    from rheoline.validation import (
        fluid_validation,
        load_datasets,
        model_validation,
        part_kind_validation,
    )
    from rheoline.validation.run import dataset_roles

    used = tuple(dict.fromkeys(run.models_used))
    model_stats = model_validation(used)
    roles = dataset_roles(load_datasets())
    listed, rows = set(), []

    def models(subject, keys):
        for key in keys:
            if key in used:
                entry = REGISTRY.get(key)
                title = entry.title if entry is not None else ""
                rows.append(_row(subject, "model", key, title, model_stats[key], roles))
                listed.add(key)

    fluids = _used_fluids(run)
    fluid_stats = fluid_validation(fluids)
    for name, keys in fluids.items():
        subject = f"fluid {name}"
        rows.append(_row(subject, "measured viscosity", name, "", fluid_stats[name], roles))
        models(subject, keys)
    types = _used_part_types(run)
    kind_stats = part_kind_validation(_DATA_KIND.get(t, t) for t in types)
    for ptype in types:
        kind = _DATA_KIND.get(ptype, ptype)
        subject = f"part kind {kind}"
        rows.append(_row(subject, "measured flow", kind, "", kind_stats[kind], roles))
        models(subject, PART_KIND_MODELS.get(ptype, ()))
    models("line and other models", [k for k in used if k not in listed])
    return pd.DataFrame(rows, columns=list(EVIDENCE_COLUMNS))


def evidence_html(table, escape) -> str:
    """The report's "Model evidence" section body: an introduction and the table.

    ``escape`` is the report's HTML escaper; the table is rendered by
    :func:`rheoline.scenario.pack_report.frame_html`.
    """
    from rheoline.scenario.pack_report import frame_html

    intro = (
        "How close the fluids, part kinds and models behind this run came to published "
        "measurements packaged with the toolkit (rheoline validate): relative errors in per "
        "cent over measured rows (values recalled rather than read never count). Data set "
        "roles: fit = a default was fitted to it (a fit error, not a prediction); test = "
        "never used to choose a default; check = shown only. Tested means independent data "
        "exist, not that they agree: the error columns say how closely. Unvalidated means no "
        "packaged measurement checks it: treat that number as the model's claim alone."
    )
    return f"<p>{escape(intro)}</p>" + frame_html(table)
