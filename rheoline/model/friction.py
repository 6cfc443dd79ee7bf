r"""Friction of a lumen across regimes: Shah 1978 developing laminar flow in Churchill 1977.

The apparent Darcy friction factor :math:`f_{app}` of a lumen, from its inlet, in one
smooth and monotone expression for every regime (:func:`apparent_darcy_friction`):

* developing laminar flow, the Shah 1978 apparent friction (which tends to the fully
  developed :math:`f\,Re` of the cross-section plus the Hagenbach kinetic-energy excess);
* transitional and turbulent flow, the Churchill 1977 equation, whose laminar term is
  replaced by the Shah value.

A non-circular cross-section enters through its laminar constant (Fanning :math:`f\,Re`,
16 for a circle; :mod:`rheoline.model.shapes`) and its hydraulic diameter.  Also the
regime limits, :func:`regime_of` and :func:`entrance_length`.

References
----------
Shah, R.K., "A correlation for laminar hydrodynamic entry length solutions for circular and
noncircular ducts", J. Fluids Eng. 100 (1978) 177-179.  doi:10.1115/1.3448626
Shah, R.K., London, A.L., "Laminar Flow Forced Convection in Ducts", Academic Press, 1978.
Churchill, S.W., "Friction-factor equation spans all fluid-flow regimes", Chem. Eng. 84 (1977) 91-92.
"""

from __future__ import annotations

import numpy as np

from rheoline.model.validation import check_nonnegative, check_positive, scalar_or_array

__all__ = [
    "shah_1978_apparent_friction",
    "churchill_1977_friction",
    "apparent_darcy_friction",
    "entrance_length",
    "regime_of",
    "LAMINAR_LIMIT_REYNOLDS",
    "TURBULENT_LIMIT_REYNOLDS",
    "TRANSITION_ZONE_REYNOLDS",
]

#: Reynolds number below which pipe flow is called laminar.  common practice, no source
LAMINAR_LIMIT_REYNOLDS = 2300.0
#: Reynolds number above which pipe flow is called turbulent.  common practice, no source
TURBULENT_LIMIT_REYNOLDS = 4000.0
#: Reynolds number from which a lumen is flagged as in the laminar-turbulent transition zone
#: (up to :data:`TURBULENT_LIMIT_REYNOLDS`): disturbed inlets (catheter hubs, steps) can
#: trip puffs there, and the friction blend already rises (Churchill 1977 is 3 % above
#: 64/Re at Re 2200).  # common practice, no source (turbulent puffs in pipe flow persist
#: from Re about 1700-2000, Avila et al., Science 333 (2011) 192-196, from memory)
TRANSITION_ZONE_REYNOLDS = 1800.0

_LOG_7 = np.log(7.0)
_LOG_37530 = np.log(37530.0)


def _shah_fre(x, laminar_f_re=16.0):
    """Shah 1978 f_app*Re (Fanning) at x+ = L/(D Re), and d ln(f_app Re) / d ln x+.

    Written with x-scaled derivatives so that x+ -> inf (vanishing Re) stays finite.
    ``laminar_f_re`` is the fully developed Fanning f Re of the cross-section (16 for a
    circle); the Hagenbach excess 1.25 and the constant 0.00021 stay the circle's.
    """
    return _shah_fre_of_inverse(1.0 / np.asarray(x, dtype=float), laminar_f_re)


def _shah_fre_of_inverse(inv_x, laminar_f_re=16.0):
    """:func:`_shah_fre` at ``inv_x`` = 1/x+ = D Re / L (one division fewer in the solvers)."""
    p = 3.44 * np.sqrt(inv_x)
    inv_x2 = inv_x * inv_x
    num = 0.3125 * inv_x + laminar_f_re - p
    den = 1.0 + 0.00021 * inv_x2
    q = num / den
    fre = p + q
    # x times the derivatives with respect to x: x p' = -p/2, x num' = -0.3125/x + p/2,
    # x den' = -0.00042/x^2, so x fre' = x p' + (x num' - q x den') / den
    x_dfre = -0.5 * p + (0.5 * p - 0.3125 * inv_x + 0.00042 * q * inv_x2) / den
    return fre, x_dfre / fre


