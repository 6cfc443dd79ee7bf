"""Read scenario files (TOML or JSON) into the one scenario description.

A scenario file holds a format version, an optional title and notes, and one or more named
scenarios.  Each scenario names a fluid, a drive (a gravity head, a source pressure, or a
prescribed flow) and a line of parts in series.  Any single-valued field may instead hold a
list of values or a range table (``{start = "50 cm", stop = "150 cm", step = "25 cm"}`` or
``{start, stop, count}``); the lists of one scenario expand into their cross product.

A minimal file::

    format_version = 1

    [[scenario]]
    name = "18G on a gravity set"
    fluid = "saline-0.9"
    temperature = "22 degC"
    head = "100 cm"

    [[scenario.part]]
    type = "tube"
    inner_diameter = "3.0 mm"
    length = "1.8 m"

    [[scenario.part]]
    type = "catheter"
    gauge = 18

Files are untrusted data.  They are parsed with :mod:`tomllib` or :mod:`json` only (never
eval, pickle or imports named by the file), checked against the documented limits of
:mod:`rheoline.scenario.schema` before anything else, and validated field by field.  The
first problem found raises one :class:`~rheoline.errors.ScenarioError` naming the file, the
scenario, the field, what is allowed and, for a misspelled name, the nearest allowed one.
A JSON object that gives a key twice is refused (TOML refuses it too).

Examples
--------
>>> s = loads_scenarios('''
... format_version = 1
... [[scenario]]
... name = "demo"
... fluid = "saline-0.9"
... head = ["50 cm", "100 cm"]
... [[scenario.part]]
... type = "catheter"
... gauge = [18, 20]
... ''')
>>> sc = s.scenarios[0]
>>> sc.n_points, sc.drive.head.values, sc.drive.head.written
(4, (0.5, 1.0), ('50 cm', '100 cm'))
"""

from __future__ import annotations

import difflib
import hashlib
from pathlib import Path

from rheoline.errors import ScenarioError
from rheoline.model import catalogue
from rheoline.scenario import lumen_parts, schema, transient_fields
from rheoline.scenario.description import (
    Axis,
    DeliverySpec,
    DriveSpec,
    FluidSpec,
    PartSpec,
    Scenario,
    ScenarioSet,
    SiteSpec,
    ToleranceSpec,
    ToleranceWidth,
)
from rheoline.scenario.reading_text import check_depth, decoded, parsed
from rheoline.scenario.schema import (
    FORMAT_VERSION,
    PART_FIELDS,
    PART_TOLERANCE_FIELDS,
    PART_TYPES,
    REQUIRED_PART,
    SCENARIO_FIELDS,
    SCENARIO_TOLERANCE_FIELDS,
    TOP_FIELDS,
)
from rheoline.scenario.unit_spellings import counting_unit_spellings
from rheoline.scenario.values import (
    Where,
    check_keys,
    check_text,
    fail_unknown,
    parse_field,
    shown,
    table_type,
    type_name,
)

__all__ = [
    "load_scenarios",
    "loads_scenarios",
    "parse_scenarios",
    "example_names",
    "example_path",
]

# Widest catheter or needle bore accepted [m]: above any 10G lumen (common practice, no source).
_MAX_CATHETER_BORE = 5e-3


# --------------------------------------------------------------------------- files and text
def load_scenarios(path) -> ScenarioSet:
    """Read and validate a scenario file (``.toml`` or ``.json``).

    Parameters
    ----------
    path : str or os.PathLike
        The file.  Larger than :data:`~rheoline.scenario.schema.MAX_FILE_BYTES` is refused
        before reading.

    Returns
    -------
    ScenarioSet

    Raises
    ------
    ScenarioError
        For an unreadable, oversized or malformed file, naming the file, scenario and field.
    """
    path = Path(path)
    source = path.name
    limit = schema.MAX_FILE_BYTES
    try:
        size = path.stat().st_size
    except OSError as exc:
        raise ScenarioError(
            f"cannot read the file ({exc.strerror or exc})", source=source
        ) from None
    if not path.is_file():
        raise ScenarioError("is not a regular file", source=source)
    if size > limit:
        raise ScenarioError(
            f"file is {size} bytes, above the limit of {limit} bytes; split it into smaller files",
            source=source,
        )
    try:
        with path.open("rb") as fh:
            data = fh.read(limit + 1)
    except OSError as exc:
        raise ScenarioError(
            f"cannot read the file ({exc.strerror or exc})", source=source
        ) from None
    fmt = "json" if path.suffix.lower() == ".json" else "toml"
    return loads_scenarios(data, source=source, fmt=fmt)


