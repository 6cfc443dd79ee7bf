"""Viscosity against temperature: the Andrade and Vogel-Fulcher-Tammann laws fitted to
viscosities measured at several temperatures (used by
:func:`rheoline.model.fluids.user_fluid_from_temperatures`).

References
----------
Andrade, E.N. da C., "The viscosity of liquids", Nature 125 (1930) 309-310.
Vogel, H., Phys. Z. 22 (1921) 645; Fulcher, G.S., J. Am. Ceram. Soc. 8 (1925) 339;
Tammann, G., Hesse, W., Z. Anorg. Allg. Chem. 156 (1926) 245.

Examples
--------
>>> fit = fit_viscosity_temperature([20.0, 40.0], [1.0e-3, 0.653e-3])
>>> fit.model, round(fit.viscosity(30.0) * 1e3, 3)
('andrade', 0.802)
"""

from __future__ import annotations

import difflib
import warnings
from dataclasses import dataclass, field

import numpy as np

from rheoline.errors import InputRangeError, RheolineWarning
from rheoline.model.validation import check_positive, scalar_or_array, warn_outside

_KELVIN = 273.15

__all__ = [
    "TemperatureFit",
    "TEMPERATURE_MODELS",
    "TEMPERATURE_MODEL_KEYS",
    "fit_viscosity_temperature",
]


def _andrade(temperature_c, a, b):
    return np.exp(a + b / (np.asarray(temperature_c) + _KELVIN))


def _vft(temperature_c, a, b, t0_c):
    return np.exp(a + b / (np.asarray(temperature_c) - t0_c))


#: Temperature laws of viscosity: name -> (function(temperature_c, *params), parameter names,
#: minimum number of temperatures).
TEMPERATURE_MODELS = {
    "andrade": (_andrade, ("a", "b"), 2),
    "vft": (_vft, ("a", "b", "t0_c"), 3),
}

#: Provenance key (:mod:`rheoline.model.provenance`) of each temperature law.
TEMPERATURE_MODEL_KEYS = {"andrade": "andrade-1930", "vft": "vft"}


@dataclass(frozen=True, eq=False)
class TemperatureFit:
    r"""A viscosity-temperature law fitted to measurements.

    ``"andrade"``: :math:`\mu = \exp(a + b/T)`, T in kelvin (b [K]);
    ``"vft"``: :math:`\mu = \exp(a + b/(t - t_0))`, t and t_0 in degC (b [K]).
    ``mu`` in Pa s.

    Attributes
    ----------
    model : str
    parameters, standard_errors : dict
    residuals : ndarray
        ln(measured / fitted viscosity) [-].
    temperature_range_c : tuple
        The measured temperatures' span [degC]; :meth:`viscosity` warns outside it.
    """

    model: str
    parameters: dict
    standard_errors: dict
    residuals: np.ndarray = field(repr=False)
    temperature_range_c: tuple

    def viscosity(self, temperature_c):
        """Viscosity [Pa s] at ``temperature_c`` [degC] from the fitted law."""
        t = np.asarray(temperature_c, dtype=float)
        warn_outside(
            TEMPERATURE_MODEL_KEYS[self.model],
            "temperature_c",
            t,
            low=self.temperature_range_c[0],
            high=self.temperature_range_c[1],
            label=f"this {self.model} fit (the measured temperatures)",
            unit="degC",
        )
        func = TEMPERATURE_MODELS[self.model][0]
        return scalar_or_array(func(t, *self.parameters.values()))


