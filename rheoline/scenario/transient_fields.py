"""Read and write the time solve's fields of a scenario file.

A scenario asks for the time solve (:func:`rheoline.model.transient.simulate_infusion`)
when it gives any of: the syringe's single values (``syringe_compliance``, ``slack``,
``break_loose_pressure`` or ``break_loose_force`` with ``barrel_diameter`` or
``syringe_size``), a syringe compliance table, ``rate_changes``, ``duration``, an
``[scenario.occlusion]``, ``[[scenario.port]]`` tables, or a part's ``compliance``.  Its
drive is then the syringe pump's set rate ``flow``, which starts at time 0::

    flow = ["0.5 mL/h", "5 mL/h"]
    syringe_compliance = "1.2 uL/mmHg"
    slack = "25 uL"
    break_loose_force = "6 N"
    syringe_size = "50 mL"
    rate_changes = [ { time = "90 min", rate = "2 mL/h", ramp = "5 min" } ]

    [scenario.occlusion]
    part = 2
    time = "30 min"
    alarm_pressure = "300 mmHg"

    [[scenario.port]]
    label = "drug"
    boundary = 1
    flow = "0.3 mL/h"
    start = "60 min"
    concentration = "0.2 mg/mL"

:func:`parse_transient` reads them into the description (a
:class:`~rheoline.scenario.description.SyringeSpec` and a
:class:`~rheoline.scenario.transient_spec.TransientSpec`), :func:`check_transient` checks
what needs the whole scenario (the drive, the parts' numbers, the sweep's size), and
:func:`transient_data` writes them back as the file holds them.  Every problem raises one
:class:`~rheoline.errors.ScenarioError` naming the file, the scenario and the field's path
(``occlusion.part``, ``port[2].flow``, ``rate_changes[1].time``, ``part[1].compliance``).

Examples
--------
>>> from rheoline.scenario.reading import loads_scenarios
>>> s = loads_scenarios('''
... format_version = 1
... [[scenario]]
... name = "x"
... fluid = "water"
... flow = "1 mL/h"
... syringe_compliance = "1 uL/mmHg"
... rate_changes = [{ time = "1 h", rate = "2 mL/h" }]
... [[scenario.part]]
... type = "tube"
... inner_diameter = "0.5 mm"
... length = "1.5 m"
... ''').scenarios[0]
>>> s.asks_time_solve, s.transient.rate_changes[0].time.si
(True, 3600.0)
>>> transient_data(s)["rate_changes"]
[{'time': '1 h', 'rate': '2 mL/h'}]
"""

from __future__ import annotations

import math

from rheoline.model.catalogue import SYRINGE_BARRELS
from rheoline.scenario import transient_schema as limits
from rheoline.scenario.description import SyringeSpec, Value
from rheoline.scenario.schema import SCENARIO_FIELDS, TRANSIENT_TABLE_FIELDS
from rheoline.scenario.transient_spec import (
    OcclusionSpec,
    PortSpec,
    RateChangeSpec,
    TransientSpec,
)
from rheoline.scenario.values import check_keys, check_text, parse_field, type_name
from rheoline.scenario.written_values import written_form

__all__ = ["parse_transient", "check_transient", "transient_data", "port_data", "barrel_of"]

_RATE_FIELDS = TRANSIENT_TABLE_FIELDS["rate_change"]
_OCCLUSION_FIELDS = TRANSIENT_TABLE_FIELDS["occlusion"]
_PORT_FIELDS = TRANSIENT_TABLE_FIELDS["port"]
_TABLE_KEYS = ("syringe_compliance_pressures", "syringe_compliance_values")


