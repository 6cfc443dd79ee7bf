r"""The line's own pressure-flow law of each segment of the time solve, tabulated once per run.

A segment's losses :math:`\Delta p(Q)` (friction, developing flow, entrance, transition,
fitting and exit losses, any rheology: :meth:`rheoline.model.line.Line.solve` at prescribed
flows) are tabulated on a log grid of flows (:func:`tabulate`) and inverted by a cubic
Hermite interpolant in (ln dp, ln Q) (:class:`FlowTable`); :class:`SegmentFlows` evaluates
every segment of a network at once, the cost of one evaluation whatever the number of
segments where the tables are shared by all scenarios.  The interpolation error is checked
in the tests against the line's own solve at flows between the grid points.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["FlowTable", "SegmentFlows", "tabulate", "GRID_PER_DECADE"]

#: Grid points per decade of flow in a segment's tabulated law (ln-ln interpolation
#: error below about 1e-4 where the law bends, exact where it is linear).
GRID_PER_DECADE = 40


@dataclass
class FlowTable:
    """A segment's losses against flow, ``ln dp`` on a grid of ``ln Q``, and its inverse.

    ``log_dp`` has shape ``(n_grid, 1)`` (shared by every scenario) or ``(n_grid, N)``.
    The inverse ``ln Q(ln dp)`` is a cubic Hermite interpolant through the grid with the
    table's slopes (second-order differences), so the conductance dQ/d(dp) is continuous
    (a stiff solver's Newton iteration needs that); below the grid the law is continued
    linearly (laminar), above it as a power law with the last slope.
    """

    log_q: np.ndarray
    log_dp: np.ndarray

    def __post_init__(self):
        self.shared = self.log_dp.shape[1] == 1
        step = self.log_q[1] - self.log_q[0]
        slope = np.gradient(self.log_dp, step, axis=0)  # d ln dp / d ln Q, > 0
        self.du_dx = 1.0 / np.maximum(slope, 1e-6)
        # laminar continuation below the grid: Q = G0 dp
        self.g0 = np.exp(self.log_q[0] - self.log_dp[0])
        self.pieces = _pieces(self.log_q, self.log_dp, self.du_dx)

    def _piece(self, x):
        """Piece (0: below the grid, n_grid: beyond it) of ``x = ln dp``, per scenario."""
        if self.shared:
            return np.searchsorted(self.log_dp[:, 0], x)
        cols = np.arange(x.shape[-1])
        last = self.log_q.size - 1
        lo = np.zeros(x.shape, dtype=np.intp)
        hi = np.full(x.shape, last + 1, dtype=np.intp)
        while np.any(lo < hi):
            mid = (lo + hi) // 2
            active = lo < hi
            below = self.log_dp[np.minimum(mid, last), cols] < x
            lo = np.where(active & below, mid + 1, lo)
            hi = np.where(active & ~below, mid, hi)
        return lo

    def flow(self, dp):
        """Flow [m^3/s], its slope dQ/d(dp) [m^3/(s Pa)] and where dp lies beyond the grid."""
        dp = np.asarray(dp, dtype=float)
        size = np.maximum(np.abs(dp), 1e-300)
        x = np.log(size)
        cols = 0 if self.shared else np.arange(x.shape[-1])
        j = self._piece(x)
        q, slope = _inverse([a[j, cols] for a in self.pieces], x, size)
        return np.copysign(q, dp), slope, j == self.log_q.size

    def drop(self, flow):
        """Losses [Pa] at ``flow`` [m^3/s] >= 0 (for estimates), per scenario."""
        q = np.maximum(np.asarray(flow, dtype=float), 1e-300)
        u = np.log(q)
        k = np.clip(np.searchsorted(self.log_q, u) - 1, 0, self.log_q.size - 2)
        cols = 0 if self.shared else np.arange(np.shape(u)[-1])
        d_f = self.log_dp[k + 1, cols] - self.log_dp[k, cols]
        f = self.log_dp[k, cols] + (u - self.log_q[k]) * d_f / (self.log_q[k + 1] - self.log_q[k])
        return np.where(u < self.log_q[0], q / self.g0[cols], np.exp(f))


def tabulate(line, fluid, groups, exit_group, q_lo, q_hi, n_scenarios, shape):
    """One :class:`FlowTable` per group of part indices of ``line`` (exit jet in ``exit_group``),
    and the provenance keys of the line's solve."""
    decades = np.log10(q_hi / q_lo)
    n_grid = int(np.ceil(decades * GRID_PER_DECADE)) + 1
    log_q = np.linspace(np.log(q_lo), np.log(q_hi), n_grid)
    flows = np.exp(log_q).reshape((-1,) + (1,) * len(shape))
    result = line.solve(fluid, flow=flows)
    drops = np.asarray(result.part_pressure_drops)
    exit_drop = np.asarray(result.exit_pressure_drop, dtype=float)
    tables = []
    for g, parts in enumerate(groups):
        total = drops[list(parts)].sum(axis=0) if parts else np.zeros(drops.shape[1:])
        if g == exit_group:
            total = total + exit_drop
        total = np.asarray(total)
        if total.ndim > 1 and total[0].size > 1:
            total = np.broadcast_to(total, (n_grid, *shape)).reshape(n_grid, n_scenarios)
        else:
            total = total.reshape(n_grid, 1)
        log_dp = np.log(np.maximum(total, 1e-300))
        # a strictly rising law (a flat piece would not invert): nudge repeats by 1 ulp
        log_dp = np.maximum.accumulate(log_dp + 1e-12 * np.arange(n_grid)[:, None], axis=0)
        tables.append(FlowTable(log_q, log_dp))
    return tables, tuple(getattr(result, "models_used", ()))


def _pieces(log_q, log_dp, du_dx):
    """The inverse law ``u = ln Q`` against ``x = ln dp`` as n_grid + 1 polynomial pieces.

    Returns ``(start, c0, c1, c2, c3)``, each (n_grid + 1, cols): on piece ``j`` (``x``
    after ``log_dp[j - 1]``, up to and including ``log_dp[j]``) ``u = c0 + c1 d + c2 d^2 +
    c3 d^3`` with ``d = x - start``.  Piece 0 (below the grid) is the laminar continuation
    ``Q = G0 dp`` (slope 1 in logs), the last (beyond the grid) the power law of the last
    slope; between grid points the cubic Hermite interpolant with slopes ``du_dx``.
    """
    x0, x1 = log_dp[:-1], log_dp[1:]
    u0, u1 = log_q[:-1, None], log_q[1:, None]
    d0, d1 = du_dx[:-1], du_dx[1:]
    h = x1 - x0
    h = np.where(h > 0, h, 1.0)  # a zero-width interval is never chosen
    rise = (u1 - u0) / h
    c2 = (3.0 * rise - 2.0 * d0 - d1) / h
    c3 = (d0 + d1 - 2.0 * rise) / (h * h)
    cols = log_dp.shape[1]
    first, last = np.full((1, cols), log_q[0]), np.full((1, cols), log_q[-1])
    zero = np.zeros((1, cols))
    start = np.concatenate([log_dp[:1], x0, log_dp[-1:]])
    c0 = np.concatenate([first, np.broadcast_to(u0, x0.shape), last])
    c1 = np.concatenate([np.ones((1, cols)), d0, du_dx[-1:]])
    return start, c0, c1, np.concatenate([zero, c2, zero]), np.concatenate([zero, c3, zero])


def _inverse(pieces, x, size, slope=True):
    """Flow [m^3/s] and slope dQ/d(dp) (None unless ``slope``) at ``x = ln |dp|`` on the
    pieces chosen for it (``start, c0, c1, c2, c3``, each shaped as ``x``)."""
    start, c0, c1, c2, c3 = pieces
    d = x - start
    a2, a3 = c2 * d, c3 * d
    q = np.exp(c0 + d * (c1 + a2 + a3 * d))
    return q, (q * (c1 + d * (2.0 * c2 + 3.0 * a3)) / size if slope else None)


class SegmentFlows:
    """Every segment's :class:`FlowTable` at once: flows (ns, N) at pressure drops (ns, N).

    Where every table is shared by all scenarios (one line, the usual case) their pieces
    are stacked and evaluated together, the same arithmetic as :meth:`FlowTable.flow`;
    otherwise each table is evaluated in turn.
    """

    def __init__(self, tables):
        self.tables = list(tables)
        grids = [t.log_q for t in self.tables]
        self.stacked = bool(self.tables) and all(
            t.shared and np.array_equal(t.log_q, grids[0]) for t in self.tables
        )
        if self.stacked:
            self._grids = [np.ascontiguousarray(t.log_dp[:, 0]) for t in self.tables]
            self._beyond = self._grids[0].size  # the piece beyond the grid
            # (5, ns * (G + 1)): segment s's pieces at s * (G + 1) onwards
            self._pieces = np.stack(
                [np.concatenate([t.pieces[i][:, 0] for t in self.tables]) for i in range(5)]
            )
            self._first = (np.arange(len(self.tables)) * (self._beyond + 1))[:, None]

    def flow(self, dp, slope=True):
        """Flow (ns, N) [m^3/s], slope dQ/d(dp) (ns, N; None where not ``slope`` and the
        tables are stacked) and where any segment's dp lies beyond its grid (N,)."""
        if not self.stacked:
            out = [t.flow(d) for t, d in zip(self.tables, dp, strict=True)]
            beyond = np.any([b for _, _, b in out], axis=0)
            return np.stack([q for q, _, _ in out]), np.stack([g for _, g, _ in out]), beyond
        size = np.maximum(np.abs(dp), 1e-300)
        x = np.log(size)
        j = np.empty(x.shape, dtype=np.intp)
        for s, grid in enumerate(self._grids):
            j[s] = grid.searchsorted(x[s])
        q, g = _inverse(self._pieces.take(j + self._first, axis=1), x, size, slope)
        return np.copysign(q, dp), g, (j == self._beyond).any(axis=0)
