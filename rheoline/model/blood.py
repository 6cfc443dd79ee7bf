"""Blood: plasma viscosity, whole-blood viscosity and the Fahraeus-Lindqvist effect.

Everything here is expressed through two factors: the plasma viscosity at the
temperature, and a function of hematocrit.  Temperatures are in degC,
hematocrit is a volume fraction (0.45, not 45), results are SI.

* :func:`plasma_viscosity`: water viscosity (IAPWS 2008) times a constant
  plasma-to-water ratio of 1.8.
* :func:`whole_blood_high_shear_viscosity`: plasma viscosity times the Quemada
  1978 relative viscosity at infinite shear.
* :func:`blood_rheology`: shear-thinning models (Carreau and Carreau-Yasuda with
  the Cho & Kensey 1991 parameters scaled with hematocrit and temperature,
  Casson with a hematocrit-dependent yield stress, power law, Newtonian).
* :func:`blood_viscosity`: the one-call viscosity at a shear rate (or high shear).
* :func:`pries_1992_relative_viscosity`: apparent viscosity in tubes vs diameter.

The scaling rules are engineering assumptions anchored at published values;
each constant below says where its number comes from.
"""

from __future__ import annotations

import difflib

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.provenance import REGISTRY
from rheoline.model.rheology import Carreau, CarreauYasuda, Casson, Newtonian, PowerLaw
from rheoline.model.validation import (
    check_hematocrit,
    check_positive,
    scalar_or_array,
    warn_outside,
)
from rheoline.model.viscosity import _water_quiet, check_temperature_c

__all__ = [
    "PLASMA_RELATIVE_VISCOSITY",
    "BLOOD_TEMPERATURE_RANGE_C",
    "CHO_KENSEY_1991",
    "plasma_viscosity",
    "plasma_density",
    "blood_density",
    "quemada_1978_relative_viscosity",
    "whole_blood_high_shear_viscosity",
    "blood_zero_shear_viscosity",
    "merrill_1965_yield_stress",
    "QUEMADA_K_INFINITE_SHEAR",
    "ZERO_SHEAR_HEMATOCRIT_EXPONENT",
    "blood_rheology",
    "blood_properties",
    "BLOOD_RHEOLOGY_MODELS",
    "blood_viscosity",
    "pries_1992_relative_viscosity",
]

#: Plasma viscosity relative to water at the same temperature [-].  1.8 gives
#: 1.24 mPa s at 37 degC, inside the usual normal range 1.10-1.35 mPa s
#: (common practice, no source); plasma is taken to follow water's temperature
#: dependence (common practice, no source).
PLASMA_RELATIVE_VISCOSITY = 1.8

#: Temperatures [degC] the blood models are used for: refrigerated storage
#: (about 4 degC) to hyperthermia.  The constant plasma-to-water ratio is an
#: assumption over this span; outside it the models warn.
BLOOD_TEMPERATURE_RANGE_C = REGISTRY["blood-scaling"].ranges["temperature_c"]

#: Hematocrit above which the shear-thinning scaling is an extrapolation [-].
BLOOD_HEMATOCRIT_LIMIT = REGISTRY["blood-scaling"].ranges["hematocrit"][1]

#: Reference state of the Cho & Kensey 1991 blood parameters: hematocrit 0.45 at
#: 37 degC (the state these parameters are customarily taken to describe).
REFERENCE_HEMATOCRIT = 0.45
REFERENCE_TEMPERATURE_C = 37.0

#: Cho & Kensey 1991 blood parameters (Biorheology 28, 241-262, Table 1, from memory):
#: Carreau and Carreau-Yasuda fits; viscosities in Pa s, relaxation times in s.
CHO_KENSEY_1991 = {
    "carreau": {
        "mu_zero": 0.056,
        "mu_inf": 0.00345,
        "relaxation_time": 3.313,
        "flow_index": 0.3568,
    },
    "carreau-yasuda": {
        "mu_zero": 0.056,
        "mu_inf": 0.00345,
        "relaxation_time": 1.902,
        "flow_index": 0.22,
        "a": 1.25,
    },
}

#: Shear-rate window [1/s] of the power-law fit to the Carreau curve: from the
#: shear rates of veins and arteries to those of catheters and needles.  Outside
#: it a power law departs from blood (it has no high-shear plateau).
POWER_LAW_SHEAR_RANGE = (10.0, 1.0e4)

