"""Reduction of bench measurements: plate-drag viscosity, rheology fits, temperature fits.

* :func:`plate_drag_viscosity`: one-point Couette reduction, viscosity from the
  drag force on a plate sliding over a thin film.
* :func:`fit_rheology`: fit every model of
  :data:`rheoline.model.rheology.RHEOLOGY_MODELS` to (shear rate, stress) or
  (shear rate, viscosity) pairs, with standard errors, residuals, the best model
  by AICc, and whether the data are Newtonian within their scatter.
* :func:`fit_viscosity_temperature`: Andrade or Vogel-Fulcher-Tammann law
  through viscosities measured at several temperatures (used by
  :func:`rheoline.model.fluids.user_fluid_from_temperatures`).

The three live in one module each (:mod:`rheoline.model.viscometry`,
:mod:`rheoline.model.rheology_fit`, :mod:`rheoline.model.temperature_fit`); this module
gathers their names.
"""

from __future__ import annotations

from rheoline.model.rheology_fit import ModelFit, RheologyFit, fit_rheology
from rheoline.model.temperature_fit import (
    TEMPERATURE_MODEL_KEYS,
    TEMPERATURE_MODELS,
    TemperatureFit,
    fit_viscosity_temperature,
)
from rheoline.model.viscometry import (
    COUETTE_TRANSITION_REYNOLDS,
    couette_viscosity,
    plate_drag_viscosity,
)

__all__ = [
    "plate_drag_viscosity",
    "couette_viscosity",
    "COUETTE_TRANSITION_REYNOLDS",
    "ModelFit",
    "RheologyFit",
    "fit_rheology",
    "TemperatureFit",
    "TEMPERATURE_MODELS",
    "TEMPERATURE_MODEL_KEYS",
    "fit_viscosity_temperature",
]
