"""The run's ``model_band`` step: each case's answer across the defensible model choices.

Next to the tolerance band (how far the answer moves with the inputs), each row carries a
model band (how far it moves with the models): ``flow model low [mL/min]`` and ``flow
model high [mL/min]`` for a drive, ``pressure model low [mmHg]`` and ``pressure model high
[mmHg]`` for a pump, and ``model band driver``, the choice that moves the answer most (in
words, :data:`DRIVER_WORDS`).  The band is computed by
:func:`rheoline.model.model_band.model_band`, one vectorized call per alternative and
sweep group; its choices are the inlet and step loss coefficients, the friction of lumens
in the transition zone and, for blood, the rheology models that meet the stated accuracy
on the packaged measurements (:func:`qualified_blood_models`, read from
:mod:`rheoline.validation`, never a hand-kept list).

A scenario file switches it off with ``model_band = false``.

Examples
--------
>>> from rheoline.scenario.reading import example_path, load_scenarios
>>> from rheoline.scenario.run import run_scenarios
>>> t = run_scenarios(load_scenarios(example_path("minimal"))).table
>>> [round(float(t[c].iloc[0]), 1) for c in ("flow model low [mL/min]", "flow [mL/min]",
...  "flow model high [mL/min]")]
[86.8, 98.3, 98.3]
>>> t["model band driver"].iloc[0]
'step loss coefficients'
"""

from __future__ import annotations

import functools
import math

import numpy as np

from rheoline.units import ML_PER_MIN, MMHG

__all__ = [
    "BAND_COLUMNS",
    "DRIVER_WORDS",
    "alternative_fluids",
    "band_columns",
    "qualified_blood_models",
]

#: The table's model-band columns, in order.
BAND_COLUMNS = (
    "flow model low [mL/min]",
    "flow model high [mL/min]",
    "pressure model low [mmHg]",
    "pressure model high [mmHg]",
    "model band driver",
)

#: How each choice of :data:`rheoline.model.model_band.BAND_CHOICES` is named in a table.
DRIVER_WORDS = {
    "step-losses": "step loss coefficients",
    "transitional-friction": "transitional friction",
    "blood-rheology": "blood rheology model",
}

#: The stated accuracy a blood rheology model must meet to enter the band.
BLOOD_TARGET = "whole-blood-37c"


@functools.lru_cache(maxsize=1)
def qualified_blood_models() -> tuple:
    """The blood rheology models that meet :data:`BLOOD_TARGET` on the packaged data.

    Each model's predictions of the rows the target selects (measured, not recalled) must
    have a median and a largest absolute error within the target's limits.  The rows are
    read by :func:`rheoline.validation.load_datasets` and predicted by
    :func:`rheoline.validation.predict_row`, as :func:`rheoline.validation.run_validation`
    predicts them, only those the target selects (computed once per process).

    Examples
    --------
    >>> qualified_blood_models()
    ('carreau', 'carreau-yasuda')
    """
    from rheoline.validation import TARGETS, load_datasets, predict_row
    from rheoline.validation.predict import BLOOD_MODEL_VARIANTS
    from rheoline.validation.stats import error_stats

    target = next(t for t in TARGETS if t.key == BLOOD_TARGET)
    rows = [r for d in load_datasets() for r in d.rows if not r.recalled and target.selects(r)]
    predictions = [p for r in rows for p in predict_row(r)]
    out = []
    for variant in BLOOD_MODEL_VARIANTS:
        chosen = [
            p
            for p in predictions
            if (p.variant == variant or (p.default and variant == BLOOD_MODEL_VARIANTS[0]))
            and p.predicted_ok
        ]
        stats = error_stats(chosen)
        if (
            stats.validated
            and stats.median_abs_error <= target.median_limit
            and stats.max_abs_error <= target.max_limit
        ):
            out.append(variant)
    return tuple(out)


def alternative_fluids(fluid):
    """``{model: fluid}``: the same blood under each other qualified rheology model
    (:func:`qualified_blood_models`), ``{}`` for a fluid without red cells; what the band
    passes as ``alternative_fluids`` (a view can pass the same)."""
    if not fluid.is_blood or fluid.recipe is None:
        return {}
    own = fluid.recipe.options.get("model", "carreau")
    return {m: fluid.at(model=m) for m in qualified_blood_models() if m != own}


def _empty(n):
    nan = [math.nan] * n
    return dict.fromkeys(BAND_COLUMNS[:4], nan) | {"model band driver": [""] * n}, ()


def band_columns(group, fluid, line, result):
    """The model-band columns of a group's points, and the models the band used.

    Parameters
    ----------
    group : rheoline.scenario.build.Group
    fluid, line
        The group's fluid and line.
    result : LineResult
        The group's default solve.

    Returns
    -------
    columns : dict
        :data:`BAND_COLUMNS` -> list over the group's points (NaN and "" where the band
        does not apply: the file switched it off, or the other quantity).
    models_used : tuple of str
        Provenance keys of the band's alternative models.
    """
    from rheoline.model.model_band import model_band

    n = group.size
    if not getattr(group.scenario, "model_band", True):
        return _empty(n)
    v = group.values
    drive = {"back_pressure": v.get("back_pressure", 0.0)}
    pump = group.scenario.mode == "flow"
    if pump:
        drive["flow"] = v["flow"]
    else:
        drive.update(head=v.get("head", 0.0), source_pressure=v.get("source_pressure", 0.0))
    band = model_band(
        line, fluid, **drive, alternative_fluids=alternative_fluids(fluid), nominal=result
    )
    scale = MMHG if pump else ML_PER_MIN
    low = np.broadcast_to(np.asarray(band.low, dtype=float) / scale, (n,)).tolist()
    high = np.broadcast_to(np.asarray(band.high, dtype=float) / scale, (n,)).tolist()
    drivers = np.broadcast_to(np.asarray(band.driver, dtype=object), (n,))
    columns, _ = _empty(n)
    first = 2 if pump else 0
    columns[BAND_COLUMNS[first]], columns[BAND_COLUMNS[first + 1]] = low, high
    columns["model band driver"] = [DRIVER_WORDS.get(str(d), "") for d in drivers]
    return columns, band.models_used
