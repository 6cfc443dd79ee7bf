"""The scenario run: named steps from the scenario description to the comparison tables.

:func:`run_scenarios` solves every scenario and sweep point of a
:class:`~rheoline.scenario.description.ScenarioSet` and returns a :class:`RunResult`.
Sweep points that share their fluid and catalogue sizes are solved together, one
vectorized call of the line engine per :class:`~rheoline.scenario.build.Group`, in these
steps, each adding named columns of the table (:data:`TABLE_COLUMNS`, one row per case)
read from the step's result:

``fluid``, ``line`` (build, :mod:`rheoline.scenario.build`)
    ``case``, ``scenario``, ``point``, ``fluid``, ``temperature [degC]``, ``drive``,
    ``gauge``, ``smallest bore [mm]``, ``head [cm]``, ``source pressure [mmHg]``,
    ``back pressure [mmHg]``.
``solve`` (:meth:`rheoline.model.line.Line.solve`)
    ``flow [mL/min]``, ``flow [mL/h]``, ``required pressure [mmHg]`` (the source pressure
    above the gravity head), ``pressure limit [mmHg]``, ``over pressure limit``, ``max
    Reynolds number``, ``regime`` (the worst part), ``transition zone`` (a lumen at Re
    1800-4000, where a warmer or thinner fluid can flow less), ``dominant part`` and ``dominant share
    [%]`` of the pressure budget, ``max wall shear stress [Pa]``, ``hemolysis index [%]``
    (Giersiepen 1990, blood fluids only), ``hemolysis concern``; and the parts table.
``tolerance`` (:func:`rheoline.model.tolerance.flow_tolerance`, where tolerances are given)
    ``flow p5 [mL/min]`` / ``flow p95 [mL/min]`` (a pump: ``pressure p5/p95 [mmHg]``) and
    the ``dominant tolerance``.
``model_band`` (:func:`rheoline.scenario.model_band.band_columns`, unless the file says
``model_band = false``)
    ``flow model low [mL/min]`` / ``flow model high [mL/min]`` (a pump: ``pressure model
    low/high [mmHg]``): the answer across the defensible model choices, and the ``model band
    driver``, the choice that moves it most.
``delivery`` (:mod:`rheoline.model.delivery`, where a volume is given)
    ``time to deliver [min]``.
``site`` (:func:`rheoline.model.vessels.infusion_site_context`, where a vein is given)
    ``catheter-to-vein ratio [-]``.
``transient`` (:func:`rheoline.model.transient.simulate_infusion`, where the scenario asks
    for the time solve: :mod:`rheoline.scenario.transient_step`)
    ``internal volume [mL]`` (every case), ``start-up time [min]``, ``rate change t50
    [min]``, ``rate change t90 [min]``, ``time to alarm [min]``, ``bolus [mL]``, ``drug
    delay t50 [min]``, ``drug delay t90 [min]``, ``port dead volume [mL]``; and the time
    series of each case.

Each step also reads boolean conditions per case from its result (the line's
``conditions`` and ``part_conditions``, keys of :data:`rheoline.model.conditions.CONDITIONS`;
the tolerance band's and the delivery's ``outside_range``); the ``flags`` column is
rendered from them in one place (:data:`FLAG_WORDS`), and the notes name the conditions
the flags do not (:func:`rheoline.scenario.steps.scenario_notes`).  ``models_used`` is the
union of the results' ``models_used`` in first-use order.  ``case`` is unique within a
run (a repeated label gets " #2").

Examples
--------
>>> from rheoline.scenario.reading import example_path, load_scenarios
>>> run = run_scenarios(load_scenarios(example_path("minimal")))
>>> list(run.table["case"])
['18G on a gravity set']
>>> bool(run.table["flow [mL/min]"].iloc[0] > 0), run.parts["part"].tolist()
(True, ['administration set', '18G catheter', 'exit'])
"""

from __future__ import annotations

import datetime as _dt
import warnings
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np

