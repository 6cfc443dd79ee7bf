r"""Cross-sections of non-circular lumens: area, hydraulic diameter and laminar friction.

A lumen of any cross-section is written in the circular lumen's terms with the
*hydraulic diameter* :math:`D_h = 4A/P` (A the flow area, P the wetted perimeter):
the Reynolds number :math:`Re = \rho \bar u D_h/\mu` (with :math:`\bar u = Q/A`) decides
the regime (laminar below 2300, as for a circle), turbulent friction is the circle's at
that Reynolds number, and the laminar friction is the shape's own constant

.. math:: f\,Re = C_{shape}\quad\text{(Fanning; } C = 16 \text{ for a circle)},
          \qquad \Delta p = 4 f \frac{L}{D_h}\frac{\rho\bar u^2}{2}
          = \frac{2\,C\,\mu\,L\,\bar u}{D_h^2}

which is exact for fully developed laminar flow of a Newtonian fluid.  The constants are
those of Shah & London (1978): closed forms where a closed form exists (the concentric
annulus and the semicircle, a "D-shaped" lumen), and the exact series of the rectangle and of
the eccentric annulus.

Shapes (frozen dataclasses, dimensions [m], arrays allowed for sweeps)
    :class:`Circle` (diameter), :class:`Semicircle` (the D: diameter of its flat side),
    :class:`Annulus` (outer and inner diameter, eccentricity 0 concentric .. 1 touching:
    a catheter in a sheath, a guidewire in a lumen), :class:`Crescent` (an annulus whose
    core touches the outer wall), :class:`Rectangle` (width, height).
    :data:`LUMEN_SHAPES` maps a shape's key to its class.

References
----------
Shah, R.K., London, A.L., "Laminar Flow Forced Convection in Ducts", Advances in Heat
Transfer, Supplement 1, Academic Press, New York, 1978.
Piercy, N.A.V., Hooper, M.S., Winny, H.F., "Viscous flow through pipes with cores",
Phil. Mag. (7) 15 (1933) 647-676 (the eccentric annulus).
White, F.M., "Viscous Fluid Flow", 3rd ed., McGraw-Hill, 2006, section 3-3 (the rectangle's
and the annuli's exact solutions).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.validation import check_finite, check_positive, scalar_or_array

__all__ = [
    "LumenShape",
    "Circle",
    "Semicircle",
    "Annulus",
    "Crescent",
    "Rectangle",
    "LUMEN_SHAPES",
    "CIRCLE_F_RE",
    "SEMICIRCLE_F_RE",
    "annulus_f_re",
    "eccentric_annulus_f_re",
    "rectangle_f_re",
]

#: Fanning f Re of fully developed laminar flow in a circle (Hagen-Poiseuille).
CIRCLE_F_RE = 16.0
#: Fanning f Re of a semicircular duct on its hydraulic diameter, exact:
#: :math:`8\pi^4/((\pi+2)^2(\pi^2-8)) = 15.76683...`.  Derivation: on the half disc of
#: radius a (flat side y = 0), :math:`w = -y^2/2 + \sum_{n\ odd} c_n r^n \sin n\theta`
#: solves :math:`\nabla^2 w = -1` with w = 0 on the flat side, and the :math:`c_n` (the sine
#: series of :math:`\sin^2\theta` on the arc) give the flow
#: :math:`Q = a^4(\pi/8 - 1/\pi)` (G/mu = 1), so the mean velocity is
#: :math:`a^2(1/4 - 2/\pi^2)` and :math:`f Re = D_h^2/(2\bar u)` with
#: :math:`D_h = 2\pi a/(\pi + 2)`.  Shah & London 1978 tabulate 15.767 for the 180 deg
#: circular sector (from memory); the tests check the series summed term by term and a
#: finite-difference solution of the same duct.
SEMICIRCLE_F_RE = 8.0 * np.pi**4 / ((np.pi + 2.0) ** 2 * (np.pi**2 - 8.0))

# Largest eccentricity evaluated by the series: a core that touches the wall (eccentricity 1)
# is the limit, reached within 1e-8 relative at 1 - 1e-6 (the series needs ~1e4 terms there).
_TOUCHING = 1.0 - 1e-6
# Terms of the rectangle's series (odd n up to 2*_RECT_TERMS - 1): the tail is below 1e-12.
_RECT_TERMS = 200


def _value(arr):
    arr = np.asarray(arr, dtype=float)
    return float(arr) if arr.ndim == 0 else arr


def annulus_f_re(radius_ratio):
    r"""Fanning f Re of a concentric annulus on its hydraulic diameter (exact).

    .. math::

        f\,Re = \frac{16\,(1 - r^*)^2}{1 + r^{*2} - (1 - r^{*2})/\ln(1/r^*)},
        \qquad r^* = r_i / r_o,\quad D_h = 2(r_o - r_i)

    16 for a vanishing core (a circle) and 24 at :math:`r^* \to 1` (parallel plates).

    Parameters
    ----------
    radius_ratio : float or array_like
        Inner over outer radius [-], 0 < r* < 1.

    Returns
    -------
    float or ndarray
        Fanning f Re [-].

    References
    ----------
    Shah & London 1978, chapter on concentric annular ducts (the exact solution of
    Lamb 1945).

    Examples
    --------
    >>> round(annulus_f_re(0.5), 3)
    23.813
    """
    r = _ratio("radius_ratio", radius_ratio)
    out = 16.0 * (1.0 - r) ** 2 / (1.0 + r * r - (1.0 - r * r) / np.log(1.0 / r))
    return scalar_or_array(out)


def _ratio(name, value):
    r = check_positive(name, value)
    if np.any(r >= 1.0):
        raise InputRangeError(
            f"{name} must be below 1 (inner smaller than outer), got {float(np.max(r))!r}; "
            "check that the inner and outer diameters are not swapped"
        )
    return r


def _eccentric_flow_factor(r, eps):
    r"""Q / (pi G a^4 / (8 mu)) of an eccentric annulus, outer radius a = 1, inner r.

    Piercy, Hooper & Winny 1933 in bipolar coordinates (White 2006, eq. 3-52), with the
    logarithms written without the cancellations of F - M at small eccentricity.
    """
    concentric = 1.0 - r**4 - (1.0 - r * r) ** 2 / np.log(1.0 / r)
    c = np.minimum(eps, _TOUCHING) * (1.0 - r)
    c_safe = np.where(c > 0, c, 0.5 * (1.0 - r))  # any offset; replaced below
    f = (1.0 - r * r + c_safe * c_safe) / (2.0 * c_safe)
    m = np.sqrt((f - 1.0) * (f + 1.0))
    alpha = np.log(f + m)  # (F + M)/a with a = 1
    beta = np.log((f - c_safe + m) / r)
    n_max = int(np.clip(np.ceil(40.0 / np.min(alpha + beta)), 10, 200000))
    total = np.zeros(np.shape(alpha))
    # n e^{-n(b+a)} / sinh(n(b-a)) written as 2n e^{-2nb} / (1 - e^{-2n(b-a)}): no overflow
    for start in range(1, n_max + 1, 4096):
        n = np.arange(start, min(start + 4096, n_max + 1), dtype=float)
        n = n.reshape((-1,) + (1,) * np.ndim(alpha))
        total = total + np.sum(
            2.0 * n * np.exp(-2.0 * n * beta) / -np.expm1(-2.0 * n * (beta - alpha)), axis=0
        )
    cm2 = c_safe * c_safe * m * m
    eccentric = 1.0 - r**4 - 4.0 * cm2 / (beta - alpha) - 8.0 * cm2 * total
    return np.where(c > 0, eccentric, concentric)


def eccentric_annulus_f_re(radius_ratio, eccentricity):
    r"""Fanning f Re of an eccentric annulus on its hydraulic diameter 2(r_o - r_i).

    The exact flow of Piercy, Hooper & Winny (1933),

    .. math::

        Q = \frac{\pi G}{8\mu}\left[a^4 - b^4 - \frac{4c^2M^2}{\beta-\alpha}
            - 8c^2M^2\sum_{n=1}^{\infty}\frac{n\,e^{-n(\beta+\alpha)}}{\sinh n(\beta-\alpha)}
            \right]

    with outer radius a, core radius b, centre offset :math:`c = \varepsilon (a - b)`,
    :math:`F = (a^2 - b^2 + c^2)/2c`, :math:`M = \sqrt{F^2 - a^2}`,
    :math:`\alpha = \ln((F+M)/a)`, :math:`\beta = \ln((F - c + M)/b)`, and
    :math:`f\,Re = G D_h^2 / (2\mu\bar u)`.

    Parameters
    ----------
    radius_ratio : float or array_like
        Core over outer radius [-], 0 < r* < 1.
    eccentricity : float or array_like
        Centre offset over the radial gap a - b [-], 0 (concentric) to 1 (the core touches
        the wall; evaluated at 1 - 1e-6, within 1e-8 of the limit).

    Returns
    -------
    float or ndarray
        Fanning f Re [-]; equals :func:`annulus_f_re` at eccentricity 0.

    Notes
    -----
    An off-centre core lets more fluid through the wide side: at r* = 0.5 a touching core
    carries about 2.3 times the concentric flow at the same pressure drop.

    References
    ----------
    Piercy, Hooper & Winny, Phil. Mag. 15 (1933) 647-676; White, "Viscous Fluid Flow",
    3rd ed. (2006), eq. 3-52; Shah & London 1978, chapter on eccentric annular ducts.

    Examples
    --------
    >>> round(eccentric_annulus_f_re(0.5, 0.0), 3), round(eccentric_annulus_f_re(0.5, 1.0), 2)
    (23.813, 10.25)
    """
    r = _ratio("radius_ratio", radius_ratio)
    eps = check_finite("eccentricity", eccentricity)
    if np.any((eps < 0.0) | (eps > 1.0)):
        raise InputRangeError(
            f"eccentricity must lie in 0..1 (0 concentric, 1 core touching the wall), got "
            f"{float(np.max(np.abs(eps)))!r}; it is the centre offset over the gap "
            "(outer - inner radius)"
        )
    r, eps = np.broadcast_arrays(r, eps)
    factor = _eccentric_flow_factor(r, eps)
    # a = 1: u = Q / (pi (1 - r^2)), D_h = 2 (1 - r); f Re = G D_h^2 / (2 mu u)
    f_re = 4.0 * (1.0 - r) ** 2 * 8.0 * (1.0 - r * r) / (2.0 * factor)
    return scalar_or_array(f_re)


def rectangle_f_re(aspect_ratio):
    r"""Fanning f Re of a rectangular duct on its hydraulic diameter (exact series).

    For a rectangle of sides 2a >= 2b, aspect ratio :math:`\alpha = b/a`:

    .. math::

        f\,Re = \frac{24}{(1 + \alpha)^2
            \left[1 - \frac{192\,\alpha}{\pi^5}\sum_{n\ odd}
            \frac{\tanh(n\pi/2\alpha)}{n^5}\right]}

    14.227 for a square, 24 for parallel plates (:math:`\alpha \to 0`).

    Parameters
    ----------
    aspect_ratio : float or array_like
        Short over long side [-], 0 < alpha <= 1 (a value above 1 is inverted).

    Returns
    -------
    float or ndarray
        Fanning f Re [-].

    References
    ----------
    Shah & London 1978, chapter on rectangular ducts (the series solution); White,
    "Viscous Fluid Flow", 3rd ed. (2006), eq. 3-48.

    Examples
    --------
    >>> round(rectangle_f_re(1.0), 3), round(rectangle_f_re(0.5), 3)
    (14.227, 15.548)
    """
    alpha = check_positive("aspect_ratio", aspect_ratio)
    alpha = np.minimum(alpha, 1.0 / alpha)
    n = (2.0 * np.arange(_RECT_TERMS) + 1.0).reshape((-1,) + (1,) * alpha.ndim)
    series = np.sum(np.tanh(n * np.pi / (2.0 * alpha)) / n**5, axis=0)
    bracket = 1.0 - 192.0 * alpha / np.pi**5 * series
    return scalar_or_array(24.0 / ((1.0 + alpha) ** 2 * bracket))


class LumenShape:
    """Base of the cross-sections: ``area`` [m^2], ``wetted_perimeter`` [m],
    ``hydraulic_diameter`` [m] (4 A / P), ``laminar_f_re`` (Fanning f Re [-]),
    ``key`` (the shape's name in :data:`LUMEN_SHAPES`) and ``description``.
    """

    key = "shape"

    @property
    def hydraulic_diameter(self):
        """4 A / P [m]."""
        return _value(4.0 * np.asarray(self.area) / np.asarray(self.wetted_perimeter))

    @property
    def circle_f_re_ratio(self):
        """The shape's laminar f Re over the circle's 16 [-] (1 for a circle)."""
        return _value(np.asarray(self.laminar_f_re) / CIRCLE_F_RE)

    def scaled(self, factor):
        """The same shape with every dimension times ``factor`` (f Re is unchanged)."""
        fields = {k: np.asarray(v) * factor for k, v in self._sizes().items()}
        return type(self)(**fields, **self._ratios())

    def _ratios(self):
        return {}


def _size(name, value):
    return _value(check_positive(name, value, "m"))


@dataclass(frozen=True)
class _RoundShape(LumenShape):
    """A shape set by one diameter [m]: area and perimeter are fixed multiples of it."""

    diameter: float | np.ndarray
    _area_factor = np.pi / 4.0
    _perimeter_factor = np.pi
    _label = "circle"

    def __post_init__(self):
        object.__setattr__(self, "diameter", _size("diameter", self.diameter))

    def _sizes(self):
        return {"diameter": self.diameter}

    @property
    def area(self):
        """[m^2]."""
        return _value(self._area_factor * np.asarray(self.diameter) ** 2)

    @property
    def wetted_perimeter(self):
        """[m]."""
        return _value(self._perimeter_factor * np.asarray(self.diameter))

    @property
    def description(self):
        """In words, e.g. "circle 1 mm"."""
        return f"{self._label} {_mm(self.diameter)}"


@dataclass(frozen=True)
class Circle(_RoundShape):
    """A circular bore; f Re = 16 (Hagen-Poiseuille).

    Examples
    --------
    >>> c = Circle(1e-3)
    >>> round(c.hydraulic_diameter * 1e3, 6), c.laminar_f_re, c.description
    (1.0, 16.0, 'circle 1 mm')
    """

    key = "circle"
    laminar_f_re = CIRCLE_F_RE

    @property
    def hydraulic_diameter(self):
        """The diameter itself [m]."""
        return self.diameter


@dataclass(frozen=True)
class Semicircle(_RoundShape):
    """A D-shaped lumen: half a circle of ``diameter`` (the flat side's length) [m].

    The wetted perimeter is the arc and the flat side; f Re = 15.7668 (the exact value
    :data:`SEMICIRCLE_F_RE`; Shah & London 1978 tabulate 15.767, from memory).

    Examples
    --------
    >>> d = Semicircle(2e-3)
    >>> round(d.hydraulic_diameter * 1e3, 4), round(d.laminar_f_re, 4)
    (1.222, 15.7668)
    """

    key = "d-shaped"
    laminar_f_re = SEMICIRCLE_F_RE
    _area_factor = np.pi / 8.0
    _perimeter_factor = np.pi / 2.0 + 1.0
    _label = "D-shaped"


@dataclass(frozen=True)
class Annulus(LumenShape):
    """The gap between a bore and a core in it: a catheter in a sheath, a guidewire in a lumen.

    Parameters
    ----------
    outer_diameter : float or array_like
        Bore of the outer lumen [m].
    inner_diameter : float or array_like
        Outer diameter of the core (catheter, guidewire) [m], smaller than the bore.
    eccentricity : float or array_like
        Offset of the core's centre over the radial gap [-]: 0 concentric (the exact
        annulus), 1 the core resting on the wall (see :func:`eccentric_annulus_f_re`).

    Examples
    --------
    >>> gap = Annulus(outer_diameter=2.0e-3, inner_diameter=0.89e-3)   # 0.035 inch wire
    >>> round(gap.hydraulic_diameter * 1e3, 2), round(gap.laminar_f_re, 2)
    (1.11, 23.75)
    """

    outer_diameter: float | np.ndarray
    inner_diameter: float | np.ndarray
    eccentricity: float | np.ndarray = 0.0
    key = "annulus"

    def __post_init__(self):
        outer = _size("outer_diameter", self.outer_diameter)
        inner = _size("inner_diameter", self.inner_diameter)
        if np.any(np.asarray(inner) >= np.asarray(outer)):
            raise InputRangeError(
                f"inner_diameter {_mm(inner)} (the core) must be smaller than outer_diameter "
                f"{_mm(outer)} (the bore it lies in); check the two are not swapped"
            )
        eps = check_finite("eccentricity", self.eccentricity)
        if np.any((eps < 0.0) | (eps > 1.0)):
            raise InputRangeError(
                f"eccentricity must lie in 0..1 (0 concentric, 1 core on the wall), got "
                f"{float(np.max(np.abs(eps)))!r}"
            )
        object.__setattr__(self, "outer_diameter", outer)
        object.__setattr__(self, "inner_diameter", inner)
        object.__setattr__(self, "eccentricity", _value(eps))

    def _sizes(self):
        return {"outer_diameter": self.outer_diameter, "inner_diameter": self.inner_diameter}

    def _ratios(self):
        return {"eccentricity": self.eccentricity}

    @property
    def radius_ratio(self):
        """Core over bore radius [-]."""
        return _value(np.asarray(self.inner_diameter) / np.asarray(self.outer_diameter))

    @property
    def area(self):
        """[m^2]."""
        d_o, d_i = np.asarray(self.outer_diameter), np.asarray(self.inner_diameter)
        return _value(np.pi * (d_o * d_o - d_i * d_i) / 4.0)

    @property
    def wetted_perimeter(self):
        """[m]: the bore and the core."""
        return _value(np.pi * (np.asarray(self.outer_diameter) + np.asarray(self.inner_diameter)))

    @property
    def hydraulic_diameter(self):
        """Outer less inner diameter [m]."""
        return _value(np.asarray(self.outer_diameter) - np.asarray(self.inner_diameter))

    @property
    def laminar_f_re(self):
        """Exact concentric value, or the Piercy 1933 series off centre [-]."""
        eps = np.asarray(self.eccentricity)
        if not np.any(eps > 0):
            return _value(annulus_f_re(self.radius_ratio) * np.ones_like(eps))
        return _value(eccentric_annulus_f_re(self.radius_ratio, eps))

    @property
    def description(self):
        """In words."""
        where = (
            "concentric"
            if not np.any(np.asarray(self.eccentricity) > 0)
            else f"eccentricity {np.max(self.eccentricity):.2g}"
        )
        return f"annulus {_mm(self.outer_diameter)} around {_mm(self.inner_diameter)}, {where}"


@dataclass(frozen=True)
class Crescent(Annulus):
    """A crescent lumen: a round core resting on the wall of a round bore (eccentricity 1).

    The shape of the gap left beside an inner tube that lies against the outer wall (a
    catheter resting in its sheath, a round lumen set against the wall of a catheter).

    Examples
    --------
    >>> c = Crescent(outer_diameter=2.0e-3, inner_diameter=1.0e-3)
    >>> round(c.laminar_f_re, 2), c.eccentricity
    (10.25, 1.0)
    """

    eccentricity: float | np.ndarray = 1.0
    key = "crescent"

    def __post_init__(self):
        object.__setattr__(self, "eccentricity", 1.0)
        super().__post_init__()

    def _ratios(self):
        return {}

    @property
    def description(self):
        """In words."""
        return f"crescent {_mm(self.outer_diameter)} beside a {_mm(self.inner_diameter)} core"


@dataclass(frozen=True)
class Rectangle(LumenShape):
    """A rectangular lumen (a flat channel, a slit) of ``width`` x ``height`` [m].

    Examples
    --------
    >>> s = Rectangle(width=2e-3, height=1e-3)
    >>> round(s.hydraulic_diameter * 1e3, 4), round(s.laminar_f_re, 3)
    (1.3333, 15.548)
    """

    width: float | np.ndarray
    height: float | np.ndarray
    key = "rectangle"

    def __post_init__(self):
        object.__setattr__(self, "width", _size("width", self.width))
        object.__setattr__(self, "height", _size("height", self.height))

    def _sizes(self):
        return {"width": self.width, "height": self.height}

    @property
    def area(self):
        """[m^2]."""
        return _value(np.asarray(self.width) * np.asarray(self.height))

    @property
    def wetted_perimeter(self):
        """[m]."""
        return _value(2.0 * (np.asarray(self.width) + np.asarray(self.height)))

    @property
    def laminar_f_re(self):
        """Exact series [-] (:func:`rectangle_f_re`)."""
        return _value(rectangle_f_re(np.asarray(self.height) / np.asarray(self.width)))

    @property
    def description(self):
        """In words."""
        return f"rectangle {_mm(self.width)} x {_mm(self.height)}"


def _mm(value):
    arr = np.asarray(value, dtype=float) * 1e3
    low, high = f"{float(np.min(arr)):.3g}", f"{float(np.max(arr)):.3g}"
    return f"{low} mm" if low == high else f"{low}-{high} mm"


#: Shape key -> class; the scenario layer, the error messages and the docs read this dict.
LUMEN_SHAPES = {cls.key: cls for cls in (Circle, Semicircle, Annulus, Crescent, Rectangle)}
