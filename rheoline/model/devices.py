"""Catalogue devices: catheters, needles, cannulas, sets, circuit tubing and catheter lumens.

Each device is a :class:`~rheoline.model.parts.Lumen` whose bore and length default to the
typical nominal sizes of :mod:`rheoline.model.catalogue` (marked "from memory" there); pass
the measured inner diameter and length of the actual part where known.  Multi-lumen
catheters whose lumen shapes are known (double-D dialysis catheters) give each lumen its
own cross-section (:mod:`rheoline.model.shapes`); the others keep a circle of the
gauge-equivalent bore (:func:`central_line_lumen`).

Examples
--------
>>> cath = Catheter(gauge=18)
>>> cath.name, round(cath.inner_diameter * 1e3, 2), round(cath.length * 1e3)
('18G catheter', 1.0, 45)
>>> Needle(gauge=22).inner_diameter
0.00039
"""

from __future__ import annotations

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model import catalogue
from rheoline.model.parts import _DEVICE_NAMES, Lumen, Tube, _lookup, _mm, _size_text, _value
from rheoline.model.shapes import LUMEN_SHAPES
from rheoline.model.validation import check_positive

#: The public names (``parts`` re-exports the same list, where they used to live).
__all__ = list(_DEVICE_NAMES)


def _one_size(gauge, what, sweep):
    """A catalogue key must be one size: reject arrays and lists with how to sweep sizes."""
    if np.ndim(gauge) != 0 or isinstance(gauge, (list, tuple, set, dict)):
        raise InputRangeError(
            f"{what} must be one catalogue size (e.g. 18), got {gauge!r}. For several sizes "
            f"build one part per size ({sweep}), or sweep the bore of one part with "
            "inner_diameter=np.array([...]) [m] (and length)"
        )
    if isinstance(gauge, (np.ndarray, np.generic)):
        gauge = gauge.item()
    if isinstance(gauge, float) and gauge.is_integer():
        gauge = int(gauge)
    return gauge


def _check_bore_inside(label, inner_diameter, outer_diameter):
    """A measured bore must lie inside the catalogue outer diameter of the size."""
    if inner_diameter is None:
        return
    d = check_positive("inner_diameter", inner_diameter, "m")
    if np.any(d >= outer_diameter):
        raise InputRangeError(
            f"inner_diameter {_mm(d)} of a {label} reaches its typical outer diameter "
            f"{_mm(outer_diameter)} (catalogue, from memory); pass a smaller measured bore, or "
            "a Tube(inner_diameter=..., length=...) for a part of another size"
        )


def _catheter_dims(gauge, inner_diameter, length):
    od, id_typ, len_typ, _ = _lookup(
        catalogue.CATHETER_GAUGES,
        gauge,
        "catheter gauge",
        "pass inner_diameter and length in metres for other sizes",
    )
    return (
        od,
        (id_typ if inner_diameter is None else inner_diameter),
        (len_typ if length is None else length),
    )


class Catheter(Lumen):
    """A peripheral or central catheter by gauge (typical nominal dimensions, from memory).

    Parameters
    ----------
    gauge : int
        14, 16, 18, 20, 22, 24 or 26.
    inner_diameter, length : float or array_like, optional
        Measured values [m]; default the catalogue's typical values.
    name : str, optional

    Examples
    --------
    >>> c = Catheter(gauge=20, length=0.025)
    >>> round(c.outer_diameter * 1e3, 1), c.length
    (1.1, 0.025)
    """

    def __init__(self, gauge, inner_diameter=None, length=None, name=None, roughness=0.0):
        gauge = _one_size(
            gauge, "catheter gauge", "[Catheter(gauge=g) for g in (18, 20)], a Line each"
        )
        od, d, length = _catheter_dims(gauge, inner_diameter, length)
        _check_bore_inside(f"{gauge}G catheter", inner_diameter, od)
        object.__setattr__(self, "gauge", gauge)
        if inner_diameter is None or length is None:
            object.__setattr__(
                self,
                "source_note",
                "typical catalogue bore/length (from memory); pass the measured "
                "inner_diameter and length",
            )
        super().__init__(
            inner_diameter=d,
            length=length,
            roughness=roughness,
            name=name or f"{gauge}G catheter",
            outer_diameter=od,
        )


