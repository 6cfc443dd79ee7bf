r"""Pump rate against time: steps and ramps, their displaced volume and its inverse.

A :class:`RateProfile` is a rate that runs in straight pieces between breakpoints
``(times[k], rates[k])``; a step is two breakpoints at one time.  The rate is 0 before
the first breakpoint and holds the last rate after the last one.  Between breakpoints
it is linear, so the displaced volume is piecewise quadratic and has a closed-form
inverse (the time at which a volume has been displaced):

.. math::

    V(t) = V_k + r_k (t - t_k) + \tfrac12 s_k (t - t_k)^2, \qquad
    t(V) = t_k + \frac{2 (V - V_k)}{r_k + \sqrt{r_k^2 + 2 s_k (V - V_k)}}

with :math:`s_k` the slope of piece :math:`k`.  Times and rates may be arrays with a
trailing scenario shape (``times`` of shape ``(n,)`` or ``(n, *shape)``, ``rates`` of
shape ``(n, *shape)``); every method broadcasts.  SI units: s, m^3/s, m^3.

Examples
--------
>>> ml_h = 1e-6 / 3600.0
>>> p = RateProfile.steps([0.0, 3600.0], [1.0 * ml_h, 2.0 * ml_h])
>>> round(p.rate(1800.0) / ml_h, 6), round(p.rate(5400.0) / ml_h, 6)
(1.0, 2.0)
>>> round(p.volume(7200.0) * 1e6, 6)                       # mL after two hours
3.0
>>> round(p.time_at_volume(2.0e-6) / 3600.0, 6)            # hours to displace 2 mL
1.5
>>> ramp = RateProfile.from_points([0.0, 600.0], [0.0, 6.0 * ml_h])
>>> round(ramp.volume(600.0) * 1e6, 6)                     # the triangle, 0.5 mL
0.5
"""

from __future__ import annotations

import bisect
from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.validation import check_finite, check_nonnegative

__all__ = ["RateProfile", "RateChange", "FlatProfile"]


@dataclass(frozen=True)
class RateChange:
    """One change of a profile's rate: a step (``start == end``) or a ramp.

    Attributes
    ----------
    start, end : ndarray
        Times [s] the change begins and ends (scenario shape).
    rate_before, rate_after : ndarray
        Rate [m^3/s] before and after it.
    """

    start: np.ndarray
    end: np.ndarray
    rate_before: np.ndarray
    rate_after: np.ndarray


