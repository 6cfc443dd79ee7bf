"""Infusion solutions: electrolytes (Laliberte 2007 / Laliberte & Cooper 2004), 5 % dextrose
and albumin.

All functions take temperatures in degrees Celsius, return SI (Pa s, kg/m^3) and
broadcast over numpy arrays; outside a correlation's validated range they warn
(:class:`~rheoline.errors.RangeWarning`, range from the provenance registry).

* electrolyte infusions (0.9 % sodium chloride, lactated Ringer's): the Laliberte 2007
  viscosity model and the Laliberte & Cooper 2004 density model, water from
  :mod:`rheoline.model.water`;
* 5 % dextrose and albumin solutions: relative viscosities scaled on water or saline.

References
----------
Laliberte, M., J. Chem. Eng. Data 52 (2007) 321-335; Laliberte, M., Cooper, W.E.,
J. Chem. Eng. Data 49 (2004) 1141-1151; Mooney, M., J. Colloid Sci. 6 (1951) 162-170.

Examples
--------
>>> round(saline_viscosity(20.0) * 1e3, 3), round(saline_density(20.0), 1)
(1.013, 1004.5)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.validation import check_range, scalar_or_array, warn_outside
from rheoline.model.water import _water_quiet, check_temperature_c

__all__ = [
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
    "DEXTROSE_5_RELATIVE_VISCOSITY",
    "DEXTROSE_5_DENSITY_20C",
    "dextrose_5_viscosity",
    "dextrose_5_density",
    "ALBUMIN_INTRINSIC_VISCOSITY",
    "ALBUMIN_CROWDING",
    "ALBUMIN_PARTIAL_SPECIFIC_VOLUME",
    "albumin_viscosity",
    "albumin_density",
]


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


#: Mass fractions of the scalar recipes met so far (a recipe's are fixed at 20 degC, so a
#: fluid rebuilt at another temperature, as every view update does, reuses them).
_RECIPE_CACHE: dict = {}
_RECIPE_CACHE_SIZE = 64


def _recipe_mass_fractions(recipe):
    """Mass fractions of a w/v recipe, fixed at its preparation temperature (20 degC)."""
    if not all(np.ndim(v) == 0 for v in recipe.values()):
        return solution_mass_fractions(recipe, 20.0)  # a vector of recipes: not kept
    key = tuple(sorted((k, float(v)) for k, v in recipe.items()))
    ws = _RECIPE_CACHE.get(key)
    if ws is None:
        ws = solution_mass_fractions(recipe, 20.0)
        if len(_RECIPE_CACHE) >= _RECIPE_CACHE_SIZE:
            _RECIPE_CACHE.pop(next(iter(_RECIPE_CACHE)))
        _RECIPE_CACHE[key] = ws
    return dict(ws)


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
