r"""One line, one fluid, many drives: the line's characteristic, tabulated and inverted.

Where the line's parts and the fluid are the same in every scenario and only the drive
(or the prescribed flow) varies, every scenario lies on one curve, losses(Q).
:func:`characteristic` computes it exactly on a log-spaced grid of flows and checks it at
the grid midpoints; :class:`Characteristic` then gives the flow at any drive by cubic
Hermite interpolation of ln Q against ln(losses) with the exact slopes, and each part's
drop and apparent viscosity by the same interpolation against ln Q.

**Checked.**  At every interval's midpoint (where a cubic Hermite interpolant's error
peaks) the interpolated ln Q, ln(losses), each lumen's ln(drop) and, for a non-Newtonian
fluid, each lumen's ln(apparent viscosity) must agree with the exact evaluation within
:data:`CURVE_TOLERANCE` (1e-9), else the grid is refined (up to three times), else the
solvers take the Newton path.

**Chosen by cost.**  The grid's size is known before it is built (from the range of flows
the drives span), so :func:`cheaper_than_newton` compares the grid's exact evaluations plus
one interpolation per scenario with the passes the Newton path would take, and the
characteristic is used only where it is cheaper.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from rheoline.model.line_layout import build_layout

__all__ = [
    "Characteristic",
    "characteristic",
    "grid_size",
    "cheaper_than_newton",
    "flow_range",
    "CURVE_TOLERANCE",
]

#: Largest interpolation error accepted at the grid midpoints: ln Q, ln(losses), each
#: lumen's ln(drop) and ln(apparent viscosity).
CURVE_TOLERANCE = 1e-9
#: Grid step in ln Q, and the fewest and most grid points.
_GRID_STEP, _GRID_MIN, _GRID_MAX = 0.004, 64, 20000
#: Cost, in residual passes per scenario, of the interpolation (flow, then each part), of
#: a Newton solve (typical passes, the finishing step included), and of an exact pass on
#: the grid relative to one Newton pass (an inner solve of the wall shear rate for a
#: non-Newtonian fluid without a table, some ten Rabinowitsch evaluations).
_INTERPOLATION_PASSES = 1.0
_NEWTON_PASSES = 3.5
_INNER_SOLVE_PASSES = 10.0


def _solvers():
    """:mod:`rheoline.model.line_solvers` (imported when first needed: it imports this)."""
    from rheoline.model import line_solvers

    return line_solvers


def grid_size(q_lo, q_hi):
    """Grid points of the characteristic from ``q_lo`` to ``q_hi`` [m^3/s] (first try)."""
    span = np.log(q_hi / q_lo)
    return int(np.clip(np.ceil(span / _GRID_STEP), _GRID_MIN, _GRID_MAX)) + 1


def cheaper_than_newton(n_scenarios, n_grid, exact_pass=1.0, newton_passes=_NEWTON_PASSES):
    """True when tabulating ``n_grid`` points (and checking their midpoints) and
    interpolating ``n_scenarios`` costs less than their Newton solves.

    ``exact_pass`` is the cost of one exact evaluation relative to one Newton pass;
    ``newton_passes`` the passes a scenario's own solve takes (1 for a prescribed flow).
    """
    grid = 2.0 * n_grid * exact_pass
    return grid + _INTERPOLATION_PASSES * n_scenarios < newton_passes * n_scenarios


def exact_pass_cost(layout, fluid):
    """Cost of one exact evaluation relative to one Newton pass (see the module notes)."""
    return _INNER_SOLVE_PASSES if _solvers().joint_iteration(layout, fluid) else 1.0


def _curve(line, fluid, q_grid, pries, table):
    """The line's exact losses on a grid of flows (one small vectorized pass)."""
    layout = build_layout(line, fluid, q_grid.shape, pries, table=table)
    return _solvers().exact_losses(layout, fluid, q_grid)


