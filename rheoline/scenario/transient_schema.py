"""What a scenario file may hold for the time solve: the fields of the syringe pump, its rate
changes, an occlusion, injection ports and the parts' compliance.

The specs are written here once and built into the schema's tables by
:mod:`rheoline.scenario.schema` (this module imports nothing of the schema, so that the
schema can read it): each function takes the schema's spec factory and returns
``{file key: FieldSpec}``.

- :func:`scenario_fields`: keys of a ``[[scenario]]``: the syringe's group of single values
  (``syringe_compliance``, ``slack``, ``break_loose_pressure`` or ``break_loose_force``
  with ``barrel_diameter`` or ``syringe_size``; group ``"syringe"``, each may sweep), and
  the lists and tables read by :mod:`rheoline.scenario.transient_fields`
  (``syringe_compliance_pressures`` with ``syringe_compliance_values``, ``rate_changes``,
  ``duration``, the ``[scenario.occlusion]`` table and the ``[[scenario.port]]`` tables);
- :func:`lumen_fields`: a lumen's tubing ``compliance`` per metre, or its table
  (``compliance_pressures`` with ``compliance_values``);
- :func:`lumped_fields`: a fitting's or measured part's ``internal_volume`` and lumped
  ``compliance``;
- :func:`table_fields`: the fields of one rate change, of the occlusion, and of a port.

Limits: :data:`MAX_RATE_CHANGES` per pump, :data:`MAX_PORTS` per scenario,
:data:`MAX_COMPLIANCE_POINTS` per table, :data:`MAX_TRANSIENT_POINTS` sweep points of a
scenario that asks for the time solve.

Examples
--------
>>> from rheoline.scenario.schema import SCENARIO_FIELDS, TRANSIENT_TABLE_FIELDS
>>> SCENARIO_FIELDS["syringe_compliance"].unit, SCENARIO_FIELDS["syringe_compliance"].group
('uL/mmHg', 'syringe')
>>> TRANSIENT_TABLE_FIELDS["occlusion"]["alarm_pressure"].unit
'mmHg'
"""

from __future__ import annotations

__all__ = [
    "MAX_RATE_CHANGES",
    "MAX_PORTS",
    "MAX_COMPLIANCE_POINTS",
    "MAX_TRANSIENT_POINTS",
    "SYRINGE_KEYS",
    "TRANSIENT_KEYS",
    "PART_KEYS",
    "scenario_fields",
    "lumen_fields",
    "lumped_fields",
    "table_fields",
]

#: Most rate changes of one pump.
MAX_RATE_CHANGES = 20
#: Most injection ports of one scenario.
MAX_PORTS = 6
#: Most points of a compliance table.
MAX_COMPLIANCE_POINTS = 20
#: Most sweep points of a scenario that asks for the time solve (each point is a stiff solve
#: of its line in time; the group's points are solved together).
MAX_TRANSIENT_POINTS = 500

_MMHG = 133.322387415
_UL_PER_MMHG = 1e-9 / _MMHG
_DAY = 86400.0
_WEEK = 7 * _DAY
#: Largest flow of a pump [m^3/s] (the drive's own limit for ``flow``, 20 L/min).
_MAX_FLOW = 20e-3 / 60


def _syringe(spec):
    return {
        "syringe_compliance": spec(
            "compliance",
            "uL/mmHg",
            0.0,
            1000 * _UL_PER_MMHG,
            help="compliance of the main syringe (volume stored per pressure: stopper and "
            "barrel); asks for the time solve",
            group="syringe",
        ),
        "slack": spec(
            "volume",
            "uL",
            0.0,
            5e-6,
            help="pump slack: displacement lost to free play before the plunger moves",
            group="syringe",
        ),
        "break_loose_pressure": spec(
            "pressure",
            "mmHg",
            0.0,
            3000 * _MMHG,
            help="stopper break-loose as a rise of the syringe's pressure (or give "
            "break_loose_force with the syringe's barrel)",
            group="syringe",
        ),
        "break_loose_force": spec(
            "force",
            "N",
            0.0,
            500.0,
            help="stopper break-loose force; with barrel_diameter or syringe_size",
            group="syringe",
        ),
        "barrel_diameter": spec(
            "length",
            "mm",
            1e-3,
            0.06,
            help="inner diameter of the syringe's barrel (turns the break-loose force into a "
            "pressure)",
            group="syringe",
        ),
        "syringe_size": spec(
            "volume",
            "mL",
            1e-6,
            100e-6,
            help="nominal syringe volume (1, 3, 5, 10, 20, 30 or 50 mL): a typical barrel bore, "
            "from memory, instead of barrel_diameter",
            group="syringe",
        ),
    }


