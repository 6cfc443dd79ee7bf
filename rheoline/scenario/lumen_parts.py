"""Non-circular and multi-lumen parts in scenario files: checks and model builders.

A ``tube`` may give a ``shape`` (a cross-section of :mod:`rheoline.model.shapes`) and its
dimensions instead of an ``inner_diameter``; a ``multi-lumen`` part is one lumen of a
catalogue catheter whose lumen shapes are known
(:data:`rheoline.model.catalogue.MULTI_LUMEN_CATHETERS`); a ``central-line`` part is one
lumen of a catalogue central venous catheter (gauge-equivalent bore,
:data:`rheoline.model.catalogue.CENTRAL_LINE_LUMENS`); a ``check-valve`` is a one-way K
fitting (:class:`rheoline.model.parts.CheckValve`: one-way in a branched line, its K in a
line).

:func:`check_part` refuses, at reading time, what these parts cannot be (a shape without
its dimensions, a dimension of another shape, a catalogue entry that does not exist), each
with a :class:`~rheoline.errors.ScenarioError` naming the field;
:func:`build_lumen_part` turns the file's fields into the model part.

Examples
--------
>>> part = build_lumen_part("tube", {"shape": "d-shaped", "diameter": 3.0e-3, "length": 0.2}, None)
>>> part.name, round(part.laminar_f_re, 3)
('D-shaped 3 mm x 0.2 m', 15.767)
>>> build_lumen_part("central-line", {"lumen": "medial"}, None).name
'7 Fr 3-lumen central line, medial lumen (18G equivalent)'
"""

from __future__ import annotations

import numpy as np

from rheoline.model import catalogue
from rheoline.model.shapes import LUMEN_SHAPES
from rheoline.scenario.description import Axis
from rheoline.scenario.values import fail_unknown

__all__ = ["SHAPE_DIMENSIONS", "LUMEN_PART_TYPES", "check_part", "build_lumen_part"]

#: Per shape key, its file fields and the model argument each one fills; the first ones
#: up to the optional ones are required (see :data:`_OPTIONAL`).
SHAPE_DIMENSIONS = {
    "d-shaped": {"diameter": "diameter"},
    "annulus": {
        "outer_diameter": "outer_diameter",
        "core_diameter": "inner_diameter",
        "eccentricity": "eccentricity",
    },
    "crescent": {"outer_diameter": "outer_diameter", "core_diameter": "inner_diameter"},
    "rectangle": {"width": "width", "height": "height"},
}
#: Shape fields that may be left out (the model's default applies).
_OPTIONAL = {"eccentricity"}
_ALL_DIMENSIONS = tuple(dict.fromkeys(k for d in SHAPE_DIMENSIONS.values() for k in d))
#: Part types this module builds (besides shaped tubes).
LUMEN_PART_TYPES = ("multi-lumen", "central-line", "check-valve")
#: The defaults of a central line (french, lumens) when the file gives none.
_CENTRAL_DEFAULT = (7.0, 3)


def _names(value):
    return value.values if isinstance(value, Axis) else (value.si,)


# --------------------------------------------------------------------------- checks
def check_part(ptype, values, at, prefix):
    """Refuse a shaped tube or catalogue lumen that cannot be built (``at.fail``)."""
    if ptype == "tube":
        _check_shape(values, at, prefix)
    elif ptype == "multi-lumen":
        _check_multi_lumen(values, at, prefix)
    elif ptype == "central-line":
        _check_central_line(values, at, prefix)