# --------------------------------------------------------------------------- reading
def parse_transient(raw, values, parts, at):
    """``(syringe, transient)`` of a ``[[scenario]]`` table ``raw`` whose single values are
    ``values`` (file key -> Value or Axis) and whose parts are ``parts``; each None when not
    given."""
    given = {k: v for k, v in values.items() if k in limits.SYRINGE_KEYS}
    syringe = SyringeSpec.from_keys(given) if given else None
    if syringe is not None:
        _check_syringe(syringe, at)
    for j, part in enumerate(parts, start=1):
        _check_table(
            part.fields,
            "compliance",
            "compliance_pressures",
            "compliance_values",
            at,
            f"part[{j}].",
        )
    present = [k for k in limits.TRANSIENT_KEYS if k in raw]
    if not present:
        return syringe, None
    fields = {}
    if any(k in raw for k in _TABLE_KEYS):
        table = {k: parse_field(raw[k], SCENARIO_FIELDS[k], at, k) for k in _TABLE_KEYS if k in raw}
        _check_table({**table, **given}, "syringe_compliance", *_TABLE_KEYS, at, "", required=True)
        fields.update(table)
    if "rate_changes" in raw:
        fields["rate_changes"] = _rate_changes(raw["rate_changes"], at, "rate_changes", 0.0)
    if "duration" in raw:
        fields["duration"] = parse_field(
            raw["duration"], SCENARIO_FIELDS["duration"], at, "duration"
        )
    if "occlusion" in raw:
        fields["occlusion"] = _occlusion(raw["occlusion"], at)
    if "port" in raw:
        fields["ports"] = _ports(raw["port"], at)
    return syringe, TransientSpec(**fields)


def _check_syringe(syringe, at):
    """Break-loose as a pressure or as a force on a barrel, never both; a barrel given once."""
    force, bore, size = syringe.break_loose_force, syringe.barrel_diameter, syringe.syringe_size
    if force is not None and syringe.break_loose_pressure is not None:
        at.fail(
            "give the stopper's break-loose as break_loose_pressure or as break_loose_force "
            "(with the barrel), not both",
            "break_loose_force",
        )
    if bore is not None and size is not None:
        at.fail("give barrel_diameter or syringe_size, not both", "syringe_size")
    if force is not None and bore is None and size is None:
        at.fail(
            'needs the barrel it acts on: barrel_diameter = "26.6 mm" or syringe_size = "50 mL"',
            "break_loose_force",
        )
    if force is None and (bore is not None or size is not None):
        key = "barrel_diameter" if bore is not None else "syringe_size"
        at.fail(
            'applies to break_loose_force only; add break_loose_force = "..." or remove it', key
        )
    if size is not None:
        for v in _points(size):
            if barrel_of(v) is None:
                sizes = ", ".join(f"{s * 1e6:g} mL" for s in SYRINGE_BARRELS)
                at.fail(
                    f"{v * 1e6:g} mL is not a syringe size known here ({sizes}); give "
                    "barrel_diameter for another syringe",
                    "syringe_size",
                )


def barrel_of(size):
    """The typical barrel bore [m] of a syringe of nominal volume ``size`` [m^3] (within 1 %
    of a size of :data:`rheoline.model.catalogue.SYRINGE_BARRELS`), or None."""
    for nominal, bore in SYRINGE_BARRELS.items():
        if math.isclose(size, nominal, rel_tol=1e-2):
            return bore
    return None


def _points(field):
    return (
        field.values if hasattr(field, "values") and not isinstance(field, Value) else (field.si,)
    )


def _check_table(fields, constant, pressures, compliances, at, prefix, required=False):
    """A compliance is a constant or a table of pressures and values, never both; a table
    has one value per pressure (2 to 20 points), pressures strictly increasing."""
    table = [k for k in (pressures, compliances) if k in fields]
    if not table and not required:
        return
    if constant in fields and table:
        at.fail(
            f"give {constant} or the table {pressures} with {compliances}, not both",
            prefix + table[0],
        )
    if len(table) == 1:
        missing = compliances if table[0] == pressures else pressures
        at.fail(f"a compliance table needs both {pressures} and {compliances}", prefix + missing)
    p, c = fields[pressures].si, fields[compliances].si
    if len(p) != len(c):
        at.fail(
            f"has {len(c)} values but {pressures} has {len(p)}; give one per pressure",
            prefix + compliances,
        )
    if not 2 <= len(p) <= limits.MAX_COMPLIANCE_POINTS:
        at.fail(
            f"a compliance table needs 2 to {limits.MAX_COMPLIANCE_POINTS} points, got {len(p)}",
            prefix + pressures,
        )
    if any(b <= a for a, b in zip(p[:-1], p[1:], strict=True)):
        at.fail("pressures must strictly increase; sort them and drop repeats", prefix + pressures)


