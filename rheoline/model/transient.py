r"""Time-dependent infusion: start-up, rate changes, occlusion alarm and bolus, drug delay.

:func:`simulate_infusion` solves the pressure and flow in time through a line driven by a
syringe pump (:class:`~rheoline.model.compliance.SyringePump`: a rate profile, the
syringe's compliance, slack and break-loose), with tubing compliance per part, further
pump-driven infusions joining at :class:`InjectionPort`\ s, and an optional
:class:`Occlusion`.  The line's own pressure-flow law carries the flow between the
compliant nodes (:mod:`rheoline.model.line_dynamics`).  Three phases, each vectorized over
the scenarios:

1. **run**, from rest at time 0: the start-up time (pump start until the outlet flow first
   reaches 90 % of the set rate), the time each rate change takes to reach 50 % and 90 %
   at the outlet, and each port's drug delay (its pump's start until the drug leaving the
   outlet reaches 50 % and 90 % of its steady value, through
   :mod:`rheoline.model.transport`);
2. **occlusion**, a branch from the run's state at the occlusion time: the occluded part
   passes nothing, the pumps keep running until a syringe upstream reaches the alarm
   pressure (the time to alarm), or until the occlusion's release time;
3. **release**, from each scenario's state at its alarm: every pump stopped and the
   occlusion cleared; the bolus is the volume the line then delivers (closed form: the
   stored volume at the alarm less that at rest; the time solve gives its course).  An
   occlusion that clears before its alarm releases with the pumps running: the bolus is
   the stored volume above the steady state at the set rates.

The lumped description of compliance, slack and break-loose follows the physical causes of
flow variability that Snijder et al. (2015) review for syringe-pump set-ups: the syringe
is the largest compliance, and compliance, resistance and dead volume set the start-up
times, the occlusion alarm times and the drug delays.

For one linear compliance behind a linear line the answers reduce to closed forms
(:func:`~rheoline.model.compliance.linear_rise_time`,
:func:`~rheoline.model.compliance.linear_time_to_alarm`,
:func:`~rheoline.model.compliance.linear_bolus`); the tests hold the solve to them.

Limits: the liquid's inertia and the pump's drive pulsation (a stepper's steps) are not
modelled; slack is taken up once at the start; a stopper's gliding friction after
break-loose is borne by the pump.  Bench start-up times after priming (Neff et al. 2001:
6 to 11 min at 1 mL/h) are longer than compliance alone gives; a compliance table that is
large at low pressure (a stopper seating) is the model's way to represent them.

References
----------
Snijder, R.A., Konings, M.K., Lucas, P., Egberts, T.C., Timmerman, A.D., "Flow variability
and its physical causes in infusion technology: a systematic review of in vitro measurement
and modeling studies", Biomed. Eng./Biomed. Tech. 60 (2015), doi:10.1515/bmt-2014-0148.

Examples
--------
>>> import rheoline
>>> from rheoline.model.compliance import Compliance, SyringePump
>>> from rheoline.model.line import Line
>>> from rheoline.model.parts import Tube
>>> ml_h, mmhg = 1e-6 / 3600.0, 133.322
>>> saline = rheoline.fluid("saline-0.9", temperature_c=25.0)
>>> line = Line([Tube(inner_diameter=0.5e-3, length=1.5)])          # a microbore line
>>> pump = SyringePump(rate=1.0 * ml_h, compliance=Compliance(1.5e-9 / mmhg))   # demo
>>> result = simulate_infusion(
...     line, saline, pump, occlusion=Occlusion(part=0, time=600.0, alarm_pressure=300 * mmhg)
... )
>>> round(result.startup_time, 1)                                    # s
22.8
>>> round(result.time_to_alarm / 60.0, 1), round(result.bolus_volume * 1e6, 3)   # min, mL
(26.9, 0.45)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model import line_dynamics as dyn
from rheoline.model import line_nodes as nodes
from rheoline.model.compliance import Compliance, SyringePump
from rheoline.model.line import Line
from rheoline.model.provenance import merge_models
from rheoline.model.rate_profile import FlatProfile
from rheoline.model.transient_phases import (
    occlusion_phase,
    port_results,
    rate_change_trackers,
    release_phase,
    run_displacement,
    series_of,
)
from rheoline.model.transient_results import (
    OcclusionResult,
    RateChangeResult,
    TransientResult,
)
from rheoline.model.transient_reuse import run_key, run_phase
from rheoline.model.transport import TRANSPORT_MODELS
from rheoline.model.validation import check_finite, check_positive

__all__ = ["Occlusion", "InjectionPort", "simulate_infusion"]

#: Diffusivity of a drug in the carrier [m^2/s] where none is given: a small molecule in
#: water near body temperature (from memory; proteins diffuse about ten times slower).
DEFAULT_DIFFUSIVITY = 5e-10


@dataclass(frozen=True)
class Occlusion:
    """A complete occlusion of one part of the main line.

    Parameters
    ----------
    part : int
        Index of the occluded part in the line.
    time : float
        When it begins [s] (within the run).
    alarm_pressure : float or array_like
        Gauge pressure [Pa] at a syringe upstream at which its pump alarms and stops.
    max_wait : float
        Longest time [s] to wait for the alarm (default 24 h).
    release_time : float, optional
        When the occlusion clears [s]; default None: at the alarm.  Where the alarm comes
        first the pumps stop there and the occlusion holds until this time; where it does
        not, the occlusion clears with the pumps running, and the bolus is what the line
        delivers above the set rates.
    """

    part: int
    time: float
    alarm_pressure: float | np.ndarray
    max_wait: float = 86400.0
    release_time: float | None = None

    def __post_init__(self):
        object.__setattr__(self, "time", float(check_finite("occlusion.time", self.time)))
        if self.release_time is not None:
            release = float(check_finite("release_time", self.release_time))
            if release <= self.time:
                raise InputRangeError(
                    f"release_time {release:g} s must come after the occlusion at {self.time:g} s",
                    field="occlusion.release_time",
                    value=release,
                )
            object.__setattr__(self, "release_time", release)
        pa = check_positive("alarm_pressure", self.alarm_pressure, "Pa")
        object.__setattr__(self, "alarm_pressure", pa)
        object.__setattr__(self, "max_wait", float(check_positive("max_wait", self.max_wait, "s")))


@dataclass(frozen=True)
class InjectionPort:
    """A further pump-driven infusion joining the line at a part boundary.

    Parameters
    ----------
    boundary : int
        Joins before part ``boundary`` (0: at the syringe end; ``len(line)``: at the outlet).
    pump : SyringePump
        Its pump (rate profile, syringe compliance, slack, break-loose, head).
    concentration : float or array_like
        Drug concentration [amount/m^3] (any amount unit; deliveries come in amount/s).
    line : Line, optional
        The tubing from its syringe to the port; None: the syringe sits at the port, its
        compliance part of the junction (backflow into it is then not reported).
    line_compliance : Compliance, optional
        Compliance of that tubing (per metre of its lumens, or lumped).
    diffusivity : float or array_like, optional
        Molecular diffusivity [m^2/s] of the drug in the carrier; default
        :data:`DEFAULT_DIFFUSIVITY` (flagged).
    name : str, optional
    """

    boundary: int
    pump: SyringePump
    concentration: float | np.ndarray = 1.0
    line: Line | None = None
    line_compliance: Compliance | None = None
    diffusivity: float | np.ndarray | None = None
    name: str | None = None

    def __post_init__(self):
        if not isinstance(self.pump, SyringePump):
            raise InputRangeError(
                f"port pump must be a SyringePump, got {type(self.pump).__name__}",
                field="ports.pump",
                value=self.pump,
            )
        if self.line is not None and not isinstance(self.line, Line):
            raise InputRangeError(
                "port line must be a Line (the tubing from its syringe to the port) or None",
                field="ports.line",
                value=self.line,
            )
        if self.name is None:
            object.__setattr__(self, "name", f"port at boundary {self.boundary}")


def _compliance_map(line, part_compliance):
    if part_compliance is None:
        return {}
    items = (
        part_compliance.items() if isinstance(part_compliance, dict) else enumerate(part_compliance)
    )
    out = {}
    for i, c in items:
        if c is None:
            continue
        if not isinstance(c, Compliance) or not 0 <= int(i) < len(line.parts):
            raise InputRangeError(
                f"part_compliance[{i!r}] must be a Compliance for one of the line's "
                f"{len(line.parts)} parts (indices 0 to {len(line.parts) - 1})",
                field=f"part_compliance[{i}]",
                value=c,
            )
        out[int(i)] = c
    return out


def _check_setup(line, ports, occlusion, transport, duration):
    if not isinstance(line, Line):
        raise InputRangeError(
            f"line must be a Line, got {type(line).__name__}", field="line", value=line
        )
    for k, port in enumerate(ports):
        if not isinstance(port, InjectionPort) or not 0 <= port.boundary <= len(line.parts):
            raise InputRangeError(
                f"ports[{k}] must be an InjectionPort joining at a boundary 0 to {len(line.parts)}",
                field=f"ports[{k}].boundary",
                value=getattr(port, "boundary", port),
            )
        if port.line is None and np.any(np.asarray(port.pump.break_loose_pressure) > 0):
            raise InputRangeError(
                f"ports[{k}]'s pump has a break-loose pressure but no line: the stopper's hold "
                "needs the tubing from its syringe to the port (give InjectionPort a line)",
                field=f"ports[{k}].line",
                value=None,
            )
    if occlusion is not None and not 0 <= occlusion.part < len(line.parts):
        raise InputRangeError(
            f"occlusion part {occlusion.part} is not one of the line's parts (0 to "
            f"{len(line.parts) - 1})",
            field="occlusion.part",
            value=occlusion.part,
        )
    if occlusion is not None and duration is not None and occlusion.time > duration:
        raise InputRangeError(
            f"occlusion time {occlusion.time:g} s is after the end of the run ({duration:g} s); "
            "lengthen duration or occlude earlier",
            field="occlusion.time",
            value=occlusion.time,
        )
    if transport not in TRANSPORT_MODELS:
        raise InputRangeError(
            f"transport {transport!r} is not known; choose one of {', '.join(TRANSPORT_MODELS)}",
            field="transport",
            value=transport,
        )


def _scenario_shape(line, fluid, pumps, ports, back_pressure, occlusion):
    named = {"back_pressure": back_pressure}
    for k, pump in enumerate(pumps):
        named[f"pump[{k}].rate"] = np.zeros(pump.rate.shape)
        named[f"pump[{k}].slack_volume"] = pump.slack_volume
        named[f"pump[{k}].break_loose_pressure"] = pump.break_loose_pressure
        named[f"pump[{k}].head"] = pump.head
        if pump.compliance is not None:
            named[f"pump[{k}].compliance"] = np.zeros(pump.compliance.law().compliances.shape[1:])
    for k, port in enumerate(ports):
        named[f"ports[{k}].concentration"] = port.concentration
        named[f"ports[{k}].diffusivity"] = port.diffusivity
    if occlusion is not None:
        named["occlusion.alarm_pressure"] = occlusion.alarm_pressure
    return tuple(line._check_inputs(fluid, **named))


def _rates(pumps, shape):
    """Largest set rate of all pumps together [m^3/s], per scenario, and the final rates."""
    peak = sum(np.broadcast_to(p.rate.rates.max(axis=0), shape) for p in pumps)
    finals = [np.broadcast_to(p.rate.final_rate(), shape) for p in pumps]
    return np.asarray(peak, dtype=float), finals


def _flow_range(peak):
    if not np.any(peak > 0):
        raise InputRangeError(
            "no pump ever runs (every rate is 0); give a pump a rate above 0 m^3/s",
            field="pump.rate",
            value=0.0,
        )
    positive = peak[peak > 0]
    return float(positive.min()) * 1e-7, float(positive.max()) * 1e3


def _build(line, fluid, pump, ports, compliance, back_pressure, shape, n, pressure_cap):
    """The layout, with the flow grid widened until every segment's law spans the pressures."""
    peak, _ = _rates([pump] + [p.pump for p in ports], shape)
    q_lo, q_hi = _flow_range(peak)
    for _ in range(6):
        layout = nodes.build_network(
            line, fluid, pump, ports, compliance, back_pressure, shape, n, (q_lo, q_hi)
        )
        lowest = min(float(np.min(t.log_dp[-1])) for t in layout.net.tables)
        if lowest >= np.log(pressure_cap):
            break
        q_hi *= 100.0
    return layout