def _check_shape(values, at, prefix):
    given = [k for k in _ALL_DIMENSIONS if k in values]
    if "shape" not in values:
        if given:
            at.fail(
                f"is a dimension of a non-circular lumen; add shape = "
                f"({', '.join(SHAPE_DIMENSIONS)}) or give inner_diameter only",
                prefix + given[0],
            )
        return
    shape = values["shape"].si
    if shape not in SHAPE_DIMENSIONS:
        after = " (a circular lumen gives inner_diameter instead)"
        fail_unknown(at, prefix + "shape", "shape", shape, list(SHAPE_DIMENSIONS), after=after)
    if "inner_diameter" in values:
        at.fail(
            f"{_a(shape)} lumen is given by its dimensions "
            f"({', '.join(SHAPE_DIMENSIONS[shape])}), not by inner_diameter; remove one",
            prefix + "inner_diameter",
        )
    own = SHAPE_DIMENSIONS[shape]
    for key in given:
        if key not in own:
            at.fail(
                f"is not a dimension of {_a(shape)} lumen (it takes {', '.join(own)})",
                prefix + key,
            )
    needed = [k for k in own if k not in _OPTIONAL]
    for key in needed:
        if key not in values:
            at.fail(f"is missing: {_a(shape)} lumen needs {' and '.join(needed)}", prefix + key)
    if "core_diameter" in own and "core_diameter" in values and "outer_diameter" in values:
        core = np.max(_names(values["core_diameter"]))
        bore = np.min(_names(values["outer_diameter"]))
        if core >= bore:
            at.fail(
                f"the core ({core * 1e3:g} mm) must be smaller than the outer_diameter "
                f"({bore * 1e3:g} mm) it lies in; check the two are not swapped",
                prefix + "core_diameter",
            )


def _a(word):
    """'an annulus', 'a crescent'."""
    return f"{'an' if word[0] in 'aeiou' else 'a'} {word}"


def _check_multi_lumen(values, at, prefix):
    table = catalogue.MULTI_LUMEN_CATHETERS
    for kind in _names(values["kind"]):
        if kind not in table:
            fail_unknown(at, prefix + "kind", "multi-lumen catheter", kind, list(table))
        lumens = table[kind]["lumens"]
        for lumen in _names(values["lumen"]):
            if lumen not in lumens:
                fail_unknown(at, prefix + "lumen", "lumen", lumen, list(lumens), f" of the {kind}")


def _check_central_line(values, at, prefix):
    frenches = _names(values["french"]) if "french" in values else (_CENTRAL_DEFAULT[0],)
    counts = _names(values["lumens"]) if "lumens" in values else (_CENTRAL_DEFAULT[1],)
    table = catalogue.CENTRAL_LINE_LUMENS
    for french in frenches:
        for count in counts:
            key = (float(french), int(count))
            if key not in table:
                sizes = ", ".join(f"{f:g} Fr {n}-lumen" for f, n in table)
                at.fail(
                    f"no {french:g} Fr {count}-lumen central line in the catalogue ({sizes}); "
                    "give the lumen as a tube of its bore instead",
                    prefix + ("french" if "french" in values else "lumens"),
                )
            for lumen in _names(values["lumen"]):
                if lumen not in table[key]:
                    of = f" of the {french:g} Fr {count}-lumen central line"
                    fail_unknown(at, prefix + "lumen", "lumen", lumen, list(table[key]), of)


# --------------------------------------------------------------------------- builders
def build_lumen_part(ptype, kw, name):
    """The model part of a shaped ``tube`` or of a type in :data:`LUMEN_PART_TYPES`.

    Parameters
    ----------
    ptype : str
        The file's part type.
    kw : dict
        The part's fields (file keys; SI values, arrays over a sweep group).
    name : str or None
        The part's label (None: the model names it).

    Returns
    -------
    rheoline.model.parts.Part
    """
    from rheoline.model import devices, parts

    kw = dict(kw)
    if ptype == "tube":
        shape_key = kw.pop("shape")
        dims = {arg: kw.pop(key) for key, arg in SHAPE_DIMENSIONS[shape_key].items() if key in kw}
        return parts.Tube(shape=LUMEN_SHAPES[shape_key](**dims), name=name, **kw)
    if ptype == "multi-lumen":
        return devices.multi_lumen_catheter_lumen(
            kw["kind"], kw["lumen"], length=kw.get("length"), name=name
        )
    if ptype == "central-line":
        return devices.central_line_lumen(
            kw["lumen"],
            french=float(kw.get("french", _CENTRAL_DEFAULT[0])),
            lumens=int(kw.get("lumens", _CENTRAL_DEFAULT[1])),
            length=kw.get("length", 0.20),
            name=name,
        )
    if ptype == "check-valve":
        return parts.CheckValve(name=name, **kw)
    raise KeyError(ptype)
