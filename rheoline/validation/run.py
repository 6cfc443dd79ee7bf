"""Run the validation: predict every packaged row, compute statistics, check the targets.

The stated accuracy of the toolkit is :data:`TARGETS`; :func:`run_validation` reports
each target as met, not met, or without data, and :attr:`ValidationResult.passed` is
False when any target with data is not met (``rheoline validate`` then exits non-zero).
"""

from __future__ import annotations

import functools
import math
from collections.abc import Callable, Iterable
from dataclasses import dataclass

from rheoline.validation.datasets import DataSet, Row, load_datasets
from rheoline.validation.predict import (
    BLOOD_MODEL_VARIANTS,
    VARIANT_KEYS,
    Prediction,
    predict_row,
)
from rheoline.validation.stats import ErrorStats, error_stats, group_stats

__all__ = [
    "EVIDENCE",
    "Target",
    "TargetResult",
    "dataset_roles",
    "evidence_of",
    "TARGETS",
    "ValidationResult",
    "run_validation",
    "model_validation",
    "fluid_validation",
    "part_kind_validation",
]


@dataclass(frozen=True)
class Target:
    """A stated accuracy: the rows it covers and the largest errors allowed.

    ``selects(row)`` picks the rows (their default predictions); ``ratio`` targets are
    checked on temperature ratios (the value at a temperature over the value at 37 degC
    of the same sample), not on absolute values.
    """

    key: str
    description: str
    selects: Callable[[Row], bool]
    median_limit: float
    max_limit: float
    ratio: bool = False


def _between(value: float, low: float, high: float) -> bool:
    return not math.isnan(value) and low <= value <= high


def _whole_blood_37(r: Row) -> bool:
    return (
        r.quantity == "viscosity"
        and r.fluid == "whole-blood"
        and _between(r.hematocrit, 0.2, 0.6)
        and _between(r.shear_rate, 10.0, 200.0)
        and _between(r.temperature_c, 36.5, 37.5)
    )


def _blood_cold(r: Row) -> bool:
    return (
        r.quantity == "viscosity"
        and r.fluid in ("whole-blood", "plasma", "packed-red-cells")
        and _between(r.temperature_c, 4.0, 36.5)
    )


def _rcc(r: Row) -> bool:
    return r.fluid == "packed-red-cells" and _between(r.hematocrit, 0.55, 0.70)


#: The toolkit's stated accuracy, checked on every run.
TARGETS = (
    Target(
        "whole-blood-37c",
        "whole-blood viscosity, hematocrit 0.2-0.6, shear 10-200 1/s, 37 degC",
        _whole_blood_37,
        0.15,
        0.35,
    ),
    Target(
        "blood-temperature",
        "temperature dependence of blood and plasma viscosity, 4-37 degC (ratio to 37 degC)",
        _blood_cold,
        0.10,
        0.10,
        ratio=True,
    ),
    Target(
        "red-cell-concentrate",
        "stored red-cell concentrate viscosity, hematocrit 0.55-0.70",
        _rcc,
        0.30,
        0.30,
    ),
    Target(
        "plasma",
        "plasma viscosity",
        lambda r: r.quantity == "viscosity" and r.fluid == "plasma",
        0.15,
        0.15,
    ),
    Target(
        "tube-flow",
        "flow through a tube of nominal bore (a 5 % bore tolerance alone moves laminar flow by 20 %)",
        lambda r: r.quantity == "flow" and r.geometry == "tube",
        0.20,
        0.25,
    ),
)


#: What a target's rows are, by the roles of their data sets (``sources.toml``).
EVIDENCE = {
    "held out": "judged on held-out data only (fit and check rows set aside)",
    "fit data only": "only the data a default was fitted to: no independent test",
    "not independent": "only data that shares the library's own assumption: no independent test",
    "none": "no packaged data",
}


