r"""One lumen: Hagen-Poiseuille and the pressure drop of a lumen for any fluid and regime.

The pressure lost along a straight lumen is written, for every fluid and regime, in
Darcy-Weisbach form

.. math:: \Delta p = f_{app}\,\frac{L}{D_h}\,\frac{\rho \bar u^2}{2}

with the *apparent* Darcy friction factor of :mod:`rheoline.model.friction` (Hagen-Poiseuille,
Shah 1978 developing laminar flow and Churchill 1977 in one monotone blend) and, for a
non-Newtonian fluid, the *apparent* viscosity of the fully developed laminar flow from the
Rabinowitsch-Mooney integral of :mod:`rheoline.model.rabinowitsch` in the Reynolds number
(Metzner-Reed).  :math:`D_h` is the bore of a circular lumen or the hydraulic diameter of a
non-circular one (:mod:`rheoline.model.shapes`).

This module also re-exports the names of those two modules, which it held before they were
split from it, so ``from rheoline.model.lumen import churchill_1977_friction`` keeps working.

References
----------
Sutera, S.P., Skalak, R., "The history of Poiseuille's law", Annu. Rev. Fluid Mech. 25 (1993) 1-19.
Metzner, A.B., Reed, J.C., "Flow of non-Newtonian fluids - correlation of the laminar, transition,
and turbulent-flow regions", AIChE J. 1 (1955) 434-440.
"""

from __future__ import annotations

import numpy as np

from rheoline.model.friction import (  # noqa: F401  (re-exported: the names lived here)
    LAMINAR_LIMIT_REYNOLDS,
    TURBULENT_LIMIT_REYNOLDS,
    _friction_and_slope,
    _friction_re_and_slope,
    _shah_fre,
    apparent_darcy_friction,
    churchill_1977_friction,
    entrance_length,
    regime_of,
    shah_1978_apparent_friction,
)
from rheoline.model.rabinowitsch import (  # noqa: F401  (re-exported: the names lived here)
    _apparent_viscosity,
    _rabinowitsch_state,
    _solve_log_wall_shear_rate,
    power_law_tube_flow,
    rabinowitsch_flow,
    velocity_profile,
    wall_shear_rate_for_flow,
)
from rheoline.model.validation import (
    check_nonnegative,
    check_positive,
    scalar_or_array,
)

__all__ = [
    "poiseuille_flow",
    "poiseuille_pressure_drop",
    "reynolds_number",
    "shah_1978_apparent_friction",
    "churchill_1977_friction",
    "apparent_darcy_friction",
    "rabinowitsch_flow",
    "wall_shear_rate_for_flow",
    "power_law_tube_flow",
    "entrance_length",
    "regime_of",
    "lumen_pressure_drop",
    "velocity_profile",
    "LAMINAR_LIMIT_REYNOLDS",
    "TURBULENT_LIMIT_REYNOLDS",
]


def poiseuille_flow(pressure_drop, radius, length, viscosity):
    r"""Hagen-Poiseuille volumetric flow of fully developed laminar Newtonian flow.

    .. math:: Q = \frac{\pi r^4 \Delta p}{8 \mu L}

    Parameters
    ----------
    pressure_drop : float or array_like
        Pressure drop along the lumen [Pa], >= 0.
    radius : float or array_like
        Inner radius [m], > 0.
    length : float or array_like
        Length [m], > 0.
    viscosity : float or array_like
        Dynamic viscosity [Pa s], > 0.

    Returns
    -------
    float or ndarray
        Flow [m^3/s].

    Notes
    -----
    Valid for steady, fully developed laminar flow of a Newtonian liquid in a
    straight rigid circular tube (Re below about 2000, length well beyond the
    entrance length, about 0.06 Re D).  Entrance and exit losses are not included;
    :class:`rheoline.Line` adds them.

    References
    ----------
    Sutera, S.P., Skalak, R., "The history of Poiseuille's law", Annu. Rev. Fluid
    Mech. 25 (1993) 1-19.  doi:10.1146/annurev.fl.25.010193.000245

    Examples
    --------
    >>> q = poiseuille_flow(1000.0, 0.5e-3, 0.1, 1.0e-3)   # 1 kPa, 1 mm bore, 10 cm, water
    >>> round(q * 6e7, 2)                                    # mL/min
    14.73
    """
    dp = check_nonnegative("pressure_drop", pressure_drop, "Pa")
    r = check_positive("radius", radius, "m")
    length = check_positive("length", length, "m")
    mu = check_positive("viscosity", viscosity, "Pa s")
    return scalar_or_array(np.pi * r**4 * dp / (8.0 * mu * length))


