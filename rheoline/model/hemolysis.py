r"""A hemolysis concern indicator: the Giersiepen 1990 power law.

.. math:: HI\,[\%] = 3.62\times10^{-5}\; t^{0.785}\; \tau^{2.416}

with :math:`\tau` the shear stress [Pa] and :math:`t` the exposure time [s]: the
percentage of hemoglobin released, :math:`\Delta Hb / Hb \times 100`.

Limits (stated, not hidden)
---------------------------
* Fitted to Couette-viscometer data of human blood at constant stress, for stresses
  up to 255 Pa and exposure times from 7 to 700 ms (Giersiepen et al. 1990, from memory).
* Constant stress along the exposure: in a line the wall shear stress is applied and
  the mean residence time L/u is used, a conservative pairing (the wall stress is the
  highest in the lumen; cells near the wall stay longer).
* Summing per-part indices is an approximation: damage does not add linearly in the
  power law.  Use it to compare candidate lines, not as a prediction of free hemoglobin.
* The index applies to fluids with red cells only; a line carrying saline reports NaN.

Concern threshold
-----------------
:data:`HEMOLYSIS_CONCERN_STRESS` (150 Pa) is a separate, simpler screen: a blood case
whose largest wall shear stress exceeds it is flagged as a hemolysis concern (Leverett
et al. 1972, from memory).

References
----------
Giersiepen, M., Wurzinger, L.J., Opitz, R., Reul, H., "Estimation of shear stress-related
blood damage in heart valve prostheses - in vitro comparison of 25 aortic valves",
Int. J. Artif. Organs 13 (1990) 300-306.
Leverett, L.B., Hellums, J.D., Alfrey, C.P., Lynch, E.C., "Red blood cell damage by shear
stress", Biophys. J. 12 (1972) 257-273.
"""

from __future__ import annotations

import numpy as np

from rheoline.model.provenance import REGISTRY
from rheoline.model.validation import check_nonnegative, scalar_or_array, warn_outside

__all__ = [
    "giersiepen_1990_hemolysis_index",
    "GIERSIEPEN_1990_MAX_STRESS",
    "GIERSIEPEN_1990_TIME_RANGE",
    "HEMOLYSIS_CONCERN_STRESS",
]

#: Upper shear stress of the fitted data [Pa] (from memory; the registry's range).
GIERSIEPEN_1990_MAX_STRESS = REGISTRY["giersiepen-1990"].ranges["shear_stress"][1]
#: Exposure times of the fitted data [s] (from memory; the registry's range).
GIERSIEPEN_1990_TIME_RANGE = REGISTRY["giersiepen-1990"].ranges["exposure_time"]

#: Wall shear stress [Pa] above which a blood case is flagged as a hemolysis concern
#: (``LineResult.conditions["hemolysis_concern"]``).  From memory: Leverett et al.,
#: Biophys. J. 12 (1972) 257-273, report red-cell damage above about 150 Pa for exposures
#: of minutes; shorter exposures tolerate more, so this is a conservative screening
#: threshold (registry key ``"leverett-1972"``).
HEMOLYSIS_CONCERN_STRESS = 150.0

_C, _ALPHA, _BETA = 3.62e-5, 0.785, 2.416


def _index(shear_stress, exposure_time):
    """The power law without checks (arrays in, array out)."""
    return _C * np.power(exposure_time, _ALPHA) * np.power(shear_stress, _BETA)


def giersiepen_1990_hemolysis_index(shear_stress, exposure_time, warn=True):
    r"""Hemolysis index [%] from a shear stress and an exposure time (Giersiepen 1990).

    .. math:: HI = 3.62\times10^{-5}\, t^{0.785}\, \tau^{2.416}

    Parameters
    ----------
    shear_stress : float or array_like
        Shear stress [Pa], >= 0.
    exposure_time : float or array_like
        Exposure time [s], >= 0.
    warn : bool
        Warn (RangeWarning) outside the fitted range (stress up to 255 Pa, 7-700 ms).

    Returns
    -------
    float or ndarray
        Released hemoglobin as a percentage of total hemoglobin [%].

    Notes
    -----
    A comparative indicator only; see the module notes for its limits.

    References
    ----------
    Giersiepen et al., Int. J. Artif. Organs 13 (1990) 300-306.

    Examples
    --------
    >>> round(giersiepen_1990_hemolysis_index(100.0, 0.1), 4)
    0.4034
    """
    tau = check_nonnegative("shear_stress", shear_stress, "Pa")
    t = check_nonnegative("exposure_time", exposure_time, "s")
    if warn:
        for quantity, values, unit in (("shear_stress", tau, "Pa"), ("exposure_time", t, "s")):
            warn_outside(
                "giersiepen-1990",
                quantity,
                values,
                label="the Giersiepen 1990 hemolysis law",
                unit=unit,
            )
    return scalar_or_array(_index(tau, t))