def loads_scenarios(text, source: str = "<string>", fmt: str = "toml") -> ScenarioSet:
    """Parse and validate scenario text (``str`` or UTF-8 ``bytes``) in TOML or JSON.

    The set's ``sha256`` is the hash of the bytes as given (of the UTF-8 text for a ``str``).
    """
    raw = text if isinstance(text, bytes) else text.encode("utf-8")
    text = decoded(text, source)
    if fmt not in ("toml", "json"):
        raise ScenarioError(f"unknown format {fmt!r}; use 'toml' or 'json'", source=source)
    sset = parse_scenarios(parsed(text, source, fmt), source=source)
    return ScenarioSet(
        sset.scenarios, sset.title, sset.notes, source, text, hashlib.sha256(raw).hexdigest(), raw
    )


# --------------------------------------------------------------------------- the set
def parse_scenarios(data, source: str = "<dict>") -> ScenarioSet:
    """Validate plain data (as read from TOML or JSON) into a :class:`ScenarioSet`."""
    with counting_unit_spellings():  # one file: at most schema.MAX_UNIT_SPELLINGS of them
        return _parse_set(data, source)


def _parse_set(data, source):
    check_depth(data, source)
    at = Where(source)
    if not isinstance(data, dict):
        at.fail(f"the top level must be a table of keys, got {type_name(data)}")
    check_keys(data, TOP_FIELDS, at, "")
    if "format_version" not in data:
        at.fail(f"add 'format_version = {FORMAT_VERSION}' at the top of the file", "format_version")
    version = data["format_version"]
    if isinstance(version, bool) or version != FORMAT_VERSION:
        at.fail(
            f"format version {version!r} is not supported; this rheoline reads "
            f"format_version = {FORMAT_VERSION}",
            "format_version",
        )
    title = check_text(data.get("title", ""), at, "title", schema.MAX_NAME_CHARS)
    notes = check_text(data.get("notes", ""), at, "notes", 20 * schema.MAX_NAME_CHARS, notes=True)
    raw_list = data.get("scenario")
    if raw_list is None:
        at.fail("no scenarios; add at least one [[scenario]] table", "scenario")
    if not isinstance(raw_list, list) or not raw_list:
        at.fail(
            f"must be a non-empty list of [[scenario]] tables, got {type_name(raw_list)}",
            "scenario",
        )
    if len(raw_list) > schema.MAX_SCENARIOS:
        at.fail(
            f"{len(raw_list)} scenarios is above the limit of {schema.MAX_SCENARIOS}; "
            "split the file",
            "scenario",
        )
    budget = _FileBudget(source)
    scenarios = [
        budget.add(_parse_scenario(raw, i, source), i) for i, raw in enumerate(raw_list, 1)
    ]
    return ScenarioSet(tuple(scenarios), title, notes, source)


