r"""Fully developed laminar tube flow of any rheology: the Rabinowitsch-Mooney relation.

For a non-Newtonian fluid the flow at a wall shear rate is the Rabinowitsch-Mooney
wall-shear integral, written in shear-rate space so that the constitutive law need not be
inverted (:func:`rabinowitsch_flow`), and its inverse (:func:`wall_shear_rate_for_flow`).
The *apparent* viscosity :math:`\mu_{app} = \tau_w / (8\bar u/D)` of that flow makes
:math:`64/Re` reproduce the non-Newtonian laminar pressure drop exactly (the Metzner-Reed
generalized Reynolds number), which is how :mod:`rheoline.model.lumen` and the line use it.
Also the power law's closed form and the velocity profile across a lumen.

References
----------
Rabinowitsch, B., Z. Phys. Chem. A145 (1929) 1-26; Mooney, M., J. Rheol. 2 (1931) 210-222.
Metzner, A.B., Reed, J.C., "Flow of non-Newtonian fluids - correlation of the laminar, transition,
and turbulent-flow regions", AIChE J. 1 (1955) 434-440.
Bird, Armstrong, Hassager, "Dynamics of Polymeric Liquids", Vol. 1, 2nd ed., 1987.
"""

from __future__ import annotations

import numpy as np

from rheoline.model.validation import check_nonnegative, check_positive, scalar_or_array

__all__ = [
    "rabinowitsch_flow",
    "wall_shear_rate_for_flow",
    "power_law_tube_flow",
    "velocity_profile",
]

# Gauss-Legendre rule on t in [0, 1] for the Rabinowitsch integral, s = t**2 (see below).
_N_NODES = 16
_gl_x, _gl_w = np.polynomial.legendre.leggauss(_N_NODES)
_T_NODES = 0.5 * (_gl_x + 1.0)
_S_NODES = _T_NODES**2  # fraction of the wall shear rate
_S_WEIGHTS = 0.5 * _gl_w * 2.0 * _T_NODES  # ds = 2 t dt


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


def _apparent_viscosity(rheology, flow, radius, log_guess=None):
    """Apparent viscosity tau_w/(4Q/(pi R^3)) of laminar flow and its log-slope in Q."""
    if rheology.is_newtonian:
        mu = np.asarray(rheology.viscosity(), dtype=float)
        return mu, 0.0, None
    y, q, tau_w, dlog_q, dlog_tau = _solve_log_wall_shear_rate(rheology, flow, radius, log_guess)
    mu = tau_w * np.pi * radius**3 / (4.0 * q)
    return mu, dlog_tau / dlog_q - 1.0, y


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