#: Plasma and red-cell densities at 37 degC [kg/m^3] (from memory; whole blood at
#: hematocrit 0.45 then comes out at 1059 kg/m^3, the usual 1050-1060).
PLASMA_DENSITY_37C = 1025.0
RED_CELL_DENSITY_37C = 1100.0


def _temperature(temperature_c, model, key="blood-scaling"):
    t = check_temperature_c(temperature_c)
    warn_outside(key, "temperature_c", t, label=model, unit="degC", stacklevel=4)
    return t


def _hematocrit(hematocrit, model, key="blood-scaling"):
    h = check_hematocrit(hematocrit)
    warn_outside(key, "hematocrit", h, label=model, stacklevel=4)
    return h


def _plasma(t):
    mu_w, _ = _water_quiet(t)
    return PLASMA_RELATIVE_VISCOSITY * mu_w


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


def quemada_1978_relative_viscosity(hematocrit, intrinsic_viscosity):
    r"""Quemada's relative viscosity of a concentrated suspension.

    .. math:: \mu_{rel} = \left(1 - \tfrac{1}{2} k H\right)^{-2}

    Parameters
    ----------
    hematocrit : float or array_like
        Volume fraction of red cells H [-].
    intrinsic_viscosity : float or array_like
        Quemada's structural coefficient k [-] (at a given shear; the infinite-shear
        value for blood is near 1.8), 0 < k < 2/H.

    Returns
    -------
    float or ndarray
        Viscosity relative to the suspending medium [-].

    References
    ----------
    Quemada, D., "Rheology of concentrated disperse systems II. A model for
    non-Newtonian shear viscosity in steady flows", Rheol. Acta 17 (1978) 632-642.
    doi:10.1007/BF01522036

    Examples
    --------
    >>> round(quemada_1978_relative_viscosity(0.45, 1.8), 3)
    2.825
    """
    h = check_hematocrit(hematocrit)
    k = check_positive("intrinsic_viscosity", intrinsic_viscosity)
    packing = 1.0 - 0.5 * k * h
    if np.any(packing <= 0):
        raise InputRangeError(
            "intrinsic_viscosity times hematocrit must stay below 2 (maximum packing); "
            f"got k={np.max(k):g} with hematocrit up to {np.max(h):g}"
        )
    return scalar_or_array(packing**-2.0)


def _reference_plasma():
    return float(_plasma(np.asarray(REFERENCE_TEMPERATURE_C)))


#: Quemada's k at infinite shear [-], chosen so that the law joins the plasma
#: viscosity at H = 0 and Cho & Kensey's mu_inf = 3.45 mPa s at H = 0.45, 37 degC
#: (about 1.78; Quemada's fits of human blood give values near 1.8, from memory).
QUEMADA_K_INFINITE_SHEAR = float(
    2.0
    * (1.0 - np.sqrt(_reference_plasma() / CHO_KENSEY_1991["carreau"]["mu_inf"]))
    / REFERENCE_HEMATOCRIT
)


def _high_shear(h, t):
    return _plasma(t) * (1.0 - 0.5 * QUEMADA_K_INFINITE_SHEAR * h) ** -2.0


def whole_blood_high_shear_viscosity(hematocrit, temperature_c=37.0):
    r"""High-shear (Newtonian-limit) viscosity of whole blood vs hematocrit and temperature.

    .. math:: \mu_\infty(H, t) = \mu_p(t)\,\left(1 - \tfrac{1}{2} k_\infty H\right)^{-2}

    with :math:`\mu_p` from :func:`plasma_viscosity` and
    :math:`k_\infty` = :data:`QUEMADA_K_INFINITE_SHEAR` (1.78).

    Parameters
    ----------
    hematocrit : float or array_like
        Hematocrit [-], 0 to 0.95.
    temperature_c : float or array_like
        Temperature [degC].

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s]: 3.45 mPa s at H = 0.45, 37 degC.

    Notes
    -----
    The red cells' contribution (the relative viscosity) is taken as independent
    of temperature, so blood thickens on cooling as its plasma does (an
    assumption; cold blood is in fact somewhat more viscous still).

    References
    ----------
    Quemada, Rheol. Acta 17 (1978) 632-642; Cho, Y.I., Kensey, K.R., "Effects of
    the non-Newtonian viscosity of blood on flows in a diseased arterial vessel.
    Part 1: Steady flows", Biorheology 28 (1991) 241-262.

    Examples
    --------
    >>> round(whole_blood_high_shear_viscosity(0.45, 37.0) * 1e3, 2)
    3.45
    """
    h = _hematocrit(hematocrit, "the whole-blood viscosity model", "quemada-1978")
    t = _temperature(temperature_c, "the whole-blood viscosity model", "quemada-1978")
    return scalar_or_array(_high_shear(h, t))


