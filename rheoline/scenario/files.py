"""Scenario files: read (TOML or JSON), validate, expand sweeps, write back (TOML).

A scenario file holds a format version, an optional title and notes, and one or
more named scenarios.  Each scenario names a fluid, a drive (a gravity head, a
source pressure, or a prescribed flow) and a line of parts in series.  Any
single-valued field may instead hold a list of values or a range table
(``{start = "50 cm", stop = "150 cm", step = "25 cm"}`` or ``{start, stop,
count}``); the lists of one scenario expand into their cross product.

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

Files are untrusted data.  They are parsed with :mod:`tomllib` or :mod:`json`
only (never eval, pickle or imports named by the file), checked against the
documented limits below before anything else, and validated field by field.
The first problem found raises one :class:`~rheoline.errors.ScenarioError`
naming the file, the scenario, the field, what is allowed and, for a
misspelled name, the nearest allowed one.

Limits (module constants): :data:`MAX_FILE_BYTES` (1 MB), :data:`MAX_DEPTH`
(nesting of tables and lists), :data:`MAX_SCENARIOS`, :data:`MAX_PARTS` per
scenario, :data:`MAX_AXIS_VALUES` per swept field, :data:`MAX_SWEEP_POINTS`
per scenario, :data:`MAX_TOTAL_POINTS` per file, and
:data:`MAX_TOLERANCE_SOLVES` (tolerance samples times sweep points) per scenario,
:data:`MAX_FILE_TOLERANCE_SOLVES` per file, and :data:`MAX_PART_POINTS` (sweep points
times parts) per file.

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
>>> sc.n_points, sc.values["head"].values
(4, (0.5, 1.0))
>>> loads_scenarios(dump_scenarios(s)) == s
True
"""

from __future__ import annotations

import difflib
import hashlib
import json
import math
import os
import re
import tempfile
import tomllib
import unicodedata
from dataclasses import dataclass, field
from pathlib import Path

from rheoline.errors import ScenarioError, UnitError
from rheoline.model import catalogue
from rheoline.units import MMHG, parse_quantity, to_unit

__all__ = [
    "FORMAT_VERSION",
    "MAX_FILE_BYTES",
    "MAX_DEPTH",
    "MAX_SCENARIOS",
    "MAX_PARTS",
    "MAX_AXIS_VALUES",
    "MAX_SWEEP_POINTS",
    "MAX_TOTAL_POINTS",
    "MAX_TOLERANCE_SOLVES",
    "MAX_FILE_TOLERANCE_SOLVES",
    "MAX_PART_POINTS",
    "PART_TYPES",
    "FieldSpec",
    "Axis",
    "PartSpec",
    "Scenario",
    "ScenarioSet",
    "load_scenarios",
    "loads_scenarios",
    "parse_scenarios",
    "dump_scenarios",
    "save_scenarios",
    "OutputError",
    "sweep_points",
    "fields_table",
    "example_names",
    "example_path",
]

#: The format version this module reads and writes.
FORMAT_VERSION = 1


class OutputError(ScenarioError, OSError):
    """A scenario file or a review pack cannot be written where asked (a folder in the
    way, a missing or read-only folder, a full disk).

    A :class:`~rheoline.errors.ScenarioError` naming the path, so views and the command
    line show it as a message, and an :class:`OSError`, so ``except OSError`` still
    catches it (as :class:`io.UnsupportedOperation` is both).  ``reason`` is the why alone
    (the system's words, such as "No space left on device"), for a caller's own message.
    """

    def __init__(self, message: str, *, source=None, reason=None):
        super().__init__(message, source=source)
        self.reason = reason or message


def output_error(path, what: str, exc: OSError) -> OutputError:
    """An :class:`OutputError` for ``path`` from the operating system's ``exc``."""
    reason = exc.strerror or str(exc)
    err = OutputError(f"{what}: {reason}", source=str(path), reason=reason)
    err.errno = exc.errno
    return err


def check_output_folder(path: Path, kind: str = "file"):
    """Raise :class:`OutputError` unless the folder that is to hold ``path`` exists (for a
    ``kind`` of ``"file"``) or can be created (``"pack"``): no file stands in the way."""
    parent = path.parent if str(path.parent) else Path(".")
    if kind == "file" and not parent.is_dir():
        why = "is not a folder" if parent.exists() else "does not exist"
        raise OutputError(
            f"the folder {str(parent)!r} {why}; choose an existing folder", source=str(path)
        )
    for folder in (parent, *parent.parents):
        if folder.exists():
            if not folder.is_dir():
                raise OutputError(
                    f"{str(folder)!r} is a file, not a folder; choose another place",
                    source=str(path),
                )
            return


#: Largest scenario file read [bytes].
MAX_FILE_BYTES = 1_000_000
#: Deepest nesting of tables and lists accepted (a part's tolerance table is depth 5).
MAX_DEPTH = 8
#: Most scenarios in one file.
MAX_SCENARIOS = 200
#: Most parts in one scenario's line.
MAX_PARTS = 40
#: Most values one swept field may take.
MAX_AXIS_VALUES = 500
#: Most sweep points (cross product) in one scenario.
MAX_SWEEP_POINTS = 5_000
#: Most sweep points in one file, all scenarios together.
MAX_TOTAL_POINTS = 20_000
#: Longest name or label [characters]; notes may be 20 times as long.
MAX_NAME_CHARS = 120
#: Most Monte Carlo solves (tolerance samples x sweep points) in one scenario.
MAX_TOLERANCE_SOLVES = 400_000
#: Most Monte Carlo solves (tolerance samples x sweep points) in one file, all scenarios.
MAX_FILE_TOLERANCE_SOLVES = 2_000_000
#: Most part evaluations (sweep points x parts) in one file, all scenarios: bounds the
#: time and memory a colleague's file can ask of the machine (about 10 s and 1 GB here).
MAX_PART_POINTS = 200_000
#: Most bench points of a measured part.
MAX_MEASURED_POINTS = 50

_MAX_QUANTITY_CHARS = 60
# Widest catheter or needle bore accepted [m]: above any 10G lumen (common practice, no source).
_MAX_CATHETER_BORE = 5e-3
_UNIT_CHARS = re.compile(r"^[A-Za-z0-9 µμ°%/*^.·_()\-]*$")
_CONTROL = re.compile(r"[\x00-\x1f\x7f-\x9f]")
#: Invisible format characters (Unicode category Cf) a name may keep: the zero-width
#: joiner and non-joiner, which emoji sequences and some scripts need.  Every other one
#: (the bidirectional overrides and isolates U+202A-202E and U+2066-2069, marks, zero-width
#: spaces, soft hyphens) can make a name display as something else in a review pack
#: (Boucher & Anderson 2021, "Trojan Source"), so it is refused.
_FORMAT_KEPT = {"\u200c", "\u200d"}


# --------------------------------------------------------------------------- field specs
@dataclass(frozen=True)
class FieldSpec:
    """What one field accepts.

    Parameters
    ----------
    kind : str
        A :data:`rheoline.units.KINDS` key, or "text", "choice", "gauge", "fraction",
        "number", "quantity_list".
    unit : str or None
        Unit of a bare number, and the unit used to show the value.
    low, high : float or None
        Allowed closed range, in SI (degC for temperature).
    sweep : bool
        Whether a list or range table sweeps the field.
    help : str
        What the field is, for messages and ``rheoline check``.
    """

    kind: str
    unit: str | None = None
    low: float | None = None
    high: float | None = None
    sweep: bool = True
    help: str = ""
    element_kind: str | None = None