class _FileBudget:
    """Unique names and the whole file's limits, checked as each scenario is added."""

    def __init__(self, source):
        self.source, self.names = source, {}
        self.points = self.part_points = self.tolerance_solves = 0

    def add(self, sc, index):
        at = Where(self.source, repr(sc.name))
        if sc.name in self.names:
            Where(self.source, f"#{index}").fail(
                f"the name {sc.name!r} is already used by scenario #{self.names[sc.name]}; "
                "names must be unique",
                "name",
            )
        self.names[sc.name] = index
        self.points += sc.n_points
        if self.points > schema.MAX_TOTAL_POINTS:
            at.fail(
                f"the file expands to more than {schema.MAX_TOTAL_POINTS} sweep points; "
                "sweep fewer values",
                "scenario",
            )
        self.part_points += sc.n_points * sc.n_parts
        if self.part_points > schema.MAX_PART_POINTS:
            at.fail(
                f"the file asks for more than {schema.MAX_PART_POINTS} part solves "
                "(sweep points x parts, all scenarios together); sweep fewer "
                "values or split the file",
                "scenario",
            )
        self.tolerance_solves += sc.n_samples * sc.n_points
        if self.tolerance_solves > schema.MAX_FILE_TOLERANCE_SOLVES:
            at.fail(
                f"the file asks for more than {schema.MAX_FILE_TOLERANCE_SOLVES} "
                "tolerance solves (samples x sweep points, all scenarios "
                "together); use fewer samples or split the file",
                "tolerance.samples",
            )
        return sc


# --------------------------------------------------------------------------- one scenario
def _parse_scenario(raw, index, source):
    at, name, notes = _scenario_header(raw, index, source)
    values = {
        key: parse_field(raw[key], spec, at, key)
        for key, spec in SCENARIO_FIELDS.items()
        if key in raw and spec.group
    }
    if "branch" in raw or "node" in raw:  # a branched line: rheoline.scenario.topology
        from rheoline.scenario.topology_reading import parse_branched_scenario

        sc = parse_branched_scenario(raw, values, at, name, notes)
        _check_scenario_budget(sc, at)
        return sc
    _check_drive(values, at)
    _check_delivery(values, at)
    tolerance = None
    if "tolerance" in raw:
        table = _tolerance_table(raw["tolerance"], SCENARIO_TOLERANCE_FIELDS, at, "tolerance.")
        tolerance = ToleranceSpec(**table) if table else None
    parts = _parse_parts(raw, at)
    syringe, transient = transient_fields.parse_transient(raw, values, parts, at)
    sc = Scenario(
        name,
        FluidSpec.from_keys(values),
        DriveSpec.from_keys(values),
        parts,
        tolerance,
        DeliverySpec.from_keys(values) if "volume" in values else None,
        SiteSpec.from_keys(values) if "vein_diameter" in values else None,
        notes,
        _flag(raw, "model_band", at),
        syringe=syringe,
        transient=transient,
    )
    _check_scenario_budget(sc, at)
    transient_fields.check_transient(sc, at)
    return sc


def _flag(raw, key, at):
    """A true/false field (true when not given)."""
    value = raw.get(key, True)
    if not isinstance(value, bool):
        at.fail(f"must be true or false (no quotes), got {type_name(value)}", key)
    return value


def _scenario_header(raw, index, source):
    """Where the scenario is (for messages), its name and its notes."""
    at = Where(source, f"#{index}")
    if not isinstance(raw, dict):
        at.fail(f"each [[scenario]] must be a table, got {type_name(raw)}", "scenario")
    if "name" in raw and isinstance(raw["name"], str):
        at = Where(source, repr(shown(raw["name"])))
    check_keys(raw, SCENARIO_FIELDS, at, "")
    if "name" not in raw:
        at.fail('is missing; give each scenario a unique name = "..."', "name")
    name = check_text(raw["name"], at, "name", schema.MAX_NAME_CHARS)
    if not name.strip():
        at.fail("must not be empty", "name")
    notes = check_text(raw.get("notes", ""), at, "notes", 20 * schema.MAX_NAME_CHARS, notes=True)
    if "fluid" not in raw:
        at.fail(
            'is missing; name a fluid from `rheoline fluids`, e.g. fluid = "saline-0.9"', "fluid"
        )
    return at, name, notes


def _check_drive(values, at):
    drive = [k for k in ("head", "source_pressure") if k in values]
    if "flow" in values and drive:
        at.fail(
            f"give either flow (a pump: the pressure is solved) or "
            f"{' and '.join(drive)} (a gravity or pressure drive: the flow is "
            "solved), not both",
            "flow",
        )
    if "flow" not in values and not drive:
        at.fail(
            "no drive: give head (gravity), source_pressure (bag, infuser) or flow (pump)", "head"
        )
    if "pressure_limit" in values and "flow" not in values:
        at.fail(
            'applies to a prescribed flow only; add flow = "..." or remove it', "pressure_limit"
        )


