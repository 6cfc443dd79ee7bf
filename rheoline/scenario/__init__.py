"""The scenario layer: scenario files, comparison tables and review packs.

- :mod:`rheoline.scenario.files`: read, validate, expand (sweeps) and write scenario files.
- :mod:`rheoline.scenario.compare`: solve a scenario set into a pandas table; rank and filter.
- :mod:`rheoline.scenario.export`: write a review pack (CSV, XLSX, HTML, the scenario file).

Units are parsed here (with pint, through :mod:`rheoline.units`) and nowhere in the model.
Import the submodules directly, e.g. ``from rheoline.scenario.files import load_scenarios``.
"""
