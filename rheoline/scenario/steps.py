"""The computations behind the run's steps that go beyond one call of the line engine.

:func:`tolerance_band` (the ``tolerance`` step: a seeded Monte Carlo per case),
:func:`delivery_minutes` (the ``delivery`` step), :func:`part_regimes` and
:func:`part_rows` (the parts table of the ``solve`` step) and :func:`scenario_notes` (the
notes of a scenario, rendered from its results' conditions).  :mod:`rheoline.scenario.run` calls them in order.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from rheoline.model.hemolysis import HEMOLYSIS_CONCERN_STRESS  # a model constant, re-exported
from rheoline.model.provenance import merge_models
from rheoline.scenario.build import build_parts, point_group
from rheoline.scenario.description import ToleranceSpec
from rheoline.units import ML_PER_MIN, MMHG

__all__ = [
    "HEMOLYSIS_CONCERN_STRESS",
    "tolerance_band",
    "delivery_minutes",
    "part_regimes",
    "part_rows",
    "scenario_notes",
]

#: The scenario fields a fluid is built from (besides its name).
_FLUID_FIELDS = ("temperature", "hematocrit", "mass_fraction")


def _vec(x, n):
    return np.broadcast_to(np.asarray(x), (n,))


# --------------------------------------------------------------------------- tolerance
@dataclass(frozen=True)
class Band:
    """The tolerance step's answer per case of a group: p5 and p95 of the flow [mL/min]
    (drive mode) or of the required pressure [mmHg] (flow mode), the input that dominates
    the spread, whether a correlation left its range while sampling, and the models the
    bands used (provenance keys)."""

    p5: np.ndarray
    p95: np.ndarray
    dominant: list
    outside_range: np.ndarray
    models_used: tuple


def tolerance_band(g, fl):
    """The :class:`Band` of group ``g`` (whose fluid is ``fl``), from the line engine's seeded Monte Carlo
    (:func:`rheoline.model.tolerance.flow_tolerance`, one vectorized solve of all samples
    per case).  Each tolerance is a half-width (uniform spread unless the file says
    ``distribution = "normal"``); an absolute bore or length tolerance is turned into a
    relative one at the case's nominal value.  Warnings while sampling are passed on.
    """
    n = g.size
    lo, hi, top = np.full(n, np.nan), np.full(n, np.nan), [""] * n
    outside = np.zeros(n, dtype=bool)
    models = ()
    for col in range(n):
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            band, scale = _tolerance_case(g, fl, col)
        lo[col], hi[col] = band.percentiles[5.0] / scale, band.percentiles[95.0] / scale
        top[col], outside[col] = band.dominant_input, bool(np.any(band.outside_range))
        models = merge_models(models, band.models_used)
        for w in caught:  # on to the caller's notes
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
    return Band(lo, hi, top, outside, models)


def _tolerance_case(g, fl, col):
    """The tolerance band of sweep point ``col`` and the scale of its percentiles (to mmHg
    or mL/min).  The case's fluid is the group's fluid at the case's temperature and options
    (:meth:`~rheoline.model.fluid_base.Fluid.at`: rebuilt from its recipe)."""
    from rheoline.model.line import Line
    from rheoline.model.tolerance import flow_tolerance

    sc = g.scenario
    tol = sc.tolerance or ToleranceSpec()
    one = point_group(g, col)
    options = {k: one.values[k] for k in ("hematocrit", "mass_fraction") if k in one.values}
    case_fluid = fl.at(temperature_c=one.values["temperature"], **options)
    case_line = Line(build_parts(one, ""))
    d_tol, l_tol = {}, {}
    for i, (spec, part) in enumerate(zip(sc.parts, case_line.parts, strict=True)):
        for key, target in (("inner_diameter", d_tol), ("length", l_tol)):
            if key in spec.tolerance:
                nominal = float(np.asarray(getattr(part, key)).ravel()[0])
                target[i] = spec.tolerance[key].fraction_of(nominal)
    drive = {"back_pressure": one.values.get("back_pressure", 0.0)}
    if sc.mode == "flow":
        drive["flow"] = one.values["flow"]
    else:
        drive["head"] = one.values.get("head", 0.0)
        drive["source_pressure"] = one.values.get("source_pressure", 0.0)
    band = flow_tolerance(
        case_line,
        case_fluid,
        **drive,
        diameter_tolerance=d_tol,
        length_tolerance=l_tol,
        temperature_tolerance=tol.get("temperature", 0.0),
        hematocrit_tolerance=tol.get("hematocrit", 0.0) if case_fluid.is_blood else 0.0,
        viscosity_tolerance=tol.get("viscosity", 0.0),
        n_samples=sc.n_samples,
        seed=int(tol.get("seed", 0)),
        distribution=tol.get("distribution", "uniform"),
        percentiles=(5.0, 95.0),
    )
    return band, (MMHG if sc.mode == "flow" else ML_PER_MIN)


# --------------------------------------------------------------------------- delivery
@dataclass(frozen=True)
class Delivery:
    """The delivery step's answer per case of a group: the time [min] to deliver the
    volume (inf where the flow stops first), whether a correlation left its range, and the
    models used (provenance keys; none for a constant drive or a pump: volume over flow)."""

    minutes: np.ndarray
    outside_range: np.ndarray
    models_used: tuple = ()


def delivery_minutes(g, fl, line, res):
    """The :class:`Delivery` of group ``g``; None without a volume."""
    if "volume" not in g.values:
        return None
    n = g.size
    v = g.values
    volume = _vec(v["volume"], n)
    decay = ("head_when_empty", "pressure_time_constant", "source_pressure_when_empty")
    if g.scenario.mode == "flow" or not any(k in v for k in decay):
        return Delivery(volume / _vec(res.flow, n) / 60.0, np.zeros(n, dtype=bool))
    from rheoline.model import delivery

    head = v.get("head", 0.0)
    back = v.get("back_pressure", 0.0)
    if "source_pressure_when_empty" in v or "pressure_time_constant" in v:
        t = delivery.pressure_bag_delivery_time(
            line,
            fl,
            volume,
            v["source_pressure"],
            pressure_empty=v.get("source_pressure_when_empty"),
            time_constant=v.get("pressure_time_constant"),
            head_full=head,
            head_empty=v.get("head_when_empty"),
            back_pressure=back,
        )
    else:
        t = delivery.falling_head_delivery_time(
            line,
            fl,
            volume,
            head,
            v["head_when_empty"],
            source_pressure=v.get("source_pressure", 0.0),
            back_pressure=back,
        )
    outside = _vec(t.outside_range, n).astype(bool)
    return Delivery(_vec(t.time, n) / 60.0, outside, tuple(t.models_used))


# --------------------------------------------------------------------------- parts
def part_regimes(res, n_parts, n):
    """The line's regime of each part at each point, shape (parts, points); "" where none
    applies (K fittings, measured parts: no Reynolds number)."""
    shape = (n_parts, n)
    reynolds = np.broadcast_to(np.asarray(res.part_reynolds, dtype=float), shape)
    regimes = np.broadcast_to(np.asarray(res.part_regimes), shape)
    return np.where(np.isnan(reynolds), "", regimes).astype(object)


def part_rows(run):
    """The parts table's rows of each point of a group run (its parts and the outlet);
    each row ends with the part's key in its line."""
    res, parts, n = run.res, run.parts, run.n
    k = len(parts)

    def per_part(x):
        return np.broadcast_to(np.asarray(x, dtype=float), (k, n))

    drops = per_part(res.part_pressure_drops)
    exit_drop = _vec(res.exit_pressure_drop, n).astype(float)
    budget = drops.sum(axis=0) + exit_drop
    with np.errstate(divide="ignore", invalid="ignore"):
        share = np.where(budget > 0, drops / budget * 100, np.nan)
        exit_share = np.where(budget > 0, exit_drop / budget * 100, np.nan)
    nan = np.full(n, np.nan)
    sizes = {
        key: [nan if getattr(p, key, None) is None else _vec(getattr(p, key), n) for p in parts]
        for key in ("inner_diameter", "length")
    }
    columns = [
        [np.asarray(d, dtype=float) * 1e3 for d in sizes["inner_diameter"]],
        [np.asarray(x, dtype=float) for x in sizes["length"]],
        per_part(res.part_reynolds),
        part_regimes(res, k, n),
        drops,
        drops / MMHG,
        share,
        per_part(res.part_mean_velocity),
        per_part(res.part_wall_shear_stress),
        per_part(res.part_wall_shear_rate),
        per_part(res.part_entrance_length),
    ]
    columns = [
        np.asarray(c, dtype=object if j == 3 else float).tolist() for j, c in enumerate(columns)
    ]
    kinds = [getattr(p, "kind", "part") for p in parts]
    names = run.point_names.tolist()
    exit_cells = [exit_drop.tolist(), (exit_drop / MMHG).tolist(), exit_share.tolist()]
    # per part, its cells at every point zipped at once (tuples, in column order)
    cells = [list(zip(*(c[j] for c in columns), strict=True)) for j in range(k)]
    keys = run.line.part_names
    out = []
    for col, case in enumerate(run.columns["case"]):
        rows = [[case, names[j][col], kinds[j], *cells[j][col], keys[j]] for j in range(k)]
        drop, drop_mmhg, drop_share = (e[col] for e in exit_cells)
        exit_row = [case, "exit", "exit", np.nan, np.nan, np.nan, "", drop, drop_mmhg]
        rows.append(exit_row + [drop_share, np.nan, np.nan, np.nan, np.nan, "exit"])
        out.append(rows)
    return out