def evidence_of(roles) -> str:
    """The kind of evidence behind statistics whose data sets have these roles: "held out"
    if any is "test", "fit data only" if all are "fit", "not independent" otherwise (data
    sets marked "check"), "none" for no data set.

    >>> evidence_of(["fit", "test"]), evidence_of(["fit"]), evidence_of(["check"])
    ('held out', 'fit data only', 'not independent')
    """
    roles = list(roles)
    if not roles:
        return "none"
    if "test" in roles:
        return "held out"
    return "fit data only" if all(r == "fit" for r in roles) else "not independent"


@dataclass(frozen=True)
class TargetResult:
    """A target, the statistics of its rows, ``status`` (met, not met or no data) and
    ``evidence`` (held out, fit data only, not independent or none; see :data:`EVIDENCE`).

    A target met only on fit data or on data that is not independent says the model
    reproduces those rows, not that it predicts new ones: reports print the evidence beside
    every status.
    """

    target: Target
    stats: ErrorStats
    evidence: str = "none"

    @property
    def status(self) -> str:
        s = self.stats
        if not s.validated:
            return "no data"
        ok = (
            s.median_abs_error <= self.target.median_limit
            and s.max_abs_error <= self.target.max_limit
        )
        return "met" if ok else "not met"


@dataclass(frozen=True)
class ValidationResult:
    """Everything a validation run computed (results as data; the report renders them).

    Attributes
    ----------
    datasets : tuple of DataSet
    predictions : tuple of Prediction
        Every prediction of every row (blood rows once per blood model).
    ratios : tuple of Prediction
        Temperature ratios (value at t over value at 37 degC of the same sample).
    targets : tuple of TargetResult
    by_dataset, by_model, by_family, by_part_kind, by_blood_model : dict
        ``{name: ErrorStats}`` of the counted predictions: default predictions, except
        ``by_model`` (provenance key -> statistics; a non-default blood model counts under
        its own keys) and ``by_blood_model`` (each blood model on every blood row).
        ``by_model``, ``by_family`` and ``by_part_kind`` count a group's held-out rows
        only where it has any (fit and check rows never dilute a held-out figure);
        ``by_dataset`` counts every data set's own rows.
    worst : tuple of Prediction
        The ten counted default predictions furthest from their measurements.
    """

    datasets: tuple
    predictions: tuple
    ratios: tuple
    targets: tuple
    by_dataset: dict
    by_model: dict
    by_family: dict
    by_part_kind: dict
    by_blood_model: dict
    worst: tuple

    @property
    def passed(self) -> bool:
        """False when any target with data is not met."""
        return all(t.status != "not met" for t in self.targets)

    @property
    def untargeted(self) -> dict:
        """``{data set: ErrorStats}`` of held-out rows (role "test") no target covers.

        No stated accuracy judges them, so the summary prints their error beside the
        targets instead of letting a large one pass unseen.
        """
        rows = _row_index(self.datasets)
        roles = dataset_roles(self.datasets)
        chosen = [
            p
            for p in _counted(rows, [p for p in self.predictions if p.default])
            if roles[p.dataset] == "test"
            and not any(t.selects(rows[(p.dataset, p.row)]) for t in TARGETS)
        ]
        return group_stats(chosen, lambda p: (p.dataset,))

    def row(self, prediction: Prediction) -> Row:
        """The row a prediction belongs to."""
        return _row_index(self.datasets)[(prediction.dataset, prediction.row.split("/")[0])]


#: Fluid families of the library; those no packaged measurement covers are reported as such.
FLUID_FAMILIES = (
    "whole blood",
    "red-cell concentrate",
    "plasma",
    "water",
    "crystalloids",
    "albumin",
    "colloids",
)

#: Part kinds of the toolkit; those no packaged flow measurement covers are reported as such.
PART_KINDS = ("tube", "catheter", "needle", "cannula", "fitting", "administration set")

_EMPTY = ErrorStats(0, math.nan, math.nan, math.nan, ())


def _with_empty(stats: dict, names) -> dict:
    """``stats`` with every name in ``names`` present (unvalidated ones with n == 0)."""
    out = {name: stats.get(name, _EMPTY) for name in names}
    out.update(stats)
    return out


_BLOODS = ("whole-blood", "packed-red-cells")


