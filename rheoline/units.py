"""Units at the edges: parse practitioner strings to SI floats, format SI for display.

One pint registry serves the whole package.  pint is imported on first use only,
so the model layer never pays for it.  Inside rheoline every number is SI:
Pa, m, m^3/s, Pa s, kg/m^3, s; temperatures are degrees Celsius.

Examples
--------
>>> parse_quantity("300 mmHg", "pressure")
39996.7...
>>> parse_quantity("150 mL/h", "flow")
4.166...e-08
>>> parse_quantity("22 degC", "temperature")
22.0
>>> format_quantity(39996.6, "pressure", "mmHg")
'300 mmHg'
"""

from __future__ import annotations

import functools
import math
import os
import re

from rheoline.errors import UnitError

# The conversion factors are defined once, in the model layer (NIST SP 811, 2008, Appendix B),
# and re-exported here for the edge.
from rheoline.model.conversions import CMH2O, ML_PER_H, ML_PER_MIN, MMHG, PSI

__all__ = [
    "registry",
    "KINDS",
    "parse_quantity",
    "to_unit",
    "from_unit",
    "format_quantity",
    "MMHG",
    "CMH2O",
    "PSI",
    "ML_PER_MIN",
    "ML_PER_H",
    "FLOW_UNITS",
    "per_ml_min",
    "significant",
]

#: The flow units the views and the command line offer: name -> m^3/s in one such unit.
#: Each name is one the scenario files' parser reads (``"100 mL/h"``).
FLOW_UNITS = {"mL/min": ML_PER_MIN, "mL/h": ML_PER_H, "L/min": 1e-3 / 60.0, "mL/s": 1e-6}


def per_ml_min(unit: str) -> float:
    """How many ``unit`` (a key of :data:`FLOW_UNITS`) make one mL/min: the factor that
    turns a table's ``flow [mL/min]`` into ``unit``.

    >>> round(per_ml_min("mL/h"), 12), per_ml_min("mL/min"), round(per_ml_min("L/min"), 12)
    (60.0, 1.0, 0.001)
    """
    return ML_PER_MIN / FLOW_UNITS[unit]


#: kind -> (SI unit as pint understands it, pint dimensionality, examples of accepted units)
KINDS = {
    "pressure": ("Pa", "[pressure]", "Pa, kPa, mmHg, cmH2O, psi, bar"),
    "viscosity": ("Pa*s", "[viscosity]", "Pa s, mPa s, cP, P"),
    "flow": ("m**3/s", "[volume] / [time]", "mL/h, mL/min, mL/s, L/min, m^3/s"),
    "length": ("m", "[length]", "m, cm, mm, um, inch"),
    "temperature": ("degC", "[temperature]", "degC, K, degF"),
    "density": ("kg/m**3", "[mass] / [volume]", "kg/m^3, g/mL, g/cm^3"),
    "volume": ("m**3", "[volume]", "mL, L, m^3"),
    "time": ("s", "[time]", "s, min, h"),
    "compliance": ("m**3/Pa", "[length]**4 * [time]**2 / [mass]", "uL/mmHg, mL/bar, nL/kPa"),
    "tubing_compliance": (
        "m**2/Pa",
        "[length]**3 * [time]**2 / [mass]",
        "uL/mmHg/m, nL/kPa/m",
    ),
    "force": ("N", "[force]", "N, kgf, lbf"),
    "concentration": ("kg/m**3", "[mass] / [volume]", "mg/mL, ug/mL, g/L"),
    "diffusivity": ("m**2/s", "[length]**2 / [time]", "m^2/s, cm^2/s, um^2/s"),
    "shear_rate": ("1/s", "1 / [time]", "1/s"),
    "stress": ("Pa", "[pressure]", "Pa, dyn/cm^2"),
    "dimensionless": ("dimensionless", "dimensionless", "a plain number, or %"),
}


#: Set this environment variable to ``0`` to build pint's registry from its definitions at
#: every start (no cache on disk).
CACHE_ENV = "RHEOLINE_UNIT_CACHE"