def _spec(kind, unit=None, low=None, high=None, sweep=True, help="", element_kind=None):
    return FieldSpec(kind, unit, low, high, sweep, help, element_kind)


_BAR = 1e5
TOP_FIELDS = {
    "format_version": _spec(
        "number", sweep=False, help=f"the file format version ({FORMAT_VERSION})"
    ),
    "title": _spec("text", sweep=False, help="a title for the scenario set"),
    "notes": _spec("notes", sweep=False, help="free text shown in reports"),
    "scenario": _spec("scenarios", sweep=False, help="the [[scenario]] tables"),
}

SCENARIO_FIELDS = {
    "name": _spec("text", sweep=False, help="a unique name for the scenario"),
    "notes": _spec("notes", sweep=False, help="free text shown in reports"),
    "fluid": _spec("choice", help="a fluid name from `rheoline fluids`"),
    "temperature": _spec(
        "temperature", "degC", 0.0, 60.0, help="fluid temperature (22 degC when not given)"
    ),
    "hematocrit": _spec(
        "fraction", None, 0.0, 0.8, help="red-cell volume fraction, blood fluids only"
    ),
    "mass_fraction": _spec(
        "fraction", None, 0.0, 1.0, help="solute mass fraction, for mixtures such as glycerol-water"
    ),
    "head": _spec(
        "length",
        "m",
        0.0,
        10.0,
        help="height of the fluid surface above the outlet (gravity drive)",
    ),
    "source_pressure": _spec(
        "pressure",
        "mmHg",
        0.0,
        30 * _BAR,
        help="pressure applied at the source (bag, infuser), above the head",
    ),
    "back_pressure": _spec(
        "pressure", "mmHg", -200 * MMHG, 1000 * MMHG, help="pressure at the outlet (vein, beaker)"
    ),
    "flow": _spec(
        "flow",
        "mL/min",
        1e-12,
        20e-3 / 60,
        help="prescribed flow (pump): solve for the pressure instead",
    ),
    "pressure_limit": _spec(
        "pressure",
        "mmHg",
        1.0,
        60 * _BAR,
        help="highest source pressure allowed (part rating, pump limit); with flow",
    ),
    "volume": _spec("volume", "mL", 1e-9, 0.05, help="volume to deliver, for the delivery time"),
    "head_when_empty": _spec(
        "length", "m", 0.0, 10.0, help="head when the bag is empty (falling-head delivery time)"
    ),
    "source_pressure_when_empty": _spec(
        "pressure",
        "mmHg",
        0.0,
        30 * _BAR,
        help="source pressure when the volume has gone (a cuff that loosens as the bag shrinks)",
    ),
    "pressure_time_constant": _spec(
        "time", "s", 1e-3, 1e7, help="time constant of a cuff pressure decaying in time"
    ),
    "vein_diameter": _spec(
        "length",
        "mm",
        5e-4,
        0.03,
        help="inner diameter of the vein the catheter sits in (site context)",
    ),
    "tolerance": _spec(
        "tolerance",
        sweep=False,
        help="tolerances: temperature, hematocrit, viscosity, distribution, samples, seed",
    ),
    "part": _spec("parts", sweep=False, help="the [[scenario.part]] tables, source to outlet"),
}

SCENARIO_TOLERANCE_FIELDS = {
    "temperature": _spec(
        "temperature_delta",
        "degC",
        0.0,
        20.0,
        sweep=False,
        help="half-width of the temperature spread, e.g. '2 degC'",
    ),
    "hematocrit": _spec(
        "fraction",
        None,
        0.0,
        0.3,
        sweep=False,
        help="half-width of the hematocrit spread, a fraction such as 0.03",
    ),
    "viscosity": _spec(
        "relative",
        None,
        0.0,
        0.5,
        sweep=False,
        help="relative half-width of the viscosity spread, e.g. '5 %'",
    ),
    "distribution": _spec(
        "choice",
        sweep=False,
        help="'uniform' (default: the tolerance is a "
        "limit) or 'normal' (the tolerance is two standard deviations)",
    ),
    "samples": _spec(
        "integer", None, 100, 100_000, sweep=False, help="Monte Carlo samples (2000 when not given)"
    ),
    "seed": _spec(
        "integer", None, 0, 2**32 - 1, sweep=False, help="random seed (0 when not given)"
    ),
}

_COMMON_PART = {
    "type": _spec("text", sweep=False, help="the kind of part"),
    "label": _spec("text", sweep=False, help="a short name shown in tables"),
    "tolerance": _spec(
        "part_tolerance", sweep=False, help="tolerances of this part: inner_diameter, length"
    ),
}
_ID = _spec("length", "mm", 1e-5, 0.06, help="inner diameter (bore) of the lumen")
_LEN = _spec("length", "m", 1e-4, 30.0, help="length of the lumen")

PART_FIELDS = {
    "tube": {
        **_COMMON_PART,
        "inner_diameter": _ID,
        "length": _LEN,
        "roughness": _spec("length", "mm", 0.0, 1e-3, help="absolute wall roughness"),
    },
    "catheter": {
        **_COMMON_PART,
        "gauge": _spec("gauge", None, 10, 34, help="nominal catalogue gauge, e.g. 18"),
        "inner_diameter": _ID,
        "length": _spec("length", "m", 1e-3, 1.5, help="catheter length"),
    },
    "needle": {
        **_COMMON_PART,
        "gauge": _spec("gauge", None, 7, 34, help="needle gauge (ISO 9626)"),
        "wall": _spec("choice", help="wall type (ISO 9626): " + ", ".join(catalogue.NEEDLE_WALLS)),
        "length": _spec("length", "m", 1e-3, 0.5, help="needle length"),
    },
    "cannula": {
        **_COMMON_PART,
        "french": _spec("number", None, 1.0, 40.0, help="outer size in French (1 Fr = 1/3 mm)"),
        "inner_diameter": _ID,
        "wall_thickness": _spec("length", "mm", 1e-5, 5e-3, help="cannula wall thickness"),
        "length": _spec("length", "m", 1e-3, 2.0, help="cannula length"),
    },
    "set": {
        **_COMMON_PART,
        "kind": _spec(
            "choice", help="a set from the catalogue: " + ", ".join(catalogue.EXTENSION_SETS)
        ),
        "inner_diameter": _ID,
        "length": _LEN,
    },
    "fitting": {
        **_COMMON_PART,
        "k": _spec("number", None, 0.0, 1000.0, help="loss coefficient K [-]"),
        "equivalent_length": _spec(
            "length", "m", 1e-5, 100.0, help="or: equivalent length of straight lumen"
        ),
        "inner_diameter": _spec(
            "length", "mm", 1e-5, 0.06, help="bore the K or equivalent length refers to"
        ),
    },
    "measured": {
        **_COMMON_PART,
        "flows": _spec(
            "quantity_list",
            "mL/min",
            1e-12,
            20e-3 / 60,
            sweep=False,
            help="bench flows",
            element_kind="flow",
        ),
        "pressure_drops": _spec(
            "quantity_list",
            "mmHg",
            0.0,
            60 * _BAR,
            sweep=False,
            help="bench pressure drops at those flows",
            element_kind="pressure",
        ),
        "test_viscosity": _spec(
            "viscosity",
            "cP",
            1e-5,
            10.0,
            sweep=False,
            help="viscosity of the bench fluid (rescales the fit)",
        ),
        "test_density": _spec(
            "density",
            "kg/m^3",
            100.0,
            5000.0,
            sweep=False,
            help="density of the bench fluid (rescales the fit)",
        ),
    },
}
#: The part types a scenario file may name.
PART_TYPES = tuple(PART_FIELDS)
_REQUIRED_PART = {
    "tube": (("inner_diameter",), ("length",)),
    "catheter": (("gauge", "inner_diameter"),),
    "needle": (("gauge",),),
    "cannula": (("french", "inner_diameter"),),
    "set": (("kind",),),
    "fitting": (("k", "equivalent_length"),),
    "measured": (("flows",), ("pressure_drops",)),
}

