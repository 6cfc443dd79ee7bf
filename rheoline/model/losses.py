r"""Minor-loss coefficients: entrance, contraction, expansion, exit and fittings.

A minor loss is written :math:`\Delta p = K \rho \bar u^2 / 2` with :math:`\bar u`
the mean velocity of the lumen the coefficient is referred to (stated for each).
An equivalent length turns a K into the length of straight lumen with the same
drop, :math:`L_{eq} = K D / f`.

The coefficients are the turbulent-flow handbook values (Crane Technical Paper
410; Idelchik).  At the low Reynolds numbers of most infusion lines real minor
losses grow roughly as C/Re; the laminar pressure budget is dominated by lumen
friction, which is modelled separately, so the constant K is kept as a simple
and slightly low estimate, and it is the default everywhere.

Option: Hooper's 1981 two-K method, :func:`hooper_1981_2k_k`,
:math:`K = K_1/Re + K_\infty (1 + 1\,\text{in}/D)`, adds the laminar rise for the
fittings of :data:`HOOPER_1981_2K` (``Fitting.hooper(kind, inner_diameter)``).  It is
not the default: its constants come from industrial pipe fittings of 1/2 inch and up
(from memory), and at infusion bores of 1-4 mm the size term :math:`1\,\text{in}/D`
multiplies :math:`K_\infty` by 7-26, an extrapolation that is not clearly better than
the constant K; small plastic parts are best measured (:class:`~rheoline.MeasuredPart`).

References
----------
Crane Co., "Flow of Fluids Through Valves, Fittings, and Pipe", Technical Paper 410, 2009.
Idelchik, I.E., "Handbook of Hydraulic Resistance", 3rd ed., Begell House, 1996.
Hooper, W.B., "The two-K method predicts head losses in pipe fittings", Chem. Eng. 88 (17)
(1981) 96-100.
"""

from __future__ import annotations

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.lumen import churchill_1977_friction
from rheoline.model.validation import check_positive, scalar_or_array

__all__ = [
    "ENTRANCE_K",
    "EXIT_K",
    "CRANE_L_OVER_D",
    "CRANE_ROUGHNESS",
    "entrance_k",
    "crane_sudden_contraction_k",
    "borda_carnot_expansion_k",
    "transition_k",
    "crane_turbulent_friction",
    "crane_fitting_k",
    "equivalent_length",
    "HOOPER_1981_2K",
    "hooper_1981_2k_k",
]

#: Entrance loss coefficients, referred to the velocity in the lumen entered.
#: Crane TP-410 (2009) p. A-29 ("resistance due to pipe entrance"); Idelchik (1996) ch. 3.
ENTRANCE_K = {
    "sharp-edged": 0.5,  # flush, square edge
    "inward-projecting": 0.78,
    "rounded": 0.04,  # r/d >= 0.15
}

#: Exit (jet) loss coefficient referred to the outlet velocity: the kinetic energy of
#: the issuing jet is dissipated downstream (Crane TP-410 (2009) p. A-29).
EXIT_K = 1.0

#: Equivalent lengths in diameters of Crane TP-410 (2009, p. A-27..A-29): K = (L/D) f_T.
#: A stopcock is modelled as a plug valve (straight-way, 3-way straight through or 3-way
#: through the branch).
CRANE_L_OVER_D = {
    "plug-valve-straight": 18.0,
    "stopcock-straight": 30.0,
    "stopcock-branch": 90.0,
    "ball-valve-full-bore": 3.0,
    "gate-valve-open": 8.0,
    "elbow-90-standard": 30.0,
    "tee-through-run": 20.0,
    "tee-through-branch": 60.0,
}

