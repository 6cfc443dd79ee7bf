"""Build the model objects of a scenario: sweep groups, the fluid, the parts, the line.

A scenario's sweep points are gathered into :class:`Group` s: points that share their fluid
name and the discrete choices of their parts (gauges, walls, set kinds, fitting
coefficients) are solved together in one vectorized call of the line engine, every other
field an array over the group's points.  :func:`build` turns a group into a :class:`Built`:
the :class:`~rheoline.model.fluid_base.Fluid`, the model parts, the
:class:`~rheoline.model.line.Line` and the infusion-site context.

A model error while building becomes a :class:`~rheoline.errors.ScenarioError` naming the
file, the scenario and the field of the file that caused it (read from the error's
``field``).  :func:`check_scenarios` builds everything and solves nothing.

Examples
--------
>>> from rheoline.scenario.reading import example_path, load_scenarios
>>> sset = load_scenarios(example_path("bench-sweep"))
>>> gs = groups(sset.scenarios[0])
>>> len(gs), len(gs[0].indices), gs[0].values["head"]
(6, 5, array([0.5 , 0.75, 1.  , 1.25, 1.5 ]))
>>> built = build(gs[0], sset.source)
>>> list(built.line.part_names)
['extension set', 'three-way stopcock', '14G catheter']
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from rheoline.errors import RheolineError, ScenarioError
from rheoline.model.conversions import MMHG
from rheoline.scenario.description import Axis, ScenarioSet, sweep_points
from rheoline.scenario.schema import FLUID_OPTION_KEYS
from rheoline.scenario.transient_schema import PART_KEYS as _TIME_ONLY  # not the engine's

__all__ = [
    "Group",
    "Built",
    "groups",
    "gathered",
    "point_group",
    "build",
    "build_fluid",
    "build_parts",
    "build_part_list",
    "point_part_names",
    "site_context",
    "check_scenarios",
    "check_tolerances",
    "check_layout",
    "check_delivery",
]

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
    "shape",
    "lumen",
    "lumens",
}
#: Part fields whose sweep changes the name the engine gives a part ("tube 3 mm x 1.8 m").
_SIZE_FIELDS = (
    "inner_diameter",
    "length",
    "diameter",
    "outer_diameter",
    "core_diameter",
    "eccentricity",
    "width",
    "height",
)
#: Part fields that are lists of bench points or table points (fixed over a sweep).
_BENCH_FIELDS = ("flows", "pressure_drops", "compliance_pressures", "compliance_values")
#: The file's key of each argument of :func:`rheoline.model.fluids.fluid`.
_FLUID_ARGUMENTS = {
    **FLUID_OPTION_KEYS,
    "temperature": "temperature",
    "temperature_c": "temperature",
}
#: Scenario fields that hold a name: grouped on, never stacked into an array.
_NAMES = ("fluid", "blood_model")


@dataclass
class Group:
    """Sweep points of one scenario solved in one vectorized call.

    ``indices`` are the points' positions in the scenario's sweep, ``labels`` how each is
    shown; ``values`` maps a scenario field to an array over the points (the fluid's name
    stays a name); ``parts`` holds, per part, its fields as arrays or discrete values.
    """

    scenario: object
    indices: list
    labels: list
    values: dict
    parts: list

    @property
    def size(self):
        """Number of sweep points in the group."""
        return len(self.indices)


@dataclass(frozen=True)
class Built:
    """The model objects of a group: its fluid, parts and line, and the site context (the
    catheter-to-vein result of :func:`rheoline.model.vessels.infusion_site_context`, or
    None without a vein diameter)."""

    fluid: object
    parts: list
    line: object
    site: object = None


# --------------------------------------------------------------------------- groups
def _column(value, points, path, stack):
    """A field over a group's ``points``: the first point's value (``stack`` false), else
    an array of every point's; ``value`` is the scenario's (an :class:`Axis` where swept,
    then read from each point at ``path``)."""
    swept = isinstance(value, Axis)
    first = points[0][path][0] if swept else value
    if not stack:
        return first
    if isinstance(first, tuple):  # measured pairs, fixed
        return np.asarray(first, dtype=float)
    if swept:
        return np.asarray([pt[path][0] for pt in points], dtype=float)
    return np.asarray([value] * len(points), dtype=float)


def gathered(sc, holders):
    """The sweep points of scenario ``sc`` gathered for one vectorized solve each (in
    first-point order): per gathering ``(indices, labels, values, stacked)``.

    ``holders`` are ``(path prefix, fields)`` of the scenario's parts (``"part[2]."``), or
    of a branched scenario's parts and nodes (``"branch[1].part[2]."``, ``"node[3]."``).
    Points are gathered where their fluid name (and blood model) and the discrete fields
    of the holders agree: only the swept ones of those can differ, so they alone key the
    points, and the fields are stacked a field at a time (``values`` the scenario's,
    ``stacked`` one dict per holder: discrete fields and names the first point's, the
    rest arrays over the points).
    """
    base = sc.values  # built once, not per point
    points = sweep_points(sc)
    keys = [k for k in _NAMES if isinstance(base.get(k), Axis)]
    keys += [
        prefix + k
        for prefix, fields in holders
        for k in sorted(fields)
        if k in _DISCRETE and isinstance(fields[k], Axis)
    ]
    keyed = {}
    for i, pt in enumerate(points):
        keyed.setdefault(tuple(pt[path][0] for path in keys), []).append(i)
    out = []
    for members in keyed.values():
        pts = [points[i] for i in members]
        labels = [", ".join(shown for _, shown in pt.values()) for pt in pts]
        vals = {k: _column(v, pts, k, k not in _NAMES) for k, v in base.items()}
        stacked = [
            {k: _column(v, pts, prefix + k, k not in _DISCRETE) for k, v in fields.items()}
            for prefix, fields in holders
        ]
        out.append((members, labels, vals, stacked))
    return out


def groups(sc):
    """The sweep points of scenario ``sc`` gathered into :class:`Group` s (in first-point
    order; see :func:`gathered`)."""
    holders = [(f"part[{j}].", p.values) for j, p in enumerate(sc.parts, start=1)]
    return [Group(sc, *gathering) for gathering in gathered(sc, holders)]


def point_group(g, col):
    """The one-point group of sweep point ``col`` of ``g`` (scalars instead of arrays)."""
    n = g.size

    def one(k, v):
        if isinstance(v, np.ndarray) and v.shape == (n,) and k not in _BENCH_FIELDS:
            return float(v[col])
        return v

    return Group(
        g.scenario,
        g.indices[col : col + 1],
        g.labels[col : col + 1],
        {k: (v if k in _NAMES else float(v[col])) for k, v in g.values.items()},
        [{k: one(k, v) for k, v in pv.items()} for pv in g.parts],
    )


# --------------------------------------------------------------------------- model objects
def build(g, source) -> Built:
    """The fluid, parts, line and site context of group ``g``."""
    from rheoline.model.line import Line

    fl = build_fluid(g, source)
    parts = build_parts(g, source)
    return Built(fl, parts, Line(parts), site_context(g, parts, source))


def _model_field(exc, known, default):
    """The file key of the model argument a model error names (``exc.field``)."""
    return known.get(getattr(exc, "field", None), default)


def build_fluid(group, source):
    """The group's fluid (arrays of temperature and options over its points)."""
    from rheoline.model.fluids import FLUID_LIBRARY, fluid

    sc = group.scenario
    name = group.values["fluid"]
    opts = {
        option: group.values[key]
        for option, key in FLUID_OPTION_KEYS.items()
        if key in group.values
    }
    try:
        return fluid(name, temperature_c=group.values["temperature"], **opts)
    except RheolineError as exc:
        entry = FLUID_LIBRARY.get(entry_name(name))
        unknown = [
            FLUID_OPTION_KEYS[k] for k in opts if entry is not None and k not in entry.options
        ]
        field = _model_field(exc, _FLUID_ARGUMENTS, unknown[0] if unknown else "fluid")
        if unknown:
            takes = ", ".join(FLUID_OPTION_KEYS.get(k, k) for k in entry.options) or "none"
            exc = f"fluid {entry_name(name)!r} has no option {unknown[0]!r} (options: {takes})"
        raise ScenarioError(str(exc), source=source, scenario=repr(sc.name), field=field) from None


