"""The phases of a time-dependent infusion solve and the figures read from each.

Helpers of :func:`rheoline.model.transient.simulate_infusion`: the trackers of rate
changes in the run, the drug transport of each port from the run's series, the occlusion
branch until its alarm, and the release with every pump stopped.  All work on the flat
scenario axis (N,) of a :class:`rheoline.model.line_dynamics.Network`.
"""

from __future__ import annotations

import numpy as np

from rheoline.model import line_dynamics as dyn
from rheoline.model import line_nodes as nodes
from rheoline.model.transient_results import PortResult, TimeSeries
from rheoline.model.transport import outlet_concentration, transport_path

__all__ = [
    "rate_change_trackers",
    "series_of",
    "port_results",
    "occlusion_phase",
    "release_phase",
    "run_displacement",
]

#: Points of the uniform time grid added to the solver's steps for drug deliveries, and of
#: the grid a drug's arrival at a further junction is carried on.
DELIVERY_POINTS = 2001
JUNCTION_POINTS = 801
#: Sub-steps of the refinement of a drug delay inside its grid interval.
REFINE_POINTS = 65
#: A release ends when the volume still stored above rest is this fraction of the bolus.
RELEASE_SETTLED = 1e-5


def _flat_at(profile, t, shape, n):
    return np.broadcast_to(profile.rate(t), shape).reshape(n)


def rate_change_trackers(net, pumps_in, ports, shape, n):
    """Trackers of 50 % and 90 % of every change of every pump's set rate at the outlet.

    Returns ``(changes, trackers)``: ``changes[i] = (pump index, pump name, RateChange,
    total rate before, total rate after)`` (flat arrays; index 0 the main pump) and trackers
    ``2 i`` (50 %), ``2 i + 1`` (90 %).
    """
    names = [pumps_in[0].name] + [p.name for p in ports]
    found = []
    for k, pump in enumerate(pumps_in):
        for change in pump.rate.changes():
            start = nodes.flat(change.start, shape, n)
            others = sum(
                (
                    _flat_at(p.rate, start.reshape(shape), shape, n)
                    for j, p in enumerate(pumps_in)
                    if j != k
                ),
                np.zeros(n),
            )
            before = nodes.flat(change.rate_before, shape, n) + others
            after = nodes.flat(change.rate_after, shape, n) + others
            found.append((k, names[k], change, before, after, start))
    starts = [item[5] for item in found]
    changes, trackers = [], []
    for k, name, change, before, after, start in found:
        later = [np.where(s > start, s, np.inf) for s in starts]
        until = np.min(later, axis=0) if later else np.full(n, np.inf)
        step = after - before
        moves = np.abs(step) > 1e-12 * np.maximum(np.abs(after), np.abs(before))
        direction = np.where(step >= 0, 1.0, -1.0)
        for fraction in (0.5, 0.9):
            threshold = np.where(moves, before + fraction * step, np.inf)
            trackers.append(
                dyn.FirstCrossing(net.outlet_flow_of, threshold, start, until, direction)
            )
        changes.append((k, name, change, before, after))
    return changes, trackers


def series_of(layout, arrays, shape, displaced=None, start_volumes=None):
    """A :class:`TimeSeries` from a recorder's arrays (time, volumes, flows, delivered).

    ``displaced(t)`` gives the pumps' set and liquid displacement (n_t, N) since the
    phase's start (None: the pumps are stopped).
    """
    if arrays is None:
        return None
    net = layout.net
    t, volumes, flows, delivered = arrays[:4]
    n_t = t.size
    p = np.stack([law.pressure(volumes[:, j, :]) for j, law in enumerate(net.laws)], axis=1)
    out = net.seg_down < 0
    base = volumes[0] if start_volumes is None else start_volumes
    stored = (volumes - base[None]).sum(axis=1)
    zero = np.zeros((n_t, net.n))
    set_volume, liquid = (zero, zero) if displaced is None else displaced(t)
    delivered_out = delivered[:, out, :].sum(axis=1)

    def shaped(a):
        return a.reshape((n_t, *shape))

    return TimeSeries(
        time=t,
        source_pressure=shaped(p[:, 0, :]),
        outlet_flow=shaped(flows[:, out, :].sum(axis=1)),
        delivered_volume=shaped(delivered_out - delivered_out[0]),
        pumped_volume=shaped(set_volume),
        slack_volume=shaped(set_volume - liquid),
        stored_volume=shaped(stored),
        node_pressures=p.reshape((n_t, net.nn, *shape)),
        node_labels=tuple(net.labels),
    )