#: Hooper 1981 two-K constants (K_1, K_infinity) [-] for the kinds of :data:`CRANE_L_OVER_D`
#: with a clear counterpart in Hooper's Table 1 (screwed fittings; a tee's branch as a
#: tee used as an elbow), as tabulated in the ``fluids`` library (fluids.fittings.Hooper),
#: which the tests compare against.  Stopcocks (plug valves in Crane's terms) have no
#: counterpart in that table: give their K, or measure them.
HOOPER_1981_2K = {
    "gate-valve-open": (300.0, 0.10),  # gate valve, full line size
    "elbow-90-standard": (800.0, 0.40),  # 90 deg elbow, standard, screwed
    "tee-through-run": (200.0, 0.10),  # tee, run through, screwed
    "tee-through-branch": (500.0, 0.70),  # tee used as an elbow, standard, screwed
}

#: 1 inch [m], Hooper's reference size (exact by definition).
_INCH = 0.0254

#: Roughness [m] behind Crane's f_T (clean commercial steel, 0.0018 in).
CRANE_ROUGHNESS = 4.572e-5


def _choice(name, value, choices):
    if value not in choices:
        raise InputRangeError(
            f"{name} {value!r} is not known; choose one of {', '.join(sorted(choices))}, "
            "or give a loss coefficient k directly"
        )
    return choices[value]


def entrance_k(kind="sharp-edged"):
    """Entrance loss coefficient K [-] by name (see :data:`ENTRANCE_K`).

    Examples
    --------
    >>> entrance_k("sharp-edged")
    0.5
    """
    return _choice("entrance", kind, ENTRANCE_K)


def crane_sudden_contraction_k(upstream_diameter, downstream_diameter):
    r"""Sudden contraction K [-] referred to the downstream (smaller) velocity, Crane TP-410.

    .. math:: K_2 = 0.5\,(1 - \beta^2), \qquad \beta = d_2/d_1 \le 1

    Returns 0 where the diameter does not fall.

    References
    ----------
    Crane TP-410 (2009), p. A-26, sudden contraction (theta = 180 deg).

    Examples
    --------
    >>> round(crane_sudden_contraction_k(3.0e-3, 1.0e-3), 4)
    0.4444
    """
    d1 = check_positive("upstream_diameter", upstream_diameter, "m")
    d2 = check_positive("downstream_diameter", downstream_diameter, "m")
    beta2 = np.minimum(d2 / d1, 1.0) ** 2
    return scalar_or_array(0.5 * (1.0 - beta2))


def borda_carnot_expansion_k(upstream_diameter, downstream_diameter):
    r"""Sudden expansion K [-] referred to the upstream (smaller) velocity (Borda-Carnot).

    .. math:: K_1 = (1 - \beta^2)^2, \qquad \beta = d_1/d_2 \le 1

    Returns 0 where the diameter does not grow.

    References
    ----------
    Idelchik (1996), diagram 4-1; Crane TP-410 (2009), p. A-26.

    Examples
    --------
    >>> round(borda_carnot_expansion_k(1.0e-3, 3.0e-3), 4)
    0.7901
    """
    d1 = check_positive("upstream_diameter", upstream_diameter, "m")
    d2 = check_positive("downstream_diameter", downstream_diameter, "m")
    beta2 = np.minimum(d1 / d2, 1.0) ** 2
    return scalar_or_array((1.0 - beta2) ** 2)


def transition_k(upstream_diameter, downstream_diameter):
    r"""Loss coefficient of a step between two lumens, referred to the *downstream* velocity.

    A contraction gives :func:`crane_sudden_contraction_k`; an expansion gives the
    Borda-Carnot loss re-referred to the downstream velocity,
    :math:`(A_2/A_1 - 1)^2`; equal diameters give 0.

    Examples
    --------
    >>> round(transition_k(1.0e-3, 2.0e-3), 3)      # (4 - 1)^2
    9.0
    """
    d1 = check_positive("upstream_diameter", upstream_diameter, "m")
    d2 = check_positive("downstream_diameter", downstream_diameter, "m")
    area_ratio = (d2 / d1) ** 2
    expansion = np.maximum(area_ratio - 1.0, 0.0) ** 2
    contraction = 0.5 * (1.0 - np.minimum(area_ratio, 1.0))
    return scalar_or_array(np.where(area_ratio > 1.0, expansion, contraction))