@dataclass(frozen=True)
class RateProfile:
    """A pump's set rate against time, in straight pieces between breakpoints.

    Parameters
    ----------
    times : array_like
        Breakpoint times [s], >= 0 and non-decreasing along the first axis; shape ``(n,)``
        or ``(n, *shape)``.
    rates : array_like
        Rates [m^3/s] at the breakpoints, >= 0; shape ``(n,)`` or ``(n, *shape)``.

    Notes
    -----
    Build one with :meth:`constant`, :meth:`steps` or :meth:`from_points` rather than by
    hand.  The rate is right-continuous: at a step's time it already has the new value.

    Examples
    --------
    >>> p = RateProfile.constant(1e-9, start=60.0)
    >>> p.rate(59.0), p.rate(60.0)
    (0.0, 1e-09)
    """

    times: np.ndarray
    rates: np.ndarray

    def __post_init__(self):
        t = check_finite("times", self.times)
        r = check_nonnegative("rates", self.rates, "m^3/s")
        if t.ndim == 0 or r.ndim == 0 or t.shape[0] != r.shape[0] or t.shape[0] < 1:
            raise InputRangeError(
                f"times and rates must be lists of equal, non-zero length (one breakpoint "
                f"each); got shapes {t.shape} and {r.shape}",
                field="times",
                value=self.times,
            )
        if np.any(t < 0):
            raise InputRangeError(
                f"times must be 0 s or later (the simulation starts at 0), got {float(t.min())!r}",
                field="times",
                value=self.times,
            )
        if t.shape[0] > 1 and np.any(np.diff(t, axis=0) < 0):
            raise InputRangeError(
                "times must not decrease (repeat a time for a step); sort the breakpoints",
                field="times",
                value=self.times,
            )
        try:
            shape = np.broadcast_shapes(t.shape[1:], r.shape[1:])
        except ValueError:
            raise InputRangeError(
                f"times {t.shape} and rates {r.shape} do not broadcast; give the scenario axes "
                "after the breakpoint axis",
                field="rates",
                value=self.rates,
            ) from None
        t, r = _along(t, shape), _along(r, shape)
        object.__setattr__(self, "times", t)
        object.__setattr__(self, "rates", r)

    # ------------------------------------------------------------------ builders
    @classmethod
    def constant(cls, rate, start=0.0):
        """A step from 0 to ``rate`` [m^3/s] at ``start`` [s], held after."""
        rate = np.asarray(rate, dtype=float)
        start = np.asarray(start, dtype=float)
        return cls(
            times=np.stack(np.broadcast_arrays(start, start)),
            rates=np.stack(np.broadcast_arrays(np.zeros_like(rate), rate)),
        )

    @classmethod
    def steps(cls, times, rates):
        """Rate ``rates[i]`` from ``times[i]`` until ``times[i + 1]`` (0 before the first).

        Examples
        --------
        >>> p = RateProfile.steps([0.0, 100.0], [2e-9, 1e-9])
        >>> p.rate(50.0), p.rate(150.0)
        (2e-09, 1e-09)
        """
        t = np.asarray(times, dtype=float)
        r = np.asarray(rates, dtype=float)
        if t.ndim == 0 or r.ndim == 0 or t.shape[0] != r.shape[0]:
            raise InputRangeError(
                f"steps needs one rate per time; got {np.shape(times)} times and "
                f"{np.shape(rates)} rates",
                field="rates",
                value=rates,
            )
        t, r = np.broadcast_arrays(
            t.reshape(t.shape + (1,) * (r.ndim - t.ndim)),
            r.reshape(r.shape + (1,) * (t.ndim - r.ndim)),
        )
        previous = np.concatenate([np.zeros_like(r[:1]), r[:-1]])
        both_t = np.stack([t, t], axis=1).reshape((-1, *t.shape[1:]))
        both_r = np.stack([previous, r], axis=1).reshape((-1, *r.shape[1:]))
        return cls(times=both_t, rates=both_r)

    @classmethod
    def from_points(cls, times, rates):
        """Straight pieces through the given points (a ramp is two points, a step a repeated time)."""
        return cls(times=times, rates=rates)

    # ------------------------------------------------------------------ evaluation
    @property
    def shape(self):
        """Scenario shape of the profile (() for one profile)."""
        return np.broadcast_shapes(self.times.shape[1:], self.rates.shape[1:])

    def _pieces(self):
        """Per piece k: start time, end time, start rate, slope (inf-length last piece)."""
        n = self.times.shape[0]
        for k in range(n):
            t0, r0 = self.times[k], self.rates[k]
            if k + 1 < n:
                t1, r1 = self.times[k + 1], self.rates[k + 1]
                width = t1 - t0
                slope = np.where(width > 0, (r1 - r0) / np.where(width > 0, width, 1.0), 0.0)
            else:
                t1, slope = np.full(np.shape(t0), np.inf), np.zeros(np.shape(r0))
            yield t0, t1, r0, slope

    def rate(self, t):
        """Set rate [m^3/s] at time ``t`` [s] (broadcasts with the scenario shape)."""
        t = np.asarray(t, dtype=float)
        out = np.zeros(np.broadcast_shapes(t.shape, self.shape))
        for t0, t1, r0, slope in self._pieces():
            inside = (t >= t0) & (t < t1)
            out = np.where(inside, r0 + slope * (t - t0), out)
        return _out(out)

    def volume(self, t):
        """Volume [m^3] displaced from time 0 to ``t`` [s]."""
        t = np.asarray(t, dtype=float)
        total = np.zeros(np.broadcast_shapes(t.shape, self.shape))
        for t0, t1, r0, slope in self._pieces():
            span = np.clip(np.minimum(t, t1) - t0, 0.0, None)
            span = np.where(np.isfinite(span), span, 0.0)
            total = total + r0 * span + 0.5 * slope * span * span
        return _out(total)

    def time_at_volume(self, volume):
        """First time [s] at which ``volume`` [m^3] has been displaced (inf if never)."""
        v = check_nonnegative("volume", volume, "m^3")
        out = np.full(np.broadcast_shapes(v.shape, self.shape), np.inf)
        done = np.zeros(out.shape, bool)
        before = np.zeros(out.shape)
        for t0, t1, r0, slope in self._pieces():
            finite = np.isfinite(t1)
            width = np.where(finite, t1 - t0, 0.0)
            piece = np.where(finite, r0 * width + 0.5 * slope * width * width, np.inf)
            need = v - before
            here = ~done & (need <= piece) & ((need > 0) | (r0 > 0) | (slope > 0))
            root = np.sqrt(np.maximum(r0 * r0 + 2.0 * slope * need, 0.0))
            denom = r0 + root
            tau = np.where(denom > 0, 2.0 * need / np.where(denom > 0, denom, 1.0), np.inf)
            out = np.where(here, t0 + tau, out)
            done = done | here
            before = before + np.where(np.isfinite(piece), piece, 0.0)
        out = np.where(v <= 0, 0.0, out)
        return _out(out)

    def start_time(self):
        """First time [s] the rate is above 0 (inf for a profile that never runs)."""
        out = np.full(self.shape, np.inf)
        for t0, t1, r0, slope in self._pieces():
            starts = (r0 > 0) | ((slope > 0) & (t1 > t0))
            out = np.where(np.isinf(out) & starts, t0, out)
        return _out(out)

    def final_rate(self):
        """The rate [m^3/s] held after the last breakpoint."""
        return _out(np.broadcast_to(self.rates[-1], self.shape))

    def changes(self):
        """Each change of rate, in order: a tuple of :class:`RateChange`.

        A piece whose two ends differ is one change (a ramp); a repeated time a step.
        A piece that changes in some scenarios only reports ``rate_before ==
        rate_after`` in the others.

        Examples
        --------
        >>> [(float(c.start), float(c.rate_after)) for c in RateProfile.steps([0, 60], [2, 1]).changes()]
        [(0.0, 2.0), (60.0, 1.0)]
        """
        out = []
        n = self.times.shape[0]
        for k in range(n - 1):
            t0, t1 = self.times[k], self.times[k + 1]
            r0, r1 = self.rates[k], self.rates[k + 1]
            if np.all(r0 == r1):
                continue
            shape = self.shape
            out.append(
                RateChange(
                    start=np.broadcast_to(t0, shape).copy(),
                    end=np.broadcast_to(t1, shape).copy(),
                    rate_before=np.broadcast_to(r0, shape).copy(),
                    rate_after=np.broadcast_to(r1, shape).copy(),
                )
            )
        return tuple(out)

    def breakpoints(self, limit=64):
        """Distinct breakpoint times [s] below 1e11 s, or none when more than ``limit``.

        A solver restarts at these (the rate's corners); per-scenario times in their
        thousands are left to its error control instead.
        """
        values = np.unique(self.times[self.times < _LATE / 10.0])
        return values if values.size <= limit else values[:0]

    def after_volume(self, lost_volume):
        """The profile with its first ``lost_volume`` [m^3] taken up (a pump's slack).

        The rate is 0 until the pump has displaced ``lost_volume``, then the profile's own
        rate.  ``lost_volume`` may be an array (one per scenario).

        Examples
        --------
        >>> p = RateProfile.constant(1e-9).after_volume(1e-7)
        >>> p.rate(99.0), p.rate(100.0)
        (0.0, 1e-09)
        """
        lost = check_nonnegative("slack_volume", lost_volume, "m^3")
        if not np.any(lost > 0):
            return self
        shape = np.broadcast_shapes(lost.shape, self.shape)
        t_take = np.broadcast_to(self.time_at_volume(lost), shape)
        t_take = np.where(np.isfinite(t_take), t_take, _LATE)
        r_take = np.broadcast_to(self.rate(t_take), shape)
        times = _along(self.times, shape)
        rates = np.where(times < t_take, 0.0, _along(self.rates, shape))
        new_t = np.concatenate([times, t_take[None], t_take[None]])
        new_r = np.concatenate([rates, np.zeros((1, *shape)), r_take[None]])
        order = np.argsort(new_t, axis=0, kind="stable")
        return RateProfile(
            times=np.take_along_axis(new_t, order, 0), rates=np.take_along_axis(new_r, order, 0)
        )