#: Exponent of the low-shear scaling: ln(mu_0 / mu_p) per unit hematocrit, so that
#: mu_0 = mu_p at H = 0 and Cho & Kensey's 0.056 Pa s at H = 0.45, 37 degC.
ZERO_SHEAR_HEMATOCRIT_EXPONENT = float(
    np.log(CHO_KENSEY_1991["carreau"]["mu_zero"] / _reference_plasma()) / REFERENCE_HEMATOCRIT
)


def _zero_shear(h, t):
    return _plasma(t) * np.exp(ZERO_SHEAR_HEMATOCRIT_EXPONENT * h)


def blood_zero_shear_viscosity(hematocrit, temperature_c=37.0):
    r"""Zero-shear viscosity of blood used by the Carreau models.

    .. math:: \mu_0(H, t) = \mu_p(t)\,e^{\beta H}, \qquad
              \beta = \ln(0.056\ \text{Pa s} / \mu_p(37\,^\circ C)) / 0.45 \approx 8.5

    An exponential rise of low-shear viscosity with hematocrit, anchored at the
    plasma (H = 0) and at Cho & Kensey's zero-shear value (H = 0.45, 37 degC).

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s].

    Examples
    --------
    >>> round(blood_zero_shear_viscosity(0.45, 37.0), 4)
    0.056
    """
    h = _hematocrit(hematocrit, "the zero-shear blood viscosity model")
    t = _temperature(temperature_c, "the zero-shear blood viscosity model")
    return scalar_or_array(_zero_shear(h, t))


#: Merrill's yield-stress law: tau_y^(1/3) = A (H - H_c), with A = 0.8 (dyn/cm^2)^(1/3)
#: per unit hematocrit and H_c = 0.05 (from memory; gives about 0.003 Pa at H = 0.45).
MERRILL_YIELD_COEFFICIENT = 0.8
MERRILL_CRITICAL_HEMATOCRIT = 0.05


def merrill_1965_yield_stress(hematocrit):
    r"""Casson yield stress of blood vs hematocrit (Merrill and co-workers).

    .. math:: \tau_y = 0.1\,\mathrm{Pa}\,\big[A\,(H - H_c)\big]^3 \quad (H > H_c),
              \qquad \tau_y = 0 \quad (H \le H_c)

    with A = 0.8 and H_c = 0.05 (from memory); 0.1 Pa is 1 dyn/cm^2.

    Parameters
    ----------
    hematocrit : float or array_like
        Hematocrit [-], 0 to 0.95.

    Returns
    -------
    float or ndarray
        Yield stress [Pa] (held independent of temperature).

    References
    ----------
    Merrill, E.W., Gilliland, E.R., Cokelet, G., Shin, H., Britten, A., Wells,
    R.E., "Rheology of human blood, near and at zero flow", Biophys. J. 3 (1963)
    199-213; Merrill, E.W. et al., J. Appl. Physiol. 20 (1965) 954-967.

    Examples
    --------
    >>> round(merrill_1965_yield_stress(0.45) * 1e3, 2)   # mPa
    3.28
    """
    h = check_hematocrit(hematocrit)
    return scalar_or_array(_yield(h))


def _yield(h):
    excess = np.maximum(h - MERRILL_CRITICAL_HEMATOCRIT, 0.0)
    return 0.1 * (MERRILL_YIELD_COEFFICIENT * excess) ** 3


def _carreau_parameters(h, t, key):
    params = dict(CHO_KENSEY_1991[key])
    params["mu_inf"] = _high_shear(h, t)
    params["mu_zero"] = np.maximum(_zero_shear(h, t), params["mu_inf"])
    return params


def _build_carreau(h, t):
    return Carreau(**_carreau_parameters(h, t, "carreau"))


def _build_carreau_yasuda(h, t):
    return CarreauYasuda(**_carreau_parameters(h, t, "carreau-yasuda"))


def _build_casson(h, t):
    return Casson(yield_stress=_yield(h) + 0.0 * t, casson_viscosity=_high_shear(h, t))


