"""Edits of the scenario description from the views' controls, and what a view leaves out.

The views edit the one scenario description (:mod:`rheoline.scenario.description`) with
the functions here, never a description of their own.  A control's number becomes a field
the way a file would write it (``"150 cm"``, ``"300 mmHg"``, ``18``), read by the scenario
file's own parser (:func:`rheoline.scenario.values.parse_field`), so the field's range is
checked with the file's message and the SI number is what a saved file reads back to.

The other half says what a view shows: :func:`at_point` picks one point of a sweep,
:func:`sweep_notes` names the sweeps a view shows at one point, and :func:`unshown_fields`
names the fields a view has no control for.  Nothing here computes physics.

Examples
--------
>>> from rheoline.scenario.reading import example_path, load_scenarios
>>> sc = load_scenarios(example_path("minimal")).scenarios[0]
>>> sc2 = with_fields(sc, head=parsed("head", written("head", 150.0)))
>>> sc2.drive.head
Value(si=1.5, written='150 cm')
>>> shown_amount("head", sc2.drive.head.si)
150.0
>>> unshown_fields(sc2, shown={"fluid", "temperature", "head"})
[]
"""

from __future__ import annotations

from dataclasses import replace

from rheoline.scenario.description import Axis, ToleranceWidth, Value
from rheoline.scenario.schema import KIND_OF, PART_FIELDS, field_spec
from rheoline.scenario.values import Where, parse_field
from rheoline.units import ML_PER_MIN, MMHG, to_unit

__all__ = [
    "CONTROL_UNITS",
    "written",
    "parsed",
    "shown_amount",
    "control_range",
    "first_si",
    "first_shown",
    "with_fields",
    "with_tolerance",
    "with_part",
    "part_with_field",
    "part_with_tolerance",
    "at_point",
    "without_points",
    "sweep_notes",
    "unshown_fields",
    "field_words",
]

#: The unit a view's control shows each field in, and the SI value of one such unit.
CONTROL_UNITS = {
    "head": ("cm", 1e-2),
    "source_pressure": ("mmHg", MMHG),
    "back_pressure": ("mmHg", MMHG),
    "flow": ("mL/min", ML_PER_MIN),
    "pressure_limit": ("mmHg", MMHG),
    "temperature": ("degC", 1.0),
    "inner_diameter": ("mm", 1e-3),
    "length": ("cm", 1e-2),
    "tolerance.temperature": ("degC", 1.0),
}

_VIEWS = Where("<views>")


def _key(path):
    """The last key of a dotted path, keeping ``tolerance.`` (``part[2].length`` -> ``length``)."""
    if ".tolerance." in path:
        return "tolerance." + path.rsplit(".", 1)[-1]
    return path.rsplit(".", 1)[-1] if path.startswith("part[") else path


def written(path: str, amount):
    """How a file writes ``amount`` of the control for ``path`` (``"150 cm"``, ``18``).

    Fields shown in a unit (:data:`CONTROL_UNITS`) become text with that unit; a tolerance
    of a part's bore or length is a percent (``"5 %"``); names and plain numbers stay as
    they are.
    """
    key = _key(path)
    if path.startswith("part[") and key.startswith("tolerance."):
        return f"{float(amount):.12g} %"
    if key in CONTROL_UNITS:
        return f"{float(amount):.12g} {CONTROL_UNITS[key][0]}"
    return amount


def parsed(path: str, text, part_type: str | None = None):
    """The field at ``path`` as the file's parser reads ``text`` (a Value or an Axis).

    Raises the parser's :class:`~rheoline.errors.ScenarioError` (naming the field and its
    range) for a value a file could not hold.
    """
    return parse_field(text, field_spec(path, part_type), _VIEWS, path)


def shown_amount(path: str, si) -> float:
    """An SI value in the unit its control shows (12 significant digits)."""
    unit = CONTROL_UNITS.get(_key(path))
    amount = float(si) / unit[1] if unit else float(si)
    return float(f"{amount:.12g}")


def control_range(path: str, part_type: str | None = None):
    """The ``(low, high)`` a file accepts for ``path``, in the unit its control shows."""
    spec = field_spec(path, part_type)
    unit = CONTROL_UNITS.get(_key(path))
    kind = KIND_OF.get(spec.kind)
    if unit is None or kind is None:
        return spec.low, spec.high
    return tuple(float(f"{to_unit(b, unit[0], kind):.12g}") for b in (spec.low, spec.high))


def first_si(field, default=None):
    """The SI value of a field, or of the first point of its sweep (``default`` for None)."""
    if field is None:
        return default
    return field.values[0] if isinstance(field, Axis) else field.si


