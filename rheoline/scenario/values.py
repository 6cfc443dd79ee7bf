"""Scenario-file values: one quantity, a list or a range table, to SI.

:func:`parse_field` reads one field of a file (a scalar, or a list or range table when the
field sweeps) into a :class:`~rheoline.scenario.description.Value` or
:class:`~rheoline.scenario.description.Axis` that keeps both the SI number and the text as
written.  Every problem raises one :class:`~rheoline.errors.ScenarioError` naming the file,
the scenario and the dotted field path (:class:`Where` carries the first two).

:mod:`rheoline.scenario.written_values` holds the inverse for a value built in code
(``written_form``, ``value_of``, ``axis_of``), so a description edited in code saves and
loads to itself.

Examples
--------
>>> from rheoline.scenario.schema import SCENARIO_FIELDS, field_spec
>>> at = Where("demo.toml", "'case'")
>>> v = parse_field("80 cm", SCENARIO_FIELDS["head"], at, "head")
>>> v.si, v.written
(0.8, '80 cm')
>>> parse_field({"start": 14, "stop": 18, "step": 2}, field_spec("part[1].gauge", "catheter"),
...             at, "part[1].gauge").shown
('14G', '16G', '18G')
"""

from __future__ import annotations

import difflib
import math
import re
import unicodedata
from dataclasses import dataclass
from typing import NoReturn

from rheoline.errors import ScenarioError, UnitError
from rheoline.model import catalogue
from rheoline.scenario import schema
from rheoline.scenario.description import Axis, FrozenMap, Value
from rheoline.scenario.schema import KIND_OF, FieldSpec
from rheoline.scenario.unit_spellings import count_spelling
from rheoline.units import parse_quantity, to_unit

__all__ = [
    "Where",
    "parse_field",
    "parse_scalar",
    "shown",
    "type_name",
    "check_text",
    "check_keys",
]

_MAX_QUANTITY_CHARS = 60
_UNIT_CHARS = re.compile(r"^[A-Za-z0-9 µμ°%/*^.·_()\-]*$")
_CONTROL = re.compile(r"[\x00-\x1f\x7f-\x9f]")
#: Invisible format characters (Unicode category Cf) a name may keep: the zero-width
#: joiner and non-joiner, which emoji sequences and some scripts need.  Every other one
#: (the bidirectional overrides and isolates U+202A-202E and U+2066-2069, marks, zero-width
#: spaces, soft hyphens) can make a name display as something else in a review pack
#: (Boucher & Anderson 2021, "Trojan Source"), so it is refused.
_FORMAT_KEPT = {"\u200c", "\u200d"}
#: Relative slack at a documented bound: a limit written in another unit ("20 L/min" for a
#: high of 2e4 mL/min, "50 L") lands a few ulps off it after the unit conversion.
_BOUND_RELATIVE_TOLERANCE = 1e-9

_FIELD_HINTS = {
    "head": "head is a height of fluid (m, cm); for a pressure bag use source_pressure",
    "source_pressure": "a pressure (mmHg, kPa, psi); for a bag height use head",
    "back_pressure": "a pressure (mmHg, cmH2O, kPa)",
    "flow": "a flow (mL/min, mL/h, L/min)",
    "volume": "a volume (mL, L)",
    "inner_diameter": "a diameter (mm, um, inch); for a catalogue size use gauge",
    "compliance": "a lumen's compliance is per metre (uL/mmHg/m), a fitting's or measured "
    "part's lumped (uL/mmHg)",
}


@dataclass(frozen=True)
class Where:
    """Where a value sits: the file and the scenario, for the message of its error."""

    source: str
    scenario: str | None = None

    def fail(self, message: str, field: str | None = None) -> NoReturn:
        """Raise the :class:`ScenarioError` of ``message`` at ``field``."""
        raise ScenarioError(message, source=self.source, scenario=self.scenario, field=field)


# --------------------------------------------------------------------------- text
def type_name(v):
    """How a message names the type of a value read from a file."""
    return {
        dict: "a table",
        list: "a list",
        str: "text",
        bool: "true/false",
        int: "an integer",
        float: "a number",
    }.get(type(v), type(v).__name__)