def entry_name(name):
    """The fluid library's key of a fluid name as written."""
    return name.strip().lower().replace("_", "-").replace(" ", "-")


def build_part(spec, kw, name):
    """One model part of the file's part ``spec`` with the field values ``kw``."""
    from rheoline.model import parts as mp
    from rheoline.scenario.lumen_parts import LUMEN_PART_TYPES, build_lumen_part

    kw = {k: v for k, v in kw.items() if k not in _TIME_ONLY}
    if spec.type in LUMEN_PART_TYPES or "shape" in kw:
        return build_lumen_part(spec.type, kw, name)
    if spec.type == "set":
        kind = kw.pop("kind")
        if "inner_diameter" in kw:
            length = kw.get("length", mp.catalogue.EXTENSION_SETS[kind][1])
            return mp.Tube(inner_diameter=kw["inner_diameter"], length=length, name=name)
        return mp.extension_set(kind, length=kw.get("length"), name=name)
    if spec.type == "catheter" and "gauge" not in kw:  # a measured bore only
        return mp.Tube(name=name or "catheter", **kw)
    kinds = {
        "tube": mp.Tube,
        "catheter": mp.Catheter,
        "needle": mp.Needle,
        "cannula": mp.Cannula,
        "fitting": mp.Fitting,
        "measured": mp.MeasuredPart,
    }
    return kinds[spec.type](name=name, **kw)


