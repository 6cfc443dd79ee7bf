r"""Time to deliver a volume through a line: a falling-head bag and a decaying pressure bag.

As a bag empties its fluid surface falls, and a pressure infuser's cuff pressure falls
as the bag shrinks or as the cuff leaks, so the flow falls during the infusion.  With
the delivered volume :math:`V` and the flow :math:`Q` of the line at the current drive,

.. math:: \frac{dV}{dt} = Q\big(h(V),\, p(V, t)\big)

* When the drive depends on the delivered volume only (head falling linearly from
  ``head_full`` to ``head_empty``, pressure falling linearly from ``pressure_full`` to
  ``pressure_empty``), the time is the quadrature
  :math:`T = \int_0^{V} dV / Q(V)`, evaluated in a variable geometric in the drive (which
  removes the near-singularity of :math:`1/Q` when the bag empties close to the outlet
  level) with composite Gauss-Legendre rules refined until two agree, each in one
  vectorized line solve; ``relative_error`` and ``flags`` say where accuracy is not assured.
* When the pressure decays in time, :math:`p = p_0 e^{-t/\tau}`, the time is integrated
  over the delivered fraction, :math:`dt/d\phi = V / Q(t, \phi)`, with scipy's
  ``solve_ivp`` (all scenarios in one state vector), so the answer is read at
  :math:`\phi = 1` without event location.

The head as a linear function of the delivered volume is exact for a bag of constant
cross-section and an approximation for a collapsing bag; the user gives the heads when full
and when empty.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rheoline.errors import InputRangeError
from rheoline.model.conditions import count_words
from rheoline.model.line import Line, _check_line
from rheoline.model.line_solvers import MIN_DRIVE as _MIN_DRIVE
from rheoline.model.line_solvers import yield_drop as _yield_drop
from rheoline.model.provenance import merge_models
from rheoline.model.validation import check_finite, check_nonnegative, check_positive

__all__ = [
    "DeliveryResult",
    "falling_head_delivery_time",
    "pressure_bag_delivery_time",
    "check_falls",
]


def check_falls(full_name, full, empty_name, empty, unit):
    """Refuse an end value above the start value of a drive that falls as the bag empties
    (a falling head, a loosening cuff): a rising one contradicts the law.

    Examples
    --------
    >>> check_falls("head_full", 1.0, "head_empty", 1.5, "m")
    Traceback (most recent call last):
    ...
    rheoline.errors.InputRangeError: head_empty 1.5 m is above head_full 1 m: this drive falls \
