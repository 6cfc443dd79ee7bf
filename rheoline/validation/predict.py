"""Predict every validation row with the toolkit's public API.

A row's prediction is what a user of :func:`rheoline.fluid` and :class:`rheoline.Line`
would get for the row's conditions: a viscosity from the named library fluid at the
row's temperature, hematocrit and shear rate; a flow from a line of the row's geometry
under the row's drive.  Blood rows are predicted once per blood rheology model, so the
report can compare the models; the library's default model is marked ``default``.

Each prediction names the models behind it by their keys in the provenance registry
(:data:`rheoline.model.provenance.REGISTRY`), so a review pack can look up the
validation error of the models a run used (:func:`rheoline.validation.model_validation`).
"""

from __future__ import annotations

import math
import warnings
from dataclasses import dataclass

import numpy as np

from rheoline.validation.datasets import Row

__all__ = ["Prediction", "VARIANT_KEYS", "predict_row", "BLOOD_MODEL_VARIANTS"]

#: Keys (of :data:`rheoline.model.provenance.REGISTRY`) that belong to one blood model
#: only: a non-default blood prediction counts under these alone, so the keys shared by
#: every blood model (scaling, Pries 1992, the fit) are judged by the default model.
VARIANT_KEYS = frozenset({"carreau", "carreau-yasuda", "casson", "merrill-1965", "power-law"})

_BLOOD_MODEL_KEYS = {
    "carreau": ("carreau", "cho-kensey-1991", "wells-merrill-1962"),
    "carreau-yasuda": ("carreau-yasuda", "cho-kensey-1991", "wells-merrill-1962"),
    "casson": ("casson", "merrill-1965"),
    "power-law": ("power-law", "cho-kensey-1991", "wells-merrill-1962"),
    "newtonian": (),
}

#: Blood rheology models predicted for every blood row; the first is the library default.
BLOOD_MODEL_VARIANTS = ("carreau", "carreau-yasuda", "casson", "power-law", "newtonian")

_FLUID_KEYS = {
    "water": ("iapws-2008",),
    "saline-0.9": ("laliberte-2007",),
    "lactated-ringers": ("laliberte-2007",),
    "dextrose-5": ("dextrose-5-relative",),
    "albumin-5": ("albumin-mooney",),
    "albumin-20": ("albumin-mooney",),
    "albumin-25": ("albumin-mooney",),
    "plasma": ("plasma-viscosity-ratio",),
}

#: Part kinds the flow rows may name, and the line laws a laminar lumen of that kind uses.
_PART_KEYS = {"tube": ("hagen-poiseuille", "shah-1978")}

_BLOOD = ("whole-blood", "packed-red-cells")


@dataclass(frozen=True)
class Prediction:
    """One prediction of one row.

    Attributes
    ----------
    dataset, row : str
        Where the measurement is.
    variant : str
        ``"default"`` (what the library gives with default options) or the blood model name.
    default : bool
        True for the library's default prediction of the row.
    models : tuple of str
        Provenance keys of the models behind the prediction.
    measured, predicted : float
        In the row's unit; ``predicted`` is NaN when the row could not be predicted.
    status : str
        ``"ok"``, ``"no-model"`` (no library fluid or part for it) or ``"incomplete"``
        (the source does not give a condition the prediction needs).
    """

    dataset: str
    row: str
    variant: str
    default: bool
    models: tuple
    measured: float
    predicted: float
    status: str

    @property
    def error(self) -> float:
        """Relative error (predicted - measured) / measured [-]; NaN when not predicted."""
        return (self.predicted - self.measured) / self.measured

    @property
    def predicted_ok(self) -> bool:
        return self.status == "ok" and math.isfinite(self.predicted)


def _fluid(row: Row, model: str | None, temperature_c=None):
    from rheoline import fluid, fluid_names

    if row.fluid not in fluid_names():
        return None
    options = {}
    if row.fluid in _BLOOD:
        options["hematocrit"] = row.hematocrit
        if model is not None:
            options["model"] = model
    t = row.temperature_c if temperature_c is None else temperature_c
    return fluid(row.fluid, temperature_c=t, **options)


