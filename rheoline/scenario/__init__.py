"""The scenario layer: scenario files, comparison tables and review packs.

- :mod:`rheoline.scenario.description`: the one description of a scenario (frozen dataclasses).
- :mod:`rheoline.scenario.schema`, :mod:`~rheoline.scenario.values`,
  :mod:`~rheoline.scenario.reading`, :mod:`~rheoline.scenario.writing`: what a file may hold,
  one value to SI and back, reading (validation, sweeps) and writing scenario files;
  :mod:`rheoline.scenario.files` re-exports their public names.
- :mod:`rheoline.scenario.compare`: solve a scenario set into a pandas table; rank and filter.
- :mod:`rheoline.scenario.export`: write a review pack (CSV, XLSX, HTML, the scenario file).

Units are parsed here (with pint, through :mod:`rheoline.units`) and nowhere in the model.
Import the submodules directly, e.g. ``from rheoline.scenario.files import load_scenarios``.
"""