def shah_1978_apparent_friction(reynolds, length, diameter):
    r"""Apparent Fanning friction factor of developing laminar flow in a circular tube (Shah 1978).

    .. math::

        f_{app} Re = \frac{3.44}{\sqrt{x^+}}
            + \frac{1.25/(4x^+) + 16 - 3.44/\sqrt{x^+}}{1 + 0.00021\,(x^+)^{-2}},
        \qquad x^+ = \frac{L}{D\,Re}

    The pressure drop from a uniform inlet profile to ``length`` is
    :math:`\Delta p = 4 f_{app} (L/D) \rho \bar u^2/2`; it includes wall friction and the
    momentum change of the developing profile.  Multiply by 4 for the Darcy factor.

    Parameters
    ----------
    reynolds : float or array_like
        Reynolds number [-], > 0.
    length : float or array_like
        Distance from the inlet [m], > 0.
    diameter : float or array_like
        Inner diameter [m], > 0.

    Returns
    -------
    float or ndarray
        Apparent Fanning friction factor [-].

    Notes
    -----
    Shah states an accuracy of about 2 % against the numerical solutions compiled by
    Shah & London for all x+.  For long tubes it tends to the fully developed
    16/Re plus the Hagenbach excess K(inf) = 1.25; for short ones to the boundary-layer
    limit 3.44/sqrt(x+).  Laminar flow only (Re below about 2000).

    References
    ----------
    Shah, R.K., J. Fluids Eng. 100 (1978) 177-179.  doi:10.1115/1.3448626

    Examples
    --------
    >>> round(shah_1978_apparent_friction(100.0, 1.0, 1.0e-3) * 100.0, 3)  # x+ = 10
    16.031
    """
    re = check_positive("reynolds", reynolds)
    length = check_positive("length", length, "m")
    d = check_positive("diameter", diameter, "m")
    fre, _ = _shah_fre(length / (d * re))
    return scalar_or_array(fre / re)


def _friction_re_and_slope(
    re, length_over_diameter, relative_roughness, developing=True, laminar_f_re=16.0
):
    """f*Re of the apparent Darcy friction (Shah laminar term in Churchill 1977), d ln f/d ln Re.

    ``length_over_diameter`` is only used where ``developing`` is true.  Works in
    logarithms and returns f*Re (64 in fully developed laminar flow), so that neither the
    laminar term at a vanishing Reynolds number nor Churchill's B term overflows.
    """
    # a yield-stress fluid at a vanishing flow has an unbounded apparent viscosity, so Re can
    # underflow to 0; f*Re is 64 there whatever Re is, so a floor changes nothing else
    re = np.maximum(np.asarray(re, dtype=float), 1e-300)
    a_re, dlog_a = _laminar_term(re, length_over_diameter, developing, laminar_f_re)
    return _churchill_blend(re, a_re, dlog_a, relative_roughness)


def _laminar_term(re, length_over_diameter, developing, laminar_f_re, inv_x=None):
    """Churchill's laminar term times Re, ``(f_lam / 8) Re``, and d ln(f_lam / 8) / d ln Re.

    The Shah 1978 developing value where ``developing`` (True for all: no mask), else the
    fully developed ``laminar_f_re / 2`` (Darcy laminar f = 4 f_app Re / Re; Churchill's
    term is f / 8).  ``inv_x``, D Re / L, may be given instead of computed.
    """
    if developing is False:
        return 0.5 * np.asarray(laminar_f_re, dtype=float), -1.0
    if inv_x is None:
        inv_x = re / np.asarray(length_over_diameter, dtype=float)
    fre, dlog_fre_dlog_x = _shah_fre_of_inverse(inv_x, laminar_f_re)
    dev = np.asarray(developing, dtype=bool)
    if developing is True or dev.all():
        return 0.5 * fre, -1.0 - dlog_fre_dlog_x
    return (
        np.where(dev, 0.5 * fre, 0.5 * np.asarray(laminar_f_re, dtype=float)),
        np.where(dev, -1.0 - dlog_fre_dlog_x, -1.0),
    )


