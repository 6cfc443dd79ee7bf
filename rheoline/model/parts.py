"""Parts of an infusion or access line: lumens, fittings and measured parts.

Every part is a small frozen dataclass with a ``name``; lumens (tubes, catheters,
needles, cannulas) also have ``inner_diameter``, ``length`` and ``roughness`` [m]
and an ``outer_diameter`` where known.  Dimensions may be numpy arrays (one value
per scenario); :class:`rheoline.model.line.Line` broadcasts them.

Catalogue values (:mod:`rheoline.model.catalogue`) are typical nominal dimensions;
pass the measured inner diameter and length of the actual part where known.

Examples
--------
>>> cath = Catheter(gauge=18)
>>> cath.name, round(cath.inner_diameter * 1e3, 2), round(cath.length * 1e3)
('18G catheter', 1.0, 45)
>>> Needle(gauge=22).inner_diameter
0.00039
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model import catalogue
from rheoline.model.losses import _INCH, HOOPER_1981_2K, crane_fitting_k
from rheoline.model.validation import check_nonnegative, check_positive

__all__ = [
    "Part",
    "Lumen",
    "Tube",
    "Catheter",
    "Needle",
    "Cannula",
    "Fitting",
    "MeasuredPart",
    "circuit_tubing",
    "extension_set",
    "central_line_lumen",
]


def _value(arr):
    arr = np.asarray(arr, dtype=float)
    return float(arr) if arr.ndim == 0 else arr


def _size_text(value, scale, unit):
    """'3 mm' for one size (or one repeated), '0.8-1.2 mm' for a swept one."""
    arr = np.asarray(value, dtype=float) * scale
    low, high = f"{float(np.min(arr)):.3g}", f"{float(np.max(arr)):.3g}"
    return f"{low} {unit}" if low == high else f"{low}-{high} {unit}"


def _mm(value):
    return _size_text(value, 1e3, "mm")


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


def _set_internal_volume(part):
    """A user-given internal volume [m^3] (>= 0), or 0 with a ``volume_note`` when not given."""
    if part.internal_volume is None:
        object.__setattr__(part, "internal_volume", 0.0)
        object.__setattr__(
            part,
            "volume_note",
            "internal volume not given, counted as 0; pass internal_volume [m^3] for dead-volume "
            "and transport estimates",
        )
    else:
        volume = check_nonnegative("internal_volume", part.internal_volume, "m^3")
        object.__setattr__(part, "internal_volume", _value(volume))


def _hooper_constants(kind):
    return _lookup(
        HOOPER_1981_2K,
        kind,
        "Hooper 1981 fitting kind",
        "give the fitting's k (constant K), or Fitting.crane for Crane TP-410 kinds",
    )


def _lookup(table, key, what, fix):
    try:
        hash(key)
    except TypeError:
        raise InputRangeError(f"{what} {key!r} is not a catalogue key; {fix}") from None
    if key not in table:
        allowed = ", ".join(str(k) for k in sorted(table))
        raise InputRangeError(f"{what} {key!r} is not in the catalogue (allowed: {allowed}); {fix}")
    return table[key]


class Part:
    """Base of all parts.  ``kind`` is "lumen", "fitting" or "measured".

    ``source_note`` is None, or says where a catalogue dimension came from (the line's
    flags repeat it).  ``internal_volume`` [m^3] is the liquid the part holds: a lumen's
    bore, pi D^2 L / 4; a fitting's or measured part's user-given volume, 0 when not given,
    in which case ``volume_note`` says so (None otherwise).
    """

    kind = "part"
    source_note = None
    volume_note = None


@dataclass(frozen=True)
class Lumen(Part):
    """A straight circular lumen (the common base of tubes, catheters, needles, cannulas).

    Parameters
    ----------
    inner_diameter : float or array_like
        [m], > 0.
    length : float or array_like
        [m], > 0.
    roughness : float or array_like
        Absolute wall roughness [m], >= 0 (0 for drawn plastic and metal tubing).
    name : str, optional
        Label used in tables.
    outer_diameter : float, optional
        [m], where known.
    """

    inner_diameter: float | np.ndarray
    length: float | np.ndarray
    roughness: float | np.ndarray = 0.0
    name: str | None = None
    outer_diameter: float | np.ndarray | None = None
    kind = "lumen"

    def __post_init__(self):
        object.__setattr__(
            self,
            "inner_diameter",
            _value(check_positive("inner_diameter", self.inner_diameter, "m")),
        )
        object.__setattr__(self, "length", _value(check_positive("length", self.length, "m")))
        object.__setattr__(
            self, "roughness", _value(check_nonnegative("roughness", self.roughness, "m"))
        )
        if self.outer_diameter is not None:
            od = check_positive("outer_diameter", self.outer_diameter, "m")
            if np.any(od <= np.asarray(self.inner_diameter)):
                raise InputRangeError(
                    f"outer_diameter {_mm(od)} must exceed inner_diameter "
                    f"{_mm(self.inner_diameter)}; check the two values are not swapped"
                )
            object.__setattr__(self, "outer_diameter", _value(od))
        if self.name is None:
            object.__setattr__(self, "name", self._default_name())

    def _default_name(self):
        return f"tube {_mm(self.inner_diameter)} x {_size_text(self.length, 1.0, 'm')}"

    @property
    def internal_volume(self):
        """Volume [m^3] of the bore, pi D^2 L / 4 (a hub or connector volume is not included).

        Examples
        --------
        >>> round(Tube(inner_diameter=1.0e-3, length=1.5).internal_volume * 1e6, 4)   # mL
        1.1781
        """
        return _value(np.pi * np.asarray(self.inner_diameter) ** 2 * self.length / 4.0)


@dataclass(frozen=True)
class Tube(Lumen):
    """Tubing of a given bore and length (extension sets, administration sets, circuit tubing).

    Examples
    --------
    >>> Tube(inner_diameter=3.0e-3, length=1.8).name
    'tube 3 mm x 1.8 m'
    """


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
    """A cannula or sheath by French size (outer diameter = French / 3 mm).

    The inner diameter is the user's, or the outer diameter less twice ``wall_thickness``
    (default :data:`~rheoline.model.catalogue.CANNULA_TYPICAL_WALL`, typical, from memory).

    Parameters
    ----------
    french : float
        Size [Fr], > 0.
    inner_diameter : float, optional
        [m].
    wall_thickness : float, optional
        [m].
    length : float or array_like
        [m]; default 0.15 (typical, from memory).
    name : str, optional

    Examples
    --------
    >>> c = Cannula(french=21, wall_thickness=0.5e-3, length=0.2)
    >>> round(c.outer_diameter * 1e3, 2), round(c.inner_diameter * 1e3, 2)
    (7.0, 6.0)
    """

    def __init__(
        self,
        french,
        inner_diameter=None,
        wall_thickness=None,
        length=0.15,
        name=None,
        roughness=0.0,
    ):
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
                    f"{float(np.min(fr)):g} Fr cannula; pass inner_diameter instead"
                )
        object.__setattr__(self, "french", _value(fr))
        super().__init__(
            inner_diameter=inner_diameter,
            length=length,
            roughness=roughness,
            name=name or (f"{_value(fr):g} Fr cannula" if np.ndim(fr) == 0 else "cannula"),
            outer_diameter=_value(od),
        )


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


@dataclass(frozen=True)
class Fitting(Part):
    """A stopcock, connector, valve or other local loss, by K or by an equivalent length.

    Parameters
    ----------
    k : float or array_like, optional
        Loss coefficient [-], dp = k rho u^2 / 2, u the mean velocity in ``inner_diameter``
        (or, if that is None, in the nearest upstream lumen, else the nearest downstream one).
    equivalent_length : float or array_like, optional
        Length [m] of straight lumen of ``inner_diameter`` with the same drop (fully
        developed friction); needs ``inner_diameter``.
    inner_diameter : float, optional
        Bore [m] the coefficient refers to.
    name : str, optional
    laminar_k : float or array_like, optional
        Hooper 1981 :math:`K_1` [-]: the coefficient becomes :math:`K = K_1/Re + k`, Re in
        the bore the K refers to (default None: a constant K).  See :meth:`hooper`.
    internal_volume : float or array_like, optional
        Liquid volume [m^3] the fitting holds (dead volume); default None: counted as 0,
        with a ``volume_note``.

    Examples
    --------
    >>> Fitting(k=0.9).name
    'fitting K=0.9'
    >>> Fitting.crane("stopcock-branch", inner_diameter=2e-3).name
    'stopcock-branch (Crane TP-410)'
    >>> Fitting.hooper("elbow-90-standard", inner_diameter=2e-3).laminar_k
    800.0
    """

    k: float | np.ndarray | None = None
    equivalent_length: float | np.ndarray | None = None
    inner_diameter: float | np.ndarray | None = None
    name: str | None = None
    laminar_k: float | np.ndarray | None = None
    internal_volume: float | np.ndarray | None = None
    kind = "fitting"

    def __post_init__(self):
        _set_internal_volume(self)
        if (self.k is None) == (self.equivalent_length is None):
            raise InputRangeError(
                "Fitting needs exactly one of k (loss coefficient) or equivalent_length [m]; "
                f"got k={self.k!r}, equivalent_length={self.equivalent_length!r}"
            )
        if self.k is not None:
            object.__setattr__(self, "k", _value(check_nonnegative("k", self.k)))
        else:
            if self.inner_diameter is None:
                raise InputRangeError(
                    "Fitting with an equivalent_length needs inner_diameter [m], the bore "
                    "of the equivalent lumen"
                )
            object.__setattr__(
                self,
                "equivalent_length",
                _value(check_positive("equivalent_length", self.equivalent_length, "m")),
            )
        if self.inner_diameter is not None:
            object.__setattr__(
                self,
                "inner_diameter",
                _value(check_positive("inner_diameter", self.inner_diameter, "m")),
            )
        if self.laminar_k is not None:
            if self.k is None:
                raise InputRangeError(
                    "Fitting laminar_k (Hooper K_1) goes with k (its K_infinity term), not with "
                    "an equivalent_length; pass k= as well"
                )
            object.__setattr__(
                self, "laminar_k", _value(check_nonnegative("laminar_k", self.laminar_k))
            )
        if self.name is None:
            label = (
                f"K={np.max(self.k):.3g}"
                if self.k is not None
                else f"Leq={np.max(self.equivalent_length):.3g} m"
            )
            object.__setattr__(self, "name", f"fitting {label}")

    @property
    def length(self):
        """The equivalent length [m], or None for a K fitting."""
        return self.equivalent_length

    @classmethod
    def crane(cls, kind, inner_diameter, friction_factor=None, name=None, internal_volume=None):
        """A fitting from Crane TP-410's L/D for ``kind`` (see ``losses.CRANE_L_OVER_D``)."""
        k = crane_fitting_k(kind, inner_diameter, friction_factor)
        return cls(
            k=k,
            inner_diameter=inner_diameter,
            name=name or f"{kind} (Crane TP-410)",
            internal_volume=internal_volume,
        )

    @classmethod
    def hooper(cls, kind, inner_diameter, name=None, internal_volume=None):
        """A fitting by Hooper's 1981 two-K method, K = K_1/Re + K_inf (1 + 1 inch/D).

        ``kind`` is a key of :data:`rheoline.model.losses.HOOPER_1981_2K`; see
        :func:`rheoline.model.losses.hooper_1981_2k_k` for why it is an option, not the
        default.
        """
        k1, k_inf = _hooper_constants(kind)
        d = check_positive("inner_diameter", inner_diameter, "m")
        return cls(
            k=k_inf * (1.0 + _INCH / d),
            inner_diameter=inner_diameter,
            laminar_k=k1,
            name=name or f"{kind} (Hooper 1981 2-K)",
            internal_volume=internal_volume,
        )