def run_displacement(pumps_in, shape, n):
    """``displaced(t)`` of a run from time 0: set and liquid volumes (n_t, N)."""

    def displaced(t):
        tt = t.reshape((-1,) + (1,) * len(shape))
        set_volume = sum(
            np.broadcast_to(p.rate.volume(tt), (t.size, *shape)).reshape(t.size, n)
            for p in pumps_in
        )
        liquid = sum(
            np.broadcast_to(p.effective_rate().volume(tt), (t.size, *shape)).reshape(t.size, n)
            for p in pumps_in
        )
        return set_volume, liquid

    return displaced


# ---------------------------------------------------------------------- drug transport
def _junction_inflows(layout, ports, node, t, flows, rates, n):
    """Per port joining at ``node``: its inflow (n_t, N); and the main flow arriving there
    (at the main syringe's node, node 0, the main pump's displacement: no segment arrives)."""
    net = layout.net
    arriving = [s for s in layout.main_segments if net.seg_down[s] == node]
    if arriving:
        main_in = flows[:, arriving[0], :]
    else:
        main_in = rates[:, 0, :] if node == 0 else np.zeros((t.size, n))
    port_in = {}
    for k in range(len(ports)):
        seg = layout.port_segments[k]
        if seg >= 0 and net.seg_down[seg] == node:
            port_in[k] = flows[:, seg, :]
        elif seg < 0 and layout.port_nodes[k] == node:
            port_in[k] = rates[:, k + 1, :]
    return np.maximum(main_in, 0.0), {k: np.maximum(q, 0.0) for k, q in port_in.items()}


def _mix(carried, main_in, port_in, own, concentration):
    """Concentration after a junction: what the main flow carries plus a port's own drug."""
    total = main_in + sum(port_in.values(), np.zeros_like(main_in))
    mass = carried * main_in + (concentration * port_in[own] if own in port_in else 0.0)
    return np.where(total > 0, mass / np.where(total > 0, total, 1.0), 0.0)


def _section_segments(layout, start_node, end_node):
    """Main segments from ``start_node`` to ``end_node`` (-1: the outlet)."""
    net = layout.net
    segs = [s for s in layout.main_segments if net.seg_up[s] >= start_node]
    if end_node >= 0:
        segs = [s for s in segs if net.seg_up[s] < end_node]
    return segs


def _interp_at(t, values, times):
    """Values (n_t, N) sampled at ``t`` (n_t,), interpolated at per-scenario ``times`` (m, N)."""
    times = np.asarray(times, dtype=float)
    k = np.clip(np.searchsorted(t, times.ravel(), side="right") - 1, 0, t.size - 2)
    k = k.reshape(times.shape)
    w = np.clip((times - t[k]) / (t[k + 1] - t[k]), 0.0, 1.0)
    cols = np.arange(values.shape[1])
    return values[k, cols] * (1.0 - w) + values[k + 1, cols] * w


def _column(times, n):
    return np.broadcast_to(np.asarray(times, dtype=float)[:, None], (np.size(times), n))


def _interp_at_all(t, values, t_new):
    """(n_t, m, N) values interpolated at shared times ``t_new`` (n_new,)."""
    out = np.empty((t_new.size,) + values.shape[1:])
    for i in range(values.shape[1]):
        out[:, i, :] = _interp_at(t, values[:, i, :], _column(t_new, values.shape[2]))
    return out


