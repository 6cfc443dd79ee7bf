"""The run's ``transient`` step: the time solve of a syringe pump's line, where a scenario
asks for it (:mod:`rheoline.scenario.transient_fields`).

:func:`transient_step` builds the model's pump, rate profiles, compliances, ports and
occlusion of a sweep group from the description and calls
:func:`rheoline.model.transient.simulate_infusion` once for all the group's points (the
model is vectorized over them).  It adds the columns of :data:`TRANSIENT_COLUMNS` to every
row (``internal volume [mL]`` for every case, the others NaN where the scenario does not
ask for the time solve), the conditions of :data:`FLAG_KEYS` (the rows' flags, in the
words of :data:`rheoline.model.transient_results.TRANSIENT_CONDITIONS`) and, as notes, the
other conditions that hold.  :func:`time_series_table` gathers each case's time series
(what the pack writes to ``time-series.csv`` and plots).

Examples
--------
>>> FLAG_WORDS["no_alarm"]
'no alarm'
>>> TRANSIENT_COLUMNS[0]
'internal volume [mL]'
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from rheoline.errors import RheolineError, ScenarioError
from rheoline.model.conditions import count_words
from rheoline.model.transient_results import TRANSIENT_CONDITIONS
from rheoline.scenario.transient_fields import barrel_of

__all__ = [
    "TRANSIENT_COLUMNS",
    "TIME_SERIES_COLUMNS",
    "FLAG_KEYS",
    "FLAG_WORDS",
    "SERIES_POINTS",
    "RECORD_KEYS",
    "NULL_REASONS",
    "transient_step",
    "model_inputs",
    "time_series_table",
    "not_computed_table",
]

TRANSIENT_COLUMNS = [
    "internal volume [mL]",
    "start-up time [min]",
    "rate change t50 [min]",
    "rate change t90 [min]",
    "time to alarm [min]",
    "bolus [mL]",
    "drug delay t50 [min]",
    "drug delay t90 [min]",
    "port dead volume [mL]",
]
TIME_SERIES_COLUMNS = [
    "case",
    "phase",
    "port",
    "time [min]",
    "syringe pressure [mmHg]",
    "outlet flow [mL/h]",
    "delivered [mL]",
    "drug delivery [mg/h]",
]
#: The time solve's conditions stated in the rows' flags (limits, and what a reviewer acts
#: on); the others that hold become the scenario's notes.
FLAG_KEYS = tuple(k for k, c in TRANSIENT_CONDITIONS.items() if c.severity != "caution") + (
    "alarm_at_occlusion",
    "alarm_before_break_loose",
    "released_before_alarm",
    "retrograde_flow",
)
#: The flag words of :data:`FLAG_KEYS`, read from the model's conditions.
FLAG_WORDS = {k: TRANSIENT_CONDITIONS[k].words for k in FLAG_KEYS}
#: The JSON record's key of each transient column, and the factor from the column's unit.
RECORD_KEYS = {
    "internal_volume_ml": ("internal volume [mL]", 1.0),
    "startup_time_s": ("start-up time [min]", 60.0),
    "rate_change_50_s": ("rate change t50 [min]", 60.0),
    "rate_change_90_s": ("rate change t90 [min]", 60.0),
    "time_to_alarm_s": ("time to alarm [min]", 60.0),
    "bolus_ml": ("bolus [mL]", 1.0),
    "drug_delay_50_s": ("drug delay t50 [min]", 60.0),
    "drug_delay_90_s": ("drug delay t90 [min]", 60.0),
    "port_dead_volume_ml": ("port dead volume [mL]", 1.0),
}
#: Why a transient column of a case is empty (a JSON record's null): reason key -> words.
NULL_REASONS = {
    "no_time_solve": "the scenario asks for no time solve (give syringe_compliance, a part's "
    "compliance, rate_changes, an occlusion or a port)",
    "volume_not_known": "a part of the line has no internal volume",
    "no_rate_change": "the main pump's set rate does not change after its start",
    "no_occlusion": "the scenario has no occlusion",
    "no_port": "the scenario has no port",
    **{
        k: TRANSIENT_CONDITIONS[k].meaning
        for k in ("startup_not_reached", "rate_change_not_reached", "no_alarm", "drug_not_reached")
    },
}
#: Most points of one phase of one case kept in the time series (every k-th solver step,
#: so the solver's dense steps at a fast change stay dense).
SERIES_POINTS = 400

#: The model's name of a scenario's main pump (its rate changes are told apart by it).
MAIN_PUMP = "main syringe pump"
_ML = 1e-6
_MMHG = 133.322387415
_ML_PER_H = 1e-6 / 3600.0
#: kg/s to mg/h.
_MG_PER_H = 1e6 * 3600.0


def _vec(x, n):
    return np.broadcast_to(np.asarray(x, dtype=float), (n,))


# --------------------------------------------------------------------------- model objects
def _profile(flow, start, changes):
    """The rate profile of a pump at ``flow`` [m^3/s] from ``start`` [s] with its changes."""
    from rheoline.model.rate_profile import RateProfile

    flow = np.asarray(flow, dtype=float)
    times, rates, now = [start, start], [np.zeros_like(flow), flow], flow
    for change in changes:
        new = np.full_like(flow, change.rate.si)
        times += [change.time.si, change.end]
        rates += [now, new]
        now = new
    return RateProfile.from_points(np.asarray(times), np.stack(np.broadcast_arrays(*rates)))


def _compliance(values, table=None):
    from rheoline.model.compliance import Compliance

    if table is not None:
        return Compliance(pressures=table[0], values=table[1])
    return None if values is None else Compliance(values)


def _break_loose(v, n):
    """Break-loose pressure [Pa] per point: given, or a force on the barrel's bore."""
    from rheoline.model.compliance import plunger_pressure

    if "break_loose_force" not in v:
        return _vec(v.get("break_loose_pressure", 0.0), n)
    if "barrel_diameter" in v:
        bore = _vec(v["barrel_diameter"], n)
    else:
        bore = np.array([barrel_of(s) for s in _vec(v["syringe_size"], n)])
    return plunger_pressure(_vec(v["break_loose_force"], n), bore)


