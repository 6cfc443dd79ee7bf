"""Blood and red-cell products: suspending media, bulk viscosity and shear-thinning.

Everything here is expressed through two factors: the viscosity of the suspending
medium at the temperature, and a function of hematocrit (and shear rate).
Temperatures are in degC, hematocrit is a volume fraction (0.45, not 45), results
are SI.

* :func:`plasma_viscosity`: water viscosity (IAPWS 2008) times a constant
  plasma-to-water ratio of 1.8; :func:`medium_viscosity` adds the additive
  solution stored red-cell units are suspended in (:data:`SUSPENDING_MEDIA`).
* :func:`whole_blood_high_shear_viscosity`: the medium viscosity times the
  Pries 1992 relative viscosity of a large bore
  (:func:`~rheoline.model.pries.large_bore_relative_viscosity`): the same bulk
  blood a :class:`~rheoline.model.vessels.Vessel` carries.
* :func:`blood_rheology`: shear-thinning models (Carreau and Carreau-Yasuda with
  Cho & Kensey 1991 shape parameters and a zero-shear amplitude fitted to Wells &
  Merrill 1962; Casson with a hematocrit-dependent yield stress; power law; Newtonian).
* :func:`blood_viscosity`: the one-call viscosity at a shear rate (or high shear).

How the defaults were chosen, and their measured accuracy, is in the validation
report (``rheoline validate``; :mod:`rheoline.validation`).  Each constant below
says where its number comes from.
"""

from __future__ import annotations

import difflib

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.blood_media import (
    ADDITIVE_SOLUTION_RELATIVE_VISCOSITY,
    BLOOD_TEMPERATURE_RANGE_C,
    PLASMA_RELATIVE_VISCOSITY,
    SUSPENDING_MEDIA,
    _blood_density,
    _medium,
    _medium_mu,
    _temperature,
    blood_density,
    medium_viscosity,
    plasma_density,
    plasma_viscosity,
)
from rheoline.model.pries import (
    PRIES_1992_REFERENCE_DIAMETER,
    large_bore_relative_viscosity,
    pries_1992_relative_viscosity,
)
from rheoline.model.provenance import REGISTRY
from rheoline.model.rheology import Carreau, CarreauYasuda, Casson, Newtonian, PowerLaw
from rheoline.model.validation import (
    check_hematocrit,
    check_positive,
    scalar_or_array,
    warn_outside,
)

__all__ = [
    "PLASMA_RELATIVE_VISCOSITY",
    "ADDITIVE_SOLUTION_RELATIVE_VISCOSITY",
    "SUSPENDING_MEDIA",
    "BLOOD_TEMPERATURE_RANGE_C",
    "CHO_KENSEY_1991",
    "ZERO_SHEAR_AMPLITUDE",
    "PRIES_1992_REFERENCE_DIAMETER",
    "plasma_viscosity",
    "medium_viscosity",
    "plasma_density",
    "blood_density",
    "quemada_1978_relative_viscosity",
    "whole_blood_high_shear_viscosity",
    "blood_zero_shear_viscosity",
    "merrill_1965_yield_stress",
    "blood_rheology",
    "blood_properties",
    "BLOOD_RHEOLOGY_MODELS",
    "blood_viscosity",
    "pries_1992_relative_viscosity",
]

#: Hematocrit above which the shear-thinning scaling is an extrapolation [-].
BLOOD_HEMATOCRIT_LIMIT = REGISTRY["blood-scaling"].ranges["hematocrit"][1]

#: Cho & Kensey 1991 blood parameters (Biorheology 28, 241-262, Table 1, from memory):
#: the shape of their Carreau and Carreau-Yasuda fits (relaxation time [s], flow
#: index, Yasuda a).  Their viscosity limits (0.056 and 0.00345 Pa s at hematocrit
#: 0.45) are replaced here by the Pries 1992 high-shear value and the amplitude
#: :data:`ZERO_SHEAR_AMPLITUDE` fitted to measurements.
CHO_KENSEY_1991 = {
    "carreau": {"relaxation_time": 3.313, "flow_index": 0.3568},
    "carreau-yasuda": {"relaxation_time": 1.902, "flow_index": 0.22, "a": 1.25},
}

#: Zero-shear amplitude c of each shear-thinning model [-]: mu_0 = mu_inf (1 + c H)
#: for blood in plasma.  Fitted (least squares on the logarithm of viscosity) to the
#: Wells & Merrill 1962 measurements at hematocrit 0.33-0.57, 37 degC, 12-124 1/s
#: (the packaged data set ``wells-merrill-1962``), with the shape parameters of
#: :data:`CHO_KENSEY_1991` and the high-shear viscosity of
#: :func:`whole_blood_high_shear_viscosity` held fixed.  The validation tests refit
#: them from the packaged data and check these values.
ZERO_SHEAR_AMPLITUDE = {"carreau": 42.58, "carreau-yasuda": 50.50}

