"""Comparison runs: a validated scenario set solved into pandas tables (one import).

A facade over the modules that each hold one idea:

- :mod:`rheoline.scenario.build`: sweep groups and the model objects of a scenario
  (:func:`check_scenarios` builds them all and solves nothing);
- :mod:`rheoline.scenario.run`: :func:`run_scenarios`, the named steps (build, solve,
  tolerance, delivery, site, tabulate) and the frozen :class:`RunResult` with its
  :class:`Note` s;
- :mod:`rheoline.scenario.steps`, :mod:`rheoline.scenario.tables`: what the steps compute
  beyond one line solve, and the run's tables for people and programs;
- :mod:`rheoline.scenario.listings`: the fluid and part catalogues as tables, and
  :func:`smallest_reaching`, :func:`rank`, :func:`filter_cases`, :func:`within_limits`.

Examples
--------
>>> from rheoline.scenario.files import example_path, load_scenarios
>>> run = run_scenarios(load_scenarios(example_path("bench-sweep")))
>>> best = smallest_reaching(run.table, 100.0, **{"head [cm]": 100.0})
>>> best["case"].item()
'water, gauge x height | 100 cm, 16G'
"""

from __future__ import annotations

from rheoline.scenario.build import check_scenarios
from rheoline.scenario.listings import (
    filter_cases,
    fluid_table,
    parts_table,
    rank,
    smallest_reaching,
    within_limits,
)
from rheoline.scenario.run import (
    FLAG_WORDS,
    HEMOLYSIS_CONCERN_STRESS,
    PART_COLUMNS,
    TABLE_COLUMNS,
    Note,
    RunResult,
    run_scenarios,
)

# the column lists under their former names (the packs' tests build fake runs with them)
_COLUMNS, _PART_COLUMNS = TABLE_COLUMNS, PART_COLUMNS

__all__ = [
    "HEMOLYSIS_CONCERN_STRESS",
    "TABLE_COLUMNS",
    "PART_COLUMNS",
    "FLAG_WORDS",
    "Note",
    "RunResult",
    "check_scenarios",
    "run_scenarios",
    "smallest_reaching",
    "rank",
    "filter_cases",
    "within_limits",
    "fluid_table",
    "parts_table",
]
