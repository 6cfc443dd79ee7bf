r"""One lumen: Hagen-Poiseuille, developing laminar flow, friction across regimes, non-Newtonian flow.

The pressure lost along a straight circular lumen is written, for every fluid
and regime, in Darcy-Weisbach form

.. math:: \Delta p = f_{app}\,\frac{L}{D}\,\frac{\rho \bar u^2}{2}

with an *apparent* Darcy friction factor that blends three published pieces:

* fully developed laminar flow, :math:`f = 64/Re` (Hagen-Poiseuille);
* developing laminar flow in short lumens, the Shah 1978 apparent friction
  (which also carries the Hagenbach kinetic-energy excess of the profile);
* transitional and turbulent flow, the Churchill 1977 equation, whose laminar
  term is replaced by the Shah value so that one smooth, monotone expression
  covers all regimes (:func:`apparent_darcy_friction`).

For a non-Newtonian fluid the viscosity in the Reynolds number is the
*apparent* viscosity of the fully developed laminar flow,
:math:`\mu_{app} = \tau_w / (8\bar u/D)`, computed from the rheology model by the
Rabinowitsch-Mooney wall-shear integral (:func:`rabinowitsch_flow`); with it
:math:`64/Re` reproduces the non-Newtonian laminar pressure drop exactly (the
Metzner-Reed generalized Reynolds number).

References
----------
Sutera, S.P., Skalak, R., "The history of Poiseuille's law", Annu. Rev. Fluid Mech. 25 (1993) 1-19.
Shah, R.K., "A correlation for laminar hydrodynamic entry length solutions for circular and
noncircular ducts", J. Fluids Eng. 100 (1978) 177-179.  doi:10.1115/1.3448626
Shah, R.K., London, A.L., "Laminar Flow Forced Convection in Ducts", Academic Press, 1978.
Churchill, S.W., "Friction-factor equation spans all fluid-flow regimes", Chem. Eng. 84 (1977) 91-92.
Metzner, A.B., Reed, J.C., "Flow of non-Newtonian fluids - correlation of the laminar, transition,
and turbulent-flow regions", AIChE J. 1 (1955) 434-440.
"""

from __future__ import annotations

import numpy as np

from rheoline.model.validation import (
    check_nonnegative,
    check_positive,
    scalar_or_array,
)

__all__ = [
    "poiseuille_flow",
    "poiseuille_pressure_drop",
    "reynolds_number",
    "shah_1978_apparent_friction",
    "churchill_1977_friction",
    "apparent_darcy_friction",
    "rabinowitsch_flow",
    "wall_shear_rate_for_flow",
    "power_law_tube_flow",
    "entrance_length",
    "regime_of",
    "lumen_pressure_drop",
    "velocity_profile",
    "LAMINAR_LIMIT_REYNOLDS",
    "TURBULENT_LIMIT_REYNOLDS",
]

#: Reynolds number below which pipe flow is called laminar.  common practice, no source
LAMINAR_LIMIT_REYNOLDS = 2300.0
#: Reynolds number above which pipe flow is called turbulent.  common practice, no source
TURBULENT_LIMIT_REYNOLDS = 4000.0

# Gauss-Legendre rule on t in [0, 1] for the Rabinowitsch integral, s = t**2 (see below).
_N_NODES = 16
_gl_x, _gl_w = np.polynomial.legendre.leggauss(_N_NODES)
_T_NODES = 0.5 * (_gl_x + 1.0)
_S_NODES = _T_NODES**2  # fraction of the wall shear rate
_S_WEIGHTS = 0.5 * _gl_w * 2.0 * _T_NODES  # ds = 2 t dt


