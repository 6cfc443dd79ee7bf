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

Resistance is Hagen-Poiseuille with that apparent viscosity,

.. math:: R = \\frac{8 \\mu_{app} L}{\\pi r^4}, \\qquad Q = \\frac{\\Delta p}{R}.

All fields may be arrays; they broadcast, so one Vessel stands for many segments
or scenarios.  Sensitivity curves (resistance against radius, hematocrit or
temperature; the Fahraeus-Lindqvist curve) and the bridge to an infusion line
(vein back pressure, catheter-to-vein size ratio) live here too.

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
from dataclasses import dataclass, field, replace

import numpy as np

from rheoline.errors import InputRangeError, RangeWarning, RegimeWarning
from rheoline.model import blood as _blood
from rheoline.model.conversions import MMHG
from rheoline.model.validation import (
    check_finite,
    check_hematocrit,
    check_nonnegative,
    check_positive,
    scalar_or_array,
    warn_outside,
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

#: Catheter outer diameter over vein inner diameter above which the site is
#: flagged: a catheter filling more than about 45 % of the vein's diameter is
#: commonly advised against (thrombosis risk, throttled blood flow around it).
#: common practice, no source.
CATHETER_TO_VEIN_RATIO_LIMIT = 0.45

#: A typical peripheral vein pressure [Pa] (10 mmHg) for an arm vein at heart
#: level, as the default back pressure an infusion line works against.
#: common practice, no source.
TYPICAL_PERIPHERAL_VEIN_PRESSURE = 10.0 * MMHG


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
    s = 1.0 / (1.0 + 1e-11 * d**12)
    c = (0.8 + np.exp(-0.075 * d)) * (-1.0 + s) + s
    wall = (d / (d - 1.1)) ** 2
    shape = ((1.0 - h) ** c - 1.0) / ((1.0 - 0.45) ** c - 1.0)
    return scalar_or_array((1.0 + (mu45 - 1.0) * shape * wall) * wall)


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


# --- sensitivities ---------------------------------------------------------------------------

_PARAMETERS = {"radius": "m", "length": "m", "hematocrit": "-", "temperature_c": "degC"}


def _check_parameter(parameter):
    if parameter not in _PARAMETERS:
        raise InputRangeError(f"parameter must be one of {sorted(_PARAMETERS)}, got {parameter!r}")


@dataclass(frozen=True)
class SensitivityCurve:
    """Resistance of a vessel as one field varies, the others held.

    Attributes
    ----------
    parameter : str
        The field varied (``"radius"``, ``"hematocrit"``, ``"temperature_c"``, ``"length"``).
    unit : str
        Its unit.
    values : ndarray
        The field's values.
    resistance : ndarray
        Resistance [Pa s/m^3] at each value.
    baseline_value : float
        The field's value in the vessel the curve started from.
    baseline_resistance : float
        That vessel's resistance [Pa s/m^3].
    viscosity_law : str
        The viscosity law used.
    """

    parameter: str
    unit: str
    values: np.ndarray
    resistance: np.ndarray
    baseline_value: float
    baseline_resistance: float
    viscosity_law: str

    @property
    def relative_resistance(self):
        """Resistance over the baseline vessel's resistance [-]."""
        return self.resistance / self.baseline_resistance

    def to_frame(self):
        """A pandas DataFrame with units in the column names (imports pandas here)."""
        import pandas as pd

        return pd.DataFrame(
            {
                f"{self.parameter} [{self.unit}]": self.values,
                "resistance [Pa s/m^3]": self.resistance,
                "relative resistance [-]": self.relative_resistance,
            }
        )


def resistance_curve(vessel: Vessel, parameter: str, values) -> SensitivityCurve:
    """Resistance of ``vessel`` with ``parameter`` swept over ``values``.

    Parameters
    ----------
    vessel : Vessel
        The baseline segment (scalar fields).
    parameter : {"radius", "hematocrit", "temperature_c", "length"}
    values : array_like
        Values of that field, in its SI unit.

    Returns
    -------
    SensitivityCurve

    Examples
    --------
    >>> v = Vessel(radius=1e-3, length=0.1, viscosity_law="newtonian", viscosity=3.5e-3)
    >>> resistance_curve(v, "radius", [1e-3, 2e-3]).relative_resistance
    array([1.    , 0.0625])
    """
    _check_parameter(parameter)
    if np.ndim(getattr(vessel, parameter)) != 0:
        raise InputRangeError(
            f"the baseline vessel's {parameter} must be a single value to sweep it, "
            f"got shape {np.shape(getattr(vessel, parameter))}"
        )
    vals = np.atleast_1d(np.asarray(values, dtype=float))
    swept = replace(vessel, **{parameter: vals})
    res = np.broadcast_to(np.asarray(swept.resistance, dtype=float), vals.shape)
    return SensitivityCurve(
        parameter=parameter,
        unit=_PARAMETERS[parameter],
        values=vals,
        resistance=np.array(res),
        baseline_value=float(getattr(vessel, parameter)),
        baseline_resistance=float(np.asarray(vessel.resistance)),
        viscosity_law=vessel.viscosity_law,
    )


def resistance_vs_radius(vessel: Vessel, radius) -> SensitivityCurve:
    """Resistance against radius [m]: the fourth-power law, bent by the viscosity law."""
    return resistance_curve(vessel, "radius", radius)


def resistance_vs_hematocrit(vessel: Vessel, hematocrit) -> SensitivityCurve:
    """Resistance against discharge hematocrit [-] (hemodilution, hemoconcentration)."""
    return resistance_curve(vessel, "hematocrit", hematocrit)


def resistance_vs_temperature(vessel: Vessel, temperature_c) -> SensitivityCurve:
    """Resistance against temperature [degC] (hypothermia raises plasma viscosity)."""
    return resistance_curve(vessel, "temperature_c", temperature_c)


def resistance_elasticity(vessel: Vessel, parameter: str, relative_step: float = 1e-4):
    r"""Local sensitivity d ln R / d ln x of resistance to one field [-].

    A central difference in the logarithm: -4 for radius with one Newtonian
    viscosity (Poiseuille), +1 for length.  Vectorized over array fields.

    Parameters
    ----------
    vessel : Vessel
    parameter : {"radius", "hematocrit", "temperature_c", "length"}
        For ``"temperature_c"`` the result is per relative change of the Celsius
        value; the field must be non-zero.
    relative_step : float
        Relative step of the difference (default 1e-4).

    Examples
    --------
    >>> v = Vessel(radius=1e-3, length=0.1, viscosity_law="newtonian", viscosity=3.5e-3)
    >>> round(resistance_elasticity(v, "radius"), 6)
    -4.0
    """
    _check_parameter(parameter)
    step = float(check_positive("relative_step", relative_step))
    x = np.asarray(getattr(vessel, parameter), dtype=float)
    if np.any(x == 0):
        raise InputRangeError(f"{parameter} must be non-zero for a logarithmic sensitivity, got 0")
    up = np.asarray(replace(vessel, **{parameter: x * (1.0 + step)}).resistance)
    down = np.asarray(replace(vessel, **{parameter: x * (1.0 - step)}).resistance)
    return scalar_or_array(np.log(up / down) / np.log((1.0 + step) / (1.0 - step)))


@dataclass(frozen=True)
class FahraeusLindqvistCurve:
    """Apparent viscosity against tube diameter at one hematocrit.

    Attributes
    ----------
    diameter : ndarray
        Tube diameter [m].
    relative_viscosity : ndarray
        Apparent viscosity over plasma viscosity [-].
    apparent_viscosity : ndarray
        Apparent viscosity [Pa s] at ``temperature_c``.
    hematocrit : float
        Discharge hematocrit [-].
    temperature_c : float
        Temperature [degC].
    viscosity_law : str
    """

    diameter: np.ndarray
    relative_viscosity: np.ndarray
    apparent_viscosity: np.ndarray
    hematocrit: float
    temperature_c: float
    viscosity_law: str

    @property
    def minimum_diameter(self) -> float:
        """Diameter [m] of the lowest relative viscosity on the curve."""
        return float(self.diameter[np.argmin(self.relative_viscosity)])

    def to_frame(self):
        """A pandas DataFrame with units in the column names (imports pandas here)."""
        import pandas as pd

        return pd.DataFrame(
            {
                "diameter [um]": self.diameter * 1e6,
                "relative viscosity [-]": self.relative_viscosity,
                "apparent viscosity [mPa s]": self.apparent_viscosity * 1e3,
            }
        )


def fahraeus_lindqvist_curve(
    diameter=None, hematocrit=0.45, temperature_c=37.0, viscosity_law="pries-1992"
) -> FahraeusLindqvistCurve:
    """The Fahraeus-Lindqvist curve: apparent viscosity against diameter.

    Parameters
    ----------
    diameter : array_like, optional
        Diameters [m]; default 80 values spaced evenly in log from 4 um to 1.5 mm.
    hematocrit : float
        Discharge hematocrit [-].
    temperature_c : float
        Temperature [degC].
    viscosity_law : {"pries-1992", "pries-1994"}

    Returns
    -------
    FahraeusLindqvistCurve

    Notes
    -----
    Falling diameter lowers apparent viscosity from about 1 mm down to a minimum
    near 5-7 um (Fahraeus & Lindqvist 1931; Pries 1992), below which it rises
    steeply as red cells deform to pass.

    Examples
    --------
    >>> c = fahraeus_lindqvist_curve([10e-6, 100e-6, 1000e-6])
    >>> bool(c.relative_viscosity[0] < c.relative_viscosity[1] < c.relative_viscosity[2])
    True
    """
    if viscosity_law not in ("pries-1992", "pries-1994"):
        raise InputRangeError(
            f"viscosity_law must be 'pries-1992' or 'pries-1994' for a Fahraeus-Lindqvist "
            f"curve, got {viscosity_law!r} (a Newtonian law has no diameter effect)"
        )
    d = (
        np.geomspace(4e-6, 1.5e-3, 80)
        if diameter is None
        else np.atleast_1d(check_positive("diameter", diameter, "m"))
    )
    h = float(check_hematocrit(hematocrit))
    t = float(check_finite("temperature_c", temperature_c))
    mu = np.asarray(apparent_blood_viscosity(d, h, t, viscosity_law), dtype=float)
    plasma = float(_blood.plasma_viscosity(t))
    return FahraeusLindqvistCurve(
        diameter=d,
        relative_viscosity=mu / plasma,
        apparent_viscosity=mu,
        hematocrit=h,
        temperature_c=t,
        viscosity_law=viscosity_law,
    )


# --- the bridge to an infusion line ----------------------------------------------------------


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