class FlatProfile:
    """A :class:`RateProfile` on the flat scenario axis (N,) of a time solve.

    Its pieces are broadcast once to the scenario ``shape`` and flattened, so that the rate
    and the volume at a time (a scalar or one per scenario, (N,)) take a fixed number of
    array operations however many pieces the profile has (a solver asks for them at every
    step).  The same numbers as :meth:`RateProfile.rate` and :meth:`RateProfile.volume`.

    Examples
    --------
    >>> profile = RateProfile.steps([0.0, 10.0], [[1e-9, 2e-9], [3e-9, 3e-9]])
    >>> flat = FlatProfile(profile, (2,), 2)
    >>> flat.rate(5.0).tolist(), flat.volume(np.array([20.0, 20.0])).tolist()
    ([1e-09, 2e-09], [4e-08, 5e-08])
    """

    def __init__(self, profile, shape, n):
        pieces = list(profile._pieces())

        def flat(i):
            return np.stack([np.broadcast_to(p[i], shape).reshape(n) for p in pieces])

        self.t0, self.t1, self.r0, self.slope = (flat(i) for i in range(4))
        # pieces starting at the same times in every scenario: a scalar time finds its
        # piece by bisection (the last piece starting at or before it; the pieces are
        # contiguous, so a step's zero-width piece is passed over as it should be)
        shared = bool(np.all(self.t0 == self.t0[:, :1]))
        self._starts = self.t0[:, 0].tolist() if shared else None

    def rate(self, t):
        """Set rate (N,) [m^3/s] at time ``t`` [s] (a scalar or (N,))."""
        if self._starts is not None and isinstance(t, float):
            k = bisect.bisect_right(self._starts, t) - 1
            if k < 0:
                return np.zeros(self.r0.shape[1])
            return self.r0[k] + self.slope[k] * (t - self._starts[k])
        t = np.asarray(t, dtype=float)
        inside = (t >= self.t0) & (t < self.t1)
        return np.where(inside, self.r0 + self.slope * (t - self.t0), 0.0).sum(axis=0)

    def volume(self, t):
        """Volume (N,) [m^3] displaced from time 0 to ``t`` [s] (a scalar or (N,))."""
        span = np.clip(np.minimum(np.asarray(t, dtype=float), self.t1) - self.t0, 0.0, None)
        span = np.where(np.isfinite(span), span, 0.0)
        return (self.r0 * span + 0.5 * self.slope * span * span).sum(axis=0)


def _along(arr, shape):
    """A breakpoint array ``(n, *s)`` broadcast to ``(n, *shape)`` (s a suffix of shape)."""
    arr = np.asarray(arr, dtype=float)
    lead = (1,) * (len(shape) - (arr.ndim - 1))
    return np.broadcast_to(
        arr.reshape(arr.shape[:1] + lead + arr.shape[1:]), (arr.shape[0], *shape)
    )


#: A time beyond any simulation [s] (about 30,000 years), used for "never".
_LATE = 1e12


def _out(arr):
    arr = np.asarray(arr, dtype=float)
    return float(arr) if arr.ndim == 0 else arr