def shown(text, limit=40):
    """A short, printable rendering of untrusted text for messages."""
    text = _CONTROL.sub("?", str(text))
    return text if len(text) <= limit else text[: limit - 3] + "..."


def check_text(value, at: Where, path, limit, notes=False):
    """``value`` if it is text of at most ``limit`` characters, with no control character
    (newlines and tabs allowed in ``notes``) and no invisible format character."""
    if not isinstance(value, str):
        at.fail(f"must be text in quotes, got {type_name(value)}", path)
    if len(value) > limit:
        at.fail(f"is {len(value)} characters long, above the limit of {limit}", path)
    bad = _CONTROL.search(value.replace("\n", "").replace("\t", "") if notes else value)
    if bad:
        at.fail(
            f"contains the control character U+{ord(bad.group()):04X}; use "
            "printable characters only",
            path,
        )
    hidden = next(
        (c for c in value if c not in _FORMAT_KEPT and unicodedata.category(c) == "Cf"), None
    )
    if hidden is not None:
        what = unicodedata.name(hidden, "a format character")
        at.fail(
            f"contains the invisible character U+{ord(hidden):04X} ({what}), "
            "which can make the text display as something else; remove it",
            path,
        )
    return value


def check_keys(table, allowed, at: Where, prefix, what="key"):
    """Refuse a key of ``table`` that is not in ``allowed``, with the nearest allowed one."""
    for key in table:
        if key not in allowed:
            fail_unknown(at, f"{prefix}{shown(key)}", what, key, allowed, cutoff=0.6)


def table_type(raw, prefix, at: Where, what, types) -> str:
    """The ``type`` of the table ``raw`` at ``prefix`` (a part's, a node's), one of
    ``types`` (lower-cased, stripped); a missing or unknown type fails naming the field."""
    if "type" not in raw:
        at.fail(f"is missing; choose one of {', '.join(types)}", prefix + "type")
    kind = raw["type"]
    if not isinstance(kind, str) or kind.strip().lower() not in types:
        text = shown(kind) if isinstance(kind, str) else type_name(kind)
        fail_unknown(at, prefix + "type", what, text, types, cutoff=0.6, match=str(kind).lower())
    return kind.strip().lower()


def fail_unknown(at: Where, path, what, value, allowed, of="", after="", cutoff=0.5, match=None):
    """Fail with "unknown <what> '<value>'<of>; did you mean '...'? Allowed: ...<after>.".

    ``match`` is the text compared with ``allowed`` for the hint (default ``value``);
    without a near name the sentence ends at the value.
    """
    names = [str(a) for a in allowed]
    near = difflib.get_close_matches(str(value if match is None else match), names, 1, cutoff)
    hint = f"; did you mean '{near[0]}'?" if near else "."
    at.fail(f"unknown {what} '{shown(value)}'{of}{hint} Allowed: {', '.join(names)}{after}.", path)


# --------------------------------------------------------------------------- fields
def parse_field(value, spec: FieldSpec, at: Where, path: str):
    """One field as written: a :class:`Value`, or an :class:`Axis` for a list or range
    table when the field sweeps."""
    if spec.sweep and isinstance(value, list):
        return _list_axis(value, spec, at, path)
    if spec.sweep and isinstance(value, dict):
        return _range_axis(value, spec, at, path)
    if isinstance(value, (list, dict)) and spec.kind != "quantity_list":
        at.fail(f"must be a single value, got {type_name(value)}", path)
    si = parse_scalar(value, spec, at, path)
    return Value(si, tuple(value) if isinstance(value, list) else value)


def _list_axis(value, spec, at, path):
    if not value:
        at.fail("is an empty list; give at least one value", path)
    if len(value) > schema.MAX_AXIS_VALUES:
        at.fail(
            f"sweeps {len(value)} values, above the limit of {schema.MAX_AXIS_VALUES} per field",
            path,
        )
    vals, texts = [], []
    for j, v in enumerate(value, start=1):
        if isinstance(v, (list, dict)):
            at.fail(f"list entry {j} is {type_name(v)}; a sweep lists single values", path)
        vals.append(parse_scalar(v, spec, at, path))
        texts.append(v.strip() if isinstance(v, str) else _show_si(vals[-1], spec, spec.unit))
    return Axis(tuple(vals), tuple(texts), tuple(value))