def _tables(spec):
    return {
        "syringe_compliance_pressures": spec(
            "quantity_list",
            "mmHg",
            0.0,
            60e5,
            sweep=False,
            help="the main syringe's compliance as a table: gauge pressures, with "
            "syringe_compliance_values",
            element_kind="pressure",
        ),
        "syringe_compliance_values": spec(
            "quantity_list",
            "uL/mmHg",
            1e-6 * _UL_PER_MMHG,
            1000 * _UL_PER_MMHG,
            sweep=False,
            help="the syringe's compliance at those pressures",
            element_kind="compliance",
        ),
        "rate_changes": spec(
            "rate_changes",
            sweep=False,
            help="changes of the pump's set rate in time: a list of { time, rate } (a step) or "
            "{ time, rate, ramp } (a ramp over that time)",
        ),
        "duration": spec(
            "time",
            "min",
            1.0,
            _WEEK,
            sweep=False,
            help="how long to solve in time (long enough for every change to settle when not "
            "given)",
        ),
        "occlusion": spec(
            "occlusion",
            sweep=False,
            help="[scenario.occlusion]: part, time, alarm_pressure, release",
        ),
        "port": spec(
            "ports",
            sweep=False,
            help="[[scenario.port]] tables: a drug pump joining the line at a part boundary",
        ),
    }


#: The syringe's group of the scenario keys, and the other scenario keys of the time solve.
SYRINGE_KEYS = tuple(_syringe(lambda *a, **k: None))
TRANSIENT_KEYS = tuple(_tables(lambda *a, **k: None))


def scenario_fields(spec):
    """The ``[[scenario]]`` keys of the time solve, built with the schema's ``spec``."""
    return {**_syringe(spec), **_tables(spec)}


def lumen_fields(spec):
    """A lumen's tubing compliance: per metre, constant or a table against pressure."""
    return {
        "compliance": spec(
            "tubing_compliance",
            "uL/mmHg/m",
            0.0,
            100 * _UL_PER_MMHG,
            help="tubing compliance per metre of this lumen (volume stored per pressure); for "
            "the time solve",
        ),
        "compliance_pressures": spec(
            "quantity_list",
            "mmHg",
            0.0,
            60e5,
            sweep=False,
            help="tubing compliance as a table: gauge pressures, with compliance_values",
            element_kind="pressure",
        ),
        "compliance_values": spec(
            "quantity_list",
            "uL/mmHg/m",
            1e-6 * _UL_PER_MMHG,
            100 * _UL_PER_MMHG,
            sweep=False,
            help="tubing compliance per metre at those pressures",
            element_kind="tubing_compliance",
        ),
    }


def lumped_fields(spec):
    """A fitting's or measured part's internal volume and lumped compliance."""
    return {
        "internal_volume": spec(
            "volume",
            "mL",
            0.0,
            1e-4,
            help="liquid the part holds (dead volume; counted as 0 when not given)",
        ),
        "compliance": spec(
            "compliance",
            "uL/mmHg",
            0.0,
            1000 * _UL_PER_MMHG,
            help="volume the part stores per pressure, for the time solve",
        ),
    }


#: Part fields of the time solve that the line engine's parts do not take.
PART_KEYS = ("compliance", "compliance_pressures", "compliance_values")


def _rate_change(spec):
    return {
        "time": spec("time", "min", 0.0, _WEEK, sweep=False, help="when the change begins"),
        "rate": spec("flow", "mL/h", 0.0, _MAX_FLOW, sweep=False, help="the new set rate"),
        "ramp": spec(
            "time",
            "min",
            0.0,
            _WEEK,
            sweep=False,
            help="how long the rate takes to go there in a straight line (a step when not given)",
        ),
    }


def _occlusion(spec):
    return {
        "part": spec("integer", None, 1, 1000, sweep=False, help="the occluded part (1 = first)"),
        "time": spec("time", "min", 0.0, _WEEK, sweep=False, help="when the occlusion begins"),
        "alarm_pressure": spec(
            "pressure",
            "mmHg",
            _MMHG,
            3000 * _MMHG,
            sweep=False,
            help="pressure at the syringe at which the pump alarms and stops",
        ),
        "release": spec(
            "time",
            "min",
            0.0,
            _WEEK,
            sweep=False,
            help="when the occlusion clears (at the alarm when not given)",
        ),
    }


def _port(spec):
    return {
        "label": spec("text", sweep=False, help="a short name of the port or its drug"),
        "boundary": spec(
            "integer",
            None,
            0,
            1000,
            sweep=False,
            help="where it joins: 0 at the syringe, k after part k",
        ),
        "flow": spec("flow", "mL/h", 1e-12, _MAX_FLOW, sweep=False, help="its pump's set rate"),
        "start": spec(
            "time", "min", 0.0, _WEEK, sweep=False, help="when its pump starts (0 when not given)"
        ),
        "rate_changes": spec(
            "rate_changes", sweep=False, help="changes of its pump's rate, as the main pump's"
        ),
        "concentration": spec(
            "concentration",
            "mg/mL",
            1e-12,
            1000.0,
            sweep=False,
            help="drug concentration in its syringe",
        ),
        "syringe_compliance": spec(
            "compliance",
            "uL/mmHg",
            0.0,
            1000 * _UL_PER_MMHG,
            sweep=False,
            help="compliance of its syringe (sitting at the port)",
        ),
        "slack": spec("volume", "uL", 0.0, 5e-6, sweep=False, help="its pump's slack"),
        "diffusivity": spec(
            "diffusivity",
            "m^2/s",
            1e-13,
            1e-7,
            sweep=False,
            help="the drug's diffusivity in the carrier (5e-10 m^2/s assumed when not given)",
        ),
    }


def table_fields(spec):
    """The fields of a rate change, of the occlusion and of a port: ``{table: {key: spec}}``."""
    return {
        "rate_change": _rate_change(spec),
        "occlusion": _occlusion(spec),
        "port": _port(spec),
    }