@functools.lru_cache(maxsize=1)
def registry():
    """The package's single pint UnitRegistry (created on first use).

    pint parses its definitions file (some 0.6 s) unless its own on-disk cache of the
    parsed definitions exists (pint's ``cache_folder=":auto:"``, the user's cache folder):
    then a command starts its registry in well under 0.1 s.  A cache that cannot be
    written or read is skipped (the registry is built from the definitions), and
    ``RHEOLINE_UNIT_CACHE=0`` turns it off.  The package's own units below are defined
    after loading, never cached.
    """
    import pint

    ureg = None
    if os.environ.get(CACHE_ENV, "1") != "0":
        try:
            ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True, cache_folder=":auto:")
        except Exception:  # noqa: BLE001  (any failure of the cache: build without it)
            ureg = None
    if ureg is None:
        ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    # The trade's pressure units with their conventional (NIST SP 811) values.
    ureg.define(f"mmHg_conv = {MMHG} * Pa = mmHg_c")
    ureg.define(f"cmH2O_conv = {CMH2O} * Pa = cmH2O_c")
    # French catheter scale (Charriere): 1 Fr = 1/3 mm of outer diameter (ISO 10555-1).
    ureg.define("french_gauge = mm / 3 = Fr")
    return ureg


_ALIASES = {
    "mmhg": "mmHg_conv",
    "mm hg": "mmHg_conv",
    "cm h2o": "cmH2O_conv",
    "cmh20": "cmH2O_conv",  # the common letter-O/zero slip
    "mpas": "mPa*s",
    "pas": "Pa*s",
    "cmh2o": "cmH2O_conv",
    "cmH2O": "cmH2O_conv",
    "mmHg": "mmHg_conv",
    "torr": "torr",
    "cp": "cP",
    "mpa s": "mPa*s",
    "mpa.s": "mPa*s",
    "mpa·s": "mPa*s",
    "pa s": "Pa*s",
    "pa.s": "Pa*s",
    "pa·s": "Pa*s",
    "ml/h": "mL/hr",
    "ml/hr": "mL/hr",
    "ml/min": "mL/min",
    "ml/s": "mL/s",
    "l/min": "L/min",
    "l/h": "L/hr",
    "°c": "degC",
    "°f": "degF",
    "c": "degC",
    "deg c": "degC",
    "1/s": "1/s",
    "s^-1": "1/s",
    "%": "percent",
    "fr": "french_gauge",
}

_NUMBER_UNIT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


# A unit expression as the edge accepts it: unit names joined by * or /, each with an optional
# small integer power ("kg/m**3", "mL/hr", "1/s").  Anything else (numbers, nested powers,
# brackets) is refused before pint sees it, so that no text can make pint divide by zero or
# build a huge integer (e.g. "9**9**9").
_UNIT_NAME = r"(?:[A-Za-z\u00b5\u03bc\u00b0%_][A-Za-z0-9_]*)"
_SAFE_UNIT = re.compile(
    rf"^(?:1\s*/\s*)?{_UNIT_NAME}(?:\*\*-?\d{{1,2}})?"
    rf"(?:\s*[*/]\s*{_UNIT_NAME}(?:\*\*-?\d{{1,2}})?)*$"
)


def _normalize_unit(text: str) -> str:
    key = text.strip()
    low = key.lower()
    if key in _ALIASES:
        return _ALIASES[key]
    if low in _ALIASES:
        return _ALIASES[low]
    # "Pa s", "mPa s" and similar products written with a space
    key = re.sub(r"(?<=[A-Za-z])\s+(?=[A-Za-z])", "*", key)
    # "cm3", "m3/s": a length unit with a bare power
    key = re.sub(r"\b(km|dm|cm|mm|um|m)([23])\b", r"\1**\2", key)
    return key.replace("^", "**").replace("·", "*")


