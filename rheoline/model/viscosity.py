"""Viscosity and density of water, infusion solutions and glycerol-water bench analogs.

All functions take temperatures in degrees Celsius, return SI (Pa s, kg/m^3) and
broadcast over numpy arrays.  Outside a correlation's validated range they warn
with :class:`~rheoline.errors.RangeWarning`; impossible input (NaN, below
absolute zero, a mass fraction above 1) raises
:class:`~rheoline.errors.InputRangeError`.

Models
------
* water: IAPWS 2008 viscosity (Huber et al. 2009) at 0.101325 MPa, with the
  density from Kell 1975 (checked against IAPWS-95 in the tests);
* electrolyte infusions (0.9 % sodium chloride, lactated Ringer's): the
  Laliberte 2007 viscosity model and Laliberte & Cooper 2004 density model;
* 5 % dextrose and albumin solutions: relative viscosities scaled on water;
* glycerol-water mixtures: Cheng 2008 viscosity, Volk & Kaehler 2018 density,
  and the inverse (the glycerol fraction that gives a target viscosity).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.provenance import REGISTRY
from rheoline.model.validation import (
    check_finite,
    check_positive,
    check_range,
    scalar_or_array,
    warn_outside,
)

__all__ = [
    "check_temperature_c",
    "water_viscosity",
    "water_density",
    "kell_1975_water_density",
    "iapws_2008_viscosity",
    "LaliberteSolute",
    "LALIBERTE_SOLUTES",
    "laliberte_2007_viscosity",
    "laliberte_cooper_2004_density",
    "solution_mass_fractions",
    "SALINE_0_9_G_PER_L",
    "LACTATED_RINGERS_G_PER_L",
    "saline_viscosity",
    "saline_density",
    "lactated_ringers_viscosity",
    "lactated_ringers_density",
    "dextrose_5_viscosity",
    "dextrose_5_density",
    "albumin_viscosity",
    "albumin_density",
    "glycerol_water_viscosity",
    "glycerol_water_density",
    "glycerol_fraction_for_viscosity",
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


# ------------------------------------------------------------------ electrolytes
@dataclass(frozen=True)
class LaliberteSolute:
    """Coefficients of one solute in the Laliberte viscosity and density models.

    ``v1..v6`` are the viscosity coefficients of Laliberte 2007, ``c0..c4`` the
    apparent-density coefficients of Laliberte & Cooper 2004, as compiled in
    Laliberte 2009 (J. Chem. Eng. Data 54, 1725-1760, supporting tables).
    ``molar_mass`` is in g/mol; ``max_mass_fraction`` is the highest solute mass
    fraction of the data the coefficients were fitted to (the lower of the
    viscosity and density data ranges in the 2009 compilation).
    """

    name: str
    molar_mass: float
    v: tuple
    c: tuple
    max_mass_fraction: float = 0.25


#: Solute coefficients (Laliberte 2007 viscosity; Laliberte & Cooper 2004 density;
#: values as compiled in Laliberte 2009).
LALIBERTE_SOLUTES = {
    "NaCl": LaliberteSolute(
        "sodium chloride",
        58.44,
        (16.221789, 1.322931, 1.48486, 0.007469, 30.780201, 2.058269),
        (-0.003241, 0.063635, 1.013714, 0.014595, 3317.348544),
        0.2645,
    ),
    "KCl": LaliberteSolute(
        "potassium chloride",
        74.55,
        (6.48806, 1.317531, -0.777821, 0.092716, -1.300203, 2.081207),
        (-0.855929, 6.040736, 2.817874, 0.025392, 2681.617235),
        0.2643,
    ),
    "CaCl2": LaliberteSolute(
        "calcium chloride",
        110.98,
        (32.01437, 0.788104, -1.141205, 0.0027, 776516.746907, 5.838881),
        (-9.728937, 14.700535, 4.190333, 0.03974, 2708.127789),
        0.5132,
    ),
}

#: 0.9 % w/v sodium chloride: 9 g of NaCl per litre of solution (common practice, no source).
SALINE_0_9_G_PER_L = {"NaCl": 9.0}

#: Lactated Ringer's (Hartmann's) per litre, the usual pharmacopoeial recipe (from memory):
#: NaCl 6.0 g, sodium lactate 3.1 g, KCl 0.3 g, CaCl2.2H2O 0.2 g (= 0.151 g CaCl2).
#: Sodium lactate has no Laliberte coefficients; it enters as the NaCl of equal
#: sodium content, 3.1 g / 112.06 g/mol x 58.44 g/mol = 1.617 g (an assumption).
LACTATED_RINGERS_G_PER_L = {
    "NaCl": 6.0 + 3.1 / 112.06 * 58.44,
    "KCl": 0.3,
    "CaCl2": 0.2 * 110.98 / 147.01,
}


def _check_mass_fractions(mass_fractions):
    unknown = sorted(set(mass_fractions) - set(LALIBERTE_SOLUTES))
    if unknown:
        raise InputRangeError(
            f"solute {unknown[0]!r} has no Laliberte coefficients here; choose from "
            f"{sorted(LALIBERTE_SOLUTES)} (or add its row to LALIBERTE_SOLUTES)"
        )
    ws = {k: check_range(f"mass fraction of {k}", v, 0.0, 1.0) for k, v in mass_fractions.items()}
    total = sum(ws.values()) if ws else np.zeros(())
    if np.any(total >= 1.0):
        raise InputRangeError(
            "solute mass fractions must add up to less than 1 (water is the rest)"
        )
    for k, w in ws.items():
        warn_outside(
            "laliberte-2007",
            f"mass fraction of {k}",
            w,
            low=0.0,
            high=LALIBERTE_SOLUTES[k].max_mass_fraction,
            label="the Laliberte coefficients (their fitted data)",
            stacklevel=4,
        )
    return ws, 1.0 - total


def laliberte_2007_viscosity(mass_fractions, temperature_c):
    r"""Viscosity of an aqueous electrolyte solution, Laliberte 2007.

    .. math::

        \ln\mu_m = w_w \ln\mu_w + \sum_i w_i \ln\mu_i, \qquad
        \mu_i = \frac{\exp\left[(v_1 (1 - w_w)^{v_2} + v_3)/(v_4 t + 1)\right]}
                     {v_5 (1 - w_w)^{v_6} + 1}\ \text{mPa s}

    with :math:`w_i` the solute mass fractions, :math:`w_w = 1 - \sum w_i`, t in
    degC, and :math:`\mu_w` the viscosity of water (here IAPWS 2008, which
    Laliberte's own water equation fits).

    Parameters
    ----------
    mass_fractions : dict
        Solute formula (a key of :data:`LALIBERTE_SOLUTES`) -> mass fraction [-].
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s].

    References
    ----------
    Laliberte, M., "Model for calculating the viscosity of aqueous solutions",
    J. Chem. Eng. Data 52 (2007) 321-335. doi:10.1021/je0604075

    Examples
    --------
    >>> round(laliberte_2007_viscosity({"NaCl": 0.009}, 25.0) * 1e3, 4)
    0.9012
    """
    t = check_temperature_c(temperature_c)
    warn_outside(
        "laliberte-2007",
        "temperature_c",
        t,
        label="the Laliberte 2007 solution viscosity model",
        unit="degC",
    )
    ws, w_water = _check_mass_fractions(mass_fractions)
    mu_w, _ = _water_quiet(t)
    log_mu = w_water * np.log(mu_w * 1e3)
    for key, w in ws.items():
        v1, v2, v3, v4, v5, v6 = LALIBERTE_SOLUTES[key].v
        s = 1.0 - w_water
        mu_i = np.exp((v1 * s**v2 + v3) / (v4 * t + 1.0)) / (v5 * s**v6 + 1.0)
        log_mu = log_mu + w * np.log(mu_i)
    return scalar_or_array(np.exp(log_mu) * 1e-3)


def laliberte_cooper_2004_density(mass_fractions, temperature_c):
    r"""Density of an aqueous electrolyte solution, Laliberte & Cooper 2004.

    .. math::

        \frac{1}{\rho_m} = \frac{w_w}{\rho_w} + \sum_i \frac{w_i}{\rho_{app,i}}, \qquad
        \rho_{app,i} = \frac{(c_0 (1 - w_w) + c_1)\,e^{10^{-6}(t + c_4)^2}}
                            {(1 - w_w) + c_2 + c_3 t}

    Parameters
    ----------
    mass_fractions : dict
        Solute formula -> mass fraction [-].
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Density [kg/m^3] (water from Kell 1975).

    References
    ----------
    Laliberte, M., Cooper, W.E., "Model for calculating the density of aqueous
    electrolyte solutions", J. Chem. Eng. Data 49 (2004) 1141-1151.
    doi:10.1021/je0498659

    Examples
    --------
    >>> round(laliberte_cooper_2004_density({"NaCl": 0.009}, 25.0), 1)
    1003.3
    """
    t = check_temperature_c(temperature_c)
    warn_outside(
        "laliberte-cooper-2004",
        "temperature_c",
        t,
        label="the Laliberte & Cooper 2004 density model",
        unit="degC",
    )
    ws, w_water = _check_mass_fractions(mass_fractions)
    _, rho_w = _water_quiet(t)
    specific_volume = w_water / rho_w
    for key, w in ws.items():
        c0, c1, c2, c3, c4 = LALIBERTE_SOLUTES[key].c
        s = 1.0 - w_water
        rho_app = (c0 * s + c1) * np.exp(1e-6 * (t + c4) ** 2) / (s + c2 + c3 * t)
        specific_volume = specific_volume + w / rho_app
    return scalar_or_array(1.0 / specific_volume)


def solution_mass_fractions(grams_per_litre, temperature_c=20.0):
    """Mass fractions [-] of solutes given in g per litre of solution (w/v).

    The solution's own density closes the conversion, ``w_i = c_i / rho``, solved
    by fixed-point iteration (it converges in a few steps for dilute solutions).

    Parameters
    ----------
    grams_per_litre : dict
        Solute formula -> concentration [g/L] (= kg/m^3), 0 to 500.
    temperature_c : float or array_like
        Temperature [degC] at which the solution was made up.

    Returns
    -------
    dict
        Solute formula -> mass fraction [-].

    Examples
    --------
    >>> round(float(solution_mass_fractions({"NaCl": 9.0})["NaCl"]), 5)
    0.00896
    """
    t = check_temperature_c(temperature_c)
    conc = {
        k: check_range(f"concentration of {k}", v, 0.0, 500.0, "g/L")
        for k, v in grams_per_litre.items()
    }
    _, rho = _water_quiet(t)
    for _ in range(6):
        ws = {k: c / rho for k, c in conc.items()}
        rho = np.asarray(laliberte_cooper_2004_density(ws, t))
    return {k: c / rho for k, c in conc.items()}


def _recipe_mass_fractions(recipe):
    """Mass fractions of a w/v recipe, fixed at its preparation temperature (20 degC)."""
    return solution_mass_fractions(recipe, 20.0)


def saline_viscosity(temperature_c, concentration=9.0):
    """Viscosity of sodium chloride solution (0.9 % w/v by default), Laliberte 2007.

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [degC].
    concentration : float or array_like
        NaCl per volume of solution [g/L] (9.0 is "0.9 %" saline), 0 to 300.

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s].

    Notes
    -----
    The w/v label is converted to a mass fraction at 20 degC, the usual
    preparation temperature; the mass fraction is then held fixed.

    Examples
    --------
    >>> round(saline_viscosity(20.0) * 1e3, 3)
    1.013
    """
    ws = _recipe_mass_fractions({"NaCl": concentration})
    return laliberte_2007_viscosity(ws, temperature_c)


def saline_density(temperature_c, concentration=9.0):
    """Density of sodium chloride solution (0.9 % w/v by default), Laliberte & Cooper 2004.

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [degC].
    concentration : float or array_like
        NaCl per volume of solution [g/L].

    Returns
    -------
    float or ndarray
        Density [kg/m^3].

    References
    ----------
    Laliberte & Cooper, J. Chem. Eng. Data 49 (2004) 1141-1151.

    Examples
    --------
    >>> round(saline_density(20.0), 1)
    1004.5
    """
    ws = _recipe_mass_fractions({"NaCl": concentration})
    return laliberte_cooper_2004_density(ws, temperature_c)


def lactated_ringers_viscosity(temperature_c):
    """Viscosity of lactated Ringer's solution, Laliberte 2007 mixture rule.

    Salts of :data:`LACTATED_RINGERS_G_PER_L` (recipe from memory; sodium lactate
    as the NaCl of the same sodium content, an assumption whose effect on
    viscosity is a fraction of a percent).

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s].

    References
    ----------
    Laliberte, J. Chem. Eng. Data 52 (2007) 321-335.

    Examples
    --------
    >>> round(lactated_ringers_viscosity(20.0) * 1e3, 3)
    1.011
    """
    ws = _recipe_mass_fractions(LACTATED_RINGERS_G_PER_L)
    return laliberte_2007_viscosity(ws, temperature_c)


def lactated_ringers_density(temperature_c):
    """Density of lactated Ringer's solution, Laliberte & Cooper 2004 mixture rule.

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Density [kg/m^3].

    Examples
    --------
    >>> round(lactated_ringers_density(20.0), 1)
    1003.8
    """
    ws = _recipe_mass_fractions(LACTATED_RINGERS_G_PER_L)
    return laliberte_cooper_2004_density(ws, temperature_c)


# --------------------------------------------------------- dextrose and albumin
#: 5 % dextrose (50 g/L dextrose monohydrate, about 4.6 wt % glucose): viscosity
#: relative to water about 1.13 at 20 degC, density about 1017 kg/m^3 at 20 degC
#: (from memory, after the handbook tables of aqueous D-glucose; verify before
#: relying on the third digit).
DEXTROSE_5_RELATIVE_VISCOSITY = 1.13
DEXTROSE_5_DENSITY_20C = 1017.0


def dextrose_5_viscosity(temperature_c):
    """Viscosity [Pa s] of 5 % dextrose: water viscosity times a relative viscosity of 1.13.

    The relative viscosity (from memory) is held constant with temperature, which
    holds for dilute sugar solutions within about 2 % over 5-40 degC (an
    assumption).

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s].

    Examples
    --------
    >>> round(dextrose_5_viscosity(20.0) * 1e3, 2)
    1.13
    """
    t = check_temperature_c(temperature_c)
    warn_outside(
        "dextrose-5-relative", "temperature_c", t, label="the 5 % dextrose model", unit="degC"
    )
    mu_w, _ = _water_quiet(t)
    return scalar_or_array(DEXTROSE_5_RELATIVE_VISCOSITY * mu_w)


def dextrose_5_density(temperature_c):
    """Density of 5 % dextrose: 1017 kg/m^3 at 20 degC (from memory) scaled with water's expansion.

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Density [kg/m^3].

    Examples
    --------
    >>> round(dextrose_5_density(20.0), 1)
    1017.0
    """
    t = check_temperature_c(temperature_c)
    warn_outside(
        "dextrose-5-relative", "temperature_c", t, label="the 5 % dextrose model", unit="degC"
    )
    _, rho_w = _water_quiet(t)
    _, rho_20 = _water_quiet(np.asarray(20.0))
    return scalar_or_array(DEXTROSE_5_DENSITY_20C * rho_w / rho_20)


#: Albumin in saline: intrinsic viscosity about 4.0 mL/g and a crowding
#: coefficient about 1.3 mL/g in the Mooney form (from memory, for human serum
#: albumin near neutral pH); partial specific volume 0.733 mL/g (from memory).
ALBUMIN_INTRINSIC_VISCOSITY = 4.0e-3  # m^3/kg
ALBUMIN_CROWDING = 1.3e-3  # m^3/kg
ALBUMIN_PARTIAL_SPECIFIC_VOLUME = 0.733e-3  # m^3/kg


def albumin_viscosity(concentration, temperature_c):
    r"""Viscosity [Pa s] of human albumin in 0.9 % saline (Mooney form).

    .. math:: \mu = \mu_{saline}(t)\,\exp\!\left(\frac{[\eta]\,c}{1 - k\,c}\right)

    Parameters
    ----------
    concentration : float or array_like
        Albumin per volume [kg/m^3] (50 for "5 %", 200 for "20 %", 250 for "25 %"),
        0 to 300.
    temperature_c : float or array_like
        Temperature [degC].

    Notes
    -----
    Intrinsic viscosity [eta] = 4.0 mL/g and k = 1.3 mL/g are recalled values
    (from memory); the result is an estimate within perhaps 15 % at 20-25 %
    albumin.  The relative viscosity is held constant with temperature.

    References
    ----------
    Mooney, M., "The viscosity of a concentrated suspension of spherical
    particles", J. Colloid Sci. 6 (1951) 162-170.

    Examples
    --------
    >>> round(albumin_viscosity(50.0, 20.0) / saline_viscosity(20.0), 2)
    1.24
    """
    c = check_range(
        "concentration",
        concentration,
        0.0,
        300.0,
        "kg/m^3",
        hint="pass kg/m^3 (g/L): 50 for a 5 % solution",
    )
    mu_s = saline_viscosity(temperature_c)
    return scalar_or_array(
        mu_s * np.exp(ALBUMIN_INTRINSIC_VISCOSITY * c / (1.0 - ALBUMIN_CROWDING * c))
    )


def albumin_density(concentration, temperature_c):
    r"""Density [kg/m^3] of albumin in saline: :math:`\rho = \rho_s + c(1 - \bar v \rho_s)`.

    Examples
    --------
    >>> round(albumin_density(50.0, 20.0), 1)
    1017.7
    """
    c = check_range("concentration", concentration, 0.0, 300.0, "kg/m^3")
    rho_s = np.asarray(saline_density(temperature_c))
    return scalar_or_array(rho_s + c * (1.0 - ALBUMIN_PARTIAL_SPECIFIC_VOLUME * rho_s))


# ------------------------------------------------------------- glycerol-water


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