PART_TOLERANCE_FIELDS = {
    "inner_diameter": _spec(
        "tolerance_value",
        "mm",
        0.0,
        None,
        sweep=False,
        help="half-width of the bore spread: '3 %' or '0.02 mm'",
    ),
    "length": _spec(
        "tolerance_value",
        "m",
        0.0,
        None,
        sweep=False,
        help="half-width of the length spread: '2 %' or '5 mm'",
    ),
}


# --------------------------------------------------------------------------- data classes
@dataclass(frozen=True)
class Axis:
    """A swept field: its values (SI, or names) and how each is shown."""

    values: tuple
    shown: tuple

    def __len__(self):
        return len(self.values)


@dataclass(frozen=True)
class PartSpec:
    """One validated part: its type, label, values (SI or :class:`Axis`) and tolerances.

    Tolerances map a field to ``("relative", fraction)`` or ``("absolute", SI half-width)``.
    """

    type: str
    label: str
    values: dict
    tolerance: dict = field(default_factory=dict)


@dataclass(frozen=True)
class Scenario:
    """One validated scenario.

    ``values`` maps a field to an SI float (degC for temperature), a name, or an
    :class:`Axis` when swept; ``parts`` holds the line from source to outlet;
    ``raw`` is the scenario's table as read, which :func:`dump_scenarios` writes back.
    """

    name: str
    index: int
    values: dict
    parts: tuple
    tolerance: dict
    notes: str
    raw: dict

    @property
    def axes(self):
        """The swept fields as ``[(path, Axis), ...]``; paths like ``"part[2].gauge"``."""
        out = [(k, v) for k, v in self.values.items() if isinstance(v, Axis)]
        for i, p in enumerate(self.parts, start=1):
            out += [(f"part[{i}].{k}", v) for k, v in p.values.items() if isinstance(v, Axis)]
        return out

    @property
    def n_points(self):
        """Number of sweep points (1 when nothing is swept)."""
        return math.prod(len(a) for _, a in self.axes)

    @property
    def mode(self):
        """ "flow" when a flow is prescribed (solve the pressure), else "drive"."""
        return "flow" if "flow" in self.values else "drive"


@dataclass(frozen=True)
class ScenarioSet:
    """A validated scenario file: scenarios, title, notes and where it came from."""

    scenarios: tuple
    title: str = ""
    notes: str = ""
    source: str = field(default="<string>", compare=False)
    text: str = field(default="", compare=False, repr=False)
    sha256: str = field(default="", compare=False)
    raw: bytes = field(default=b"", compare=False, repr=False)

    @property
    def n_points(self):
        return sum(s.n_points for s in self.scenarios)