def parse_quantity(text, kind: str, default_unit: str | None = None, field: str = "value") -> float:
    """Parse ``"300 mmHg"`` (or a bare number in ``default_unit``) to an SI float.

    Parameters
    ----------
    text : str or float
        A number followed by a unit, or a bare number when ``default_unit`` is given.
    kind : str
        One of :data:`KINDS` ("pressure", "viscosity", "flow", "length", ...).
    default_unit : str, optional
        Unit of a bare number; without it a bare number is an error (except for
        ``kind="dimensionless"``).
    field : str
        The field's name, for messages.

    Returns
    -------
    float
        The value in SI (degrees Celsius for temperature).

    Raises
    ------
    UnitError
        For a missing, unknown or wrong-kind unit, naming the field and the units allowed.
    """
    si_unit, dimensionality, examples = _checked_kind(kind)
    if isinstance(text, bool):
        raise UnitError(
            f"{field}: expected a {kind} such as '{_example(kind)}', got {text!r}",
            field=field,
            value=text,
            kind=kind,
        )
    if isinstance(text, (int, float)):
        if kind == "dimensionless":
            return _finite(text, text, field)
        if default_unit is None:
            raise UnitError(
                f"{field}: a bare number {text!r} needs a unit ({examples}), e.g. '{text} {_example_unit(kind)}'",
                field=field,
                value=text,
                kind=kind,
            )
        number, unit = _finite(text, text, field), default_unit
    elif isinstance(text, str):
        m = _NUMBER_UNIT.match(text)
        if not m:
            raise UnitError(
                f"{field}: cannot read {text!r} as a number with a unit ({examples})",
                field=field,
                value=text,
                kind=kind,
            )
        number = float(m.group(1))
        unit = m.group(2)
        if not unit:
            if kind == "dimensionless":
                return _finite(number, text, field)
            if default_unit is None:
                raise UnitError(
                    f"{field}: {text!r} has no unit; write it with one of {examples}",
                    field=field,
                    value=text,
                    kind=kind,
                )
            unit = default_unit
    else:
        raise UnitError(
            f"{field}: expected a {kind} such as '{_example(kind)}', got {type(text).__name__}",
            field=field,
            value=text,
            kind=kind,
        )
    if not math.isfinite(number):
        raise UnitError(
            f"{field}: {text!r} is not a finite number", field=field, value=text, kind=kind
        )
    return _finite(from_unit(number, unit, kind, field=field), text, field)


def _finite(number, text, field):
    """``number`` as a finite float, or a UnitError naming ``field``."""
    try:
        value = float(number)
    except OverflowError:
        value = math.inf
    if not math.isfinite(value):
        raise UnitError(
            f"{field}: {text!r} is not a finite number (or is too large)", field=field, value=text
        )
    return value


def _checked_kind(kind):
    if kind not in KINDS:
        raise UnitError(
            f"unknown quantity kind {kind!r}; choose one of {sorted(KINDS)}",
            field="kind",
            value=kind,
        )
    return KINDS[kind]


def _units_of(unit, kind: str, field: str):
    """``unit`` of ``kind`` as a pint Unit, or a UnitError naming the field, kind and the units allowed."""
    if isinstance(unit, str):
        try:
            return _checked_unit(unit, kind)[0]
        except UnitError:
            pass  # not cached: checked again below, for the message naming the field
    return _parse_unit(unit, kind, field)


@functools.lru_cache(maxsize=1024)
def _checked_unit(unit: str, kind: str):
    """``(pint Unit, factor)`` of a unit string that passed every check for ``kind``.

    The cache (bounded) keys on the exact text and the kind, so a unit checked for one
    kind is never taken for another; a unit that fails a check raises and is not cached,
    so an unsafe or wrong-kind unit is refused every time.  ``factor`` is the SI value of
    one unit (``SI = number * factor``), or None for a unit with an offset (degF, K),
    which pint converts each time.
    """
    parsed = _parse_unit(unit, kind, "value")
    ureg = registry()
    si_unit = KINDS[kind][0]
    one = ureg.Quantity(1.0, parsed).to(si_unit).magnitude
    zero = ureg.Quantity(0.0, parsed).to(si_unit).magnitude
    return parsed, (float(one) if zero == 0.0 else None)


