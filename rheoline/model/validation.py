"""Argument checks and range warnings shared by the model layer.

Each check takes the argument's name so that the message can name the field,
returns the input as a float ndarray (0-d for scalars), and raises an
:class:`~rheoline.errors.InputRangeError` naming the range and a fix, with the
argument's name as ``err.field`` and the first offending value as ``err.value``.

The range warnings read the validated range of a model from its entry in the
provenance registry (:mod:`rheoline.model.provenance`), so that a range lives in
one place: ``warn_outside("iapws-2008", "temperature_c", t)``.  The warning
(:class:`~rheoline.errors.RangeWarning`) names the model by its key, the quantity
and the range, and carries ``outside``, the boolean mask of the values outside it.
:func:`outside_mask` gives the same mask without a warning.

Examples
--------
>>> check_positive("length", -1.0)
Traceback (most recent call last):
...
rheoline.errors.InputRangeError: length must be greater than 0, got -1.0
>>> outside_mask("iapws-2008", "temperature_c", [20.0, 120.0]).tolist()
[False, True]
"""

from __future__ import annotations

import warnings

import numpy as np

from rheoline.errors import InputRangeError, RangeWarning
from rheoline.model.provenance import model_entry

__all__ = [
    "as_float_array",
    "check_finite",
    "check_positive",
    "check_nonnegative",
    "check_range",
    "check_hematocrit",
    "warn_outside",
    "outside_mask",
    "scalar_or_array",
    "frozen_copy",
    "freeze_arrays",
]


def as_float_array(name: str, value) -> np.ndarray:
    """Return ``value`` as a float ndarray, or raise naming ``name``.

    None, yes/no values (``True`` would count as 1) and lists holding None are refused
    with a message that says so, not read as 1 or NaN.

    Examples
    --------
    >>> as_float_array("head", True)
    Traceback (most recent call last):
    ...
    rheoline.errors.InputRangeError: head must be a number, got True (a yes/no value, which \
would count as 1); pass the number itself, e.g. head=1.0
    """
    if value is None:
        raise InputRangeError(
            f"{name} is None; pass a number (or leave the argument out for its default)",
            field=name,
            value=value,
        )
    kind = np.asarray(value).dtype.kind if not isinstance(value, np.ndarray) else value.dtype.kind
    if kind == "b":
        raise InputRangeError(
            f"{name} must be a number, got {value!r} (a yes/no value, which would count as 1); "
            f"pass the number itself, e.g. {name}=1.0",
            field=name,
            value=value,
        )
    if kind == "O" and any(v is None for v in np.asarray(value, dtype=object).ravel()):
        raise InputRangeError(
            f"{name} holds None; pass a number for every element", field=name, value=value
        )
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError) as exc:
        raise InputRangeError(
            f"{name} must be a number or an array of numbers, got {value!r}",
            field=name,
            value=value,
        ) from exc
    return arr


def _first_bad(arr: np.ndarray, bad: np.ndarray):
    return arr[bad].flat[0] if arr.ndim else arr.item()


def check_finite(name: str, value) -> np.ndarray:
    """Reject NaN and infinity."""
    arr = as_float_array(name, value)
    bad = ~np.isfinite(arr)
    if np.any(bad):
        v = _first_bad(arr, bad)
        raise InputRangeError(f"{name} must be finite, got {v!r}", field=name, value=v)
    return arr


def check_positive(name: str, value, unit: str = "") -> np.ndarray:
    """Require finite values > 0."""
    arr = check_finite(name, value)
    bad = arr <= 0
    if np.any(bad):
        u = f" {unit}" if unit else ""
        v = _first_bad(arr, bad)
        raise InputRangeError(
            f"{name} must be greater than 0{u}, got {v!r}{u}", field=name, value=v
        )
    return arr


def check_nonnegative(name: str, value, unit: str = "") -> np.ndarray:
    """Require finite values >= 0."""
    arr = check_finite(name, value)
    bad = arr < 0
    if np.any(bad):
        u = f" {unit}" if unit else ""
        v = _first_bad(arr, bad)
        raise InputRangeError(f"{name} must be 0{u} or more, got {v!r}{u}", field=name, value=v)
    return arr


def check_range(name: str, value, low: float, high: float, unit: str = "", hint: str = ""):
    """Require finite values in the closed interval [low, high]."""
    arr = check_finite(name, value)
    bad = (arr < low) | (arr > high)
    if np.any(bad):
        u = f" {unit}" if unit else ""
        extra = f"; {hint}" if hint else ""
        v = _first_bad(arr, bad)
        raise InputRangeError(
            f"{name} must lie between {low:g} and {high:g}{u}, got {v!r}{u}{extra}",
            field=name,
            value=v,
        )
    return arr


def check_hematocrit(value, name: str = "hematocrit", high: float = 0.95) -> np.ndarray:
    """Hematocrit as a fraction 0..``high``; a percent (e.g. 45) gets a suggestion."""
    arr = check_finite(name, value)
    if np.any(arr > 1.0):
        v = float(np.max(arr))
        raise InputRangeError(
            f"{name} must be a fraction from 0 to 1, got {v:g}; "
            f"if that is a percent, pass {v / 100:g}",
            field=name,
            value=v,
        )
    return check_range(name, arr, 0.0, high, hint="hematocrit is a volume fraction")


def _limits(key, quantity, low, high):
    """(low, high) of ``quantity`` from the registry entry ``key``, unless both are given."""
    if low is not None and high is not None:
        return float(low), float(high)
    ranges = model_entry(key).ranges
    if quantity not in ranges:
        raise InputRangeError(
            f"model {key!r} has no range for {quantity!r} in the registry (it has: "
            f"{', '.join(ranges) or 'none'}); pass low= and high=",
            field="quantity",
            value=quantity,
        )
    reg_low, reg_high = ranges[quantity]
    low = reg_low if low is None else low
    high = reg_high if high is None else high
    return (
        -np.inf if low is None else float(low),
        np.inf if high is None else float(high),
    )