def _range_axis(table, spec, at, path):
    allowed = ("start", "stop", "step", "count")
    check_keys(table, dict.fromkeys(allowed), at, path + ".", what="range key")
    if spec.kind in ("choice", "text"):
        at.fail('cannot be a range; list the names instead, e.g. ["a", "b"]', path)
    for k in ("start", "stop"):
        if k not in table:
            at.fail(f"a range needs start, stop and step or count; '{k}' is missing", f"{path}.{k}")
    if ("step" in table) == ("count" in table):
        at.fail("a range needs exactly one of step or count", path)
    start = parse_scalar(table["start"], spec, at, path + ".start")
    stop = parse_scalar(table["stop"], spec, at, path + ".stop")
    if stop < start:
        at.fail("stop is below start; write the range from low to high", path + ".stop")
    if "count" in table:
        vals = _counted(start, stop, table["count"], at, path)
    else:
        vals = _stepped(start, stop, _step(table["step"], spec, at, path + ".step"), at, path)
    if spec.kind == "gauge":
        vals = list(dict.fromkeys(int(round(v)) for v in vals))
    unit = _unit_of(table["start"]) or spec.unit
    return Axis(tuple(vals), tuple(_show_si(v, spec, unit) for v in vals), FrozenMap(table))


def _counted(start, stop, count, at, path):
    if isinstance(count, bool) or not isinstance(count, int) or not 1 <= count <= _max_axis():
        at.fail(
            f"count must be a whole number from 1 to {_max_axis()}, got {shown(count)}",
            path + ".count",
        )
    if count == 1:
        return [start]
    return [start + (stop - start) * j / (count - 1) for j in range(count)]


def _stepped(start, stop, step, at, path):
    intervals = (stop - start) / step * (1 + 1e-12) + 1e-9  # inf for a step of 1e-320
    if not intervals < _max_axis():
        many = math.floor(intervals) + 1 if intervals < 1e12 else f"{intervals:.3g}"
        at.fail(
            f"the range has {many} values, above the limit of {_max_axis()} "
            "per field; use a larger step",
            path + ".step",
        )
    n = math.floor(intervals) + 1
    return [start + j * step for j in range(n)]


def _max_axis():
    return schema.MAX_AXIS_VALUES


def _step(value, spec, at, path):
    if spec.kind == "temperature":  # a temperature step is a difference, not a temperature
        spec = FieldSpec("temperature_delta", "degC")
    elif spec.kind == "gauge":
        spec = FieldSpec("integer")
    step = parse_scalar(value, spec, at, path, check_range=False)
    if not step > 0:
        at.fail(f"step must be greater than 0, got {shown(value)}", path)
    return step


def _unit_of(value):
    if isinstance(value, str):
        m = re.match(r"^\s*[-+]?[\d.eE+-]+\s*(.*?)\s*$", value)
        if m and m.group(1):
            return m.group(1)
    return None


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


# --------------------------------------------------------------------------- scalars
def parse_scalar(value, spec: FieldSpec, at: Where, path: str, check_range=True):
    """Parse one scalar value of ``spec`` to SI (or a name, or a tuple for a list of
    quantities); raise ScenarioError naming ``path``."""
    if isinstance(value, (list, dict)) and spec.kind != "quantity_list":
        at.fail(f"must be a single value, got {type_name(value)}", path)
    named = _NAMED.get(spec.kind)
    if named is not None:
        return named(value, spec, at, path)
    _check_plain(value, at, path)
    if spec.kind == "gauge":
        return _gauge(value, spec, at, path)
    if spec.kind == "tolerance_value":
        return _tolerance_value(value, spec, at, path)
    out = _NUMBERS.get(spec.kind, _quantity)(value, spec, at, path)
    if not math.isfinite(out):
        at.fail(f"{shown(value)!r} is not a finite number", path)
    return _check_range(out, value, spec, at, path) if check_range else out