@dataclass(frozen=True)
class MeasuredPart(Part):
    r"""A part known by bench pressure-flow pairs, fitted :math:`\Delta p = a Q + b Q^2`.

    The coefficients are a non-negative least-squares fit.  When the test fluid's
    viscosity and density are given, the laminar term scales with the line fluid's
    viscosity and the quadratic term with its density.

    Parameters
    ----------
    flows : array_like
        Bench flows [m^3/s], > 0.
    pressure_drops : array_like
        Bench pressure drops [Pa], >= 0, same length.
    test_viscosity : float, optional
        Viscosity [Pa s] of the bench fluid.
    test_density : float, optional
        Density [kg/m^3] of the bench fluid.
    name : str, optional
    internal_volume : float, optional
        Liquid volume [m^3] the part holds; default None: counted as 0, with a
        ``volume_note``.

    Examples
    --------
    >>> part = MeasuredPart(flows=[1e-6, 2e-6, 4e-6], pressure_drops=[1000.0, 2200.0, 5200.0])
    >>> round(part.a / 1e9, 3), round(part.b / 1e14, 3)
    (0.9, 1.0)
    """

    flows: tuple | np.ndarray = field(default=())
    pressure_drops: tuple | np.ndarray = field(default=())
    test_viscosity: float | None = None
    test_density: float | None = None
    name: str | None = None
    internal_volume: float | np.ndarray | None = None
    kind = "measured"

    def __post_init__(self):
        from scipy.optimize import nnls

        _set_internal_volume(self)
        q = check_positive("flows", self.flows, "m^3/s").ravel()
        dp = check_nonnegative("pressure_drops", self.pressure_drops, "Pa").ravel()
        if q.size != dp.size or q.size < 1:
            raise InputRangeError(
                f"flows and pressure_drops must be pairs of equal, non-zero length; got "
                f"{q.size} flows and {dp.size} pressure drops"
            )
        for label in ("test_viscosity", "test_density"):
            if getattr(self, label) is not None:
                object.__setattr__(self, label, float(check_positive(label, getattr(self, label))))
        # weight each pair by 1/dp so that small and large points count alike
        weight = 1.0 / np.maximum(dp, 1e-12 * np.max(dp) + 1e-300)
        design = np.column_stack([q, q * q]) * weight[:, None]
        scale = np.array([1.0 / q.max(), 1.0 / q.max() ** 2])
        coef, _ = nnls(design * scale, dp * weight)
        object.__setattr__(self, "flows", q)
        object.__setattr__(self, "pressure_drops", dp)
        object.__setattr__(self, "a", float(coef[0] * scale[0]))
        object.__setattr__(self, "b", float(coef[1] * scale[1]))
        if self.name is None:
            object.__setattr__(self, "name", "measured part")

    @property
    def inner_diameter(self):
        """None: a measured part has no bore of its own."""
        return None

    @property
    def length(self):
        """None: a measured part has no length of its own."""
        return None

    def pressure_drop(self, flow, viscosity=None, density=None):
        """Pressure drop [Pa] at ``flow`` [m^3/s], scaled to the line fluid where possible."""
        a, b = self.scaled_coefficients(viscosity, density)
        q = np.asarray(flow, dtype=float)
        return a * q + b * q * q

    def scaled_coefficients(self, viscosity=None, density=None):
        """(a, b) scaled by viscosity / test_viscosity and density / test_density."""
        a, b = self.a, self.b
        if viscosity is not None and self.test_viscosity is not None:
            a = a * np.asarray(viscosity, dtype=float) / self.test_viscosity
        if density is not None and self.test_density is not None:
            b = b * np.asarray(density, dtype=float) / self.test_density
        return a, b
