"""Blood: plasma viscosity, whole-blood viscosity and the Fahraeus-Lindqvist effect.

This module starts with the Pries 1992 in-vitro law; the rest of the blood
models live here too.
"""

from __future__ import annotations

import numpy as np

from rheoline.model.validation import check_hematocrit, check_positive, scalar_or_array, warn_outside

__all__ = ["pries_1992_relative_viscosity"]


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
    warn_outside("diameter", d, 3.3, 1978.0, "Pries 1992 in-vitro viscosity law", "um")
    mu45 = 220.0 * np.exp(-1.3 * d) + 3.2 - 2.44 * np.exp(-0.06 * d**0.645)
    s = 1.0 / (1.0 + 1e-11 * d**12)
    c = (0.8 + np.exp(-0.075 * d)) * (-1.0 + s) + s
    rel = 1.0 + (mu45 - 1.0) * ((1.0 - h) ** c - 1.0) / ((1.0 - 0.45) ** c - 1.0)
    return scalar_or_array(rel)
