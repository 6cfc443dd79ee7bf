"""The solvers of a line: losses at a flow, the flow at a drive, the pressure for a flow.

Everything here works on a :class:`~rheoline.model.line_layout.LineLayout` (the line's
per-part arrays for one fluid), vectorized over the scenario shape:

* :func:`exact_losses`: every loss at a flow, with d(losses)/d ln Q (for a non-Newtonian
  fluid each lumen's wall shear rate is first solved on the Rabinowitsch integral);
* :func:`solve_for_flow`: safeguarded Newton iterations on ln(losses) - ln(drive) in
  ln(Q), from the laminar-plus-kinetic closed form (:func:`guess`), with a bracket kept
  from the residual's signs; or, for many drives through one shared line, the line's
  exact characteristic tabulated and inverted by cubic Hermite interpolation
  (:func:`solve_on_characteristic`);
* :func:`solve_for_pressure`: one exact evaluation at the prescribed flow (or the
  tabulated characteristic for many flows).

:class:`~rheoline.model.line.Line` is the public face of these functions.

Examples
--------
>>> from rheoline.model.fluid_base import newtonian_fluid
>>> from rheoline.model.line import Line
>>> from rheoline.model.line_layout import build_layout
>>> from rheoline.model.parts import Tube
>>> water = newtonian_fluid("water", 1.0e-3, 998.0)
>>> line = Line([Tube(inner_diameter=1e-3, length=1.0)])
>>> layout = build_layout(line, water, (1,))
>>> total, slope, *_ = exact_losses(layout, water, np.array([1e-8]))
>>> bool(abs(slope[0] / total[0] - 1.0) < 0.01)      # laminar: losses nearly linear in Q
True
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from rheoline.model import lumen as _lumen
from rheoline.model.line_layout import build_layout

__all__ = [
    "Solved",
    "exact_losses",
    "losses",
    "guess",
    "yield_drop",
    "solve_for_flow",
    "solve_for_pressure",
    "solve_on_characteristic",
    "MIN_DRIVE",
    "MIN_FLOW",
    "CURVE_MIN_SCENARIOS",
]

_TOL = 1e-11  # convergence on ln(Q)
#: Drives [Pa] and flows [m^3/s] at or below these are numerically zero: flows that small
#: would underflow double precision in the friction terms, so they give a zero result.
MIN_DRIVE = 1e-150
MIN_FLOW = 1e-200
#: From this many scenarios on, a line whose geometry and fluid are shared by every scenario
#: (only the drive varies) is solved on its tabulated characteristic
#: (:func:`solve_on_characteristic`); fewer scenarios, or per-scenario parts or fluids, take
#: the Newton path.
CURVE_MIN_SCENARIOS = 256
_CURVE_TOL = 1e-9  # largest interpolation error in ln(Q) accepted on the characteristic
_MAX_ITER = 60


class Solved(NamedTuple):
    """What a solve hands to :func:`rheoline.model.line_result.make_result`."""

    layout: object
    flow: np.ndarray
    pieces: tuple
    viscosity: np.ndarray
    moving: np.ndarray
    net: np.ndarray
    required: np.ndarray
    iterations: int
    converged: np.ndarray


# ---------------------------------------------------------------------------- the physics
def newtonian_path(layout, fluid):
    """True when the apparent viscosity does not depend on the flow."""
    return fluid.is_newtonian or layout.diameter.shape[0] == 0


def apparent_viscosity(layout, fluid, log_q, state):
    """Apparent viscosity of each lumen at ln(Q) from the Rabinowitsch state (Taylor step)."""
    if state is None:
        mu = fluid.rheology.viscosity() * layout.viscosity_factor
        return mu, 0.0, None
    radius = layout.diameter / 2.0
    q_i, tau_i, dlog_q, dlog_tau = _lumen._rabinowitsch_state(fluid.rheology, state, radius)
    dlog_tau_q = dlog_tau / dlog_q  # d ln(tau_w) / d ln(Q)
    dlog_mu = dlog_tau_q - 1.0
    log_q_i = np.log(q_i)
    mismatch = log_q + np.log(layout.flow_scale) - log_q_i
    # wall stress carried from the inner state to ln(Q) by one Taylor step, then
    # mu_app = tau_w / (4 Q / (pi R^3)), Q that of a circle of the hydraulic diameter
    tau = tau_i * np.exp(dlog_tau_q * mismatch)
    mu = (
        layout.viscosity_factor
        * tau
        * np.pi
        * radius**3
        / (4.0 * np.exp(log_q) * layout.flow_scale)
    )
    return mu, dlog_mu, (log_q_i, dlog_q, mismatch)


def losses(layout, q, mu, dlog_mu):
    """Every loss at flow ``q``: total [Pa], d(total)/d ln Q [Pa], and the pieces.

    The pieces are ``(lumen drops, K-fitting drops, measured drops, exit drop, lumen
    Reynolds numbers, lumen mean velocities, lumen log-slopes)``.
    """
    dp_f, slope_f, re, u = _lumen._lumen_friction(
        q,
        layout.area,
        layout.diameter,
        layout.length,
        layout.relative_roughness,
        layout.density,
        mu,
        dlog_mu,
        layout.developing,
        layout.laminar_f_re,
    )
    dp_m = layout.minor_k * 0.5 * layout.density * u * u
    dp_lumen = dp_f + dp_m
    q2 = q * q
    k_quad = layout.k_coefficient * q2
    k_lin = layout.k_linear * q
    dp_k = k_quad + k_lin
    lin = layout.measured_a * q
    quad = layout.measured_b * q2
    dp_exit = layout.exit_coefficient * q2
    total = dp_lumen.sum(axis=0) + dp_k.sum(axis=0) + (lin + quad).sum(axis=0) + dp_exit
    lumen_slope = dp_f * slope_f + 2.0 * dp_m
    slope = (
        lumen_slope.sum(axis=0)
        + (2.0 * k_quad + k_lin).sum(axis=0)
        + (lin + 2.0 * quad).sum(axis=0)
        + 2.0 * dp_exit
    )
    return total, slope, (dp_lumen, dp_k, lin + quad, dp_exit, re, u, lumen_slope)


def exact_losses(layout, fluid, q):
    """Losses at ``q`` with each lumen's apparent viscosity solved exactly.

    Returns ``(total [Pa], d total / d ln Q [Pa], pieces, apparent viscosity [Pa s],
    d ln(viscosity) / d ln Q)``.
    """
    if newtonian_path(layout, fluid):
        mu, dlog_mu, _ = apparent_viscosity(layout, fluid, np.log(q), None)
    else:
        radius = layout.diameter / 2.0
        y, q_i, tau_i, dlog_q, dlog_tau = _lumen._solve_log_wall_shear_rate(
            fluid.rheology, q * layout.flow_scale * np.ones_like(radius), radius
        )
        # with the target flow, so that 64/Re gives 2 L tau_w / R even where the inner
        # solve is limited by rounding (a yield-stress fluid at a vanishing flow)
        mu = layout.viscosity_factor * tau_i * np.pi * radius**3 / (4.0 * q * layout.flow_scale)
        dlog_mu = dlog_tau / dlog_q - 1.0
    total, slope, pieces = losses(layout, q, mu, dlog_mu)
    return total, slope, pieces, mu, dlog_mu


def yield_drop(layout, fluid):
    """Net drive [Pa] a yield-stress fluid needs to move, sum of 2 L tau_y / R (else 0)."""
    tau_y = getattr(fluid.rheology, "yield_stress", None)
    if tau_y is None or not layout.diameter.shape[0]:
        return np.zeros(layout.shape)
    return (2.0 * layout.length * tau_y * layout.viscosity_factor / (layout.diameter / 2.0)).sum(
        axis=0
    )


def _quadratic_guess(layout, mu, drive):
    d, length = layout.diameter, layout.length
    # 2 C mu L / (A D_h^2) with C the laminar f Re: 128 mu L / (pi D^4) for a circle
    shape_factor = layout.laminar_f_re / 16.0 * layout.flow_scale
    a = (128.0 * mu * length / (np.pi * d**4) * shape_factor).sum(axis=0)
    a = a + layout.measured_a.sum(axis=0) + layout.k_linear.sum(axis=0)
    area = layout.area
    hagenbach = np.where(layout.developing, 1.25, 0.0)
    b = ((layout.minor_k + hagenbach) * layout.density / (2.0 * area * area)).sum(axis=0)
    b = b + layout.k_coefficient.sum(axis=0) + layout.measured_b.sum(axis=0)
    b = b + layout.exit_coefficient
    return 2.0 * drive / (a + np.sqrt(a * a + 4.0 * b * drive))


def guess(layout, fluid, drive):
    """Flow from the laminar-plus-kinetic closed form dp = A Q + B Q^2 (quadratic in Q).

    For a non-Newtonian fluid the viscosity in A is refined by three cheap fixed-point
    passes at each lumen's Newtonian wall shear rate 4Q/(pi R^3).
    """
    mu = fluid.rheology.infinite_shear_viscosity * layout.viscosity_factor
    q = _quadratic_guess(layout, mu, drive)
    if not newtonian_path(layout, fluid):
        radius = layout.diameter / 2.0
        # a yield-stress fluid's viscosity is unbounded at vanishing shear: a pass whose
        # guess overflows or underflows keeps the previous, finite guess
        with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
            for _ in range(3):
                rate = 4.0 * q * layout.flow_scale / (np.pi * radius**3)
                mu = fluid.rheology.viscosity(rate) * layout.viscosity_factor
                refined = _quadratic_guess(layout, mu, drive)
                q = np.where(np.isfinite(refined) & (refined > 0.0), refined, q)
    return q


# ---------------------------------------------------------------------------- Newton path
def _newton_start(layout, fluid, drive):
    """Starting ln(Q), ln(drive), the moving mask and the Rabinowitsch state (or None)."""
    moving = drive > MIN_DRIVE
    drive_pos = np.where(moving, drive, 1.0)
    x = np.log(guess(layout, fluid, drive_pos))
    log_drive = np.log(drive_pos)
    state = None
    if not newtonian_path(layout, fluid):
        radius = layout.diameter / 2.0
        state = np.log(4.0 * layout.flow_scale / (np.pi * radius**3)) + x
        # a yield-stress fluid needs the yield pressure 2 L tau_y / R in every lumen to move
        if getattr(fluid.rheology, "yield_stress", None) is not None:
            moving = (drive > yield_drop(layout, fluid) * (1.0 + 1e-9)) & (drive > MIN_DRIVE)
            drive_pos = np.where(moving, drive, 1.0)
            log_drive = np.log(drive_pos)
            x = np.where(moving, x, 0.0)
            state = np.log(4.0 * layout.flow_scale / (np.pi * radius**3)) + x
    return x, log_drive, moving, state


def _safeguarded_step(x, g, g_prime, lo, hi):
    """Newton step kept strictly inside the bracket (else bisected), at most 5 in ln(Q)."""
    x_new = x - g / g_prime
    # strictly inside the bracket, else bisect (converged scenarios are frozen by the
    # caller, so a step that lands on a bracket end is a cycle, not convergence)
    outside = ~((x_new > lo) & (x_new < hi)) & (np.abs(x_new - x) >= _TOL)
    both = np.isfinite(lo) & np.isfinite(hi)
    fallback = np.where(
        both,
        0.5 * (np.where(both, lo, 0.0) + np.where(both, hi, 0.0)),
        np.where(np.isfinite(hi), np.minimum(x, hi) - 2.0, np.maximum(x, lo) + 2.0),
    )
    x_new = np.where(outside, fallback, x_new)
    return np.clip(x_new, x - 5.0, x + 5.0)


def _newton(layout, fluid, drive):
    """Flow of every scenario at its drive by safeguarded Newton iterations in ln(Q)."""
    x, log_drive, moving, state = _newton_start(layout, fluid, drive)
    lo = np.full(layout.shape, -np.inf)
    hi = np.full(layout.shape, np.inf)
    converged = np.zeros(layout.shape, bool)
    for iteration in range(1, _MAX_ITER + 1):  # noqa: B007 (read after the loop)
        mu, dlog_mu, inner = apparent_viscosity(layout, fluid, x, state)
        q = np.exp(x)
        total, slope, pieces = losses(layout, q, mu, dlog_mu)
        g = np.log(total) - log_drive
        if inner is None:
            consistent = np.ones(layout.shape, bool)
            mismatch = 0.0
        else:
            mismatch = np.max(np.abs(inner[2]), axis=0)
            consistent = mismatch < 1e-3
        hi = np.where(consistent & (g > 0), np.minimum(hi, x), hi)
        lo = np.where(consistent & (g <= 0), np.maximum(lo, x), lo)
        x_new = _safeguarded_step(x, g, slope / total, lo, hi)
        step = np.where(moving & ~converged, x_new - x, 0.0)
        converged = converged | ((np.abs(step) < _TOL) & (np.asarray(mismatch) < _TOL))
        if np.all(converged | ~moving):
            break
        if inner is not None:
            log_q_i, dlog_q, _ = inner
            step = (x_new + np.log(layout.flow_scale) - log_q_i) / dlog_q
            state = np.where(converged, state, state + np.clip(step, -5.0, 5.0))
        x = np.where(moving & ~converged, x_new, x)
    return q, pieces, mu, moving, total, iteration, converged | ~moving


def solve_for_flow(line, fluid, drive, gravity, back_pressure, pries) -> Solved:
    """Flow at each net drive ``drive`` [Pa] (= source pressure + rho g h - back pressure).

    ``gravity`` [Pa] (rho g h) and ``back_pressure`` [Pa] give the required source
    pressure of the result.  256 or more drives through a shared line take the tabulated
    characteristic (when its error check passes), the others the Newton path.
    """
    if np.size(drive) >= CURVE_MIN_SCENARIOS:
        shared = build_layout(line, fluid, (), pries)
        if shared.shape == ():
            solved = solve_on_characteristic(line, shared, fluid, np.asarray(drive), pries)
            if solved is not None:
                q_out, pieces, mu, moving, total, layout = solved
                net = np.where(moving, total, 0.0)
                return Solved(
                    layout,
                    q_out,
                    pieces,
                    mu,
                    moving,
                    net,
                    net + back_pressure - gravity,
                    0,
                    np.ones(layout.shape, bool),
                )
    layout = build_layout(line, fluid, np.shape(drive), pries)
    drive = drive * np.ones(layout.shape)
    q, pieces, mu, moving, total, iterations, converged = _newton(layout, fluid, drive)
    net = np.where(moving, total, 0.0)
    return Solved(
        layout,
        np.where(moving, q, 0.0),
        pieces,
        mu,
        moving,
        net,
        net + back_pressure - gravity,
        iterations,
        converged,
    )


def solve_for_pressure(line, fluid, q_in, gravity, back_pressure, pries) -> Solved:
    """Losses at each prescribed flow ``q_in`` [m^3/s] and the source pressure they need."""
    shape = np.broadcast_shapes(q_in.shape, np.shape(gravity), back_pressure.shape)
    positive = q_in[q_in > MIN_FLOW]
    if q_in.size >= CURVE_MIN_SCENARIOS and positive.size:
        shared = build_layout(line, fluid, (), pries)
        table = None
        if shared.shape == ():
            table = _tabulate(
                line, fluid, float(positive.min()) / 1.01, float(positive.max()) * 1.01, pries
            )
        if table is not None:
            layout = build_layout(line, fluid, shape, pries)
            q = q_in * np.ones(shape)
            moving = q > MIN_FLOW
            y = np.log(np.where(moving, q, float(positive.min())))
            pieces, mu, total = _parts_on_curve(table, layout, fluid, y)
            net = np.where(moving, total, 0.0)
            return Solved(
                layout,
                q,
                pieces,
                mu,
                moving,
                net,
                net + back_pressure - gravity,
                0,
                np.ones(shape, bool),
            )
    layout = build_layout(line, fluid, shape, pries)
    q = q_in * np.ones(layout.shape)
    moving = q > MIN_FLOW
    q_safe = np.where(moving, q, 1e-100)  # any flow; the results are masked below
    total, _, pieces, mu, _ = exact_losses(layout, fluid, q_safe)
    required = np.where(moving, total, 0.0) + back_pressure - gravity
    return Solved(
        layout,
        q,
        pieces,
        mu,
        moving,
        required + gravity - back_pressure,
        required,
        1,
        np.ones(layout.shape, bool),
    )


# ---------------------------------------------------------------- the shared characteristic
def _characteristic(line, fluid, q_grid, pries):
    """The line's exact loss curve on a grid of flows (one small vectorized pass)."""
    layout = build_layout(line, fluid, q_grid.shape, pries)
    return exact_losses(layout, fluid, q_grid)