def _pumps(layout, pump, ports, shape, n):
    """The layout's :class:`~rheoline.model.line_dynamics.Pump` list, main pump first."""
    net = layout.net
    out = []
    entries = [(pump, 0, layout.main_segments[0])] + [
        (port.pump, node, seg)
        for port, node, seg in zip(ports, layout.port_nodes, layout.port_segments, strict=True)
    ]
    for k, (p, node, seg) in enumerate(entries):
        profile = p.effective_rate()
        law = net.laws[node]
        p0 = layout.initial_pressures[node]
        bl = nodes.flat(p.break_loose_pressure, shape, n)
        need = law.volume(p0 + bl) - law.volume(p0)
        t_break = nodes.flat(profile.time_at_volume(need.reshape(shape)), shape, n)
        t_break = np.where(bl > 0, t_break, -np.inf)
        flat_profile = FlatProfile(profile, shape, n)
        out.append(
            dyn.Pump(
                node=node,
                rate=flat_profile.rate,
                valve_segment=seg if np.any(bl > 0) and seg >= 0 else -1,
                break_time=t_break,
                name=p.name if k == 0 else ports[k - 1].name,
                volume=flat_profile.volume,
            )
        )
    return out


def _auto_duration(layout, pumps_in, line, steady_p, peak, shape, occlusion):
    """A run long enough for start-up, every change and every drug to settle [s].

    The last breakpoint of any profile, plus ten times the slowest filling time (the
    nodes' compliance to the running pressure, the slack, the break-loose charge), plus
    four times the line's volume over the peak rate; at least a minute.
    """
    net, n = layout.net, peak.size
    last = max(float(np.max(p.rate.times[p.rate.times < 1e11], initial=0.0)) for p in pumps_in)
    q = np.maximum(peak, 1e-300)
    rise = np.max(np.abs(steady_p - layout.initial_pressures), axis=0) + 100.0
    compliance = sum(law.compliance(0.0) for law in net.laws)
    slack = sum(nodes.flat(p.slack_volume, shape, n) for p in pumps_in)
    charge = sum(nodes.flat(p.break_loose_pressure, shape, n) for p in pumps_in) * compliance
    volume = sum(nodes.flat(p.internal_volume, shape, n) for p in line.parts)
    span = float(np.max((10.0 * compliance * rise + slack + charge + 4.0 * volume) / q))
    end = last + max(span, 60.0)
    return end if occlusion is None else max(end, occlusion.time)