def poiseuille_pressure_drop(flow, radius, length, viscosity):
    r"""Pressure drop [Pa] of Hagen-Poiseuille flow, :math:`\Delta p = 8 \mu L Q / (\pi r^4)`.

    Parameters as :func:`poiseuille_flow`, with ``flow`` [m^3/s] >= 0.

    Examples
    --------
    >>> round(poiseuille_pressure_drop(1e-6, 0.5e-3, 0.1, 1.0e-3), 1)
    4074.4
    """
    q = check_nonnegative("flow", flow, "m^3/s")
    r = check_positive("radius", radius, "m")
    length = check_positive("length", length, "m")
    mu = check_positive("viscosity", viscosity, "Pa s")
    return scalar_or_array(8.0 * mu * length * q / (np.pi * r**4))


def reynolds_number(mean_velocity, diameter, density, viscosity):
    r"""Reynolds number :math:`Re = \rho \bar u D / \mu` [-].

    For a non-Newtonian fluid pass the apparent viscosity of the laminar flow,
    :math:`\tau_w/(8\bar u/D)`, which gives the Metzner-Reed generalized Reynolds number.

    Examples
    --------
    >>> round(reynolds_number(1.0, 1e-3, 1000.0, 1e-3))
    1000
    """
    u = check_nonnegative("mean_velocity", mean_velocity, "m/s")
    d = check_positive("diameter", diameter, "m")
    rho = check_positive("density", density, "kg/m^3")
    mu = check_positive("viscosity", viscosity, "Pa s")
    return scalar_or_array(rho * u * d / mu)


def _lumen_friction(
    flow,
    area,
    diameter,
    length,
    relative_roughness,
    density,
    viscosity,
    dlog_viscosity,
    developing,
    laminar_f_re=16.0,
):
    """Frictional drop of one lumen, d ln(dp)/d ln(Q), Reynolds number and mean velocity.

    ``viscosity`` is the apparent viscosity at this flow and ``dlog_viscosity`` its
    log-slope d ln(mu)/d ln(Q) (0 for a Newtonian fluid).
    """
    u = flow / area
    re = density * u * diameter / viscosity
    lod = length / diameter
    f_re, dlog_f = _friction_re_and_slope(re, lod, relative_roughness, developing, laminar_f_re)
    # f (L/D) rho u^2 / 2 written with f*Re, so that a vanishing flow stays finite
    dp = f_re * lod * 0.5 * viscosity * u / diameter
    slope = 2.0 + dlog_f * (1.0 - dlog_viscosity)
    return dp, slope, re, u


def lumen_pressure_drop(fluid, flow, inner_diameter, length, roughness=0.0, developing=True):
    r"""Frictional pressure drop [Pa] of one straight lumen at a flow, for any fluid and regime.

    :math:`\Delta p = f\,(L/D)\,\rho\bar u^2/2` with :func:`apparent_darcy_friction`
    (developing laminar flow from a uniform inlet profile when ``developing``), and for a
    non-Newtonian fluid the Metzner-Reed Reynolds number built on the Rabinowitsch
    apparent viscosity.  Entrance, transition and exit losses are not included.

    Parameters
    ----------
    fluid : Fluid
        The fluid (density and rheology).
    flow : float or array_like
        [m^3/s], > 0.
    inner_diameter, length : float or array_like
        [m], > 0.
    roughness : float or array_like
        Absolute roughness [m], >= 0.
    developing : bool
        Include the Shah 1978 developing-flow excess (True) or take the flow as fully
        developed (False).

    Returns
    -------
    float or ndarray
        Pressure drop [Pa].

    Examples
    --------
    >>> from rheoline.model.fluid_base import newtonian_fluid
    >>> water = newtonian_fluid("water", 1.0e-3, 998.0)
    >>> dp = lumen_pressure_drop(water, 1e-8, 0.5e-3, 1.0, developing=False)
    >>> round(dp / poiseuille_pressure_drop(1e-8, 0.25e-3, 1.0, 1.0e-3), 6)
    1.0
    """
    q = check_positive("flow", flow, "m^3/s")
    d = check_positive("inner_diameter", inner_diameter, "m")
    length = check_positive("length", length, "m")
    eps = check_nonnegative("roughness", roughness, "m")
    mu, dlog_mu, _ = _apparent_viscosity(fluid.rheology, q, d / 2.0)
    dp, _, _, _ = _lumen_friction(
        q, np.pi * d * d / 4.0, d, length, eps / d, fluid.density, mu, dlog_mu, developing
    )
    return scalar_or_array(dp)