def _table(raw, specs, at, path, example):
    if not isinstance(raw, dict):
        at.fail(f"must be a table such as {example}, got {type_name(raw)}", path)
    check_keys(raw, specs, at, path + ".")
    return {
        k: parse_field(v, specs[k], at, f"{path}.{k}")
        for k, v in raw.items()
        if k != "label" and k != "rate_changes"
    }


def _required(table, keys, at, path):
    for key in keys:
        if key not in table:
            at.fail(
                f"is missing; the {path.split('[')[0]} needs {', '.join(keys)}", f"{path}.{key}"
            )


def _rate_changes(raw, at, path, start):
    """The rate changes of one pump, in time order, each after the one before is complete."""
    example = '[{ time = "60 min", rate = "2 mL/h" }]'
    if not isinstance(raw, list):
        at.fail(f"must be a list of tables such as {example}, got {type_name(raw)}", path)
    if len(raw) > limits.MAX_RATE_CHANGES:
        at.fail(f"{len(raw)} rate changes is above the limit of {limits.MAX_RATE_CHANGES}", path)
    out, done = [], start
    for j, entry in enumerate(raw, start=1):
        here = f"{path}[{j}]"
        table = _table(entry, _RATE_FIELDS, at, here, '{ time = "60 min", rate = "2 mL/h" }')
        _required(table, ("time", "rate"), at, here)
        change = RateChangeSpec(**table)
        if change.time.si < done:
            what = "the change before it is complete" if out else "its pump starts"
            at.fail(
                f"begins at {change.time.si / 60:g} min, before {what} ({done / 60:g} min); "
                "list the changes in time order",
                f"{here}.time",
            )
        out.append(change)
        done = change.end
    return tuple(out)


def _occlusion(raw, at):
    table = _table(
        raw,
        _OCCLUSION_FIELDS,
        at,
        "occlusion",
        '{ part = 2, time = "30 min", alarm_pressure = "300 mmHg" }',
    )
    _required(table, ("part", "time", "alarm_pressure"), at, "occlusion")
    occlusion = OcclusionSpec(**table)
    if occlusion.release is not None and occlusion.release.si <= occlusion.time.si:
        at.fail(
            f"the occlusion clears at {occlusion.release.si / 60:g} min, not after it begins "
            f"({occlusion.time.si / 60:g} min); give a later release",
            "occlusion.release",
        )
    return occlusion


def _ports(raw, at):
    if not isinstance(raw, list) or not raw:
        at.fail(
            f"must be a non-empty list of [[scenario.port]] tables, got {type_name(raw)}", "port"
        )
    if len(raw) > limits.MAX_PORTS:
        at.fail(f"{len(raw)} ports is above the limit of {limits.MAX_PORTS}", "port")
    out = []
    for j, entry in enumerate(raw, start=1):
        here = f"port[{j}]"
        table = _table(
            entry,
            _PORT_FIELDS,
            at,
            here,
            '{ boundary = 1, flow = "0.5 mL/h", concentration = "1 mg/mL" }',
        )
        _required(table, ("boundary", "flow", "concentration"), at, here)
        label = check_text(entry.get("label", ""), at, f"{here}.label", _max_name())
        start = table["start"].si if "start" in table else 0.0
        changes = ()
        if "rate_changes" in entry:
            changes = _rate_changes(entry["rate_changes"], at, f"{here}.rate_changes", start)
        out.append(PortSpec(**table, label=label, rate_changes=changes))
    return tuple(out)


