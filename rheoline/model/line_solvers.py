"""The solvers of a line: losses at a flow, the flow at a drive, the pressure for a flow.

Everything here works on a :class:`~rheoline.model.line_layout.LineLayout` (the line's
per-part arrays for one fluid), vectorized over the scenario shape:

* :func:`exact_losses`: every loss at a flow, with d(losses)/d ln Q (for a non-Newtonian
  fluid each lumen's apparent viscosity comes from the fluid's tabulated
  Rabinowitsch-Mooney relation where the layout carries one, else from an exact inner
  solve of its wall shear rate);
* :func:`solve_for_flow`: safeguarded Newton iterations on ln(losses) - ln(drive) in
  ln(Q) (:mod:`rheoline.model.line_newton`), or, for many drives through one shared line
  where that is cheaper, the line's exact characteristic tabulated and inverted
  (:mod:`rheoline.model.line_characteristic`);
* :func:`solve_for_pressure`: one exact evaluation at the prescribed flow (or the
  tabulated characteristic where that is cheaper).

**Blocks.**  A solve of more scenarios than one block holds
(:mod:`rheoline.model.line_blocks`, some 8,000 lumen-scenarios) lays the line out and
solves it one block at a time and writes each block's answers into the result's arrays:
the working memory stays a few megabytes whatever the number of scenarios, and each block's
arrays stay in the processor's cache.

**Tabulated rheology.**  Where the fluid is non-Newtonian, the same in every scenario,
and the solve is large enough to repay it (:data:`TABLE_MIN_EVALUATIONS`), its
Rabinowitsch-Mooney relation is tabulated once (:mod:`rheoline.model.rheology_table`,
checked to 1e-12) and read by interpolation instead of integrating the constitutive law
in every lumen at every iteration.

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

import sys
from typing import NamedTuple

import numpy as np

from rheoline.model import line_characteristic as _curve
from rheoline.model.line_blocks import Blocks, blockable
from rheoline.model.line_layout import build_layout, lumen_row_count, scenario_shape
from rheoline.model.line_losses import (  # noqa: F401  (re-exported: the solvers' physics)
    apparent_viscosity,
    exact_losses,
    guess,
    joint_iteration,
    losses,
    newtonian_path,
    rheology_of,
    tabulated_viscosity,
    yield_drop,
)
from rheoline.model.line_newton import newton_flow
from rheoline.model.rheology_table import cached_table, rheology_table

__all__ = [
    "Drive",
    "Solved",
    "exact_losses",
    "losses",
    "guess",
    "yield_drop",
    "solve_for_flow",
    "solve_for_pressure",
    "MIN_DRIVE",
    "MIN_FLOW",
    "CURVE_MIN_SCENARIOS",
    "TABLE_MIN_EVALUATIONS",
]

#: Drives [Pa] and flows [m^3/s] at or below these are numerically zero: flows that small
#: would underflow double precision in the friction terms, so they give a zero result.
MIN_DRIVE = 1e-150
MIN_FLOW = 1e-200
#: Fewest scenarios for which the shared characteristic is considered (it is then taken
#: where it costs less than the Newton path; see :mod:`rheoline.model.line_characteristic`).
CURVE_MIN_SCENARIOS = 256
#: Lumen evaluations (scenarios x lumens x passes) from which a shared non-Newtonian
#: rheology is tabulated: building the table costs about this many joint-iteration passes.
TABLE_MIN_EVALUATIONS = 50_000
_SOLVERS = sys.modules[__name__]


class Drive(NamedTuple):
    """What drives the scenarios: gravity head [m] of a fluid of ``density`` [kg/m^3],
    source and back pressures [Pa], or a prescribed ``flow`` [m^3/s] (then the source
    pressure is solved).  Arrays broadcast to the scenario shape."""

    head: object
    source_pressure: object
    back_pressure: object
    density: object
    gravity: float
    flow: object = None

    def take(self, take):
        """The drive of one block (``take`` is :meth:`Block.take`)."""
        return Drive(*(take(v) for v in self[:4]), self.gravity, take(self.flow))

    @property
    def shape(self):
        return np.broadcast_shapes(*(np.shape(v) for v in (*self[:4], self.flow) if v is not None))

    def gravity_pressure(self):
        """rho g h [Pa]."""
        return self.density * self.gravity * self.head

    def net(self):
        """Net drive [Pa]: source pressure + rho g h - back pressure."""
        return self.source_pressure + self.gravity_pressure() - self.back_pressure


class Solved(NamedTuple):
    """What a solve hands to :func:`rheoline.model.line_result.make_result`: the answers
    over the whole scenario shape, and the layout (or a function building it: a large
    solve lays the whole line out only if a result's per-part property asks for it)."""

    layout: object
    flow: np.ndarray
    drops: np.ndarray
    exit_drop: np.ndarray
    reynolds: np.ndarray
    velocity: np.ndarray
    viscosity: np.ndarray
    moving: np.ndarray
    net: np.ndarray
    required: np.ndarray
    iterations: int
    converged: np.ndarray


# ---------------------------------------------------------------------------- the answers
def part_values(layout, q, pieces, moving, n_parts):
    """Per-part drops, Reynolds numbers and mean velocities ``(n_parts, *shape)`` and the
    exit drop, from a solve's pieces (zero where the scenario does not move; NaN where a
    quantity does not apply)."""
    dp_lumen, dp_k, dp_meas, dp_exit, re, u = pieces[:6]
    shape = np.shape(q)
    drops = np.zeros((n_parts, *shape))
    reynolds = np.full((n_parts, *shape), np.nan)
    velocity = np.full((n_parts, *shape), np.nan)
    drops[layout.lumen_rows] = dp_lumen
    drops[layout.k_rows] = dp_k
    drops[layout.measured_rows] = dp_meas
    reynolds[layout.lumen_rows] = re
    velocity[layout.lumen_rows] = u
    if len(layout.k_rows):
        velocity[layout.k_rows] = q / layout.k_velocity_area
    drops = np.where(moving, drops, 0.0)
    reynolds = np.where(moving, reynolds, np.where(np.isnan(reynolds), np.nan, 0.0))
    velocity = np.where(moving, velocity, np.where(np.isnan(velocity), np.nan, 0.0))
    return drops, reynolds, velocity, np.where(moving, dp_exit * np.ones(shape), 0.0)


class _Answers:
    """The result arrays of a solve, filled one block at a time (or at once: ``block`` None)."""

    def __init__(self, shape, n_parts, n_lumens, viscosity=None):
        self.shape, self.n_parts = shape, n_parts
        self.flow, self.net, self.required, self.exit_drop = (np.empty(shape) for _ in range(4))
        self.moving = np.empty(shape, dtype=bool)
        self.converged = np.empty(shape, dtype=bool)
        self.drops, self.reynolds, self.velocity = (np.empty((n_parts, *shape)) for _ in range(3))
        # a Newtonian fluid without a diameter correction: one viscosity, no array
        self.viscosity = viscosity if viscosity is not None else np.empty((n_lumens, *shape))
        self._own_viscosity = viscosity is None
        self.iterations = 0

    def put(self, block, layout, q, pieces, mu, moving, total, drive, converged, iterations):
        """Store a block's answers (the whole scenario shape's when ``block`` is None)."""
        drops, reynolds, velocity, exit_drop = part_values(layout, q, pieces, moving, self.n_parts)
        net = np.where(moving, total, 0.0)
        per_scenario = {
            "flow": q,
            "net": net,
            "required": net + drive.back_pressure - drive.gravity_pressure(),
            "exit_drop": exit_drop,
            "moving": moving,
            "converged": converged,
        }
        per_part = {"drops": drops, "reynolds": reynolds, "velocity": velocity}
        if self._own_viscosity:
            per_part["viscosity"] = mu * np.ones_like(pieces[0])
        if block is None:
            for name, value in (*per_scenario.items(), *per_part.items()):
                getattr(self, name)[...] = value
        else:
            sl = slice(block.start, block.stop)
            for name, value in per_scenario.items():
                getattr(self, name).reshape(-1)[sl] = value
            for name, value in per_part.items():
                array = getattr(self, name)
                array.reshape(len(array), -1)[:, sl] = value
        self.iterations = max(self.iterations, int(iterations))

    def solved(self, layout):
        """The :class:`Solved` of the whole solve."""
        return Solved(
            layout,
            self.flow,
            self.drops,
            self.exit_drop,
            self.reynolds,
            self.velocity,
            self.viscosity,
            self.moving,
            self.net,
            self.required,
            self.iterations,
            self.converged,
        )


def _laid_out(line, fluid, drive, pries, table, blocks):
    """``(block, layout, drive)`` of each block of a solve; one ``(None, layout, drive)``
    over the whole scenario shape when one block holds every scenario."""
    if blocks.single:
        yield None, build_layout(line, fluid, drive.shape, pries, table=table), drive
        return
    for block in blocks:
        layout = build_layout(line, fluid, pries=pries, block=block, table=table)
        yield block, layout, drive.take(block.take)


def _result_layout(line, fluid, drive, pries, table, blocks, layout):
    """The layout a result keeps: the solve's own (one block), else a function building
    the whole line's layout if a result's per-part property asks for it."""
    if blocks.single:
        return layout
    return lambda: build_layout(line, fluid, drive.shape, pries, table=table)


# ---------------------------------------------------------------------------- the solves
def _plan(line, fluid, drive, passes):
    """The scenario shape, its blocks and the rheology table (or None) of a solve."""
    shape = scenario_shape(line, fluid, drive.shape)
    n_lumens = lumen_row_count(line) or 1
    blocks = Blocks(shape, n_lumens)
    if not blockable(fluid.rheology):
        blocks = Blocks(shape, n_lumens, size=max(1, blocks.count))
    table = None
    if not fluid.is_newtonian:
        found = cached_table(fluid.rheology)
        if found is not False:
            table = found
        elif blocks.count * n_lumens * passes >= TABLE_MIN_EVALUATIONS:
            table = rheology_table(fluid.rheology)
    return shape, blocks, table


def _constant_viscosity(fluid, pries, n_lumens, shape):
    """A Newtonian fluid's one viscosity broadcast over the lumens and scenarios (no
    array of it), or None where it varies (a diameter correction, per-scenario fluids)."""
    mu = fluid.rheology.viscosity() if fluid.is_newtonian else None
    if mu is None or pries or np.ndim(mu):
        return None
    return np.broadcast_to(np.asarray(float(mu)), (n_lumens, *shape))


class _FlowCurve(NamedTuple):
    """The shared characteristic of a flow solve, the drive the fluid needs to move, and
    the lowest moving drive (which the non-moving scenarios are evaluated at)."""

    curve: object
    threshold: float
    low: float


def _shared_curve(line, fluid, drive, pries, table):
    """The characteristic for many drives through one shared line, where it is cheaper
    than the Newton path and passes its check (else None)."""
    count = int(np.prod(drive.shape))
    if count < _SOLVERS.CURVE_MIN_SCENARIOS or scenario_shape(line, fluid) != ():
        return None
    shared = build_layout(line, fluid, (), pries, table=table)
    net_drive = np.asarray(drive.net(), dtype=float)
    threshold = max(MIN_DRIVE, float(yield_drop(shared, fluid)) * (1.0 + 1e-9))
    moving = net_drive > threshold
    if not np.any(moving):
        return None
    d_lo, d_hi = float(np.min(net_drive[moving])), float(np.max(net_drive[moving]))
    del net_drive, moving
    span = _curve.flow_range(line, shared, fluid, d_lo, d_hi, pries, table)
    if span is None:
        return None
    n_grid = _curve.grid_size(*span)
    if not _curve.cheaper_than_newton(count, n_grid, _curve.exact_pass_cost(shared, fluid)):
        return None
    curve = _curve.characteristic(line, fluid, *span, pries, table)
    return None if curve is None else _FlowCurve(curve, threshold, d_lo)


def solve_for_flow(line, fluid, drive, pries, start=None) -> Solved:
    """Flow at each net drive of ``drive`` (a :class:`Drive`).

    Many drives through a shared line take the tabulated characteristic where it is
    cheaper and its error check passes, the others the Newton path, in blocks.  ``start``
    is an optional starting flow [m^3/s] (a warm start, broadcasting to the scenarios).
    """
    shape, blocks, table = _plan(line, fluid, drive, 4)
    n_parts, n_lumens = len(line.parts), lumen_row_count(line)
    curve = None if start is not None else _shared_curve(line, fluid, drive, pries, table)
    viscosity = _constant_viscosity(fluid, pries, n_lumens, shape)
    answers = _Answers(shape, n_parts, n_lumens, None if blocks.single else viscosity)
    for block, layout, d in _laid_out(line, fluid, drive, pries, table, blocks):
        net = d.net() * np.ones(layout.shape)
        if curve is not None:
            q, pieces, mu, moving, total = _on_curve(curve, layout, net)
            answers.put(block, layout, q, pieces, mu, moving, total, d, True, 0)
            continue
        warm = None if start is None or block is None else block.take(start)
        res = newton_flow(layout, fluid, net, _SOLVERS, start if block is None else warm)
        q = np.where(res.moving, res.flow, 0.0)
        answers.put(
            block,
            layout,
            q,
            res.pieces,
            res.viscosity,
            res.moving,
            res.total,
            d,
            res.converged,
            res.iterations,
        )
    return answers.solved(_result_layout(line, fluid, drive, pries, table, blocks, layout))


def _on_curve(curve, layout, net):
    """Flows and losses of the scenarios of ``layout`` at net drives ``net`` on the curve."""
    moving = net > curve.threshold
    y = curve.curve.log_flow(np.where(moving, net, curve.low))
    pieces, mu, total = curve.curve.parts(layout, y)
    return np.where(moving, np.exp(y), 0.0), pieces, mu, moving, total


def solve_for_pressure(line, fluid, drive, pries) -> Solved:
    """Losses at each prescribed flow ``drive.flow`` [m^3/s] and the source pressure they
    need (one exact evaluation per scenario, in blocks; or the shared characteristic where
    that is cheaper)."""
    shape, blocks, table = _plan(line, fluid, drive, 1)
    n_parts, n_lumens = len(line.parts), lumen_row_count(line)
    curve = _pressure_curve(line, fluid, drive, pries, table)
    viscosity = _constant_viscosity(fluid, pries, n_lumens, shape)
    answers = _Answers(shape, n_parts, n_lumens, None if blocks.single else viscosity)
    for block, layout, d in _laid_out(line, fluid, drive, pries, table, blocks):
        q = d.flow * np.ones(layout.shape)
        moving = q > MIN_FLOW
        if curve is not None:
            pieces, mu, total = curve.parts(layout, np.log(np.where(moving, q, curve_low(curve))))
        else:  # any flow where none moves: the results are masked
            total, _, pieces, mu, _ = exact_losses(layout, fluid, np.where(moving, q, 1e-100))
        answers.put(block, layout, q, pieces, mu, moving, total, d, True, 1)
    return answers.solved(_result_layout(line, fluid, drive, pries, table, blocks, layout))


def curve_low(curve):
    """The lowest flow [m^3/s] of a characteristic's grid."""
    return float(np.exp(curve.log_q[0]))


def _pressure_curve(line, fluid, drive, pries, table):
    """The characteristic over the prescribed flows where it is cheaper than evaluating
    each (else None)."""
    count = int(np.prod(drive.shape))
    if count < _SOLVERS.CURVE_MIN_SCENARIOS or scenario_shape(line, fluid) != ():
        return None
    shared = build_layout(line, fluid, (), pries, table=table)
    q_in = np.asarray(drive.flow, dtype=float)
    positive = q_in[q_in > MIN_FLOW]
    if not positive.size:
        return None
    q_lo, q_hi = float(positive.min()) / 1.01, float(positive.max()) * 1.01
    del q_in, positive
    cost = _curve.exact_pass_cost(shared, fluid)
    if not _curve.cheaper_than_newton(count, _curve.grid_size(q_lo, q_hi), cost, cost):
        return None
    return _curve.characteristic(line, fluid, q_lo, q_hi, pries, table)


def losses_at(line, fluid, drive, pries, residual=False):
    """Losses [Pa] and d(losses)/dQ [Pa s/m^3] at the flows ``drive.flow`` (>= 0), over the
    scenario shape, in blocks; with ``residual`` the losses minus the net drive (and at
    zero flow the losses of the smallest flow), else at zero flow the yield pressure."""
    shape, blocks, table = _plan(line, fluid, drive, 1)
    total_out, slope_out = np.empty(shape), np.empty(shape)
    for block, layout, d in _laid_out(line, fluid, drive, pries, table, blocks):
        q_in = d.flow * np.ones(layout.shape)
        q = np.maximum(q_in, MIN_FLOW)
        total, slope = exact_losses(layout, fluid, q)[:2]
        if residual:
            total = total - d.net()
        else:  # at (numerically) zero flow the losses are the yield pressure (0 for most)
            total = np.where(q_in > MIN_FLOW, total, yield_drop(layout, fluid))
        sl = slice(None) if block is None else slice(block.start, block.stop)
        total_out.reshape(-1)[sl] = np.broadcast_to(total, layout.shape).reshape(-1)
        slope_out.reshape(-1)[sl] = np.broadcast_to(slope / q, layout.shape).reshape(-1)
    return total_out, slope_out