def _model_keys(p: Prediction) -> tuple:
    """Keys a prediction counts under: all for a default, a blood model's own for the others."""
    return p.models if p.default else tuple(k for k in p.models if k in VARIANT_KEYS)


def dataset_roles(datasets) -> dict:
    """``{data set key: role}`` ("fit", "test" or "check", from ``sources.toml``)."""
    return {d.key: d.source.role for d in datasets}


def _row_index(datasets: tuple[DataSet, ...]) -> dict:
    return {(d.key, r.row): r for d in datasets for r in d.rows}


def _temperature_ratios(rows: dict, defaults: list[Prediction]) -> list[Prediction]:
    """Value at a temperature over the value at 37 degC for the same sample and shear."""
    by_sample: dict = {}
    for p in defaults:
        r = rows[(p.dataset, p.row)]
        if r.quantity != "viscosity":
            continue
        sample = (r.dataset, r.fluid, r.hematocrit, r.shear_rate)
        by_sample.setdefault(repr(sample), []).append((r, p))
    out = []
    for members in by_sample.values():
        refs = [(r, p) for r, p in members if _between(r.temperature_c, 36.5, 37.5)]
        if not refs:
            continue
        ref_row, ref = refs[0]
        for r, p in members:
            if r is ref_row:
                continue
            ok = p.predicted_ok and ref.predicted_ok
            out.append(
                Prediction(
                    dataset=p.dataset,
                    row=f"{r.row}/{ref_row.row}",
                    variant="default",
                    default=True,
                    models=p.models,
                    measured=r.measured / ref_row.measured,
                    predicted=p.predicted / ref.predicted if ok else math.nan,
                    status="ok" if ok else (p.status if p.status != "ok" else ref.status),
                )
            )
    return out


def _is_recalled(rows: dict, p: Prediction) -> bool:
    return any(rows[(p.dataset, part)].recalled for part in p.row.split("/"))


def _judged(roles: dict) -> Callable[[list], list]:
    """Of a group of predictions, those its statistics judge: the held-out ones (data sets
    of role "test") where there are any, else all (fit or check data, reported as such by
    :func:`evidence_of`).  Fit and check rows never dilute a held-out figure."""

    def pick(predictions: list) -> list:
        held_out = [p for p in predictions if roles[p.dataset] == "test"]
        return held_out or list(predictions)

    return pick


def _target_result(t: Target, rows: dict, defaults, ratios, roles) -> TargetResult:
    pool = ratios if t.ratio else defaults
    chosen = [p for p in pool if t.selects(rows[(p.dataset, p.row.split("/")[0])])]
    stats = error_stats(_judged(roles)(_counted(rows, chosen)))
    return TargetResult(t, stats, evidence_of(roles[d] for d in stats.datasets))


def _counted(rows: dict, predictions: Iterable[Prediction]) -> list[Prediction]:
    return [p for p in predictions if p.predicted_ok and not _is_recalled(rows, p)]


@functools.lru_cache(maxsize=1)
def _compute() -> ValidationResult:
    datasets = load_datasets()
    rows = _row_index(datasets)
    predictions = tuple(p for d in datasets for r in d.rows for p in predict_row(r))
    defaults = [p for p in predictions if p.default]
    ratios = tuple(_temperature_ratios(rows, defaults))
    counted = _counted(rows, defaults)
    family = {d.key: d.source.family for d in datasets}
    roles = dataset_roles(datasets)
    return ValidationResult(
        datasets=datasets,
        predictions=predictions,
        ratios=ratios,
        targets=tuple(_target_result(t, rows, defaults, ratios, roles) for t in TARGETS),
        by_dataset=group_stats(counted, lambda p: (p.dataset,)),
        by_model=group_stats(_counted(rows, predictions), _model_keys, _judged(roles)),
        by_blood_model=group_stats(
            [p for p in _counted(rows, predictions) if rows[(p.dataset, p.row)].fluid in _BLOODS],
            lambda p: (p.variant if not p.default else f"{BLOOD_MODEL_VARIANTS[0]} (default)",),
            _judged(roles),
        ),
        by_family=_with_empty(
            group_stats(
                [p for p in counted if rows[(p.dataset, p.row)].quantity != "flow"],
                lambda p: (family[p.dataset],),
                _judged(roles),
            ),
            dict.fromkeys((*FLUID_FAMILIES, *family.values())),
        ),
        by_part_kind=_with_empty(
            group_stats(
                [p for p in counted if rows[(p.dataset, p.row)].quantity == "flow"],
                lambda p: (rows[(p.dataset, p.row)].geometry,),
                _judged(roles),
            ),
            PART_KINDS,
        ),
        worst=tuple(sorted(counted, key=lambda p: -abs(p.error))[:10]),
    )


