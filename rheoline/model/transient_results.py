"""Results of a time-dependent infusion solve: typed, SI, per scenario; words rendered from data.

Every field states its unit; arrays have the scenario shape (``()`` gives Python floats),
time series have a leading time axis.  What happened is recorded as boolean arrays per
condition (:data:`TRANSIENT_CONDITIONS` gives the key, a severity, short words and the
meaning, in the shared :class:`~rheoline.model.conditions.Condition`), and
:attr:`TransientResult.flags` renders sentences from them; nothing parses a sentence.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from types import MappingProxyType

import numpy as np

from rheoline.model.conditions import Condition, count_words

__all__ = [
    "TRANSIENT_CONDITIONS",
    "TimeSeries",
    "RateChangeResult",
    "PortResult",
    "OcclusionResult",
    "TransientResult",
]


_CONDITIONS = (
    Condition(
        "startup_not_reached",
        "limit",
        "start-up not reached",
        "the outlet flow did not reach 90 % of the set rate within the solved time",
    ),
    Condition(
        "rate_change_not_reached",
        "limit",
        "rate change not reached",
        "a rate change had not reached 90 % at the outlet before the next change or the end",
    ),
    Condition(
        "drug_not_reached",
        "limit",
        "drug not at 90 %",
        "a drug's delivery at the outlet did not reach 90 % of its steady value in the solved time",
    ),
    Condition(
        "no_alarm",
        "limit",
        "no alarm",
        "the occlusion alarm pressure was not reached within the longest wait",
    ),
    Condition(
        "released_before_alarm",
        "caution",
        "cleared before the alarm",
        "the occlusion cleared before the alarm, with the pumps running: its bolus is what the "
        "line delivers above the set rates",
    ),
    Condition(
        "alarm_at_occlusion",
        "caution",
        "alarm at once",
        "the running pressure already reached the alarm pressure when the occlusion began",
    ),
    Condition(
        "alarm_before_break_loose",
        "caution",
        "alarm before break-loose",
        "the alarm came before the syringe stopper broke loose",
    ),
    Condition(
        "retrograde_flow",
        "caution",
        "backflow",
        "flow ran backwards in some segment (a drug can travel up the carrier line)",
    ),
    Condition(
        "outside_flow_table",
        "caution",
        "pressure-flow law extrapolated",
        "a pressure beyond the tabulated pressure-flow law was met (the law was extrapolated)",
    ),
    Condition(
        "outside_compliance_table",
        "caution",
        "compliance table extrapolated",
        "a pressure beyond a compliance table's range was met (its end value was held)",
    ),
    Condition(
        "volume_not_given",
        "caution",
        "dead volume not given",
        "a fitting or measured part between a port and the outlet has no internal volume given "
        "(counted as 0, so the drug delay is short by its volume)",
    ),
    Condition(
        "diffusivity_assumed",
        "caution",
        "diffusivity assumed",
        "a drug's diffusivity was not given; 5e-10 m^2/s (a small molecule in water, from "
        "memory) was assumed",
    ),
    Condition(
        "segregated_transport",
        "caution",
        "laminar transport (upper bound)",
        "radial diffusion is too slow for Taylor-Aris dispersion in some lumen; laminar "
        "segregated flow (the widest spread) was used there, so the 90 % delay is an upper bound",
    ),
    Condition(
        "no_steady_rate",
        "caution",
        "no steady drug rate",
        "a pump's rate is 0 at the end of its profile, so its steady delivery is 0",
    ),
)

#: Condition key -> :class:`~rheoline.model.conditions.Condition` (the shared class and
#: severities of :mod:`rheoline.model.conditions`), for the time-dependent results.
TRANSIENT_CONDITIONS: Mapping[str, Condition] = MappingProxyType({c.key: c for c in _CONDITIONS})


def _out(arr):
    arr = np.asarray(arr)
    return arr.item() if arr.ndim == 0 else arr


@dataclass(frozen=True)
class TimeSeries:
    """Time series of one phase, shape ``(n_t, *scenario_shape)`` unless stated.

    Attributes
    ----------
    time : ndarray
        (n_t,) [s]: the solver's steps (from 0 at the phase's start for a release); an
        occluded line adds each scenario's alarm (the step's dense output there, every
        scenario) and, for an occlusion held past its alarm, the release.
    source_pressure : ndarray
        Gauge pressure at the main syringe [Pa] (what its pump senses).
    outlet_flow : ndarray
        [m^3/s].
    delivered_volume : ndarray
        Volume through the outlet since the phase began [m^3].
    pumped_volume : ndarray
        Set displacement of all pumps since the phase began [m^3] (the occluded line's
        pumps stop at its alarm; 0 in a release after an alarm: pumps stopped).
    slack_volume : ndarray
        Displacement taken up by slack so far [m^3].
    stored_volume : ndarray
        Volume stored by compliance since the phase began [m^3]; delivered = pumped - slack
        - stored (mass balance) in a run.
    node_pressures : ndarray
        (n_t, n_nodes, *shape) [Pa].
    node_labels : tuple of str
    """

    time: np.ndarray
    source_pressure: np.ndarray
    outlet_flow: np.ndarray
    delivered_volume: np.ndarray
    pumped_volume: np.ndarray
    slack_volume: np.ndarray
    stored_volume: np.ndarray
    node_pressures: np.ndarray
    node_labels: tuple


@dataclass(frozen=True)
class RateChangeResult:
    """How a change of a pump's set rate reached the outlet.

    Attributes
    ----------
    pump : str
    start : float or ndarray
        When the change began [s].
    rate_before, rate_after : float or ndarray
        Total set rate of all pumps before and after it [m^3/s].
    time_50, time_90 : float or ndarray
        [s] from ``start`` until the outlet flow covered 50 % and 90 % of the change (NaN
        where it did not before the next change or the end of the solve).
    """

    pump: str
    start: float | np.ndarray
    rate_before: float | np.ndarray
    rate_after: float | np.ndarray
    time_50: float | np.ndarray
    time_90: float | np.ndarray


@dataclass(frozen=True)
class PortResult:
    """A drug joining at a port: its dead volume, its delay and its delivery in time.

    Attributes
    ----------
    name : str
    boundary : int
        The part boundary it joins at (0: before the first part; n_parts: the outlet).
    dead_volume : float or ndarray
        Internal volume [m^3] of the parts between the port and the outlet.
    start_time : float or ndarray
        When its pump's set rate first rises above 0 [s].
    steady_delivery : float or ndarray
        Concentration times the pump's final set rate [amount/s].
    delay_50, delay_90 : float or ndarray
        [s] from ``start_time`` until the delivery at the outlet reaches 50 % and 90 % of
        ``steady_delivery`` (NaN where it does not in the solved time).
    transport_model : str or ndarray
        The distribution applied per scenario ("plug", "laminar", "taylor-aris",
        "taylor-aris + laminar").
    radial_number : ndarray
        (n_lumens, ...) D tau / R^2 of each lumen between the port and the outlet [-].
    lumen_names : tuple of str
    time : ndarray
        (n_t,) [s] of the delivery series.
    delivery : ndarray
        (n_t, ...) drug leaving the outlet [amount/s].
    """

    name: str
    boundary: int
    dead_volume: float | np.ndarray
    start_time: float | np.ndarray
    steady_delivery: float | np.ndarray
    delay_50: float | np.ndarray
    delay_90: float | np.ndarray
    transport_model: str | np.ndarray
    radial_number: np.ndarray
    lumen_names: tuple
    time: np.ndarray = field(repr=False)
    delivery: np.ndarray = field(repr=False)


@dataclass(frozen=True)
class OcclusionResult:
    """An occlusion: the time to its alarm and the bolus when it clears.

    Attributes
    ----------
    part : int
    part_name : str
    time : float
        When the occlusion began [s].
    alarm_pressure : float or ndarray
        [Pa], gauge, at a syringe upstream of the occlusion.
    running_pressure : float or ndarray
        Main syringe gauge pressure when the occlusion began [Pa].
    time_to_alarm : float or ndarray
        [s] from the occlusion to the alarm (inf: not within ``max_wait``).
    bolus_volume : float or ndarray
        Volume [m^3] released when the occlusion clears with every pump stopped at the
        alarm: the stored volume at the alarm less that at rest (closed form); where the
        occlusion clears before the alarm, with the pumps running, the stored volume above
        the steady state at the set rates.
    bolus_delivered : float or ndarray
        The same from the time solve of the release [m^3] (a check: it approaches
        ``bolus_volume`` as the line settles).
    bolus_peak_flow : float or ndarray
        Largest outlet flow of the release [m^3/s]: at its start, the stored pressure
        through the line downstream of the nodes (a junction that stores only a
        negligible volume is quasi-static, so its sub-microsecond discharge of a few
        nanolitres, where the liquid's inertia would govern, is not taken as the peak).
    bolus_time_90 : float or ndarray
        [s] after the release until 90 % of the bolus has left.
    release_time : float or ndarray
        When the occlusion cleared [s] (the alarm, or the given release time if later;
        NaN where neither happened within the wait).
    occluded : TimeSeries or None
        From the occlusion on (absolute time) to each scenario's alarm, its last row
        (the alarm pressure); where the occlusion holds past the alarm, then the state held
        at the release time.  NaN after a scenario's end, and between its alarm and a later
        release.
    release : TimeSeries or None
        From the release (time since ``release_time``).
    """

    part: int
    part_name: str
    time: float
    alarm_pressure: float | np.ndarray
    running_pressure: float | np.ndarray
    time_to_alarm: float | np.ndarray
    bolus_volume: float | np.ndarray
    bolus_delivered: float | np.ndarray
    bolus_peak_flow: float | np.ndarray
    bolus_time_90: float | np.ndarray
    release_time: float | np.ndarray
    occluded: TimeSeries | None = field(repr=False, default=None)
    release: TimeSeries | None = field(repr=False, default=None)


@dataclass(frozen=True)
class TransientResult:
    """The answer of :func:`rheoline.model.transient.simulate_infusion`.

    Attributes
    ----------
    scenario_shape : tuple
    startup_time : float or ndarray
        [s] from the main pump's start until the outlet flow first reaches 90 % of the set
        rate (NaN where not within the solve).
    rate_changes : tuple of RateChangeResult
        Every change of every pump's rate, the start included.
    ports : tuple of PortResult
    occlusion : OcclusionResult or None
    internal_volume : float or ndarray
        Total internal volume of the line's parts [m^3].
    part_volumes : ndarray
        (n_parts, ...) [m^3].
    steady_pressure : float or ndarray
        Main syringe gauge pressure at the final set rates, steady [Pa].
    node_compliance : ndarray
        (n_nodes, ...) compliance [m^3/Pa] of each node at rest.
    run : TimeSeries or None
        The solve from time 0 (None when series were not asked for).
    models_used : tuple of str
        Provenance keys, in first-use order.
    conditions : Mapping[str, ndarray]
        Condition key -> bool array of the scenario shape (keys of
        :data:`TRANSIENT_CONDITIONS`).
    """

    scenario_shape: tuple
    startup_time: float | np.ndarray
    rate_changes: tuple
    ports: tuple
    occlusion: OcclusionResult | None
    internal_volume: float | np.ndarray
    part_volumes: np.ndarray
    steady_pressure: float | np.ndarray
    node_compliance: np.ndarray
    run: TimeSeries | None = field(repr=False)
    models_used: tuple
    conditions: Mapping = field(repr=False)

    @property
    def time_to_alarm(self):
        """[s] (NaN without an occlusion)."""
        return self.occlusion.time_to_alarm if self.occlusion else _nan(self.scenario_shape)

    @property
    def bolus_volume(self):
        """[m^3] (NaN without an occlusion)."""
        return self.occlusion.bolus_volume if self.occlusion else _nan(self.scenario_shape)

    @property
    def flags(self):
        """Sentences rendered from :attr:`conditions`, counts over the scenarios."""
        out = []
        for key, mask in self.conditions.items():
            if np.any(mask):
                out.append(f"{TRANSIENT_CONDITIONS[key].meaning}{count_words(mask)}")
        return tuple(out)


def _nan(shape):
    return _out(np.full(shape, np.nan))