class _Delivery:
    """A drug leaving the outlet [amount/s], at any per-scenario times (m, N)."""

    def __init__(self, t, w_exit, q_exit, path=None, entry=None, offset=0.0, concentration=1.0):
        self.t, self.w_exit, self.q_exit = t, w_exit, q_exit
        self.path, self.entry, self.offset, self.concentration = path, entry, offset, concentration

    def at(self, times):
        q = _interp_at(self.t, self.q_exit, times)
        if self.path is None:
            return self.concentration * q
        w = _interp_at(self.t, self.w_exit, times)
        return outlet_concentration(self.path, *self.entry, w, self.offset) * q


def _drug_chain(layout, line, ports, k, arrays, shape, n, model, diffusivity):
    """The drug of port ``k`` carried junction by junction to the outlet: (delivery, paths)."""
    net = layout.net
    t, volumes, flows, delivered, rates = arrays
    n_parts = len(line.parts)
    b = ports[k].boundary
    conc = nodes.flat(ports[k].concentration, shape, n)
    if b == n_parts:
        q = flows[:, layout.port_segments[k], :]
        return _Delivery(t, q, q, concentration=conc), []
    node = layout.boundary_node[b]
    main_in, port_in = _junction_inflows(layout, ports, node, t, flows, rates, n)
    c_entry, t_entry = _mix(np.zeros_like(main_in), main_in, port_in, k, conc), t
    paths = []
    for end in sorted({p.boundary for p in ports if p.boundary > b} | {n_parts}):
        end_node = layout.boundary_node.get(end, -1) if end < n_parts else -1
        segs = _section_segments(layout, node, end_node)
        q_exit = flows[:, segs[-1], :]
        reference = np.where(q_exit[-1] > 0, q_exit[-1], np.max(q_exit, axis=0))
        path = transport_path(line.parts[b:end], np.maximum(reference, 1e-300), diffusivity, model)
        paths.append(path)
        inner = [
            j
            for j in range(net.nn)
            if layout.node_boundary[j] is not None and b < layout.node_boundary[j] < end
        ]
        offset = volumes[0, inner, :].sum(axis=0) if inner else 0.0
        entry = (_interp_at(t, delivered[:, segs[0], :], _column(t_entry, n)), c_entry)
        if end == n_parts:
            return _Delivery(t, delivered[:, segs[-1], :], q_exit, path, entry, offset), paths
        t_out = np.union1d(t, np.linspace(t[0], t[-1], JUNCTION_POINTS))
        w_exit = _interp_at(t, delivered[:, segs[-1], :], _column(t_out, n))
        c_arrive = outlet_concentration(path, *entry, w_exit, offset)
        node, b, t_entry = end_node, end, t_out
        flows_out = _interp_at_all(t, flows, t_out)
        rates_out = _interp_at_all(t, rates, t_out)
        main_in, port_in = _junction_inflows(layout, ports, node, t_out, flows_out, rates_out, n)
        c_entry = _mix(c_arrive, main_in, port_in, k, conc)
    raise AssertionError("unreachable: the outlet ends every chain")  # pragma: no cover


def _delay(delivery, t_grid, values, target, start):
    """First time (N,) at or after ``start`` the delivery reaches ``target`` (NaN: never).

    Found on the grid, then refined inside the bracketing interval.
    """
    n = values.shape[1]
    hit = (t_grid[:, None] >= start[None]) & (values >= target[None]) & (target[None] > 0)
    found = hit.any(axis=0)
    k = np.maximum(np.argmax(hit, axis=0), 1)
    lo = np.maximum(t_grid[k - 1], start)
    hi = np.maximum(t_grid[k], lo)
    sub = lo + (hi - lo) * np.linspace(0.0, 1.0, REFINE_POINTS)[:, None]
    v = delivery.at(sub)
    inner = v >= target[None]
    j = np.argmax(inner, axis=0)
    prev = np.maximum(j - 1, 0)
    cols = np.arange(n)
    v0, v1 = v[prev, cols], v[j, cols]
    w = np.where((j > 0) & (v1 > v0), (target - v0) / np.where(v1 > v0, v1 - v0, 1.0), 1.0)
    t_hit = sub[prev, cols] + np.clip(w, 0.0, 1.0) * (sub[j, cols] - sub[prev, cols])
    return np.where(found, np.where(inner.any(axis=0), t_hit, hi), np.nan)