#: Shear-rate window [1/s] of the power-law fit to the Carreau curve: from the
#: shear rates of veins and arteries to those of catheters and needles.  Outside
#: it a power law departs from blood (it has no high-shear plateau).
POWER_LAW_SHEAR_RANGE = (10.0, 1.0e4)


def _hematocrit(hematocrit, model, key="blood-scaling"):
    h = check_hematocrit(hematocrit)
    warn_outside(key, "hematocrit", h, label=model, stacklevel=4)
    return h


def quemada_1978_relative_viscosity(hematocrit, intrinsic_viscosity):
    r"""Quemada's relative viscosity of a concentrated suspension.

    .. math:: \mu_{rel} = \left(1 - \tfrac{1}{2} k H\right)^{-2}

    Parameters
    ----------
    hematocrit : float or array_like
        Volume fraction of red cells H [-].
    intrinsic_viscosity : float or array_like
        Quemada's structural coefficient k [-] (at a given shear), 0 < k < 2/H.

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


def _high_shear(h, t, medium="plasma"):
    return _medium_mu(t, medium) * large_bore_relative_viscosity(h)


def whole_blood_high_shear_viscosity(hematocrit, temperature_c=37.0, medium="plasma"):
    r"""High-shear (Newtonian-limit) viscosity of blood in a large bore.

    .. math:: \mu_\infty(H, t) = \mu_m(t)\,\mu_{rel}^{Pries}(D_{ref}, H)

    with :math:`\mu_m` the suspending medium (:func:`medium_viscosity`) and
    :math:`\mu_{rel}^{Pries}` the Pries 1992 in-vitro law at its largest tube,
    :math:`D_{ref}` = 1978 um (3.20 at H = 0.45).

    Parameters
    ----------
    hematocrit : float or array_like
        Hematocrit [-], 0 to 0.95.
    temperature_c : float or array_like
        Temperature [degC].
    medium : {"plasma", "additive-solution"}
        Suspending medium (:data:`SUSPENDING_MEDIA`).

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s]: 3.98 mPa s at H = 0.45, 37 degC in plasma.

    Notes
    -----
    Pries' law is a fit to tube-flow measurements of many studies at high shear
    rates, so this is the bulk viscosity a wide bore sees once aggregates are
    broken up; it is exactly what :class:`~rheoline.model.vessels.Vessel` uses
    in bores of 2 mm (and within 0.5 % from 1 mm).  The red cells' contribution is
    taken as independent of temperature, so blood thickens on cooling as its
    medium does (an assumption).

    References
    ----------
    Pries, Neuhaus & Gaehtgens, Am. J. Physiol. 263 (1992) H1770-H1778.

    Examples
    --------
    >>> round(whole_blood_high_shear_viscosity(0.45, 37.0) * 1e3, 2)
    3.98
    """
    h = _hematocrit(hematocrit, "the whole-blood viscosity model")
    t = _temperature(temperature_c, "the whole-blood viscosity model")
    _medium(medium)
    return scalar_or_array(_high_shear(h, t, medium))


def _zero_shear(h, t, model="carreau", medium="plasma"):
    aggregates = _medium(medium)[1]
    amplitude = ZERO_SHEAR_AMPLITUDE[model] if aggregates else 0.0
    return _high_shear(h, t, medium) * (1.0 + amplitude * h)


def blood_zero_shear_viscosity(hematocrit, temperature_c=37.0, model="carreau", medium="plasma"):
    r"""Zero-shear viscosity of blood used by the Carreau models.

    .. math:: \mu_0(H, t) = \mu_\infty(H, t)\,(1 + c\,H)

    with c from :data:`ZERO_SHEAR_AMPLITUDE` (fitted to Wells & Merrill 1962) for
    blood in plasma, and c = 0 in a medium where red cells do not aggregate.

    Returns
    -------
    float or ndarray
        Dynamic viscosity [Pa s].

    Examples
    --------
    >>> round(blood_zero_shear_viscosity(0.45, 37.0) * 1e3, 1)
    80.3
    """
    if model not in ZERO_SHEAR_AMPLITUDE:
        raise InputRangeError(
            f"model {model!r} has no zero-shear amplitude; choose one of {list(ZERO_SHEAR_AMPLITUDE)}"
        )
    h = _hematocrit(hematocrit, "the zero-shear blood viscosity model")
    t = _temperature(temperature_c, "the zero-shear blood viscosity model")
    return scalar_or_array(_zero_shear(h, t, model, medium))


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


def _carreau_parameters(h, t, key, medium):
    params = dict(CHO_KENSEY_1991[key])
    params["mu_inf"] = _high_shear(h, t, medium)
    params["mu_zero"] = _zero_shear(h, t, key, medium)
    return params


def _build_carreau(h, t, medium="plasma"):
    return Carreau(**_carreau_parameters(h, t, "carreau", medium))


def _build_carreau_yasuda(h, t, medium="plasma"):
    return CarreauYasuda(**_carreau_parameters(h, t, "carreau-yasuda", medium))


def _build_casson(h, t, medium="plasma"):
    aggregates = _medium(medium)[1]
    tau_y = _yield(h) if aggregates else 0.0 * h
    return Casson(yield_stress=tau_y + 0.0 * t, casson_viscosity=_high_shear(h, t, medium))


def _build_newtonian(h, t, medium="plasma"):
    return Newtonian(_high_shear(h, t, medium))


def _build_power_law(h, t, medium="plasma"):
    # least squares of log(mu) on log(shear rate) over the window, closed form
    carreau = _build_carreau(h, t, medium)
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


def blood_rheology(hematocrit, temperature_c=37.0, model="carreau", medium="plasma"):
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
          :func:`blood_zero_shear_viscosity`, so both track hematocrit, temperature
          and medium and both reduce to the medium's viscosity at H = 0;
        * ``"casson"``: yield stress from :func:`merrill_1965_yield_stress` (none
          outside plasma), Casson viscosity equal to the high-shear viscosity;
        * ``"power-law"``: the power law closest (log least squares) to the Carreau
          curve over :data:`POWER_LAW_SHEAR_RANGE` (10-10^4 1/s); outside that window
          it departs from blood (too thin at higher, too thick at lower shear);
        * ``"newtonian"``: the high-shear viscosity.
    medium : {"plasma", "additive-solution"}
        Suspending medium (:data:`SUSPENDING_MEDIA`); red cells aggregate (and
        blood thickens at low shear) only in plasma.

    Returns
    -------
    RheologyModel
        Parameters are arrays of the broadcast shape of the inputs (floats for scalars).

    Raises
    ------
    InputRangeError
        For an unknown model or medium (the message lists the choices) or bad input.

    Warns
    -----
    RangeWarning
        Temperature outside 0-42 degC or hematocrit above 0.8.

    Examples
    --------
    >>> m = blood_rheology(0.45, 37.0)
    >>> round(m.mu_zero * 1e3, 1), round(m.mu_inf * 1e3, 2)
    (80.3, 3.98)
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
    _medium(medium)
    h = _hematocrit(hematocrit, f"the {model} blood model")
    t = _temperature(temperature_c, f"the {model} blood model")
    h, t = np.broadcast_arrays(h, t)
    return builder(np.asarray(h, dtype=float), np.asarray(t, dtype=float), medium)


def blood_properties(hematocrit, temperature_c=37.0, model="carreau", medium="plasma"):
    """Rheology, density and medium viscosity of blood in one call (one range check).

    Returns
    -------
    tuple
        ``(rheology, density [kg/m^3], medium viscosity [Pa s])``, each broadcast
        over ``hematocrit`` and ``temperature_c`` (floats for scalars).

    Examples
    --------
    >>> rheology, density, mu_p = blood_properties(0.45, 37.0)
    >>> round(density), round(mu_p * 1e3, 3)
    (1059, 1.244)
    """
    rheology = blood_rheology(hematocrit, temperature_c, model, medium)
    h, t = np.broadcast_arrays(
        np.asarray(hematocrit, dtype=float), np.asarray(temperature_c, dtype=float)
    )
    return (
        rheology,
        scalar_or_array(_blood_density(h, t)),
        scalar_or_array(_medium_mu(t, medium)),
    )


def blood_viscosity(
    hematocrit, temperature_c=37.0, shear_rate=None, model="carreau", medium="plasma"
):
    """Apparent viscosity of blood (or of red cells in an additive solution).

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
    medium : {"plasma", "additive-solution"}
        Suspending medium.

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
    3.98
    >>> round(blood_viscosity(0.45, 37.0, shear_rate=100.0) * 1e3, 2)
    5.81
    """
    if shear_rate is None:
        return whole_blood_high_shear_viscosity(hematocrit, temperature_c, medium)
    g = check_positive("shear_rate", shear_rate, "1/s")
    return scalar_or_array(blood_rheology(hematocrit, temperature_c, model, medium).viscosity(g))
