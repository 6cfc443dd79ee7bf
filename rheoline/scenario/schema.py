"""What a scenario file may hold: every field's kind, unit, range and help, and the limits.

One table per level of the file (:data:`TOP_FIELDS`, :data:`SCENARIO_FIELDS`,
:data:`SCENARIO_TOLERANCE_FIELDS`, :data:`PART_FIELDS` per part type,
:data:`PART_TOLERANCE_FIELDS`).  The reader (:mod:`rheoline.scenario.reading`), its
messages and near-miss hints, the value parser (:mod:`rheoline.scenario.values`), the writer
(:mod:`rheoline.scenario.writing`), the description's groups
(:mod:`rheoline.scenario.description`: a field's ``group`` names the dataclass that holds it)
and ``rheoline fields`` (:func:`fields_table`) all read these tables, so they cannot
disagree.

Limits (module constants, read by the reader at each call): :data:`MAX_FILE_BYTES` (1 MB),
:data:`MAX_DEPTH` (nesting of tables and lists), :data:`MAX_SCENARIOS`, :data:`MAX_PARTS`
per scenario, :data:`MAX_AXIS_VALUES` per swept field, :data:`MAX_SWEEP_POINTS` per
scenario, :data:`MAX_TOTAL_POINTS` per file, :data:`MAX_TOLERANCE_SOLVES` (tolerance
samples times sweep points) per scenario, :data:`MAX_FILE_TOLERANCE_SOLVES` per file,
:data:`MAX_PART_POINTS` (sweep points times parts) per file, and :data:`MAX_UNIT_SPELLINGS`
(different ways of writing units) per file.

Examples
--------
>>> SCENARIO_FIELDS["head"].unit, SCENARIO_FIELDS["head"].group
('m', 'drive')
>>> field_spec("part[1].gauge", "catheter").kind
'gauge'
"""

from __future__ import annotations

from dataclasses import dataclass

from rheoline.model import catalogue
from rheoline.scenario import transient_schema
from rheoline.units import MMHG

__all__ = [
    "FORMAT_VERSION",
    "MAX_FILE_BYTES",
    "MAX_DEPTH",
    "MAX_SCENARIOS",
    "MAX_PARTS",
    "MAX_AXIS_VALUES",
    "MAX_SWEEP_POINTS",
    "MAX_TOTAL_POINTS",
    "MAX_NAME_CHARS",
    "MAX_TOLERANCE_SOLVES",
    "MAX_FILE_TOLERANCE_SOLVES",
    "MAX_PART_POINTS",
    "MAX_MEASURED_POINTS",
    "MAX_UNIT_SPELLINGS",
    "FieldSpec",
    "TOP_FIELDS",
    "SCENARIO_FIELDS",
    "SCENARIO_TOLERANCE_FIELDS",
    "PART_FIELDS",
    "PART_TYPES",
    "REQUIRED_PART",
    "PART_TOLERANCE_FIELDS",
    "TRANSIENT_TABLE_FIELDS",
    "KIND_OF",
    "field_spec",
]

#: The format version this package reads and writes.
FORMAT_VERSION = 1

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
#: Most different unit spellings ("mm", "mL/min", "mm*cm/cm", ...) in one file.  Each new
#: spelling costs a parse by the unit library (about 0.3 ms); a file that wrote 16,000
#: quantities each a new way took 7.5 s of CPU to read.  The shipped examples use six at most.
MAX_UNIT_SPELLINGS = 200


# --------------------------------------------------------------------------- field specs
@dataclass(frozen=True)
class FieldSpec:
    """What one field accepts.

    Parameters
    ----------
    kind : str
        A :data:`rheoline.units.KINDS` key, or "text", "notes", "choice", "gauge",
        "fraction", "relative", "number", "integer", "temperature_delta",
        "tolerance_value", "quantity_list" (and "scenarios", "parts", "tolerance",
        "part_tolerance" for the tables).
    unit : str or None
        Unit of a bare number, and the unit used to show the value.
    low, high : float or None
        Allowed closed range, in SI (degC for temperature).
    sweep : bool
        Whether a list or range table sweeps the field.
    help : str
        What the field is, for messages and ``rheoline fields``.
    element_kind : str or None
        The kind of each entry of a "quantity_list".
    group : str or None
        Which part of a :class:`~rheoline.scenario.description.Scenario` holds a scenario
        field: "fluid", "drive", "delivery" or "site" (None for names, notes and tables).
    """

    kind: str
    unit: str | None = None
    low: float | None = None
    high: float | None = None
    sweep: bool = True
    help: str = ""
    element_kind: str | None = None
    group: str | None = None


