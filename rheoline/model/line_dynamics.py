r"""Pressure and flow in time through a compliant line: the node network and its stiff solve.

The line is cut at its part boundaries into **nodes** that store volume and **segments**
that carry flow.  Each node holds half the compliance of each part beside it (a part's
tubing compliance, or, where none is given, the compressibility of the liquid it holds),
plus the syringe at the line's inlet and at each injection port.  A boundary that holds
nothing, or a negligible share of the line's compliance (quasi-static,
:data:`rheoline.model.line_nodes.QUASI_STATIC`), is not a node: the parts on either side
join one segment.  The state of every
scenario is each node's stored volume :math:`V_j` and each segment's delivered volume
:math:`W_s`:

.. math::

    \frac{dV_j}{dt} = \sum_{s \to j} Q_s - \sum_{s \leftarrow j} Q_s + Q_{pump,j}(t),
    \qquad \frac{dW_s}{dt} = Q_s,
    \qquad \Delta p_s(Q_s) = p_{up}(V_{up}) + \rho g h_{up} - p_{down}(V_{down})

with :math:`\Delta p_s(Q)` the segment's losses from the line's own pressure-flow law
(:meth:`rheoline.model.line.Line.solve` at prescribed flows: friction, developing flow,
entrance, transition, fitting and exit losses, any rheology), tabulated once per run on a
log grid of flows and inverted by interpolation in (ln dp, ln Q)
(:mod:`rheoline.model.flow_tables`, every segment at once); below the grid the law is
continued linearly (laminar), reversed flow uses the same law (symmetric).  The system is stiff (a
metre of tubing fills in milliseconds, a syringe in minutes), so it is integrated with
scipy's BDF method and an analytic sparse Jacobian, every scenario in one state vector.
The syringe's gauge pressure is the node's pressure; the other nodes are taken at the
outlet's level (the head acts between the syringe and the line).

Crossings (an outlet flow reaching 90 % of a set rate, a syringe pressure reaching an
alarm) are found per scenario inside each step from the solver's dense output.

The lumped compliance description is the one Snijder et al. (2015) review for syringe-pump
set-ups (see :mod:`rheoline.model.transient`).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from rheoline.errors import RheolineError
from rheoline.model.flow_tables import FlowTable, SegmentFlows, tabulate

__all__ = [
    "FlowTable",
    "Network",
    "Pump",
    "integrate",
    "FirstCrossing",
    "Recorder",
    "dense_at",
    "tabulate",
]

#: Largest number of states whose Jacobian is given dense (an LU of a small dense matrix
#: costs less than the sparse one's bookkeeping; one scenario of a line is 4 to 12 states).
DENSE_JACOBIAN = 64
#: Sub-intervals of a solver step searched for a crossing.
SUBSTEPS = 16
#: Most regula falsi (Illinois) iterations locating a crossing kept with its state, and
#: the fraction of the bracketing sub-interval (or of the threshold) it stops within.
REFINE_ITERATIONS = 60
REFINE_TOLERANCE = 1e-12


@dataclass
class Pump:
    """A pump feeding a node: its liquid-displacement rate (after slack) and break-loose valve."""

    node: int
    rate: object  # callable t -> (N,) [m^3/s]
    valve_segment: int  # the segment its break-loose holds shut, or -1
    break_time: np.ndarray  # (N,) [s] when the stopper breaks loose
    name: str = "pump"
    volume: object = None  # callable t -> (N,) [m^3] displaced since time 0

    def open_from(self):
        """The time [s] from which its valve is open in every scenario (the latest break
        time; -inf without a valve), kept while ``break_time`` stays the same array."""
        kept = self.__dict__.get("_open_from")
        if kept is None or kept[0] is not self.break_time:
            latest = float(np.max(self.break_time)) if self.valve_segment >= 0 else -np.inf
            kept = self.__dict__["_open_from"] = (self.break_time, latest)
        return kept[1]


@dataclass
class Network:
    """Nodes (stored volume laws) and segments (flow tables) of N scenarios, flattened."""

    n: int
    laws: list
    labels: list
    seg_up: np.ndarray
    seg_down: np.ndarray  # -1: the outlet
    tables: list
    gravity: list  # (N,) drive [Pa] added to each segment (rho g h of a syringe upstream)
    back_pressure: np.ndarray  # (N,)
    pumps: list
    seg_labels: list = field(default_factory=list)
    closed: np.ndarray | None = None  # (n_seg,) bool: occluded segments
    running: np.ndarray | float = 1.0  # 1 where the pumps run, 0 where they are stopped

    def __post_init__(self):
        self.nn = len(self.laws)
        self.ns = len(self.tables)
        self.nv = self.nn + self.ns
        self.vscale = np.ones((self.nn, self.n))
        self.wscale = np.ones(self.n)
        self._pattern()
        self.beyond_table = np.zeros(self.n, bool)
        self._kept = None  # the last state asked for by state_flows, and its flows
        self._segments = SegmentFlows(self.tables)
        # node-by-segment incidence: +1 where a segment ends, -1 where it starts; a
        # segment's drop is then -incidence.T @ p + its drive less any back pressure
        self._incidence = np.zeros((self.nn, self.ns))
        self._incidence[self.seg_up, np.arange(self.ns)] -= 1.0
        inner = self.seg_down >= 0
        self._incidence[self.seg_down[inner], np.arange(self.ns)[inner]] += 1.0
        self._across = -self._incidence.T.copy()
        self._drive = np.stack([np.broadcast_to(g, (self.n,)) for g in self.gravity])
        self._drive = self._drive - np.where(inner, 0.0, 1.0)[:, None] * self.back_pressure
        constant = all(law.is_constant for law in self.laws)
        self._inverse_c = (
            np.stack([np.broadcast_to(1.0 / law.compliances[0], (self.n,)) for law in self.laws])
            if constant
            else None
        )

    def set_scales(self, pressure_scale, volume_scale):
        """State scales: node volumes by C p_ref, delivered volumes by ``volume_scale``."""
        for j, law in enumerate(self.laws):
            self.vscale[j] = np.maximum(law.compliance(0.0) * pressure_scale, 1e-300)
        self.wscale = np.maximum(volume_scale, 1e-300)

    def _pattern(self):
        rows, cols = [], []
        for s in range(self.ns):
            up, down = int(self.seg_up[s]), int(self.seg_down[s])
            w = self.nn + s
            pairs = [(up, up), (w, up)]
            if down >= 0:
                pairs += [(up, down), (down, up), (down, down), (w, down)]
            for r, c in pairs:
                rows.append(r)
                cols.append(c)
        self._rows = np.array(rows, dtype=np.intp)
        self._cols = np.array(cols, dtype=np.intp)
        base = np.arange(self.n)
        self._flat_rows = (self._rows[:, None] * self.n + base).ravel()
        self._flat_cols = (self._cols[:, None] * self.n + base).ravel()

    # ------------------------------------------------------------------ state
    def split(self, y):
        """Node volumes (nn, N) [m^3] and delivered volumes (ns, N) [m^3] of a flat state."""
        y = np.asarray(y).reshape(self.nv, self.n)
        return y[: self.nn] * self.vscale, y[self.nn :] * self.wscale

    def join(self, volumes, delivered):
        """The flat state of node volumes and delivered volumes."""
        y = np.concatenate([volumes / self.vscale, delivered / self.wscale[None]])
        return y.ravel()

    def pressures(self, volumes):
        """Gauge pressure (nn, N) [Pa] of every node."""
        if self._inverse_c is not None:
            return volumes * self._inverse_c
        return np.stack([law.pressure(volumes[j]) for j, law in enumerate(self.laws)])

    def volumes_at(self, pressures):
        """Stored volume (nn, N) [m^3] of every node at ``pressures``."""
        return np.stack([law.volume(pressures[j]) for j, law in enumerate(self.laws)])

    def open_factor(self, t):
        """(ns, N) 1 where a segment passes flow at time ``t``, 0 where it is shut (1.0
        where no segment can be shut)."""
        if isinstance(t, np.ndarray) and t.ndim:
            valves = [p for p in self.pumps if p.valve_segment >= 0]
        else:  # one time: a valve open in every scenario by then shuts nothing
            valves = [p for p in self.pumps if t < p.open_from()]
        if self.closed is None and not valves:
            return 1.0  # every segment open
        out = np.ones((self.ns, self.n))
        for pump in valves:
            out[pump.valve_segment] *= t >= pump.break_time
        if self.closed is not None:
            out[self.closed] = 0.0
        return out

    def _table_flows(self, pressures, slope=True):
        """Flow (ns, N) [m^3/s] and slope (None where not needed) of every segment by its
        law, all open."""
        q, g, beyond = self._segments.flow(self._across @ pressures + self._drive, slope)
        self.beyond_table |= beyond
        return q, g

    def flows(self, t, pressures):
        """Flow (ns, N) [m^3/s] and slope dQ/d(dp) of every segment."""
        q, g = self._table_flows(pressures)
        factor = self.open_factor(t)
        return q * factor, g * factor

    def state_flows(self, t, y):
        """Node volumes, delivered volumes, pressures and segment flows of a flat state at
        ``t``.  The last state's are kept: a step's end is asked for by its trackers and
        by its recorder (the same numbers, computed once)."""
        y = np.asarray(y)
        kept = self._kept
        if kept is None or kept[0].shape != y.shape or not (kept[0] == y).all():
            volumes, delivered = self.split(y)
            p = self.pressures(volumes)
            q = self._table_flows(p, slope=False)[0]
            self._kept = kept = (y.copy(), volumes, delivered, p, q)
        factor = self.open_factor(t)
        return kept[1], kept[2], kept[3], kept[4] * factor

    def pump_rates(self, t):
        """(nn, N) [m^3/s] liquid displaced into each node at time ``t``."""
        out = np.zeros((self.nn, self.n))
        for pump in self.pumps:
            out[pump.node] += pump.rate(t) * self.running
        return out

    def outlet_flow(self, q):
        """Flow (N,) [m^3/s] through the outlet: the sum over segments ending there."""
        return q[self.seg_down < 0].sum(axis=0)

    def outlet_flow_of(self, t, y):
        """Outlet flow (N,) [m^3/s] of a flat state at time ``t``."""
        return self.outlet_flow(self.state_flows(t, y)[3])

    def delivered_of(self, y):
        """Volume (N,) [m^3] delivered through the outlet, of a flat state."""
        _, delivered = self.split(y)
        return delivered[self.seg_down < 0].sum(axis=0)

    # ------------------------------------------------------------------ ODE
    def rhs(self, t, y):
        y = np.asarray(y).reshape(self.nv, self.n)
        if self._inverse_c is not None:  # constant compliances: p = V / C in one product
            p = y[: self.nn] * (self.vscale * self._inverse_c)
        else:
            p = self.pressures(y[: self.nn] * self.vscale)
        q = self._table_flows(p, slope=False)[0]
        factor = self.open_factor(t)
        if isinstance(factor, np.ndarray):
            q = q * factor
        out = np.empty((self.nv, self.n))
        np.divide(self.pump_rates(t) + self._incidence @ q, self.vscale, out=out[: self.nn])
        np.divide(q, self.wscale, out=out[self.nn :])
        return out.ravel()

    def jac(self, t, y):
        from scipy.sparse import coo_matrix

        volumes, _ = self.split(y)
        p = self.pressures(volumes)
        _, g = self.flows(t, p)
        inv_c = np.stack([1.0 / law.compliance(p[j]) for j, law in enumerate(self.laws)]) * np.ones(
            (1, self.n)
        )
        scale = np.concatenate([self.vscale, np.broadcast_to(self.wscale, (self.ns, self.n))])
        data = []
        for s in range(self.ns):
            up, down = int(self.seg_up[s]), int(self.seg_down[s])
            a = g[s] * inv_c[up]  # dQ/dV_up
            data += [-a, a]
            if down >= 0:
                b = g[s] * inv_c[down]  # -dQ/dV_down
                data += [b, a, -b, -b]
        values = np.stack(data) * scale[self._cols] / scale[self._rows]
        size = self.nv * self.n
        if size <= DENSE_JACOBIAN:
            dense = np.zeros((size, size))
            np.add.at(dense, (self._flat_rows, self._flat_cols), values.ravel())
            return dense
        return coo_matrix(
            (values.ravel(), (self._flat_rows, self._flat_cols)), shape=(size, size)
        ).tocsc()


@dataclass
class FirstCrossing:
    """First time (per scenario) a quantity passes a threshold inside a window.

    ``quantity(t, y) -> (N,)`` (trackers sharing one function evaluate it once);
    ``direction`` +1 waits for the value to rise to ``threshold``, -1 to fall to it.  The
    window is ``t_from <= t < t_until`` (arrays (N,)).  With ``keep_state`` the flat state
    at the crossing is kept in ``state`` (nv, N).
    """

    quantity: object
    threshold: np.ndarray
    t_from: np.ndarray
    t_until: np.ndarray
    direction: np.ndarray | float = 1.0
    keep_state: bool = False

    def __post_init__(self):
        self.time = np.full(np.shape(self.threshold), np.nan)
        self.state = None
        self.new_times = np.zeros(0)  # the crossings found by the last update

    @property
    def done(self):
        """True where the crossing has been found."""
        return ~np.isnan(self.time)

    def _past(self, values):
        if self.__dict__.get("_level") is None or self._level[0] is not self.threshold:
            finite = np.isfinite(self.threshold)
            self._level = (self.threshold, finite, np.where(finite, self.threshold, 0.0))
        _, finite, level = self._level
        return np.where(finite, self.direction * (values - level), -np.inf)

    def wants(self, t_old, t_new, value_new):
        """True when some open scenario has passed the threshold by ``t_new``."""
        waiting = np.isnan(self.time)
        if not waiting.any():  # every crossing found
            return False
        open_ = waiting & (self.t_from <= t_new) & (self.t_until > t_old)
        return bool((open_ & (self._past(value_new) >= 0)).any())

    def update(self, times, values, states, located=None):
        """Record crossings from sub-step samples (K+1 times, values (K+1, N)).

        ``located(t) -> flat state`` at per-scenario times (N,) (the step's dense output,
        :func:`dense_at`): a tracker with ``keep_state`` then locates each crossing on it
        (regula falsi) and keeps the state there, so the quantity at the kept state is the
        threshold; without it the crossing is interpolated linearly between the samples.
        """
        n = values.shape[1]
        past = self._past(values)
        inside = (times[:, None] >= self.t_from) & (times[:, None] < self.t_until)
        hit = inside & (past >= 0) & np.isnan(self.time)
        found = hit.any(axis=0)
        self.new_times = np.zeros(0)
        if not np.any(found):
            return
        k = np.argmax(hit, axis=0)
        prev = np.maximum(k - 1, 0)
        cols = np.arange(n)
        s0, s1 = past[prev, cols], past[k, cols]
        t0, t1 = times[prev], times[k]
        first_inside = (k == 0) | ~inside[prev, cols] | ~np.isfinite(s0)
        rise = np.where(first_inside, 1.0, s1 - np.where(first_inside, 0.0, s0))
        weight = np.where(first_inside | (rise <= 0), 1.0, -s0 / np.where(rise > 0, rise, 1.0))
        weight = np.clip(weight, 0.0, 1.0)
        t_cross = np.where(first_inside, np.maximum(self.t_from, t0), t0 + weight * (t1 - t0))
        if self.keep_state and located is not None:
            bracket = found & ~first_inside
            t_cross = self._locate(located, t0, t1, s0, s1, t_cross, bracket)
            cross = np.asarray(located(t_cross)).reshape(-1, n)
        else:
            cross = states[:, prev, cols] + weight * (states[:, k, cols] - states[:, prev, cols])
        self.time = np.where(found, t_cross, self.time)
        self.new_times = np.unique(t_cross[found])
        if self.keep_state:
            self.state = cross if self.state is None else np.where(found, cross, self.state)

    def _locate(self, located, t0, t1, s0, s1, t_guess, bracket):
        """Crossing times (N,) on the dense output: Illinois regula falsi inside [t0, t1]
        where ``bracket`` (s0 < 0 <= s1 there), ``t_guess`` elsewhere."""
        a, b = np.where(bracket, t0, t_guess), np.where(bracket, t1, t_guess)
        fa, fb = np.where(bracket, s0, -1.0), np.where(bracket, s1, 1.0)
        scale = np.maximum(
            np.abs(np.where(np.isfinite(self.threshold), self.threshold, 1.0)), 1e-300
        )
        t = t_guess
        for _ in range(REFINE_ITERATIONS):
            width = np.abs(b - a)
            open_ = bracket & (width > REFINE_TOLERANCE * np.maximum(np.abs(b), 1.0))
            if not np.any(open_):
                break
            t = np.where(open_, (a * fb - b * fa) / np.where(fb != fa, fb - fa, 1.0), t)
            t = np.where(open_, np.clip(t, np.minimum(a, b), np.maximum(a, b)), t)
            f = self._past(self.quantity(t, located(t)))
            done = open_ & (np.abs(f) <= REFINE_TOLERANCE * scale)
            right = open_ & ~done & (f >= 0)
            left = open_ & ~done & (f < 0)
            # Illinois: halve the value kept at the end that did not move
            fa = np.where(right, fa * 0.5, np.where(left, f, fa))
            a = np.where(left, t, a)
            fb = np.where(left, fb * 0.5, np.where(right, f, fb))
            b = np.where(right, t, b)
            a = np.where(done, t, a)
            b = np.where(done, t, b)
        # the end past the threshold: its state reads at or beyond it
        return np.where(bracket, np.where(np.abs(b - a) > 0, b, t), t_guess)


@dataclass
class Recorder:
    """Collects, at every solver step, the time, node volumes, flows, delivered volumes and
    pump rates.  Flows and rates at a step's end are its left limits (a pump that starts at
    a breakpoint shows in the step after it).
    """

    net: Network
    keep: bool = True

    def __post_init__(self):
        self.t, self.volumes, self.flows, self.delivered, self.rates = [], [], [], [], []

    def add(self, t, y, left=True):
        if not self.keep:
            return
        net = self.net
        t_eval = left_of(t) if left else t
        volumes, delivered, _, q = net.state_flows(t_eval, y)
        self.t.append(float(t))
        self.volumes.append(volumes)
        self.flows.append(q)
        self.delivered.append(delivered)
        rates = np.empty((len(net.pumps), net.n))
        for k, p in enumerate(net.pumps):
            rates[k] = p.rate(t_eval) * net.running
        self.rates.append(rates)

    def arrays(self):
        """time (n_t,), volumes (n_t, nn, N), flows and delivered (n_t, ns, N), rates (n_t,
        n_pumps, N)."""
        return tuple(
            np.array(a) for a in (self.t, self.volumes, self.flows, self.delivered, self.rates)
        )


def _by_quantity(trackers):
    """Trackers grouped by their quantity (a bound method compares equal to another
    reference to it: ``net.outlet_flow_of`` taken twice is one quantity, evaluated once)."""
    groups = {}
    for tracker in trackers:
        groups.setdefault(tracker.quantity, []).append(tracker)
    return list(groups.values())


def dense_at(net, dense, times):
    """The flat state at per-scenario times (N,) [s] inside one step, from its dense output.

    scipy's BDF dense output is one polynomial per state component; each scenario's
    components are evaluated at its own time.  Another method's dense output is called
    once per distinct time.
    """
    times = np.broadcast_to(np.asarray(times, dtype=float), (net.n,))
    d = getattr(dense, "D", None)
    if d is None or not hasattr(dense, "t_shift"):
        out = np.empty((net.nv, net.n))
        for t in np.unique(times):
            cols = times == t
            out[:, cols] = np.asarray(dense(t)).reshape(net.nv, net.n)[:, cols]
        return out.ravel()
    x = (times[None, :] - dense.t_shift[:, None]) / dense.denom[:, None]  # (order, N)
    p = np.cumprod(x, axis=0)
    d = d.reshape(d.shape[0], net.nv, net.n)
    return (d[0] + np.einsum("kvn,kn->vn", d[1:], p)).ravel()


def _sample(net, dense, t_old, t_new, trackers, end=np.inf):
    times = np.linspace(t_old, t_new, SUBSTEPS + 1)
    seen = [_seen(t, end) for t in times]
    states = dense(times).reshape(net.nv, net.n, times.size).transpose(0, 2, 1)  # (nv, K+1, N)
    located = lambda t: dense_at(net, dense, t)  # noqa: E731
    for group in _by_quantity(trackers):
        quantity = group[0].quantity
        values = np.stack([quantity(t, states[:, i, :].ravel()) for i, t in enumerate(seen)])
        for tracker in group:
            tracker.update(times, values, states, located)


def integrate(net, y0, t0, t1, breaks=(), trackers=(), recorder=None, stop=None, rtol=1e-6):
    """Integrate ``net`` from ``t0`` to ``t1`` [s], restarting at ``breaks``; returns (y, t).

    ``stop(t, y)`` is asked after every step and ends the integration when True.
    """
    from scipy.integrate import BDF

    points = np.unique(np.concatenate([[t0, t1], [b for b in breaks if t0 < b < t1]]))
    y = np.asarray(y0, dtype=float)
    if recorder is not None:
        recorder.add(t0, y, left=False)
    t = t0
    for a, b in zip(points[:-1], points[1:], strict=True):
        rhs, jac = _within(net.rhs, b), _within(net.jac, b)
        solver = _direct_solves(BDF(rhs, a, y, b, rtol=rtol, atol=rtol * 1e-2, jac=jac))
        while solver.status == "running":
            message = solver.step()
            if solver.status == "failed":
                raise RheolineError(
                    f"the time solve failed at t = {solver.t:.6g} s ({message}); try a "
                    "shorter duration or check the compliances and rates for extreme values"
                )
            _step_done(net, solver, trackers, recorder, b)
            if stop is not None and stop(solver.t, solver.y):
                return solver.y, solver.t
        y, t = solver.y, solver.t
    return y, t


def left_of(t):
    """A time just before ``t`` [s] (by 1e-9 of it, at least 1 ns): a set rate or a valve
    that changes at ``t`` is there as it was before."""
    return t - 1e-9 * max(1.0, abs(t))


def _within(function, end):
    """``function(t, y)`` of an interval that ends at ``end`` [s], taken at ``end`` as its
    left limit.  The solver's last step of an interval lands on ``end`` exactly; a pump
    that starts or a valve that opens there (the interval's end is a breakpoint because it
    does) belongs to the next interval.  Seen at the step's end it was a jump the step
    could not resolve: the solver rejected and shrank the step until the spurious volume
    was within its tolerance, some 20 to 40 steps before each such breakpoint."""

    def at(t, y):
        return function(_seen(t, end), y)

    return at


def _seen(t, end):
    """The time [s] at which an interval ending at ``end`` takes its rates and valves at
    ``t``: ``t`` itself, its left limit at the end (the trackers read the interval's end
    the same way, so a jump there is found at the start of the next interval)."""
    return t if t < end else left_of(end)


def _direct_solves(solver):
    """``solver`` solving its Newton iterations' linear systems by LAPACK's ``getrs`` on its
    LU factors directly where its Jacobian is dense: the same arithmetic as
    ``scipy.linalg.lu_solve``, without the argument checks and conversions that are most of
    that call's cost for a few states (it is called at every Newton iteration)."""
    from scipy.linalg import get_lapack_funcs

    if isinstance(getattr(solver, "J", None), np.ndarray) and hasattr(solver, "solve_lu"):
        getrs = get_lapack_funcs("getrs", (solver.J,))
        solver.solve_lu = lambda lu, b: getrs(lu[0], lu[1], b)[0]
    return solver


def _step_done(net, solver, trackers, recorder, end=np.inf):
    t_old, t_new, y_new = solver.t_old, solver.t, solver.y
    wanting = []
    for group in _by_quantity(trackers):
        value = group[0].quantity(_seen(t_new, end), y_new)
        wanting += [tr for tr in group if tr.wants(t_old, t_new, value)]
    if wanting:
        dense = solver.dense_output()
        _sample(net, dense, t_old, t_new, wanting, end)
        if recorder is not None:
            # a crossing kept with its state (an alarm) is a row of the series: the step's
            # dense output there, for every scenario
            kept = [tr.new_times for tr in wanting if tr.keep_state]
            for t in np.unique(np.concatenate(kept)) if kept else ():
                if t_old < t < t_new:
                    recorder.add(t, dense(t))
    if recorder is not None:
        recorder.add(t_new, y_new)