def _build_newtonian(h, t):
    return Newtonian(_high_shear(h, t))


def _build_power_law(h, t):
    # least squares of log(mu) on log(shear rate) over the window, closed form
    carreau = _build_carreau(h, t)
    lo, hi = POWER_LAW_SHEAR_RANGE
    grid = np.logspace(np.log10(lo), np.log10(hi), 31)
    x = np.log(grid)
    shape = np.shape(carreau.mu_inf)
    y = np.log(carreau.viscosity(grid.reshape((-1,) + (1,) * len(shape))))
    x_c = (x - x.mean()).reshape((-1,) + (1,) * len(shape))
    slope = np.sum(x_c * (y - y.mean(axis=0)), axis=0) / np.sum(x_c**2)
    intercept = y.mean(axis=0) - slope * x.mean()
    return PowerLaw(consistency=np.exp(intercept), flow_index=1.0 + slope)


#: Blood rheology builders by name; :func:`blood_rheology`, its choices and docs read this.
BLOOD_RHEOLOGY_MODELS = {
    "carreau": _build_carreau,
    "carreau-yasuda": _build_carreau_yasuda,
    "casson": _build_casson,
    "power-law": _build_power_law,
    "newtonian": _build_newtonian,
}


def blood_rheology(hematocrit, temperature_c=37.0, model="carreau"):
    """A shear-thinning rheology object for blood at a hematocrit and temperature.

    Parameters
    ----------
    hematocrit : float or array_like
        Hematocrit [-], 0 to 0.95 (a fraction: 0.45, not 45).
    temperature_c : float or array_like
        Temperature [degC]; broadcasts with ``hematocrit``.
    model : str
        One of :data:`BLOOD_RHEOLOGY_MODELS`:

        * ``"carreau"``, ``"carreau-yasuda"``: Cho & Kensey 1991 shape parameters
          (relaxation time, flow index, Yasuda a); the infinite-shear viscosity from
          :func:`whole_blood_high_shear_viscosity` and the zero-shear viscosity from
          :func:`blood_zero_shear_viscosity`, so both track hematocrit and temperature
          and both reduce to the plasma viscosity at H = 0;
        * ``"casson"``: yield stress from :func:`merrill_1965_yield_stress`, Casson
          viscosity equal to the high-shear viscosity;
        * ``"power-law"``: the power law closest (log least squares) to the Carreau
          curve over :data:`POWER_LAW_SHEAR_RANGE` (10-10^4 1/s); outside that window
          it departs from blood (too thin at higher, too thick at lower shear);
        * ``"newtonian"``: the high-shear viscosity.

    Returns
    -------
    RheologyModel
        Parameters are arrays of the broadcast shape of the inputs (floats for scalars).

    Raises
    ------
    InputRangeError
        For an unknown model (the message lists the choices) or bad input.

    Warns
    -----
    RangeWarning
        Temperature outside 0-42 degC or hematocrit above 0.8.

    Examples
    --------
    >>> m = blood_rheology(0.45, 37.0)
    >>> round(m.viscosity(1e-4), 3), round(m.viscosity(1e5) * 1e3, 2)
    (0.056, 3.45)
    """
    try:
        builder = BLOOD_RHEOLOGY_MODELS[model]
    except (KeyError, TypeError):
        near = difflib.get_close_matches(str(model), BLOOD_RHEOLOGY_MODELS, n=1)
        hint = f"; did you mean {near[0]!r}?" if near else ""
        raise InputRangeError(
            f"model {model!r} is not a blood rheology model; choose one of "
            f"{list(BLOOD_RHEOLOGY_MODELS)}{hint}"
        ) from None
    h = _hematocrit(hematocrit, f"the {model} blood model")
    t = _temperature(temperature_c, f"the {model} blood model")
    h, t = np.broadcast_arrays(h, t)
    return builder(np.asarray(h, dtype=float), np.asarray(t, dtype=float))


def blood_properties(hematocrit, temperature_c=37.0, model="carreau"):
    """Rheology, density and plasma viscosity of blood in one call (one range check).

    Returns
    -------
    tuple
        ``(rheology, density [kg/m^3], plasma_viscosity [Pa s])``, each broadcast
        over ``hematocrit`` and ``temperature_c`` (floats for scalars).

    Examples
    --------
    >>> rheology, density, mu_p = blood_properties(0.45, 37.0)
    >>> round(density), round(mu_p * 1e3, 3)
    (1059, 1.244)
    """
    rheology = blood_rheology(hematocrit, temperature_c, model)
    h, t = np.broadcast_arrays(
        np.asarray(hematocrit, dtype=float), np.asarray(temperature_c, dtype=float)
    )
    return rheology, scalar_or_array(_blood_density(h, t)), scalar_or_array(_plasma(t))