def _check_plain(value, at, path):
    """A number, or a quantity in quotes that holds only characters of numbers and units."""
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        at.fail(f"must be a number or a quantity in quotes, got {type_name(value)}", path)
    if isinstance(value, int) and abs(value) > 10**15:
        at.fail(f"{shown(value)} is far too large for this field", path)
    if isinstance(value, str):
        if len(value) > _MAX_QUANTITY_CHARS:
            at.fail(f"is {len(value)} characters long; a quantity is a number and a unit", path)
        unit = value.strip().lstrip("+-0123456789.eE")
        if not _UNIT_CHARS.match(unit):
            at.fail(f"{shown(value)!r} has characters that are not part of a unit", path)
        count_spelling(unit.strip(), at, path)
    if isinstance(value, float) and not math.isfinite(value):
        at.fail(f"{value} is not a finite number", path)


def _text_value(value, spec, at, path):
    return check_text(value, at, path, schema.MAX_NAME_CHARS)


def _choice(value, spec, at, path):
    if not isinstance(value, str):
        at.fail(f"must be a name in quotes, got {type_name(value)} {shown(value)}", path)
    value = check_text(value, at, path, schema.MAX_NAME_CHARS).strip()
    name = path.rsplit(".", 1)[-1]
    if name == "wall":
        walls = catalogue.NEEDLE_WALLS
        if value.lower() not in walls:
            fail_unknown(at, path, "wall type", value, walls, match=value.lower())
        return value.lower()
    if name == "fluid":
        _check_fluid(value, at, path)
    if name == "blood_model":
        return _blood_model(value, at, path)
    if name == "distribution" and value not in ("uniform", "normal"):
        at.fail(f"unknown distribution '{shown(value)}'; choose 'uniform' or 'normal'", path)
    return value


def _blood_model(value, at, path):
    from rheoline.model.blood import BLOOD_RHEOLOGY_MODELS

    key = value.lower()
    if key not in BLOOD_RHEOLOGY_MODELS:
        fail_unknown(at, path, "blood model", value, list(BLOOD_RHEOLOGY_MODELS), match=key)
    return key


def _quantity_list(value, spec, at, path):
    if not isinstance(value, list) or not value:
        at.fail(
            f'must be a list of values such as ["100 {spec.unit}", "200 {spec.unit}"], '
            f"got {type_name(value)}",
            path,
        )
    if len(value) > schema.MAX_MEASURED_POINTS:
        at.fail(f"has {len(value)} values, above the limit of {schema.MAX_MEASURED_POINTS}", path)
    elem = FieldSpec(spec.element_kind, spec.unit, spec.low, spec.high, sweep=False)
    out = []
    for j, v in enumerate(value, start=1):
        if isinstance(v, (list, dict)):
            at.fail(f"entry {j} is {type_name(v)}; give single values", path)
        out.append(parse_scalar(v, elem, at, f"{path}[{j}]"))
    return tuple(out)


#: Parsers of the kinds that are names or lists, not single numbers.
_NAMED = {"text": _text_value, "choice": _choice, "quantity_list": _quantity_list}


def _plain_number(value, spec, at, path):
    if isinstance(value, str):
        try:
            value = float(value)
        except ValueError:
            at.fail(f"must be a plain number, got {shown(value)!r}", path)
        if not math.isfinite(value):
            at.fail(f"{value} is not a finite number", path)
    if spec.kind == "integer":
        if float(value) != int(value):
            at.fail(f"must be a whole number, got {value}", path)
        value = int(value)
    return value


def _fraction(value, spec, at, path):
    name = path.rsplit(".", 1)[-1]
    try:
        out = parse_quantity(value, "dimensionless", field=name)
    except UnitError as exc:
        at.fail(
            f"{_strip_field(exc, name)}; write a fraction such as 0.45 or a percent such as '45 %'",
            path,
        )
    if spec.kind == "fraction" and out > 1 and not (isinstance(value, str) and "%" in value):
        at.fail(
            f"{shown(value)} is above 1; if that is a percent, write {out / 100:g} or '{out:g} %'",
            path,
        )
    return out


def _temperature_delta(value, spec, at, path):
    if isinstance(value, (int, float)):
        return float(value)
    m = re.fullmatch(r"\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(\S*)\s*", value)
    if not m:
        at.fail(
            f"cannot read {shown(value)!r}; write a temperature difference such as '2 degC'", path
        )
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
        at.fail(
            f"{shown(m.group(2))!r} is not a unit of temperature difference (degC, K, degF)", path
        )
    return number * factor


