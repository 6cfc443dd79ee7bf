"""Check a scenario's tolerances against its nominal values before anything is solved.

The tolerance step (:func:`rheoline.scenario.steps.tolerance_band`) samples each part's
bore and length and the fluid's temperature, hematocrit and viscosity around the case's
nominal values.  What would make it fail, or make it quietly sample nothing, is refused
here already, so that ``rheoline check`` accepts exactly what ``rheoline run`` solves:

* a bore or length half-width whose draws reach zero or less at some point of the sweep
  (by the model's own reach, :func:`rheoline.model.tolerance.tolerance_reach`: the
  half-width, or 1.5 times it for a truncated normal), an absolute width included;
* a hematocrit half-width that draws outside 0 to 0.95, or any hematocrit half-width for
  a fluid without red cells;
* a tolerance on a part the model does not sample (a fitting or a measured part);
* a tolerance table that gives no half-width at all.

Examples
--------
>>> from rheoline.scenario.reading import loads_scenarios
>>> from rheoline.scenario.build import check_scenarios
>>> text = '''format_version = 1
... [[scenario]]
... name = "a"
... fluid = "water"
... head = "1 m"
... [[scenario.part]]
... type = "tube"
... inner_diameter = "1 mm"
... length = "1 m"
... tolerance = { inner_diameter = "1.5 mm" }
... '''
>>> check_scenarios(loads_scenarios(text))
Traceback (most recent call last):
...
rheoline.errors.ScenarioError: <string>, scenario 'a', field 'part[1].tolerance.inner_diameter': \
half-width '1.5 mm' with a uniform spread draws inner_diameter values of zero or less (the \
nominal is 1 mm); pass a half-width below 1 mm
"""

from __future__ import annotations

import numpy as np

from rheoline.errors import RheolineError, ScenarioError
from rheoline.scenario.values import shown

__all__ = ["check_tolerances"]

#: Part types whose bore and length the tolerance model samples (lumens).
SAMPLED_PART_TYPES = ("tube", "catheter", "needle", "cannula", "set")


def check_tolerances(group, fl, parts, source):
    """Refuse the tolerances of sweep group ``group`` (its fluid ``fl`` and model
    ``parts`` built) that the tolerance step could not sample; a ScenarioError names the
    file, the scenario and the field."""
    sc = group.scenario
    if not sc.has_tolerance:
        return
    tol = sc.tolerance
    distribution = tol.get("distribution", "uniform") if tol is not None else "uniform"
    at = {"source": source, "scenario": repr(sc.name)}
    widths = 0
    for j, (spec, part) in enumerate(zip(sc.parts, parts, strict=True), start=1):
        for key, width in spec.tolerance.items():
            if spec.type not in SAMPLED_PART_TYPES:
                raise ScenarioError(
                    f"a {spec.type} part's {key} is not sampled (only the bores and lengths of "
                    f"{', '.join(SAMPLED_PART_TYPES)} parts are); remove this tolerance",
                    field=f"part[{j}].tolerance.{key}",
                    **at,
                )
            _check_part_width(key, width, getattr(part, key), distribution, j, at)
            widths += width.width > 0
    if tol is not None:
        widths += _check_fluid_widths(tol, fl, distribution, at)
    if not widths:
        raise ScenarioError(
            "gives no half-width to sample; add temperature, viscosity or (for blood) "
            "hematocrit to the scenario's tolerance, or a part's tolerance of inner_diameter "
            "or length, or remove the tolerance table",
            field="tolerance",
            **at,
        )


def _check_part_width(key, width, nominal, distribution, j, at):
    from rheoline.model.tolerance import tolerance_reach

    nominal = np.asarray(nominal, dtype=float)
    reach = tolerance_reach(width.fraction_of(nominal), distribution)
    if np.all(reach < 1.0):
        return
    scale, unit = (1e3, "mm") if key == "inner_diameter" else (1.0, "m")
    smallest = float(np.min(nominal)) * scale
    limit = 1.0 / tolerance_reach(1.0, distribution)
    fix = f"{limit * 100:.3g} %" if width.kind == "relative" else f"{smallest * limit:.3g} {unit}"
    spread = "uniform" if distribution == "uniform" else "normal (truncated at 1.5 times it)"
    raise ScenarioError(
        f"half-width {shown(width.written or width.width)!r} with a {spread} spread draws "
        f"{key} values of zero or less (the nominal is {smallest:.4g} {unit}); pass a "
        f"half-width below {fix}",
        field=f"part[{j}].tolerance.{key}",
        **at,
    )


def _check_fluid_widths(tol, fl, distribution, at):
    """The number of the fluid's half-widths that are sampled; refuse a hematocrit one
    the fluid cannot take."""
    from rheoline.model.tolerance import check_hematocrit_reach

    h_tol = tol.get("hematocrit", 0.0)
    if h_tol > 0:
        if fl.hematocrit is None:
            raise ScenarioError(
                f"a hematocrit half-width needs a fluid with red cells; {fl.name!r} has none "
                "(remove it, or give this fluid a scenario of its own)",
                field="tolerance.hematocrit",
                **at,
            )
        try:
            check_hematocrit_reach(fl.hematocrit, h_tol, distribution)
        except RheolineError as exc:
            raise ScenarioError(str(exc), field="tolerance.hematocrit", **at) from None
    return sum(tol.get(k, 0.0) > 0 for k in ("temperature", "viscosity", "hematocrit"))