def blood_viscosity(hematocrit, temperature_c=37.0, shear_rate=None, model="carreau"):
    """Apparent viscosity of whole blood.

    Parameters
    ----------
    hematocrit : float or array_like
        Hematocrit [-], 0 to 0.95 (a fraction: 0.45, not 45).
    temperature_c : float or array_like
        Temperature [degC].
    shear_rate : float or array_like, optional
        Shear rate [1/s].  None gives the high-shear limit
        (:func:`whole_blood_high_shear_viscosity`, the same for every model).
    model : str
        Rheology model used at a finite shear rate (see :func:`blood_rheology`).

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s].

    Raises
    ------
    InputRangeError
        Hematocrit above 1 (with the fraction suggested), negative or NaN input.

    Examples
    --------
    >>> round(blood_viscosity(0.45) * 1e3, 2)            # high shear, 37 degC
    3.45
    >>> round(blood_viscosity(0.45, 37.0, shear_rate=1.0) * 1e3, 1)
    27.1
    """
    if shear_rate is None:
        return whole_blood_high_shear_viscosity(hematocrit, temperature_c)
    g = check_positive("shear_rate", shear_rate, "1/s")
    return scalar_or_array(blood_rheology(hematocrit, temperature_c, model).viscosity(g))


def pries_1992_relative_viscosity(diameter, hematocrit):
    r"""Apparent viscosity of blood in a glass tube relative to plasma (Pries 1992, in vitro).

    .. math::

        \mu_{rel} = 1 + (\mu_{0.45} - 1)\,
                    \frac{(1 - H_D)^C - 1}{(1 - 0.45)^C - 1}

        \mu_{0.45} = 220\,e^{-1.3 D} + 3.2 - 2.44\,e^{-0.06 D^{0.645}}

        C = (0.8 + e^{-0.075 D})\left(-1 + \frac{1}{1 + 10^{-11} D^{12}}\right)
            + \frac{1}{1 + 10^{-11} D^{12}}

    with D the tube diameter in micrometres and H_D the discharge hematocrit.

    Parameters
    ----------
    diameter : float or array_like
        Tube (vessel) inner diameter [m], > 0.
    hematocrit : float or array_like
        Discharge hematocrit [-], 0 to 0.95.

    Returns
    -------
    float or ndarray
        Relative apparent viscosity mu_app / mu_plasma [-].

    Warns
    -----
    RangeWarning
        For diameters outside 3.3-1978 micrometres, the range of the data the law
        was fitted to, or hematocrit above 0.9.

    Notes
    -----
    The law shows the Fahraeus-Lindqvist effect: apparent viscosity falls as the
    diameter falls from about 1 mm, reaches a minimum near 5-7 micrometres, and
    rises steeply below that.  Above about 1 mm it approaches the large-tube value.

    References
    ----------
    Pries, A.R., Neuhaus, D., Gaehtgens, P., "Blood viscosity in tube flow:
    dependence on diameter and hematocrit", Am. J. Physiol. 263 (Heart Circ.
    Physiol. 32), H1770-H1778, 1992.  doi:10.1152/ajpheart.1992.263.6.H1770

    Examples
    --------
    >>> round(pries_1992_relative_viscosity(1e-3, 0.45), 3)
    3.186
    """
    d_m = check_positive("diameter", diameter, "m")
    h = check_hematocrit(hematocrit)
    d = d_m * 1e6  # micrometres
    warn_outside(
        "pries-1992",
        "diameter",
        d_m,
        label="Pries 1992 in-vitro viscosity law",
        unit="um",
        scale=1e6,
    )
    mu45 = 220.0 * np.exp(-1.3 * d) + 3.2 - 2.44 * np.exp(-0.06 * d**0.645)
    s = 1.0 / (1.0 + 1e-11 * d**12)
    c = (0.8 + np.exp(-0.075 * d)) * (-1.0 + s) + s
    rel = 1.0 + (mu45 - 1.0) * ((1.0 - h) ** c - 1.0) / ((1.0 - 0.45) ** c - 1.0)
    return scalar_or_array(rel)
