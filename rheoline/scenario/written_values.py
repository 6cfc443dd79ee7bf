"""Values built in code, and the text a file holds for them (the reverse of reading).

:func:`written_form` gives what a file holds for an SI value of a field (in the field's
unit); :func:`value_of`, :func:`axis_of` and :func:`width_of` build the description's
:class:`~rheoline.scenario.description.Value`, ``Axis`` and ``ToleranceWidth`` from SI
numbers, checked as a file's text would be (through :mod:`rheoline.scenario.values`).

Examples
--------
>>> value_of("head", 1.2)
Value(si=1.2, written='1.2 m')
"""

from __future__ import annotations

from rheoline.errors import ScenarioError
from rheoline.scenario.description import Axis, ToleranceWidth, Value
from rheoline.scenario.schema import KIND_OF, FieldSpec, field_spec
from rheoline.scenario.values import Where, parse_field, parse_scalar
from rheoline.units import to_unit

__all__ = ["written_form", "value_of", "axis_of", "width_of"]


def written_form(spec: FieldSpec, si):
    """What a file holds for the SI value ``si`` of a field of ``spec``.

    Names, gauges and plain numbers as they are; fractions as numbers; quantities in the
    field's unit with 12 significant digits (``"80 cm"`` style); a list of quantities as a
    list.

    >>> from rheoline.scenario.schema import SCENARIO_FIELDS
    >>> from rheoline.units import MMHG
    >>> written_form(SCENARIO_FIELDS["source_pressure"], 300 * MMHG)
    '300 mmHg'
    """
    if spec.kind == "quantity_list":
        element = FieldSpec(spec.element_kind, spec.unit)
        return [written_form(element, v) for v in si]
    if spec.kind == "temperature_delta":
        return f"{float(si):.12g} degC"
    if spec.kind == "tolerance_value":
        kind, width = si
        if kind == "relative":
            return f"{width * 100:.12g} %"
        return f"{float(to_unit(width, spec.unit, 'length')):.12g} {spec.unit}"
    kind = KIND_OF.get(spec.kind)
    if kind and spec.unit:
        return f"{float(to_unit(si, spec.unit, kind)):.12g} {spec.unit}"
    return si


def value_of(path: str, si, part_type: str | None = None) -> Value:
    """A :class:`Value` of the field at ``path`` from its SI value, as the writer writes it.

    The SI number is the one its written form reads back to, and it is checked against the
    field's range (a :class:`ScenarioError` naming the field otherwise).

    >>> value_of("part[1].inner_diameter", 1.1e-3, "tube")
    Value(si=0.0011, written='1.1 mm')
    """
    spec = field_spec(path, part_type)
    written = written_form(spec, si)
    return Value(parse_scalar(written, spec, Where("<code>"), path), _frozen_list(written))


def axis_of(path: str, values, part_type: str | None = None) -> Axis:
    """An :class:`Axis` of the field at ``path`` sweeping the SI ``values`` (a list as the
    writer writes it)."""
    spec = field_spec(path, part_type)
    written = [written_form(spec, v) for v in values]
    axis = parse_field(written, spec, Where("<code>"), path)
    if not isinstance(axis, Axis):
        raise ScenarioError("does not sweep; give one value", field=path)
    return axis


def width_of(path: str, kind: str, width: float) -> ToleranceWidth:
    """A part's :class:`ToleranceWidth` (``kind`` "relative" or "absolute" [m]) as the writer
    writes it, e.g. ``width_of("part[2].tolerance.inner_diameter", "relative", 0.05)``."""
    spec = field_spec(path)
    written = written_form(spec, (kind, width))
    parsed_kind, parsed = parse_scalar(written, spec, Where("<code>"), path)
    return ToleranceWidth(parsed_kind, parsed, written)


def _frozen_list(written):
    return tuple(written) if isinstance(written, list) else written