def fit_viscosity_temperature(
    temperatures_c, viscosities, model: str = "andrade"
) -> TemperatureFit:
    """Fit the Andrade or Vogel-Fulcher-Tammann law to viscosities at several temperatures.

    Andrade is linear in ln(mu) and 1/T and is solved by linear least squares
    (two temperatures determine it exactly).  VFT adds the divergence temperature
    t_0 (kept below the lowest measured temperature) and is fitted with
    ``scipy.optimize.least_squares``; it needs three temperatures.

    Parameters
    ----------
    temperatures_c : array_like
        Temperatures [degC], distinct.
    viscosities : array_like
        Viscosities [Pa s], > 0, one per temperature.
    model : {"andrade", "vft"}

    Returns
    -------
    TemperatureFit

    References
    ----------
    Andrade, E.N. da C., "The viscosity of liquids", Nature 125 (1930) 309-310.
    Vogel, H., Phys. Z. 22 (1921) 645; Fulcher, G.S., J. Am. Ceram. Soc. 8 (1925)
    339; Tammann, G., Hesse, W., Z. Anorg. Allg. Chem. 156 (1926) 245.

    Examples
    --------
    >>> fit = fit_viscosity_temperature([20.0, 40.0], [1.0e-3, 0.653e-3])
    >>> round(fit.viscosity(30.0) * 1e3, 3)
    0.802
    """
    from scipy.optimize import least_squares

    if model not in TEMPERATURE_MODELS:
        near = difflib.get_close_matches(str(model), TEMPERATURE_MODELS, n=1)
        hint = f"; did you mean {near[0]!r}?" if near else ""
        raise InputRangeError(
            f"model {model!r} is not a temperature law{hint} (choose from {list(TEMPERATURE_MODELS)})"
        )
    func, names, minimum = TEMPERATURE_MODELS[model]
    t = np.ravel(np.asarray(temperatures_c, dtype=float))
    if not np.all(np.isfinite(t)) or np.any(t <= -_KELVIN):
        raise InputRangeError("temperatures_c must be finite and above -273.15 degC")
    mu = np.ravel(check_positive("viscosities", viscosities, "Pa s"))
    if mu.shape != t.shape:
        raise InputRangeError(
            f"give one viscosity per temperature: {t.size} temperatures, {mu.size} viscosities"
        )
    if np.unique(t).size < minimum:
        raise InputRangeError(
            f"the {model} law needs viscosities at {minimum} or more distinct temperatures, got {np.unique(t).size}"
        )
    y = np.log(mu)
    # A liquid thins as it warms (Andrade's law; common practice, no source).  Viscosities
    # that rise with temperature are most often two lists typed in opposite orders.
    if np.polyfit(1.0 / (t + _KELVIN), y, 1)[0] <= 0.0:
        warnings.warn(
            "viscosities rise with temperature in the data given, unlike a liquid; check that "
            "temperatures_c and viscosities are listed in the same order",
            RheolineWarning,
            stacklevel=3,
        )
    if model == "andrade":
        design = np.column_stack([np.ones_like(t), 1.0 / (t + _KELVIN)])
        p = np.linalg.lstsq(design, y, rcond=None)[0]
        r = y - design @ p
        dof = t.size - 2
        cov = (
            np.sum(r**2) / dof * np.linalg.inv(design.T @ design)
            if dof > 0
            else np.full((2, 2), np.nan)
        )
        errors = np.sqrt(np.abs(np.diag(cov)))
        params = p
    else:
        t_min = float(np.min(t))

        def resid(q):
            t0 = t_min - np.exp(q[2])
            return y - (q[0] + q[1] / (t - t0))

        # start from Andrade's slope with t0 100 K below the lowest temperature
        and_b = np.polyfit(1.0 / (t + _KELVIN), y, 1)[0]
        q0 = np.array([0.0, max(and_b, 10.0) / 2.0, np.log(100.0)])
        q0[0] = float(np.mean(y - q0[1] / (t - (t_min - 100.0))))
        res = least_squares(
            resid, q0, method="trf", xtol=1e-14, ftol=1e-14, gtol=1e-14, max_nfev=10000
        )
        q = res.x
        params = np.array([q[0], q[1], t_min - np.exp(q[2])])
        r = resid(q)
        dof = t.size - 3
        errors = np.full(3, np.nan)
        if dof > 0 and np.linalg.matrix_rank(res.jac) == 3:
            cov_q = np.sum(r**2) / dof * np.linalg.inv(res.jac.T @ res.jac)
            gmat = np.diag([1.0, 1.0, -np.exp(q[2])])
            errors = np.sqrt(np.abs(np.diag(gmat @ cov_q @ gmat.T)))
    return TemperatureFit(
        model=model,
        parameters=dict(zip(names, map(float, params), strict=True)),
        standard_errors=dict(zip(names, map(float, errors), strict=True)),
        residuals=r,
        temperature_range_c=(float(np.min(t)), float(np.max(t))),
    )