def _quantity(value, spec, at, path):
    name = path.rsplit(".", 1)[-1]
    try:
        return parse_quantity(value, spec.kind, default_unit=spec.unit, field=name)
    except UnitError as exc:
        hint = _FIELD_HINTS.get(name, "")
        at.fail(_strip_field(exc, name) + (f"; {hint}" if hint else ""), path)


#: Parsers of the kinds that are one number (every other kind is a quantity with a unit).
_NUMBERS = {
    "number": _plain_number,
    "integer": _plain_number,
    "fraction": _fraction,
    "relative": _fraction,
    "temperature_delta": _temperature_delta,
}


def _check_fluid(value, at, path):
    from rheoline.model.fluids import fluid_names

    names = fluid_names()
    if value.strip().lower().replace("_", "-").replace(" ", "-") not in names:
        fail_unknown(
            at,
            path,
            "fluid",
            value,
            names,
            after=" (see `rheoline fluids`)",
            cutoff=0.6,
            match=value.lower(),
        )


def _strip_field(exc, name):
    """The unit parser's message without its leading ``name: `` (the path names the field)."""
    msg = str(exc)
    return msg[len(name) + 2 :] if msg.startswith(name + ": ") else msg


def _gauge(value, spec, at, path):
    if isinstance(value, str):
        m = re.fullmatch(r"(\d{1,2})\s*[gG]?", value.strip())
        if not m:
            at.fail(
                f"must be a gauge number such as 18 (or '18G'), got {shown(value)!r}; "
                'to give the bore instead use inner_diameter = "1.0 mm"',
                path,
            )
        value = int(m.group(1))
    if isinstance(value, float):
        if value != int(value):
            at.fail(
                f"{value} is not a whole gauge number; gauge is a catalogue size such as 18, not "
                'a diameter (use inner_diameter = "1.0 mm" for a measured bore)',
                path,
            )
        value = int(value)
    if not spec.low <= value <= spec.high:
        at.fail(
            f"gauge {value} is outside {spec.low:g}G to {spec.high:g}G; use inner_diameter for "
            "a size outside the catalogue",
            path,
        )
    return value


def _tolerance_value(value, spec, at, path):
    """``("relative", fraction)`` for a percent, else ``("absolute", width [m])``.

    A bare number is refused: it could be a fraction (0.05 = 5 %) or a length in the
    field's unit, and each reading gives another answer; the message shows both spellings.
    """
    name = path.rsplit(".", 1)[-1]
    if not isinstance(value, str) or _unit_of(value) is None:
        number = shown(value).strip()
        try:
            as_percent = f"{float(number) * 100:g} %"
        except ValueError:
            as_percent = "3 %"
        at.fail(
            f"a bare number {number} is ambiguous for a tolerance; write a unit for an absolute "
            f"half-width ('{number} {spec.unit}') or a percent for a relative one "
            f"('{as_percent}')",
            path,
        )
    if isinstance(value, str) and value.strip().endswith("%"):
        try:
            frac = parse_quantity(value, "dimensionless", field=name)
        except UnitError as exc:
            at.fail(_strip_field(exc, name), path)
        if not 0 <= frac <= 0.5:
            at.fail(f"{value.strip()} is outside 0 % to 50 %", path)
        return ("relative", frac)
    try:
        si = parse_quantity(value, "length", default_unit=spec.unit, field=name)
    except UnitError as exc:
        at.fail(_strip_field(exc, name) + "; or give a percent such as '3 %'", path)
    if not 0 <= si <= 0.01:
        at.fail(f"{shown(value)!r} is outside 0 to 10 mm", path)
    return ("absolute", si)


def _check_range(si, raw, spec, at, path):
    """``si`` if it lies in the field's documented range (a bound itself is accepted, within
    a relative 1e-9, and then returned exactly); otherwise fail with the range."""
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

    msg = f"{shown(raw)!r} is outside the allowed range {show(low)} to {show(high)}"
    if si < 0 and low >= 0 and spec.kind != "temperature":
        msg = f"{shown(raw)!r} is negative; it must be {show(low)} or more (up to {show(high)})"
    elif si <= 0 < low:
        msg = f"{shown(raw)!r} must be greater than 0 (up to {show(high)})"
    if isinstance(raw, (int, float)) and unit and si > high:
        msg += f"; a bare number is read in {unit}, write the unit if you meant another"
    at.fail(msg, path)