def build_parts(group, source):
    """The group's model parts, source to outlet, named by their labels (a repeated label
    gets " (2)"), or by the engine where they have none."""
    sc = group.scenario
    return build_part_list(sc.parts, group.parts, source, sc.name)


def build_part_list(specs, values, source, scenario_name, base=""):
    """Model parts of the file's parts ``specs`` with the field values ``values`` (one dict
    per part), as :func:`build_parts` names them; a model error names the field
    ``{base}part[j].field`` (``base`` "branch[2]." for a branch of a branched line)."""
    built, used = [], {}
    for j, (spec, pv) in enumerate(zip(specs, values, strict=True), start=1):
        name = None if spec.name == spec.type else spec.name  # None: the engine names it
        if name is not None:
            used[name] = used.get(name, 0) + 1
            if used[name] > 1:
                name = f"{name} ({used[name]})"
        try:
            if name is None:
                name = _unswept_name(spec, pv)
            part = build_part(spec, pv, name)
        except RheolineError as exc:
            field = _model_field(exc, {k: k for k in pv}, next(iter(pv), "type"))
            raise ScenarioError(
                str(exc),
                source=source,
                scenario=repr(scenario_name),
                field=f"{base}part[{j}].{field}",
            ) from None
        built.append(part)
    return built


def _unswept_name(spec, pv):
    """The engine's name of a part whose sizes are one value repeated over a group.

    A group passes every size as an array of its points; the engine would name it by the
    range ("tube 3-3 mm x 1 m").  None (the engine names it) when a size varies.
    """
    sizes = {k: pv[k] for k in _SIZE_FIELDS if isinstance(pv.get(k), np.ndarray)}
    if not sizes or any(v.ndim != 1 or v.size == 0 or np.ptp(v) > 0 for v in sizes.values()):
        return None
    return build_part(spec, {**pv, **{k: float(v[0]) for k, v in sizes.items()}}, None).name


