"""Water: IAPWS 2008 viscosity and Kell 1975 density at atmospheric pressure.

All functions take temperatures in degrees Celsius, return SI (Pa s, kg/m^3) and
broadcast over numpy arrays.  Outside the liquid range at 1 atm (0-100 degC) they warn
with :class:`~rheoline.errors.RangeWarning` (registry keys ``"iapws-2008"`` and
``"kell-1975"``); impossible input (NaN, below absolute zero) raises
:class:`~rheoline.errors.InputRangeError`.  Water is the base of every solution, of
plasma and of the glycerol mixtures.

References
----------
Huber, M.L. et al., "New international formulation for the viscosity of H2O", J. Phys.
Chem. Ref. Data 38 (2009) 101-125 (IAPWS R12-08).
Kell, G.S., J. Chem. Eng. Data 20 (1975) 97-105.

Examples
--------
>>> round(water_viscosity(20.0) * 1e3, 4), round(water_density(20.0), 2)
(1.0016, 998.2)
"""

from __future__ import annotations

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.provenance import REGISTRY
from rheoline.model.validation import check_finite, check_positive, scalar_or_array, warn_outside

__all__ = [
    "WATER_RANGE_C",
    "check_temperature_c",
    "water_viscosity",
    "water_density",
    "kell_1975_water_density",
    "iapws_2008_viscosity",
]

#: Water's validated range at atmospheric pressure [degC]: liquid from the melting to
#: the normal boiling point (the registry's range of "iapws-2008").
WATER_RANGE_C = REGISTRY["iapws-2008"].ranges["temperature_c"]

_KELVIN = 273.15


def check_temperature_c(value, name: str = "temperature_c") -> np.ndarray:
    """Temperature [degC] as a float array; NaN, infinity or below absolute zero raise."""
    t = check_finite(name, value)
    bad = t <= -_KELVIN
    if np.any(bad):
        raise InputRangeError(
            f"{name} must be above absolute zero (-273.15 degC), got {t[bad].flat[0] if t.ndim else float(t)!r} "
            "degC; temperatures are in degrees Celsius (subtract 273.15 from kelvin)"
        )
    return t


# ---------------------------------------------------------------------------- water
def _kell(t):
    num = (
        999.83952
        + 16.945176 * t
        - 7.9870401e-3 * t**2
        - 46.170461e-6 * t**3
        + 105.56302e-9 * t**4
        - 280.54253e-12 * t**5
    )
    return num / (1.0 + 16.879850e-3 * t)


def kell_1975_water_density(temperature_c):
    r"""Density of air-free water at 101.325 kPa, Kell 1975.

    .. math:: \rho = \frac{999.83952 + 16.945176\,t - 7.9870401\times10^{-3} t^2
              - 46.170461\times10^{-6} t^3 + 105.56302\times10^{-9} t^4
              - 280.54253\times10^{-12} t^5}{1 + 16.879850\times10^{-3}\,t}

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature t [degC].

    Returns
    -------
    float or ndarray
        Density [kg/m^3].

    Notes
    -----
    Fitted for 0-150 degC (ITS-68 temperatures; the shift to ITS-90 is below
    0.03 K here and is neglected).  Agrees with IAPWS-95 at 0.101325 MPa within
    0.01 % over 0-100 degC (checked in the tests against the ``iapws`` package).

    References
    ----------
    Kell, G.S., "Density, thermal expansivity, and compressibility of liquid water
    from 0 to 150 degC", J. Chem. Eng. Data 20 (1975) 97-105. doi:10.1021/je60064a005

    Examples
    --------
    >>> round(kell_1975_water_density(20.0), 2)
    998.2
    """
    t = check_temperature_c(temperature_c)
    warn_outside(
        "kell-1975",
        "temperature_c",
        t,
        label="water density (Kell 1975, liquid at 1 atm)",
        unit="degC",
    )
    return scalar_or_array(_kell(t))


#: water_density is the package's name for the Kell 1975 fit.
water_density = kell_1975_water_density

# IAPWS R12-08 (2008), Table 1 (H_i) and Table 2 (H_ij); reference constants.
_T_STAR = 647.096  # K
_RHO_STAR = 322.0  # kg/m^3
_MU_STAR = 1.00e-6  # Pa s
_H0 = np.array([1.67752, 2.20462, 0.6366564, -0.241605])
_H1 = np.zeros((6, 7))
for (_i, _j), _h in {
    (0, 0): 5.20094e-1,
    (1, 0): 8.50895e-2,
    (2, 0): -1.08374,
    (3, 0): -2.89555e-1,
    (0, 1): 2.22531e-1,
    (1, 1): 9.99115e-1,
    (2, 1): 1.88797,
    (3, 1): 1.26613,
    (5, 1): 1.20573e-1,
    (0, 2): -2.81378e-1,
    (1, 2): -9.06851e-1,
    (2, 2): -7.72479e-1,
    (3, 2): -4.89837e-1,
    (4, 2): -2.57040e-1,
    (0, 3): 1.61913e-1,
    (1, 3): 2.57399e-1,
    (0, 4): -3.25372e-2,
    (3, 4): 6.98452e-2,
    (4, 5): 8.72102e-3,
    (3, 6): -4.35673e-3,
    (5, 6): -5.93264e-4,
}.items():
    _H1[_i, _j] = _h