def _churchill_blend(re, a_re, dlog_a, relative_roughness, smooth=None):
    """Churchill 1977's blend of the laminar term ``a_re / Re`` with its turbulent terms.

    Returns f*Re and d ln f / d ln Re.  Written without ``logaddexp`` and with the smooth
    wall's ``w = (7/Re)^0.9`` taken in logarithms (no exponential and logarithm where the
    wall is smooth; ``smooth`` says so when the caller knows): the same expression, a few
    transcendental functions fewer.  Exponents are kept above -600, where a term is below
    1e-260 of its neighbour and changes nothing, so that no subnormal number slows the
    arithmetic down.
    """
    log_re = np.log(re)
    log_a = np.log(a_re) - log_re
    log_w7 = 0.9 * (_LOG_7 - log_re)  # ln (7/Re)^0.9
    if smooth is None:
        smooth = not np.any(relative_roughness)
    if smooth:
        log_w, w_share = log_w7, 1.0
    else:
        w7 = np.exp(log_w7)
        w = w7 + 0.27 * np.asarray(relative_roughness, dtype=float)
        log_w, w_share = np.log(w), w7 / w
    # A is an even power, so use |ln w| (w > 1 below Re ~ 7, where A is negligible anyway)
    abs_log_w = np.maximum(np.abs(log_w), 1e-300)
    log_big_a = 16.0 * np.log(2.457 * abs_log_w)
    dlog_big_a = -14.4 * w_share / np.copysign(abs_log_w, log_w)
    log_big_b = 16.0 * (_LOG_37530 - log_re)
    # ln(A + B) = max + log1p(exp(-|ln A - ln B|)), and A's share of the sum
    gap = log_big_a - log_big_b
    e = np.exp(np.maximum(-np.abs(gap), -600.0))
    log_sum = np.maximum(log_big_a, log_big_b) + np.log1p(e)
    small = e / (1.0 + e)
    share_a = np.where(gap >= 0.0, 1.0 - small, small)
    dlog_t = 24.0 - 1.5 * share_a * (dlog_big_a + 16.0)
    ratio = np.exp(np.minimum(np.maximum(-1.5 * log_sum - 12.0 * log_a, -600.0), 700.0))
    f_re = 8.0 * a_re * (1.0 + ratio) ** (1.0 / 12.0)
    weight = ratio / (1.0 + ratio)
    slope = dlog_a + weight * (dlog_t * (1.0 / 12.0) - dlog_a)
    return f_re, slope


def _friction_and_slope(
    re, length_over_diameter, relative_roughness, developing=True, laminar_f_re=16.0
):
    """Apparent Darcy friction factor and d ln f / d ln Re (see ``_friction_re_and_slope``)."""
    f_re, slope = _friction_re_and_slope(
        re, length_over_diameter, relative_roughness, developing, laminar_f_re
    )
    return f_re / np.asarray(re, dtype=float), slope


def churchill_1977_friction(reynolds, relative_roughness=0.0):
    r"""Darcy friction factor of fully developed pipe flow in every regime (Churchill 1977).

    .. math::

        f = 8\left[\left(\frac{8}{Re}\right)^{12} + (A + B)^{-3/2}\right]^{1/12},\quad
        A = \left[2.457 \ln\frac{1}{(7/Re)^{0.9} + 0.27\,\varepsilon/D}\right]^{16},\quad
        B = \left(\frac{37530}{Re}\right)^{16}

    Parameters
    ----------
    reynolds : float or array_like
        Reynolds number [-], > 0.
    relative_roughness : float or array_like
        Roughness over diameter [-], >= 0.

    Returns
    -------
    float or ndarray
        Darcy friction factor [-] (64/Re in laminar flow).

    Notes
    -----
    One expression for laminar, transitional and turbulent flow; it follows
    Colebrook's equation within about 1 % in turbulent flow.  The transitional part is
    an interpolation: real flows there are unsteady and the friction is uncertain.

    References
    ----------
    Churchill, S.W., Chem. Eng. 84(24) (1977) 91-92.

    Examples
    --------
    >>> round(churchill_1977_friction(1000.0), 4)
    0.064
    >>> round(churchill_1977_friction(1e5, 1e-4), 4)
    0.0184
    """
    re = check_positive("reynolds", reynolds)
    rr = check_nonnegative("relative_roughness", relative_roughness)
    f, _ = _friction_and_slope(re, 1.0, rr, developing=False)
    return scalar_or_array(f)