def flow_range(line, shared, fluid, d_lo, d_hi, pries, table):
    """Flows [m^3/s] whose losses bracket the drives ``d_lo`` to ``d_hi`` [Pa], or None."""
    q_lo = float(_solvers().guess(shared, fluid, np.asarray(d_lo))) / 4.0
    q_hi = float(_solvers().guess(shared, fluid, np.asarray(d_hi))) * 4.0
    for _ in range(12):  # widen until the curve spans every drive
        ends = _curve(line, fluid, np.array([q_lo, q_hi]), pries, table)[0]
        if ends[0] < d_lo and ends[1] > d_hi:
            return q_lo, q_hi
        q_lo = q_lo / 8.0 if ends[0] >= d_lo else q_lo
        q_hi = q_hi * 8.0 if ends[1] <= d_hi else q_hi
    return None


class Characteristic(NamedTuple):
    """The tabulated characteristic: ln Q grid, ln(losses), d ln Q / d ln(losses), the
    exact pieces and apparent viscosities at the grid (see :func:`characteristic`)."""

    log_q: np.ndarray
    log_total: np.ndarray
    dlogq_dlogt: np.ndarray
    pieces: tuple
    viscosity: np.ndarray
    dlog_viscosity: object
    newtonian: bool

    def log_flow(self, drive):
        """ln Q [ln m^3/s] at net drives ``drive`` [Pa] (within the tabulated range)."""
        return _hermite(self.log_total, self.log_q, self.dlogq_dlogt, np.log(drive))

    def parts(self, layout, y):
        """Per-part drops, apparent viscosities and total losses at ln Q = ``y``.

        ``layout`` is the line's layout for the scenarios of ``y`` (its arrays broadcast
        with ``y``).  Returns ``(pieces, viscosity, total)`` as the Newton path does.
        """
        q = np.exp(y)
        basis = _hermite_basis(self.log_q, y, uniform=True)
        dp_lumen = np.exp(_hermite_apply(basis, *self._lumen_logs()))
        if self.newtonian:
            # one viscosity per lumen, broadcast over the scenarios' shape (any number of axes)
            mu = self.viscosity[:, :1].reshape((-1,) + (1,) * (dp_lumen.ndim - 1))
            mu = mu * np.ones_like(dp_lumen)
        else:
            log_mu, dlog_mu = self._viscosity_logs()
            mu = np.exp(_hermite_apply(basis, log_mu, dlog_mu))
        u = q / layout.area
        re = layout.density * u * layout.diameter / mu
        q2 = q * q
        dp_k = layout.k_coefficient * q2 + layout.k_linear * q
        dp_meas = layout.measured_a * q + layout.measured_b * q2
        dp_exit = layout.exit_coefficient * q2
        total = dp_lumen.sum(axis=0) + dp_k.sum(axis=0) + dp_meas.sum(axis=0) + dp_exit
        return (dp_lumen, dp_k, dp_meas, dp_exit, re, u), mu, total

    def _lumen_logs(self):
        """ln(drop) of each lumen on the grid and its slope in ln Q (the grid axis last)."""
        dp, slope = self.pieces[0], self.pieces[6]
        return np.log(dp), slope / dp

    def _viscosity_logs(self):
        mu = self.viscosity * np.ones_like(self.pieces[0])
        dlog = self.dlog_viscosity * np.ones_like(mu)
        return np.log(mu), dlog


def characteristic(line, fluid, q_lo, q_hi, pries, table=None):
    """The characteristic from ``q_lo`` to ``q_hi`` [m^3/s], checked (module notes), or
    None when three refinements do not pass the check."""
    n_grid = grid_size(q_lo, q_hi)
    for _ in range(4):
        log_q = np.linspace(np.log(q_lo), np.log(q_hi), n_grid)
        total, slope, pieces, mu, dlog_mu = _curve(line, fluid, np.exp(log_q), pries, table)
        log_mid = 0.5 * (log_q[1:] + log_q[:-1])
        exact = _curve(line, fluid, np.exp(log_mid), pries, table)
        curve = Characteristic(
            log_q,
            np.log(total),
            total / slope,
            pieces,
            mu,
            dlog_mu,
            bool(fluid.is_newtonian or not pieces[0].shape[0]),
        )
        if np.all(np.diff(curve.log_total) > 0) and _error(curve, log_mid, exact) < CURVE_TOLERANCE:
            return curve
        n_grid = 2 * n_grid - 1
    return None