def iapws_2008_viscosity(temperature_k, density):
    r"""Viscosity of water from temperature and density, IAPWS 2008 (without critical enhancement).

    .. math::

        \bar\mu = \bar\mu_0(\bar T)\,\bar\mu_1(\bar T, \bar\rho), \qquad
        \bar\mu_0 = \frac{100\sqrt{\bar T}}{\sum_{i=0}^{3} H_i/\bar T^{i}}, \qquad
        \bar\mu_1 = \exp\Big[\bar\rho \sum_{i=0}^{5}\Big(\frac{1}{\bar T} - 1\Big)^i
                    \sum_{j=0}^{6} H_{ij}(\bar\rho - 1)^j\Big]

    with :math:`\bar T = T/647.096` K, :math:`\bar\rho = \rho/322` kg/m^3 and
    :math:`\mu = \bar\mu \times 10^{-6}` Pa s.

    Parameters
    ----------
    temperature_k : float or array_like
        Temperature [K].
    density : float or array_like
        Density [kg/m^3].

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s].

    Notes
    -----
    The critical-enhancement factor is set to 1, which the release allows away
    from the critical point (it differs from 1 by less than 2 % only within a few
    kelvin of 647 K); for liquid water at atmospheric pressure it is exactly
    negligible.

    References
    ----------
    Huber, M.L., Perkins, R.A., Laesecke, A., Friend, D.G., Sengers, J.V.,
    Assael, M.J., Metaxa, I.N., Vogel, E., Mares, R., Miyagawa, K., "New
    international formulation for the viscosity of H2O", J. Phys. Chem. Ref. Data
    38 (2009) 101-125. doi:10.1063/1.3088050 (IAPWS R12-08).

    Examples
    --------
    >>> round(iapws_2008_viscosity(298.15, 998.0) * 1e6, 6)   # R12-08 Table 4 check value
    889.7351
    """
    tk = check_positive("temperature_k", temperature_k, "K")
    rho = check_positive("density", density, "kg/m^3")
    tr = tk / _T_STAR
    rr = rho / _RHO_STAR
    mu0 = 100.0 * np.sqrt(tr) / sum(h / tr**i for i, h in enumerate(_H0))
    x = 1.0 / tr - 1.0
    y = rr - 1.0
    total = 0.0
    for i in range(6):
        inner = sum(_H1[i, j] * y**j for j in range(7) if _H1[i, j] != 0.0)
        total = total + x**i * inner
    mu1 = np.exp(rr * total)
    return scalar_or_array(mu0 * mu1 * _MU_STAR)


def water_viscosity(temperature_c):
    """Dynamic viscosity of liquid water at atmospheric pressure.

    IAPWS 2008 viscosity evaluated at the Kell 1975 density (101.325 kPa).

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s].

    Warns
    -----
    RangeWarning
        Outside 0-100 degC (ice or steam at 1 atm; the value is that of supercooled
        or superheated liquid).

    Notes
    -----
    Agrees with the ``iapws`` package's IAPWS-95 + IAPWS 2008 evaluation within
    0.01 % over 0-100 degC (see tests).

    References
    ----------
    Huber et al., J. Phys. Chem. Ref. Data 38 (2009) 101-125 (IAPWS R12-08);
    Kell, J. Chem. Eng. Data 20 (1975) 97-105.

    Examples
    --------
    >>> round(water_viscosity(20.0) * 1e3, 4)   # mPa s
    1.0016
    >>> water_viscosity([0.0, 37.0]).round(6)
    array([0.001792, 0.000691])
    """
    t = check_temperature_c(temperature_c)
    warn_outside(
        "iapws-2008",
        "temperature_c",
        t,
        label="water viscosity (IAPWS 2008, liquid at 1 atm)",
        unit="degC",
    )
    return iapws_2008_viscosity(t + _KELVIN, _kell(t))


def _water_quiet(t):
    """Water viscosity and density [Pa s, kg/m^3] without a second range warning."""
    rho = _kell(t)
    return np.asarray(iapws_2008_viscosity(t + _KELVIN, rho)), rho