def _spec(kind, unit=None, low=None, high=None, sweep=True, help="", element_kind=None, group=None):
    return FieldSpec(kind, unit, low, high, sweep, help, element_kind, group)


_BAR = 1e5
#: The fluid library's options (:data:`rheoline.model.fluids.FLUID_LIBRARY`) by the file
#: key that gives each one; the reader, the builder and ``rheoline fluids`` read this dict.
FLUID_OPTION_KEYS = {
    "hematocrit": "hematocrit",
    "mass_fraction": "mass_fraction",
    "model": "blood_model",
    "concentration": "albumin_concentration",
    "target_viscosity": "target_viscosity",
}

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
    "fluid": _spec("choice", help="a fluid name from `rheoline fluids`", group="fluid"),
    "temperature": _spec(
        "temperature",
        "degC",
        0.0,
        60.0,
        help="fluid temperature (22 degC when not given)",
        group="fluid",
    ),
    "hematocrit": _spec(
        "fraction",
        None,
        0.0,
        0.8,
        help="red-cell volume fraction, blood fluids only",
        group="fluid",
    ),
    "mass_fraction": _spec(
        "fraction",
        None,
        0.0,
        1.0,
        help="solute mass fraction, for mixtures such as glycerol-water",
        group="fluid",
    ),
    "blood_model": _spec(
        "choice",
        sweep=False,
        help="blood rheology model, blood fluids only (`rheoline fluids` lists them; carreau "
        "when not given)",
        group="fluid",
    ),
    "albumin_concentration": _spec(
        "density",
        "g/L",
        1.0,
        300.0,
        help="albumin concentration, albumin fluids only (e.g. '50 g/L' for 5 %)",
        group="fluid",
    ),
    "target_viscosity": _spec(
        "viscosity",
        "cP",
        1e-3 * 0.3,
        1.5,
        help="viscosity to mix glycerol-water for, instead of mass_fraction",
        group="fluid",
    ),
    "head": _spec(
        "length",
        "m",
        0.0,
        10.0,
        help="height of the fluid surface above the outlet (gravity drive)",
        group="drive",
    ),
    "source_pressure": _spec(
        "pressure",
        "mmHg",
        0.0,
        30 * _BAR,
        help="pressure applied at the source (bag, infuser), above the head",
        group="drive",
    ),
    "back_pressure": _spec(
        "pressure",
        "mmHg",
        -200 * MMHG,
        1000 * MMHG,
        help="pressure at the outlet (vein, beaker)",
        group="drive",
    ),
    "flow": _spec(
        "flow",
        "mL/min",
        1e-12,
        20e-3 / 60,
        help="prescribed flow (pump): solve for the pressure instead",
        group="drive",
    ),
    "pressure_limit": _spec(
        "pressure",
        "mmHg",
        1.0,
        60 * _BAR,
        help="highest source pressure allowed (part rating, pump limit); with flow",
        group="drive",
    ),
    "volume": _spec(
        "volume",
        "mL",
        1e-9,
        0.05,
        help="volume to deliver, for the delivery time",
        group="delivery",
    ),
    "head_when_empty": _spec(
        "length",
        "m",
        0.0,
        10.0,
        help="head when the bag is empty (falling-head delivery time)",
        group="delivery",
    ),
    "source_pressure_when_empty": _spec(
        "pressure",
        "mmHg",
        0.0,
        30 * _BAR,
        help="source pressure when the volume has gone (a cuff that loosens as the bag shrinks)",
        group="delivery",
    ),
    "pressure_time_constant": _spec(
        "time",
        "s",
        1e-3,
        1e7,
        help="time constant of a cuff pressure decaying in time",
        group="delivery",
    ),
    "vein_diameter": _spec(
        "length",
        "mm",
        5e-4,
        0.03,
        help="inner diameter of the vein the catheter sits in (site context)",
        group="site",
    ),
    "model_band": _spec(
        "flag",
        sweep=False,
        help="true (default): add the model band, the answer across defensible model "
        "choices; false: leave it out",
    ),
    **transient_schema.scenario_fields(_spec),  # the time solve: syringe, changes, ports
    "tolerance": _spec(
        "tolerance",
        sweep=False,
        help="tolerances: temperature, hematocrit, viscosity, distribution, samples, seed",
    ),
    "part": _spec("parts", sweep=False, help="the [[scenario.part]] tables, source to outlet"),
    "node": _spec(
        "nodes",
        sweep=False,
        help="a branched line's [[scenario.node]] tables: bags, sources, pumps, outlets, junctions",
    ),
    "branch": _spec(
        "branches",
        sweep=False,
        help="a branched line's [[scenario.branch]] tables: from, to and their parts",
    ),
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
#: A lumen's tubing compliance; a fitting's or measured part's volume and compliance.
_LUMEN_TIME = transient_schema.lumen_fields(_spec)
_LUMPED_TIME = transient_schema.lumped_fields(_spec)
_LEN = _spec("length", "m", 1e-4, 30.0, help="length of the lumen")