def simulate_infusion(
    line,
    fluid,
    pump,
    *,
    back_pressure=0.0,
    part_compliance=None,
    ports=(),
    occlusion=None,
    duration=None,
    transport="auto",
    series=True,
    rtol=1e-6,
    reuse_key=None,
):
    """Pressure, flow and drug delivery in time through a line from a syringe pump.

    Parameters
    ----------
    line : Line
        The main line, syringe end first.
    fluid : Fluid
        The carrier (and drug) liquid.
    pump : SyringePump
        The main pump at the line's inlet.
    back_pressure : float or array_like
        Gauge pressure at the outlet [Pa] (venous pressure).
    part_compliance : dict or sequence, optional
        Part index -> :class:`~rheoline.model.compliance.Compliance` (tubing per metre, or
        lumped); parts without one are rigid and hold compressible liquid.
    ports : sequence of InjectionPort
    occlusion : Occlusion, optional
    duration : float, optional
        End of the run [s]; default: long enough for every change and drug to settle.
    transport : str
        Drug transport model, one of :data:`rheoline.model.transport.TRANSPORT_MODELS`.
    series : bool
        Keep the time series (False for many scenarios when only the figures matter).
    rtol : float
        Relative tolerance of the time solve.
    reuse_key : hashable, optional
        Names every input but ``occlusion`` (the scenario layer: the scenario without its
        occlusion, and its sweep points).  A solve given the key of a recent one of a few
        scenarios takes that solve's run from rest instead of solving it again where the
        occlusion's time, the duration, the tolerance and the laws' flow grids agree (an
        edit of the alarm pressure, the occluded part or the release):
        :mod:`rheoline.model.transient_reuse`.  None (default): solved.

    Returns
    -------
    TransientResult
        See :mod:`rheoline.model.transient_results`.

    Raises
    ------
    InputRangeError
        For a bad line, pump, port, occlusion or compliance (the field is named).
    """
    ports = tuple(ports)
    _check_setup(line, ports, occlusion, transport, duration)
    if not isinstance(pump, SyringePump):
        raise InputRangeError(
            f"pump must be a SyringePump, got {type(pump).__name__}", field="pump", value=pump
        )
    compliance = _compliance_map(line, part_compliance)
    pumps_in = [pump] + [p.pump for p in ports]
    shape = _scenario_shape(line, fluid, pumps_in, ports, back_pressure, occlusion)
    n = int(np.prod(shape)) if shape else 1
    caps = [nodes.flat(p.break_loose_pressure, shape, n) for p in pumps_in]
    if occlusion is not None:
        caps.append(nodes.flat(occlusion.alarm_pressure, shape, n))
    cap = 4.0 * max(1e4, float(np.max(caps)) + abs(float(np.max(np.abs(back_pressure)))))
    layout = _build(line, fluid, pump, ports, compliance, back_pressure, shape, n, cap)
    net = layout.net
    net.pumps = _pumps(layout, pump, ports, shape, n)
    peak, finals = _rates(pumps_in, shape)
    flat_finals = [f.reshape(n) for f in finals]
    steady_q = nodes.steady_flows(layout, ports, flat_finals[0], flat_finals[1:])
    steady_p = nodes.steady_pressures(layout, steady_q)
    p_ref = np.maximum(np.max(np.abs(steady_p - layout.initial_pressures), axis=0), 100.0)
    if duration is None:
        duration = _auto_duration(
            layout, pumps_in, line, steady_p, peak.reshape(n), shape, occlusion
        )
    duration = float(check_positive("duration", duration, "s"))
    net.set_scales(p_ref, np.maximum(peak.reshape(n), 1e-300) * duration)
    y0 = net.join(net.volumes_at(layout.initial_pressures), np.zeros((net.ns, n)))
    changes, trackers = rate_change_trackers(net, pumps_in, ports, shape, n)
    breaks = set()
    for p in pumps_in:  # the set rates' corners and where each pump's slack is taken up
        breaks.update(p.effective_rate().breakpoints().tolist())
    for p in net.pumps:
        finite = np.unique(p.break_time[np.isfinite(p.break_time)])
        if 0 < finite.size <= 64:
            breaks.update(finite.tolist())
    keep = bool(series or ports)
    t_occ = duration if occlusion is None else occlusion.time
    key = run_key(reuse_key, n, t_occ, duration, rtol, keep, net.tables)
    y_occ, run_arrays = run_phase(net, y0, t_occ, duration, breaks, trackers, keep, rtol, key)
    conditions = {key: np.zeros(n, bool) for key in ("outside_flow_table",)}
    rate_results = []
    startup = nodes.shaped(np.full(shape, np.nan), shape)
    for (k, pump_name, change, qb, qa), (t50, t90) in zip(changes, _pairs(trackers), strict=True):
        if k == 0 and np.isnan(startup).all() and np.all(change.rate_before == 0):
            startup = nodes.shaped(t90.time - t90.t_from, shape)
        rate_results.append(
            RateChangeResult(
                pump=pump_name,
                start=nodes.shaped(change.start, shape),
                rate_before=nodes.shaped(qb, shape),
                rate_after=nodes.shaped(qa, shape),
                time_50=nodes.shaped(t50.time - t50.t_from, shape),
                time_90=nodes.shaped(t90.time - t90.t_from, shape),
            )
        )
    port_out, port_conditions, port_models = port_results(
        layout, line, ports, run_arrays, shape, n, transport, DEFAULT_DIFFUSIVITY
    )
    occ_result = None
    if occlusion is not None:
        occ_result = _occlusion(
            layout, line, occlusion, ports, y_occ, breaks, shape, n, series, rtol
        )
    conditions["outside_flow_table"] = net.beyond_table.copy()
    conditions.update(port_conditions)
    conditions.update(_change_conditions(rate_results, startup, run_arrays, layout, n))
    highest = np.maximum(
        np.max(steady_p, axis=0), np.max(layout.initial_pressures, axis=0) + np.max(caps, axis=0)
    )
    conditions.update(
        _table_conditions(pumps_in, ports, compliance, layout.initial_pressures.min(0), highest)
    )
    if occ_result is not None:
        conditions.update(occ_result[1])
        occ_result = occ_result[0]
    return TransientResult(
        scenario_shape=shape,
        startup_time=startup,
        rate_changes=tuple(rate_results),
        ports=tuple(port_out),
        occlusion=occ_result,
        internal_volume=nodes.shaped(
            sum(nodes.flat(p.internal_volume, shape, n) for p in line.parts), shape
        ),
        part_volumes=np.stack(
            [np.broadcast_to(np.asarray(p.internal_volume, float), shape) for p in line.parts]
        ),
        steady_pressure=nodes.shaped(steady_p[0], shape),
        node_compliance=np.stack([law.compliance(0.0) for law in net.laws]).reshape(
            (net.nn, *shape)
        ),
        run=series_of(layout, run_arrays, shape, run_displacement(pumps_in, shape, n))
        if series
        else None,
        models_used=_models(layout, fluid, line, ports, compliance, port_models),
        conditions={k: v.reshape(shape) for k, v in conditions.items()},
    )


