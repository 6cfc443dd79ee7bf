"""The physics of a line laid out for a fluid: every loss at a flow, with its slope.

Everything here works on a :class:`~rheoline.model.line_layout.LineLayout` (the line's
per-part arrays for one fluid, or for one block of a large solve), vectorized over its
scenarios:

* :func:`losses`: every part's drop at a flow with the apparent viscosity of each lumen
  given, and d(losses)/d ln Q, in one pass (the residual pass of the solvers);
* :func:`apparent_viscosity`: each lumen's apparent viscosity at a flow: the fluid's own
  (Newtonian), read from the layout's tabulated Rabinowitsch-Mooney relation
  (:mod:`rheoline.model.rheology_table`; exact inner solve outside it), or carried from a
  joint Rabinowitsch state (the Newton path without a table);
* :func:`exact_losses`: the losses at a flow with each apparent viscosity solved;
* :func:`guess`: the laminar-plus-kinetic closed form the Newton path starts from;
* :func:`yield_drop`: the drive a yield-stress fluid needs to move.

The solvers (:mod:`rheoline.model.line_solvers`) call these; they re-export the names.
"""

from __future__ import annotations

import numpy as np

from rheoline.model import friction as _friction
from rheoline.model import lumen as _lumen
from rheoline.model.rheology_table import LOG_THREE_QUARTERS

__all__ = [
    "rheology_of",
    "newtonian_path",
    "joint_iteration",
    "tabulated_viscosity",
    "apparent_viscosity",
    "losses",
    "exact_losses",
    "yield_drop",
    "guess",
]


def rheology_of(layout, fluid):
    """The rheology model of the layout's scenarios (a block's own parameters)."""
    return fluid.rheology if layout.rheology is None else layout.rheology


def newtonian_path(layout, fluid):
    """True when the apparent viscosity does not depend on the flow."""
    return fluid.is_newtonian or layout.diameter.shape[0] == 0


def joint_iteration(layout, fluid):
    """True when each lumen's wall shear rate is iterated with the flow (no table)."""
    return not newtonian_path(layout, fluid) and layout.table is None


def tabulated_viscosity(layout, fluid, log_q):
    """Apparent viscosity of each lumen at ln(Q) from the layout's rheology table, and its
    log-slope; exact (inner solve) where the flow lies outside the table."""
    table = layout.table
    phi = log_q + layout.phi_offset
    m, dm = table.evaluate(phi)
    mu = layout.viscosity_factor * np.exp(m - phi + LOG_THREE_QUARTERS)
    dlog_mu = dm - 1.0
    outside = ~table.contains(phi)
    if np.any(outside):
        radius = np.broadcast_to(layout.diameter / 2.0, phi.shape)[outside]
        flow = np.broadcast_to(np.exp(log_q) * layout.flow_scale, phi.shape)[outside]
        _, _, tau, dlog_q, dlog_tau = _lumen._solve_log_wall_shear_rate(
            rheology_of(layout, fluid), flow, radius
        )
        factor = np.broadcast_to(layout.viscosity_factor, phi.shape)[outside]
        mu, dlog_mu = mu.copy(), dlog_mu.copy()
        mu[outside] = factor * tau * np.pi * radius**3 / (4.0 * flow)
        dlog_mu[outside] = dlog_tau / dlog_q - 1.0
    return mu, dlog_mu


