"""Vessel sensitivity curves: resistance against one field, and the Fahraeus-Lindqvist curve.

Each curve starts from a :class:`~rheoline.model.vessels.Vessel` and sweeps one
field (radius, length, hematocrit or temperature), or the diameter at one
hematocrit for the apparent viscosity (Fahraeus & Lindqvist 1931; Pries 1992).

References
----------
Fahraeus, R., Lindqvist, T., "The viscosity of the blood in narrow capillary
tubes", Am. J. Physiol. 96 (1931) 562-568.
Pries, A.R., Neuhaus, D., Gaehtgens, P., Am. J. Physiol. 263 (1992) H1770-H1778.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model import blood as _blood
from rheoline.model.validation import (
    check_finite,
    check_hematocrit,
    check_positive,
    scalar_or_array,
)
from rheoline.model.vessels import Vessel, apparent_blood_viscosity

__all__ = [
    "SensitivityCurve",
    "resistance_curve",
    "resistance_vs_radius",
    "resistance_vs_hematocrit",
    "resistance_vs_temperature",
    "resistance_elasticity",
    "FahraeusLindqvistCurve",
    "fahraeus_lindqvist_curve",
]

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