def _pairs(trackers):
    return [(trackers[2 * i], trackers[2 * i + 1]) for i in range(len(trackers) // 2)]


def _change_conditions(rate_results, startup, run_arrays, layout, n):
    not_reached = np.zeros(n, bool)
    for r in rate_results:
        moved = np.asarray(r.rate_after) != np.asarray(r.rate_before)
        not_reached |= (moved & np.isnan(np.asarray(r.time_90))).reshape(n)
    out = {
        "startup_not_reached": np.isnan(np.asarray(startup, dtype=float)).reshape(n),
        "rate_change_not_reached": not_reached,
    }
    if run_arrays is not None:
        flows = run_arrays[2]
        scale = np.max(np.abs(flows), axis=(0, 1))
        out["retrograde_flow"] = np.any(flows < -1e-9 * scale, axis=(0, 1))
    return out


def _table_conditions(pumps_in, ports, compliance, low, high):
    """Scenarios whose pressures (low..high, flat) leave a compliance table's range."""
    given = [p.compliance for p in pumps_in] + list(compliance.values())
    given += [port.line_compliance for port in ports]
    ranges = [c.table_range for c in given if c is not None and c.table_range is not None]
    outside = np.zeros(np.shape(low), bool)
    for lo, hi in ranges:
        outside |= (low < lo) | (high > hi)
    return {"outside_compliance_table": outside}


def _occlusion(layout, line, occlusion, ports, y_occ, breaks, shape, n, series, rtol):
    alarm, occluded = occlusion_phase(
        layout, occlusion, ports, y_occ, breaks, shape, n, series, rtol
    )
    release = release_phase(layout, alarm, ports, shape, n, series, rtol)
    return OcclusionResult(
        part=occlusion.part,
        part_name=line.part_names[occlusion.part],
        time=occlusion.time,
        alarm_pressure=nodes.shaped(np.broadcast_to(occlusion.alarm_pressure, shape), shape),
        running_pressure=nodes.shaped(alarm["running"], shape),
        time_to_alarm=nodes.shaped(alarm["time_to_alarm"], shape),
        bolus_volume=nodes.shaped(release["bolus"], shape),
        bolus_delivered=nodes.shaped(release["delivered"], shape),
        bolus_peak_flow=nodes.shaped(release["peak"], shape),
        bolus_time_90=nodes.shaped(release["time_90"], shape),
        release_time=nodes.shaped(
            np.where(alarm["released"], alarm["release_start"], np.nan), shape
        ),
        occluded=occluded,
        release=release["series"],
    ), alarm["conditions"]


def _models(layout, fluid, line, ports, compliance, port_models):
    """Provenance keys in first-use order: fluid, line laws, compliance, transport."""
    rigid = len(compliance) < len(line.parts) or any(
        p.line is not None and p.line_compliance is None for p in ports
    )
    own = ("lumped-compliance",) + (("iapws-95-compressibility",) if rigid else ())
    return merge_models(getattr(fluid, "models_used", ()), layout.models, own, port_models)