def apparent_viscosity(layout, fluid, log_q, state):
    """Apparent viscosity of each lumen at ln(Q): constant (Newtonian), tabulated, or from
    the joint Rabinowitsch state (a Taylor step from the inner state to ln(Q))."""
    if state is None:
        if not newtonian_path(layout, fluid):
            return (*tabulated_viscosity(layout, fluid, log_q), None)
        mu = rheology_of(layout, fluid).viscosity() * layout.viscosity_factor
        return mu, 0.0, None
    radius = layout.diameter / 2.0
    q_i, tau_i, dlog_q, dlog_tau = _lumen._rabinowitsch_state(
        rheology_of(layout, fluid), state, radius
    )
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
    Reynolds numbers, lumen mean velocities, lumen d(drop)/d ln Q)``.  Each lumen's drop is
    :math:`f_{app} (L/D) \rho \bar u^2 / 2` (:mod:`rheoline.model.friction`, written with
    f Re so that a vanishing flow stays finite) plus its entrance or transition loss.
    """
    # a yield-stress fluid's apparent viscosity is unbounded as the flow vanishes: Re can
    # underflow to 0; f Re is the laminar value there whatever Re is, so a floor is exact
    re = np.maximum(q * layout.reynolds_factor / mu, 1e-300)
    a_re, dlog_a = _friction._laminar_term(
        re, None, layout.developing_rows, layout.laminar_f_re, inv_x=re * layout.inverse_lod
    )
    f_re, dlog_f = _friction._churchill_blend(
        re, a_re, dlog_a, layout.relative_roughness, smooth=layout.smooth
    )
    dp_f = f_re * mu * q * layout.friction_factor
    q2 = q * q
    dp_m = layout.minor_factor * q2
    dp_lumen = dp_f + dp_m
    lumen_slope = dp_f * (2.0 + dlog_f * (1.0 - dlog_mu)) + 2.0 * dp_m
    dp_exit = layout.exit_coefficient * q2
    total = dp_lumen.sum(axis=0) + dp_exit
    slope = lumen_slope.sum(axis=0) + 2.0 * dp_exit
    empty = np.empty((0, *np.shape(total)))
    dp_k = dp_meas = empty
    if layout.k_coefficient.shape[0]:
        k_quad = layout.k_coefficient * q2
        k_lin = layout.k_linear * q
        dp_k = k_quad + k_lin
        total = total + dp_k.sum(axis=0)
        slope = slope + (2.0 * k_quad + k_lin).sum(axis=0)
    if layout.measured_a.shape[0]:
        lin = layout.measured_a * q
        quad = layout.measured_b * q2
        dp_meas = lin + quad
        total = total + dp_meas.sum(axis=0)
        slope = slope + (lin + 2.0 * quad).sum(axis=0)
    u = q / layout.area
    return total, slope, (dp_lumen, dp_k, dp_meas, dp_exit, re, u, lumen_slope)


def exact_losses(layout, fluid, q):
    """Losses at ``q`` with each lumen's apparent viscosity solved (or read from the
    layout's checked rheology table).

    Returns ``(total [Pa], d total / d ln Q [Pa], pieces, apparent viscosity [Pa s],
    d ln(viscosity) / d ln Q)``.
    """
    if newtonian_path(layout, fluid) or layout.table is not None:
        mu, dlog_mu, _ = apparent_viscosity(layout, fluid, np.log(q), None)
    else:
        radius = layout.diameter / 2.0
        y, q_i, tau_i, dlog_q, dlog_tau = _lumen._solve_log_wall_shear_rate(
            rheology_of(layout, fluid), q * layout.flow_scale * np.ones_like(radius), radius
        )
        # with the target flow, so that 64/Re gives 2 L tau_w / R even where the inner
        # solve is limited by rounding (a yield-stress fluid at a vanishing flow)
        mu = layout.viscosity_factor * tau_i * np.pi * radius**3 / (4.0 * q * layout.flow_scale)
        dlog_mu = dlog_tau / dlog_q - 1.0
    total, slope, pieces = losses(layout, q, mu, dlog_mu)
    return total, slope, pieces, mu, dlog_mu


def yield_drop(layout, fluid):
    """Net drive [Pa] a yield-stress fluid needs to move, sum of 2 L tau_y / R (else 0)."""
    tau_y = getattr(rheology_of(layout, fluid), "yield_stress", None)
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
    rheology = rheology_of(layout, fluid)
    mu = rheology.infinite_shear_viscosity * layout.viscosity_factor
    q = _quadratic_guess(layout, mu, drive)
    if not newtonian_path(layout, fluid):
        radius = layout.diameter / 2.0
        # a yield-stress fluid's viscosity is unbounded at vanishing shear: a pass whose
        # guess overflows or underflows keeps the previous, finite guess
        with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
            for _ in range(3):
                rate = 4.0 * q * layout.flow_scale / (np.pi * radius**3)
                mu = rheology.viscosity(rate) * layout.viscosity_factor
                refined = _quadratic_guess(layout, mu, drive)
                q = np.where(np.isfinite(refined) & (refined > 0.0), refined, q)
    return q