def _viscosity(row: Row, model: str | None) -> float:
    f = _fluid(row, model)
    shear = None if math.isnan(row.shear_rate) else row.shear_rate
    return float(np.asarray(f.viscosity(shear))) * 1e3


def _viscosity_ratio(row: Row, model: str | None) -> float:
    t = 20.0 if math.isnan(row.temperature_c) else row.temperature_c
    f = _fluid(row, model, temperature_c=t)
    from rheoline import fluid

    return float(f.viscosity() / fluid("saline-0.9", temperature_c=t).viscosity())


def _flow(row: Row, model: str | None) -> float:
    from rheoline import Line, Tube

    f = _fluid(row, model)
    line = Line([Tube(inner_diameter=row.inner_diameter_mm * 1e-3, length=row.length_mm * 1e-3)])
    result = line.solve(f, head=row.drive_value)
    return float(np.asarray(result.flow)) * 6e7


_PREDICTORS = {"viscosity": _viscosity, "viscosity_ratio": _viscosity_ratio, "flow": _flow}


def _needs(row: Row) -> str | None:
    """The missing condition, or None when the row can be predicted."""
    if row.fluid in _BLOOD and math.isnan(row.hematocrit):
        return "hematocrit"
    if row.quantity != "viscosity_ratio" and math.isnan(row.temperature_c):
        return "temperature"
    if row.quantity == "flow" and (
        math.isnan(row.inner_diameter_mm) or math.isnan(row.length_mm) or row.drive != "head_m"
    ):
        return "geometry or drive"
    return None


def _keys(row: Row, model: str | None) -> tuple:
    keys = ()
    if row.fluid in _BLOOD:
        keys = ("blood-scaling", "pries-1992", *_BLOOD_MODEL_KEYS[model])
        if row.fluid == "packed-red-cells":
            keys += ("additive-solution-medium",)
    else:
        keys = _FLUID_KEYS.get(row.fluid, ())
    if row.quantity == "flow":
        # a measured flow tests the line laws; the fluid's viscosity is checked by its own rows
        keys = _PART_KEYS.get(row.geometry, ())
    return keys


def _one(row: Row, variant: str, model: str | None, default: bool) -> Prediction:
    from rheoline import fluid_names

    status, value = "ok", math.nan
    if row.fluid not in fluid_names() or (
        row.quantity == "flow" and row.geometry not in _PART_KEYS
    ):
        status = "no-model"
    elif _needs(row) is not None:
        status = "incomplete"
    else:
        with warnings.catch_warnings():
            # range warnings are part of the answer elsewhere; here the row is compared as is
            warnings.simplefilter("ignore")
            value = _PREDICTORS[row.quantity](row, model)
    return Prediction(
        dataset=row.dataset,
        row=row.row,
        variant=variant,
        default=default,
        models=_keys(row, model) if status == "ok" else (),
        measured=row.measured,
        predicted=value,
        status=status,
    )


def predict_row(row: Row) -> tuple[Prediction, ...]:
    """Every prediction of one row: the default, and each blood model for blood rows.

    Examples
    --------
    >>> from rheoline.validation.datasets import load_datasets
    >>> row = load_datasets()[0].rows[5]          # Wells & Merrill, H 0.33, 24.8 1/s
    >>> [p.variant for p in predict_row(row)][:2]
    ['default', 'carreau-yasuda']
    >>> round(predict_row(row)[0].error, 2)
    -0.05
    """
    if row.fluid in _BLOOD:
        default = BLOOD_MODEL_VARIANTS[0]
        out = [_one(row, "default", default, True)]
        out += [_one(row, m, m, False) for m in BLOOD_MODEL_VARIANTS[1:]]
        return tuple(out)
    return (_one(row, "default", None, True),)