class Needle(Lumen):
    """A hypodermic needle by gauge and wall type (ISO 9626 nominal sizes, from memory).

    The inner diameter defaults to ISO 9626's *minimum* for the wall type, so the flow
    is a low estimate; pass the measured bore where known.

    Parameters
    ----------
    gauge : int
        14 to 30.
    wall : {"regular", "thin"}
    length : float or array_like
        [m]; default 0.038 (1.5 inch, a common length; common practice, no source).
    inner_diameter : float, optional
        Measured bore [m].
    name : str, optional

    Examples
    --------
    >>> n = Needle(gauge=18, wall="thin")
    >>> n.name, round(n.inner_diameter * 1e3, 2)
    ('18G thin-wall needle', 0.91)
    """

    def __init__(
        self, gauge, wall="regular", length=0.038, inner_diameter=None, name=None, roughness=0.0
    ):
        if wall not in catalogue.NEEDLE_WALLS:
            raise InputRangeError(
                f"needle wall {wall!r} is not known; choose one of "
                f"{', '.join(catalogue.NEEDLE_WALLS)}, or pass inner_diameter"
            )
        gauge = _one_size(gauge, "needle gauge", "[Needle(gauge=g) for g in (18, 20)], a Line each")
        od, id_regular, id_thin = _lookup(
            catalogue.NEEDLE_GAUGES,
            gauge,
            "needle gauge",
            "pass inner_diameter in metres for other sizes",
        )
        d = (
            (id_regular if wall == "regular" else id_thin)
            if inner_diameter is None
            else inner_diameter
        )
        _check_bore_inside(f"{gauge}G needle", inner_diameter, od)
        object.__setattr__(self, "gauge", gauge)
        object.__setattr__(self, "wall", wall)
        if inner_diameter is None:
            object.__setattr__(
                self,
                "source_note",
                "ISO 9626 minimum bore (from memory), a low flow estimate; pass "
                "the measured inner_diameter",
            )
        super().__init__(
            inner_diameter=d,
            length=length,
            roughness=roughness,
            name=name or f"{gauge}G {wall}-wall needle",
            outer_diameter=od,
        )


class Cannula(Lumen):
    """A cannula or sheath by French size (outer diameter = French / 3 mm), or by its bore.

    The inner diameter is the user's, or the outer diameter less twice ``wall_thickness``
    (default :data:`~rheoline.model.catalogue.CANNULA_TYPICAL_WALL`, typical, from memory).
    A cannula given by ``inner_diameter`` alone has no known outer diameter (None).

    Parameters
    ----------
    french : float, optional
        Size [Fr], > 0; needed unless ``inner_diameter`` is given.
    inner_diameter : float, optional
        [m].
    wall_thickness : float, optional
        [m]; with ``french`` only.
    length : float or array_like
        [m]; default 0.15 (typical, from memory).
    name : str, optional

    Examples
    --------
    >>> c = Cannula(french=21, wall_thickness=0.5e-3, length=0.2)
    >>> round(c.outer_diameter * 1e3, 2), round(c.inner_diameter * 1e3, 2)
    (7.0, 6.0)
    >>> Cannula(inner_diameter=2e-3, length=0.1).name
    'cannula 2 mm x 0.1 m'
    """

    def __init__(
        self,
        french=None,
        inner_diameter=None,
        wall_thickness=None,
        length=0.15,
        name=None,
        roughness=0.0,
    ):
        if french is None:
            _bore_only_cannula(self, inner_diameter, wall_thickness, length, name, roughness)
            return
        fr = check_positive("french", french, "Fr")
        od = fr * catalogue.FRENCH_TO_METRE
        if inner_diameter is None:
            if wall_thickness is None:
                object.__setattr__(
                    self,
                    "source_note",
                    "typical wall thickness (from memory) sets the bore; pass "
                    "inner_diameter or wall_thickness",
                )
            wall = catalogue.CANNULA_TYPICAL_WALL if wall_thickness is None else wall_thickness
            wall = check_positive("wall_thickness", wall, "m")
            inner_diameter = od - 2.0 * wall
            if np.any(inner_diameter <= 0):
                raise InputRangeError(
                    f"wall_thickness {float(np.max(wall)) * 1e3:g} mm leaves no bore in a "
                    f"{float(np.min(fr)):g} Fr cannula; pass inner_diameter instead",
                    field="wall_thickness",
                    value=wall_thickness,
                )
        object.__setattr__(self, "french", _value(fr))
        super().__init__(
            inner_diameter=inner_diameter,
            length=length,
            roughness=roughness,
            name=name or (f"{_value(fr):g} Fr cannula" if np.ndim(fr) == 0 else "cannula"),
            outer_diameter=_value(od),
        )