from rheoline.errors import (
    RangeWarning,
    RegimeWarning,
    RheolineError,
    RheolineWarning,
    ScenarioError,
)
from rheoline.model.provenance import merge_models
from rheoline.scenario.build import (
    build_fluid,
    build_parts,
    groups,
    point_part_names,
    site_context,
)
from rheoline.scenario.description import ScenarioSet
from rheoline.scenario.model_band import band_columns
from rheoline.scenario.run_columns import FLAG_WORDS, PART_COLUMNS, TABLE_COLUMNS, render_flags
from rheoline.scenario.steps import (
    HEMOLYSIS_CONCERN_STRESS,
    delivery_minutes,
    part_rows,
    scenario_notes,
    tolerance_band,
)
from rheoline.scenario.tables import inputs_table
from rheoline.scenario.transient_step import (
    not_computed_table,
    time_series_table,
    transient_step,
)
from rheoline.units import ML_PER_H, ML_PER_MIN, MMHG

if TYPE_CHECKING:  # pandas is imported where a table is built, not with this module
    import pandas

__all__ = [
    "HEMOLYSIS_CONCERN_STRESS",
    "TABLE_COLUMNS",
    "PART_COLUMNS",
    "FLAG_WORDS",
    "render_flags",
    "Note",
    "RunResult",
    "run_scenarios",
]

#: The models behind the site step's catheter-to-vein ratio (provenance keys).
SITE_MODELS = ("catheter-vein-ratio",)
#: The unit conversions of every table (mmHg, mL/min, cmH2O): provenance keys.
UNIT_MODELS = ("nist-sp811",)


@dataclass(frozen=True)
class Note:
    """A note of a run: which scenario (and case, where one), what it is about (a
    condition or model key, or the warning's kind), and its words (rendered from data)."""

    scenario: str
    case: str | None
    key: str
    text: str

    def __str__(self):
        return f"{self.scenario}: {self.text}" if self.scenario else self.text


@dataclass(frozen=True)
class RunResult:
    """A solved scenario set.

    Attributes
    ----------
    scenario_set : ScenarioSet
        The description that was run.
    table : pandas.DataFrame
        One row per case (:data:`TABLE_COLUMNS`; units in the column names); ``case`` is
        unique.
    parts : pandas.DataFrame
        One row per case and part, and the outlet (:data:`PART_COLUMNS`): pressure drops,
        Reynolds numbers and wall shear stresses.
    inputs : pandas.DataFrame
        The description echoed, one row per field: ``scenario``, ``field`` (a dotted path)
        and ``value as written``.
    models_used : tuple of str
        Provenance keys of the models the run's results used, in first-use order.
    notes : tuple of Note
        What the run noticed: models outside their ranges, validity notes of the lines.
    flags : Mapping[str, tuple of str]
        Per case, its flags (the words of the table's ``flags`` column, which joins them
        with "; ").
    part_keys : tuple of str
        Per row of ``parts``, the part's name in its line (the same for every point of a
        sweep), where ``parts["part"]`` names each point's own size; the pack's charts
        group on it.
    branches : pandas.DataFrame or None
        One row per branched case and branch (:data:`rheoline.scenario.network_run.
        BRANCH_COLUMNS`): flow, direction, whether reversed or held by a check valve, the
        drop, Reynolds number and wall shear; empty when no scenario is branched.
    nodes : pandas.DataFrame or None
        One row per branched case and node (:data:`rheoline.scenario.network_run.
        NODE_COLUMNS`): pressure, the flow it feeds in (negative: takes out), pump limits.
    time_series : pandas.DataFrame or None
        The time series of every case with the time solve
        (:func:`rheoline.scenario.transient_step.time_series_table`); empty when none.
    not_computed : Mapping[str, Mapping[str, str]]
        Per case, why each of its empty time-solve values is empty (JSON record key ->
        words of :data:`rheoline.scenario.transient_step.NULL_REASONS`).
    created : datetime.datetime
        When the run was made (UTC).
    """

    scenario_set: ScenarioSet
    table: pandas.DataFrame
    parts: pandas.DataFrame
    inputs: pandas.DataFrame
    models_used: tuple[str, ...] = ()
    notes: tuple[Note, ...] = ()
    flags: Mapping[str, tuple[str, ...]] = field(default_factory=dict)
    part_keys: tuple[str, ...] = ()
    branches: pandas.DataFrame | None = None
    nodes: pandas.DataFrame | None = None
    time_series: pandas.DataFrame | None = None
    not_computed: Mapping[str, Mapping[str, str]] = field(default_factory=dict)
    created: _dt.datetime = field(default_factory=lambda: _dt.datetime.now(_dt.UTC))

    @property
    def warnings(self):
        """The notes as text, each with its scenario's name (``"gravity: ..."``)."""
        return tuple(dict.fromkeys(str(n) for n in self.notes))

    def summary(self, flow_unit: str = "mL/min"):
        """The columns printed by ``rheoline run``, flows in ``flow_unit`` (mL/min, mL/h,
        L/min or mL/s).

        ``source pressure [mmHg]`` is the given bag or infuser pressure for a drive, and the
        pressure the pump must supply (above the gravity head) for a prescribed flow.
        """
        from rheoline.scenario.tables import summary

        return summary(self.table, flow_unit)

    def records(self):
        """The table as JSON-ready dicts, one per case, with the parts of each line (see
        :func:`rheoline.scenario.tables.records`)."""
        from rheoline.scenario.tables import records

        return records(
            self.table, self.parts, self.flags, self.branches, self.nodes, self.not_computed
        )

    def records_json(self):
        """The text of ``json.dumps(self.records(), allow_nan=False)``, put together by
        columns (see :func:`rheoline.scenario.tables.records_json_pieces`)."""
        return "".join(self.records_json_pieces())

    def records_json_pieces(self):
        """:meth:`records_json` in pieces of some thousands of records (their
        concatenation is that text), for a writer that need not hold it whole."""
        from rheoline.scenario.tables import records_json_pieces

        return records_json_pieces(
            self.table, self.parts, self.flags, self.branches, self.nodes, self.not_computed
        )