# --------------------------------------------------------------------------- reading
def load_scenarios(path) -> ScenarioSet:
    """Read and validate a scenario file (``.toml`` or ``.json``).

    Parameters
    ----------
    path : str or os.PathLike
        The file.  Larger than :data:`MAX_FILE_BYTES` is refused before reading.

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
    try:
        size = path.stat().st_size
    except OSError as exc:
        raise ScenarioError(
            f"cannot read the file ({exc.strerror or exc})", source=source
        ) from None
    if not path.is_file():
        raise ScenarioError("is not a regular file", source=source)
    if size > MAX_FILE_BYTES:
        raise ScenarioError(
            f"file is {size} bytes, above the limit of {MAX_FILE_BYTES} bytes; "
            "split it into smaller files",
            source=source,
        )
    try:
        with path.open("rb") as fh:
            data = fh.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        raise ScenarioError(
            f"cannot read the file ({exc.strerror or exc})", source=source
        ) from None
    fmt = "json" if path.suffix.lower() == ".json" else "toml"
    return loads_scenarios(data, source=source, fmt=fmt)


def _json_object(pairs, source):
    """A JSON object as a dict, refusing a key given twice (TOML refuses it too; JSON
    readers keep the last value silently, so the file would read as one number and solve
    as another)."""
    out = {}
    for key, value in pairs:
        if key in out:
            name = out.get("name", dict(pairs).get("name"))
            where = f" (in the object named {_shown(name)!r})" if isinstance(name, str) else ""
            raise ScenarioError(
                f"key {_shown(key)!r} is given more than once in one JSON "
                f"object{where}; keep one value",
                source=source,
            )
        out[key] = value
    return out


def loads_scenarios(text, source: str = "<string>", fmt: str = "toml") -> ScenarioSet:
    """Parse and validate scenario text (``str`` or UTF-8 ``bytes``) in TOML or JSON.

    The set's ``sha256`` is the hash of the bytes as given (of the UTF-8 text for a ``str``).
    """
    raw = text if isinstance(text, bytes) else text.encode("utf-8")
    if isinstance(text, bytes):
        if len(text) > MAX_FILE_BYTES:
            raise ScenarioError(
                f"text is {len(text)} bytes, above the limit of {MAX_FILE_BYTES}", source=source
            )
        try:
            text = text.decode("utf-8-sig")
        except UnicodeDecodeError as exc:
            raise ScenarioError(
                f"is not UTF-8 text (bad byte at position {exc.start}); save it as UTF-8",
                source=source,
            ) from None
    if len(text) > MAX_FILE_BYTES:
        raise ScenarioError(
            f"text is {len(text)} characters, above the limit of {MAX_FILE_BYTES}", source=source
        )
    if fmt not in ("toml", "json"):
        raise ScenarioError(f"unknown format {fmt!r}; use 'toml' or 'json'", source=source)
    try:
        if fmt == "json":
            data = json.loads(text, object_pairs_hook=lambda pairs: _json_object(pairs, source))
        else:
            data = tomllib.loads(text)
    except ScenarioError:
        raise
    except tomllib.TOMLDecodeError as exc:
        raise ScenarioError(f"is not valid TOML: {exc}", source=source) from None
    except json.JSONDecodeError as exc:
        raise ScenarioError(
            f"is not valid JSON: {exc.msg} at line {exc.lineno} column {exc.colno}", source=source
        ) from None
    except RecursionError:
        raise ScenarioError(
            f"is nested too deeply (the limit is {MAX_DEPTH} levels)", source=source
        ) from None
    except ValueError as exc:  # e.g. integers longer than Python's digit limit
        raise ScenarioError(f"cannot be parsed as {fmt.upper()}: {exc}", source=source) from None
    sset = parse_scenarios(data, source=source)
    return ScenarioSet(
        sset.scenarios, sset.title, sset.notes, source, text, hashlib.sha256(raw).hexdigest(), raw
    )


def parse_scenarios(data, source: str = "<dict>") -> ScenarioSet:
    """Validate plain data (as read from TOML or JSON) into a :class:`ScenarioSet`."""
    _check_depth(data, source)
    if not isinstance(data, dict):
        raise ScenarioError(
            f"the top level must be a table of keys, got {_type(data)}", source=source
        )
    _unknown_keys(data, TOP_FIELDS, source=source, scenario=None, prefix="")
    if "format_version" not in data:
        raise ScenarioError(
            f"add 'format_version = {FORMAT_VERSION}' at the top of the file",
            source=source,
            field="format_version",
        )
    version = data["format_version"]
    if isinstance(version, bool) or version != FORMAT_VERSION:
        raise ScenarioError(
            f"format version {version!r} is not supported; this rheoline reads "
            f"format_version = {FORMAT_VERSION}",
            source=source,
            field="format_version",
        )
    title = _text(data.get("title", ""), source, None, "title", MAX_NAME_CHARS)
    notes = _text(data.get("notes", ""), source, None, "notes", 20 * MAX_NAME_CHARS, notes=True)
    raw_list = data.get("scenario")
    if raw_list is None:
        raise ScenarioError(
            "no scenarios; add at least one [[scenario]] table", source=source, field="scenario"
        )
    if not isinstance(raw_list, list) or not raw_list:
        raise ScenarioError(
            f"must be a non-empty list of [[scenario]] tables, got {_type(raw_list)}",
            source=source,
            field="scenario",
        )
    if len(raw_list) > MAX_SCENARIOS:
        raise ScenarioError(
            f"{len(raw_list)} scenarios is above the limit of {MAX_SCENARIOS}; split the file",
            source=source,
            field="scenario",
        )
    scenarios, names, total, work, tolerance_solves = [], {}, 0, 0, 0
    for i, raw in enumerate(raw_list, start=1):
        sc = _parse_scenario(raw, i, source)
        if sc.name in names:
            raise ScenarioError(
                f"the name {sc.name!r} is already used by scenario #{names[sc.name]}; "
                "names must be unique",
                source=source,
                scenario=f"#{i}",
                field="name",
            )
        names[sc.name] = i
        total += sc.n_points
        if total > MAX_TOTAL_POINTS:
            raise ScenarioError(
                f"the file expands to more than {MAX_TOTAL_POINTS} sweep points; "
                "sweep fewer values",
                source=source,
                scenario=repr(sc.name),
                field="scenario",
            )
        work += sc.n_points * len(sc.parts)
        if work > MAX_PART_POINTS:
            raise ScenarioError(
                f"the file asks for more than {MAX_PART_POINTS} part solves "
                "(sweep points x parts, all scenarios together); sweep fewer "
                "values or split the file",
                source=source,
                scenario=repr(sc.name),
                field="scenario",
            )
        tolerance_solves += _tolerance_solves(sc)
        if tolerance_solves > MAX_FILE_TOLERANCE_SOLVES:
            raise ScenarioError(
                f"the file asks for more than {MAX_FILE_TOLERANCE_SOLVES} "
                "tolerance solves (samples x sweep points, all scenarios "
                "together); use fewer samples or split the file",
                source=source,
                scenario=repr(sc.name),
                field="tolerance.samples",
            )
        scenarios.append(sc)
    return ScenarioSet(tuple(scenarios), title, notes, source)


def _tolerance_solves(sc) -> int:
    """Monte Carlo solves a scenario asks for: samples x sweep points, 0 without tolerances."""
    if not (sc.tolerance or any(p.tolerance for p in sc.parts)):
        return 0
    return sc.tolerance.get("samples", 2000) * sc.n_points


def _check_depth(data, source):
    stack = [(data, 0, "")]
    while stack:
        node, depth, path = stack.pop()
        if depth > MAX_DEPTH:
            raise ScenarioError(
                f"is nested {depth} levels deep, above the limit of {MAX_DEPTH}",
                source=source,
                field=path or None,
            )
        if isinstance(node, dict):
            for k, v in node.items():
                if not isinstance(k, str):
                    raise ScenarioError(
                        f"keys must be text, got {k!r}", source=source, field=path or None
                    )
                if isinstance(v, (dict, list)):
                    stack.append((v, depth + 1, f"{path}.{k}" if path else k))
        elif isinstance(node, list):
            for j, v in enumerate(node, start=1):
                if isinstance(v, (dict, list)):
                    stack.append((v, depth + 1, f"{path}[{j}]"))


def _type(v):
    return {
        dict: "a table",
        list: "a list",
        str: "text",
        bool: "true/false",
        int: "an integer",
        float: "a number",
    }.get(type(v), type(v).__name__)


def _unknown_keys(table, allowed, source, scenario, prefix, what="key"):
    for key in table:
        if key not in allowed:
            near = difflib.get_close_matches(key, list(allowed), n=1, cutoff=0.6)
            hint = f"; did you mean '{near[0]}'?" if near else ""
            raise ScenarioError(
                f"unknown {what} '{_shown(key)}'{hint} Allowed: {', '.join(allowed)}",
                source=source,
                scenario=scenario,
                field=f"{prefix}{_shown(key)}",
            )


def _shown(text, limit=40):
    """A short, printable rendering of untrusted text for messages."""
    text = _CONTROL.sub("?", str(text))
    return text if len(text) <= limit else text[: limit - 3] + "..."


def _text(value, source, scenario, path, limit, notes=False):
    if not isinstance(value, str):
        raise ScenarioError(
            f"must be text in quotes, got {_type(value)}",
            source=source,
            scenario=scenario,
            field=path,
        )
    if len(value) > limit:
        raise ScenarioError(
            f"is {len(value)} characters long, above the limit of {limit}",
            source=source,
            scenario=scenario,
            field=path,
        )
    bad = _CONTROL.search(value.replace("\n", "").replace("\t", "") if notes else value)
    if bad:
        raise ScenarioError(
            f"contains the control character U+{ord(bad.group()):04X}; use "
            "printable characters only",
            source=source,
            scenario=scenario,
            field=path,
        )
    hidden = next(
        (c for c in value if c not in _FORMAT_KEPT and unicodedata.category(c) == "Cf"), None
    )
    if hidden is not None:
        what = unicodedata.name(hidden, "a format character")
        raise ScenarioError(
            f"contains the invisible character U+{ord(hidden):04X} ({what}), "
            "which can make the text display as something else; remove it",
            source=source,
            scenario=scenario,
            field=path,
        )
    return value


def _parse_scenario(raw, index, source):
    where = f"#{index}"
    if not isinstance(raw, dict):
        raise ScenarioError(
            f"each [[scenario]] must be a table, got {_type(raw)}",
            source=source,
            scenario=where,
            field="scenario",
        )
    if "name" in raw and isinstance(raw["name"], str):
        where = repr(_shown(raw["name"]))
    _unknown_keys(raw, SCENARIO_FIELDS, source, where, "")
    if "name" not in raw:
        raise ScenarioError(
            'is missing; give each scenario a unique name = "..."',
            source=source,
            scenario=where,
            field="name",
        )
    name = _text(raw["name"], source, where, "name", MAX_NAME_CHARS)
    if not name.strip():
        raise ScenarioError("must not be empty", source=source, scenario=where, field="name")
    notes = _text(raw.get("notes", ""), source, where, "notes", 20 * MAX_NAME_CHARS, notes=True)
    if "fluid" not in raw:
        raise ScenarioError(
            'is missing; name a fluid from `rheoline fluids`, e.g. fluid = "saline-0.9"',
            source=source,
            scenario=where,
            field="fluid",
        )
    values = {}
    for key, spec in SCENARIO_FIELDS.items():
        if key in raw and spec.kind not in ("text", "notes", "tolerance", "parts"):
            values[key] = _value(raw[key], spec, source, where, key)
    if "temperature" not in values:
        values["temperature"] = 22.0
    drive = [k for k in ("head", "source_pressure") if k in values]
    if "flow" in values and drive:
        raise ScenarioError(
            f"give either flow (a pump: the pressure is solved) or "
            f"{' and '.join(drive)} (a gravity or pressure drive: the flow is "
            "solved), not both",
            source=source,
            scenario=where,
            field="flow",
        )
    if "flow" not in values and not drive:
        raise ScenarioError(
            "no drive: give head (gravity), source_pressure (bag, infuser) or flow (pump)",
            source=source,
            scenario=where,
            field="head",
        )
    if "pressure_limit" in values and "flow" not in values:
        raise ScenarioError(
            'applies to a prescribed flow only; add flow = "..." or remove it',
            source=source,
            scenario=where,
            field="pressure_limit",
        )
    if "head_when_empty" in values and "volume" not in values:
        raise ScenarioError(
            'needs volume = "..." (the volume to deliver)',
            source=source,
            scenario=where,
            field="head_when_empty",
        )
    decay = [k for k in ("source_pressure_when_empty", "pressure_time_constant") if k in values]
    if decay and "volume" not in values:
        raise ScenarioError(
            'needs volume = "..." (the volume to deliver)',
            source=source,
            scenario=where,
            field=decay[0],
        )
    if decay and "source_pressure" not in values:
        raise ScenarioError(
            'needs source_pressure = "..." (the cuff pressure at the start)',
            source=source,
            scenario=where,
            field=decay[0],
        )
    if len(decay) == 2:
        raise ScenarioError(
            "give one decay law: source_pressure_when_empty (with the volume) "
            "or pressure_time_constant (in time), not both",
            source=source,
            scenario=where,
            field=decay[1],
        )
    if "head_when_empty" in values and "head" not in values:
        raise ScenarioError(
            'needs head = "..." (the head when the bag is full)',
            source=source,
            scenario=where,
            field="head_when_empty",
        )
    tolerance = {}
    if "tolerance" in raw:
        tolerance = _tolerance_table(
            raw["tolerance"], SCENARIO_TOLERANCE_FIELDS, source, where, "tolerance."
        )
    if "part" not in raw:
        raise ScenarioError(
            "is missing; add at least one [[scenario.part]] table with a type "
            f"({', '.join(PART_TYPES)})",
            source=source,
            scenario=where,
            field="part",
        )
    parts_raw = raw["part"]
    if not isinstance(parts_raw, list) or not parts_raw:
        got = "an empty list" if parts_raw == [] else _type(parts_raw)
        raise ScenarioError(
            f"must be a non-empty list of [[scenario.part]] tables, got {got}",
            source=source,
            scenario=where,
            field="part",
        )
    if len(parts_raw) > MAX_PARTS:
        raise ScenarioError(
            f"{len(parts_raw)} parts is above the limit of {MAX_PARTS}",
            source=source,
            scenario=where,
            field="part",
        )
    parts = tuple(_parse_part(p, j, source, where) for j, p in enumerate(parts_raw, start=1))
    sc = Scenario(name, index, values, parts, tolerance, notes, raw)
    for path, axis in sc.axes:
        if len(axis) > MAX_AXIS_VALUES:  # pragma: no cover - _axis checks first
            raise ScenarioError(
                f"sweeps {len(axis)} values, above {MAX_AXIS_VALUES}",
                source=source,
                scenario=where,
                field=path,
            )
    samples = tolerance.get("samples", 2000)
    if _tolerance_solves(sc) > MAX_TOLERANCE_SOLVES:
        raise ScenarioError(
            f"{samples} tolerance samples x {sc.n_points} sweep points is above "
            f"the limit of {MAX_TOLERANCE_SOLVES} solves; use fewer samples or "
            "sweep fewer values",
            source=source,
            scenario=where,
            field="tolerance.samples",
        )
    if sc.n_points > MAX_SWEEP_POINTS:
        sizes = " x ".join(f"{len(a)} ({p})" for p, a in sc.axes)
        raise ScenarioError(
            f"the sweep expands to {sc.n_points} points ({sizes}), above the "
            f"limit of {MAX_SWEEP_POINTS} per scenario; sweep fewer values",
            source=source,
            scenario=where,
            field=sc.axes[-1][0],
        )
    return sc


def _parse_part(raw, j, source, where):
    prefix = f"part[{j}]."
    if not isinstance(raw, dict):
        raise ScenarioError(
            f"must be a table, got {_type(raw)}", source=source, scenario=where, field=f"part[{j}]"
        )
    if "type" not in raw:
        raise ScenarioError(
            f"is missing; choose one of {', '.join(PART_TYPES)}",
            source=source,
            scenario=where,
            field=prefix + "type",
        )
    ptype = raw["type"]
    if not isinstance(ptype, str) or ptype.strip().lower() not in PART_FIELDS:
        shown = _shown(ptype) if isinstance(ptype, str) else _type(ptype)
        near = difflib.get_close_matches(str(ptype).lower(), PART_TYPES, n=1, cutoff=0.6)
        hint = f"; did you mean '{near[0]}'?" if near else ""
        raise ScenarioError(
            f"unknown part type '{shown}'{hint} Allowed: {', '.join(PART_TYPES)}",
            source=source,
            scenario=where,
            field=prefix + "type",
        )
    ptype = ptype.strip().lower()
    fields = PART_FIELDS[ptype]
    _unknown_keys(raw, fields, source, where, prefix, what=f"{ptype} field")
    for group in _REQUIRED_PART[ptype]:
        if not any(k in raw for k in group):
            need = " or ".join(group)
            raise ScenarioError(
                f"is missing: a {ptype} needs {need}",
                source=source,
                scenario=where,
                field=prefix + group[0],
            )
    label = _text(raw.get("label", ""), source, where, prefix + "label", MAX_NAME_CHARS)
    values = {}
    for key, spec in fields.items():
        if key in raw and key not in ("type", "label", "tolerance"):
            values[key] = _value(raw[key], spec, source, where, prefix + key)
    _check_catalogue(ptype, values, source, where, prefix)
    if ptype == "catheter" and "gauge" not in values and "length" not in values:
        raise ScenarioError(
            "is missing: a catheter given by its bore (no gauge) needs its length",
            source=source,
            scenario=where,
            field=prefix + "length",
        )
    bore = values.get("inner_diameter")
    if ptype in ("catheter", "needle") and bore is not None:
        biggest = max(bore.values) if isinstance(bore, Axis) else bore
        if biggest > _MAX_CATHETER_BORE:
            raw_bore = raw["inner_diameter"]
            hint = (
                f"; if {raw_bore} is a gauge, write gauge = {raw_bore}"
                if isinstance(raw_bore, int) and not isinstance(raw_bore, bool)
                else ""
            )
            raise ScenarioError(
                f"{biggest * 1e3:g} mm is larger than any {ptype} bore "
                f"(up to {_MAX_CATHETER_BORE * 1e3:g} mm){hint}; for a wider "
                "lumen use a tube or a cannula",
                source=source,
                scenario=where,
                field=prefix + "inner_diameter",
            )
    if ptype == "measured" and len(values["flows"]) != len(values["pressure_drops"]):
        raise ScenarioError(
            f"has {len(values['pressure_drops'])} values but flows has "
            f"{len(values['flows'])}; give one pressure drop per flow",
            source=source,
            scenario=where,
            field=prefix + "pressure_drops",
        )
    tolerance = {}
    if "tolerance" in raw:
        tolerance = _tolerance_table(
            raw["tolerance"], PART_TOLERANCE_FIELDS, source, where, prefix + "tolerance."
        )
        if ptype in ("fitting", "measured"):
            raise ScenarioError(
                f"a {ptype} takes no tolerance (only lumens: tube, set, catheter, needle, cannula)",
                source=source,
                scenario=where,
                field=prefix + "tolerance",
            )
    if not label:
        label = _default_label(ptype, raw)
    return PartSpec(ptype, label, values, tolerance)


def _check_catalogue(ptype, values, source, where, prefix):
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
    for v in value.values if isinstance(value, Axis) else (value,):
        if v not in table:
            if ptype == "set":
                near = difflib.get_close_matches(str(v), list(table), n=1, cutoff=0.5)
                hint = f"; did you mean '{near[0]}'?" if near else ""
                allowed = ", ".join(table)
                raise ScenarioError(
                    f"unknown set '{_shown(v)}'{hint} Allowed: {allowed}",
                    source=source,
                    scenario=where,
                    field=prefix + key,
                )
            allowed = ", ".join(f"{g}G" for g in table)
            extra = (
                " or give inner_diameter and length for another size" if ptype == "catheter" else ""
            )
            raise ScenarioError(
                f"gauge {v} is not in the {ptype} catalogue ({allowed}){extra}",
                source=source,
                scenario=where,
                field=prefix + key,
            )


def _default_label(ptype, raw):
    """A set is named by its kind; other parts take the line engine's own name (the type)."""
    if ptype == "set" and isinstance(raw.get("kind"), str):
        return raw["kind"]
    return ptype