as the bag empties; swap the two values, or give the same value for a constant drive
    """
    full, empty = np.asarray(full, dtype=float), np.asarray(empty, dtype=float)
    rises = np.broadcast_to(empty > full, np.broadcast_shapes(full.shape, empty.shape))
    if np.any(rises):
        at = np.flatnonzero(rises.ravel())[0]
        hi = float(np.broadcast_to(empty, rises.shape).ravel()[at])
        lo = float(np.broadcast_to(full, rises.shape).ravel()[at])
        raise InputRangeError(
            f"{empty_name} {hi:g} {unit} is above {full_name} {lo:g} {unit}: this drive falls as "
            "the bag empties; swap the two values, or give the same value for a constant drive",
            field=empty_name,
            value=hi,
        )


_gl_x, _gl_w = np.polynomial.legendre.leggauss(12)
#: 12-point Gauss-Legendre nodes and weights on (0, 1): the rule of one panel.
_PANEL_NODES = 0.5 * (_gl_x + 1.0)
_PANEL_WEIGHTS = 0.5 * _gl_w
#: Composite levels tried, in panels of the substituted variable: 1 and 2 first (one solve),
#: then 4, 8 and 16 while the estimated error exceeds ``_REFINE_RTOL`` somewhere.
_PANELS = (1, 2, 4, 8, 16)
_REFINE_RTOL = 1e-6
#: Estimated relative error above which a result is flagged (accuracy not assured).
_FLAG_RTOL = 1e-3


@dataclass(frozen=True)
class DeliveryResult:
    """Time to deliver a volume, with the flow at its start and end.

    Attributes
    ----------
    time : float or ndarray
        [s] to deliver the volume (inf where the flow stops first).
    initial_flow, final_flow : float or ndarray
        [m^3/s] at the start and at the end of the delivery.
    mean_flow : float or ndarray
        volume / time [m^3/s].
    method : str
        "quadrature" or "solve_ivp".
    relative_error : float or ndarray
        Estimated relative error [-] of ``time`` (quadrature: the change from the previous,
        coarser composite rule, a pessimistic bound for smooth integrands; solve_ivp: its
        relative tolerance); 0 where the time is inf.
    flags : tuple of str
        Validity notes in words; says where the accuracy is not assured (an estimated
        error above 0.1 %, usually a drive ending a tiny fraction of its start or just
        above a yield-stress fluid's yield pressure).
    models_used : tuple of str
        Provenance keys of the models of every line solve of the delivery (the fluid's and
        the line's), in first-use order.
    outside_range : bool or ndarray of bool
        Per scenario: a solve of the delivery used a correlation outside its range.
    """

    time: float | np.ndarray
    initial_flow: float | np.ndarray
    final_flow: float | np.ndarray
    mean_flow: float | np.ndarray
    method: str
    relative_error: float | np.ndarray = 0.0
    flags: tuple = ()
    models_used: tuple = ()
    outside_range: bool | np.ndarray = False


def _out(arr):
    arr = np.asarray(arr, dtype=float)
    return float(arr) if arr.ndim == 0 else arr


def _stopped_flag(stopped):
    """The words for deliveries that never finish (time inf), as a list of 0 or 1 flag."""
    if not np.any(stopped):
        return []
    return [
        f"the flow stops before the volume is delivered{count_words(stopped)} (the drive falls "
        "to the back pressure, or to a yield-stress fluid's yield pressure): time is inf"
    ]


class _Solves:
    """What the line solves of one delivery rested on: their models and range conditions."""

    def __init__(self, shape):
        self.models = ()
        self.outside = np.zeros(shape, dtype=bool)

    def add(self, result, shape):
        self.models = merge_models(self.models, result.models_used)
        outside = np.asarray(result.conditions["outside_range"])
        full = np.broadcast_to(outside, np.broadcast_shapes(outside.shape, shape))
        lead = tuple(range(full.ndim - len(shape)))
        self.outside = self.outside | full.any(axis=lead)

    @staticmethod
    def as_output(mask):
        return bool(mask) if mask.ndim == 0 else mask

    def fields(self):
        return {"models_used": self.models, "outside_range": self.as_output(self.outside)}


def _composite_nodes(panels):
    """Nodes and weights on (0, 1) of ``panels`` equal panels of the 12-point rule."""
    start = np.arange(panels)[:, None] / panels
    nodes = (start + _PANEL_NODES[None, :] / panels).ravel()
    weights = np.tile(_PANEL_WEIGHTS / panels, panels)
    return nodes, weights


def _volume_quadrature(line, fluid, volume, head_of, pressure_of, back_pressure, pries_correction):
    r"""T = int_0^V dV/Q with the drive a function of the fraction still to deliver.

    ``head_of(left)`` and ``pressure_of(left)`` give the head [m] and source pressure [Pa]
    when the fraction ``left`` of the volume is still in the bag (1 full, 0 empty).

    The net drive :math:`D = p_{source} + \rho g h - p_{back}` is linear in the delivered
    fraction :math:`\phi`, from :math:`D_0` to :math:`D_1`, and so is its excess
    :math:`E = D - D_y` over the yield pressure :math:`D_y` (0 unless the fluid has a yield
    stress, :meth:`Line.yield_pressure`).  Near an empty bag whose excess ends close to
    zero, :math:`1/Q` is nearly singular (:math:`\sim 1/E` for a linear line) and a fixed rule
    in :math:`\phi` is optimistic.  The substitution :math:`E = E_0 (E_1/E_0)^s` (geometric
    in the excess drive, :math:`\phi = \mathrm{expm1}(sL)/\mathrm{expm1}(L)`,
    :math:`L = \ln(E_1/E_0)`) gives

    .. math:: T = V \int_0^1 \frac{L\,e^{sL}}{\mathrm{expm1}(L)}\,\frac{ds}{Q(D(s))}

    whose integrand is :math:`\propto E/Q`: constant for a linear line, a power of
    :math:`D` for a turbulent one, smooth in :math:`s` in every case.  It reduces to
    :math:`\phi = s` as :math:`E_1 \to E_0`.  Composite 12-point Gauss-Legendre rules of
    1, 2, 4, ... panels in :math:`s` are compared until they agree (or 16 panels).
    """
    layout = line._layout(
        fluid,
        np.broadcast_shapes(
            np.shape(volume),
            np.shape(head_of(0.0)),
            np.shape(head_of(1.0)),
            np.shape(pressure_of(0.0)),
            np.shape(pressure_of(1.0)),
            np.shape(back_pressure),
        ),
        pries_correction,
    )
    shape = layout.shape
    yield_drop = _yield_drop(layout, fluid)
    e0 = Line._drive(fluid, head_of(1.0), pressure_of(1.0), back_pressure) - yield_drop
    e1 = Line._drive(fluid, head_of(0.0), pressure_of(0.0), back_pressure) - yield_drop
    e0, e1 = e0 * np.ones(shape), e1 * np.ones(shape)
    positive = (e0 > _MIN_DRIVE) & (e1 > _MIN_DRIVE)
    log_ratio = np.log(np.where(positive, e1, 1.0) / np.where(positive, e0, 1.0))
    flat = log_ratio == 0.0
    safe_l = np.where(flat, 1.0, log_ratio)
    grow = np.where(flat, 1.0, safe_l / np.expm1(safe_l))
    axes = (1,) * len(shape)
    solves = _Solves(shape)

    def solve_at(nodes):
        s = np.asarray(nodes, dtype=float).reshape((-1, *axes))
        # the fraction still to deliver, 1 - phi = e^{sL} expm1((1-s)L) / expm1(L), written
        # so that a drive ending at 1e-30 of its start keeps its digits
        left = np.where(
            flat, 1.0 - s, np.exp(s * safe_l) * np.expm1((1.0 - s) * safe_l) / np.expm1(safe_l)
        )
        left = np.clip(left, 0.0, 1.0)
        jac = np.where(flat, 1.0, grow * np.exp(s * safe_l))
        res = line.solve(
            fluid,
            head=head_of(left),
            source_pressure=pressure_of(left),
            back_pressure=back_pressure,
            pries_correction=pries_correction,
        )
        solves.add(res, shape)
        return np.broadcast_to(np.asarray(res.flow, dtype=float), (s.shape[0], *shape)), jac

    def rule(flows, jac, weights):
        safe = np.where(flows > 0, flows, 1.0)
        return volume * np.tensordot(weights, jac / safe, axes=(0, 0)), np.any(flows <= 0, axis=0)

    levels = [_composite_nodes(p) for p in _PANELS]
    first = np.concatenate([[0.0, 1.0], levels[0][0], levels[1][0]])
    flows, jac = solve_at(first)
    jac = np.broadcast_to(jac, flows.shape)
    ends, n0 = flows[:2], levels[0][0].size
    stopped = (ends[0] <= 0) | (ends[1] <= 0) | ~positive
    coarse, stop_c = rule(flows[2 : 2 + n0], jac[2 : 2 + n0], levels[0][1])
    time, stop_f = rule(flows[2 + n0 :], jac[2 + n0 :], levels[1][1])
    stopped = stopped | stop_c | stop_f
    scale = np.where(stopped | (time <= 0), 1.0, np.abs(time))
    error = np.where(stopped, 0.0, np.abs(time - coarse) / scale)
    for nodes, weights in levels[2:]:
        if not np.any(error > _REFINE_RTOL):
            break
        flows_l, jac_l = solve_at(nodes)
        finer, stop_l = rule(flows_l, np.broadcast_to(jac_l, flows_l.shape), weights)
        stopped = stopped | stop_l
        scale = np.where(stopped | (finer <= 0), 1.0, np.abs(finer))
        error = np.where(stopped, 0.0, np.abs(finer - time) / scale)
        time = finer
    time = np.where(stopped, np.inf, time)
    error = np.where(stopped, 0.0, error)
    mean = np.where(np.isfinite(time), volume / np.where(np.isfinite(time), time, 1.0), 0.0)
    flags = _stopped_flag(stopped)
    doubtful = error > _FLAG_RTOL
    if np.any(doubtful):
        ratio = np.where(
            doubtful, np.where(positive, e1, 0.0) / np.where(positive, e0, 1.0), np.inf
        )
        above = " above the yield pressure" if np.any(yield_drop > 0) else ""
        flags.append(
            f"delivery time accuracy not assured{count_words(doubtful)} (estimated relative error up "
            f"to {float(np.max(error)):.1e}; the final drive{above} is as little as "
            f"{float(np.min(ratio)):.1e} of the initial one): treat the time as approximate"
        )
    return DeliveryResult(
        time=_out(time),
        initial_flow=_out(ends[0]),
        final_flow=_out(ends[1]),
        mean_flow=_out(mean),
        method="quadrature",
        relative_error=_out(error),
        flags=tuple(flags),
        **solves.fields(),
    )


def falling_head_delivery_time(
    line,
    fluid,
    volume,
    head_full,
    head_empty,
    source_pressure=0.0,
    back_pressure=0.0,
    pries_correction=False,
):
    r"""Time to deliver ``volume`` from a gravity bag whose head falls as it empties.

    .. math:: T = \int_0^{V} \frac{dV}{Q(h(V))},\qquad
              h(V) = h_{full} - (h_{full} - h_{empty})\,\frac{V}{V_{total}}

    Parameters
    ----------
    line : Line
    fluid : Fluid
    volume : float or array_like
        Volume to deliver [m^3], > 0 (the bag's content between "full" and "empty").
    head_full, head_empty : float or array_like
        Height [m] of the fluid surface above the outlet when full and when empty.
    source_pressure : float or array_like
        Constant extra source pressure [Pa].
    back_pressure : float or array_like
        Outlet pressure [Pa] (venous pressure).
    pries_correction : bool
        Passed to :meth:`Line.solve`.

    Returns
    -------
    DeliveryResult

    Notes
    -----
    Quasi-steady: the flow at each moment is the steady flow at the current head (the
    bag empties slowly against the line's response time).  Where the flow stops before
    the volume is delivered (head falls below the back pressure) the time is inf.

    Examples
    --------
    >>> from rheoline.model.fluid_base import newtonian_fluid
    >>> from rheoline.model.line import Line
    >>> from rheoline.model.parts import Catheter, Tube
    >>> water = newtonian_fluid("water", 0.955e-3, 997.8)
    >>> line = Line([Tube(inner_diameter=3.0e-3, length=1.8), Catheter(gauge=18)])
    >>> r = falling_head_delivery_time(line, water, 1e-3, head_full=1.0, head_empty=0.8)
    >>> round(r.time / 60.0, 1)      # minutes for one litre
    10.8
    """
    _check_line(
        line,
        fluid,
        volume=volume,
        head_full=head_full,
        head_empty=head_empty,
        source_pressure=source_pressure,
        back_pressure=back_pressure,
    )
    v = check_positive("volume", volume, "m^3")
    h_full = check_finite("head_full", head_full)
    h_empty = check_finite("head_empty", head_empty)
    check_falls("head_full", h_full, "head_empty", h_empty, "m")
    return _volume_quadrature(
        line,
        fluid,
        v,
        lambda left: h_empty + (h_full - h_empty) * left,
        lambda left: source_pressure + 0.0 * left,
        back_pressure,
        pries_correction,
    )


def pressure_bag_delivery_time(
    line,
    fluid,
    volume,
    pressure_full,
    pressure_empty=None,
    time_constant=None,
    head_full=0.0,
    head_empty=None,
    back_pressure=0.0,
    pries_correction=False,
):
    r"""Time to deliver ``volume`` from a pressure bag whose pressure decays.

    Two decay laws (give exactly one of ``pressure_empty`` or ``time_constant``):

    * with the delivered volume, :math:`p = p_{full} - (p_{full} - p_{empty}) V / V_{total}`
      (a cuff that loosens as the bag shrinks): quadrature of :math:`dV/Q`;
    * in time, :math:`p = p_{full} e^{-t/\tau}` (a cuff that leaks, or a manual bulb not
      re-pumped): :math:`dV/dt = Q` integrated with ``scipy.integrate.solve_ivp``.

    Parameters
    ----------
    line : Line
    fluid : Fluid
    volume : float or array_like
        [m^3], > 0.
    pressure_full : float or array_like
        Cuff (source) pressure at the start [Pa].
    pressure_empty : float or array_like, optional
        Cuff pressure when the volume has gone [Pa].
    time_constant : float or array_like, optional
        Decay time constant tau [s], > 0.
    head_full, head_empty : float or array_like
        Bag height above the outlet [m] when full and empty (default: constant ``head_full``).
    back_pressure : float or array_like
        [Pa].
    pries_correction : bool

    Returns
    -------
    DeliveryResult
        ``time`` is inf where the decaying drive cannot deliver the whole volume.

    Examples
    --------
    >>> from rheoline.model.conversions import MMHG
    >>> from rheoline.model.fluid_base import newtonian_fluid
    >>> from rheoline.model.line import Line
    >>> from rheoline.model.parts import Catheter
    >>> water = newtonian_fluid("water", 0.955e-3, 997.8)
    >>> line = Line([Catheter(gauge=16)])
    >>> r = pressure_bag_delivery_time(line, water, 0.5e-3, 300 * MMHG, 200 * MMHG)
    >>> round(r.time / 60.0, 2)
    1.17
    """
    _check_line(
        line,
        fluid,
        volume=volume,
        pressure_full=pressure_full,
        pressure_empty=pressure_empty,
        time_constant=time_constant,
        head_full=head_full,
        head_empty=head_empty,
        back_pressure=back_pressure,
    )
    v = check_positive("volume", volume, "m^3")
    p_full = check_finite("pressure_full", pressure_full)
    h_full = check_finite("head_full", head_full)
    h_empty = h_full if head_empty is None else check_finite("head_empty", head_empty)
    check_falls("head_full", h_full, "head_empty", h_empty, "m")
    if (pressure_empty is None) == (time_constant is None):
        raise InputRangeError(
            "give exactly one decay law: pressure_empty [Pa] (decay with delivered volume) or "
            f"time_constant [s] (exponential decay in time); got pressure_empty={pressure_empty!r}, "
            f"time_constant={time_constant!r}"
        )
    if pressure_empty is not None:
        p_empty = check_finite("pressure_empty", pressure_empty)
        check_falls("pressure_full", p_full, "pressure_empty", p_empty, "Pa")
        return _volume_quadrature(
            line,
            fluid,
            v,
            lambda left: h_empty + (h_full - h_empty) * left,
            lambda left: p_empty + (p_full - p_empty) * left,
            back_pressure,
            pries_correction,
        )
    tau = check_positive("time_constant", time_constant, "s")
    check_nonnegative("pressure_full", p_full, "Pa")
    return _time_decay(
        line, fluid, v, p_full, tau, h_full, h_empty, back_pressure, pries_correction
    )


def _time_decay(line, fluid, volume, p_full, tau, h_full, h_empty, back_pressure, pries):
    """Integrate dt/dphi = V / Q(t, phi) over the delivered fraction phi from 0 to 1."""
    from scipy.integrate import solve_ivp

    shape = np.broadcast_shapes(
        np.shape(volume), np.shape(p_full), np.shape(tau), np.shape(h_full), np.shape(h_empty)
    )
    vol, p0, tau_f, hf, he = (
        np.broadcast_to(np.asarray(a, dtype=float), shape).ravel()
        for a in (volume, p_full, tau, h_full, h_empty)
    )

    solves = _Solves(vol.shape)

    def flow(t, frac):
        res = line.solve(
            fluid,
            head=hf - (hf - he) * frac,
            # an explicit Runge-Kutta stage may probe a time below 0 where dt/dphi is steep
            # (a cuff gone within milliseconds); the pressure there is the full one
            source_pressure=p0 * np.exp(-np.maximum(t, 0.0) / tau_f),
            back_pressure=back_pressure,
            pries_correction=pries,
        )
        solves.add(res, vol.shape)
        return np.broadcast_to(np.asarray(res.flow, dtype=float), vol.shape)

    q0 = flow(np.zeros_like(vol), 0.0)
    floor = 1e-9 * np.maximum(q0, 1e-300)

    def rate(frac, t):
        return vol / np.maximum(flow(t, frac), floor)

    sol = solve_ivp(
        rate,
        (0.0, 1.0),
        np.zeros_like(vol),
        method="RK45",
        rtol=1e-8,
        atol=1e-9 * float(np.min(vol / np.maximum(q0, 1e-300))),
    )
    t_end = sol.y[:, -1]
    q_end = flow(t_end, 1.0)
    halted = (q_end <= 10.0 * floor) | (q0 <= 0)
    stopped = halted | (not sol.success)
    time = np.where(stopped, np.inf, t_end)
    mean = np.where(np.isfinite(time), vol / np.where(np.isfinite(time), time, 1.0), 0.0)
    return DeliveryResult(
        time=_out(time.reshape(shape)),
        initial_flow=_out(q0.reshape(shape)),
        final_flow=_out(np.where(stopped, 0.0, q_end).reshape(shape)),
        mean_flow=_out(mean.reshape(shape)),
        method="solve_ivp",
        relative_error=_out(np.where(stopped, 0.0, 1e-8).reshape(shape)),
        flags=tuple(
            _stopped_flag(halted.reshape(shape))
            + (
                []
                if sol.success
                else [f"solve_ivp did not finish ({sol.message}): time set to inf"]
            )
        ),
        models_used=solves.models,
        outside_range=_Solves.as_output(solves.outside.reshape(shape)),
    )
