"""Suspending media of blood products: plasma and additive solution; densities.

Red cells are suspended in plasma in whole blood and in an additive solution (with
some residual plasma) in a stored red-cell unit.  The medium sets the viscosity
scale of the suspension (:mod:`rheoline.model.blood` multiplies it by a function of
hematocrit and shear rate) and decides whether the cells aggregate at low shear.

Each medium's viscosity is water's (IAPWS 2008) times a constant ratio (1.8 for plasma), so it follows
water's temperature dependence (an assumption over 0-42 degC).
"""

from __future__ import annotations

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.provenance import REGISTRY
from rheoline.model.validation import check_hematocrit, scalar_or_array, warn_outside
from rheoline.model.viscosity import _water_quiet, check_temperature_c

__all__ = [
    "PLASMA_RELATIVE_VISCOSITY",
    "ADDITIVE_SOLUTION_RELATIVE_VISCOSITY",
    "SUSPENDING_MEDIA",
    "BLOOD_TEMPERATURE_RANGE_C",
    "plasma_viscosity",
    "medium_viscosity",
    "plasma_density",
    "blood_density",
]

#: Plasma viscosity relative to water at the same temperature [-].  1.8 gives
#: 1.24 mPa s at 37 degC, inside the usual normal range 1.10-1.35 mPa s
#: (common practice, no source); plasma is taken to follow water's temperature
#: dependence (common practice, no source).  Rosenson et al. 1996 measured
#: 1.39 +/- 0.08 mPa s in 126 healthy adults (the validation report lists it).
PLASMA_RELATIVE_VISCOSITY = 1.8

#: Viscosity of the suspending medium of a stored red-cell unit relative to water
#: [-]: a saline-adenine-glucose-mannitol additive solution (about 1.4 % w/v of
#: sugars) with some residual plasma (from memory: about 1.15; no measured value was
#: found; verify before relying on it).
ADDITIVE_SOLUTION_RELATIVE_VISCOSITY = 1.15

#: Suspending media: name -> (viscosity relative to water [-], red cells aggregate?).
#: Red cells aggregate (rouleaux) only in plasma, which is what makes blood thicken
#: steeply at low shear; in an additive solution the suspension is taken as
#: Newtonian at its high-shear viscosity (cell deformation still thins it slightly
#: at low shear, which this leaves out).
SUSPENDING_MEDIA = {
    "plasma": (PLASMA_RELATIVE_VISCOSITY, True),
    "additive-solution": (ADDITIVE_SOLUTION_RELATIVE_VISCOSITY, False),
}

#: Provenance keys of the media (:mod:`rheoline.model.provenance`).
_MEDIUM_KEYS = {"plasma": "plasma-viscosity-ratio", "additive-solution": "additive-solution-medium"}

#: Temperatures [degC] the blood models are used for: refrigerated storage
#: (about 4 degC) to hyperthermia.  The constant medium-to-water ratio is an
#: assumption over this span; outside it the models warn.
BLOOD_TEMPERATURE_RANGE_C = REGISTRY["blood-scaling"].ranges["temperature_c"]

#: Plasma and red-cell densities at 37 degC [kg/m^3] (from memory; whole blood at
#: hematocrit 0.45 then comes out at 1059 kg/m^3, the usual 1050-1060).  The
#: additive solution is taken at the plasma's density (from memory, within 1 %).
PLASMA_DENSITY_37C = 1025.0
RED_CELL_DENSITY_37C = 1100.0
REFERENCE_TEMPERATURE_C = 37.0


def _temperature(temperature_c, model, key="blood-scaling"):
    t = check_temperature_c(temperature_c)
    warn_outside(key, "temperature_c", t, label=model, unit="degC", stacklevel=4)
    return t


def _medium(medium):
    try:
        return SUSPENDING_MEDIA[medium]
    except (KeyError, TypeError):
        raise InputRangeError(
            f"medium {medium!r} is not a suspending medium; choose one of "
            f"{list(SUSPENDING_MEDIA)} ('plasma' for whole blood, 'additive-solution' "
            "for a stored red-cell unit)"
        ) from None


def _plasma(t):
    mu_w, _ = _water_quiet(t)
    return PLASMA_RELATIVE_VISCOSITY * mu_w


def _medium_mu(t, medium="plasma"):
    mu_w, _ = _water_quiet(t)
    return _medium(medium)[0] * mu_w


def plasma_viscosity(temperature_c=37.0):
    r"""Viscosity of blood plasma, :math:`\mu_p(t) = 1.8\,\mu_{water}(t)`.

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s] (1.24 mPa s at 37 degC).

    Warns
    -----
    RangeWarning
        Outside 0-42 degC (:data:`BLOOD_TEMPERATURE_RANGE_C`).

    Notes
    -----
    Plasma is Newtonian.  Its viscosity varies between people (normal range about
    1.10-1.35 mPa s at 37 degC, common practice, no source); the ratio 1.8 to
    water is a typical value, and the temperature dependence is that of water.

    Examples
    --------
    >>> round(plasma_viscosity(37.0) * 1e3, 3)
    1.244
    """
    t = _temperature(temperature_c, "the plasma viscosity model", "plasma-viscosity-ratio")
    return scalar_or_array(_plasma(t))


def medium_viscosity(temperature_c=37.0, medium="plasma"):
    """Viscosity [Pa s] of a suspending medium (:data:`SUSPENDING_MEDIA`) at a temperature.

    Parameters
    ----------
    temperature_c : float or array_like
        Temperature [degC].
    medium : {"plasma", "additive-solution"}
        Plasma for whole blood; the additive solution of a stored red-cell unit.

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s]: water's times the medium's ratio.

    Examples
    --------
    >>> round(medium_viscosity(37.0, "additive-solution") * 1e3, 3)
    0.795
    """
    ratio = _medium(medium)[0]
    t = _temperature(temperature_c, f"the {medium} viscosity model", _MEDIUM_KEYS[medium])
    mu_w, _ = _water_quiet(t)
    return scalar_or_array(ratio * mu_w)


def _density_scale(t):
    _, rho_w = _water_quiet(t)
    _, rho_37 = _water_quiet(np.asarray(REFERENCE_TEMPERATURE_C))
    return rho_w / rho_37


def plasma_density(temperature_c=37.0):
    """Density [kg/m^3] of plasma: 1025 kg/m^3 at 37 degC, with water's thermal expansion.

    Examples
    --------
    >>> round(plasma_density(37.0), 1)
    1025.0
    """
    t = _temperature(temperature_c, "the plasma density model", "plasma-viscosity-ratio")
    return scalar_or_array(PLASMA_DENSITY_37C * _density_scale(t))


def blood_density(hematocrit, temperature_c=37.0):
    r"""Density of blood, :math:`\rho = (1 - H)\,\rho_p + H\,\rho_{rbc}`, scaled like water.

    Parameters
    ----------
    hematocrit : float or array_like
        Hematocrit H [-], 0 to 0.95.
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Density [kg/m^3] (plasma 1025, red cells 1100 kg/m^3 at 37 degC, from memory).

    Examples
    --------
    >>> round(blood_density(0.45), 0)
    1059.0
    """
    h = check_hematocrit(hematocrit)
    t = _temperature(temperature_c, "the blood density model", "blood-density-mixture")
    return scalar_or_array(_blood_density(h, t))


def _blood_density(h, t):
    return ((1.0 - h) * PLASMA_DENSITY_37C + h * RED_CELL_DENSITY_37C) * _density_scale(t)