def _main_pump(g):
    from rheoline.model.compliance import SyringePump

    v, spec, n = g.values, g.scenario.transient, g.size
    table = None
    if spec is not None and spec.syringe_compliance_values is not None:
        table = (spec.syringe_compliance_pressures.si, spec.syringe_compliance_values.si)
    return SyringePump(
        rate=_profile(_vec(v["flow"], n), 0.0, spec.rate_changes if spec else ()),
        compliance=_compliance(v.get("syringe_compliance"), table),
        slack_volume=_vec(v.get("slack", 0.0), n),
        break_loose_pressure=_break_loose(v, n),
        name=MAIN_PUMP,
    )


def _part_compliance(g):
    """Part index -> Compliance: tubing per metre for lumens, lumped for the others."""
    from rheoline.model.compliance import Compliance

    out = {}
    for i, (spec, pv) in enumerate(zip(g.scenario.parts, g.parts, strict=True)):
        lumped = spec.type in ("fitting", "measured")
        if "compliance_values" in pv:
            out[i] = Compliance.per_metre(
                pressures=pv["compliance_pressures"], values=pv["compliance_values"]
            )
        elif "compliance" in pv:
            value = pv["compliance"]
            out[i] = Compliance(value) if lumped else Compliance.per_metre(value)
    return out


def _ports(spec):
    from rheoline.model.compliance import Compliance, SyringePump
    from rheoline.model.transient import InjectionPort

    out = []
    for port in spec.ports if spec else ():
        start = port.start.si if port.start is not None else 0.0
        compliance = port.syringe_compliance
        pump = SyringePump(
            rate=_profile(port.flow.si, start, port.rate_changes),
            compliance=None if compliance is None else Compliance(compliance.si),
            slack_volume=0.0 if port.slack is None else port.slack.si,
            name=port.name,
        )
        out.append(
            InjectionPort(
                boundary=int(port.boundary.si),
                pump=pump,
                concentration=port.concentration.si,
                diffusivity=None if port.diffusivity is None else port.diffusivity.si,
                name=port.name,
            )
        )
    return tuple(out)


def _occlusion(spec):
    from rheoline.model.transient import Occlusion

    occ = spec.occlusion if spec else None
    if occ is None:
        return None
    return Occlusion(
        part=int(occ.part.si) - 1,
        time=occ.time.si,
        alarm_pressure=occ.alarm_pressure.si,
        release_time=None if occ.release is None else occ.release.si,
    )


def model_inputs(g):
    """The keyword arguments of :func:`~rheoline.model.transient.simulate_infusion` (besides
    the line and the fluid) for sweep group ``g``."""
    spec = g.scenario.transient
    return {
        "pump": _main_pump(g),
        "back_pressure": _vec(g.values.get("back_pressure", 0.0), g.size),
        "part_compliance": _part_compliance(g),
        "ports": _ports(spec),
        "occlusion": _occlusion(spec),
        "duration": None if spec is None or spec.duration is None else spec.duration.si,
    }


def _file_field(model_field, sc):
    """The file's field behind a model error's ``field`` (best effort, for the message)."""
    text = str(model_field or "")
    if text.startswith("occlusion"):
        return text if "." in text else "occlusion"
    if text.startswith("ports["):
        k = int(text[6 : text.index("]")])
        return f"port[{k + 1}]" + text[text.index("]") + 1 :]
    if text.startswith("part_compliance["):
        return f"part[{int(text[16 : text.index(']')]) + 1}].compliance"
    if text.startswith("part["):
        return f"part[{int(text[5 : text.index(']')]) + 1}]"
    if sc.syringe is not None:
        return next(k for k, _ in sc.syringe.items())
    return "flow"