def run_validation(out_dir=None) -> ValidationResult:
    """Predict every packaged row, compute the statistics and check :data:`TARGETS`.

    Parameters
    ----------
    out_dir : str or path-like, optional
        Also write the report there (``validation-report.html``,
        ``validation-summary.md``, the plots and ``validation-rows.csv``); see
        :func:`rheoline.validation.report.write_report`.

    Returns
    -------
    ValidationResult

    Examples
    --------
    >>> result = run_validation()
    >>> [t.status for t in result.targets if t.target.key == "whole-blood-37c"]
    ['met']
    """
    result = _compute()
    if out_dir is not None:
        from rheoline.validation.report import write_report

        write_report(result, out_dir)
    return result


def fluid_validation(names: Iterable[str]) -> dict[str, ErrorStats]:
    """Validation error of library fluids' viscosity: ``{name: ErrorStats}`` for each name.

    The default predictions of the measured (not recalled) viscosity rows of that fluid,
    at any temperature and shear rate, held-out rows only where there are any; a fluid no
    packaged row measures gets ``n == 0``.

    Examples
    --------
    >>> stats = fluid_validation(["plasma", "saline-0.9"])
    >>> stats["plasma"].datasets, stats["saline-0.9"].validated
    (('rosenson-1996', 'koenig-2003'), False)
    """
    return _grouped(names, lambda r: r.fluid if r.quantity != "flow" else None)


def part_kind_validation(kinds: Iterable[str]) -> dict[str, ErrorStats]:
    """Validation error of measured flows through a part kind: ``{kind: ErrorStats}``.

    ``kind`` as the data name it (``"tube"``, ``"catheter"``, ``"needle"``, ``"cannula"``,
    ``"fitting"``, ``"administration set"``); a kind no packaged flow covers gets ``n == 0``.

    Examples
    --------
    >>> stats = part_kind_validation(["tube", "needle"])
    >>> stats["tube"].n > 0, stats["needle"].validated
    (True, False)
    """
    return _grouped(kinds, lambda r: r.geometry if r.quantity == "flow" else None)


def _grouped(names: Iterable[str], group_of) -> dict[str, ErrorStats]:
    """Statistics of the counted default predictions whose row's ``group_of`` is a name."""
    result = _compute()
    rows = _row_index(result.datasets)
    counted = _counted(rows, [p for p in result.predictions if p.default])
    roles = dataset_roles(result.datasets)
    stats = group_stats(counted, lambda p: (group_of(rows[(p.dataset, p.row)]),), _judged(roles))
    return {name: stats.get(name, _EMPTY) for name in names}


def model_validation(keys: Iterable[str]) -> dict[str, ErrorStats]:
    """Validation error of the models behind a run: ``{key: ErrorStats}`` for each key.

    Parameters
    ----------
    keys : iterable of str
        Provenance keys (for instance a result's ``models_used``).  Keys no packaged
        data set checks get ``ErrorStats`` with ``n == 0`` (unvalidated).

    Returns
    -------
    dict
        In the order of ``keys``; each value has ``n``, ``median_abs_error``,
        ``max_abs_error``, ``median_error`` and ``datasets`` (the data set keys).

    Examples
    --------
    >>> stats = model_validation(["carreau", "churchill-1977"])
    >>> stats["carreau"].datasets[0], stats["churchill-1977"].validated
    ('wells-merrill-1962', False)
    """
    by_model = _compute().by_model
    return {k: by_model.get(k, _EMPTY) for k in keys}
