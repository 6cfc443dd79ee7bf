"""Viscometry: viscosity from a plate dragged over a film, or a coaxial-cylinder viscometer.

* :func:`plate_drag_viscosity`: one-point plane Couette reduction (with a film Reynolds
  number check, :class:`~rheoline.errors.RegimeWarning` above about 1400);
* :func:`couette_viscosity`: a coaxial-cylinder viscometer of any gap.

References
----------
Bird, R.B., Stewart, W.E., Lightfoot, E.N., "Transport Phenomena", 2nd ed., Wiley, 2002.

Examples
--------
>>> plate_drag_viscosity(force=0.01, area=0.01, speed=0.1, gap=1e-4)
0.001
"""

from __future__ import annotations

import warnings

import numpy as np

from rheoline.errors import InputRangeError, RegimeWarning
from rheoline.model.validation import check_positive, scalar_or_array

__all__ = ["plate_drag_viscosity", "couette_viscosity", "COUETTE_TRANSITION_REYNOLDS"]


def plate_drag_viscosity(force, area, speed, gap, density=None):
    r"""Viscosity from a plate dragged over a thin film (plane Couette flow).

    .. math:: \mu = \frac{F\,h}{A\,U}, \qquad \dot\gamma = U / h

    Parameters
    ----------
    force : float or array_like
        Drag force on the plate F [N], > 0.
    area : float or array_like
        Wetted plate area A [m^2], > 0.
    speed : float or array_like
        Plate speed U relative to the fixed wall [m/s], > 0.
    gap : float or array_like
        Film thickness h [m], > 0.
    density : float or array_like, optional
        Fluid density [kg/m^3]; given, the film Reynolds number rho U h / mu is
        checked against :data:`COUETTE_TRANSITION_REYNOLDS`.

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s] at the shear rate U/h (apparent viscosity for a
        non-Newtonian fluid).

    Warns
    -----
    RegimeWarning
        When ``density`` is given and the film Reynolds number exceeds about 1400.

    Notes
    -----
    Assumes a linear velocity profile: laminar film, gap much smaller than the
    plate, edge effects neglected.  A coaxial-cylinder viscometer with a gap much
    narrower than its radius reduces the same way with F = torque / radius and
    A = 2 pi R L; :func:`couette_viscosity` handles any gap.

    References
    ----------
    Bird, R.B., Stewart, W.E., Lightfoot, E.N., "Transport Phenomena", 2nd ed.,
    Wiley, 2002, section 1.1 (Newton's law of viscosity).

    Examples
    --------
    >>> plate_drag_viscosity(force=0.01, area=0.01, speed=0.1, gap=1e-4)
    0.001
    """
    f = check_positive("force", force, "N")
    a = check_positive("area", area, "m^2")
    u = check_positive("speed", speed, "m/s")
    h = check_positive("gap", gap, "m")
    mu = f * h / (a * u)
    if density is not None:
        rho = check_positive("density", density, "kg/m^3")
        _warn_couette_regime(rho * u * h / mu)
    return scalar_or_array(mu)


#: Reynolds number (full gap, full wall speed) above which plane Couette flow may
#: turn turbulent: about 4 x 360 (transition near 360 on half-gap and half-speed,
#: Tillmark & Alfredsson 1992, J. Fluid Mech. 235:89, from memory).
COUETTE_TRANSITION_REYNOLDS = 1400.0


def _warn_couette_regime(reynolds):
    re = np.asarray(reynolds, dtype=float)
    if np.any(re > COUETTE_TRANSITION_REYNOLDS):
        warnings.warn(
            RegimeWarning(
                f"film Reynolds number up to {float(np.max(re)):.3g} exceeds about "
                f"{COUETTE_TRANSITION_REYNOLDS:g}: the film may not be laminar and the one-point "
                "reduction overestimates viscosity; lower the speed or the gap",
                quantity="reynolds",
                value=float(np.max(re)),
                limit=COUETTE_TRANSITION_REYNOLDS,
            ),
            stacklevel=3,
        )


def couette_viscosity(torque, inner_radius, outer_radius, length, angular_speed):
    r"""Viscosity from a coaxial-cylinder (Couette) viscometer, any gap width.

    .. math:: \mu = \frac{T\,(R_o^2 - R_i^2)}{4\pi L\,\Omega\,R_i^2 R_o^2}

    Parameters
    ----------
    torque : float or array_like
        Torque on the inner cylinder T [N m], > 0.
    inner_radius, outer_radius : float or array_like
        Cylinder radii R_i < R_o [m].
    length : float or array_like
        Wetted length L [m], > 0 (end effects neglected).
    angular_speed : float or array_like
        Relative angular speed Omega [rad/s], > 0.

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s] (Newtonian; for a shear-thinning fluid an
        apparent viscosity at the inner-wall shear rate
        :math:`2\Omega R_o^2/(R_o^2 - R_i^2)`).

    References
    ----------
    Bird, R.B., Stewart, W.E., Lightfoot, E.N., "Transport Phenomena", 2nd ed.,
    Wiley, 2002, Example 3.6-3 (tangential annular flow).

    Examples
    --------
    >>> round(couette_viscosity(1.0e-4, 0.02, 0.021, 0.05, 2.0), 6)
    0.018496
    """
    t = check_positive("torque", torque, "N m")
    ri = check_positive("inner_radius", inner_radius, "m")
    ro = check_positive("outer_radius", outer_radius, "m")
    if np.any(ro <= ri):
        raise InputRangeError(
            f"outer_radius must be larger than inner_radius, got {np.min(ro):g} m <= {np.max(ri):g} m"
        )
    length = check_positive("length", length, "m")
    omega = check_positive("angular_speed", angular_speed, "rad/s")
    return scalar_or_array(t * (ro**2 - ri**2) / (4.0 * np.pi * length * omega * ri**2 * ro**2))
