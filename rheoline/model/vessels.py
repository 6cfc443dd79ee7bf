"""Blood vessel segments: apparent viscosity, Poiseuille resistance, flow and wall shear.

A :class:`Vessel` is a straight, rigid, circular segment with a radius, a length,
a (discharge) hematocrit and a temperature.  Its apparent blood viscosity comes
from one of :data:`VISCOSITY_LAWS`:

* ``"pries-1992"`` (default): the in-vitro law of Pries, Neuhaus & Gaehtgens
  (1992), glass tubes, relative to plasma (:func:`~rheoline.model.blood.pries_1992_relative_viscosity`);
* ``"pries-1994"``: the in-vivo law of Pries et al. (1994), fitted to flow in
  microvascular networks, which adds the effect of the endothelial surface layer
  (:func:`pries_1994_relative_viscosity`);
* ``"newtonian"``: one viscosity for the whole segment, the user's own or the
  high-shear whole-blood viscosity at the hematocrit and temperature.

The Pries laws give viscosity relative to plasma; the plasma viscosity at the
segment's temperature (:func:`~rheoline.model.blood.plasma_viscosity`) scales
them, so temperature acts through plasma viscosity alone.

In bores of 1 mm and up the Pries 1992 law is the same bulk blood that
:func:`~rheoline.model.blood.whole_blood_high_shear_viscosity` gives a
:class:`~rheoline.model.line.Line` (both anchor at Pries' largest tube, 1978 um):
a vessel and a line carry one blood.  Both are high-shear values; at wall shear
rates below about 100 1/s real blood is thicker (a line's shear-thinning blood
models show it; a vessel's Poiseuille estimate does not).

Resistance is Hagen-Poiseuille with that apparent viscosity,

.. math:: R = \\frac{8 \\mu_{app} L}{\\pi r^4}, \\qquad Q = \\frac{\\Delta p}{R}.

All fields may be arrays; they broadcast, so one Vessel stands for many segments
or scenarios.  Sensitivity curves (resistance against radius, hematocrit or
temperature; the Fahraeus-Lindqvist curve) live in
:mod:`~rheoline.model.vessel_curves`, the bridge to an infusion line (vein back
pressure, catheter-to-vein size ratio) in :mod:`~rheoline.model.infusion_site`;
both are re-exported here.

References
----------
Pries, A.R., Neuhaus, D., Gaehtgens, P., "Blood viscosity in tube flow:
dependence on diameter and hematocrit", Am. J. Physiol. 263 (1992) H1770-H1778.
Pries, A.R., Secomb, T.W., Gessner, T., Sperandio, M.B., Gross, J.F.,
Gaehtgens, P., "Resistance to blood flow in microvessels in vivo", Circ. Res. 75
(1994) 904-915.  doi:10.1161/01.RES.75.5.904
Fahraeus, R., Lindqvist, T., "The viscosity of the blood in narrow capillary
tubes", Am. J. Physiol. 96 (1931) 562-568.
Bird, R.B., Stewart, W.E., Lightfoot, E.N., "Transport Phenomena", 2nd ed.,
Wiley, 2002, section 2.4 (laminar flow in a concentric annulus).
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, field

import numpy as np

from rheoline.errors import InputRangeError, RegimeWarning
from rheoline.model import blood as _blood
from rheoline.model.infusion_site import (
    CATHETER_TO_VEIN_RATIO_LIMIT,
    TYPICAL_PERIPHERAL_VEIN_PRESSURE,
    InfusionSiteContext,
    annulus_resistance_factor,
    infusion_site_context,
)
from rheoline.model.pries import pries_1994_relative_viscosity
from rheoline.model.validation import (
    check_finite,
    check_hematocrit,
    check_positive,
    scalar_or_array,
)

__all__ = [
    "BLOOD_DENSITY",
    "VISCOSITY_LAWS",
    "pries_1994_relative_viscosity",
    "apparent_blood_viscosity",
    "Vessel",
    "SensitivityCurve",
    "resistance_curve",
    "resistance_vs_radius",
    "resistance_vs_hematocrit",
    "resistance_vs_temperature",
    "resistance_elasticity",
    "FahraeusLindqvistCurve",
    "fahraeus_lindqvist_curve",
    "CATHETER_TO_VEIN_RATIO_LIMIT",
    "TYPICAL_PERIPHERAL_VEIN_PRESSURE",
    "InfusionSiteContext",
    "infusion_site_context",
    "annulus_resistance_factor",
]

#: Whole-blood density [kg/m^3] used for Reynolds numbers.  common practice, no source.
BLOOD_DENSITY = 1060.0

#: Reynolds number above which a Poiseuille estimate is flagged (RegimeWarning).
#: common practice, no source.
LAMINAR_REYNOLDS_LIMIT = 2000.0


def _law_pries_1992(diameter, hematocrit, temperature_c, viscosity):
    return _blood.plasma_viscosity(temperature_c) * _blood.pries_1992_relative_viscosity(
        diameter, hematocrit
    )


def _law_pries_1994(diameter, hematocrit, temperature_c, viscosity):
    return _blood.plasma_viscosity(temperature_c) * pries_1994_relative_viscosity(
        diameter, hematocrit
    )


def _law_newtonian(diameter, hematocrit, temperature_c, viscosity):
    if viscosity is not None:
        mu = check_positive("viscosity", viscosity, "Pa s")
    else:
        mu = np.asarray(_blood.blood_viscosity(hematocrit, temperature_c), dtype=float)
    return mu * np.ones_like(np.asarray(diameter, dtype=float))


#: Viscosity laws by name: ``f(diameter [m], hematocrit [-], temperature_c [degC],
#: viscosity [Pa s] or None) -> apparent viscosity [Pa s]``.
VISCOSITY_LAWS = {
    "pries-1992": _law_pries_1992,
    "pries-1994": _law_pries_1994,
    "newtonian": _law_newtonian,
}


def _law(name):
    try:
        return VISCOSITY_LAWS[name]
    except (KeyError, TypeError):
        raise InputRangeError(
            f"viscosity_law must be one of {sorted(VISCOSITY_LAWS)}, got {name!r}; "
            "'pries-1992' is the in-vitro law, 'pries-1994' the in-vivo law, "
            "'newtonian' one viscosity"
        ) from None


def apparent_blood_viscosity(
    diameter, hematocrit=0.45, temperature_c=37.0, viscosity_law="pries-1992", viscosity=None
):
    """Apparent viscosity [Pa s] of blood flowing in a tube of ``diameter`` [m].

    Parameters
    ----------
    diameter : float or array_like
        Inner diameter [m].
    hematocrit : float or array_like
        Discharge hematocrit [-].
    temperature_c : float or array_like
        Temperature [degC].
    viscosity_law : {"pries-1992", "pries-1994", "newtonian"}
        See :data:`VISCOSITY_LAWS`.
    viscosity : float or array_like, optional
        For ``"newtonian"`` only: the one viscosity [Pa s]; None takes the
        high-shear whole-blood viscosity at the hematocrit and temperature.

    Returns
    -------
    float or ndarray
        Apparent viscosity [Pa s].
    """
    fn = _law(viscosity_law)
    if viscosity is not None and viscosity_law != "newtonian":
        raise InputRangeError(
            f"viscosity is used only with viscosity_law='newtonian', got viscosity_law="
            f"{viscosity_law!r}; drop viscosity or choose 'newtonian'"
        )
    d = check_positive("diameter", diameter, "m")
    h = check_hematocrit(hematocrit)
    t = check_finite("temperature_c", temperature_c)
    return scalar_or_array(fn(d, h, t, viscosity))


@dataclass(frozen=True)
class Vessel:
    """A straight, rigid, circular blood vessel segment in Poiseuille flow.

    Parameters
    ----------
    radius : float or array_like
        Inner radius [m], > 0.
    length : float or array_like
        Length [m], > 0.
    hematocrit : float or array_like
        Discharge hematocrit [-], 0 to 0.95 (0.45 by default).
    temperature_c : float or array_like
        Blood temperature [degC] (37 by default).
    viscosity_law : {"pries-1992", "pries-1994", "newtonian"}
        How apparent viscosity follows from diameter and hematocrit
        (:data:`VISCOSITY_LAWS`); default the Pries 1992 in-vitro law.
    viscosity : float or array_like, optional
        With ``viscosity_law="newtonian"``: the one viscosity [Pa s].  None takes
        the high-shear whole-blood viscosity.
    density : float or array_like
        Blood density [kg/m^3], for Reynolds numbers only.

    Notes
    -----
    Steady, fully developed laminar flow in a rigid tube: no pulsatility, wall
    compliance, entrance length or branching losses.  Pries' laws relate tube
    diameter and *discharge* hematocrit; the tube hematocrit is lower (Fahraeus
    effect).  Temperature acts through plasma viscosity only.

    Examples
    --------
    >>> v = Vessel(radius=1e-3, length=0.1, viscosity_law="newtonian", viscosity=3.5e-3)
    >>> round(v.resistance / 1e8, 4)        # 8 mu L / (pi r^4), in 1e8 Pa s/m^3
    8.9127
    >>> round(v.flow(1000.0) * 6e7, 2)      # mL/min at 1 kPa
    67.32
    """

    radius: float | np.ndarray
    length: float | np.ndarray
    hematocrit: float | np.ndarray = 0.45
    temperature_c: float | np.ndarray = 37.0
    viscosity_law: str = "pries-1992"
    viscosity: float | np.ndarray | None = None
    density: float | np.ndarray = field(default=BLOOD_DENSITY)

    def __post_init__(self):
        set_ = object.__setattr__
        set_(self, "radius", scalar_or_array(check_positive("radius", self.radius, "m")))
        set_(self, "length", scalar_or_array(check_positive("length", self.length, "m")))
        set_(self, "hematocrit", scalar_or_array(check_hematocrit(self.hematocrit)))
        set_(
            self,
            "temperature_c",
            scalar_or_array(check_finite("temperature_c", self.temperature_c)),
        )
        set_(self, "density", scalar_or_array(check_positive("density", self.density, "kg/m^3")))
        _law(self.viscosity_law)
        if self.viscosity is not None:
            if self.viscosity_law != "newtonian":
                raise InputRangeError(
                    f"viscosity is used only with viscosity_law='newtonian', got "
                    f"viscosity_law={self.viscosity_law!r}; drop viscosity or choose 'newtonian'"
                )
            set_(
                self,
                "viscosity",
                scalar_or_array(check_positive("viscosity", self.viscosity, "Pa s")),
            )
        fields = ("radius", "length", "hematocrit", "temperature_c", "density", "viscosity")
        shapes = {f: np.shape(getattr(self, f)) for f in fields if getattr(self, f) is not None}
        try:
            np.broadcast_shapes(*shapes.values())
        except ValueError:
            raise InputRangeError(
                "radius, length, hematocrit, temperature_c, density and viscosity must "
                f"broadcast together, got shapes {shapes}"
            ) from None
        if np.any(np.asarray(self.radius) > 0.02):
            raise InputRangeError(
                f"radius must be at most 0.02 m for a blood vessel, got "
                f"{float(np.max(self.radius)):g} m; pass metres (1 mm = 1e-3 m), not millimetres"
            )

    # --- geometry and viscosity ------------------------------------------------------------
    @property
    def models_used(self) -> tuple:
        """Provenance keys of the models this segment applies (first-use order).

        Examples
        --------
        >>> Vessel(radius=1e-4, length=1e-3).models_used
        ('hagen-poiseuille', 'pries-1992', 'plasma-viscosity-ratio', 'iapws-2008')
        """
        plasma = ("plasma-viscosity-ratio", "iapws-2008")
        law = {
            "pries-1992": ("pries-1992", *plasma),
            "pries-1994": ("pries-1994", *plasma),
            "newtonian": () if self.viscosity is not None else ("quemada-1978", *plasma),
        }[self.viscosity_law]
        return ("hagen-poiseuille", *law)

    @property
    def diameter(self):
        """Inner diameter [m]."""
        return scalar_or_array(2.0 * np.asarray(self.radius))

    @property
    def cross_section_area(self):
        """Lumen area [m^2], pi r^2."""
        return scalar_or_array(np.pi * np.asarray(self.radius) ** 2)

    @property
    def apparent_viscosity(self):
        """Apparent blood viscosity [Pa s] from the segment's viscosity law."""
        fn = _law(self.viscosity_law)
        d = 2.0 * np.asarray(self.radius, dtype=float)
        mu = fn(d, np.asarray(self.hematocrit), np.asarray(self.temperature_c), self.viscosity)
        shape = np.broadcast_shapes(np.shape(mu), np.shape(self.length))
        return scalar_or_array(np.broadcast_to(mu, shape))

    @property
    def relative_viscosity(self):
        """Apparent viscosity over plasma viscosity at the segment's temperature [-]."""
        plasma = _blood.plasma_viscosity(np.asarray(self.temperature_c))
        return scalar_or_array(np.asarray(self.apparent_viscosity) / plasma)

    # --- resistance and flow ---------------------------------------------------------------
    @property
    def resistance(self):
        """Hagen-Poiseuille resistance [Pa s/m^3], 8 mu_app L / (pi r^4)."""
        r = np.asarray(self.radius)
        return scalar_or_array(
            8.0 * np.asarray(self.apparent_viscosity) * np.asarray(self.length) / (np.pi * r**4)
        )

    @property
    def conductance(self):
        """1 / resistance [m^3/(Pa s)]."""
        return scalar_or_array(1.0 / np.asarray(self.resistance))

    def flow(self, pressure_drop):
        """Volume flow [m^3/s] at a pressure drop [Pa] along the segment.

        Warns :class:`~rheoline.errors.RegimeWarning` when the Reynolds number
        passes 2000 (the Poiseuille estimate assumes laminar flow).
        """
        dp = check_finite("pressure_drop", pressure_drop)
        q = dp / np.asarray(self.resistance)
        self._check_laminar(q)
        return scalar_or_array(q)

    def pressure_drop(self, flow):
        """Pressure drop [Pa] needed for a volume flow [m^3/s]."""
        q = check_finite("flow", flow)
        self._check_laminar(q)
        return scalar_or_array(q * np.asarray(self.resistance))

    def mean_velocity(self, pressure_drop):
        """Cross-section mean velocity [m/s] at a pressure drop [Pa]: Q / (pi r^2)."""
        return scalar_or_array(
            np.asarray(self.flow(pressure_drop)) / np.asarray(self.cross_section_area)
        )

    def wall_shear_stress(self, pressure_drop):
        """Wall shear stress [Pa], dp r / (2 L).

        From the force balance on the fluid column, so it holds for any viscosity
        law (it equals 4 mu_app Q / (pi r^3) here).
        """
        dp = check_finite("pressure_drop", pressure_drop)
        return scalar_or_array(dp * np.asarray(self.radius) / (2.0 * np.asarray(self.length)))

    def wall_shear_rate(self, pressure_drop):
        """Newtonian (pseudo-)wall shear rate [1/s], 4 Q / (pi r^3)."""
        q = np.asarray(self.flow(pressure_drop))
        return scalar_or_array(4.0 * q / (np.pi * np.asarray(self.radius) ** 3))

    def reynolds_number(self, pressure_drop):
        """Reynolds number [-], rho U D / mu_app, at a pressure drop [Pa]."""
        dp = check_finite("pressure_drop", pressure_drop)
        return scalar_or_array(self._reynolds(dp / np.asarray(self.resistance)))

    def _reynolds(self, q):
        u = np.abs(q) / (np.pi * np.asarray(self.radius) ** 2)
        return (
            np.asarray(self.density)
            * u
            * 2.0
            * np.asarray(self.radius)
            / np.asarray(self.apparent_viscosity)
        )

    def _check_laminar(self, q):
        re = self._reynolds(q)
        if np.any(re > LAMINAR_REYNOLDS_LIMIT):
            warnings.warn(
                RegimeWarning(
                    f"Reynolds number {float(np.max(re)):.0f} exceeds {LAMINAR_REYNOLDS_LIMIT:.0f}: "
                    "the Poiseuille vessel model assumes laminar flow; the flow is overestimated",
                    model="hagen-poiseuille",
                    quantity="reynolds",
                    value=float(np.max(re)),
                    limit=LAMINAR_REYNOLDS_LIMIT,
                ),
                stacklevel=3,
            )

    def infusion_context(
        self,
        catheter_outer_diameter,
        vein_pressure=TYPICAL_PERIPHERAL_VEIN_PRESSURE,
        ratio_limit=CATHETER_TO_VEIN_RATIO_LIMIT,
        warn=True,
    ):
        """This vessel as the vein receiving a catheter: see :func:`infusion_site_context`."""
        return infusion_site_context(
            catheter_outer_diameter,
            self.diameter,
            vein_pressure=vein_pressure,
            ratio_limit=ratio_limit,
            warn=warn,
        )


# re-exported: the sensitivity curves build on Vessel, so they import it (and are imported last)
from rheoline.model.vessel_curves import (  # noqa: E402
    FahraeusLindqvistCurve,
    SensitivityCurve,
    fahraeus_lindqvist_curve,
    resistance_curve,
    resistance_elasticity,
    resistance_vs_hematocrit,
    resistance_vs_radius,
    resistance_vs_temperature,
)
