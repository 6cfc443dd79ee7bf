"""Apparent blood viscosity in tubes against diameter: the Pries laws (Fahraeus-Lindqvist).

One physical idea: how the apparent viscosity of blood flowing in a tube depends on
the tube's diameter and the discharge hematocrit, relative to the suspending medium.

* :func:`pries_1992_relative_viscosity`: the in-vitro law (glass tubes, 3.3-1978 um);
* :func:`pries_1994_relative_viscosity`: the in-vivo law (microvascular networks);
* :data:`PRIES_1992_REFERENCE_DIAMETER`: the largest tube of the in-vitro data,
  1978 um.  The toolkit's bulk (large-bore, high-shear) blood viscosity is the
  1992 law there, so a :class:`~rheoline.model.vessels.Vessel` and a
  :class:`~rheoline.model.line.Line` carry the same blood in bores of 1 mm and up.

References
----------
Pries, A.R., Neuhaus, D., Gaehtgens, P., "Blood viscosity in tube flow:
dependence on diameter and hematocrit", Am. J. Physiol. 263 (Heart Circ.
Physiol. 32), H1770-H1778, 1992.  doi:10.1152/ajpheart.1992.263.6.H1770
Pries, A.R., Secomb, T.W., Gessner, T., Sperandio, M.B., Gross, J.F.,
Gaehtgens, P., "Resistance to blood flow in microvessels in vivo", Circ. Res. 75
(1994) 904-915.  doi:10.1161/01.RES.75.5.904
"""

from __future__ import annotations

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.provenance import REGISTRY
from rheoline.model.validation import (
    check_hematocrit,
    check_positive,
    scalar_or_array,
    warn_outside,
)

__all__ = [
    "PRIES_1992_REFERENCE_DIAMETER",
    "PRIES_DIAMETER_RANGE_UM",
    "pries_1992_relative_viscosity",
    "pries_1994_relative_viscosity",
]

#: Diameters [um] of the tube data the Pries 1992 law was fitted to (the registry's range).
PRIES_DIAMETER_RANGE_UM = tuple(1e6 * d for d in REGISTRY["pries-1992"].ranges["diameter"])

#: The largest tube of the in-vitro data [m] (1978 um): the bore at which the
#: toolkit anchors the bulk high-shear viscosity of blood (relative viscosity 3.2 at
#: hematocrit 0.45; Pries 1992, eq. 7 with its exponential terms vanished).
PRIES_1992_REFERENCE_DIAMETER = 1.9779e-3


def _exponent_c(d):
    s = 1.0 / (1.0 + 1e-11 * d**12)
    return (0.8 + np.exp(-0.075 * d)) * (-1.0 + s) + s


def _shape(h, c):
    return ((1.0 - h) ** c - 1.0) / ((1.0 - 0.45) ** c - 1.0)


def _pries_1992(d_um, h):
    mu45 = 220.0 * np.exp(-1.3 * d_um) + 3.2 - 2.44 * np.exp(-0.06 * d_um**0.645)
    return 1.0 + (mu45 - 1.0) * _shape(h, _exponent_c(d_um))


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
        was fitted to.

    Notes
    -----
    The law shows the Fahraeus-Lindqvist effect: apparent viscosity falls as the
    diameter falls from about 1 mm, reaches a minimum near 5-7 micrometres, and
    rises steeply below that.  Above about 1 mm it approaches the large-tube value
    (3.2 at hematocrit 0.45).  The data behind it were taken at high shear rates,
    where blood is close to Newtonian.

    References
    ----------
    Pries, A.R., Neuhaus, D., Gaehtgens, P., Am. J. Physiol. 263 (1992)
    H1770-H1778.  doi:10.1152/ajpheart.1992.263.6.H1770

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
    return scalar_or_array(_pries_1992(d, h))


def pries_1994_relative_viscosity(diameter, hematocrit):
    r"""Apparent blood viscosity in microvessels in vivo relative to plasma (Pries 1994).

    .. math::

        \mu_{vivo} = \left[1 + (\mu^*_{0.45} - 1)
                     \frac{(1 - H_D)^C - 1}{(1 - 0.45)^C - 1}
                     \left(\frac{D}{D - 1.1}\right)^2\right]
                     \left(\frac{D}{D - 1.1}\right)^2

        \mu^*_{0.45} = 6\,e^{-0.085 D} + 3.2 - 2.44\,e^{-0.06 D^{0.645}}

    with C as in the in-vitro law (Pries 1992), D the diameter in micrometres and
    H_D the discharge hematocrit.  The factor ``D / (D - 1.1)`` stands for a
    1.1 um-thick layer on the vessel wall that carries no red cells.

    Parameters
    ----------
    diameter : float or array_like
        Vessel inner diameter [m], more than 1.1 um.
    hematocrit : float or array_like
        Discharge hematocrit [-], 0 to 0.95.

    Returns
    -------
    float or ndarray
        mu_app / mu_plasma [-].

    Raises
    ------
    InputRangeError
        For a diameter of 1.1 um or less (the law has a pole there).

    Warns
    -----
    RangeWarning
        Outside 3.3-1978 um, the diameters of the in-vitro data that anchor the
        law at large diameters.

    Notes
    -----
    Fitted to flow and pressure measured in microvascular networks of the rat
    mesentery; it gives a higher resistance than the in-vitro law in small
    vessels and joins it above a few hundred micrometres.

    References
    ----------
    Pries, A.R. et al., Circ. Res. 75 (1994) 904-915.

    Examples
    --------
    >>> round(pries_1994_relative_viscosity(1e-3, 0.45), 3)
    3.198
    """
    d_m = check_positive("diameter", diameter, "m")
    h = check_hematocrit(hematocrit)
    d = d_m * 1e6
    if np.any(d <= 1.1):
        raise InputRangeError(
            f"diameter must be more than 1.1 um for the Pries 1994 in-vivo law, got "
            f"{float(np.min(d)):g} um; check the unit (metres expected)"
        )
    warn_outside(
        "pries-1994",
        "diameter",
        d_m,
        label="Pries 1994 in-vivo viscosity law",
        unit="um",
        scale=1e6,
    )
    mu45 = 6.0 * np.exp(-0.085 * d) + 3.2 - 2.44 * np.exp(-0.06 * d**0.645)
    wall = (d / (d - 1.1)) ** 2
    shape = _shape(h, _exponent_c(d))
    return scalar_or_array((1.0 + (mu45 - 1.0) * shape * wall) * wall)


def large_bore_relative_viscosity(hematocrit):
    """Pries 1992 relative viscosity at :data:`PRIES_1992_REFERENCE_DIAMETER`, no range check [-].

    Examples
    --------
    >>> round(float(large_bore_relative_viscosity(0.45)), 4)
    3.1992
    """
    h = np.asarray(hematocrit, dtype=float)
    return _pries_1992(PRIES_1992_REFERENCE_DIAMETER * 1e6, h)