def crane_turbulent_friction(inner_diameter, roughness=CRANE_ROUGHNESS):
    """Crane's f_T [-]: Darcy friction of fully rough turbulent flow in a pipe of this bore.

    Crane TP-410 tabulates f_T for clean commercial steel (roughness 0.0018 inch); here it
    is computed with Churchill 1977 in its fully rough limit (Re = 1e12), which is von
    Karman's rough-wall law 1/sqrt(f) = 2 log10(3.7 D / roughness).

    Examples
    --------
    >>> round(crane_turbulent_friction(0.0525), 3)     # 2 inch schedule 40
    0.019
    """
    d = check_positive("inner_diameter", inner_diameter, "m")
    return churchill_1977_friction(1e12 + 0.0 * d, roughness / d)


def crane_fitting_k(kind, inner_diameter, friction_factor=None):
    """Loss coefficient K = (L/D) f_T [-] of a named fitting (Crane TP-410 method).

    Parameters
    ----------
    kind : str
        A key of :data:`CRANE_L_OVER_D`.
    inner_diameter : float or array_like
        Bore [m] the K is referred to.
    friction_factor : float, optional
        f_T to use; default :func:`crane_turbulent_friction` of the bore.

    Notes
    -----
    Crane's method is for steel valves and fittings; small plastic medical parts
    (stopcocks, connectors) differ by maker, so treat the result as an estimate and
    prefer a bench measurement (:class:`rheoline.MeasuredPart`).

    Examples
    --------
    >>> round(crane_fitting_k("stopcock-branch", 2.0e-3, friction_factor=0.03), 2)
    2.7
    """
    l_over_d = _choice("fitting kind", kind, CRANE_L_OVER_D)
    d = check_positive("inner_diameter", inner_diameter, "m")
    ft = crane_turbulent_friction(d) if friction_factor is None else friction_factor
    return scalar_or_array(l_over_d * np.asarray(ft, dtype=float))


def equivalent_length(k, inner_diameter, friction_factor):
    r"""Equivalent length [m] of a loss coefficient, :math:`L_{eq} = K D / f`.

    Examples
    --------
    >>> round(equivalent_length(0.9, 2.0e-3, 0.03), 3)
    0.06
    """
    k = np.asarray(k, dtype=float)
    d = check_positive("inner_diameter", inner_diameter, "m")
    f = check_positive("friction_factor", friction_factor)
    return scalar_or_array(k * d / f)


def hooper_1981_2k_k(reynolds, inner_diameter, kind=None, k1=None, k_infinity=None):
    r"""Loss coefficient K [-] of a fitting by Hooper's 1981 two-K method.

    .. math:: K = \frac{K_1}{Re} + K_\infty \left(1 + \frac{1\ \text{inch}}{D}\right)

    Parameters
    ----------
    reynolds : float or array_like
        Reynolds number [-] in the fitting's bore, > 0.
    inner_diameter : float or array_like
        Bore [m] the K refers to.
    kind : str, optional
        A key of :data:`HOOPER_1981_2K`; or give ``k1`` and ``k_infinity``.
    k1, k_infinity : float, optional
        Hooper's constants [-].

    Notes
    -----
    Hooper fitted industrial fittings over laminar to turbulent flow; below a bore of
    about 1/2 inch (from memory) the size term is an extrapolation.  The line engine uses
    it only for fittings built with ``Fitting.hooper`` (the constant K stays the default).

    Examples
    --------
    >>> round(hooper_1981_2k_k(500.0, 2.0e-3, "elbow-90-standard"), 2)   # 1.6 + 0.4 * 13.7
    7.08
    """
    if kind is not None:
        k1, k_infinity = _choice("fitting kind", kind, HOOPER_1981_2K)
    elif k1 is None or k_infinity is None:
        raise InputRangeError(
            "hooper_1981_2k_k needs kind (one of "
            f"{', '.join(sorted(HOOPER_1981_2K))}) or both k1 and k_infinity"
        )
    re = check_positive("reynolds", reynolds)
    d = check_positive("inner_diameter", inner_diameter, "m")
    return scalar_or_array(k1 / re + k_infinity * (1.0 + _INCH / d))
