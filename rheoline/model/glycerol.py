"""Glycerol-water bench analogs: Cheng 2008 viscosity, Volk & Kaehler 2018 density, and the
glycerol fraction that gives a target viscosity.

Temperatures in degrees Celsius, SI results, numpy broadcasting; outside a correlation's
validated range the functions warn (registry keys ``"cheng-2008"``,
``"volk-kaehler-2018"``).

References
----------
Cheng, N.-S., Ind. Eng. Chem. Res. 47 (2008) 3285-3288; Volk, A., Kaehler, C.J., Exp.
Fluids 59 (2018) 75.

Examples
--------
>>> round(glycerol_water_viscosity(0.5, 20.0) * 1e3, 2), round(glycerol_water_density(0.5, 20.0))
(5.99, 1126)
"""

from __future__ import annotations

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.validation import (
    check_finite,
    check_positive,
    check_range,
    scalar_or_array,
    warn_outside,
)
from rheoline.model.water import _water_quiet, check_temperature_c

__all__ = [
    "glycerol_water_viscosity",
    "glycerol_water_density",
    "glycerol_fraction_for_viscosity",
]


def _glycerol_viscosity_pure(t):
    """Viscosity of glycerol [Pa s], Cheng 2008 eq. (the pure-glycerol fit)."""
    return 12.100 * np.exp((-1233.0 + t) * t / (9900.0 + 70.0 * t))


def _cheng_mix(w, t, mu_w):
    a = 0.705 - 0.0017 * t
    b = (4.9 + 0.036 * t) * a**2.5
    alpha = 1.0 - w + a * b * w * (1.0 - w) / (a * w + b * (1.0 - w))
    return mu_w**alpha * _glycerol_viscosity_pure(t) ** (1.0 - alpha)


def glycerol_water_viscosity(mass_fraction, temperature_c):
    r"""Viscosity of a glycerol-water mixture, Cheng 2008.

    .. math::

        \mu = \mu_w^{\alpha}\,\mu_g^{1-\alpha}, \qquad
        \alpha = 1 - C_m + \frac{a b\, C_m (1 - C_m)}{a C_m + b (1 - C_m)}

        a = 0.705 - 0.0017\,t, \qquad b = (4.9 + 0.036\,t)\,a^{2.5}

        \mu_g = 12.100\,\exp\frac{(-1233 + t)\,t}{9900 + 70\,t}\ \text{Pa s}

    with :math:`C_m` the glycerol mass fraction and t in degC.  The water term
    :math:`\mu_w` is the IAPWS 2008 value (Cheng's own water fit differs from it
    by under 0.5 %), so a mass fraction of 0 gives exactly :func:`water_viscosity`.

    Parameters
    ----------
    mass_fraction : float or array_like
        Glycerol mass fraction C_m [-], 0 to 1 (0.6 means 60 wt %).
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s].

    Warns
    -----
    RangeWarning
        Outside 0-100 degC, the range Cheng fitted.

    References
    ----------
    Cheng, N.-S., "Formula for the viscosity of a glycerol-water mixture",
    Ind. Eng. Chem. Res. 47 (2008) 3285-3288. doi:10.1021/ie071349z

    Examples
    --------
    >>> round(glycerol_water_viscosity(0.5, 20.0) * 1e3, 2)   # mPa s
    5.99
    """
    w = _check_fraction(mass_fraction)
    t = check_temperature_c(temperature_c)
    warn_outside(
        "cheng-2008", "temperature_c", t, label="Cheng 2008 glycerol-water viscosity", unit="degC"
    )
    mu_w, _ = _water_quiet(t)
    return scalar_or_array(_cheng_mix(w, t, mu_w))


def _check_fraction(mass_fraction, name="mass_fraction"):
    w = check_finite(name, mass_fraction)
    if np.any(w > 1.0) and np.all(w <= 100.0):
        v = float(np.max(w))
        raise InputRangeError(
            f"{name} must be a fraction from 0 to 1, got {v:g}; if that is wt %, pass {v / 100:g}"
        )
    return check_range(name, w, 0.0, 1.0)