def solve_on_characteristic(line, shared, fluid, drive, pries):
    """Flow for many drives through one line whose geometry and fluid are shared.

    Every scenario then lies on the same characteristic, losses(Q).  It is computed
    exactly on a log-spaced grid of flows and inverted by cubic Hermite interpolation
    in (ln losses, ln Q) with the exact slopes; each part's drop and apparent viscosity
    are interpolated the same way.  The interpolation error is checked at the grid
    midpoints against exact evaluations (below 1e-9 in ln Q, else the grid is refined
    or the Newton path is used).  Returns None to fall back to the Newton path.
    """
    threshold = max(MIN_DRIVE, float(yield_drop(shared, fluid)) * (1.0 + 1e-9))
    moving = drive > threshold
    if not np.any(moving):
        return None
    d_lo, d_hi = float(np.min(drive[moving])), float(np.max(drive[moving]))
    q_lo = float(guess(shared, fluid, np.asarray(d_lo))) / 4.0
    q_hi = float(guess(shared, fluid, np.asarray(d_hi))) * 4.0
    for _ in range(12):  # widen until the curve spans every drive
        ends = _characteristic(line, fluid, np.array([q_lo, q_hi]), pries)[0]
        if ends[0] < d_lo and ends[1] > d_hi:
            break
        q_lo = q_lo / 8.0 if ends[0] >= d_lo else q_lo
        q_hi = q_hi * 8.0 if ends[1] <= d_hi else q_hi
    else:
        return None
    table = _tabulate(line, fluid, q_lo, q_hi, pries)
    if table is None:
        return None
    log_q, log_t, dydx = table[0], table[1], table[2]
    y = _hermite(log_t, log_q, dydx, np.log(np.where(moving, drive, d_lo)))
    layout = build_layout(line, fluid, drive.shape, pries)
    pieces_out, mu_out, total_out = _parts_on_curve(table, layout, fluid, y)
    return np.where(moving, np.exp(y), 0.0), pieces_out, mu_out, moving, total_out, layout