def point_part_names(g, line):
    """Per part, the name of each sweep point's own part: shape (parts, points).

    The engine names a part built from a whole sweep by its range or largest size; a row
    of the table names the part as built for that point alone (once per distinct size).
    Parts with a label, or whose size is not swept within the group, keep the line's name.
    A name repeated within one line is marked as the engine marks it: "name #2".
    """
    n = g.size
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
                names[j, cols] = build_part(spec, point_group(g, cols[0]).parts[j], None).name
    for col in range(n):
        seen = {}
        for j in range(len(line.parts)):
            seen[names[j, col]] = seen.get(names[j, col], 0) + 1
            if seen[names[j, col]] > 1:
                names[j, col] = f"{names[j, col]} #{seen[names[j, col]]}"
    return names


def site_context(group, parts, source):
    """Catheter-to-vein context (rheoline.model.vessels) when the scenario gives a vein."""
    if "vein_diameter" not in group.values:
        return None
    from rheoline.model.vessels import infusion_site_context

    at = {"source": source, "scenario": repr(group.scenario.name), "field": "vein_diameter"}
    outlet = [p for p in parts if getattr(p, "outer_diameter", None) is not None]
    if not outlet:
        raise ScenarioError(
            "needs a catheter, needle or cannula (a part with an outer diameter) in the line",
            **at,
        )
    try:
        return infusion_site_context(
            outlet[-1].outer_diameter,
            group.values["vein_diameter"],
            vein_pressure=group.values.get("back_pressure", 0.0),
            warn=False,
        )
    except RheolineError as exc:
        raise ScenarioError(str(exc), **at) from None


def check_scenarios(sset: ScenarioSet) -> None:
    """Check what only the model knows (fluid names and options, part geometry).

    Builds every fluid and part of every sweep group (cheap; nothing is solved) and turns
    a model error into a :class:`ScenarioError` naming the file, scenario and field.
    """
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for sc in sset.scenarios:
            if sc.topology is not None:  # a branched line: build its networks
                from rheoline.scenario.network_run import check_network_scenario

                check_network_scenario(sc, sset.source)
                continue
            for g in groups(sc):
                fl = build_fluid(g, sset.source)
                parts = build_parts(g, sset.source)
                site_context(g, parts, sset.source)
                check_layout(g, fl, parts, sset.source)
                check_delivery(g, sset.source)
                check_tolerances(g, fl, parts, sset.source)


#: The falling drives of a delivery: (start field, end field, unit shown, SI per unit).
_FALLING = (
    ("head", "head_when_empty", "m", 1.0),
    ("source_pressure", "source_pressure_when_empty", "mmHg", MMHG),
)


def check_delivery(group, source):
    """Refuse a falling drive that rises as the bag empties (the delivery law's own
    check, :func:`rheoline.model.delivery.check_falls`), at every point of the group."""
    from rheoline.model.delivery import check_falls

    v = group.values
    for full, empty, unit, scale in _FALLING:
        if empty in v:
            try:
                check_falls(
                    full, np.asarray(v.get(full, 0.0)) / scale, empty, v[empty] / scale, unit
                )
            except RheolineError as exc:
                raise ScenarioError(
                    str(exc), source=source, scenario=repr(group.scenario.name), field=empty
                ) from None


def check_layout(group, fl, parts, source):
    """Lay the group's line out for its fluid as the solve will (nothing is solved): a
    line the engine cannot lay out (a K fitting with no bore of its own and no lumen to
    refer to) is refused here, naming the part's field."""
    from rheoline.model.line import Line
    from rheoline.model.line_layout import build_layout

    try:
        build_layout(Line(parts), fl, (), False)
    except RheolineError as exc:
        field = getattr(exc, "field", None)
        j = next(
            (
                j
                for j, p in enumerate(parts, start=1)
                if field and getattr(p, "kind", "") == "fitting" and getattr(p, field, 0) is None
            ),
            None,
        )
        raise ScenarioError(
            str(exc),
            source=source,
            scenario=repr(group.scenario.name),
            field=f"part[{j}].{field}" if j else "part",
        ) from None


def check_tolerances(group, fl, parts, source):
    """See :func:`rheoline.scenario.tolerance_check.check_tolerances`."""
    from rheoline.scenario.tolerance_check import check_tolerances as check

    check(group, fl, parts, source)
