"""The bridge from a blood vessel to an infusion line: back pressure and catheter-to-vein size.

What a vein adds to an infusion scenario: the pressure the line's outlet works
against, how much of the vein's lumen the catheter fills, and how far a concentric
catheter throttles the blood flowing past it (laminar flow in a concentric annulus).

References
----------
Bird, R.B., Stewart, W.E., Lightfoot, E.N., "Transport Phenomena", 2nd ed.,
Wiley, 2002, section 2.4 (laminar flow in a concentric annulus).
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError, RangeWarning
from rheoline.model.conversions import MMHG
from rheoline.model.validation import (
    check_finite,
    check_nonnegative,
    check_positive,
    scalar_or_array,
)

__all__ = [
    "CATHETER_TO_VEIN_RATIO_LIMIT",
    "TYPICAL_PERIPHERAL_VEIN_PRESSURE",
    "InfusionSiteContext",
    "infusion_site_context",
    "annulus_resistance_factor",
]

#: Catheter outer diameter over vein inner diameter above which the site is
#: flagged: a catheter filling more than about 45 % of the vein's diameter is
#: commonly advised against (thrombosis risk, throttled blood flow around it).
#: common practice, no source.
CATHETER_TO_VEIN_RATIO_LIMIT = 0.45

#: A typical peripheral vein pressure [Pa] (10 mmHg) for an arm vein at heart
#: level, as the default back pressure an infusion line works against.
#: common practice, no source.
TYPICAL_PERIPHERAL_VEIN_PRESSURE = 10.0 * MMHG


def annulus_resistance_factor(diameter_ratio):
    r"""Rise in a vein segment's resistance when a concentric catheter lies in it.

    For laminar Newtonian flow in a concentric annulus of radii kappa R and R
    (Bird, Stewart & Lightfoot 2002, eq. 2.4-17),

    .. math:: \frac{R_{annulus}}{R_{open}} =
              \left[1 - \kappa^4 - \frac{(1 - \kappa^2)^2}{\ln(1/\kappa)}\right]^{-1}

    with kappa the catheter outer diameter over the vein inner diameter.

    Parameters
    ----------
    diameter_ratio : float or array_like
        kappa [-], 0 <= kappa < 1 (0 gives 1).

    Returns
    -------
    float or ndarray
        Resistance ratio [-], >= 1.

    Notes
    -----
    A rigid, straight vein with the catheter on its axis.  A catheter lying
    against the wall (eccentric) throttles less, so this is the larger estimate.

    Examples
    --------
    >>> round(annulus_resistance_factor(0.5), 3)
    7.938
    """
    k = check_nonnegative("diameter_ratio", diameter_ratio)
    if np.any(k >= 1.0):
        raise InputRangeError(
            f"diameter_ratio must be below 1 (catheter narrower than the vein), got "
            f"{float(np.max(k)):g}"
        )
    with np.errstate(divide="ignore", invalid="ignore"):
        ks = np.where(k > 0, k, 0.5)
        open_fraction = 1.0 - ks**4 - (1.0 - ks**2) ** 2 / np.log(1.0 / ks)
        factor = np.where(k > 0, 1.0 / open_fraction, 1.0)
    return scalar_or_array(factor)


@dataclass(frozen=True)
class InfusionSiteContext:
    """What a vein adds to an infusion line's estimate: back pressure and size ratio.

    Attributes
    ----------
    catheter_outer_diameter : float or ndarray
        [m].
    vein_diameter : float or ndarray
        Vein inner diameter [m].
    diameter_ratio : float or ndarray
        Catheter outer diameter over vein diameter [-].
    area_fraction : float or ndarray
        Share of the vein's lumen the catheter fills [-], ratio squared.
    annulus_resistance_factor : float or ndarray
        How many times the vein segment's resistance rises around a concentric
        catheter (Newtonian, rigid, see :func:`annulus_resistance_factor`) [-].
    back_pressure : float or ndarray
        Vein pressure [Pa] the line's outlet works against.
    ratio_limit : float
        The flagging limit on ``diameter_ratio``.
    large_ratio : bool or ndarray
        True where ``diameter_ratio`` exceeds ``ratio_limit``.
    notes : tuple of str
        What the numbers do and do not cover.
    """

    catheter_outer_diameter: float | np.ndarray
    vein_diameter: float | np.ndarray
    diameter_ratio: float | np.ndarray
    area_fraction: float | np.ndarray
    annulus_resistance_factor: float | np.ndarray
    back_pressure: float | np.ndarray
    ratio_limit: float
    large_ratio: bool | np.ndarray
    notes: tuple = ()

    def drive_after_back_pressure(self, drive_pressure):
        """Drive pressure [Pa] left for the line once the vein's back pressure is met."""
        dp = check_finite("drive_pressure", drive_pressure)
        return scalar_or_array(dp - np.asarray(self.back_pressure))


