r"""Compliance, slack and break-loose: what a syringe, its pump and its tubing store.

A compliant part stores volume as its pressure rises: a syringe (its stopper and barrel
deform), a reservoir, and tubing (its wall stretches).  The compliance
:math:`C(p) = dV/dp` [m^3/Pa] is a constant or piecewise linear in the gauge pressure
from a table; the stored volume (zero at zero gauge pressure) and its inverse are then in
closed form:

.. math::

    V(p) = \int_0^p C(p')\,dp', \qquad
    p(V) = p_k + \frac{2 (V - V_k)}{C_k + \sqrt{C_k^2 + 2 s_k (V - V_k)}}

on the table piece :math:`k` (slope :math:`s_k`), constant compliance beyond the table's
ends.  Tubing compliance is given per metre and scaled by the lumen's length.  A part
whose compliance is not given is rigid and holds only its liquid, whose compressibility
is :data:`LIQUID_COMPRESSIBILITY` (water, IAPWS-95: Wagner & Pruss 2002).

A syringe pump (:class:`SyringePump`) adds two mechanical effects:

* **slack**: the first ``slack_volume`` of the pump's displacement takes up free play in
  the drive and moves no liquid (Neff et al. 2001 found start-up delays of 7 to 57 min at
  1 mL/h from "free play of the syringe");
* **break-loose**: the stopper does not slide until its force, as a pressure on the
  plunger area (:func:`plunger_pressure`), raises the syringe's pressure by
  ``break_loose_pressure`` above its rest pressure; meanwhile the
  displacement charges the syringe's compliance with the line shut off, and when the
  stopper breaks loose that charge reaches the line as a surge.  Gliding friction after
  break-loose is borne by the pump, not the line.

Closed forms for one linear compliance :math:`C` behind a linear line resistance
:math:`R` (:func:`linear_rise_time`, :func:`linear_time_to_alarm`,
:func:`linear_bolus`) are the checks of the time solve in :mod:`rheoline.model.transient`.

Examples
--------
>>> mmhg = 133.322
>>> syringe = Compliance(1.5e-9 / mmhg)                  # 1.5 uL/mmHg (demo value)
>>> round(syringe.stored_volume(300 * mmhg) * 1e9, 6)    # uL at 300 mmHg
450.0
>>> tube = Compliance.per_metre(pressures=[0.0, 40e3], values=[2e-15, 1e-15])
>>> law = tube.law(length=1.5)
>>> v = law.volume(20e3)
>>> round(float(law.pressure(v)), 6)
20000.0
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.rate_profile import RateProfile
from rheoline.model.validation import check_finite, check_nonnegative, check_positive

__all__ = [
    "LIQUID_COMPRESSIBILITY",
    "Compliance",
    "VolumeLaw",
    "SyringePump",
    "plunger_pressure",
    "linear_rise_time",
    "linear_time_to_alarm",
    "linear_bolus",
]

#: Isothermal compressibility of water [1/Pa] at 20-37 degC (IAPWS-95 gives 4.59e-10 at
#: 20 degC and 4.43e-10 at 37 degC, 1 atm; checked against ``iapws`` in the tests).
LIQUID_COMPRESSIBILITY = 4.5e-10


def _out(arr):
    arr = np.asarray(arr, dtype=float)
    return float(arr) if arr.ndim == 0 else arr


@dataclass(frozen=True)
class VolumeLaw:
    """Stored volume against gauge pressure, with compliance piecewise linear in pressure.

    Parameters
    ----------
    pressures : ndarray
        Breakpoints [Pa], shape ``(m,)``, strictly increasing (one breakpoint: a constant).
    compliances : ndarray
        Compliance [m^3/Pa] at the breakpoints, > 0, shape ``(m, *shape)``.

    Notes
    -----
    Beyond the first and last breakpoints the compliance is held constant.  Laws add
    (:meth:`__add__`): the sum is exact on the union of the breakpoints.
    """

    pressures: np.ndarray
    compliances: np.ndarray

    @classmethod
    def constant(cls, compliance):
        """A constant compliance [m^3/Pa] (>= 0; may be an array)."""
        c = np.asarray(compliance, dtype=float)
        return cls(np.zeros(1), c[None])

    @property
    def is_constant(self):
        """True for one breakpoint (a constant compliance)."""
        return self.pressures.size == 1

    def __add__(self, other):
        if self.is_constant and other.is_constant:
            return VolumeLaw(self.pressures, self.compliances + other.compliances)
        grid = np.union1d(self.pressures, other.pressures)
        column = grid.reshape((-1,) + (1,) * (max(self.ndim, other.ndim)))
        return VolumeLaw(grid, self.compliance(column) + other.compliance(column))

    @property
    def ndim(self):
        """Number of scenario axes of the compliances."""
        return self.compliances.ndim - 1

    def scaled(self, factor):
        """The law with every compliance times ``factor`` (a length, a share)."""
        return VolumeLaw(self.pressures, self.compliances * np.asarray(factor, dtype=float))

    def _pieces(self):
        """Per piece: start pressure, compliance, slope, volumes at start and end (from p_0)."""
        p, c = self.pressures, self.compliances
        volume = np.zeros(c.shape[1:])
        for k in range(p.size - 1):
            width = p[k + 1] - p[k]
            slope = (c[k + 1] - c[k]) / width
            following = volume + 0.5 * (c[k] + c[k + 1]) * width
            yield p[k], c[k], slope, volume, p[k + 1], following
            volume = following

    def _volume_from_first(self, p):
        c = self.compliances
        p0 = self.pressures[0]
        out = c[0] * (p - p0)
        for start, c_k, slope, v_k, end, _ in self._pieces():
            d = p - start
            out = np.where((p >= start) & (p < end), v_k + c_k * d + 0.5 * slope * d * d, out)
        last_v = self._last_volume()
        return np.where(p >= self.pressures[-1], last_v + c[-1] * (p - self.pressures[-1]), out)

    def _last_volume(self):
        widths = np.diff(self.pressures).reshape((-1,) + (1,) * self.ndim)
        mids = 0.5 * (self.compliances[1:] + self.compliances[:-1])
        return (mids * widths).sum(axis=0)

    def compliance(self, pressure):
        """Compliance [m^3/Pa] at ``pressure`` [Pa]."""
        p = np.asarray(pressure, dtype=float)
        c = self.compliances
        if self.is_constant:
            return c[0] * np.ones_like(p)
        out = np.where(p < self.pressures[0], c[0], c[-1])
        for start, c_k, slope, _, end, _ in self._pieces():
            out = np.where((p >= start) & (p < end), c_k + slope * (p - start), out)
        return out

    def volume(self, pressure):
        """Stored volume [m^3] at ``pressure`` [Pa] (0 at zero gauge pressure)."""
        p = np.asarray(pressure, dtype=float)
        if self.is_constant:
            return self.compliances[0] * p
        return self._volume_from_first(p) - self._volume_from_first(np.zeros(()))

    def pressure(self, volume):
        """Gauge pressure [Pa] at stored ``volume`` [m^3] (the inverse of :meth:`volume`)."""
        v = np.asarray(volume, dtype=float)
        c = self.compliances
        if self.is_constant:
            return v / c[0]
        rel = v + self._volume_from_first(np.zeros(()))
        out = self.pressures[0] + rel / c[0]
        for start, c_k, slope, v_k, _, v_end in self._pieces():
            need = rel - v_k
            root = np.sqrt(np.maximum(c_k * c_k + 2.0 * slope * need, 0.0))
            d = 2.0 * need / (c_k + root)
            out = np.where((rel >= v_k) & (rel < v_end), start + d, out)
        last_v = self._last_volume()
        return np.where(rel >= last_v, self.pressures[-1] + (rel - last_v) / c[-1], out)


@dataclass(frozen=True)
class Compliance:
    """Volume stored per pressure: a constant, or a table against gauge pressure.

    Parameters
    ----------
    value : float or array_like, optional
        Constant compliance [m^3/Pa] (a syringe, a reservoir) or, with ``per_length``,
        [m^3/(Pa m)] (tubing); may be an array (one per scenario).
    pressures : array_like, optional
        Table of gauge pressures [Pa], strictly increasing, instead of ``value``.
    values : array_like, optional
        Compliance at those pressures, > 0 (same units as ``value``).
    per_length : bool
        True for tubing: the compliance is per metre of lumen.

    Examples
    --------
    >>> Compliance(2e-11).stored_volume(1e4)
    2e-07
    >>> Compliance.per_metre(1e-15).stored_volume(1e4, length=2.0)
    2e-11
    """

    value: float | np.ndarray | None = None
    pressures: tuple | np.ndarray | None = None
    values: tuple | np.ndarray | None = None
    per_length: bool = False

    def __post_init__(self):
        if (self.value is None) == (self.pressures is None):
            raise InputRangeError(
                "Compliance needs exactly one of value (a constant) or pressures with values "
                f"(a table); got value={self.value!r}, pressures={self.pressures!r}",
                field="compliance",
                value=self.value,
            )
        if self.value is not None:
            c = check_nonnegative("compliance", self.value, "m^3/Pa")
            object.__setattr__(self, "value", _out(c))
            return
        p = check_finite("compliance pressures", self.pressures).ravel()
        c = check_positive("compliance values", self.values if self.values is not None else [])
        if c.ndim == 0 or c.shape[0] != p.size or p.size < 2:
            raise InputRangeError(
                f"a compliance table needs two or more pressures, one value each; got "
                f"{p.size} pressures and {np.shape(self.values)} values",
                field="compliance.values",
                value=self.values,
            )
        if np.any(np.diff(p) <= 0):
            raise InputRangeError(
                "compliance table pressures must strictly increase; sort them and drop repeats",
                field="compliance.pressures",
                value=self.pressures,
            )
        object.__setattr__(self, "pressures", p)
        object.__setattr__(self, "values", c)

    @classmethod
    def per_metre(cls, value=None, pressures=None, values=None):
        """Tubing compliance per metre of lumen [m^3/(Pa m)], constant or from a table."""
        return cls(value=value, pressures=pressures, values=values, per_length=True)

    @property
    def table_range(self):
        """(lowest, highest) table pressure [Pa], or None for a constant."""
        if self.pressures is None:
            return None
        return float(self.pressures[0]), float(self.pressures[-1])

    def law(self, length=None):
        """The :class:`VolumeLaw`; tubing compliance is scaled by ``length`` [m]."""
        if self.per_length:
            if length is None:
                raise InputRangeError(
                    "tubing compliance is per metre; it applies to a lumen (a part with a "
                    "length), not to a fitting or measured part. Give those Compliance(value)",
                    field="compliance",
                    value=self.value,
                )
            scale = np.asarray(length, dtype=float)
        else:
            scale = 1.0
        if self.value is not None:
            return VolumeLaw.constant(np.asarray(self.value) * scale)
        return VolumeLaw(self.pressures, np.asarray(self.values) * scale)

    def stored_volume(self, pressure, length=None):
        """Stored volume [m^3] at gauge ``pressure`` [Pa] (tubing: of ``length`` [m])."""
        return _out(self.law(length).volume(pressure))


def plunger_pressure(force, barrel_diameter):
    """Pressure [Pa] equivalent to a plunger force [N] on a barrel's bore [m], F / (pi D^2 / 4).

    Examples
    --------
    >>> round(plunger_pressure(10.0, 29e-3) / 133.322, 1)      # 10 N on a 29 mm bore, mmHg
    113.5
    """
    f = check_nonnegative("break_loose_force", force, "N")
    d = check_positive("barrel_diameter", barrel_diameter, "m")
    return _out(f / (np.pi * d * d / 4.0))


@dataclass(frozen=True)
class SyringePump:
    """A syringe pump: its rate profile, its syringe's compliance, slack and break-loose.

    Parameters
    ----------
    rate : RateProfile or float
        Set rate against time; a number is a constant rate [m^3/s] from time 0.
    compliance : Compliance, optional
        The syringe's (lumped) compliance; None: a rigid syringe.
    slack_volume : float or array_like
        Displacement [m^3] lost to free play before the plunger moves (default 0).
    break_loose_pressure : float or array_like
        Stopper break-loose force as a pressure [Pa] (:func:`plunger_pressure`): the rise of
        the syringe's pressure above its rest pressure at which the stopper slides; default 0.
    head : float or array_like
        Height [m] of the syringe above the line's outlet (default 0).
    name : str

    Examples
    --------
    >>> pump = SyringePump(rate=1e-9, compliance=Compliance(1e-11), slack_volume=1e-7)
    >>> pump.rate.rate(10.0), pump.name
    (1e-09, 'pump')
    """

    rate: RateProfile | float
    compliance: Compliance | None = None
    slack_volume: float | np.ndarray = 0.0
    break_loose_pressure: float | np.ndarray = 0.0
    head: float | np.ndarray = 0.0
    name: str = "pump"

    def __post_init__(self):
        if not isinstance(self.rate, RateProfile):
            object.__setattr__(self, "rate", RateProfile.constant(self.rate))
        if self.compliance is not None and not isinstance(self.compliance, Compliance):
            raise InputRangeError(
                f"compliance must be a Compliance, got {self.compliance!r}; wrap the number: "
                "Compliance(value) [m^3/Pa]",
                field="compliance",
                value=self.compliance,
            )
        if self.compliance is not None and self.compliance.per_length:
            raise InputRangeError(
                "a syringe's compliance is lumped [m^3/Pa], not per metre; use Compliance(value)",
                field="compliance",
                value=self.compliance,
            )
        for label in ("slack_volume", "break_loose_pressure"):
            object.__setattr__(self, label, _out(check_nonnegative(label, getattr(self, label))))
        object.__setattr__(self, "head", _out(check_finite("head", self.head)))

    def effective_rate(self):
        """The rate profile of liquid displacement: the set rate after the slack is taken up."""
        return self.rate.after_volume(self.slack_volume)


def linear_rise_time(resistance, compliance, fraction=0.9):
    r"""Time [s] for a first-order line to reach ``fraction`` of a step: R C ln(1/(1 - f)).

    One compliance :math:`C` [m^3/Pa] filled at a constant rate and draining through a
    linear resistance :math:`R` [Pa s/m^3]: :math:`Q_{out} = Q (1 - e^{-t/RC})`, so the
    outlet reaches 90 % at :math:`RC \ln 10`.

    Examples
    --------
    >>> round(linear_rise_time(1e12, 1e-11), 4)                # R C ln 10
    23.0259
    """
    f = np.asarray(fraction, dtype=float)
    return _out(np.asarray(resistance) * np.asarray(compliance) * -np.log1p(-f))


def linear_time_to_alarm(compliance, alarm_pressure, running_pressure, rate):
    """Time [s] from a complete occlusion to the alarm, C (p_alarm - p_running) / Q.

    Examples
    --------
    >>> ml_h, mmhg = 1e-6 / 3600.0, 133.322
    >>> round(linear_time_to_alarm(1.5e-9 / mmhg, 500 * mmhg, 5 * mmhg, 0.5 * ml_h) / 60, 1)
    89.1
    """
    return _out(
        np.asarray(compliance)
        * (np.asarray(alarm_pressure) - np.asarray(running_pressure))
        / np.asarray(rate)
    )


def linear_bolus(compliance, alarm_pressure, outlet_pressure=0.0):
    """Volume [m^3] released when an occlusion clears with the pump stopped: C (p_alarm - p_out).

    Examples
    --------
    >>> round(linear_bolus(1.5e-9 / 133.322, 500 * 133.322) * 1e6, 3)    # mL
    0.75
    """
    return _out(np.asarray(compliance) * (np.asarray(alarm_pressure) - np.asarray(outlet_pressure)))