# --------------------------------------------------------------------------- the step
def _largest(values, moved):
    """Per point, the largest of ``values`` where ``moved`` (NaN propagates; none: NaN)."""
    if not values:
        return None
    stacked = np.where(moved, values, -np.inf)
    top = np.max(stacked, axis=0)
    return np.where(np.isneginf(top), np.nan, top)


def _columns(res, n):
    """The transient columns (other than the internal volume) of a solved group."""
    main = [r for r in res.rate_changes if r.pump == MAIN_PUMP][1:]
    moved = [_vec(r.rate_after, n) != _vec(r.rate_before, n) for r in main]
    change = {
        k: _largest([_vec(getattr(r, f"time_{k}"), n) for r in main], moved) for k in (50, 90)
    }
    alarm = _vec(res.time_to_alarm, n)
    ports = res.ports
    every = [np.ones(n, bool)] * len(ports)

    def over_ports(name, scale):
        top = _largest([_vec(getattr(p, name), n) for p in ports], every)
        return np.full(n, np.nan) if top is None else top / scale

    return {
        "start-up time [min]": _vec(res.startup_time, n) / 60.0,
        **{
            f"rate change t{k} [min]": np.full(n, np.nan) if top is None else top / 60.0
            for k, top in change.items()
        },
        "time to alarm [min]": np.where(np.isfinite(alarm), alarm / 60.0, np.nan),
        "bolus [mL]": _vec(res.bolus_volume, n) / _ML,
        "drug delay t50 [min]": over_ports("delay_50", 60.0),
        "drug delay t90 [min]": over_ports("delay_90", 60.0),
        "port dead volume [mL]": over_ports("dead_volume", _ML),
    }


def _null_reason(key, sc, res):
    """The :data:`NULL_REASONS` key of an empty column ``key`` (the same at every point of
    a group)."""
    if key == "internal_volume_ml":
        return "volume_not_known"
    if res is None:
        return "no_time_solve"
    spec = sc.transient
    if key == "startup_time_s":
        return "startup_not_reached"
    if key in ("rate_change_50_s", "rate_change_90_s"):
        moved = [r for r in res.rate_changes if r.pump == MAIN_PUMP][1:]
        return "rate_change_not_reached" if moved else "no_rate_change"
    if key in ("time_to_alarm_s", "bolus_ml"):
        return "no_occlusion" if spec is None or spec.occlusion is None else "no_alarm"
    return "no_port" if spec is None or not spec.ports else "drug_not_reached"


def _not_computed(run):
    """Per point, ``{record key: reason words}`` of its empty transient columns."""
    empty = {}  # record key -> (empty at each point, the reason)
    for key, (name, _) in RECORD_KEYS.items():
        gone = ~np.isfinite(np.asarray(run.columns[name], dtype=float))
        if gone.any():
            reason = _null_reason(key, run.g.scenario, run.transient_result)
            empty[key] = (gone.tolist(), NULL_REASONS[reason])
    return [
        {key: reason for key, (gone, reason) in empty.items() if gone[col]} for col in range(run.n)
    ]


def transient_step(run):
    """Fill the transient columns, conditions, notes and ``models_used`` of a group run
    (:class:`rheoline.scenario.run._GroupRun`: ``g``, ``n``, ``fluid``, ``line``,
    ``parts``, ``columns``, ``conditions``, ``notes``, ``models_used``), and keep the
    model's result as ``run.transient_result`` (None where not asked)."""
    from rheoline.model.provenance import merge_models

    g, n, c = run.g, run.n, run.columns
    volumes = [_vec(getattr(p, "internal_volume", np.nan), n) for p in run.parts]
    c["internal volume [mL]"] = (np.sum(volumes, axis=0) / _ML).tolist()
    for key in FLAG_KEYS:
        run.conditions[key] = np.zeros(n, dtype=bool)
    run.transient_result = None
    if not g.scenario.asks_time_solve:
        for name in TRANSIENT_COLUMNS[1:]:
            c[name] = [np.nan] * n
        run.not_computed = _not_computed(run)
        return
    res = _solve(run)
    run.transient_result = res
    for name, values in _columns(res, n).items():
        c[name] = values.astype(float).tolist()
    for key, mask in res.conditions.items():
        mask = _vec(mask, n).astype(bool)
        if key in FLAG_WORDS:
            run.conditions[key] = mask
        elif mask.any():
            condition = TRANSIENT_CONDITIONS[key]
            run.notes.append((key, f"{condition.words}: {condition.meaning}{count_words(mask)}"))
    if "syringe_size" in g.values:
        run.models_used = merge_models(run.models_used, ("typical-catalogue",))
    run.models_used = merge_models(run.models_used, res.models_used)
    run.not_computed = _not_computed(run)