#: Dimensions of a non-circular tube (``shape``), by the shape's key in
#: :data:`rheoline.model.shapes.LUMEN_SHAPES`; :mod:`rheoline.scenario.lumen_parts` reads them.
_SHAPE_FIELDS = {
    "shape": _spec(
        "choice",
        sweep=False,
        help="cross-section of a non-circular lumen: d-shaped, annulus, crescent or rectangle "
        "(Shah & London 1978 laminar friction); instead of inner_diameter",
    ),
    "diameter": _spec("length", "mm", 1e-5, 0.06, help="d-shaped: length of the flat side"),
    "outer_diameter": _spec(
        "length", "mm", 1e-5, 0.06, help="annulus, crescent: bore of the outer lumen"
    ),
    "core_diameter": _spec(
        "length",
        "mm",
        1e-5,
        0.06,
        help="annulus, crescent: outer diameter of the core (inner tube, guidewire)",
    ),
    "eccentricity": _spec(
        "fraction", None, 0.0, 1.0, help="annulus: core offset over the gap, 0 concentric"
    ),
    "width": _spec("length", "mm", 1e-5, 0.06, help="rectangle: width"),
    "height": _spec("length", "mm", 1e-5, 0.06, help="rectangle: height"),
}

PART_FIELDS = {
    "tube": {
        **_COMMON_PART,
        "inner_diameter": _ID,
        "length": _LEN,
        "roughness": _spec("length", "mm", 0.0, 1e-3, help="absolute wall roughness"),
        **_SHAPE_FIELDS,
        **_LUMEN_TIME,
    },
    "catheter": {
        **_COMMON_PART,
        "gauge": _spec("gauge", None, 10, 34, help="nominal catalogue gauge, e.g. 18"),
        "inner_diameter": _ID,
        "length": _spec("length", "m", 1e-3, 1.5, help="catheter length"),
        **_LUMEN_TIME,
    },
    "needle": {
        **_COMMON_PART,
        "gauge": _spec("gauge", None, 7, 34, help="needle gauge (ISO 9626)"),
        "wall": _spec("choice", help="wall type (ISO 9626): " + ", ".join(catalogue.NEEDLE_WALLS)),
        "length": _spec("length", "m", 1e-3, 0.5, help="needle length"),
        **_LUMEN_TIME,
    },
    "cannula": {
        **_COMMON_PART,
        "french": _spec("number", None, 1.0, 40.0, help="outer size in French (1 Fr = 1/3 mm)"),
        "inner_diameter": _ID,
        "wall_thickness": _spec("length", "mm", 1e-5, 5e-3, help="cannula wall thickness"),
        "length": _spec("length", "m", 1e-3, 2.0, help="cannula length"),
        **_LUMEN_TIME,
    },
    "set": {
        **_COMMON_PART,
        "kind": _spec(
            "choice", help="a set from the catalogue: " + ", ".join(catalogue.EXTENSION_SETS)
        ),
        "inner_diameter": _ID,
        "length": _LEN,
        **_LUMEN_TIME,
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
        **_LUMPED_TIME,
    },
    "multi-lumen": {
        **_COMMON_PART,
        "kind": _spec(
            "choice",
            help="a multi-lumen catheter with shaped lumens: "
            + ", ".join(catalogue.MULTI_LUMEN_CATHETERS),
        ),
        "lumen": _spec("choice", help="one lumen of that catheter, e.g. 'venous'"),
        "length": _spec("length", "m", 1e-3, 1.5, help="catheter length (typical when not given)"),
    },
    "central-line": {
        **_COMMON_PART,
        "french": _spec("number", None, 1.0, 40.0, help="outer size in French, e.g. 7"),
        "lumens": _spec("integer", None, 2, 5, help="number of lumens, e.g. 3"),
        "lumen": _spec("choice", help="distal, medial, proximal or fourth"),
        "length": _spec("length", "m", 1e-3, 1.5, help="catheter length (0.20 m when not given)"),
    },
    "check-valve": {
        **_COMMON_PART,
        "k": _spec("number", None, 0.0, 1000.0, help="loss coefficient K [-] of the open valve"),
        "inner_diameter": _spec("length", "mm", 1e-5, 0.06, help="bore the K refers to"),
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
        **_LUMPED_TIME,
    },
}
#: The part types a scenario file may name.
PART_TYPES = tuple(PART_FIELDS)
REQUIRED_PART = {
    "tube": (("inner_diameter", "shape"), ("length",)),
    "catheter": (("gauge", "inner_diameter"),),
    "needle": (("gauge",),),
    "cannula": (("french", "inner_diameter"),),
    "set": (("kind",),),
    "fitting": (("k", "equivalent_length"),),
    "measured": (("flows",), ("pressure_drops",)),
    "multi-lumen": (("kind",), ("lumen",)),
    "central-line": (("lumen",),),
    "check-valve": (("k",),),
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

#: The fields of one rate change, of the occlusion and of a port, by table
#: (:mod:`rheoline.scenario.transient_schema`).
TRANSIENT_TABLE_FIELDS = transient_schema.table_fields(_spec)

#: The :data:`rheoline.units.KINDS` key of each field kind that is a physical quantity.
KIND_OF = {
    "length": "length",
    "pressure": "pressure",
    "flow": "flow",
    "volume": "volume",
    "temperature": "temperature",
    "time": "time",
    "viscosity": "viscosity",
    "density": "density",
    "compliance": "compliance",
    "tubing_compliance": "tubing_compliance",
    "force": "force",
    "concentration": "concentration",
    "diffusivity": "diffusivity",
}


def field_spec(path: str, part_type: str | None = None) -> FieldSpec:
    """The :class:`FieldSpec` of a dotted field path.

    ``"head"``, ``"tolerance.samples"``, ``"part[2].inner_diameter"`` (with the part's type)
    or ``"part[2].tolerance.length"``; in a branched scenario ``"node[3].flow"`` (with the
    node's type), ``"branch[1].to"`` or ``"branch[2].part[1].gauge"`` (with the part's
    type).  A KeyError for a field the file cannot hold.
    """
    *head, key = path.split(".")
    if head and head[0].startswith("branch["):  # a branched scenario's field
        if len(head) == 1:
            from rheoline.scenario.topology import topology_field_spec

            return topology_field_spec(path)
        head = head[1:]
    if head and head[0].startswith("node["):
        from rheoline.scenario.topology import topology_field_spec

        return topology_field_spec(path, part_type)
    if head and head[0].startswith("part["):
        if head[1:] == ["tolerance"]:
            return PART_TOLERANCE_FIELDS[key]
        return PART_FIELDS[part_type][key]
    if head == ["tolerance"]:
        return SCENARIO_TOLERANCE_FIELDS[key]
    return SCENARIO_FIELDS[key]
