"""The computations behind the run's steps that go beyond one call of the line engine.

:func:`tolerance_band` (the ``tolerance`` step: a seeded Monte Carlo per case),
:func:`delivery_minutes` (the ``delivery`` step), :func:`part_regimes` and
:func:`part_rows` (the parts table of the ``solve`` step), :func:`fluid_range_mask` (which
points' fluids left a model's range) and :func:`condensed_notes` (the notes of a scenario's
groups, one line per message).  :mod:`rheoline.scenario.run` calls them in order.
"""

from __future__ import annotations

import re
import warnings

import numpy as np

from rheoline.errors import RangeWarning
from rheoline.model.hemolysis import HEMOLYSIS_CONCERN_STRESS  # a model constant, re-exported
from rheoline.scenario.build import build_fluid, build_parts, point_group
from rheoline.scenario.description import ToleranceSpec
from rheoline.units import ML_PER_MIN, MMHG

__all__ = [
    "HEMOLYSIS_CONCERN_STRESS",
    "tolerance_band",
    "delivery_minutes",
    "part_regimes",
    "part_rows",
    "fluid_range_mask",
    "condensed_notes",
]

#: The scenario fields a fluid is built from (besides its name).
_FLUID_FIELDS = ("temperature", "hematocrit", "mass_fraction")


def _vec(x, n):
    return np.broadcast_to(np.asarray(x), (n,))


# --------------------------------------------------------------------------- tolerance
def tolerance_band(g, fl, line):
    """p5 and p95 per case of the flow [mL/min] (drive mode) or the required pressure [mmHg]
    (flow mode), and the input that dominates the spread, from the line engine's seeded
    Monte Carlo (:func:`rheoline.model.tolerance.flow_tolerance`, one vectorized solve of
    all samples per case).  Each tolerance is a half-width (uniform spread unless the file
    says ``distribution = "normal"``); an absolute bore or length tolerance is turned into a
    relative one at the case's nominal value.  The fourth array says, per case, whether a
    model was used outside its range while sampling (the band's ``outside_range``; its
    warnings are passed on).
    """
    n = g.size
    lo, hi, top = np.full(n, np.nan), np.full(n, np.nan), [""] * n
    outside = np.zeros(n, dtype=bool)
    for col in range(n):
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            lo[col], hi[col], top[col], outside[col] = _tolerance_case(g, col)
        for w in caught:  # on to the caller's notes
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
    return lo, hi, top, outside


def _tolerance_case(g, col):
    """p5, p95, the dominant input and whether a correlation left its range, of the
    tolerance band of sweep point ``col`` (the fluid is rebuilt from its recipe)."""
    from rheoline.model.line import Line
    from rheoline.model.tolerance import flow_tolerance

    sc = g.scenario
    tol = sc.tolerance or ToleranceSpec()
    one = point_group(g, col)
    case_fluid = build_fluid(one, "")
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
    scale = MMHG if sc.mode == "flow" else ML_PER_MIN
    return (
        band.percentiles[5.0] / scale,
        band.percentiles[95.0] / scale,
        band.dominant_input,
        bool(np.any(band.outside_range)),
    )


# --------------------------------------------------------------------------- delivery
def delivery_minutes(g, fl, line, res):
    """Time [min] to deliver the scenario's volume, per case; None without a volume."""
    if "volume" not in g.values:
        return None
    n = g.size
    v = g.values
    volume = _vec(v["volume"], n)
    decay = ("head_when_empty", "pressure_time_constant", "source_pressure_when_empty")
    if g.scenario.mode == "flow" or not any(k in v for k in decay):
        return volume / _vec(res.flow, n) / 60.0  # a constant drive or a pump
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
    return _vec(t.time, n) / 60.0


# --------------------------------------------------------------------------- parts
def part_regimes(res, n_parts, n):
    """The regime of each part at each point, shape (parts, points); "" where none applies
    (K fittings, measured parts: no Reynolds number)."""
    from rheoline.model.lumen import regime_of

    re_ = np.broadcast_to(np.asarray(res.part_reynolds, dtype=float), (n_parts, n))
    finite = np.isfinite(re_)
    return np.where(finite, regime_of(np.where(finite, re_, 0.0)), "").astype(object)


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
    out = []
    for col, case in enumerate(run.columns["case"]):
        rows = [
            [case, names[j][col], kinds[j], *(c[j][col] for c in columns), run.line.part_names[j]]
            for j in range(k)
        ]
        drop, drop_mmhg, drop_share = (e[col] for e in exit_cells)
        exit_row = [case, "exit", "exit", np.nan, np.nan, np.nan, "", drop, drop_mmhg]
        rows.append(exit_row + [drop_share, np.nan, np.nan, np.nan, np.nan, "exit"])
        out.append(rows)
    return out


# --------------------------------------------------------------------------- notes
def fluid_range_mask(g, source):
    """Per point of ``g``: does building its fluid warn that a model is outside its range?

    The vectorized build warns once for the whole group; here the fluid is built again,
    once per distinct (temperature, hematocrit, mass fraction), under its own
    ``catch_warnings``.  Building a fluid solves nothing, so this is cheap.
    """
    n = g.size
    present = [k for k in _FLUID_FIELDS if k in g.values]
    states = {}
    for col in range(n):
        states.setdefault(tuple(float(g.values[k][col]) for k in present), []).append(col)
    mask = np.zeros(n, dtype=bool)
    for cols in states.values():
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            build_fluid(point_group(g, cols[0]), source)
        mask[cols] = any(issubclass(w.category, RangeWarning) for w in caught)
    if not mask.any():  # the group warned, but no single point does: keep it on all
        mask[:] = True
    return mask


def condensed_notes(runs):
    """The notes of a scenario's group runs as ``(key, text)``, one line per message:
    regime notes are in each row's flags, and one message about several parts ("14G
    catheter: ...", "16G catheter: ...") becomes one line naming the parts."""
    by_message = {}
    for run in runs:
        for key, m in run.notes:
            m = re.sub(r" in \d+ of \d+ scenarios", "", m)
            if re.search(r": (turbulent|transitional) flow \(", m):
                continue
            part, sep, message = m.partition(": ")
            text = message if sep else m
            entry = by_message.setdefault(text, (key, []))
            entry[1].append(part if sep else None)
    out = []
    for message, (key, parts) in by_message.items():
        named = [p for p in dict.fromkeys(parts) if p is not None]
        out.append((key, f"{', '.join(named)}: {message}" if named else message))
    return out
