"""Checked against measured reality: packaged measurements, predictions, statistics, report.

* :func:`run_validation` predicts every packaged measurement with the public API,
  computes error statistics per data set, per model, per fluid family and per part
  kind, checks the stated accuracy (:data:`TARGETS`) and can write the report;
* :func:`model_validation` gives the validation error of given model keys (for a
  review pack's "model evidence": pass a run's ``models_used``); :func:`fluid_validation`
  and :func:`part_kind_validation` that of library fluids and of part kinds;
* :func:`load_datasets` reads the data (one CSV per published source, described in
  ``data/sources.toml``).

Every report carries :data:`rheoline.CAUTION`.
"""

from rheoline.validation.datasets import DataSet, Row, Source, load_datasets
from rheoline.validation.predict import Prediction, predict_row
from rheoline.validation.run import (
    TARGETS,
    Target,
    TargetResult,
    ValidationResult,
    fluid_validation,
    model_validation,
    part_kind_validation,
    run_validation,
)
from rheoline.validation.stats import ErrorStats

__all__ = [
    "DataSet",
    "Row",
    "Source",
    "load_datasets",
    "Prediction",
    "predict_row",
    "TARGETS",
    "Target",
    "TargetResult",
    "ValidationResult",
    "model_validation",
    "fluid_validation",
    "part_kind_validation",
    "run_validation",
    "ErrorStats",
]
