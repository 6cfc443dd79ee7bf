"""Error statistics of predictions: per data set, per model key, per family, per part kind.

All statistics use the absolute relative error |predicted - measured| / measured of
rows that were predicted and are not recalled.  A group with no such rows has
``n == 0`` and NaN statistics, and is reported as unvalidated.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable
from dataclasses import dataclass

import numpy as np

from rheoline.validation.predict import Prediction

__all__ = ["ErrorStats", "error_stats", "group_stats"]


@dataclass(frozen=True)
class ErrorStats:
    """Error statistics of a group of predictions.

    Attributes
    ----------
    n : int
        Rows counted (predicted, not recalled).
    median_abs_error, max_abs_error : float
        Of the relative error [-]; NaN when ``n == 0``.
    median_error : float
        Signed median [-]: above 0 the model predicts high.
    datasets : tuple of str
        Data sets the counted rows come from.
    """

    n: int
    median_abs_error: float
    max_abs_error: float
    median_error: float
    datasets: tuple

    @property
    def validated(self) -> bool:
        return self.n > 0


def counted(predictions: Iterable[Prediction], recalled: Callable[[Prediction], bool]):
    """The predictions that enter statistics: predicted and not recalled."""
    return [p for p in predictions if p.predicted_ok and not recalled(p)]


def error_stats(predictions: Iterable[Prediction]) -> ErrorStats:
    """Statistics of predictions already filtered by :func:`counted`.

    Examples
    --------
    >>> from rheoline.validation.predict import Prediction
    >>> p = [Prediction("d", str(i), "default", True, (), 1.0, v, "ok") for i, v in
    ...      enumerate([1.1, 0.8, 1.05])]
    >>> s = error_stats(p)
    >>> s.n, round(s.median_abs_error, 2), round(s.max_abs_error, 2)
    (3, 0.1, 0.2)
    """
    preds = list(predictions)
    if not preds:
        return ErrorStats(0, math.nan, math.nan, math.nan, ())
    err = np.array([p.error for p in preds])
    sets = tuple(dict.fromkeys(p.dataset for p in preds))
    return ErrorStats(
        n=len(preds),
        median_abs_error=float(np.median(np.abs(err))),
        max_abs_error=float(np.max(np.abs(err))),
        median_error=float(np.median(err)),
        datasets=sets,
    )


def group_stats(
    predictions: Iterable[Prediction],
    key: Callable[[Prediction], Iterable[str]],
    judged: Callable[[list], list] | None = None,
):
    """``{group: ErrorStats}`` where ``key(prediction)`` gives the groups a prediction is in;
    ``judged`` (optional) picks, within each group, the predictions its statistics count."""
    groups: dict[str, list] = {}
    for p in predictions:
        for g in key(p):
            groups.setdefault(g, []).append(p)
    pick = judged or list
    return {g: error_stats(pick(ps)) for g, ps in groups.items()}