def first_shown(field) -> str:
    """How the field, or the first point of its sweep, is written."""
    if isinstance(field, Axis):
        return str(field.shown[0])
    written_form = field.written if field.written is not None else field.si
    return (
        ", ".join(map(str, written_form)) if isinstance(written_form, tuple) else str(written_form)
    )


# --------------------------------------------------------------------------- editing
def with_fields(scenario, **fields):
    """``scenario`` with the named fields (file keys; None removes one) replaced
    (:meth:`~rheoline.scenario.description.Scenario.with_field` for each)."""
    for key, field in fields.items():
        scenario = scenario.with_field(key, field)
    return scenario


def with_tolerance(scenario, key: str, field):
    """``scenario`` with its tolerance ``key`` (a Value, or None to remove it) replaced."""
    return scenario.with_field(f"tolerance.{key}", field)


def with_part(scenario, index: int, part):
    """``scenario`` with part ``index`` (0-based) replaced by ``part``."""
    parts = list(scenario.parts)
    parts[index] = part
    return replace(scenario, parts=tuple(parts))


def part_with_field(part, key: str, field):
    """``part`` with field ``key`` (a Value or Axis, or None to remove it) replaced, in
    the schema's order of fields."""
    fields = {**part.fields, key: field}
    order = list(PART_FIELDS[part.type])
    kept = {k: fields[k] for k in order if fields.get(k) is not None}
    return replace(part, fields=kept)


def part_with_tolerance(part, key: str, percent):
    """``part`` with its ``key`` tolerance a relative half-width of ``percent`` (0 or None
    removes it)."""
    tolerance = dict(part.tolerance)
    tolerance.pop(key, None)
    if percent:
        text = written(f"part[1].tolerance.{key}", percent)
        kind, width = parsed(f"part[1].tolerance.{key}", text).si
        tolerance[key] = ToleranceWidth(kind, width, text)
    return replace(part, tolerance=tolerance)


# --------------------------------------------------------------------------- sweeps
def at_point(scenario, chosen=None):
    """``scenario`` at one point of its sweeps: each swept field at the index ``chosen``
    gives for its path (``{"part[3].gauge": 2}``), else at its first value.

    The result is for computing and showing, never for saving (its values carry no
    written form).
    """
    chosen = chosen or {}
    for path, axis in scenario.axes:
        scenario = scenario.with_field(path, Value(axis.values[chosen.get(path, 0)], None))
    return scenario


def without_points(scenario, path: str, indices):
    """``scenario`` whose swept field ``path`` no longer takes the values at ``indices``.

    The remaining values are written as a list (a range table cannot skip values).
    """
    from rheoline.scenario.written_values import written_form

    part_type = scenario.parts[int(path[5 : path.index("]")]) - 1].type if "[" in path else None
    axis = scenario.field(path)
    keep = [j for j in range(len(axis)) if j not in set(indices)]
    if isinstance(axis.written, tuple):
        text = [axis.written[j] for j in keep]
    else:
        spec = field_spec(path, part_type)
        text = [written_form(spec, axis.values[j]) for j in keep]
    return scenario.with_field(path, parsed(path, text, part_type))


def _items(scenario):
    for group in scenario.groups():
        yield from group.items()


def sweep_notes(scenario, chosen=None) -> list:
    """One phrase per swept field shown at one point: ``"head 50 cm (1 of 5)"``."""
    chosen = chosen or {}
    return [
        f"{path} {axis.shown[chosen.get(path, 0)]} ({chosen.get(path, 0) + 1} of {len(axis)})"
        for path, axis in scenario.axes
    ]


def field_words(path: str, field) -> str:
    """``"volume 500 mL"``: a field's path and how it is written."""
    if isinstance(field, Axis):
        return f"{path} {', '.join(map(str, field.shown))}"
    return f"{path} {first_shown(field)}"


def unshown_fields(scenario, shown) -> list:
    """The scenario-level fields a view shows no control for, as ``"path written"``
    phrases: every given field whose file key (``"volume"``, ``"tolerance.seed"``,
    ``"notes"``) is not in ``shown``.  Part fields are the parts editor's business."""
    out = [field_words(k, v) for k, v in _items(scenario) if k not in shown]
    if scenario.tolerance is not None:
        out += [
            field_words(f"tolerance.{k}", v)
            for k, v in scenario.tolerance.items()
            if f"tolerance.{k}" not in shown
        ]
    if scenario.notes and "notes" not in shown:
        out.append("notes")
    return out