def _tabulate(line, fluid, q_lo, q_hi, pries):
    """The characteristic on a log grid from q_lo to q_hi, checked at the midpoints."""
    span = np.log(q_hi / q_lo)
    n_grid = int(np.clip(np.ceil(span / 0.004), 64, 20000)) + 1
    for _ in range(4):
        log_q = np.linspace(np.log(q_lo), np.log(q_hi), n_grid)
        total, slope, pieces, mu, dlog_mu = _characteristic(line, fluid, np.exp(log_q), pries)
        log_t = np.log(total)
        dydx = total / slope  # d ln Q / d ln losses
        log_mid = 0.5 * (log_q[1:] + log_q[:-1])
        log_mid_total = np.log(_characteristic(line, fluid, np.exp(log_mid), pries)[0])
        if np.all(np.diff(log_t) > 0):
            err_q = np.abs(_hermite(log_t, log_q, dydx, log_mid_total) - log_mid)
            forward = _hermite_apply(
                _hermite_basis(log_q, log_mid, uniform=True), log_t, 1.0 / dydx
            )
            err_t = np.abs(forward - log_mid_total)
            if max(np.max(err_q), np.max(err_t)) < _CURVE_TOL:
                return log_q, log_t, dydx, pieces, mu, dlog_mu
        n_grid = 2 * n_grid - 1
    return None


