r"""The flow of a line at a drive by safeguarded Newton iterations, for any layout.

Works on a :class:`~rheoline.model.line_layout.LineLayout` (a whole solve, or one block of
scenarios of a large one) and a net drive of the layout's shape:

* start from the laminar-plus-kinetic closed form (:func:`rheoline.model.line_solvers.guess`)
  or from a given flow (a warm start);
* iterate Newton on :math:`g(x) = \ln(\mathrm{losses}(e^x)) - \ln(\mathrm{drive})` in
  :math:`x = \ln Q`, with the derivative computed together with the residual and a bracket
  kept from the residual's signs (a step leaving it bisects);
* stop a scenario when its step falls below 1e-11, or **finish** it when its Newton step
  falls below :data:`FINISH_STEP` while converging at least linearly: that last step is
  taken without another residual pass, and every loss is carried to the finished flow to
  first order (with the exact slopes).  Newton's error after a step :math:`s` is
  :math:`C s^2` with :math:`C = |g''|/(2 g')`, which stays below about 2 for every fluid and
  regime of the line's physics (the log-slope of the losses moves between 1 and 2), so a
  finished flow carries an error of about 1e-12 relative and every loss about as much:
  the accuracy of one more pass, one pass fewer.

For a non-Newtonian fluid the apparent viscosity of each lumen comes from the fluid's
tabulated Rabinowitsch-Mooney relation where the layout carries one
(:mod:`rheoline.model.rheology_table`), else each lumen's wall shear rate is iterated
jointly with the flow (:func:`rheoline.model.line_solvers.apparent_viscosity`).
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

__all__ = ["NewtonFlow", "newton_flow", "FINISH_STEP"]

_TOL = 1e-11  # convergence on ln(Q)
#: Newton steps in ln(Q) below this are taken to first order, without another pass.
FINISH_STEP = 1e-6
_MAX_ITER = 60


class NewtonFlow(NamedTuple):
    """The converged flow of every scenario and every loss at it."""

    flow: np.ndarray
    pieces: tuple
    viscosity: np.ndarray
    moving: np.ndarray
    total: np.ndarray
    iterations: int
    converged: np.ndarray


def _start(layout, fluid, drive, start, solvers):
    """Starting ln(Q), ln(drive), the moving mask and the Rabinowitsch state (or None)."""
    moving = drive > solvers.MIN_DRIVE
    drive_pos = np.where(moving, drive, 1.0)
    x = np.log(solvers.guess(layout, fluid, drive_pos))
    if start is not None:
        warm = np.broadcast_to(np.asarray(start, dtype=float), x.shape)
        usable = np.isfinite(warm) & (warm > solvers.MIN_FLOW)
        x = np.where(usable, np.log(np.where(usable, warm, 1.0)), x)
    log_drive = np.log(drive_pos)
    state = None
    if solvers.joint_iteration(layout, fluid):
        radius = layout.diameter / 2.0
        # a yield-stress fluid needs the yield pressure 2 L tau_y / R in every lumen to move
        if getattr(solvers.rheology_of(layout, fluid), "yield_stress", None) is not None:
            moving = (drive > solvers.yield_drop(layout, fluid) * (1.0 + 1e-9)) & moving
            log_drive = np.log(np.where(moving, drive, 1.0))
            x = np.where(moving, x, 0.0)
        state = np.log(4.0 * layout.flow_scale / (np.pi * radius**3)) + x
    return x, log_drive, moving, state


def _safeguarded_step(x, g, g_prime, lo, hi):
    """Newton step kept strictly inside the bracket (else bisected), at most 5 in ln(Q);
    also where the step is Newton's own (not bisected, not clipped)."""
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
    clipped = np.minimum(np.maximum(x_new, x - 5.0), x + 5.0)
    return clipped, ~outside & (clipped == x_new)


def newton_flow(layout, fluid, drive, solvers, start=None) -> NewtonFlow:
    """Flow of every scenario of ``layout`` at its net drive ``drive`` [Pa].

    ``solvers`` is :mod:`rheoline.model.line_solvers` (the physics); ``start`` an optional
    starting flow [m^3/s] (a warm start; non-positive or non-finite entries are ignored).
    """
    x, log_drive, moving, state = _start(layout, fluid, drive, start, solvers)
    lo = np.full(layout.shape, -np.inf)
    hi = np.full(layout.shape, np.inf)
    done = ~moving
    finish = np.zeros(layout.shape)
    last = np.full(layout.shape, np.inf)
    for iteration in range(1, _MAX_ITER + 1):  # noqa: B007 (read after the loop)
        mu, dlog_mu, inner = solvers.apparent_viscosity(layout, fluid, x, state)
        q = np.exp(x)
        total, slope, pieces = solvers.losses(layout, q, mu, dlog_mu)
        g = np.log(total) - log_drive
        if inner is None:
            tight = consistent = True
        else:
            mismatch = np.max(np.abs(inner[2]), axis=0)
            consistent, tight = mismatch < 1e-3, mismatch < _TOL
        hi = np.where(consistent & (g > 0), np.minimum(hi, x), hi)
        lo = np.where(consistent & (g <= 0), np.maximum(lo, x), lo)
        x_new, newton = _safeguarded_step(x, g, slope / total, lo, hi)
        active = ~done
        step = np.where(active, x_new - x, 0.0)
        size = np.abs(step)
        converged = active & tight & (size < _TOL)
        finishing = active & tight & newton & ~converged & (size < FINISH_STEP)
        finishing &= size <= 0.1 * last
        finish = np.where(finishing, step, finish)
        done = done | converged | finishing
        if np.all(done):
            break
        last = np.where(newton, size, np.inf)
        if inner is not None:
            log_q_i, dlog_q, _ = inner
            inner_step = (x_new + np.log(layout.flow_scale) - log_q_i) / dlog_q
            state = np.where(done, state, state + np.clip(inner_step, -5.0, 5.0))
        x = np.where(done, x, x_new)
    # every scenario's losses were last evaluated at its final x: carry the finished ones
    # by their last Newton step
    if np.any(finish):
        q, pieces, mu, total = _carry(layout, q, pieces, mu, dlog_mu, finish)
    return NewtonFlow(q, pieces, mu, moving, total, iteration, done)


def _carry(layout, q, pieces, mu, dlog_mu, step):
    """The losses at ln(Q) + ``step`` from those at ln(Q), to first order in ``step``.

    Fittings, measured parts and the exit jet are polynomials in Q and are evaluated again
    exactly; a lumen's drop moves by its exact derivative times the step; its apparent
    viscosity by its exact log-slope.
    """
    dp_lumen, dp_k, dp_meas, _, _, _, lumen_slope = pieces
    q = q * np.exp(step)
    if np.ndim(dlog_mu) or dlog_mu:
        mu = mu * np.exp(dlog_mu * step)
    dp_lumen = dp_lumen + lumen_slope * step
    q2 = q * q
    if dp_k.shape[0]:
        dp_k = layout.k_coefficient * q2 + layout.k_linear * q
    if dp_meas.shape[0]:
        dp_meas = layout.measured_a * q + layout.measured_b * q2
    dp_exit = layout.exit_coefficient * q2
    re = q * layout.reynolds_factor / mu
    total = dp_lumen.sum(axis=0) + dp_k.sum(axis=0) + dp_meas.sum(axis=0) + dp_exit
    # first order: the slopes at the finished flow are not needed
    return q, (dp_lumen, dp_k, dp_meas, dp_exit, re, q / layout.area, lumen_slope), mu, total