def poiseuille_flow(pressure_drop, radius, length, viscosity):
    r"""Hagen-Poiseuille volumetric flow of fully developed laminar Newtonian flow.

    .. math:: Q = \frac{\pi r^4 \Delta p}{8 \mu L}

    Parameters
    ----------
    pressure_drop : float or array_like
        Pressure drop along the lumen [Pa], >= 0.
    radius : float or array_like
        Inner radius [m], > 0.
    length : float or array_like
        Length [m], > 0.
    viscosity : float or array_like
        Dynamic viscosity [Pa s], > 0.

    Returns
    -------
    float or ndarray
        Flow [m^3/s].

    Notes
    -----
    Valid for steady, fully developed laminar flow of a Newtonian liquid in a
    straight rigid circular tube (Re below about 2000, length well beyond the
    entrance length, about 0.06 Re D).  Entrance and exit losses are not included;
    :class:`rheoline.Line` adds them.

    References
    ----------
    Sutera, S.P., Skalak, R., "The history of Poiseuille's law", Annu. Rev. Fluid
    Mech. 25 (1993) 1-19.  doi:10.1146/annurev.fl.25.010193.000245

    Examples
    --------
    >>> q = poiseuille_flow(1000.0, 0.5e-3, 0.1, 1.0e-3)   # 1 kPa, 1 mm bore, 10 cm, water
    >>> round(q * 6e7, 2)                                    # mL/min
    14.73
    """
    dp = check_nonnegative("pressure_drop", pressure_drop, "Pa")
    r = check_positive("radius", radius, "m")
    length = check_positive("length", length, "m")
    mu = check_positive("viscosity", viscosity, "Pa s")
    return scalar_or_array(np.pi * r**4 * dp / (8.0 * mu * length))


def poiseuille_pressure_drop(flow, radius, length, viscosity):
    r"""Pressure drop [Pa] of Hagen-Poiseuille flow, :math:`\Delta p = 8 \mu L Q / (\pi r^4)`.

    Parameters as :func:`poiseuille_flow`, with ``flow`` [m^3/s] >= 0.

    Examples
    --------
    >>> round(poiseuille_pressure_drop(1e-6, 0.5e-3, 0.1, 1.0e-3), 1)
    4074.4
    """
    q = check_nonnegative("flow", flow, "m^3/s")
    r = check_positive("radius", radius, "m")
    length = check_positive("length", length, "m")
    mu = check_positive("viscosity", viscosity, "Pa s")
    return scalar_or_array(8.0 * mu * length * q / (np.pi * r**4))


def reynolds_number(mean_velocity, diameter, density, viscosity):
    r"""Reynolds number :math:`Re = \rho \bar u D / \mu` [-].

    For a non-Newtonian fluid pass the apparent viscosity of the laminar flow,
    :math:`\tau_w/(8\bar u/D)`, which gives the Metzner-Reed generalized Reynolds number.

    Examples
    --------
    >>> round(reynolds_number(1.0, 1e-3, 1000.0, 1e-3))
    1000
    """
    u = check_nonnegative("mean_velocity", mean_velocity, "m/s")
    d = check_positive("diameter", diameter, "m")
    rho = check_positive("density", density, "kg/m^3")
    mu = check_positive("viscosity", viscosity, "Pa s")
    return scalar_or_array(rho * u * d / mu)


def _shah_fre(x):
    """Shah 1978 f_app*Re (Fanning) at x+ = L/(D Re), and d ln(f_app Re) / d ln x+.

    Written with x-scaled derivatives so that x+ -> inf (vanishing Re) stays finite.
    """
    rs = 1.0 / np.sqrt(x)
    p = 3.44 * rs
    inv_x = 1.0 / x
    num = 0.3125 * inv_x + 16.0 - p
    den = 1.0 + 0.00021 * inv_x * inv_x
    fre = p + num / den
    # x * derivatives with respect to x
    x_dp = -0.5 * p
    x_dnum = -0.3125 * inv_x - x_dp
    x_dden = -0.00042 * inv_x * inv_x
    x_dfre = x_dp + (x_dnum * den - num * x_dden) / (den * den)
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