def _error(curve, log_mid, exact):
    """Largest interpolation error at the midpoints: ln Q, ln(losses), and per part."""
    log_mid_total = np.log(exact[0])
    err_q = np.abs(curve.log_flow(exact[0]) - log_mid)
    basis = _hermite_basis(curve.log_q, log_mid, uniform=True)
    err_t = np.abs(_hermite_apply(basis, curve.log_total, 1.0 / curve.dlogq_dlogt) - log_mid_total)
    errors = [np.max(err_q), np.max(err_t)]
    log_dp, dlog_dp = curve._lumen_logs()
    if log_dp.size:
        errors.append(np.max(np.abs(_hermite_apply(basis, log_dp, dlog_dp) - np.log(exact[2][0]))))
        if not curve.newtonian:
            log_mu, dlog_mu = curve._viscosity_logs()
            mid_mu = np.log(exact[3] * np.ones_like(exact[2][0]))
            errors.append(np.max(np.abs(_hermite_apply(basis, log_mu, dlog_mu) - mid_mu)))
    return float(max(errors))


# ---------------------------------------------------------------------------- Hermite
def _locate(x_grid, x):
    """Index k with x_grid[k] <= x < x_grid[k+1] (clipped), for an increasing grid.

    Buckets no wider than the smallest grid step hold at most one grid point, so a table
    lookup plus one comparison replaces a binary search per value.
    """
    step = float(np.min(np.diff(x_grid)))
    span = float(x_grid[-1] - x_grid[0])
    n_buckets = int(np.ceil(span / step)) + 1 if step > 0 else 0
    if not 0 < n_buckets <= 16 * x_grid.size:
        return np.clip(np.searchsorted(x_grid, x, side="right") - 1, 0, x_grid.size - 2)
    width = span / (n_buckets - 1) if n_buckets > 1 else 1.0
    starts = x_grid[0] + width * np.arange(n_buckets)
    table = np.clip(np.searchsorted(x_grid, starts, side="right") - 1, 0, x_grid.size - 2)
    b = np.clip(((x - x_grid[0]) / width).astype(np.intp), 0, n_buckets - 1)
    k = table[b]
    k = k + (x >= x_grid[np.minimum(k + 1, x_grid.size - 1)])
    return np.clip(k, 0, x_grid.size - 2)


def _hermite_basis(x_grid, x, uniform=False):
    """Interval index and the four cubic Hermite basis values (times the interval width)."""
    if uniform:
        h0 = x_grid[1] - x_grid[0]
        k = np.clip(((x - x_grid[0]) / h0).astype(np.intp), 0, x_grid.size - 2)
    else:
        k = _locate(x_grid, x)
    x0 = x_grid[k]
    h = x_grid[k + 1] - x0
    s = (x - x0) / h
    s2 = s * s
    s3 = s2 * s
    b01 = 3.0 * s2 - 2.0 * s3
    return k, (1.0 - b01, (s3 - 2.0 * s2 + s) * h, b01, (s3 - s2) * h)


def _hermite_apply(basis, y_grid, slope_grid):
    """The interpolant at the basis' points; ``y_grid`` and ``slope_grid`` have the grid on
    their last axis (leading axes, such as lumens, broadcast)."""
    k, (b00, b10, b01, b11) = basis
    y0, y1 = np.take(y_grid, k, axis=-1), np.take(y_grid, k + 1, axis=-1)
    d0, d1 = np.take(slope_grid, k, axis=-1), np.take(slope_grid, k + 1, axis=-1)
    return b00 * y0 + b10 * d0 + b01 * y1 + b11 * d1


def _hermite(x_grid, y_grid, slope_grid, x):
    """Cubic Hermite interpolation of y(x) on an increasing grid with slopes dy/dx."""
    return _hermite_apply(_hermite_basis(x_grid, x), y_grid, slope_grid)
