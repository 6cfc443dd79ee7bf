"""Argument checks shared by the model layer.

Each check takes the argument's name so that the message can name the field,
returns the input as a float ndarray (0-d for scalars), and raises an
:class:`~rheoline.errors.InputRangeError` naming the range and a fix.  The
range warnings name the model and its validated range.
"""

from __future__ import annotations

import warnings

import numpy as np

from rheoline.errors import InputRangeError, RangeWarning

__all__ = [
    "as_float_array",
    "check_finite",
    "check_positive",
    "check_nonnegative",
    "check_range",
    "check_hematocrit",
    "warn_outside",
    "scalar_or_array",
]


def as_float_array(name: str, value) -> np.ndarray:
    """Return ``value`` as a float ndarray, or raise naming ``name``."""
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError) as exc:
        raise InputRangeError(
            f"{name} must be a number or an array of numbers, got {value!r}"
        ) from exc
    return arr


def _first_bad(arr: np.ndarray, bad: np.ndarray):
    return arr[bad].flat[0] if arr.ndim else arr.item()


def check_finite(name: str, value) -> np.ndarray:
    """Reject NaN and infinity."""
    arr = as_float_array(name, value)
    bad = ~np.isfinite(arr)
    if np.any(bad):
        raise InputRangeError(f"{name} must be finite, got {_first_bad(arr, bad)!r}")
    return arr


def check_positive(name: str, value, unit: str = "") -> np.ndarray:
    """Require finite values > 0."""
    arr = check_finite(name, value)
    bad = arr <= 0
    if np.any(bad):
        u = f" {unit}" if unit else ""
        raise InputRangeError(f"{name} must be greater than 0{u}, got {_first_bad(arr, bad)!r}{u}")
    return arr


def check_nonnegative(name: str, value, unit: str = "") -> np.ndarray:
    """Require finite values >= 0."""
    arr = check_finite(name, value)
    bad = arr < 0
    if np.any(bad):
        u = f" {unit}" if unit else ""
        raise InputRangeError(f"{name} must be 0{u} or more, got {_first_bad(arr, bad)!r}{u}")
    return arr


def check_range(name: str, value, low: float, high: float, unit: str = "", hint: str = ""):
    """Require finite values in the closed interval [low, high]."""
    arr = check_finite(name, value)
    bad = (arr < low) | (arr > high)
    if np.any(bad):
        u = f" {unit}" if unit else ""
        extra = f"; {hint}" if hint else ""
        raise InputRangeError(
            f"{name} must lie between {low:g} and {high:g}{u}, got "
            f"{_first_bad(arr, bad)!r}{u}{extra}"
        )
    return arr


def check_hematocrit(value, name: str = "hematocrit", high: float = 0.95) -> np.ndarray:
    """Hematocrit as a fraction 0..``high``; a percent (e.g. 45) gets a suggestion."""
    arr = check_finite(name, value)
    if np.any(arr > 1.0):
        v = float(np.max(arr))
        raise InputRangeError(
            f"{name} must be a fraction from 0 to 1, got {v:g}; "
            f"if that is a percent, pass {v / 100:g}"
        )
    return check_range(name, arr, 0.0, high, hint="hematocrit is a volume fraction")


def warn_outside(
    name: str, value, low: float, high: float, model: str, unit: str = "", stacklevel: int = 3
) -> bool:
    """Warn (:class:`RangeWarning`) if any value lies outside [low, high].

    Returns True when a warning was issued, so that callers can also set a flag.
    """
    arr = np.asarray(value, dtype=float)
    bad = (arr < low) | (arr > high)
    if np.any(bad):
        u = f" {unit}" if unit else ""
        lo_v, hi_v = float(np.min(arr)), float(np.max(arr))
        warnings.warn(
            f"{name} {lo_v:g}..{hi_v:g}{u} is outside the validated range "
            f"{low:g}..{high:g}{u} of {model}; the result is an extrapolation",
            RangeWarning,
            stacklevel=stacklevel,
        )
        return True
    return False


def scalar_or_array(arr):
    """Return a Python float for 0-d results, the array otherwise."""
    arr = np.asarray(arr)
    return float(arr) if arr.ndim == 0 else arr