def _bore_only_cannula(part, inner_diameter, wall_thickness, length, name, roughness):
    """Fill a :class:`Cannula` given by its bore (no French size: no outer diameter)."""
    if inner_diameter is None:
        raise InputRangeError(
            "Cannula needs french (its size) or inner_diameter [m] (its bore), e.g. "
            "Cannula(french=21) or Cannula(inner_diameter=5e-3)",
            field="french",
        )
    if wall_thickness is not None:
        raise InputRangeError(
            "wall_thickness sets the bore from the French size; pass french as well, or "
            "leave wall_thickness out when inner_diameter is given",
            field="wall_thickness",
            value=wall_thickness,
        )
    object.__setattr__(part, "french", None)
    Lumen.__init__(
        part, inner_diameter=inner_diameter, length=length, roughness=roughness, name=name
    )
    if name is None:
        size = f"{_mm(part.inner_diameter)} x {_size_text(part.length, 1.0, 'm')}"
        object.__setattr__(part, "name", f"cannula {size}")


def circuit_tubing(size, length, name=None):
    """Extracorporeal circuit tubing by nominal inch size ("1/4", "3/8", "1/2").

    Examples
    --------
    >>> round(circuit_tubing("3/8", 2.0).inner_diameter * 1e3, 3)
    9.525
    """
    d = _lookup(
        catalogue.CIRCUIT_TUBING,
        size,
        "circuit tubing size",
        "pass a Tube(inner_diameter=...) for other bores",
    )
    return Tube(inner_diameter=d, length=length, name=name or f"{size} in circuit tubing")


def extension_set(kind="standard-extension", length=None, name=None):
    """An administration or extension set by kind (typical bores, from memory).

    Examples
    --------
    >>> s = extension_set("microbore-extension")
    >>> round(s.inner_diameter * 1e3, 2), s.length
    (0.5, 1.5)
    """
    d, len_typ = _lookup(
        catalogue.EXTENSION_SETS,
        kind,
        "extension set kind",
        "pass a Tube(inner_diameter=..., length=...)",
    )
    return Tube(
        inner_diameter=d,
        length=len_typ if length is None else length,
        name=name or kind.replace("-", " "),
    )


def central_line_lumen(lumen="distal", french=7.0, lumens=3, length=0.20, name=None):
    """One lumen of a multi-lumen central venous catheter (gauge-equivalent bore).

    Examples
    --------
    >>> part = central_line_lumen("medial")
    >>> part.name, round(part.inner_diameter * 1e3, 2)
    ('7 Fr 3-lumen central line, medial lumen (18G equivalent)', 1.0)
    """
    table = _lookup(
        catalogue.CENTRAL_LINE_LUMENS,
        (float(french), int(lumens)),
        "central line (french, lumens)",
        "pass a Tube for the lumen instead",
    )
    gauge = _lookup(table, lumen, "lumen", "pick one of the listed lumens")
    d = catalogue.CATHETER_GAUGES[gauge][1]
    return Tube(
        inner_diameter=d,
        length=length,
        name=name
        or f"{french:g} Fr {lumens}-lumen central line, {lumen} lumen ({gauge}G equivalent)",
    )


def multi_lumen_catheter_lumen(kind, lumen, length=None, name=None):
    """One lumen of a multi-lumen catheter whose lumen shapes are known, with its own shape.

    ``kind`` is a key of :data:`rheoline.model.catalogue.MULTI_LUMEN_CATHETERS` (typical
    cross-sections, from memory): double-D catheters have two D-shaped lumens, a coaxial one
    an inner circle and an outer annulus.  The lumen is a :class:`~rheoline.model.parts.Tube`
    with that cross-section (:mod:`rheoline.model.shapes`), so its laminar friction is the
    shape's (Shah & London 1978) rather than a circle's of a gauge-equivalent bore.

    Parameters
    ----------
    kind : str
        Catalogue key, e.g. "13.5 Fr double-D".
    lumen : str
        One of the kind's lumens, e.g. "arterial".
    length : float, optional
        [m]; default the catalogue's typical length.
    name : str, optional

    Examples
    --------
    >>> part = multi_lumen_catheter_lumen("13.5 Fr double-D", "venous")
    >>> part.name, round(part.inner_diameter * 1e3, 2), part.laminar_f_re
    ('13.5 Fr double-D, venous lumen (D-shaped 3.7 mm)', 2.26, 15.767)
    """
    entry = _lookup(
        catalogue.MULTI_LUMEN_CATHETERS,
        kind,
        "multi-lumen catheter",
        "pass a Tube(shape=..., length=...) with the measured cross-section instead",
    )
    key, dims = _lookup(entry["lumens"], lumen, f"lumen of the {kind}", "pick a listed lumen")
    shape = LUMEN_SHAPES[key](**dims)
    part = Tube(
        shape=shape,
        length=entry["length"] if length is None else length,
        name=name or f"{kind}, {lumen} lumen ({shape.description})",
    )
    object.__setattr__(
        part,
        "source_note",
        "typical multi-lumen cross-section (from memory); pass Tube(shape=...) with the "
        "measured lumen",
    )
    return part