def _tolerance_table(raw, specs, source, where, prefix):
    if not isinstance(raw, dict):
        raise ScenarioError(
            f'must be a table such as {{ {next(iter(specs))} = "3 %" }}, got {_type(raw)}',
            source=source,
            scenario=where,
            field=prefix.rstrip("."),
        )
    _unknown_keys(raw, specs, source, where, prefix)
    return {k: _value(v, specs[k], source, where, prefix + k) for k, v in raw.items()}


# --------------------------------------------------------------------------- values
def _value(value, spec, source, where, path):
    """Parse one field: a scalar, or a list / range table when the field sweeps."""
    if spec.sweep and isinstance(value, list):
        if not value:
            raise ScenarioError(
                "is an empty list; give at least one value",
                source=source,
                scenario=where,
                field=path,
            )
        if len(value) > MAX_AXIS_VALUES:
            raise ScenarioError(
                f"sweeps {len(value)} values, above the limit of {MAX_AXIS_VALUES} per field",
                source=source,
                scenario=where,
                field=path,
            )
        vals, shown = [], []
        for j, v in enumerate(value, start=1):
            if isinstance(v, (list, dict)):
                raise ScenarioError(
                    f"list entry {j} is {_type(v)}; a sweep lists single values",
                    source=source,
                    scenario=where,
                    field=path,
                )
            vals.append(_scalar(v, spec, source, where, path))
            shown.append(_show_value(v, vals[-1], spec))
        return Axis(tuple(vals), tuple(shown))
    if spec.sweep and isinstance(value, dict):
        return _range(value, spec, source, where, path)
    if isinstance(value, (list, dict)) and spec.kind != "quantity_list":
        raise ScenarioError(
            f"must be a single value, got {_type(value)}", source=source, scenario=where, field=path
        )
    return _scalar(value, spec, source, where, path)