def _reuse_key(g):
    """What names every input of group ``g``'s time solve but its occlusion: the scenario
    without the occlusion, and the group's sweep points (its line, fluid and pumps are
    built from these alone); the model's run from rest is kept under it
    (:mod:`rheoline.model.transient_reuse`)."""
    spec = g.scenario.transient
    if spec is None or spec.occlusion is None:
        return (g.scenario, tuple(g.indices))
    return (replace(g.scenario, transient=spec.with_occlusion(None)), tuple(g.indices))


def _solve(run):
    from rheoline.model.transient import simulate_infusion

    sc = run.g.scenario
    try:
        return simulate_infusion(
            run.line, run.fluid, **model_inputs(run.g), reuse_key=_reuse_key(run.g)
        )
    except RheolineError as exc:
        raise ScenarioError(
            str(exc),
            source=run.source,
            scenario=repr(sc.name),
            field=_file_field(getattr(exc, "field", None), sc),
        ) from None


# --------------------------------------------------------------------------- time series
def _thin(size):
    """Indices of at most :data:`SERIES_POINTS` of ``size`` solver steps, ends kept."""
    return np.unique(np.linspace(0, size - 1, min(size, SERIES_POINTS)).round().astype(int))


def _phase_rows(case, phase, series, col, offset=0.0):
    """Rows of one phase of one case (absolute times; NaN steps dropped before thinning, so
    the case's own last row, its alarm, is kept)."""
    if series is None or series.time.size == 0:
        return []
    n_t = series.time.size
    p, q, v = (
        np.asarray(a).reshape(n_t, -1)[:, col]
        for a in (series.source_pressure, series.outlet_flow, series.delivered_volume)
    )
    kept = np.flatnonzero(np.isfinite(p) & np.isfinite(q))
    idx = kept[_thin(kept.size)] if kept.size else kept
    t = (series.time[idx] + offset) / 60.0
    return [
        [case, phase, "", a, b / _MMHG, f / _ML_PER_H, d / _ML, np.nan]
        for a, b, f, d in zip(t, p[idx], q[idx], v[idx], strict=True)
    ]


def _case_rows(res, case, col):
    rows = _phase_rows(case, "run", res.run, col)
    occ = res.occlusion
    if occ is not None:
        rows += _phase_rows(case, "occluded", occ.occluded, col)
        release = float(np.asarray(occ.release_time, dtype=float).reshape(-1)[col])
        if np.isfinite(release):
            rows += _phase_rows(case, "release", occ.release, col, release)
    for port in res.ports:
        idx = _thin(port.time.size)
        drug = np.asarray(port.delivery)[idx].reshape(idx.size, -1)[:, col] * _MG_PER_H
        rows += [
            [case, "drug", port.name, t / 60.0, np.nan, np.nan, np.nan, d]
            for t, d in zip(port.time[idx], drug, strict=True)
        ]
    return rows


def time_series_table(runs, cases, keys):
    """The time series of every case that had the time solve, one row per kept step.

    Parameters
    ----------
    runs : sequence of group runs
        Each with ``g`` (scenario and sweep indices) and ``transient_result``.
    cases : sequence
        The run's cases, ``(index in the sweep, table row, ...)``, aligned with ``keys``.
    keys : sequence of str
        The cases' unique keys.

    Returns
    -------
    pandas.DataFrame
        :data:`TIME_SERIES_COLUMNS`: ``phase`` "run" (from time 0, no occlusion),
        "occluded" (from the occlusion until the alarm), "release" (from the occlusion's
        clearing, pumps stopped), or "drug" (a port's drug leaving the outlet, ``port`` its
        name); ``delivered [mL]`` counts from the phase's start.
    """
    import pandas as pd

    key_of = {(case[1][1], case[0]): key for case, key in zip(cases, keys, strict=True)}
    rows = []
    for run in runs:
        res = getattr(run, "transient_result", None)
        if res is None:
            continue
        for col, index in enumerate(run.g.indices):
            rows += _case_rows(res, key_of[(run.g.scenario.name, index)], col)
    return pd.DataFrame(rows, columns=TIME_SERIES_COLUMNS)


def not_computed_table(runs, cases, keys):
    """Case key -> ``{JSON record key: why it is null}`` (:data:`NULL_REASONS`), for every
    case (an empty mapping where every transient value was computed); arguments as
    :func:`time_series_table`."""
    key_of = {(case[1][1], case[0]): key for case, key in zip(cases, keys, strict=True)}
    out = {}
    for run in runs:
        for col, index in enumerate(run.g.indices):
            out[key_of[(run.g.scenario.name, index)]] = run.not_computed[col]
    return out