# --------------------------------------------------------------------------- notes
#: Conditions the table's ``flags`` state case by case; the notes state the others.
_IN_FLAGS = (
    "turbulent",
    "transitional",
    "over_pressure_limit",
    "no_forward_flow",
    "hemolysis_concern",
    "not_converged",
)


def scenario_notes(runs):
    """The notes of a scenario's group runs as ``(key, text)``, rendered from data.

    First what the models warned (a correlation outside its range, in the model's own
    words, once each), then every condition of :data:`rheoline.model.conditions.CONDITIONS`
    that holds somewhere in the scenario and is not in the rows' flags: a per-part one names
    the parts (as each sweep point names them), a catalogue size gives the part's own note.
    """
    from rheoline.model.conditions import CONDITIONS

    out = [(key, text) for run in runs for key, text in run.notes]
    for key, condition in CONDITIONS.items():
        if key in _IN_FLAGS or not any(run.res.conditions[key].any() for run in runs):
            continue
        if not condition.per_part:
            out.append((key, f"{condition.words}; {condition.meaning}"))
            continue
        by_text = {}
        for run in runs:
            for j, part in enumerate(run.parts):
                where = np.broadcast_to(run.res.part_conditions[key][j], (run.n,))
                text = getattr(part, "source_note", None) if key == "catalogue_size" else None
                text = text or f"{condition.words}; {condition.meaning}"
                by_text.setdefault(text, []).extend(run.point_names[j, where])
        out += [
            (key, f"{', '.join(dict.fromkeys(names))}: {t}")
            for t, names in by_text.items()
            if names
        ]
    if any(run.res.pries_correction for run in runs):
        out.append(
            (
                "pries-1992",
                "Pries 1992 in-vitro diameter correction applied to the apparent viscosity",
            )
        )
    return list(dict.fromkeys(out))