def apparent_darcy_friction(
    reynolds, length_over_diameter=None, relative_roughness=0.0, laminar_f_re=16.0
):
    r"""Apparent Darcy friction of a lumen from its inlet: Shah 1978 inside Churchill 1977.

    Churchill's laminar term :math:`8/Re` is replaced by :math:`f_{Shah}/8` with
    :math:`f_{Shah} = 4 f_{app,Fanning}` from :func:`shah_1978_apparent_friction`:

    .. math:: f = 8\left[\left(\frac{f_{Shah}}{8}\right)^{12} + (A+B)^{-3/2}\right]^{1/12}

    so that short laminar lumens carry the developing-flow excess and turbulent ones the
    Churchill value.  With ``length_over_diameter=None`` the flow is taken as fully
    developed and the result equals :func:`churchill_1977_friction`.

    Parameters
    ----------
    reynolds : float or array_like
        Reynolds number [-], > 0.
    length_over_diameter : float or array_like, optional
        L/D of the lumen [-], > 0.
    relative_roughness : float or array_like
        Roughness over diameter [-], >= 0.
    laminar_f_re : float or array_like
        Fanning f Re of fully developed laminar flow in the cross-section [-]: 16 for a
        circle, the shape's value for a non-circular lumen (``shape.laminar_f_re``, Shah &
        London 1978), whose L/D and Reynolds number are then on the hydraulic diameter.

    Returns
    -------
    float or ndarray
        Darcy friction factor [-] such that dp = f (L/D) rho u^2 / 2.

    Notes
    -----
    A non-circular lumen's developing flow keeps the circle's Hagenbach excess (1.25) and
    Shah's constant 0.00021 (Shah 1978 tabulates its own for some shapes): an approximation
    only where the lumen is shorter than its entrance length.  Its turbulent friction is the
    circle's at the hydraulic diameter (common practice, no source; within some 10 %).

    The turbulent entrance region (some 10-60 diameters) is not corrected: its effect on
    friction is small against the uncertainty of the correlations.  The blend is monotone:
    the pressure drop rises with flow in every regime.

    Examples
    --------
    >>> round(apparent_darcy_friction(100.0, 1000.0) * 100.0, 2)   # x+ = 10
    64.12
    >>> round(apparent_darcy_friction(100.0, None, laminar_f_re=24.0), 2)   # parallel plates
    0.96
    """
    re = check_positive("reynolds", reynolds)
    rr = check_nonnegative("relative_roughness", relative_roughness)
    c = check_positive("laminar_f_re", laminar_f_re)
    if length_over_diameter is None:
        f, _ = _friction_and_slope(re, 1.0, rr, developing=False, laminar_f_re=c)
    else:
        lod = check_positive("length_over_diameter", length_over_diameter)
        f, _ = _friction_and_slope(re, lod, rr, developing=True, laminar_f_re=c)
    return scalar_or_array(f)


def entrance_length(reynolds, diameter):
    r"""Hydrodynamic entrance length [m] of a circular tube.

    .. math::

        L_e/D = \frac{0.60}{1 + 0.035\,Re} + 0.056\,Re \quad (Re < 2300),\qquad
        L_e/D = 4.4\,Re^{1/6} \quad \text{(turbulent)}

    Notes
    -----
    Laminar: Chen, R.-Y., J. Fluids Eng. 95 (1973) 153-158 (from memory), consistent with
    the Shah & London (1978) value L_hy/(D Re) = 0.056 for long tubes.  Turbulent:
    common practice, no source.

    Examples
    --------
    >>> round(entrance_length(1000.0, 1e-3) * 1e3, 1)    # mm
    56.0
    """
    re = check_nonnegative("reynolds", reynolds)
    d = check_positive("diameter", diameter, "m")
    lam = 0.60 / (1.0 + 0.035 * re) + 0.056 * re
    turb = 4.4 * np.maximum(re, 1e-300) ** (1.0 / 6.0)
    return scalar_or_array(np.where(re < LAMINAR_LIMIT_REYNOLDS, lam, turb) * d)


def regime_of(reynolds):
    """Regime name for each Reynolds number: "laminar", "transitional" or "turbulent".

    Laminar below 2300, turbulent above 4000 (common practice, no source).

    Examples
    --------
    >>> regime_of(1500.0), regime_of(3000.0), regime_of(1e4)
    ('laminar', 'transitional', 'turbulent')
    """
    re = np.asarray(reynolds, dtype=float)
    out = np.where(
        re < LAMINAR_LIMIT_REYNOLDS,
        "laminar",
        np.where(re < TURBULENT_LIMIT_REYNOLDS, "transitional", "turbulent"),
    )
    return str(out) if out.ndim == 0 else out
