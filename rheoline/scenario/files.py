"""Scenario files: one import for reading, validating, describing and writing them.

A facade over the modules that each hold one idea:

- :mod:`rheoline.scenario.description`: the frozen dataclasses of a scenario
  (:class:`ScenarioSet`, :class:`Scenario`, :class:`FluidSpec`, :class:`DriveSpec`,
  :class:`PartSpec`, :class:`ToleranceSpec`, :class:`DeliverySpec`, :class:`SiteSpec`,
  :class:`Value`, :class:`Axis`) and :func:`sweep_points`;
- :mod:`rheoline.scenario.schema`: what each field accepts (:class:`FieldSpec` tables), the
  limits, and :func:`fields_table` (``rheoline fields``);
- :mod:`rheoline.scenario.values`: one quantity, list or range table to SI and back;
- :mod:`rheoline.scenario.reading`: :func:`load_scenarios`, :func:`loads_scenarios`,
  :func:`parse_scenarios`, the shipped examples;
- :mod:`rheoline.scenario.writing`: :func:`dump_scenarios`, :func:`save_scenarios`.

The limits are read from :mod:`rheoline.scenario.schema` at each call; change them there.

Examples
--------
>>> s = load_scenarios(example_path("minimal"))
>>> [p.type for p in s.scenarios[0].parts], s.scenarios[0].drive.head.written
(['tube', 'catheter'], '100 cm')
>>> loads_scenarios(dump_scenarios(s)) == s
True
"""

from __future__ import annotations

from rheoline.scenario.description import (
    DEFAULT_TEMPERATURE_C,
    DEFAULT_TOLERANCE_SAMPLES,
    Axis,
    DeliverySpec,
    DriveSpec,
    FluidSpec,
    FrozenMap,
    PartSpec,
    Scenario,
    ScenarioSet,
    SiteSpec,
    ToleranceSpec,
    ToleranceWidth,
    Value,
    sweep_points,
)
from rheoline.scenario.field_listing import fields_table
from rheoline.scenario.reading import (
    example_names,
    example_path,
    load_scenarios,
    loads_scenarios,
    parse_scenarios,
)
from rheoline.scenario.schema import (
    FORMAT_VERSION,
    MAX_AXIS_VALUES,
    MAX_DEPTH,
    MAX_FILE_BYTES,
    MAX_FILE_TOLERANCE_SOLVES,
    MAX_PART_POINTS,
    MAX_PARTS,
    MAX_SCENARIOS,
    MAX_SWEEP_POINTS,
    MAX_TOLERANCE_SOLVES,
    MAX_TOTAL_POINTS,
    MAX_UNIT_SPELLINGS,
    PART_FIELDS,
    PART_TOLERANCE_FIELDS,
    PART_TYPES,
    SCENARIO_FIELDS,
    SCENARIO_TOLERANCE_FIELDS,
    TOP_FIELDS,
    FieldSpec,
)
from rheoline.scenario.writing import (
    OutputError,
    check_output_folder,
    dump_scenarios,
    output_error,
    save_scenarios,
    scenario_set_data,
)
from rheoline.scenario.written_values import axis_of, value_of, width_of

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
    "MAX_UNIT_SPELLINGS",
    "PART_TYPES",
    "TOP_FIELDS",
    "SCENARIO_FIELDS",
    "SCENARIO_TOLERANCE_FIELDS",
    "PART_FIELDS",
    "PART_TOLERANCE_FIELDS",
    "DEFAULT_TEMPERATURE_C",
    "DEFAULT_TOLERANCE_SAMPLES",
    "FieldSpec",
    "FrozenMap",
    "Value",
    "Axis",
    "FluidSpec",
    "DriveSpec",
    "DeliverySpec",
    "SiteSpec",
    "ToleranceSpec",
    "ToleranceWidth",
    "PartSpec",
    "Scenario",
    "ScenarioSet",
    "load_scenarios",
    "loads_scenarios",
    "parse_scenarios",
    "dump_scenarios",
    "save_scenarios",
    "scenario_set_data",
    "value_of",
    "axis_of",
    "width_of",
    "OutputError",
    "output_error",
    "check_output_folder",
    "sweep_points",
    "fields_table",
    "example_names",
    "example_path",
]