def _friction_re_and_slope(re, length_over_diameter, relative_roughness, developing=True):
    """f*Re of the apparent Darcy friction (Shah laminar term in Churchill 1977), d ln f/d ln Re.

    ``length_over_diameter`` is only used where ``developing`` is true.  Works in
    logarithms and returns f*Re (64 in fully developed laminar flow), so that neither the
    laminar term at a vanishing Reynolds number nor Churchill's B term overflows.
    """
    # a yield-stress fluid at a vanishing flow has an unbounded apparent viscosity, so Re can
    # underflow to 0; f*Re is 64 there whatever Re is, so a floor changes nothing else
    re = np.maximum(np.asarray(re, dtype=float), 1e-300)
    log_re = np.log(re)
    if developing is False:
        log_a_re = np.full_like(re, np.log(8.0))
        dlog_a = -np.ones_like(re)
    else:
        x = np.asarray(length_over_diameter, dtype=float) / re
        fre, dlog_fre_dlog_x = _shah_fre(x)
        dev = np.asarray(developing, dtype=bool)
        # Darcy laminar f = 4 fre / Re; Churchill's laminar term is f/8 = fre / (2 Re)
        log_a_re = np.where(dev, np.log(fre / 2.0), np.log(8.0))
        dlog_a = np.where(dev, -1.0 - dlog_fre_dlog_x, -1.0)
    log_a = log_a_re - log_re
    w7 = np.exp(0.9 * (np.log(7.0) - log_re))
    w = w7 + 0.27 * np.asarray(relative_roughness, dtype=float)
    log_w = np.log(w)
    # A is an even power, so use |ln w| (w > 1 below Re ~ 7, where A is negligible anyway)
    abs_log_w = np.maximum(np.abs(log_w), 1e-300)
    log_big_a = 16.0 * np.log(2.457 * abs_log_w)
    dlog_big_a = 16.0 * (-0.9 * (w7 / w)) / np.where(log_w < 0, -abs_log_w, abs_log_w)
    log_big_b = 16.0 * (np.log(37530.0) - log_re)
    log_sum = np.logaddexp(log_big_a, log_big_b)
    share_a = np.exp(log_big_a - log_sum)
    dlog_sum = share_a * dlog_big_a + (1.0 - share_a) * (-16.0)
    log_t = -1.5 * log_sum
    dlog_t = -1.5 * dlog_sum
    ratio = np.exp(np.minimum(log_t - 12.0 * log_a, 700.0))
    f_re = 8.0 * np.exp(log_a_re) * (1.0 + ratio) ** (1.0 / 12.0)
    weight = ratio / (1.0 + ratio)
    slope = dlog_a + weight * (dlog_t - 12.0 * dlog_a) / 12.0
    return f_re, slope


def _friction_and_slope(re, length_over_diameter, relative_roughness, developing=True):
    """Apparent Darcy friction factor and d ln f / d ln Re (see ``_friction_re_and_slope``)."""
    f_re, slope = _friction_re_and_slope(re, length_over_diameter, relative_roughness, developing)
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


