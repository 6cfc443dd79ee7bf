"""Whole-circulation resistance from clinical measurements, and body surface area.

Vascular resistance is the mean pressure drop across a vascular bed divided by
the flow through it.  The clinical formulas take the trade's own units (mmHg,
L/min, cm, kg), and the argument names say so (``upstream_mmhg``,
``flow_l_min``); everything else in the model layer is SI.

* :func:`vascular_resistance` -- any bed, in Wood units and dyn s cm^-5
* :func:`systemic_vascular_resistance` -- from MAP, CVP and cardiac output
* :func:`pulmonary_vascular_resistance` -- from mPAP, wedge pressure and cardiac output
* the indexed versions, from body surface area
* :func:`body_surface_area` -- DuBois & DuBois 1916 or Mosteller 1987
* :data:`TYPICAL_ADULT_RANGES` -- typical resting adult values, as context only

Unit factor
-----------
One Wood unit is 1 mmHg min/L.  With 1 mmHg = 133.322 387 415 Pa (the conventional
millimetre of mercury, :data:`rheoline.model.conversions.MMHG`; NIST SP 811 lists
1.333 224 E+02 Pa), 1 min = 60 s and 1 L = 1e-3 m^3::

    1 WU = 133.322387415 * 60 / 1e-3 Pa s/m^3 = 7.999343e6 Pa s/m^3

and since 1 Pa s/m^3 = 1 N s m^-5 = 1e5 dyn s / 1e10 cm^5 = 1e-5 dyn s cm^-5,
1 WU = 79.99343 dyn s cm^-5 (commonly rounded to 80).

References
----------
Taylor, B.N., Thompson, A., "Guide for the Use of the International System of
Units (SI)", NIST Special Publication 811, 2008, Appendix B.8 (1 mmHg = 1.333 224 E+02 Pa).
DuBois, D., DuBois, E.F., "A formula to estimate the approximate surface area if
height and weight be known", Arch. Intern. Med. 17 (1916) 863-871.
Mosteller, R.D., "Simplified calculation of body-surface area", N. Engl. J. Med.
317 (1987) 1098.  doi:10.1056/NEJM198710223171717
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.conversions import MMHG
from rheoline.model.validation import (
    check_finite,
    check_positive,
    scalar_or_array,
    warn_outside,
)

__all__ = [
    "MMHG_TO_PA",
    "WOOD_UNIT_TO_PA_S_PER_M3",
    "WOOD_UNIT_TO_DYN_S_PER_CM5",
    "WOOD_UNIT_FACTORS",
    "TYPICAL_ADULT_RANGES",
    "VascularResistance",
    "vascular_resistance",
    "systemic_vascular_resistance",
    "pulmonary_vascular_resistance",
    "systemic_vascular_resistance_index",
    "pulmonary_vascular_resistance_index",
    "cardiac_index",
    "body_surface_area",
    "dubois_1916_body_surface_area",
    "mosteller_1987_body_surface_area",
    "BODY_SURFACE_AREA_METHODS",
    "typical_adult_range",
]

#: 1 mmHg in pascals: the package's one factor, :data:`rheoline.model.conversions.MMHG`.
MMHG_TO_PA = MMHG
#: One Wood unit (1 mmHg min/L) in Pa s/m^3: 133.322387415 * 60 / 1e-3.
WOOD_UNIT_TO_PA_S_PER_M3 = MMHG_TO_PA * 60.0 / 1e-3
#: One Wood unit in dyn s cm^-5, derived (1 Pa s/m^3 = 1e-5 dyn s cm^-5): 79.99343.
WOOD_UNIT_TO_DYN_S_PER_CM5 = WOOD_UNIT_TO_PA_S_PER_M3 * 1e-5

#: The factor from Wood units to dyn s cm^-5: derived from NIST SP 811, or the
#: rounded 80 that many clinical references use.
WOOD_UNIT_FACTORS = {
    "exact": WOOD_UNIT_TO_DYN_S_PER_CM5,
    "rounded": 80.0,
}

#: Typical resting adult values [dyn s cm^-5], as context for a result, not as a
#: diagnostic threshold.  common practice, no source.
TYPICAL_ADULT_RANGES = {
    "svr": (800.0, 1200.0),
    "pvr": (40.0, 250.0),
}


def _factor(factor: str) -> float:
    try:
        return WOOD_UNIT_FACTORS[factor]
    except (KeyError, TypeError):
        raise InputRangeError(
            f"factor must be one of {sorted(WOOD_UNIT_FACTORS)}, got {factor!r}; "
            f"use 'exact' ({WOOD_UNIT_TO_DYN_S_PER_CM5:.6g} dyn s cm^-5 per Wood unit, "
            f"from 1 mmHg = {MMHG_TO_PA:.9g} Pa) "
            "or 'rounded' (80)"
        ) from None


@dataclass(frozen=True)
class VascularResistance:
    """A vascular resistance in the units clinicians and engineers use.

    Attributes
    ----------
    wood_units : float or ndarray
        Resistance [mmHg min/L] (Wood units).
    dyn_s_per_cm5 : float or ndarray
        Resistance [dyn s cm^-5], ``wood_units`` times the chosen factor.
    pa_s_per_m3 : float or ndarray
        Resistance [Pa s/m^3] (SI, exact conversion whatever the factor).
    factor : str
        ``"exact"`` or ``"rounded"``: which Wood-unit factor gave ``dyn_s_per_cm5``.
    indexed : bool
        True for an index (resistance times body surface area): the units then
        carry an extra m^2 (WU m^2, dyn s cm^-5 m^2).
    """

    wood_units: float | np.ndarray
    dyn_s_per_cm5: float | np.ndarray
    pa_s_per_m3: float | np.ndarray
    factor: str = "exact"
    indexed: bool = False


def _resistance(pressure_drop_mmhg, flow_l_min, factor, flow_name, indexed=False):
    fac = _factor(factor)
    q = check_positive(flow_name, flow_l_min, "L/min")
    wu = np.asarray(pressure_drop_mmhg, dtype=float) / q
    return VascularResistance(
        wood_units=scalar_or_array(wu),
        dyn_s_per_cm5=scalar_or_array(wu * fac),
        pa_s_per_m3=scalar_or_array(wu * WOOD_UNIT_TO_PA_S_PER_M3),
        factor=factor,
        indexed=indexed,
    )


def _pressure_drop(up_name, upstream, down_name, downstream):
    up = check_finite(up_name, upstream)
    down = check_finite(down_name, downstream)
    drop = up - down
    if np.any(drop < 0):
        raise InputRangeError(
            f"{up_name} must be at least {down_name} (flow runs from high to low mean "
            f"pressure); got {up_name}={scalar_or_array(up)!r} mmHg, "
            f"{down_name}={scalar_or_array(down)!r} mmHg; check that the two were not swapped"
        )
    return drop


def vascular_resistance(upstream_mmhg, downstream_mmhg, flow_l_min, factor="exact"):
    r"""Resistance of a vascular bed: mean pressure drop over flow.

    .. math:: R = \frac{p_{up} - p_{down}}{Q}

    Parameters
    ----------
    upstream_mmhg : float or array_like
        Mean pressure at the inlet of the bed [mmHg].
    downstream_mmhg : float or array_like
        Mean pressure at the outlet [mmHg], not above ``upstream_mmhg``.
    flow_l_min : float or array_like
        Flow through the bed [L/min], > 0.
    factor : {"exact", "rounded"}
        Wood unit to dyn s cm^-5: 79.99343 derived from 1 mmHg = 133.322387415 Pa
        (default) or the rounded 80.

    Returns
    -------
    VascularResistance
        With ``.wood_units`` [mmHg min/L], ``.dyn_s_per_cm5`` and ``.pa_s_per_m3``.

    Raises
    ------
    InputRangeError
        For a non-positive flow, a downstream pressure above the upstream one,
        or an unknown ``factor``.

    Notes
    -----
    The lumped resistance of a whole bed: it treats steady mean pressures and flow
    and says nothing about where in the bed the resistance sits.

    Examples
    --------
    >>> r = vascular_resistance(90.0, 6.0, 6.0)
    >>> r.wood_units, round(r.dyn_s_per_cm5, 2)
    (14.0, 1119.9)
    """
    drop = _pressure_drop("upstream_mmhg", upstream_mmhg, "downstream_mmhg", downstream_mmhg)
    return _resistance(drop, flow_l_min, factor, "flow_l_min")


def _from_cardiac_output(up_name, upstream, down_name, downstream, cardiac_output_l_min, factor):
    warn_outside(
        "vascular-resistance",
        "cardiac_output_l_min",
        cardiac_output_l_min,
        label="an adult cardiac output",
        unit="L/min",
        stacklevel=4,
    )
    drop = _pressure_drop(up_name, upstream, down_name, downstream)
    return _resistance(drop, cardiac_output_l_min, factor, "cardiac_output_l_min")


def systemic_vascular_resistance(
    mean_arterial_mmhg, central_venous_mmhg, cardiac_output_l_min, factor="exact"
):
    r"""Systemic vascular resistance, SVR = (MAP - CVP) / CO.

    Parameters
    ----------
    mean_arterial_mmhg : float or array_like
        Mean arterial pressure, MAP [mmHg].
    central_venous_mmhg : float or array_like
        Central venous (right atrial) pressure, CVP [mmHg].
    cardiac_output_l_min : float or array_like
        Cardiac output, CO [L/min], > 0.
    factor : {"exact", "rounded"}
        Wood unit to dyn s cm^-5 factor (see :func:`vascular_resistance`).

    Returns
    -------
    VascularResistance

    Examples
    --------
    >>> systemic_vascular_resistance(90.0, 6.0, 6.0, factor="rounded").dyn_s_per_cm5
    1120.0
    """
    return _from_cardiac_output(
        "mean_arterial_mmhg",
        mean_arterial_mmhg,
        "central_venous_mmhg",
        central_venous_mmhg,
        cardiac_output_l_min,
        factor,
    )


def pulmonary_vascular_resistance(
    mean_pulmonary_arterial_mmhg, wedge_mmhg, cardiac_output_l_min, factor="exact"
):
    r"""Pulmonary vascular resistance, PVR = (mPAP - PAWP) / CO.

    Parameters
    ----------
    mean_pulmonary_arterial_mmhg : float or array_like
        Mean pulmonary artery pressure, mPAP [mmHg].
    wedge_mmhg : float or array_like
        Pulmonary artery wedge pressure, PAWP [mmHg] (stands for left atrial pressure).
    cardiac_output_l_min : float or array_like
        Cardiac output, CO [L/min], > 0.
    factor : {"exact", "rounded"}
        Wood unit to dyn s cm^-5 factor (see :func:`vascular_resistance`).

    Returns
    -------
    VascularResistance

    Examples
    --------
    >>> pulmonary_vascular_resistance(15.0, 9.0, 5.0).wood_units
    1.2
    """
    return _from_cardiac_output(
        "mean_pulmonary_arterial_mmhg",
        mean_pulmonary_arterial_mmhg,
        "wedge_mmhg",
        wedge_mmhg,
        cardiac_output_l_min,
        factor,
    )


def cardiac_index(cardiac_output_l_min, body_surface_area_m2):
    """Cardiac index [L/min/m^2]: cardiac output over body surface area.

    Examples
    --------
    >>> cardiac_index(5.0, 2.0)
    2.5
    """
    co = check_positive("cardiac_output_l_min", cardiac_output_l_min, "L/min")
    bsa = check_positive("body_surface_area_m2", body_surface_area_m2, "m^2")
    return scalar_or_array(co / bsa)


def _indexed(result: VascularResistance, body_surface_area_m2) -> VascularResistance:
    bsa = check_positive("body_surface_area_m2", body_surface_area_m2, "m^2")
    warn_outside(
        "vascular-resistance",
        "body_surface_area_m2",
        bsa,
        label="a human body surface area",
        unit="m^2",
        stacklevel=4,
    )
    return VascularResistance(
        wood_units=scalar_or_array(np.asarray(result.wood_units) * bsa),
        dyn_s_per_cm5=scalar_or_array(np.asarray(result.dyn_s_per_cm5) * bsa),
        pa_s_per_m3=scalar_or_array(np.asarray(result.pa_s_per_m3) * bsa),
        factor=result.factor,
        indexed=True,
    )


def systemic_vascular_resistance_index(
    mean_arterial_mmhg,
    central_venous_mmhg,
    cardiac_output_l_min,
    body_surface_area_m2,
    factor="exact",
):
    r"""Systemic vascular resistance index, SVRI = (MAP - CVP) / CI = SVR * BSA.

    Units carry m^2: WU m^2 and dyn s cm^-5 m^2 (``indexed=True``).

    Examples
    --------
    >>> systemic_vascular_resistance_index(90.0, 6.0, 6.0, 2.0).wood_units
    28.0
    """
    svr = systemic_vascular_resistance(
        mean_arterial_mmhg, central_venous_mmhg, cardiac_output_l_min, factor
    )
    return _indexed(svr, body_surface_area_m2)


def pulmonary_vascular_resistance_index(
    mean_pulmonary_arterial_mmhg,
    wedge_mmhg,
    cardiac_output_l_min,
    body_surface_area_m2,
    factor="exact",
):
    r"""Pulmonary vascular resistance index, PVRI = (mPAP - PAWP) / CI = PVR * BSA.

    Examples
    --------
    >>> pulmonary_vascular_resistance_index(15.0, 9.0, 5.0, 2.0).wood_units
    2.4
    """
    pvr = pulmonary_vascular_resistance(
        mean_pulmonary_arterial_mmhg, wedge_mmhg, cardiac_output_l_min, factor
    )
    return _indexed(pvr, body_surface_area_m2)


def dubois_1916_body_surface_area(height_cm, weight_kg):
    r"""Body surface area by DuBois & DuBois (1916).

    .. math:: A\,[\mathrm{cm^2}] = 71.84\, W^{0.425} H^{0.725}

    with W in kg and H in cm, i.e. ``0.007184 * W**0.425 * H**0.725`` in m^2.

    Parameters
    ----------
    height_cm : float or array_like
        Height [cm], > 0.
    weight_kg : float or array_like
        Body mass [kg], > 0.

    Returns
    -------
    float or ndarray
        Body surface area [m^2].

    References
    ----------
    DuBois, D., DuBois, E.F., Arch. Intern. Med. 17 (1916) 863-871.

    Examples
    --------
    >>> round(dubois_1916_body_surface_area(170.0, 70.0), 3)
    1.81
    """
    h = check_positive("height_cm", height_cm, "cm")
    w = check_positive("weight_kg", weight_kg, "kg")
    return scalar_or_array(0.007184 * w**0.425 * h**0.725)


def mosteller_1987_body_surface_area(height_cm, weight_kg):
    r"""Body surface area by Mosteller (1987).

    .. math:: A\,[\mathrm{m^2}] = \sqrt{\frac{H\,[\mathrm{cm}]\; W\,[\mathrm{kg}]}{3600}}

    References
    ----------
    Mosteller, R.D., N. Engl. J. Med. 317 (1987) 1098.

    Examples
    --------
    >>> mosteller_1987_body_surface_area(160.0, 90.0)
    2.0
    """
    h = check_positive("height_cm", height_cm, "cm")
    w = check_positive("weight_kg", weight_kg, "kg")
    return scalar_or_array(np.sqrt(h * w / 3600.0))


#: Body surface area formulas by name; :func:`body_surface_area` dispatches on this.
BODY_SURFACE_AREA_METHODS = {
    "mosteller": mosteller_1987_body_surface_area,
    "dubois": dubois_1916_body_surface_area,
}


def body_surface_area(height_cm, weight_kg, method="mosteller"):
    """Body surface area [m^2] from height [cm] and weight [kg].

    Parameters
    ----------
    height_cm : float or array_like
        Height [cm].  Values below 30 cm or above 250 cm raise (a metre or an
        inch value passed by mistake).
    weight_kg : float or array_like
        Body mass [kg], > 0.
    method : {"mosteller", "dubois"}
        Mosteller 1987 (default) or DuBois & DuBois 1916.

    Returns
    -------
    float or ndarray
        Body surface area [m^2].

    Raises
    ------
    InputRangeError
        For an unknown method, a non-positive value, or a height that looks
        like metres.

    Examples
    --------
    >>> round(body_surface_area(180.0, 81.0), 4)
    2.0125
    >>> round(body_surface_area(180.0, 81.0, method="dubois"), 3)
    2.007
    """
    try:
        fn = BODY_SURFACE_AREA_METHODS[method]
    except (KeyError, TypeError):
        raise InputRangeError(
            f"method must be one of {sorted(BODY_SURFACE_AREA_METHODS)}, got {method!r}"
        ) from None
    h = check_positive("height_cm", height_cm, "cm")
    if np.any(h < 30.0) or np.any(h > 250.0):
        v = float(np.min(h)) if np.any(h < 30.0) else float(np.max(h))
        hint = f"; if that is metres, pass {v * 100:g}" if v < 3.0 else ""
        raise InputRangeError(f"height_cm must lie between 30 and 250 cm, got {v:g} cm{hint}")
    return fn(h, weight_kg)


def typical_adult_range(kind: str, unit: str = "dyn_s_per_cm5", factor: str = "exact"):
    """Typical resting adult range of SVR or PVR, as context (common practice, no source).

    Parameters
    ----------
    kind : {"svr", "pvr"}
    unit : {"dyn_s_per_cm5", "wood_units"}
    factor : {"exact", "rounded"}
        Used only to convert to Wood units.

    Returns
    -------
    tuple of float
        (low, high) in ``unit``.

    Examples
    --------
    >>> typical_adult_range("svr")
    (800.0, 1200.0)
    """
    try:
        low, high = TYPICAL_ADULT_RANGES[kind]
    except (KeyError, TypeError):
        raise InputRangeError(
            f"kind must be one of {sorted(TYPICAL_ADULT_RANGES)}, got {kind!r}"
        ) from None
    if unit == "dyn_s_per_cm5":
        return (low, high)
    if unit == "wood_units":
        fac = _factor(factor)
        return (low / fac, high / fac)
    raise InputRangeError(f"unit must be 'dyn_s_per_cm5' or 'wood_units', got {unit!r}")