def _parse_unit(unit, kind: str, field: str):
    """The uncached check and parse of :func:`_units_of` (a UnitError naming ``field``)."""
    import pint

    ureg = registry()
    si_unit, _, examples = _checked_kind(kind)
    unknown = f"{field}: unknown unit {unit!r}; use one of {examples} (a {kind})"
    data = {"field": field, "value": unit, "kind": kind, "unit": unit}
    if not isinstance(unit, str):
        raise UnitError(unknown, **data)
    normalized = _normalize_unit(unit)
    if len(normalized) > 40 or not _SAFE_UNIT.match(normalized):
        raise UnitError(unknown, **data)
    try:
        parsed = ureg.Unit(normalized)
    except Exception as exc:  # noqa: BLE001 - pint's parser raises many kinds; all mean "unknown"
        raise UnitError(unknown, **data) from exc
    if kind == "dimensionless":
        if not parsed.dimensionless:
            raise UnitError(f"{field}: expected a plain number or %, got unit {unit!r}", **data)
        return parsed
    try:
        ureg.Quantity(1.0, si_unit).to(parsed)
    except pint.errors.DimensionalityError as exc:
        raise UnitError(f"{field}: {unit!r} is not a unit of {kind} ({examples})", **data) from exc
    return parsed


def from_unit(number, unit: str, kind: str, field: str = "value"):
    """Convert ``number`` given in ``unit`` to SI for ``kind`` (vectorized over number)."""
    parsed = _units_of(unit, kind, field)
    factor = _checked_unit(unit, kind)[1]  # cached just now by _units_of
    if factor is not None and isinstance(number, (int, float)) and not isinstance(number, bool):
        return number * factor
    return registry().Quantity(number, parsed).to(KINDS[kind][0]).magnitude


def to_unit(value_si, unit: str, kind: str, field: str = "unit"):
    """Convert an SI value (or array) of ``kind`` to ``unit``.

    Raises
    ------
    UnitError
        For an unknown kind, an unknown unit, or a unit of another kind, naming the kind
        and the units allowed.

    Examples
    --------
    >>> round(to_unit(1.0e-6 / 60.0, "mL/min", "flow"), 6)
    1.0
    >>> to_unit(1.0, "m", "pressure")
    Traceback (most recent call last):
    ...
    rheoline.errors.UnitError: unit: 'm' is not a unit of pressure (Pa, kPa, mmHg, cmH2O, psi, bar)
    """
    parsed = _units_of(unit, kind, field)
    return registry().Quantity(value_si, KINDS[kind][0]).to(parsed).magnitude


def significant(value: float, digits: int = 3) -> str:
    """``value`` with ``digits`` significant figures and thousands separators: the one
    number format of the views (an exponent only below 0.001 or from a billion up).

    >>> significant(11001.4), significant(183.26), significant(0.045678), significant(-2.5)
    ('11,000', '183', '0.0457', '-2.50')
    >>> significant(1234567.0), significant(2.5e-5), significant(0.0)
    ('1,230,000', '2.5e-05', '0')
    """
    v = float(value)
    if not math.isfinite(v):
        return "n/a"
    if v == 0:
        return "0"
    if 1e-3 <= abs(v) < 1e9:
        place = digits - 1 - math.floor(math.log10(abs(v)))
        rounded = round(v, place)
        if rounded != 0 and math.floor(math.log10(abs(rounded))) > math.floor(math.log10(abs(v))):
            place -= 1  # 999.6 -> 1,000: one digit fewer after the point
        return f"{rounded:,.{max(place, 0)}f}"
    return f"{v:.{digits}g}"


def format_quantity(value_si, kind: str, unit: str, digits: int = 3) -> str:
    """Format an SI value in ``unit`` with ``digits`` significant figures.

    Raises :class:`~rheoline.errors.UnitError` as :func:`to_unit` does.
    """
    v = float(to_unit(value_si, unit, kind))
    return f"{v:.{digits}g} {unit}"


def _example_unit(kind):
    return KINDS[kind][2].split(",")[0].strip()


def _example(kind):
    return {
        "pressure": "300 mmHg",
        "viscosity": "1.1 cP",
        "flow": "150 mL/h",
        "length": "1.8 m",
        "temperature": "22 degC",
    }.get(kind, f"1 {_example_unit(kind)}")