# --------------------------------------------------------------------------- the run
def run_scenarios(sset: ScenarioSet, progress=None) -> RunResult:
    """Solve every scenario and sweep point of ``sset``.

    Parameters
    ----------
    sset : ScenarioSet
        From :func:`~rheoline.scenario.reading.load_scenarios` or ``parse_scenarios``.
    progress : callable, optional
        ``progress(total)`` returning an object with ``update(n)`` and ``close()`` (a tqdm
        bar); called with the number of cases.

    Returns
    -------
    RunResult
    """
    import pandas as pd

    from rheoline.scenario.network_run import run_network_scenario

    cases, notes, models, every_run = [], [], (), []
    bar = progress(sset.n_points) if progress else None
    try:
        for sc in sset.scenarios:
            if sc.topology is not None:  # a branched line: rheoline.scenario.network_run
                runs = run_network_scenario(sc, sset.source)
            else:
                runs = [_GroupRun(g, sset.source).run() for g in groups(sc)]
            if bar is not None:
                bar.update(sc.n_points)
            cases += sorted((c for r in runs for c in r.cases()), key=lambda c: c[0])
            views = runs if sc.topology is None else [v for r in runs for v in r.note_views()]
            notes += [Note(sc.name, None, key, text) for key, text in scenario_notes(views)]
            if sc.topology is None:  # the time solve is a line's
                every_run += runs
            models = merge_models(models, *(r.models_used for r in runs))
    finally:
        if bar is not None:
            bar.close()
    keys = _unique([c[1][0] for c in cases])
    table = [[key, *c[1][1:]] for key, c in zip(keys, cases, strict=True)]
    part_table = [[key, *p[1:]] for key, c in zip(keys, cases, strict=True) for p in c[2]]
    branches, nodes = _network_tables(keys, [c[4] for c in cases])
    return RunResult(
        sset,
        pd.DataFrame(table, columns=TABLE_COLUMNS),
        pd.DataFrame([r[:-1] for r in part_table], columns=PART_COLUMNS),
        inputs_table(sset),
        models_used=merge_models(models, UNIT_MODELS),
        notes=tuple(dict.fromkeys(notes)),
        flags={key: c[3] for key, c in zip(keys, cases, strict=True)},
        part_keys=tuple(r[-1] for r in part_table),
        time_series=time_series_table(every_run, cases, keys),
        not_computed=not_computed_table(every_run, cases, keys),
        branches=branches,
        nodes=nodes,
    )