def glycerol_water_density(mass_fraction, temperature_c):
    r"""Density of a glycerol-water mixture, Volk & Kaehler 2018.

    .. math::

        \rho = \frac{A}{C_m/\rho_g + (1 - C_m)/\rho_w}, \qquad
        A = 1 + \kappa \sin^{1.31}\!\left(C_m^{1.31}\pi\right)

        \rho_g = 1273 - 0.612\,t, \qquad
        \kappa = 1.78\times10^{-6}\,t^2 - 1.82\times10^{-4}\,t + 1.41\times10^{-2}

    with :math:`\rho_w` from Kell 1975 (Volk & Kaehler use a close fit of their own).

    Parameters
    ----------
    mass_fraction : float or array_like
        Glycerol mass fraction [-], 0 to 1.
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Density [kg/m^3].

    Warns
    -----
    RangeWarning
        Outside 0-40 degC.  Volk & Kaehler fitted 15-30 degC (from memory); this
        formula agrees with CoolProp's aqueous-glycerol fit (Melinder 2010) within
        0.3 % over 5-40 degC (see tests), hence the wider range.

    References
    ----------
    Volk, A., Kaehler, C.J., "Density model for aqueous glycerol solutions",
    Exp. Fluids 59 (2018) 75. doi:10.1007/s00348-018-2527-y

    Examples
    --------
    >>> round(glycerol_water_density(0.5, 20.0), 0)
    1126.0
    """
    w = _check_fraction(mass_fraction)
    t = check_temperature_c(temperature_c)
    warn_outside(
        "volk-kaehler-2018",
        "temperature_c",
        t,
        label="Volk & Kaehler 2018 glycerol-water density",
        unit="degC",
    )
    _, rho_w = _water_quiet(t)
    rho_g = 1273.0 - 0.612 * t
    kappa = 1.78e-6 * t**2 - 1.82e-4 * t + 1.41e-2
    contraction = 1.0 + kappa * np.sin(w**1.31 * np.pi) ** 1.31
    return scalar_or_array(contraction / (w / rho_g + (1.0 - w) / rho_w))


def glycerol_fraction_for_viscosity(viscosity, temperature_c):
    """Glycerol mass fraction whose mixture with water has ``viscosity`` at ``temperature_c``.

    The inverse of :func:`glycerol_water_viscosity` (Cheng 2008), found by a
    vectorized bisection on the mass fraction (viscosity rises monotonically
    with it); accurate to 1e-12 in mass fraction.  This is how a bench team mixes
    a blood-mimicking fluid: about 0.40 for 3.5 mPa s at room temperature.

    Parameters
    ----------
    viscosity : float or array_like
        Target dynamic viscosity [Pa s], between that of water and of glycerol
        at the temperature.
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Glycerol mass fraction [-].

    Raises
    ------
    InputRangeError
        When the target lies outside [water, pure glycerol] at that temperature.

    Examples
    --------
    >>> round(glycerol_fraction_for_viscosity(3.5e-3, 22.0), 3)
    0.404
    """
    mu = check_positive("viscosity", viscosity, "Pa s")
    t = check_temperature_c(temperature_c)
    warn_outside(
        "cheng-2008", "temperature_c", t, label="Cheng 2008 glycerol-water viscosity", unit="degC"
    )
    mu, t = np.broadcast_arrays(mu, t)
    mu_w, _ = _water_quiet(t)
    mu_g = _glycerol_viscosity_pure(t)
    low = mu < mu_w * (1 - 1e-12)
    high = mu > mu_g * (1 + 1e-12)
    if np.any(low | high):
        i = np.flatnonzero(np.ravel(low | high))[0]
        raise InputRangeError(
            f"viscosity {np.ravel(mu)[i]:g} Pa s cannot be reached with glycerol and water at "
            f"{np.ravel(t)[i]:g} degC: choose between {np.ravel(mu_w)[i]:.4g} (water) and "
            f"{np.ravel(mu_g)[i]:.4g} Pa s (glycerol), or change the temperature"
        )
    lo = np.zeros(mu.shape)
    hi = np.ones(mu.shape)
    log_target = np.log(mu)
    for _ in range(45):
        mid = 0.5 * (lo + hi)
        above = np.log(_cheng_mix(mid, t, mu_w)) > log_target
        hi = np.where(above, mid, hi)
        lo = np.where(above, lo, mid)
    return scalar_or_array(0.5 * (lo + hi))
