"""The run of a time solve kept for the next solve that differs only in its occlusion.

:func:`rheoline.model.transient.simulate_infusion` solves the run from rest (start-up,
rate changes, drug delivery) before it branches at the occlusion.  An edit of the
occlusion's alarm pressure, its part or its release time leaves that run as it was: the
run's network, scales and breakpoints depend on the occlusion only through the time it
begins, the run's duration and the flow grid of the segments' laws (widened until it spans
the alarm pressure).  A caller that names every other input by one hashable ``reuse_key``
(the scenario layer: the scenario description without its occlusion, and its sweep points)
gets the run kept from such a solve: the state at the occlusion, the recorder's series,
the trackers' crossings and the flags of the segments' laws, the numbers of the fresh solve
(the same arithmetic, nothing interpolated).

Only solves of a few scenarios (:data:`REUSED_SCENARIOS`, the app's one point) are kept,
the latest :data:`RUNS_KEPT`; all are forgotten when a user's fluid is registered or removed
(:func:`rheoline.model.fluids.register_fluid`: a name in a scenario may then build another).

Examples
--------
>>> key = run_key("demo", 1, 1800.0, 5400.0, 1e-6, True, [])
>>> kept_run(key) is None
True
"""

from __future__ import annotations

import numpy as np

from rheoline.model import line_dynamics as dyn

__all__ = ["run_key", "kept_run", "run_phase", "RUNS_KEPT", "REUSED_SCENARIOS", "clear"]

#: How many runs are kept.
RUNS_KEPT = 4
#: Most scenarios of a solve whose run is kept (a run's series grows with the scenarios).
REUSED_SCENARIOS = 64

_KEPT: dict = {}


def clear():
    """Forget every kept run."""
    _KEPT.clear()


def run_key(reuse_key, n, t_occ, duration, rtol, keep, tables):
    """The key of a run: the caller's ``reuse_key`` (None: not kept) and what the run takes
    from the occlusion and the solve's settings: scenarios, occlusion time [s], duration
    [s], tolerance, whether series are kept, and each segment law's flow grid ends."""
    if reuse_key is None or n > REUSED_SCENARIOS:
        return None
    grids = tuple((float(t.log_q[0]), float(t.log_q[-1]), t.log_q.size) for t in tables)
    return (reuse_key, int(n), float(t_occ), float(duration), float(rtol), bool(keep), grids)


def kept_run(key):
    """The run kept under ``key``, or None."""
    return None if key is None else _KEPT.get(key)


def run_phase(net, y0, t_occ, duration, breaks, trackers, keep, rtol, key=None):
    """The run from rest: the state at the occlusion ``t_occ`` (the end of the run where
    there is none) and the recorder's arrays (None unless ``keep``); the trackers' crossing
    times and ``net.beyond_table`` are set.  Kept under ``key`` (None: not kept), or taken
    from a run kept under it."""
    kept = kept_run(key)
    if kept is not None:
        _KEPT[key] = _KEPT.pop(key)  # the latest used last
    else:
        recorder = dyn.Recorder(net, keep=keep)
        breaks = sorted(breaks)
        y_occ, _ = dyn.integrate(net, y0, 0.0, t_occ, breaks, trackers, recorder, rtol=rtol)
        if t_occ < duration:
            dyn.integrate(net, y_occ, t_occ, duration, breaks, trackers, recorder, rtol=rtol)
        arrays = recorder.arrays() if keep else None
        kept = (
            np.array(y_occ, dtype=float),
            arrays,
            [tracker.time.copy() for tracker in trackers],
            net.beyond_table.copy(),
        )
        if key is not None:
            _KEPT[key] = kept
            while len(_KEPT) > RUNS_KEPT:
                del _KEPT[next(iter(_KEPT))]
    y_occ, arrays, times, beyond = kept
    for tracker, time in zip(trackers, times, strict=True):
        tracker.time = time.copy()
    net.beyond_table = beyond.copy()
    copied = None if arrays is None else tuple(a.copy() for a in arrays)
    return y_occ.copy(), copied