def port_results(layout, line, ports, arrays, shape, n, model, default_diffusivity):
    """Each port's :class:`PortResult`, the conditions met, and the transport keys used."""
    results, keys = [], []
    conditions = {
        key: np.zeros(n, bool)
        for key in (
            "drug_not_reached",
            "diffusivity_assumed",
            "segregated_transport",
            "volume_not_given",
            "no_steady_rate",
        )
    }
    for k, port in enumerate(ports):
        assumed = port.diffusivity is None
        diffusivity = nodes.flat(default_diffusivity if assumed else port.diffusivity, shape, n)
        conditions["diffusivity_assumed"] |= assumed
        drug, paths = _drug_chain(layout, line, ports, k, arrays, shape, n, model, diffusivity)
        t_fine = np.union1d(arrays[0], np.linspace(arrays[0][0], arrays[0][-1], DELIVERY_POINTS))
        delivery = drug.at(_column(t_fine, n))
        steady = nodes.flat(port.concentration, shape, n) * nodes.flat(
            port.pump.rate.final_rate(), shape, n
        )
        start = nodes.flat(port.pump.rate.start_time(), shape, n)
        delays = [_delay(drug, t_fine, delivery, x * steady, start) - start for x in (0.5, 0.9)]
        downstream = line.parts[port.boundary :]
        conditions["drug_not_reached"] |= np.isnan(delays[1]) & (steady > 0)
        conditions["no_steady_rate"] |= steady <= 0
        conditions["volume_not_given"] |= any(p.volume_note for p in downstream)
        numbers = [p.radial_number for p in paths]
        radial = np.concatenate(numbers) if numbers else np.zeros((0, n))
        dispersive = np.concatenate([p.dispersive for p in paths]) if paths else radial > 0
        if model == "auto":
            conditions["segregated_transport"] |= np.any(~dispersive, axis=0)
        choice = _combined_choice(paths, n)
        for path in paths:
            keys += [key for key in path.models_used if key not in keys]
        results.append(
            PortResult(
                name=port.name,
                boundary=port.boundary,
                dead_volume=nodes.shaped(
                    sum(nodes.flat(p.internal_volume, shape, n) for p in downstream)
                    if downstream
                    else np.zeros(n),
                    shape,
                ),
                start_time=nodes.shaped(start, shape),
                steady_delivery=nodes.shaped(steady, shape),
                delay_50=nodes.shaped(delays[0], shape),
                delay_90=nodes.shaped(delays[1], shape),
                transport_model=choice.reshape(shape) if shape else str(choice[0]),
                radial_number=radial.reshape((radial.shape[0], *shape)),
                lumen_names=tuple(name for p in paths for name in p.lumen_names),
                time=t_fine,
                delivery=delivery.reshape((t_fine.size, *shape)),
            )
        )
    return results, conditions, keys


def _combined_choice(paths, n):
    seg = sum((np.asarray(p.segregated_volume) > 0 for p in paths), np.zeros(n, bool))
    disp = sum((np.asarray(p.dispersed_volume) > 0 for p in paths), np.zeros(n, bool))
    out = np.where(seg & disp, "taylor-aris + laminar", np.where(disp, "taylor-aris", "laminar"))
    return np.where(~seg & ~disp, "plug", out)


# ---------------------------------------------------------------------- occlusion
def _closed_segment(layout, part):
    for s, parts in enumerate(layout.seg_parts):
        if part in parts and s in layout.main_segments:
            return s
    raise AssertionError("every part lies in a main segment")  # pragma: no cover