def _range(table, spec, source, where, path):
    allowed = ("start", "stop", "step", "count")
    _unknown_keys(table, dict.fromkeys(allowed), source, where, path + ".", what="range key")
    if spec.kind in ("choice", "text"):
        raise ScenarioError(
            'cannot be a range; list the names instead, e.g. ["a", "b"]',
            source=source,
            scenario=where,
            field=path,
        )
    for k in ("start", "stop"):
        if k not in table:
            raise ScenarioError(
                f"a range needs start, stop and step or count; '{k}' is missing",
                source=source,
                scenario=where,
                field=f"{path}.{k}",
            )
    if ("step" in table) == ("count" in table):
        raise ScenarioError(
            "a range needs exactly one of step or count", source=source, scenario=where, field=path
        )
    start = _scalar(table["start"], spec, source, where, path + ".start")
    stop = _scalar(table["stop"], spec, source, where, path + ".stop")
    if stop < start:
        raise ScenarioError(
            "stop is below start; write the range from low to high",
            source=source,
            scenario=where,
            field=path + ".stop",
        )
    if "count" in table:
        count = table["count"]
        if (
            isinstance(count, bool)
            or not isinstance(count, int)
            or not 1 <= count <= MAX_AXIS_VALUES
        ):
            raise ScenarioError(
                f"count must be a whole number from 1 to {MAX_AXIS_VALUES}, got {_shown(count)}",
                source=source,
                scenario=where,
                field=path + ".count",
            )
        if count == 1:
            vals = [start]
        else:
            vals = [start + (stop - start) * j / (count - 1) for j in range(count)]
    else:
        step = _step(table["step"], spec, source, where, path + ".step")
        n = math.floor((stop - start) / step * (1 + 1e-12) + 1e-9) + 1
        if n > MAX_AXIS_VALUES:
            raise ScenarioError(
                f"the range has {n} values, above the limit of {MAX_AXIS_VALUES} "
                "per field; use a larger step",
                source=source,
                scenario=where,
                field=path + ".step",
            )
        vals = [start + j * step for j in range(n)]
    if spec.kind == "gauge":
        vals = [int(round(v)) for v in vals]
        vals = list(dict.fromkeys(vals))
    unit = _unit_of(table["start"]) or spec.unit
    shown = [_show_si(v, spec, unit) for v in vals]
    return Axis(tuple(vals), tuple(shown))


def _step(value, spec, source, where, path):
    if spec.kind == "temperature":  # a temperature step is a difference, not a temperature
        spec = _spec("temperature_delta", "degC")
    elif spec.kind == "gauge":
        spec = _spec("integer")
    step = _scalar(value, spec, source, where, path, check_range=False)
    if not step > 0:
        raise ScenarioError(
            f"step must be greater than 0, got {_shown(value)}",
            source=source,
            scenario=where,
            field=path,
        )
    return step