def _network_tables(keys, extras):
    """The branches and nodes tables of the branched cases (empty tables when none)."""
    import pandas as pd

    from rheoline.scenario.network_run import BRANCH_COLUMNS, NODE_COLUMNS

    rows = {"branches": [], "nodes": []}
    for key, extra in zip(keys, extras, strict=True):
        if extra is not None:
            rows["branches"] += [[key, *r[1:]] for r in extra[0]]
            rows["nodes"] += [[key, *r[1:]] for r in extra[1]]
    return (
        pd.DataFrame(rows["branches"], columns=BRANCH_COLUMNS),
        pd.DataFrame(rows["nodes"], columns=NODE_COLUMNS),
    )


def _unique(names):
    """``names`` with every repeat marked " #2", " #3" (a case key is unique in a run)."""
    taken, used, out = set(names), set(), []
    for name in names:
        key, k = name, 2
        while key in used:
            key = f"{name} #{k}"
            k += 1
            if key in taken:
                key = name  # a name of another case: try the next number
        used.add(key)
        out.append(key)
    return out


def _vec(x, n):
    return np.broadcast_to(np.asarray(x), (n,))


def _warning_key(message):
    """What a warning is about: its model's provenance key where it names one."""
    model = getattr(message, "model", None)
    if model:
        return model
    if isinstance(message, RangeWarning):
        return "outside_range"
    return "regime" if isinstance(message, RegimeWarning) else "warning"