def _parts_on_curve(table, layout, fluid, y):
    """Per-part drops and apparent viscosities at ln(Q) = y from the tabulated curve."""
    log_q, _, _, pieces, mu, dlog_mu = table
    q = np.exp(y)
    dp_lumen_grid, lumen_slope_grid = pieces[0], pieces[6]
    n_l = dp_lumen_grid.shape[0]
    dp_lumen = np.empty((n_l, *np.shape(y)))
    mu_out = np.empty((n_l, *np.shape(y)))
    mu_grid = mu * np.ones_like(dp_lumen_grid)
    dlog_mu_grid = dlog_mu * np.ones_like(dp_lumen_grid)
    basis = _hermite_basis(log_q, y, uniform=True)
    for j in range(n_l):
        dp_lumen[j] = np.exp(
            _hermite_apply(basis, np.log(dp_lumen_grid[j]), lumen_slope_grid[j] / dp_lumen_grid[j])
        )
        if newtonian_path(layout, fluid):
            mu_out[j] = mu_grid[j, 0]
        else:
            mu_out[j] = np.exp(_hermite_apply(basis, np.log(mu_grid[j]), dlog_mu_grid[j]))
    area = layout.area
    u = q / area
    re = layout.density * u * layout.diameter / mu_out
    q2 = q * q
    dp_k = layout.k_coefficient * q2 + layout.k_linear * q
    dp_meas = layout.measured_a * q + layout.measured_b * q2
    dp_exit = layout.exit_coefficient * q2
    total_out = dp_lumen.sum(axis=0) + dp_k.sum(axis=0) + dp_meas.sum(axis=0) + dp_exit
    return (dp_lumen, dp_k, dp_meas, dp_exit, re, u), mu_out, total_out


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
    k, (b00, b10, b01, b11) = basis
    return b00 * y_grid[k] + b10 * slope_grid[k] + b01 * y_grid[k + 1] + b11 * slope_grid[k + 1]


def _hermite(x_grid, y_grid, slope_grid, x):
    """Cubic Hermite interpolation of y(x) on an increasing grid with slopes dy/dx."""
    return _hermite_apply(_hermite_basis(x_grid, x), y_grid, slope_grid)