def occlusion_phase(layout, occlusion, ports, y_occ, breaks, shape, n, series, rtol):
    """From the occlusion to each scenario's alarm (or the release): times, states, series."""
    net = layout.net
    closed = _closed_segment(layout, occlusion.part)
    start_boundary = layout.node_boundary[net.seg_up[closed]]
    sensors = [0] + [
        layout.port_nodes[k] for k, port in enumerate(ports) if port.boundary <= start_boundary
    ]
    alarm = nodes.flat(occlusion.alarm_pressure, shape, n)

    def sensed(t, y):
        volumes, _ = net.split(y)
        return np.max(np.stack([net.laws[j].pressure(volumes[j]) for j in sensors]), axis=0)

    t0 = occlusion.time
    t_end = t0 + occlusion.max_wait
    if occlusion.release_time is not None:
        t_end = min(t_end, occlusion.release_time)
    tracker = dyn.FirstCrossing(sensed, alarm, np.full(n, t0), np.full(n, np.inf), keep_state=True)
    recorder = dyn.Recorder(net, keep=series)
    net.closed = np.arange(net.ns) == closed
    running = net.laws[0].pressure(net.split(y_occ)[0][0])
    try:
        y_end, _ = dyn.integrate(
            net,
            y_occ,
            t0,
            t_end,
            [b for b in breaks if b > t0],
            [tracker],
            recorder,
            stop=lambda t, y: bool(np.all(tracker.done)),
            rtol=rtol,
        )
    finally:
        net.closed = None
    alarmed = ~np.isnan(tracker.time)
    release = occlusion.release_time
    early = ~alarmed & (release is not None and release <= t0 + occlusion.max_wait)
    state = tracker.state if tracker.state is not None else np.zeros((net.nv, n))
    state = np.where(alarmed[None], state, np.asarray(y_end).reshape(net.nv, n))
    occluded = None
    if series:
        occluded = _occluded_series(
            layout, recorder, closed, np.where(alarmed, tracker.time, np.inf), t0, release, shape
        )
    conditions = {
        "no_alarm": ~alarmed & ~early,
        "released_before_alarm": early,
        "alarm_at_occlusion": running >= alarm,
        "alarm_before_break_loose": alarmed & (tracker.time < net.pumps[0].break_time),
    }
    start = np.where(alarmed, tracker.time, t_end)
    if release is not None:
        start = np.maximum(start, release)
    info = {
        "time_to_alarm": np.where(alarmed, tracker.time - t0, np.inf),
        "state": state,
        "released": alarmed | early,
        "running": running,
        "pumps_on": early * 1.0,
        "release_start": start,
        "conditions": conditions,
    }
    return info, occluded


def _occluded_series(layout, recorder, closed, alarm_time, t0, release, shape):
    """The occluded line's series: each scenario's solver steps until its alarm, the row at
    the alarm (the step's dense output there, recorded by the alarm's tracker), and, where
    the occlusion holds after the alarm until a later release, the state held (pumps
    stopped, the line shut) at the release.  Steps after a scenario's alarm are NaN."""
    net = layout.net
    t, volumes, flows, delivered = recorder.arrays()[:4]
    held = (
        np.isfinite(alarm_time) & (alarm_time < release)
        if release is not None
        else np.zeros(net.n, bool)
    )
    if np.any(held):
        if t[-1] < release:
            t = np.append(t, release)
            volumes, flows, delivered = (
                np.concatenate([a, a[-1:]]) for a in (volumes, flows, delivered)
            )
        # the state kept at the alarm, and the flows it passes with the line shut
        at_alarm = np.argmin(np.abs(t[:, None] - np.where(held, alarm_time, 0.0)[None]), axis=0)
        cols = np.arange(net.n)
        v_held = volumes[at_alarm, :, cols].T
        net.closed = np.arange(net.ns) == closed
        try:
            q_held, _ = net.flows(release, net.pressures(v_held))
        finally:
            net.closed = None
        volumes[-1] = np.where(held, v_held, volumes[-1])
        flows[-1] = np.where(held, q_held, flows[-1])
        delivered[-1] = np.where(held, delivered[at_alarm, :, cols].T, delivered[-1])
    end = np.where(held, np.inf, alarm_time)
    after = t[:, None] > end[None]
    v, q, w = (np.where(after[:, None], np.nan, a) for a in (volumes, flows, delivered))
    if np.any(held):
        gap = (t[:, None] > alarm_time[None]) & (t[:, None] < release) & held[None]
        v, q, w = (np.where(gap[:, None], np.nan, a) for a in (v, q, w))
    return series_of(layout, (t, v, q, w), shape, _displaced_since(net, t0, stop=alarm_time))