def _check_delivery(values, at):
    if "head_when_empty" in values and "volume" not in values:
        at.fail('needs volume = "..." (the volume to deliver)', "head_when_empty")
    decay = [k for k in ("source_pressure_when_empty", "pressure_time_constant") if k in values]
    if decay and "volume" not in values:
        at.fail('needs volume = "..." (the volume to deliver)', decay[0])
    if decay and "source_pressure" not in values:
        at.fail('needs source_pressure = "..." (the cuff pressure at the start)', decay[0])
    if len(decay) == 2:
        at.fail(
            "give one decay law: source_pressure_when_empty (with the volume) "
            "or pressure_time_constant (in time), not both",
            decay[1],
        )
    if "head_when_empty" in values and "head" not in values:
        at.fail('needs head = "..." (the head when the bag is full)', "head_when_empty")


def _check_scenario_budget(sc, at):
    if sc.n_samples * sc.n_points > schema.MAX_TOLERANCE_SOLVES:
        at.fail(
            f"{sc.n_samples} tolerance samples x {sc.n_points} sweep points is above "
            f"the limit of {schema.MAX_TOLERANCE_SOLVES} solves; use fewer samples or "
            "sweep fewer values",
            "tolerance.samples",
        )
    if sc.n_points > schema.MAX_SWEEP_POINTS:
        sizes = " x ".join(f"{len(a)} ({p})" for p, a in sc.axes)
        at.fail(
            f"the sweep expands to {sc.n_points} points ({sizes}), above the "
            f"limit of {schema.MAX_SWEEP_POINTS} per scenario; sweep fewer values",
            sc.axes[-1][0],
        )


def _tolerance_table(raw, specs, at, prefix):
    if not isinstance(raw, dict):
        at.fail(
            f'must be a table such as {{ {next(iter(specs))} = "3 %" }}, got {type_name(raw)}',
            prefix.rstrip("."),
        )
    check_keys(raw, specs, at, prefix)
    return {k: parse_field(v, specs[k], at, prefix + k) for k, v in raw.items()}


# --------------------------------------------------------------------------- parts
def _parse_parts(raw, at):
    if "part" not in raw:
        at.fail(
            "is missing; add at least one [[scenario.part]] table with a type "
            f"({', '.join(PART_TYPES)})",
            "part",
        )
    parts_raw = raw["part"]
    if not isinstance(parts_raw, list) or not parts_raw:
        got = "an empty list" if parts_raw == [] else type_name(parts_raw)
        at.fail(f"must be a non-empty list of [[scenario.part]] tables, got {got}", "part")
    if len(parts_raw) > schema.MAX_PARTS:
        at.fail(f"{len(parts_raw)} parts is above the limit of {schema.MAX_PARTS}", "part")
    return tuple(_parse_part(p, j, at) for j, p in enumerate(parts_raw, start=1))


def _parse_part(raw, j, at, base=""):
    """Part ``j`` of a line (``base`` "") or of a branch (``base`` "branch[2].")."""
    prefix = f"{base}part[{j}]."
    ptype = _part_type(raw, prefix, at)
    fields = PART_FIELDS[ptype]
    check_keys(raw, fields, at, prefix, what=f"{ptype} field")
    for group in REQUIRED_PART[ptype]:
        if not any(k in raw for k in group):
            at.fail(f"is missing: a {ptype} needs {' or '.join(group)}", prefix + group[0])
    label = check_text(raw.get("label", ""), at, prefix + "label", schema.MAX_NAME_CHARS)
    values = {
        key: parse_field(raw[key], spec, at, prefix + key)
        for key, spec in fields.items()
        if key in raw and key not in ("type", "label", "tolerance")
    }
    _check_catalogue(ptype, values, at, prefix)
    _check_part_sizes(ptype, values, at, prefix)
    lumen_parts.check_part(ptype, values, at, prefix)
    tolerance = {}
    if "tolerance" in raw:
        table = _tolerance_table(raw["tolerance"], PART_TOLERANCE_FIELDS, at, prefix + "tolerance.")
        if ptype in ("fitting", "measured", "check-valve"):
            at.fail(
                f"a {ptype} takes no tolerance (only lumens: tube, set, catheter, needle, cannula)",
                prefix + "tolerance",
            )
        tolerance = {k: ToleranceWidth(*v.si, v.written) for k, v in table.items()}
    return PartSpec(ptype, label, values, tolerance)