def _max_name():
    from rheoline.scenario.schema import MAX_NAME_CHARS

    return MAX_NAME_CHARS


# --------------------------------------------------------------------------- whole scenario
def check_transient(sc, at):
    """What needs the whole scenario: a syringe pump's drive, parts and boundaries that
    exist, a run long enough for the occlusion, and a sweep within the time solve's limit."""
    if not sc.asks_time_solve:
        return
    first = _first_key(sc)
    if sc.mode != "flow":
        at.fail(
            "asks for the time solve of a syringe pump's line; give the pump's set rate "
            'flow = "..." as its drive (not head or source_pressure)',
            first,
        )
    if sc.n_points > limits.MAX_TRANSIENT_POINTS:
        at.fail(
            f"a scenario with the time solve sweeps {sc.n_points} points, above the limit of "
            f"{limits.MAX_TRANSIENT_POINTS}; sweep fewer values",
            first,
        )
    spec = sc.transient
    if spec is None:
        return
    n = len(sc.parts)
    if spec.occlusion is not None and not 1 <= spec.occlusion.part.si <= n:
        at.fail(
            f"part {spec.occlusion.part.si} is not one of the line's parts (1 to {n})",
            "occlusion.part",
        )
    for j, port in enumerate(spec.ports, start=1):
        if not 0 <= port.boundary.si <= n:
            at.fail(
                f"boundary {port.boundary.si} is not in the line: 0 (at the syringe) to {n} "
                "(after the last part)",
                f"port[{j}].boundary",
            )
    if spec.occlusion is not None and spec.duration is not None:
        if spec.occlusion.time.si > spec.duration.si:
            at.fail(
                f"the occlusion begins at {spec.occlusion.time.si / 60:g} min, after the end of "
                f"the solve ({spec.duration.si / 60:g} min); lengthen duration",
                "occlusion.time",
            )


def _first_key(sc):
    """The file key that first asks for the time solve (for messages)."""
    if sc.syringe is not None:
        return next(k for k, _ in sc.syringe.items())
    if sc.transient is not None:
        spec = sc.transient
        names = {"rate_changes": "rate_changes", "ports": "port", "occlusion": "occlusion"}
        for attribute, key in names.items():
            if getattr(spec, attribute):
                return key
        return next(k for k in ("duration", *_TABLE_KEYS) if getattr(spec, k) is not None)
    j = next(
        j
        for j, p in enumerate(sc.parts, start=1)
        if p.fields.keys() & {"compliance", "compliance_values"}
    )
    return f"part[{j}].compliance"


# --------------------------------------------------------------------------- writing
def _plain(value, spec):
    if value.written is None:
        return written_form(spec, value.si)
    return list(value.written) if isinstance(value.written, tuple) else value.written


def _changes_data(changes):
    return [{k: _plain(v, _RATE_FIELDS[k]) for k, v in c.items()} for c in changes]


def port_data(port):
    """One port as its ``[[scenario.port]]`` table."""
    out = {"label": port.label} if port.label else {}
    out.update((k, _plain(v, _PORT_FIELDS[k])) for k, v in port.items())
    if port.rate_changes:
        out["rate_changes"] = _changes_data(port.rate_changes)
    return out


def transient_data(sc):
    """The scenario keys of ``sc.transient`` as the file holds them ({} when none)."""
    spec = sc.transient
    if spec is None:
        return {}
    out = {}
    for key in (*_TABLE_KEYS, "duration"):
        if getattr(spec, key) is not None:
            out[key] = _plain(getattr(spec, key), SCENARIO_FIELDS[key])
    if spec.rate_changes:
        out["rate_changes"] = _changes_data(spec.rate_changes)
    if spec.occlusion is not None:
        out["occlusion"] = {k: _plain(v, _OCCLUSION_FIELDS[k]) for k, v in spec.occlusion.items()}
    if spec.ports:
        out["port"] = [port_data(p) for p in spec.ports]
    return out
