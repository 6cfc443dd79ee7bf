"""Parts of an infusion or access line: lumens, fittings, check valves and measured parts.

Every part is a small frozen dataclass with a ``name``; lumens (tubes and the catalogue
devices of :mod:`rheoline.model.devices`: catheters, needles, cannulas) also have
``inner_diameter`` (the bore, or the hydraulic diameter of a non-circular ``shape``),
``length`` and ``roughness`` [m] and an ``outer_diameter`` where known.  Dimensions may be
numpy arrays (one value per scenario); :class:`rheoline.model.line.Line` broadcasts them.

The catalogue devices still import from here (``from rheoline.model.parts import
Catheter``), where they lived before ``devices.py`` was split off.

Examples
--------
>>> Tube(inner_diameter=3.0e-3, length=1.8).name
'tube 3 mm x 1.8 m'
>>> from rheoline.model.shapes import Semicircle
>>> d = Tube(shape=Semicircle(3.0e-3), length=0.2)
>>> d.name, round(d.inner_diameter * 1e3, 3), d.laminar_f_re
('D-shaped 3 mm x 0.2 m', 1.833, 15.767)
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model import catalogue  # noqa: F401  (read as parts.catalogue by the scenario layer)
from rheoline.model.losses import _INCH, HOOPER_1981_2K, crane_fitting_k
from rheoline.model.shapes import LumenShape
from rheoline.model.validation import check_nonnegative, check_positive, frozen_copy

__all__ = [
    "Part",
    "Lumen",
    "Tube",
    "Fitting",
    "CheckValve",
    "MeasuredPart",
]

#: Names that moved to :mod:`rheoline.model.devices`; still importable from here.
_DEVICE_NAMES = (
    "Catheter",
    "Needle",
    "Cannula",
    "circuit_tubing",
    "extension_set",
    "central_line_lumen",
    "multi_lumen_catheter_lumen",
)


def __getattr__(name):
    if name in _DEVICE_NAMES:
        from rheoline.model import devices

        return getattr(devices, name)
    raise AttributeError(f"module 'rheoline.model.parts' has no attribute {name!r}")


def _value(arr):
    """A float, or a read-only copy of the array (the caller's array may change later)."""
    return frozen_copy(np.asarray(arr, dtype=float))


def _size_text(value, scale, unit):
    """'3 mm' for one size (or one repeated), '0.8-1.2 mm' for a swept one."""
    arr = np.asarray(value, dtype=float) * scale
    low, high = f"{float(np.min(arr)):.3g}", f"{float(np.max(arr)):.3g}"
    return f"{low} {unit}" if low == high else f"{low}-{high} {unit}"


def _mm(value):
    return _size_text(value, 1e3, "mm")


#: The largest bore [m] and length [m] a lumen of a line may have: beyond any infusion,
#: access or circuit line (common practice, no source); a larger value is almost always
#: millimetres typed where metres are asked for (the same hint as a Vessel's radius).
LUMEN_DIAMETER_LIMIT = 0.1
LUMEN_LENGTH_LIMIT = 100.0


def _check_metres(inner_diameter, length):
    """Refuse a bore or length far beyond any line, with the unit-slip hint."""
    for name, value, limit in (
        ("inner_diameter", inner_diameter, LUMEN_DIAMETER_LIMIT),
        ("length", length, LUMEN_LENGTH_LIMIT),
    ):
        largest = float(np.max(value))
        if largest > limit:
            raise InputRangeError(
                f"{name} must be at most {limit:g} m for a lumen of a line, got {largest:g} m; "
                "pass metres (1 mm = 1e-3 m), not millimetres",
                field=name,
                value=largest,
            )


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
    bore, pi D^2 L / 4 (its flow area times its length if non-circular); a fitting's or
    measured part's user-given volume, 0 when not given, in which case ``volume_note`` says
    so (None otherwise).
    """

    kind = "part"
    source_note = None
    volume_note = None
    #: True for a part that lets flow through in one direction only (a check valve).
    one_way = False


@dataclass(frozen=True)
class Lumen(Part):
    """A straight lumen (the common base of tubes, catheters, needles, cannulas).

    Circular unless a ``shape`` is given (:mod:`rheoline.model.shapes`: D-shaped, annulus,
    crescent, rectangle), whose hydraulic diameter is then the ``inner_diameter`` (for the
    Reynolds number, the regime and the entrance length), whose area carries the flow, and
    whose laminar f Re (Shah & London 1978) sets the laminar friction.

    Parameters
    ----------
    inner_diameter : float or array_like
        [m], > 0; omit it when a ``shape`` is given.
    length : float or array_like
        [m], > 0.
    roughness : float or array_like
        Absolute wall roughness [m], >= 0 (0 for drawn plastic and metal tubing).
    name : str, optional
        Label used in tables.
    outer_diameter : float, optional
        [m], where known.
    shape : LumenShape, optional
        The cross-section of a non-circular lumen; None for a circle of ``inner_diameter``.
    """

    inner_diameter: float | np.ndarray | None = None
    length: float | np.ndarray | None = None
    roughness: float | np.ndarray = 0.0
    name: str | None = None
    outer_diameter: float | np.ndarray | None = None
    shape: LumenShape | None = None
    kind = "lumen"

    def __post_init__(self):
        self._set_shape()
        object.__setattr__(
            self,
            "inner_diameter",
            _value(check_positive("inner_diameter", self.inner_diameter, "m")),
        )
        if self.length is None:
            raise InputRangeError(f"{type(self).__name__} needs length [m], e.g. length=0.2")
        object.__setattr__(self, "length", _value(check_positive("length", self.length, "m")))
        _check_metres(self.inner_diameter, self.length)
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

    def _set_shape(self):
        if self.shape is None:
            if self.inner_diameter is None:
                raise InputRangeError(
                    f"{type(self).__name__} needs inner_diameter [m] (a circular bore) or "
                    "shape= (a cross-section from rheoline.model.shapes)"
                )
            return
        if not isinstance(self.shape, LumenShape):
            raise InputRangeError(
                f"shape must be a cross-section of rheoline.model.shapes (Semicircle, Annulus, "
                f"Crescent, Rectangle, Circle), got {self.shape!r}"
            )
        if self.inner_diameter is not None:
            raise InputRangeError(
                "give a non-circular lumen its shape only: its inner_diameter is the shape's "
                f"hydraulic diameter ({_mm(self.shape.hydraulic_diameter)}); got inner_diameter "
                f"{_mm(self.inner_diameter)} as well"
            )
        object.__setattr__(self, "inner_diameter", self.shape.hydraulic_diameter)

    @property
    def flow_area(self):
        """Cross-section carrying the flow [m^2]: pi D^2 / 4, or the shape's area."""
        if self.shape is None:
            return _value(np.pi * np.asarray(self.inner_diameter) ** 2 / 4.0)
        return self.shape.area

    @property
    def laminar_f_re(self):
        """Fanning f Re of fully developed laminar flow [-]: 16, or the shape's."""
        return 16.0 if self.shape is None else self.shape.laminar_f_re

    def resized(self, inner_diameter=None, length=None):
        """A Tube of this lumen's kind of cross-section at another bore and/or length.

        A shaped lumen keeps its shape, scaled so that its hydraulic diameter is
        ``inner_diameter`` (used by tolerance bands and bore sweeps).

        Examples
        --------
        >>> from rheoline.model.shapes import Rectangle
        >>> t = Tube(shape=Rectangle(2e-3, 1e-3), length=0.1).resized(inner_diameter=2e-3)
        >>> round(t.shape.width * 1e3, 3), round(t.shape.height * 1e3, 3)
        (3.0, 1.5)
        """
        d = self.inner_diameter if inner_diameter is None else inner_diameter
        length = self.length if length is None else length
        if self.shape is None:
            return Tube(inner_diameter=d, length=length, roughness=self.roughness, name=self.name)
        factor = np.asarray(d, dtype=float) / np.asarray(self.inner_diameter, dtype=float)
        return Tube(
            shape=self.shape.scaled(factor), length=length, roughness=self.roughness, name=self.name
        )

    def _default_name(self):
        what = f"tube {_mm(self.inner_diameter)}" if self.shape is None else self.shape.description
        return f"{what} x {_size_text(self.length, 1.0, 'm')}"

    @property
    def internal_volume(self):
        """Volume [m^3] of the bore, pi D^2 L / 4, or the shape's area times L (a hub or
        connector volume is not included).

        Examples
        --------
        >>> round(Tube(inner_diameter=1.0e-3, length=1.5).internal_volume * 1e6, 4)   # mL
        1.1781
        """
        if self.shape is None:
            return _value(np.pi * np.asarray(self.inner_diameter) ** 2 * self.length / 4.0)
        return _value(np.asarray(self.shape.area) * self.length)


@dataclass(frozen=True)
class Tube(Lumen):
    """Tubing of a given bore and length (extension sets, administration sets, circuit tubing).

    Examples
    --------
    >>> Tube(inner_diameter=3.0e-3, length=1.8).name
    'tube 3 mm x 1.8 m'
    """


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
class CheckValve(Fitting):
    """A one-way (check, anti-reflux) valve: a K fitting that closes to reverse flow.

    In a :class:`~rheoline.model.line.Line` (forward flow only) it is its K fitting; in a
    network (:mod:`rheoline.model.branched`) the branch that holds it carries no reverse
    flow.  It is taken to open at zero pressure difference (an opening pressure of a few
    cmH2O, where a valve has one, is not modelled) and to seal completely when closed.

    Parameters
    ----------
    k : float or array_like
        Loss coefficient [-] of the open valve (measured, or e.g. a Crane TP-410 value).
    inner_diameter : float, optional
        Bore [m] the coefficient refers to (else the nearest lumen's, as for a Fitting).
    name : str, optional

    Examples
    --------
    >>> valve = CheckValve(k=4.0)
    >>> valve.name, valve.one_way, valve.kind
    ('check valve K=4', True, 'fitting')
    """

    one_way = True

    def __post_init__(self):
        if self.k is None or self.equivalent_length is not None:
            raise InputRangeError(
                "CheckValve needs k, the loss coefficient of the open valve (measured, or a "
                f"Crane TP-410 value); got k={self.k!r}, equivalent_length="
                f"{self.equivalent_length!r}"
            )
        if self.name is None:
            object.__setattr__(self, "name", f"check valve K={np.max(self.k):.3g}")
        super().__post_init__()


def _check_bench_data(q, dp):
    """Refuse bench data no real part gives: no pressure drop at all, or a pressure drop
    that falls as the flow rises (a part's drop never falls with flow; repeated points at
    one flow may differ)."""
    if not np.any(dp > 0):
        raise InputRangeError(
            "pressure_drops are all 0: a part that takes no pressure at any flow cannot be "
            "fitted (check the units, e.g. mmHg for Pa, or leave the part out)",
            field="pressure_drops",
            value=dp.tolist(),
        )
    order = np.lexsort((dp, q))
    qs, ps = q[order], dp[order]
    flows, first = np.unique(qs, return_index=True)
    lowest = np.minimum.reduceat(ps, first)  # per distinct flow
    highest = np.maximum.reduceat(ps, first)
    below = np.maximum.accumulate(highest)[:-1]  # the largest drop at any lower flow
    falls = np.flatnonzero(lowest[1:] < below)
    if falls.size:
        k = int(falls[0]) + 1
        raise InputRangeError(
            f"pressure_drops fall as the flow rises ({float(below[k - 1]):.4g} Pa at a lower "
            f"flow, {float(lowest[k]):.4g} Pa at {float(flows[k]):.4g} m^3/s): a part's "
            "pressure drop never falls with flow; check that flows and pressure_drops are "
            "in the same order",
            field="pressure_drops",
            value=dp.tolist(),
        )


@dataclass(frozen=True)
class MeasuredPart(Part):
    r"""A part known by bench pressure-flow pairs, fitted :math:`\Delta p = a Q + b Q^2`.

    The coefficients are a non-negative least-squares fit.  Bench data no real part gives
    is refused: all pressure drops 0, or a drop that falls as the flow rises.  A line
    solved at a flow outside the span of ``flows`` flags the part
    (``part_conditions["measured_extrapolated"]``).  When the test fluid's
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
        _check_bench_data(q, dp)
        for label in ("test_viscosity", "test_density"):
            if getattr(self, label) is not None:
                object.__setattr__(self, label, float(check_positive(label, getattr(self, label))))
        # weight each pair by 1/dp so that small and large points count alike
        weight = 1.0 / np.maximum(dp, 1e-12 * np.max(dp) + 1e-300)
        design = np.column_stack([q, q * q]) * weight[:, None]
        scale = np.array([1.0 / q.max(), 1.0 / q.max() ** 2])
        coef, _ = nnls(design * scale, dp * weight)
        object.__setattr__(self, "flows", frozen_copy(q))
        object.__setattr__(self, "pressure_drops", frozen_copy(dp))
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
