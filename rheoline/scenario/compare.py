"""Comparison runs: a validated scenario set solved into pandas tables.

:func:`run_scenarios` solves every scenario and sweep point and returns a
:class:`RunResult` whose ``table`` has one row per case (a scenario, or one point of
its sweep) with the units in the column names:

``flow [mL/min]``, ``flow [mL/h]``, ``required pressure [mmHg]`` (the source pressure
above the gravity head), ``max Reynolds number``, ``regime`` (the worst part),
``dominant part`` and ``dominant share [%]`` of the pressure budget,
``max wall shear stress [Pa]``, ``hemolysis index [%]`` (Giersiepen 1990, blood fluids only) and
``hemolysis concern``, ``over pressure limit``, ``flags`` (validity notes),
``flow p5 [mL/min]`` / ``flow p95 [mL/min]`` (a pump: ``pressure p5/p95 [mmHg]``) and the
``dominant tolerance`` where tolerances are given, and
``time to deliver [min]`` where a volume is given, and ``catheter-to-vein ratio [-]``
(:func:`rheoline.model.vessels.infusion_site_context`) where a vein diameter is given.

Sweep points that share their fluid and catalogue sizes are solved together in one
vectorized call of the line engine (no Python loop per point).

:func:`smallest_reaching`, :func:`rank` and :func:`filter_cases` answer the usual
review questions (e.g. the smallest catheter that reaches 100 mL/min at 1 m head).
"""

from __future__ import annotations

import datetime as _dt
import re
import warnings
from dataclasses import dataclass, field

import numpy as np

from rheoline.errors import RheolineError, ScenarioError
from rheoline.model.hemolysis import HEMOLYSIS_CONCERN_STRESS  # re-exported (model constant)
from rheoline.scenario.description import Axis, ScenarioSet, ToleranceSpec, sweep_points
from rheoline.scenario.writing import scenario_data
from rheoline.units import ML_PER_H, ML_PER_MIN, MMHG