class _GroupRun:
    """The named steps of one group's run; each fills named columns from its result.

    ``columns`` maps a table column to a list over the group's points, ``conditions`` a
    flag key (:data:`FLAG_WORDS`) to a boolean array over them; ``notes`` collects
    ``(key, text)`` in the order the steps noticed them.
    """

    def __init__(self, g, source):
        self.g, self.source, self.n = g, source, g.size
        self.mode = g.scenario.mode
        self.columns, self.conditions, self.notes = {}, {}, []
        self.models_used = ()
        self.fluid = self.parts = self.line = self.res = None

    def run(self):
        for step in (self.build_fluid, self.build_line, self.solve):
            self._step(step)
        for step in (self.tolerance, self.model_band, self.delivery, self.site, self.transient):
            self._step(step)
        return self

    def _step(self, step):
        """Run ``step``; the warnings it raises become notes (the model's own words).  A
        model error becomes a ScenarioError naming the file, the scenario and the field."""
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            try:
                step()
            except ScenarioError:
                raise
            except RheolineError as exc:
                raise ScenarioError(
                    str(exc),
                    source=self.source,
                    scenario=repr(self.g.scenario.name),
                    field=self._file_field(step.__name__, getattr(exc, "field", None)),
                    value=getattr(exc, "value", None),
                ) from None
        said = [w.message for w in caught if isinstance(w.message, RheolineWarning)]
        self.notes += [(_warning_key(m), str(m)) for m in said]

    def _file_field(self, step, model_field):
        """The file's field of a model argument a step's error names (``err.field``)."""
        if model_field in _MODEL_TO_FILE:
            return _MODEL_TO_FILE[model_field]
        if model_field in self.g.values:
            return model_field
        if step == "solve":
            return "flow" if self.mode == "flow" else "head"
        return _STEP_FIELD.get(step, step)

    # ----------------------------------------------------------------------- build
    def build_fluid(self):
        self.fluid = build_fluid(self.g, self.source)
        c, v, n = self.columns, self.g.values, self.n
        c["fluid"] = [v["fluid"]] * n
        c["temperature [degC]"] = _vec(v["temperature"], n).astype(float).tolist()

    def build_line(self):
        from rheoline.model.line import Line

        g, v, n = self.g, self.g.values, self.n
        self.parts = build_parts(g, self.source)
        self.line = Line(self.parts)
        c = self.columns
        c["case"] = [g.scenario.name + (f" | {label}" if label else "") for label in g.labels]
        c["scenario"], c["point"] = [g.scenario.name] * n, list(g.labels)
        pump = self.mode == "flow"
        pressed = "source_pressure" in v and np.any(v["source_pressure"] > 0)
        c["drive"] = ["pump" if pump else ("pressure" if pressed else "gravity")] * n
        gauges = [pv["gauge"] for pv in g.parts if "gauge" in pv]
        c["gauge"] = [int(gauges[-1]) if gauges else None] * n
        bores = [
            _vec(p.inner_diameter, n).astype(float) for p in self.parts if _has(p, "inner_diameter")
        ]
        c["smallest bore [mm]"] = (np.min(bores, axis=0) * 1e3).tolist() if bores else _nan(n)
        c["head [cm]"] = (_vec(v["head"], n) * 100).tolist() if "head" in v else _nan(n)
        c["source pressure [mmHg]"] = (
            (_vec(v["source_pressure"], n) / MMHG).tolist() if "source_pressure" in v else _nan(n)
        )
        c["back pressure [mmHg]"] = (_vec(v.get("back_pressure", 0.0), n) / MMHG).tolist()
        c["reversed flow [mL/min]"], c["reversed branch"] = _nan(n), [""] * n  # branched only

    # ----------------------------------------------------------------------- solve
    def solve(self):
        v, n = self.g.values, self.n
        back = v.get("back_pressure", 0.0)
        if self.mode == "flow":
            drive = {"flow": v["flow"], "pressure_limit": v.get("pressure_limit")}
        else:
            drive = {"head": v.get("head", 0.0), "source_pressure": v.get("source_pressure", 0.0)}
        res = self.res = self.line.solve(self.fluid, back_pressure=back, **drive)
        self.models_used = merge_models(self.models_used, res.models_used)
        flow = _vec(res.flow, n)
        # a drive's pressure is the given one (the engine's value agrees to rounding)
        req = _vec(
            res.required_pressure if self.mode == "flow" else v.get("source_pressure", 0.0), n
        )
        c = self.columns
        c["flow [mL/min]"] = (flow / ML_PER_MIN).tolist()
        c["flow [mL/h]"] = (flow / ML_PER_H).tolist()
        c["required pressure [mmHg]"] = (req / MMHG + 0.0).tolist()
        limited = "pressure_limit" in v
        c["pressure limit [mmHg]"] = (
            (_vec(v["pressure_limit"], n).astype(float) / MMHG).tolist() if limited else _nan(n)
        )
        self._read_conditions(res)
        over = self.conditions["over_pressure_limit"]
        c["over pressure limit"] = [bool(o) for o in over] if limited else [None] * n
        c["max Reynolds number"] = _vec(res.max_reynolds, n).astype(float).tolist()
        c["regime"] = [str(r) for r in _vec(res.regime, n)]
        zone = _vec(res.conditions["transition_zone"], n).astype(bool)
        c["transition zone"] = zone.tolist()
        self.point_names = point_part_names(self.g, self.line)
        dominant = _vec(res.dominant_part, n)
        c["dominant part"] = [
            self.point_names[self.line.part_names.index(str(d)), col]
            for col, d in enumerate(dominant)
        ]
        c["dominant share [%]"] = (_vec(res.dominant_share, n).astype(float) * 100).tolist()
        wss = _vec(res.max_wall_shear_stress, n).astype(float)
        c["max wall shear stress [Pa]"] = wss.tolist()
        c["hemolysis index [%]"] = (
            _vec(res.hemolysis_index, n).astype(float).tolist()
        )  # NaN: no red cells
        c["hemolysis concern"] = self.conditions["hemolysis_concern"].tolist()

    def _read_conditions(self, res):
        """The solve's conditions over the group's points (``res.conditions``), and the
        turbulent and transitional lumens per point (``res.part_conditions``)."""
        n, k = self.n, len(self.parts)
        self.conditions.update(
            {key: _vec(value, n).astype(bool) for key, value in res.conditions.items()}
        )
        self.part_conditions = {
            key: np.broadcast_to(res.part_conditions[key], (k, n))
            for key in ("turbulent", "transitional", "transition_zone")
        }
        # the zone's flag names the laminar lumens in it (transitional ones have their own)
        near = self.part_conditions["transition_zone"] & ~self.part_conditions["transitional"]
        self.part_conditions["transition_zone"] = near
        self.conditions["transition_zone"] = near.any(axis=0)

    # ----------------------------------------------------------------------- the rest
    def tolerance(self):
        c, n, sc = self.columns, self.n, self.g.scenario
        band = tolerance_band(self.g, self.fluid) if sc.has_tolerance else None
        for what in ("flow", "pressure"):
            unit = "mL/min" if what == "flow" else "mmHg"
            mine = band is not None and (what == "flow") == (self.mode == "drive")
            c[f"{what} p5 [{unit}]"] = band.p5.tolist() if mine else _nan(n)
            c[f"{what} p95 [{unit}]"] = band.p95.tolist() if mine else _nan(n)
        c["dominant tolerance"] = list(band.dominant) if band is not None else [""] * n
        if band is not None:
            self.conditions["outside_range"] = self.conditions["outside_range"] | band.outside_range
            self.models_used = merge_models(self.models_used, band.models_used)

    def model_band(self):
        columns, models = band_columns(self.g, self.fluid, self.line, self.res)
        self.columns.update(columns)
        self.models_used = merge_models(self.models_used, models)

    def delivery(self):
        done, n = delivery_minutes(self.g, self.fluid, self.line, self.res), self.n
        minutes = np.full(n, np.nan) if done is None else done.minutes
        self.columns["time to deliver [min]"] = minutes.tolist()
        self.conditions["never_delivers"] = np.isinf(minutes)
        self.conditions["delivery_not_computed"] = np.isnan(minutes) & (done is not None)
        if done is not None:
            self.conditions["outside_range"] = self.conditions["outside_range"] | done.outside_range
            self.models_used = merge_models(self.models_used, done.models_used)

    def site(self):
        site, n = site_context(self.g, self.parts, self.source), self.n
        ratio = _nan(n) if site is None else _vec(site.diameter_ratio, n).astype(float).tolist()
        self.columns["catheter-to-vein ratio [-]"] = ratio
        large = np.zeros(n, bool) if site is None else _vec(site.large_ratio, n).astype(bool)
        self.conditions["large_catheter"] = large
        if site is not None:
            self.models_used = merge_models(self.models_used, SITE_MODELS)

    def transient(self):
        transient_step(self)  # rheoline.scenario.transient_step

    # ----------------------------------------------------------------------- rows
    def flags(self, col, named=None):
        """The flags of point ``col`` (a tuple of words), rendered from the conditions;
        ``named``: :meth:`_named_parts`, computed once for every point."""
        named = named or self._named_parts()
        data = {r: named[r][col] if named[r] is not None else [] for r in named}
        data["ratio"] = self.columns["catheter-to-vein ratio [-]"][col]
        return render_flags(self.conditions, data, col)

    def _named_parts(self):
        """Per part condition (turbulent, transitional, transition zone), the names of the
        parts in it at each point; None where it holds at no point."""
        out = {}
        for r in ("turbulent", "transitional", "transition_zone"):
            held = self.part_conditions[r]
            out[r] = None
            if held.any():
                out[r] = [
                    [self.point_names[j, col] for j in np.flatnonzero(held[:, col])]
                    for col in range(self.n)
                ]
        return out

    def cases(self):
        """``(index in the sweep, table row, part rows, flags, None)`` per point of the
        group (a branched group's fifth item holds its branch and node rows)."""
        named = self._named_parts()
        flags = [self.flags(col, named) for col in range(self.n)]
        self.columns["flags"] = ["; ".join(f) for f in flags]
        rows = [list(r) for r in zip(*(self.columns[k] for k in TABLE_COLUMNS), strict=True)]
        return list(zip(self.g.indices, rows, part_rows(self), flags, [None] * self.n, strict=True))


#: Model arguments of the run's steps and the file fields they come from.
_MODEL_TO_FILE = {
    "time_constant": "pressure_time_constant",
    "pressure_empty": "source_pressure_when_empty",
    "pressure_full": "source_pressure",
    "head_full": "head",
    "head_empty": "head_when_empty",
    "temperature_c": "temperature",
    "temperature_tolerance": "tolerance.temperature",
    "hematocrit_tolerance": "tolerance.hematocrit",
    "viscosity_tolerance": "tolerance.viscosity",
    "n_samples": "tolerance.samples",
    "distribution": "tolerance.distribution",
    "diameter_tolerance": "tolerance",
    "length_tolerance": "tolerance",
}
#: The file field a step's error is about when the model names none of the file's.
_STEP_FIELD = {
    "build_fluid": "fluid",
    "build_line": "part",
    "tolerance": "tolerance",
    "delivery": "volume",
    "site": "vein_diameter",
}


def _has(part, attribute):
    return getattr(part, attribute, None) is not None


def _nan(n):
    return [np.nan] * n