def _unit_of(value):
    if isinstance(value, str):
        m = re.match(r"^\s*[-+]?[\d.eE+-]+\s*(.*?)\s*$", value)
        if m and m.group(1):
            return m.group(1)
    return None


def _show_value(raw, si, spec):
    if isinstance(raw, str):
        return raw.strip()
    return _show_si(si, spec, spec.unit)


def _show_si(si, spec, unit):
    if spec.kind in ("choice", "text"):
        return str(si)
    if spec.kind == "gauge":
        return f"{si}G"
    if spec.kind in KIND_OF and unit:
        try:
            return f"{float(to_unit(si, unit, KIND_OF[spec.kind])):.4g} {unit}"
        except Exception:  # noqa: BLE001 - a display-only fallback
            pass
    return f"{si:.4g}"


KIND_OF = {
    "length": "length",
    "pressure": "pressure",
    "flow": "flow",
    "volume": "volume",
    "temperature": "temperature",
    "time": "time",
    "viscosity": "viscosity",
    "density": "density",
}

_FIELD_HINTS = {
    "head": "head is a height of fluid (m, cm); for a pressure bag use source_pressure",
    "source_pressure": "a pressure (mmHg, kPa, psi); for a bag height use head",
    "back_pressure": "a pressure (mmHg, cmH2O, kPa)",
    "flow": "a flow (mL/min, mL/h, L/min)",
    "volume": "a volume (mL, L)",
    "inner_diameter": "a diameter (mm, um, inch); for a catalogue size use gauge",
}


def _scalar(value, spec, source, where, path, check_range=True):
    """Parse one scalar value of ``spec``; raise ScenarioError naming ``path``."""
    name = path.rsplit(".", 1)[-1]

    def fail(msg):
        raise ScenarioError(msg, source=source, scenario=where, field=path)

    kind = spec.kind
    if isinstance(value, (list, dict)) and kind != "quantity_list":
        fail(f"must be a single value, got {_type(value)}")
    if kind == "text":
        return _text(value, source, where, path, MAX_NAME_CHARS)
    if kind == "choice":
        if not isinstance(value, str):
            fail(f"must be a name in quotes, got {_type(value)} {_shown(value)}")
        value = _text(value, source, where, path, MAX_NAME_CHARS).strip()
        if name == "wall":
            walls = catalogue.NEEDLE_WALLS
            if value.lower() not in walls:
                near = difflib.get_close_matches(value.lower(), walls, n=1, cutoff=0.5)
                hint = f"; did you mean '{near[0]}'?" if near else ""
                fail(f"unknown wall type '{_shown(value)}'{hint} Allowed: {', '.join(walls)}")
            return value.lower()
        if name == "fluid":
            _check_fluid(value, fail)
        if name == "distribution" and value not in ("uniform", "normal"):
            fail(f"unknown distribution '{_shown(value)}'; choose 'uniform' or 'normal'")
        return value
    if kind == "quantity_list":
        if not isinstance(value, list) or not value:
            fail(
                f'must be a list of values such as ["100 {spec.unit}", "200 {spec.unit}"], '
                f"got {_type(value)}"
            )
        if len(value) > MAX_MEASURED_POINTS:
            fail(f"has {len(value)} values, above the limit of {MAX_MEASURED_POINTS}")
        elem = _spec(spec.element_kind, spec.unit, spec.low, spec.high, sweep=False)
        out = []
        for j, v in enumerate(value, start=1):
            if isinstance(v, (list, dict)):
                fail(f"entry {j} is {_type(v)}; give single values")
            out.append(_scalar(v, elem, source, where, f"{path}[{j}]"))
        return tuple(out)
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        fail(f"must be a number or a quantity in quotes, got {_type(value)}")
    if isinstance(value, int) and abs(value) > 10**15:
        fail(f"{_shown(value)} is far too large for this field")
    if isinstance(value, str):
        if len(value) > _MAX_QUANTITY_CHARS:
            fail(f"is {len(value)} characters long; a quantity is a number and a unit")
        if not _UNIT_CHARS.match(value.strip().lstrip("+-0123456789.eE")):
            fail(f"{_shown(value)!r} has characters that are not part of a unit")
    if isinstance(value, float) and not math.isfinite(value):
        fail(f"{value} is not a finite number")
    if kind == "gauge":
        return _gauge(value, spec, fail)
    if kind in ("number", "integer"):
        if isinstance(value, str):
            try:
                value = float(value)
            except ValueError:
                fail(f"must be a plain number, got {_shown(value)!r}")
            if not math.isfinite(value):
                fail(f"{value} is not a finite number")
        if kind == "integer":
            if float(value) != int(value):
                fail(f"must be a whole number, got {value}")
            value = int(value)
        out = value
    elif kind in ("fraction", "relative"):
        try:
            out = parse_quantity(value, "dimensionless", field=name)
        except UnitError as exc:
            fail(
                f"{_strip_field(exc, name)}; write a fraction such as 0.45 or a percent such as '45 %'"
            )
        if kind == "fraction" and out > 1 and not (isinstance(value, str) and "%" in value):
            fail(
                f"{_shown(value)} is above 1; if that is a percent, write {out / 100:g} or "
                f"'{out:g} %'"
            )
    elif kind == "temperature_delta":
        out = _temperature_delta(value, fail)
    elif kind == "tolerance_value":
        out = _tolerance_value(value, spec, fail, name)
        return out
    else:
        try:
            out = parse_quantity(value, kind, default_unit=spec.unit, field=name)
        except UnitError as exc:
            hint = _FIELD_HINTS.get(name, "")
            fail(_strip_field(exc, name) + (f"; {hint}" if hint else ""))
    if not math.isfinite(out):
        fail(f"{_shown(value)!r} is not a finite number")
    if check_range:
        out = _check_range(out, value, spec, fail)
    return out


def _check_fluid(value, fail):
    from rheoline.model.fluids import fluid_names

    names = fluid_names()
    if value.strip().lower().replace("_", "-").replace(" ", "-") not in names:
        near = difflib.get_close_matches(value.lower(), names, n=1, cutoff=0.6)
        hint = f"; did you mean '{near[0]}'?" if near else ""
        fail(
            f"unknown fluid '{_shown(value)}'{hint} Allowed: {', '.join(names)} "
            "(see `rheoline fluids`)"
        )


def _strip_field(exc, name):
    msg = str(exc)
    return msg[len(name) + 2 :] if msg.startswith(name + ": ") else msg


def _gauge(value, spec, fail):
    if isinstance(value, str):
        text = value.strip()
        m = re.fullmatch(r"(\d{1,2})\s*[gG]?", text)
        if not m:
            fail(
                f"must be a gauge number such as 18 (or '18G'), got {_shown(value)!r}; "
                'to give the bore instead use inner_diameter = "1.0 mm"'
            )
        value = int(m.group(1))
    if isinstance(value, float):
        if value != int(value):
            fail(
                f"{value} is not a whole gauge number; gauge is a catalogue size such as 18, not "
                'a diameter (use inner_diameter = "1.0 mm" for a measured bore)'
            )
        value = int(value)
    if not spec.low <= value <= spec.high:
        fail(
            f"gauge {value} is outside {spec.low:g}G to {spec.high:g}G; use inner_diameter for "
            "a size outside the catalogue"
        )
    return value