def outside_mask(key, quantity, values, *, low=None, high=None) -> np.ndarray:
    """Boolean mask of ``values`` outside the registry range of ``quantity`` for model ``key``.

    Parameters
    ----------
    key : str
        Provenance key (:data:`rheoline.model.provenance.REGISTRY`).
    quantity : str
        A key of the entry's ``ranges`` (``"temperature_c"``, ``"hematocrit"``, ...).
    values : float or array_like
        In the quantity's own unit (SI, or as its name states).
    low, high : float, optional
        Override the registry's limits (for ranges that are data of one object, such as
        the temperatures a user's fit was made from).

    Returns
    -------
    ndarray of bool
        The shape of ``values``; NaN counts as inside (it is rejected elsewhere).

    Examples
    --------
    >>> outside_mask("pries-1992", "diameter", [1e-6, 1e-3]).tolist()
    [True, False]
    """
    lo, hi = _limits(key, quantity, low, high)
    arr = np.asarray(values, dtype=float)
    return (arr < lo) | (arr > hi)


def warn_outside(key, quantity, values=None, *legacy, **options) -> bool:
    """Warn (:class:`RangeWarning`) if any value lies outside a model's validated range.

    ``warn_outside(key, quantity, values, *, label=None, unit="", scale=1.0, low=None,
    high=None, stacklevel=3)``: the range is the registry entry's ``ranges[quantity]``
    (:mod:`rheoline.model.provenance`), unless ``low`` and ``high`` are given for a
    range that is data of one object (a user's fit).  The message reads
    ``"<quantity> <min>..<max> <unit> is outside the validated range <low>..<high> <unit>
    of <label>; the result is an extrapolation"``, with the values multiplied by
    ``scale`` for display in ``unit`` (e.g. metres shown in um with ``scale=1e6``) and
    ``label`` defaulting to the entry's title.

    The older form ``warn_outside(name, value, low, high, model_words, unit="",
    stacklevel=3)`` still works for a check with no registry entry (``.model`` is None).

    Returns
    -------
    bool
        True when a warning was issued, so that callers can also set a flag.

    Examples
    --------
    >>> import warnings
    >>> with warnings.catch_warnings(record=True) as caught:
    ...     warnings.simplefilter("always")
    ...     warn_outside("iapws-2008", "temperature_c", [20.0, 120.0], unit="degC")
    True
    >>> w = caught[0].message
    >>> w.model, w.quantity, (w.low, w.high), w.outside.tolist()
    ('iapws-2008', 'temperature_c', (0.0, 100.0), [False, True])
    >>> str(w)
    'temperature_c 20..120 degC is outside the validated range 0..100 degC of IAPWS 2008 viscosity of water; the result is an extrapolation'
    """
    if not isinstance(quantity, str):  # the older form: (name, value, low, high, model, unit)
        names = ("low", "high", "label", "unit", "stacklevel")
        opts = dict(zip(names, (values, *legacy), strict=False))
        opts.update(options)
        opts["stacklevel"] = opts.get("stacklevel", 3) + 1
        return _warn(None, key, quantity, **opts)
    options["stacklevel"] = options.get("stacklevel", 3) + 1
    return _warn(key, quantity, values, **options)


def _warn(
    key, quantity, values, *, label=None, unit="", scale=1.0, low=None, high=None, stacklevel=4
):
    if key is not None:
        low, high = _limits(key, quantity, low, high)
        label = model_entry(key).title if label is None else label
    arr = np.asarray(values, dtype=float)
    bad = (arr < low) | (arr > high)
    if not np.any(bad):
        return False
    u = f" {unit}" if unit else ""
    lo_v, hi_v = float(np.min(arr)) * scale, float(np.max(arr)) * scale
    warning = RangeWarning(
        f"{quantity} {lo_v:g}..{hi_v:g}{u} is outside the validated range "
        f"{low * scale:g}..{high * scale:g}{u} of {label}; the result is an extrapolation",
        model=key,
        quantity=quantity,
        low=low,
        high=high,
    )
    warning.outside = bad
    warnings.warn(warning, stacklevel=stacklevel)
    return True


def scalar_or_array(arr):
    """Return a Python float for 0-d results, the array otherwise."""
    arr = np.asarray(arr)
    return float(arr) if arr.ndim == 0 else arr


def frozen_copy(value):
    """A Python float for a 0-d value, else a read-only copy of the array.

    Parts and fluids keep their inputs this way: a caller who changes an array after
    building a part cannot change later solves or slip past the part's checks.

    Examples
    --------
    >>> a = np.array([1.0, 2.0])
    >>> kept = frozen_copy(a)
    >>> a[0] = -5.0
    >>> kept.tolist(), kept.flags.writeable
    ([1.0, 2.0], False)
    """
    arr = np.asarray(value)
    if arr.ndim == 0:
        return float(arr) if arr.dtype.kind in "biuf" else value
    out = np.array(arr)  # a copy
    out.setflags(write=False)
    return out


def freeze_arrays(obj, names=None) -> None:
    """Replace each ndarray attribute of the frozen dataclass ``obj`` (or those in
    ``names``) with a read-only copy (:func:`frozen_copy`)."""
    from dataclasses import fields

    for name in names or [f.name for f in fields(obj)]:
        value = getattr(obj, name, None)
        if isinstance(value, np.ndarray):
            object.__setattr__(obj, name, frozen_copy(value))