__all__ = [
    "HEMOLYSIS_CONCERN_STRESS",
    "RunResult",
    "check_scenarios",
    "run_scenarios",
    "smallest_reaching",
    "rank",
    "filter_cases",
    "fluid_table",
    "parts_table",
    "ASSUMPTIONS",
]


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
        "blood as Carreau, Casson or Quemada per fluid",
    ),
    (
        "blood viscosity",
        "hematocrit and temperature dependence",
        "Quemada, Rheol. Acta 17 (1978); Cho & Kensey, Biorheology 28 (1991); Pries et al., "
        "Am. J. Physiol. 263 (1992)",
        "packed red cells taken as blood at a high hematocrit",
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


# Part fields that select a catalogue entry, or are single values by nature: grouped on,
# never vectorized.
_DISCRETE = {
    "gauge",
    "wall",
    "french",
    "kind",
    "k",
    "equivalent_length",
    "test_viscosity",
    "test_density",
}


@dataclass
class RunResult:
    """A solved scenario set.

    Attributes
    ----------
    scenario_set : ScenarioSet
    table : pandas.DataFrame
        One row per case; units in the column names.
    parts : pandas.DataFrame
        One row per case and part (and the outlet), with pressure drops, Reynolds numbers
        and wall shear stresses.
    inputs : pandas.DataFrame
        The scenario inputs as written, one row per field.
    assumptions : pandas.DataFrame
        The models used and their references, and the fluids' property sources.
    warnings : tuple of str
        Notes raised while solving (correlations outside their range and the like).
    part_keys : tuple of str
        Per row of ``parts``, the part's name in its line (the same for every point of a
        sweep), where ``parts["part"]`` names each point's own size; the pack's charts
        group on it.
    """

    scenario_set: ScenarioSet
    table: object
    parts: object
    inputs: object
    assumptions: object
    warnings: tuple = ()
    created: _dt.datetime = field(default_factory=lambda: _dt.datetime.now(_dt.UTC))
    part_keys: tuple = ()

    def summary(self):
        """The columns printed by ``rheoline run``.

        ``source pressure [mmHg]`` is the given bag or infuser pressure for a drive, and the
        pressure the pump must supply (above the gravity head) for a prescribed flow.
        """
        t = self.table
        out = t[["case", "flow [mL/min]", "required pressure [mmHg]"]].copy()
        out.columns = ["case", "flow [mL/min]", "source pressure [mmHg]"]
        out["max Re"] = t["max Reynolds number"].round().astype("Int64")
        out["regime"] = t["regime"]
        out["dominant part (share)"] = [
            f"{p} ({s:.0f} %)"
            for p, s in zip(t["dominant part"], t["dominant share [%]"], strict=True)
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

    def records(self):
        """The table as a list of JSON-ready dicts (one per case), with the parts of each line.

        Keys: ``name``, ``scenario``, ``point``, ``fluid``, ``flow_ml_min``, ``flow_ml_h``,
        ``required_pressure_mmhg``, ``max_reynolds``, ``regime``, ``dominant_part``,
        ``dominant_share``, ``max_wall_shear_stress_pa``, ``hemolysis_index_percent``,
        ``hemolysis_concern``, ``exceeds_pressure_limit``, ``flow_p5_ml_min``,
        ``flow_p95_ml_min``, ``time_to_deliver_min``, ``flags`` and ``parts`` (a list of
        ``part``, ``kind``, ``pressure_drop_pa``, ``reynolds``, ``regime``,
        ``wall_shear_stress_pa``, ``share``), and ``caution``.
        """
        from rheoline import CAUTION

        by_case = {}
        for row in self.parts.itertuples(index=False):
            by_case.setdefault(row.case, []).append(
                {
                    "part": row.part,
                    "kind": row.kind,
                    "pressure_drop_pa": _num(row[self.parts.columns.get_loc("pressure drop [Pa]")]),
                    "reynolds": _num(row.reynolds),
                    "regime": row.regime,
                    "wall_shear_stress_pa": _num(
                        row[self.parts.columns.get_loc("wall shear stress [Pa]")]
                    ),
                    "share": _num(row[self.parts.columns.get_loc("share [%]")] / 100.0),
                }
            )
        out = []
        t = self.table
        for r in t.to_dict("records"):
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
                    "flags": [f for f in r["flags"].split("; ") if f],
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


# --------------------------------------------------------------------------- building blocks
@dataclass
class _Group:
    """Sweep points of one scenario solved in one vectorized call."""

    scenario: object
    indices: list
    labels: list
    values: dict  # scenario field -> np.ndarray (n,) or a name
    parts: list  # per part: dict field -> np.ndarray (n,) or a discrete value


def _groups(sc):
    points = sweep_points(sc)
    keyed = {}
    for i, pt in enumerate(points):
        vals = {k: (pt[k][0] if k in pt else v) for k, v in sc.values.items()}
        parts = []
        for j, p in enumerate(sc.parts, start=1):
            parts.append(
                {
                    k: (pt[f"part[{j}].{k}"][0] if isinstance(v, Axis) else v)
                    for k, v in p.values.items()
                }
            )
        key = (
            vals["fluid"],
            tuple(tuple((k, v) for k, v in sorted(pv.items()) if k in _DISCRETE) for pv in parts),
        )
        label = ", ".join(shown for _, shown in pt.values())
        keyed.setdefault(key, []).append((i, label, vals, parts))
    groups = []
    for members in keyed.values():
        idx = [m[0] for m in members]
        labels = [m[1] for m in members]
        vals = {}
        for k in members[0][2]:
            col = [m[2][k] for m in members]
            vals[k] = col[0] if k == "fluid" else np.asarray(col, dtype=float)
        parts = []
        for j in range(len(sc.parts)):
            pv = {}
            for k in members[0][3][j]:
                col = [m[3][j][k] for m in members]
                if k in _DISCRETE:
                    pv[k] = col[0]
                elif isinstance(col[0], tuple):  # measured pairs, fixed
                    pv[k] = np.asarray(col[0], dtype=float)
                else:
                    pv[k] = np.asarray(col, dtype=float)
            parts.append(pv)
        groups.append(_Group(sc, idx, labels, vals, parts))
    return groups


def _point_group(g, col):
    """The one-point group of sweep point ``col`` of ``g`` (scalars instead of arrays)."""
    n = len(g.indices)
    return _Group(
        g.scenario,
        g.indices[col : col + 1],
        g.labels[col : col + 1],
        {k: (v if k == "fluid" else float(v[col])) for k, v in g.values.items()},
        [
            {
                k: (
                    float(v[col])
                    if isinstance(v, np.ndarray)
                    and v.shape == (n,)
                    and k not in ("flows", "pressure_drops")
                    else v
                )
                for k, v in pv.items()
            }
            for pv in g.parts
        ],
    )


#: The scenario fields a fluid is built from (besides its name).
_FLUID_FIELDS = ("temperature", "hematocrit", "mass_fraction")


def _fluid_range_mask(g, source):
    """Per point of ``g``: does building its fluid warn that a model is outside its range?

    The vectorized build warns once for the whole group; here the fluid is built again,
    once per distinct (temperature, hematocrit, mass fraction), under its own
    ``catch_warnings``.  Building a fluid solves nothing, so this is cheap.
    """
    from rheoline.errors import RangeWarning

    n = len(g.indices)
    present = [k for k in _FLUID_FIELDS if k in g.values]
    states = {}
    for col in range(n):
        states.setdefault(tuple(float(g.values[k][col]) for k in present), []).append(col)
    mask = np.zeros(n, dtype=bool)
    for cols in states.values():
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            _build_fluid(_point_group(g, cols[0]), source)
        mask[cols] = any(issubclass(w.category, RangeWarning) for w in caught)
    if not mask.any():  # the group warned, but no single point does: keep it on all
        mask[:] = True
    return mask


def _field_of(message, candidates, default):
    low = message.lower()
    for c in candidates:
        if c.replace("_", " ") in low or c in low:
            return c
    return default


def _build_fluid(group, source):
    from rheoline.model.fluids import fluid

    sc = group.scenario
    opts = {k: group.values[k] for k in ("hematocrit", "mass_fraction") if k in group.values}
    try:
        return fluid(group.values["fluid"], temperature_c=group.values["temperature"], **opts)
    except RheolineError as exc:
        msg = str(exc)
        if "has no option" in msg:
            fieldname = next((k for k in opts if f"option {k!r}" in msg), "fluid")
        else:
            fieldname = _field_of(
                msg.split(";")[0], ["hematocrit", "mass_fraction", "temperature"], "fluid"
            )
        raise ScenarioError(
            str(exc), source=source, scenario=repr(sc.name), field=fieldname
        ) from None


def _build_part(spec, kw, name):
    """One model part of the file's part ``spec`` with the field values ``kw``."""
    from rheoline.model import parts as mp

    kw = dict(kw)
    if spec.type == "tube":
        return mp.Tube(name=name, **kw)
    if spec.type == "set":
        kind = kw.pop("kind")
        if "inner_diameter" in kw:
            length = kw.get("length", mp.catalogue.EXTENSION_SETS[kind][1])
            return mp.Tube(inner_diameter=kw["inner_diameter"], length=length, name=name)
        return mp.extension_set(kind, length=kw.get("length"), name=name)
    if spec.type == "catheter" and "gauge" not in kw:  # a measured bore only
        return mp.Tube(name=name or "catheter", **kw)
    if spec.type == "catheter":
        return mp.Catheter(name=name, **kw)
    if spec.type == "needle":
        return mp.Needle(name=name, **kw)
    if spec.type == "cannula":
        return mp.Cannula(name=name, **kw)
    if spec.type == "fitting":
        return mp.Fitting(name=name, **kw)
    return mp.MeasuredPart(name=name, **kw)


def _build_parts(group, source):
    sc = group.scenario
    built, used = [], {}
    for j, (spec, pv) in enumerate(zip(sc.parts, group.parts, strict=True), start=1):
        name = None if spec.name == spec.type else spec.name  # None: the engine names it
        if name is not None:
            used[name] = used.get(name, 0) + 1
            if used[name] > 1:
                name = f"{name} ({used[name]})"
        try:
            if name is None:
                name = _unswept_name(spec, pv)
            part = _build_part(spec, pv, name)
        except RheolineError as exc:
            f = _field_of(str(exc), list(pv), next(iter(pv), "type"))
            raise ScenarioError(
                str(exc), source=source, scenario=repr(sc.name), field=f"part[{j}].{f}"
            ) from None
        built.append(part)
    return built


#: Part fields whose sweep changes the name the engine gives a part ("tube 3 mm x 1.8 m").
_SIZE_FIELDS = ("inner_diameter", "length")


def _unswept_name(spec, pv):
    """The engine's name of a part whose sizes are one value repeated over a group.

    A group passes every size as an array of its points; the engine would name it by the
    range ("tube 3-3 mm x 1 m").  None (the engine names it) when a size varies.
    """
    sizes = {k: pv[k] for k in _SIZE_FIELDS if isinstance(pv.get(k), np.ndarray)}
    if not sizes or any(v.ndim != 1 or v.size == 0 or np.ptp(v) > 0 for v in sizes.values()):
        return None
    return _build_part(spec, {**pv, **{k: float(v[0]) for k, v in sizes.items()}}, None).name


def _point_part_names(g, line):
    """Per part, the name of each sweep point's own part: shape (parts, points).

    The engine names a part built from a whole sweep by its range or largest size; a row
    of the table names the part as built for that point alone (once per distinct size).
    Parts with a label, or whose size is not swept within the group, keep the line's name.
    """
    n = len(g.indices)
    names = np.empty((len(line.parts), n), dtype=object)
    for j, (spec, pv) in enumerate(zip(g.scenario.parts, g.parts, strict=True)):
        names[j, :] = line.parts[j].name
        swept = [
            k
            for k in _SIZE_FIELDS
            if isinstance(pv.get(k), np.ndarray) and pv[k].shape == (n,) and np.ptp(pv[k]) > 0
        ]
        if spec.name != spec.type or not swept:
            continue
        by_size = {}
        for col in range(n):
            by_size.setdefault(tuple(float(pv[k][col]) for k in swept), []).append(col)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # noted already for the whole group
            for cols in by_size.values():
                names[j, cols] = _build_part(spec, _point_group(g, cols[0]).parts[j], None).name
    for col in range(n):  # repeats as the engine marks them: "name #2"
        seen = {}
        for j in range(len(line.parts)):
            seen[names[j, col]] = seen.get(names[j, col], 0) + 1
            if seen[names[j, col]] > 1:
                names[j, col] = f"{names[j, col]} #{seen[names[j, col]]}"
    return names


def _site_context(group, parts, source):
    """Catheter-to-vein context (rheoline.model.vessels) when the scenario gives a vein."""
    if "vein_diameter" not in group.values:
        return None
    from rheoline.model.vessels import infusion_site_context

    outlet = [p for p in parts if getattr(p, "outer_diameter", None) is not None]
    if not outlet:
        raise ScenarioError(
            "needs a catheter, needle or cannula (a part with an outer diameter) in the line",
            source=source,
            scenario=repr(group.scenario.name),
            field="vein_diameter",
        )
    try:
        return infusion_site_context(
            outlet[-1].outer_diameter,
            group.values["vein_diameter"],
            vein_pressure=group.values.get("back_pressure", 0.0),
            warn=False,
        )
    except RheolineError as exc:
        raise ScenarioError(
            str(exc), source=source, scenario=repr(group.scenario.name), field="vein_diameter"
        ) from None


def check_scenarios(sset: ScenarioSet) -> None:
    """Check what only the model knows (fluid names and options, part geometry).

    Builds every fluid and part of every sweep group (cheap; nothing is solved) and turns
    a model error into a :class:`ScenarioError` naming the file, scenario and field.
    """
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for sc in sset.scenarios:
            for g in _groups(sc):
                _build_fluid(g, sset.source)
                _site_context(g, _build_parts(g, sset.source), sset.source)


# --------------------------------------------------------------------------- the run
def run_scenarios(sset: ScenarioSet, progress=None) -> RunResult:
    """Solve every scenario and sweep point of ``sset``.

    Parameters
    ----------
    sset : ScenarioSet
        From :func:`~rheoline.scenario.files.load_scenarios` or ``parse_scenarios``.
    progress : callable, optional
        ``progress(total)`` returning an object with ``update(n)`` and ``close()`` (a tqdm
        bar); called with the number of cases.

    Returns
    -------
    RunResult

    Examples
    --------
    >>> from rheoline.scenario.files import example_path, load_scenarios
    >>> run = run_scenarios(load_scenarios(example_path("minimal")))
    >>> list(run.table["case"])
    ['18G on a gravity set']
    >>> bool(run.table["flow [mL/min]"].iloc[0] > 0)
    True
    """
    import pandas as pd

    rows, part_rows, notes = [], [], []
    bar = progress(sset.n_points) if progress else None
    try:
        for sc in sset.scenarios:
            sc_rows, sc_parts, sc_notes = {}, {}, []
            for g in _groups(sc):
                case_rows, case_parts, g_notes = _solve_group(g, sset.source)
                for i, r, pr in zip(g.indices, case_rows, case_parts, strict=True):
                    sc_rows[i], sc_parts[i] = r, pr
                sc_notes += g_notes
                if bar is not None:
                    bar.update(len(g.indices))
            notes += [f"{sc.name}: {n}" for n in _condense(sc_notes)]
            for i in sorted(sc_rows):
                rows.append(sc_rows[i])
                part_rows += sc_parts[i]
    finally:
        if bar is not None:
            bar.close()
    table = pd.DataFrame(rows, columns=_COLUMNS)
    parts = pd.DataFrame([r[:-1] for r in part_rows], columns=_PART_COLUMNS)
    return RunResult(
        sset,
        table,
        parts,
        _inputs_table(sset),
        _assumptions_table(sset),
        tuple(dict.fromkeys(notes)),
        part_keys=tuple(r[-1] for r in part_rows),
    )


_COLUMNS = [
    "case",
    "scenario",
    "point",
    "fluid",
    "temperature [degC]",
    "drive",
    "gauge",
    "smallest bore [mm]",
    "head [cm]",
    "source pressure [mmHg]",
    "back pressure [mmHg]",
    "flow [mL/min]",
    "flow [mL/h]",
    "required pressure [mmHg]",
    "pressure limit [mmHg]",
    "over pressure limit",
    "max Reynolds number",
    "regime",
    "dominant part",
    "dominant share [%]",
    "max wall shear stress [Pa]",
    "hemolysis index [%]",
    "hemolysis concern",
    "flow p5 [mL/min]",
    "flow p95 [mL/min]",
    "pressure p5 [mmHg]",
    "pressure p95 [mmHg]",
    "dominant tolerance",
    "time to deliver [min]",
    "catheter-to-vein ratio [-]",
    "flags",
]
_PART_COLUMNS = [
    "case",
    "part",
    "kind",
    "inner diameter [mm]",
    "length [m]",
    "reynolds",
    "regime",
    "pressure drop [Pa]",
    "pressure drop [mmHg]",
    "share [%]",
    "mean velocity [m/s]",
    "wall shear stress [Pa]",
    "wall shear rate [1/s]",
    "entrance length [m]",
]


def _vec(x, n):
    return np.broadcast_to(np.asarray(x), (n,))


def _solve_group(g, source):
    from rheoline.model.line import Line

    sc = g.scenario
    n = len(g.indices)
    from rheoline.errors import RangeWarning, RheolineWarning
    from rheoline.model.hemolysis import GIERSIEPEN_1990_MAX_STRESS

    band_range = np.zeros(n, dtype=bool)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        fl = _build_fluid(g, source)
        from_fluid = len(caught)
        parts = _build_parts(g, source)
        line = Line(parts)
        v = g.values
        back = v.get("back_pressure", 0.0)
        if sc.mode == "flow":
            res = line.solve(fl, flow=v["flow"], back_pressure=back)
        else:
            res = line.solve(
                fl,
                head=v.get("head", 0.0),
                source_pressure=v.get("source_pressure", 0.0),
                back_pressure=back,
            )
        before_band = len(caught)
        band = None
        if _has_tolerance(sc):
            *band, band_range = _tolerance_band(sc, g, fl, line, res)
        after_band = len(caught)
        deliver = _delivery_minutes(sc, g, fl, line, res)
        site = _site_context(g, parts, source)

    def ranged(ws):
        return any(issubclass(w.category, RangeWarning) for w in ws)

    # which points rest on a correlation outside its range: the fluid's models per point,
    # the tolerance band per case; a range note from anywhere else marks the whole group
    range_note = band_range.copy()
    if ranged(caught[:from_fluid]):
        range_note |= _fluid_range_mask(g, source)
    if ranged(caught[from_fluid:before_band]) or ranged(caught[after_band:]):
        range_note[:] = True

    notes = [str(w.message) for w in caught if issubclass(w.category, RheolineWarning)]
    notes += list(getattr(res, "flags", ()) or ())
    flow = _vec(res.flow, n)
    if sc.mode == "flow":
        req = _vec(res.required_pressure, n)
    else:  # the given source pressure (the engine's value agrees to rounding)
        req = _vec(v.get("source_pressure", 0.0), n)
    max_re = _vec(res.max_reynolds, n)
    regime = _vec(res.regime, n)
    point_names = _point_part_names(g, line)
    dom = [
        point_names[line.part_names.index(str(d)), col]
        for col, d in enumerate(_vec(res.dominant_part, n))
    ]
    share = _vec(res.dominant_share, n)
    wss = _vec(res.max_wall_shear_stress, n)
    hemo = _vec(res.hemolysis_index, n)
    p_dp = np.broadcast_to(np.asarray(res.part_pressure_drops), (len(parts), n))
    p_re = np.broadcast_to(np.asarray(res.part_reynolds), (len(parts), n))
    p_u = np.broadcast_to(np.asarray(res.part_mean_velocity), (len(parts), n))
    p_tau = np.broadcast_to(np.asarray(res.part_wall_shear_stress), (len(parts), n))
    p_rate = np.broadcast_to(np.asarray(res.part_wall_shear_rate), (len(parts), n))
    p_le = np.broadcast_to(np.asarray(res.part_entrance_length, dtype=float), (len(parts), n))
    exit_dp = _vec(res.exit_pressure_drop, n)
    limit = v.get("pressure_limit")
    is_blood = bool(fl.is_blood)
    budget = p_dp.sum(axis=0) + exit_dp
    rows, part_rows = [], []
    converged = _vec(getattr(res, "converged", True), n)
    # per-point columns as Python lists, built once (the loop below only picks values)
    n_p = len(parts)
    part_regime = _regimes(p_re).tolist()
    lumen_rows = [j for j, part in enumerate(parts) if part.kind == "lumen"]
    part_kind = [getattr(part, "kind", "part") for part in parts]
    diam = [
        None
        if getattr(p, "inner_diameter", None) is None
        else _vec(p.inner_diameter, n).astype(float)
        for p in parts
    ]
    lengths = [
        None if getattr(p, "length", None) is None else _vec(p.length, n).astype(float)
        for p in parts
    ]
    nan_col = [np.nan] * n
    diam_mm = [nan_col if d is None else (d * 1e3).tolist() for d in diam]
    length_m = [nan_col if x is None else x.tolist() for x in lengths]
    bores = [d for d in diam if d is not None]
    smallest_mm = (np.min(bores, axis=0) * 1e3).tolist() if bores else nan_col
    with np.errstate(divide="ignore", invalid="ignore"):
        part_share = np.where(budget > 0, p_dp / budget * 100, np.nan).tolist()
        exit_share = np.where(budget > 0, exit_dp / budget * 100, np.nan).tolist()
    p_re_l, p_dp_l = p_re.astype(float).tolist(), p_dp.astype(float).tolist()
    p_dp_mmhg = (p_dp / MMHG).tolist()
    p_u_l, p_tau_l = p_u.astype(float).tolist(), p_tau.astype(float).tolist()
    p_rate_l, p_le_l = p_rate.astype(float).tolist(), p_le.astype(float).tolist()
    exit_l, exit_mmhg = exit_dp.astype(float).tolist(), (exit_dp / MMHG).tolist()
    names_l = point_names.tolist()
    hemo_extrapolated = (
        np.any(p_tau > GIERSIEPEN_1990_MAX_STRESS, axis=0).tolist()
        if is_blood and n_p
        else [False] * n
    )
    temperature_l = _vec(v["temperature"], n).astype(float).tolist()
    head_cm = (_vec(v["head"], n) * 100).tolist() if "head" in v else nan_col
    source_mmhg = (
        (_vec(v["source_pressure"], n) / MMHG).tolist() if "source_pressure" in v else nan_col
    )
    back_mmhg = (_vec(back, n) / MMHG).tolist()
    limit_l = _vec(limit, n).astype(float).tolist() if limit is not None else None
    drive = (
        "pump"
        if sc.mode == "flow"
        else (
            "pressure" if "source_pressure" in v and np.any(v["source_pressure"] > 0) else "gravity"
        )
    )
    gauges = [spec for spec in g.parts if "gauge" in spec]
    gauge = int(gauges[-1]["gauge"]) if gauges else None
    ratio_l = _vec(site.diameter_ratio, n).astype(float).tolist() if site is not None else nan_col
    large_l = _vec(site.large_ratio, n).tolist() if site is not None else [False] * n
    for col in range(n):
        case = sc.name + (f" | {g.labels[col]}" if g.labels[col] else "")
        flags = []
        for r in ("turbulent", "transitional"):
            where = [names_l[j][col] for j in lumen_rows if part_regime[j][col] == r]
            if where:
                flags.append(f"{r}: {', '.join(where)}")
        over = None
        lim = None
        if limit_l is not None:
            lim = limit_l[col]
            over = bool(req[col] > lim)
            if over:
                flags.append("over pressure limit")
        concern = bool(is_blood and wss[col] > HEMOLYSIS_CONCERN_STRESS)
        if concern:
            flags.append("hemolysis concern")
        if hemo_extrapolated[col]:
            flags.append("hemolysis index extrapolated")
        if not flow[col] > 0:
            flags.append("no forward flow")
        if deliver is not None and np.isinf(deliver[col]):
            flags.append(
                "never delivers the whole volume: the flow stops first (the drive "
                "falls to the back pressure)"
            )
        elif deliver is not None and np.isnan(deliver[col]):
            flags.append("time to deliver not computed")
        if not converged[col]:
            flags.append("solver not converged")
        ratio = ratio_l[col]
        if large_l[col]:
            flags.append(f"catheter fills {ratio:.0%} of the vein diameter")
        if range_note[col]:
            flags.append("outside a correlation's range (see notes)")
        rows.append(
            [
                case,
                sc.name,
                g.labels[col],
                v["fluid"],
                temperature_l[col],
                drive,
                gauge,
                smallest_mm[col],
                head_cm[col],
                source_mmhg[col],
                back_mmhg[col],
                float(flow[col]) / ML_PER_MIN,
                float(flow[col]) / ML_PER_H,
                float(req[col]) / MMHG + 0.0,
                lim / MMHG if lim is not None else np.nan,
                over,
                float(max_re[col]),
                str(regime[col]),
                str(dom[col]),
                float(share[col]) * 100,
                float(wss[col]),
                float(hemo[col]) if is_blood else np.nan,
                concern,
                band[0][col] if band and sc.mode == "drive" else np.nan,
                band[1][col] if band and sc.mode == "drive" else np.nan,
                band[0][col] if band and sc.mode == "flow" else np.nan,
                band[1][col] if band and sc.mode == "flow" else np.nan,
                band[2][col] if band else "",
                deliver[col] if deliver is not None else np.nan,
                ratio,
                "; ".join(flags),
            ]
        )
        for j in range(n_p):
            part_rows.append(
                [
                    case,
                    names_l[j][col],
                    part_kind[j],
                    diam_mm[j][col],
                    length_m[j][col],
                    p_re_l[j][col],
                    part_regime[j][col],
                    p_dp_l[j][col],
                    p_dp_mmhg[j][col],
                    part_share[j][col],
                    p_u_l[j][col],
                    p_tau_l[j][col],
                    p_rate_l[j][col],
                    p_le_l[j][col],
                    line.part_names[j],  # the part's key (not a column)
                ]
            )
        part_rows.append(
            [
                case,
                "exit",
                "exit",
                np.nan,
                np.nan,
                np.nan,
                "",
                exit_l[col],
                exit_mmhg[col],
                exit_share[col],
                np.nan,
                np.nan,
                np.nan,
                np.nan,
                "exit",
            ]
        )
    per_case_rows = [rows[c] for c in range(n)]
    per_case_parts = [
        part_rows[c * (len(parts) + 1) : (c + 1) * (len(parts) + 1)] for c in range(n)
    ]
    return per_case_rows, per_case_parts, notes


def _condense(notes):
    """Shorter notes: regime notes are in each row's flags, and one message about several
    parts ("14G catheter: ...", "16G catheter: ...") becomes one line naming the parts."""
    by_message = {}
    for m in notes:
        m = re.sub(r" in \d+ of \d+ scenarios", "", m)
        if re.search(r": (turbulent|transitional) flow \(", m):
            continue
        part, sep, message = m.partition(": ")
        key = message if sep else m
        by_message.setdefault(key, []).append(part if sep else None)
    out = []
    for message, parts in by_message.items():
        named = [p for p in dict.fromkeys(parts) if p is not None]
        if len(named) > 1:
            out.append(f"{', '.join(named)}: {message}")
        elif named:
            out.append(f"{named[0]}: {message}")
        else:
            out.append(message)
    return out


def _regimes(reynolds):
    """The regime of each Reynolds number; "" where none applies (K fittings, measured
    parts: no Reynolds number)."""
    from rheoline.model.lumen import regime_of

    re = np.asarray(reynolds, dtype=float)
    finite = np.isfinite(re)
    return np.where(finite, regime_of(np.where(finite, re, 0.0)), "").astype(object)


def _has_tolerance(sc):
    return sc.has_tolerance


def _tolerance_band(sc, g, fl, line, res):
    """p5 and p95 per case of the flow [mL/min] (drive mode) or the required pressure [mmHg]
    (flow mode), and the input that dominates the spread, from the line engine's seeded
    Monte Carlo (:func:`rheoline.model.tolerance.flow_tolerance`, one vectorized solve of
    all samples per case).  Each tolerance is a half-width (uniform spread unless the file
    says ``distribution = "normal"``); an absolute bore or length tolerance is turned into a
    relative one at the case's nominal value.  The fourth array says, per case, whether a
    model was used outside its range while sampling (its warnings are passed on).
    """
    from rheoline.errors import RangeWarning

    n = len(g.indices)
    tol = sc.tolerance or ToleranceSpec()
    lo, hi, top = np.full(n, np.nan), np.full(n, np.nan), [""] * n
    outside = np.zeros(n, dtype=bool)
    for col in range(n):
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            lo[col], hi[col], top[col] = _tolerance_case(sc, g, col, tol)
        outside[col] = any(issubclass(w.category, RangeWarning) for w in caught)
        for w in caught:  # on to the caller's notes
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
    return lo, hi, top, outside


def _tolerance_case(sc, g, col, tol):
    """p5, p95 and the dominant input of the tolerance band of sweep point ``col``."""
    from rheoline.model.fluids import fluid as make_fluid
    from rheoline.model.line import Line
    from rheoline.model.tolerance import flow_tolerance

    one = _point_group(g, col)
    opts = {k: one.values[k] for k in ("mass_fraction",) if k in one.values}
    case_fluid = _build_fluid(one, "")
    case_line = Line(_build_parts(one, ""))
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
        fluid_builder=lambda opts=opts, **kw: make_fluid(g.values["fluid"], **opts, **kw),
        n_samples=sc.n_samples,
        seed=int(tol.get("seed", 0)),
        distribution=tol.get("distribution", "uniform"),
        percentiles=(5.0, 95.0),
    )
    scale = MMHG if sc.mode == "flow" else ML_PER_MIN
    return (band.percentiles[5.0] / scale, band.percentiles[95.0] / scale, band.dominant_input)


def _delivery_minutes(sc, g, fl, line, res):
    """Time [min] to deliver the scenario's volume, per case; None without a volume."""
    if "volume" not in g.values:
        return None
    n = len(g.indices)
    v = g.values
    volume = _vec(v["volume"], n)
    if sc.mode == "flow" or not any(
        k in v for k in ("head_when_empty", "pressure_time_constant", "source_pressure_when_empty")
    ):
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


# --------------------------------------------------------------------------- tables
def _text_of(value):
    if isinstance(value, dict):
        return "{" + ", ".join(f"{k} = {_text_of(v)}" for k, v in value.items()) + "}"
    if isinstance(value, list):
        return "[" + ", ".join(_text_of(v) for v in value) + "]"
    return str(value)


def _inputs_table(sset):
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


def _assumptions_table(sset):
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


def fluid_table():
    """The fluid library as a table (``rheoline fluids``)."""
    import pandas as pd

    from rheoline.model.fluids import fluid_catalogue

    rows = []
    for e in fluid_catalogue():
        opts = ", ".join(e["options"]) or "-"
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
    for g, (od, d_reg, d_thin) in cat.NEEDLE_GAUGES.items():
        rows.append(
            [
                "needle",
                f"{g}G regular",
                od * 1e3,
                d_reg * 1e3,
                38.0,
                "ISO 9626 minimum bore, from memory",
            ]
        )
        rows.append(
            [
                "needle",
                f"{g}G thin",
                od * 1e3,
                d_thin * 1e3,
                38.0,
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
            import difflib

            near = difflib.get_close_matches(kind, kinds, n=1)
            hint = f"; did you mean '{near[0]}'?" if near else ""
            raise ScenarioError(
                f"no catalogue '{kind}'{hint} Catalogues: {', '.join(kinds)}", field="--kind"
            )
        frame = frame[frame["catalogue"] == kind].reset_index(drop=True)
    return frame


# --------------------------------------------------------------------------- questions
def filter_cases(table, **conditions):
    """Rows whose columns equal the given values (floats within 1e-9 relative).

    Column names with spaces and units are passed through a dict:
    ``filter_cases(t, **{"head [cm]": 100, "fluid": "saline-0.9"})``.
    """
    mask = np.ones(len(table), dtype=bool)
    for col, value in conditions.items():
        _check_column(table, col)
        if isinstance(value, float | int) and not isinstance(value, bool):
            mask &= np.isclose(table[col].astype(float), value, rtol=1e-9, atol=0.0)
        else:
            mask &= (table[col] == value).to_numpy()
    return table[mask]


def _check_column(table, col):
    if col not in table.columns:
        import difflib

        near = difflib.get_close_matches(col, list(table.columns), n=1)
        hint = f"; did you mean '{near[0]}'?" if near else ""
        raise ScenarioError(f"no column '{col}'{hint}", field=col)


def rank(table, by="flow [mL/min]", ascending=False):
    """The table sorted by one column (highest flow first by default)."""
    _check_column(table, by)
    return table.sort_values(by, ascending=ascending, kind="stable").reset_index(drop=True)


def smallest_reaching(table, flow_ml_min, by="smallest bore [mm]", **conditions):
    """The case with the smallest ``by`` that still reaches ``flow_ml_min``.

    Example: the smallest catheter reaching 100 mL/min at 1 m head:
    ``smallest_reaching(run.table, 100, **{"head [cm]": 100, "fluid": "saline-0.9"})``.
    Returns a one-row DataFrame, empty when no case reaches the flow.
    """
    cand = filter_cases(table, **conditions)
    cand = cand[cand["flow [mL/min]"] >= flow_ml_min]
    return cand.sort_values([by, "flow [mL/min]"], kind="stable").head(1)