def _part_type(raw, prefix, at):
    if not isinstance(raw, dict):
        at.fail(f"must be a table, got {type_name(raw)}", prefix[:-1])
    return table_type(raw, prefix, at, "part type", PART_TYPES)


def _check_part_sizes(ptype, values, at, prefix):
    """A catheter by bore needs its length; a catheter or needle bore is a catheter's; a
    measured part gives one pressure drop per flow."""
    if ptype == "catheter" and "gauge" not in values and "length" not in values:
        at.fail(
            "is missing: a catheter given by its bore (no gauge) needs its length",
            prefix + "length",
        )
    bore = values.get("inner_diameter")
    if ptype in ("catheter", "needle") and bore is not None:
        biggest = max(bore.values) if isinstance(bore, Axis) else bore.si
        if biggest > _MAX_CATHETER_BORE:
            written = bore.written
            hint = (
                f"; if {written} is a gauge, write gauge = {written}"
                if isinstance(written, int) and not isinstance(written, bool)
                else ""
            )
            at.fail(
                f"{biggest * 1e3:g} mm is larger than any {ptype} bore "
                f"(up to {_MAX_CATHETER_BORE * 1e3:g} mm){hint}; for a wider "
                "lumen use a tube or a cannula",
                prefix + "inner_diameter",
            )
    if ptype == "measured" and len(values["flows"].si) != len(values["pressure_drops"].si):
        at.fail(
            f"has {len(values['pressure_drops'].si)} values but flows has "
            f"{len(values['flows'].si)}; give one pressure drop per flow",
            prefix + "pressure_drops",
        )


def _check_catalogue(ptype, values, at, prefix):
    """A catalogue gauge or set must exist unless the user gives the bore."""
    table = {
        "catheter": catalogue.CATHETER_GAUGES,
        "needle": catalogue.NEEDLE_GAUGES,
        "set": catalogue.EXTENSION_SETS,
    }.get(ptype)
    key = "kind" if ptype == "set" else "gauge"
    if table is None or key not in values:
        return
    if ptype == "catheter" and "inner_diameter" in values and "length" in values:
        return
    value = values[key]
    for v in value.values if isinstance(value, Axis) else (value.si,):
        if v in table:
            continue
        if ptype == "set":
            fail_unknown(at, prefix + key, "set", v, list(table))
        allowed = ", ".join(f"{g}G" for g in table)
        extra = " or give inner_diameter and length for another size" if ptype == "catheter" else ""
        at.fail(f"gauge {v} is not in the {ptype} catalogue ({allowed}){extra}", prefix + key)


# --------------------------------------------------------------------------- examples
def _examples_dir() -> Path:
    return Path(__file__).with_name("examples")


def example_names():
    """Names of the example scenario files shipped with rheoline (without ``.toml``)."""
    return sorted(p.stem for p in _examples_dir().glob("*.toml"))


def example_path(name: str) -> Path:
    """Path of a shipped example file, e.g. ``example_path("rapid-transfusion-cart")``."""
    if name not in example_names():
        near = difflib.get_close_matches(name, example_names(), n=1)
        hint = f"; did you mean '{near[0]}'?" if near else ""
        raise ScenarioError(
            f"no example named {shown(name)!r}{hint} Examples: {', '.join(example_names())}",
            field="example",
        )
    return _examples_dir() / f"{name}.toml"