def _displaced_since(net, start, running=1.0, stop=None):
    """``displaced(t)`` of the pumps from ``start`` (N,) on, running where ``running`` is 1.

    ``t`` counts from ``start`` (``stop`` None, a phase from 0), or is absolute, the pumps
    stopping at ``stop`` (N,) [s] (the occluded line until its alarm).  A release with
    every pump stopped displaces nothing (the release's tracker asks at every step).
    """

    if stop is None and not np.any(running):  # every pump stopped: nothing displaced
        return lambda t: (np.zeros((len(t), net.n)),) * 2

    def displaced(t):
        if stop is None:
            ends = [start + ti for ti in t]
        else:
            ends = [np.minimum(ti, stop) for ti in t]
        liquid = np.stack([sum(p.volume(e) - p.volume(start) for p in net.pumps) for e in ends])
        liquid = liquid * running
        return liquid, liquid

    return displaced


def release_phase(layout, info, ports, shape, n, series, rtol):
    """The release from each state: the bolus above the line's settled state, its course.

    Where the pumps stopped at the alarm the line settles to rest; where the occlusion
    cleared first they keep running (at their set rates at the release) and the line
    settles to that steady state.
    """
    net = layout.net
    volumes, _ = net.split(info["state"].ravel())
    start, on = info["release_start"], info["pumps_on"]
    rates = [np.where(on > 0, p.rate(start), 0.0) for p in net.pumps]
    steady = nodes.steady_pressures(layout, nodes.steady_flows(layout, ports, rates[0], rates[1:]))
    rest = np.where(on[None] > 0, net.volumes_at(steady), net.volumes_at(layout.initial_pressures))
    bolus = (volumes - rest).sum(axis=0)
    y0 = net.join(volumes, np.zeros((net.ns, n)))
    displaced = _displaced_since(net, start, on)

    def excess(t, y):
        return net.delivered_of(y) - displaced(np.array([t]))[1][0]

    target = np.maximum(bolus, 0.0)
    tracker = dyn.FirstCrossing(excess, 0.9 * target, np.zeros(n), np.full(n, np.inf))
    peak = np.zeros(n)

    def settled(t, y):
        nonlocal peak
        peak = np.maximum(peak, net.outlet_flow_of(t, y))
        left = (net.split(y)[0] - rest).sum(axis=0)
        return bool(np.all(np.abs(left) <= RELEASE_SETTLED * np.maximum(np.abs(bolus), 1e-300)))

    saved = [(p.break_time, p.rate) for p in net.pumps]
    net.running = on
    for p in net.pumps:
        p.break_time = np.full(n, -np.inf)
        p.rate = _shifted(p.rate, start)
    recorder = dyn.Recorder(net, keep=series)
    try:
        y_end, t_end = dyn.integrate(net, y0, 0.0, 1e9, (), [tracker], recorder, settled, rtol)
        delivered = excess(t_end, y_end)
    finally:
        net.running = 1.0
        for p, (t_break, rate) in zip(net.pumps, saved, strict=True):
            p.break_time, p.rate = t_break, rate
    ok = info["released"]
    nan = np.full(n, np.nan)
    return {
        "bolus": np.where(ok, bolus, nan),
        "delivered": np.where(ok, delivered, nan),
        "peak": np.where(ok, peak, nan),
        "time_90": np.where(ok & (target > 0), tracker.time, nan),
        "series": series_of(layout, recorder.arrays(), shape, displaced, volumes)
        if series
        else None,
    }


def _shifted(rate, start):
    def shifted(t):
        return rate(start + t)

    return shifted