def infusion_site_context(
    catheter_outer_diameter,
    vein_diameter,
    vein_pressure=TYPICAL_PERIPHERAL_VEIN_PRESSURE,
    ratio_limit=CATHETER_TO_VEIN_RATIO_LIMIT,
    warn=True,
):
    """Context a vein gives an infusion scenario: back pressure and catheter-to-vein ratio.

    Parameters
    ----------
    catheter_outer_diameter : float or array_like
        Catheter outer diameter [m].
    vein_diameter : float or array_like
        Vein inner diameter [m], larger than the catheter.
    vein_pressure : float or array_like
        Pressure in the vein [Pa] (default 10 mmHg, a typical arm vein at heart
        level; common practice, no source).  The line's drive must exceed it.
    ratio_limit : float
        Flag ratios above this (default 0.45; common practice, no source).
    warn : bool
        Also warn (RangeWarning) when a ratio exceeds the limit.

    Returns
    -------
    InfusionSiteContext

    Raises
    ------
    InputRangeError
        If the catheter is not narrower than the vein.

    Notes
    -----
    These are context numbers, not a model of the site: the ratio and the
    annulus factor say how much of the vein the catheter fills and how far it
    throttles the blood flowing past it in a rigid tube.  They do not predict
    thrombosis, phlebitis, vein wall injury or the mixing of infusate with blood.

    Examples
    --------
    >>> c = infusion_site_context(1.1e-3, 4e-3)
    >>> round(c.diameter_ratio, 3), bool(c.large_ratio), round(c.back_pressure)
    (0.275, False, 1333)
    """
    od = check_positive("catheter_outer_diameter", catheter_outer_diameter, "m")
    vd = check_positive("vein_diameter", vein_diameter, "m")
    pv = check_finite("vein_pressure", vein_pressure)
    limit = float(check_positive("ratio_limit", ratio_limit))
    ratio = od / vd
    if np.any(ratio >= 1.0):
        raise InputRangeError(
            f"catheter_outer_diameter must be smaller than vein_diameter, got a ratio of "
            f"{float(np.max(ratio)):g}; choose a smaller catheter or a larger vein"
        )
    large = ratio > limit
    if warn and np.any(large):
        warnings.warn(
            RangeWarning(
                f"catheter outer diameter is {float(np.max(ratio)):.0%} of the vein diameter, "
                f"above {limit:.0%}: a large catheter for this vein (commonly advised against); "
                "the numbers do not predict thrombosis or vein injury",
                model="catheter-vein-ratio",
                quantity="diameter_ratio",
                low=0.0,
                high=limit,
            ),
            stacklevel=2,
        )
    notes = (
        "diameter ratio limit: common practice, no source",
        "annulus factor: rigid straight vein, concentric catheter, Newtonian blood",
        "no prediction of thrombosis, phlebitis or vein injury",
    )
    return InfusionSiteContext(
        catheter_outer_diameter=scalar_or_array(od),
        vein_diameter=scalar_or_array(vd),
        diameter_ratio=scalar_or_array(ratio),
        area_fraction=scalar_or_array(ratio**2),
        annulus_resistance_factor=annulus_resistance_factor(ratio),
        back_pressure=scalar_or_array(np.broadcast_to(pv, np.shape(ratio)) if pv.ndim else pv),
        ratio_limit=limit,
        large_ratio=bool(large) if np.ndim(large) == 0 else large,
        notes=notes,
    )
