"""The model objects behind a view: built from the scenario description by the scenario
layer's builder (:mod:`rheoline.scenario.build`), never by a view.

A view shows one point of a scenario (:func:`rheoline.widgets.edits.at_point`);
:func:`point_of` gives that point as the builder's one-point group, :func:`model_of` its
fluid, parts and line, and :func:`drive_of` the drive keywords of
:meth:`rheoline.model.line.Line.solve` as the scenario run passes them.  For a chart that
sweeps an input the builder is handed the same group with that input as an array:
:func:`fluid_at` (temperatures) and :func:`line_with_bores` (the bores of one part).

Examples
--------
>>> from rheoline.scenario.reading import example_path, load_scenarios
>>> sc = load_scenarios(example_path("minimal")).scenarios[0]
>>> point = point_of(sc)
>>> [p.name for p in model_of(point).parts]
['administration set', '18G catheter']
>>> sorted(drive_of(point))
['back_pressure', 'head', 'source_pressure']
"""

from __future__ import annotations

from dataclasses import replace

from rheoline.scenario.build import build, build_fluid, groups, point_group
from rheoline.scenario.description import PartSpec
from rheoline.widgets.edits import at_point, with_part

__all__ = ["SOURCE", "point_of", "model_of", "drive_of", "fluid_at", "line_with_bores"]

#: How the builder's messages name what the views built.
SOURCE = "<views>"


def point_of(scenario, chosen=None):
    """The builder's one-point group of ``scenario`` at one point of its sweeps (the first,
    or the indices ``chosen`` gives per swept path)."""
    return point_group(groups(at_point(scenario, chosen))[0], 0)


def model_of(point):
    """The fluid, parts, line and site context of a one-point group (the builder's
    ``Built``)."""
    return build(point, SOURCE)


def drive_of(point) -> dict:
    """Keyword arguments of :meth:`rheoline.model.line.Line.solve` for the group's drive
    [SI]: a prescribed flow (and its pressure limit), or a head and a source pressure; the
    back pressure either way (0 when not given)."""
    values = point.values
    drive = {"back_pressure": values.get("back_pressure", 0.0)}
    if "flow" in values:
        drive.update(flow=values["flow"], pressure_limit=values.get("pressure_limit"))
    else:
        drive.update(
            head=values.get("head", 0.0), source_pressure=values.get("source_pressure", 0.0)
        )
    return drive


def fluid_at(point, temperature_c):
    """The group's fluid at ``temperature_c`` [degC] (an array: one fluid per value)."""
    return build_fluid(
        replace(point, values={**point.values, "temperature": temperature_c}), SOURCE
    )


def line_with_bores(point, index: int, bores):
    """The group's line with part ``index`` (0-based) a lumen of the given bores [m]
    (an array) and the part's own length, roughness and name.

    A swept or sampled bore keeps the lumen without its catalogue wall, which only bounds a
    nominal part's bore (so the largest offered tolerance still computes).
    """
    nominal = model_of(point).parts[index]
    spec = PartSpec("tube", label=nominal.name)
    fields = {
        "inner_diameter": bores,
        "length": nominal.length,
        "roughness": getattr(nominal, "roughness", 0.0),
    }
    parts = [*point.parts]
    parts[index] = fields
    values = {k: v for k, v in point.values.items() if k != "vein_diameter"}  # no site here
    resized = replace(
        point, scenario=with_part(point.scenario, index, spec), values=values, parts=parts
    )
    return build(resized, SOURCE).line