def apparent_darcy_friction(reynolds, length_over_diameter=None, relative_roughness=0.0):
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

    Returns
    -------
    float or ndarray
        Darcy friction factor [-] such that dp = f (L/D) rho u^2 / 2.

    Notes
    -----
    The turbulent entrance region (some 10-60 diameters) is not corrected: its effect on
    friction is small against the uncertainty of the correlations.  The blend is monotone:
    the pressure drop rises with flow in every regime.

    Examples
    --------
    >>> round(apparent_darcy_friction(100.0, 1000.0) * 100.0, 2)   # x+ = 10
    64.12
    """
    re = check_positive("reynolds", reynolds)
    rr = check_nonnegative("relative_roughness", relative_roughness)
    if length_over_diameter is None:
        f, _ = _friction_and_slope(re, 1.0, rr, developing=False)
    else:
        lod = check_positive("length_over_diameter", length_over_diameter)
        f, _ = _friction_and_slope(re, lod, rr, developing=True)
    return scalar_or_array(f)


def _rabinowitsch_state(rheology, log_wall_shear_rate, radius):
    """Flow, wall stress and their log-slopes at a wall shear rate (quadrature axis first).

    Returns ``(flow, wall_stress, dlog_flow, dlog_stress)`` where the slopes are
    d ln Q / d ln(gamma_w) and d ln(tau_w) / d ln(gamma_w).
    """
    gw = np.exp(log_wall_shear_rate)
    tau_w = np.asarray(rheology.stress(gw), dtype=float)
    shape = np.broadcast_shapes(np.shape(gw), np.shape(tau_w))
    s = _S_NODES.reshape((-1,) + (1,) * len(shape))
    ratio = np.asarray(rheology.stress(s * gw), dtype=float) / tau_w
    integral = np.tensordot(_S_WEIGHTS, ratio * ratio * ratio, axes=(0, 0))
    # near zero flow of a yield-stress fluid 1 - J is a difference of nearly equal numbers;
    # keep it positive (the wall stress, which sets the pressure drop, stays accurate)
    bracket = np.maximum(1.0 - integral, 1e-300)
    flow = np.pi * radius**3 * gw * bracket / 3.0
    h = 1e-5
    up = np.asarray(rheology.stress(gw * np.exp(h)), dtype=float)
    down = np.asarray(rheology.stress(gw * np.exp(-h)), dtype=float)
    dlog_stress = (np.log(up) - np.log(down)) / (2.0 * h)
    # Q = (pi R^3 / 3) (gw - I / tau_w^3) with I = int_0^gw tau^3 dg = gw tau_w^3 J, so
    # dQ/dgw = pi R^3 I tau_w' / tau_w^4 and d ln Q / d ln gw = 3 J t / (1 - J)
    dlog_flow = 3.0 * dlog_stress * integral / bracket
    # at a vanishing flow of a yield-stress fluid the stress is tau_y to the last digit and
    # both slopes round to 0; keep the Newton steps defined (their true limit is about 1.5)
    dlog_flow = np.where(dlog_flow > 1e-9, dlog_flow, 1.0)
    flow = np.maximum(flow, 1e-300)
    return flow, tau_w, dlog_flow, dlog_stress


def rabinowitsch_flow(rheology, wall_shear_rate, radius):
    r"""Fully developed laminar tube flow of any rheology at a given wall shear rate.

    The Rabinowitsch-Mooney wall-shear integral, integrated by parts and written in
    shear-rate space so that the constitutive law need not be inverted:

    .. math::

        Q = \frac{\pi R^3}{\tau_w^3}\int_0^{\tau_w} \tau^2\dot\gamma(\tau)\,d\tau
          = \frac{\pi R^3 \dot\gamma_w}{3}\left[1 - \int_0^1
            \left(\frac{\tau(\dot\gamma_w s)}{\tau_w}\right)^3 ds\right]

    evaluated with a fixed 16-point Gauss-Legendre rule in :math:`t = \sqrt{s}` (which
    smooths the yield-stress and power-law behaviour near the axis).  The pressure
    drop over a length L is :math:`2 L \tau_w / R`.

    Parameters
    ----------
    rheology : RheologyModel
        Any model of :mod:`rheoline.model.rheology` (parameters may be arrays).
    wall_shear_rate : float or array_like
        Wall shear rate [1/s], > 0.
    radius : float or array_like
        Inner radius [m], > 0.

    Returns
    -------
    flow : float or ndarray
        Flow [m^3/s].
    wall_shear_stress : float or ndarray
        Wall shear stress [Pa].

    Notes
    -----
    Exact for a Newtonian fluid and within about 1e-6 of the closed form for a power
    law with n >= 0.3; a Casson plug (stress below the yield stress near the axis)
    contributes no shear and is handled by the same integral.

    References
    ----------
    Rabinowitsch, B., Z. Phys. Chem. A145 (1929) 1-26; Mooney, M., J. Rheol. 2 (1931) 210-222.

    Examples
    --------
    >>> from rheoline.model.rheology import Newtonian
    >>> q, tau = rabinowitsch_flow(Newtonian(1e-3), 1000.0, 0.5e-3)
    >>> round(q / (3.141592653589793 * 0.5e-3**3 * 1000.0 / 4.0), 9), round(tau, 6)
    (1.0, 1.0)
    """
    gw = check_positive("wall_shear_rate", wall_shear_rate, "1/s")
    r = check_positive("radius", radius, "m")
    flow, tau_w, _, _ = _rabinowitsch_state(rheology, np.log(gw), r)
    return scalar_or_array(flow), scalar_or_array(tau_w)


def _solve_log_wall_shear_rate(rheology, flow, radius, log_guess=None, iterations=40, tol=1e-12):
    """Vectorized Newton on ln(gamma_w) so that the Rabinowitsch flow equals ``flow``."""
    target = np.log(flow)
    y = np.log(4.0 * flow / (np.pi * radius**3)) if log_guess is None else log_guess
    for _ in range(iterations):
        q, tau_w, dlog_q, dlog_tau = _rabinowitsch_state(rheology, y, radius)
        step = (target - np.log(q)) / dlog_q
        step = np.clip(step, -5.0, 5.0)
        y = y + step
        if np.all(np.abs(step) < tol):
            break
    return y, q, tau_w, dlog_q, dlog_tau


def wall_shear_rate_for_flow(rheology, flow, radius):
    """Wall shear rate [1/s] and stress [Pa] of fully developed laminar flow at ``flow``.

    The inverse of :func:`rabinowitsch_flow`, by vectorized Newton steps on the
    logarithm of the wall shear rate, started from the Newtonian value 4Q/(pi R^3).

    Examples
    --------
    >>> from rheoline.model.rheology import PowerLaw
    >>> g, tau = wall_shear_rate_for_flow(PowerLaw(0.01, 0.5), 1e-6, 0.5e-3)
    >>> round(g / (4e-6 / (3.141592653589793 * 0.5e-3**3)), 4)   # (3n+1)/(4n) = 1.25
    1.25
    """
    q = check_positive("flow", flow, "m^3/s")
    r = check_positive("radius", radius, "m")
    y, _, tau_w, _, _ = _solve_log_wall_shear_rate(rheology, q, r)
    return scalar_or_array(np.exp(y)), scalar_or_array(tau_w)


def power_law_tube_flow(pressure_drop, radius, length, consistency, flow_index):
    r"""Exact laminar tube flow of a power-law fluid.

    .. math:: Q = \frac{\pi n R^3}{3n + 1}\left(\frac{\tau_w}{K}\right)^{1/n},
              \qquad \tau_w = \frac{\Delta p\, R}{2 L}

    Parameters
    ----------
    pressure_drop : float or array_like
        [Pa], >= 0.
    radius, length : float or array_like
        [m], > 0.
    consistency : float or array_like
        K [Pa s^n], > 0.
    flow_index : float or array_like
        n [-], > 0.

    Returns
    -------
    float or ndarray
        Flow [m^3/s].

    References
    ----------
    Bird, Armstrong, Hassager, "Dynamics of Polymeric Liquids", Vol. 1, 2nd ed., 1987.

    Examples
    --------
    >>> round(power_law_tube_flow(1000.0, 0.5e-3, 0.1, 1e-3, 1.0) * 6e7, 2)   # = Poiseuille
    14.73
    """
    dp = check_nonnegative("pressure_drop", pressure_drop, "Pa")
    r = check_positive("radius", radius, "m")
    length = check_positive("length", length, "m")
    k = check_positive("consistency", consistency)
    n = check_positive("flow_index", flow_index)
    tau_w = dp * r / (2.0 * length)
    return scalar_or_array(np.pi * n * r**3 / (3.0 * n + 1.0) * (tau_w / k) ** (1.0 / n))


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


def _lumen_friction(
    flow, area, diameter, length, relative_roughness, density, viscosity, dlog_viscosity, developing
):
    """Frictional drop of one lumen, d ln(dp)/d ln(Q), Reynolds number and mean velocity.

    ``viscosity`` is the apparent viscosity at this flow and ``dlog_viscosity`` its
    log-slope d ln(mu)/d ln(Q) (0 for a Newtonian fluid).
    """
    u = flow / area
    re = density * u * diameter / viscosity
    lod = length / diameter
    f_re, dlog_f = _friction_re_and_slope(re, lod, relative_roughness, developing)
    # f (L/D) rho u^2 / 2 written with f*Re, so that a vanishing flow stays finite
    dp = f_re * lod * 0.5 * viscosity * u / diameter
    slope = 2.0 + dlog_f * (1.0 - dlog_viscosity)
    return dp, slope, re, u


def _apparent_viscosity(rheology, flow, radius, log_guess=None):
    """Apparent viscosity tau_w/(4Q/(pi R^3)) of laminar flow and its log-slope in Q."""
    if rheology.is_newtonian:
        mu = np.asarray(rheology.viscosity(), dtype=float)
        return mu, 0.0, None
    y, q, tau_w, dlog_q, dlog_tau = _solve_log_wall_shear_rate(rheology, flow, radius, log_guess)
    mu = tau_w * np.pi * radius**3 / (4.0 * q)
    return mu, dlog_tau / dlog_q - 1.0, y


def lumen_pressure_drop(fluid, flow, inner_diameter, length, roughness=0.0, developing=True):
    r"""Frictional pressure drop [Pa] of one straight lumen at a flow, for any fluid and regime.

    :math:`\Delta p = f\,(L/D)\,\rho\bar u^2/2` with :func:`apparent_darcy_friction`
    (developing laminar flow from a uniform inlet profile when ``developing``), and for a
    non-Newtonian fluid the Metzner-Reed Reynolds number built on the Rabinowitsch
    apparent viscosity.  Entrance, transition and exit losses are not included.

    Parameters
    ----------
    fluid : Fluid
        The fluid (density and rheology).
    flow : float or array_like
        [m^3/s], > 0.
    inner_diameter, length : float or array_like
        [m], > 0.
    roughness : float or array_like
        Absolute roughness [m], >= 0.
    developing : bool
        Include the Shah 1978 developing-flow excess (True) or take the flow as fully
        developed (False).

    Returns
    -------
    float or ndarray
        Pressure drop [Pa].

    Examples
    --------
    >>> from rheoline.model.fluid_base import newtonian_fluid
    >>> water = newtonian_fluid("water", 1.0e-3, 998.0)
    >>> dp = lumen_pressure_drop(water, 1e-8, 0.5e-3, 1.0, developing=False)
    >>> round(dp / poiseuille_pressure_drop(1e-8, 0.25e-3, 1.0, 1.0e-3), 6)
    1.0
    """
    q = check_positive("flow", flow, "m^3/s")
    d = check_positive("inner_diameter", inner_diameter, "m")
    length = check_positive("length", length, "m")
    eps = check_nonnegative("roughness", roughness, "m")
    mu, dlog_mu, _ = _apparent_viscosity(fluid.rheology, q, d / 2.0)
    dp, _, _, _ = _lumen_friction(
        q, np.pi * d * d / 4.0, d, length, eps / d, fluid.density, mu, dlog_mu, developing
    )
    return scalar_or_array(dp)


def velocity_profile(fluid, flow, inner_diameter, n_points=41):
    r"""Fully developed laminar velocity profile across a lumen.

    .. math:: u(r) = \int_r^R \dot\gamma\!\left(\tau_w \frac{r'}{R}\right) dr'

    parabolic for a Newtonian fluid, blunted for a shear-thinning one, with a plug core
    for a yield-stress fluid.

    Parameters
    ----------
    fluid : Fluid
        The fluid (scalar properties).
    flow : float
        [m^3/s], > 0.
    inner_diameter : float
        [m], > 0.
    n_points : int
        Number of radii from the axis to the wall.

    Returns
    -------
    radius : ndarray
        Radii [m] from 0 to R.
    velocity : ndarray
        Axial velocity [m/s] at those radii (0 at the wall).

    Examples
    --------
    >>> from rheoline.model.fluid_base import newtonian_fluid
    >>> r, u = velocity_profile(newtonian_fluid("w", 1e-3, 998.0), 1e-6, 1e-3)
    >>> round(float(u[0]) / (1e-6 / (3.141592653589793 * 0.5e-3**2)), 3)   # centre / mean
    2.0
    """
    q = float(check_positive("flow", flow, "m^3/s"))
    d = float(check_positive("inner_diameter", inner_diameter, "m"))
    radius = d / 2.0
    mu, _, y = _apparent_viscosity(fluid.rheology, q, radius)
    tau_w = float(np.asarray(mu)) * 4.0 * q / (np.pi * radius**3)
    # fine grid for the integral, reported on n_points radii
    fine = np.linspace(0.0, radius, 20 * n_points + 1)
    rate = np.asarray(fluid.rheology.shear_rate_at_stress(tau_w * fine / radius), dtype=float)
    rate = np.broadcast_to(rate, fine.shape)
    seg = 0.5 * (rate[1:] + rate[:-1]) * np.diff(fine)
    u_fine = np.concatenate([np.cumsum(seg[::-1])[::-1], [0.0]])
    # rescale the small quadrature error so that the profile carries exactly the flow
    carried = np.trapezoid(2.0 * np.pi * fine * u_fine, fine)
    u_fine = u_fine * q / carried
    r_out = np.linspace(0.0, radius, n_points)
    return r_out, np.interp(r_out, fine, u_fine)