def _temperature_delta(value, fail):
    if isinstance(value, (int, float)):
        return float(value)
    m = re.fullmatch(r"\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(\S*)\s*", value)
    if not m:
        fail(f"cannot read {_shown(value)!r}; write a temperature difference such as '2 degC'")
    number, unit = float(m.group(1)), m.group(2).lower()
    factor = {
        "": 1.0,
        "degc": 1.0,
        "°c": 1.0,
        "c": 1.0,
        "k": 1.0,
        "kelvin": 1.0,
        "delta_degc": 1.0,
        "degf": 5 / 9,
        "°f": 5 / 9,
    }.get(unit)
    if factor is None:
        fail(f"{_shown(m.group(2))!r} is not a unit of temperature difference (degC, K, degF)")
    return number * factor


def _tolerance_value(value, spec, fail, name):
    if isinstance(value, str) and value.strip().endswith("%"):
        try:
            frac = parse_quantity(value, "dimensionless", field=name)
        except UnitError as exc:
            fail(_strip_field(exc, name))
        if not 0 <= frac <= 0.5:
            fail(f"{value.strip()} is outside 0 % to 50 %")
        return ("relative", frac)
    try:
        si = parse_quantity(value, "length", default_unit=spec.unit, field=name)
    except UnitError as exc:
        fail(_strip_field(exc, name) + "; or give a percent such as '3 %'")
    if not 0 <= si <= 0.01:
        fail(f"{_shown(value)!r} is outside 0 to 10 mm")
    return ("absolute", si)


#: Relative slack at a documented bound: a limit written in another unit ("20 L/min" for a
#: high of 2e4 mL/min, "50 L") lands a few ulps off it after the unit conversion.
_BOUND_RELATIVE_TOLERANCE = 1e-9


def _check_range(si, raw, spec, fail):
    """``si`` if it lies in the field's documented range (a bound itself is accepted, within
    a relative 1e-9, and then returned exactly); otherwise ``fail`` with the range."""
    if spec.low is None and spec.high is None:
        return si
    low = -math.inf if spec.low is None else spec.low
    high = math.inf if spec.high is None else spec.high
    if low <= si <= high:
        return si
    for bound in (low, high):
        if math.isfinite(bound) and abs(si - bound) <= _BOUND_RELATIVE_TOLERANCE * abs(bound):
            return float(bound)
    unit = spec.unit
    kind = KIND_OF.get(spec.kind)

    def show(v):
        if kind and unit:
            return f"{float(to_unit(v, unit, kind)):.4g} {unit}"
        return f"{v:.4g}"

    msg = f"{_shown(raw)!r} is outside the allowed range {show(low)} to {show(high)}"
    if si < 0 and low >= 0 and spec.kind != "temperature":
        msg = f"{_shown(raw)!r} is negative; it must be {show(low)} or more (up to {show(high)})"
    elif si <= 0 < low:
        msg = f"{_shown(raw)!r} must be greater than 0 (up to {show(high)})"
    if isinstance(raw, (int, float)) and unit and si > high:
        msg += f"; a bare number is read in {unit}, write the unit if you meant another"
    fail(msg)


# --------------------------------------------------------------------------- sweeps
def sweep_points(scenario: Scenario):
    """Expand a scenario's sweeps into their cross product.

    Returns
    -------
    list of dict
        One dict per sweep point, mapping each swept path (``"head"``,
        ``"part[2].gauge"``) to ``(value, shown)``; ``[{}]`` when nothing sweeps.
        The first axis varies slowest (like nested loops in file order).
    """
    import itertools

    axes = scenario.axes
    if not axes:
        return [{}]
    ranges = [range(len(a)) for _, a in axes]
    return [
        {p: (a.values[i], a.shown[i]) for (p, a), i in zip(axes, idx, strict=True)}
        for idx in itertools.product(*ranges)
    ]


# --------------------------------------------------------------------------- writing
def dump_scenarios(sset: ScenarioSet, fmt: str = "toml") -> str:
    """Write a scenario set as TOML (or JSON) text that :func:`loads_scenarios` reads back equal."""
    doc = {"format_version": FORMAT_VERSION}
    if sset.title:
        doc["title"] = sset.title
    if sset.notes:
        doc["notes"] = sset.notes
    doc["scenario"] = [_plain(s.raw) for s in sset.scenarios]
    if fmt == "json":
        return json.dumps(doc, indent=2, ensure_ascii=False, allow_nan=False) + "\n"
    import tomli_w

    return tomli_w.dumps(doc)


def _plain(obj):
    if isinstance(obj, dict):
        return {k: _plain(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_plain(v) for v in obj]
    return obj


def save_scenarios(sset: ScenarioSet, path, force: bool = False) -> Path:
    """Write ``sset`` to ``path`` atomically (temporary file, then rename).

    JSON for a ``.json`` path, TOML otherwise.  An existing file is kept unless ``force``
    is true.

    Raises
    ------
    ScenarioError
        When ``path`` exists and ``force`` is false.
    OutputError
        When ``path`` is a folder or not a regular file, its folder does not exist, or the
        system refuses the write (the reason named); nothing is left behind.
    """
    path = Path(path)
    if path.is_dir():
        raise OutputError(
            "is a folder; give a file name, such as scenarios.toml inside it", source=str(path)
        )
    if path.exists() and not force:
        raise ScenarioError(
            "exists already; choose another name or pass force=True", source=str(path)
        )
    if path.exists() and not path.is_file():
        raise OutputError("exists and is not a regular file; choose another name", source=str(path))
    check_output_folder(path, "file")
    text = dump_scenarios(sset, fmt="json" if path.suffix.lower() == ".json" else "toml")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent or ".")
    except OSError as exc:
        raise output_error(path, "cannot write the scenario file", exc) from None
    try:
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
        os.replace(tmp, path)
    except BaseException as exc:
        Path(tmp).unlink(missing_ok=True)
        if isinstance(exc, OSError):
            raise output_error(path, "cannot write the scenario file", exc) from None
        raise
    return path


# --------------------------------------------------------------------------- documentation
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

    def rows(table, specs):
        out = []
        for name, spec in specs.items():
            kind = KIND_OF.get(spec.kind) or KIND_OF.get(spec.element_kind or "")
            rng = ""
            if spec.low is not None and spec.high is not None:
                if kind and spec.unit:
                    lo = float(to_unit(spec.low, spec.unit, kind))
                    hi = float(to_unit(spec.high, spec.unit, kind))
                    rng = f"{lo:.4g} to {hi:.4g} {spec.unit}"
                else:
                    rng = f"{spec.low:g} to {spec.high:g}"
            out.append([table, name, spec.unit or "", rng, "yes" if spec.sweep else "", spec.help])
        return out

    data = rows("top level", TOP_FIELDS) + rows("[[scenario]]", SCENARIO_FIELDS)
    data += rows("[scenario.tolerance]", SCENARIO_TOLERANCE_FIELDS)
    for ptype, specs in PART_FIELDS.items():
        data += rows(f'part type = "{ptype}"', specs)
    data += rows("[part].tolerance", PART_TOLERANCE_FIELDS)
    return pd.DataFrame(
        data, columns=["table", "field", "bare number in", "allowed", "sweeps", "what it is"]
    )


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
            f"no example named {_shown(name)!r}{hint} Examples: {', '.join(example_names())}",
            field="example",
        )
    return _examples_dir() / f"{name}.toml"
