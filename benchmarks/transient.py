"""Benchmark case of the time solve: start-up time and time to alarm for N scenarios at once.

A syringe pump (rate uniform in 0.5-5 mL/h, syringe compliance uniform in 0.8-2.0 uL/mmHg,
seeded; demo values) drives saline at 25 degC through a 0.5 mm x 1.5 m microbore line and a
24G catalogue catheter; the catheter is occluded 10 minutes in, with the alarm at 300 mmHg.
:func:`rheoline.model.transient.simulate_infusion` solves the run, the occlusion and the
release of all N scenarios in one stiff solve each (``series=False``); the reference calls it
once per scenario (a strided subset is timed and scaled per scenario).  Reported: the
vectorized time, the per-scenario time, their ratio, and the largest relative difference of
the start-up times and times to alarm.

numpy's BLAS is held to one thread for both (threadpoolctl, when installed): the solver's
vectors are small enough that BLAS threads only wait on each other, most of all on a
loaded machine.
"""

from __future__ import annotations

import contextlib
import time

import numpy as np

import rheoline
from rheoline.model.compliance import Compliance, SyringePump
from rheoline.model.line import Line
from rheoline.model.parts import Catheter, Tube
from rheoline.model.transient import Occlusion, simulate_infusion

SEED = 20261216
ML_H = 1e-6 / 3600.0
MMHG = 133.322
RATES_ML_H = (0.5, 5.0)
COMPLIANCE_UL_MMHG = (0.8, 2.0)
N_MAX = 10_000  # scenarios of this case (the benchmark's N, at most this)
SUBSET = 6  # scenarios of the per-scenario loop timed (times --subset-scale)


def _one_thread():
    try:
        from threadpoolctl import threadpool_limits
    except ImportError:  # pragma: no cover - threadpoolctl is a test extra
        return contextlib.nullcontext()
    return threadpool_limits(limits=1, user_api="blas")


def scenarios(n, seed=SEED):
    """The seeded rates [m^3/s] and syringe compliances [m^3/Pa] of N scenarios."""
    rng = np.random.default_rng(seed)
    rates = rng.uniform(*RATES_ML_H, n) * ML_H
    compliance = rng.uniform(*COMPLIANCE_UL_MMHG, n) * 1e-9 / MMHG
    return rates, compliance


def solve(rates, compliance):
    """The case's time solve for the given scenarios."""
    saline = rheoline.fluid("saline-0.9", temperature_c=25.0)
    line = Line([Tube(inner_diameter=0.5e-3, length=1.5), Catheter(gauge=24)])
    pump = SyringePump(rate=rates, compliance=Compliance(compliance))
    occlusion = Occlusion(part=1, time=600.0, alarm_pressure=300 * MMHG)
    return simulate_infusion(line, saline, pump, occlusion=occlusion, series=False)


def run(n, repeats=1, subset_scale=1.0):
    """The transient figures (a JSON-ready dict)."""
    n = int(min(n, N_MAX))
    rates, compliance = scenarios(n)
    times, result = [], None
    with _one_thread():
        for _ in range(max(1, repeats)):
            start = time.perf_counter()
            result = solve(rates, compliance)
            times.append(time.perf_counter() - start)
        vector_s = float(np.median(times))
        size = max(2, min(n, int(round(SUBSET * subset_scale))))
        picks = np.unique(np.linspace(0, n - 1, size).astype(int))
        start = time.perf_counter()
        single = [solve(rates[i], compliance[i]) for i in picks]
        loop_s = (time.perf_counter() - start) / picks.size
    startup = np.atleast_1d(result.startup_time)[picks]
    alarm = np.atleast_1d(result.time_to_alarm)[picks]
    one_startup = np.array([s.startup_time for s in single])
    one_alarm = np.array([s.time_to_alarm for s in single])
    diff = float(
        max(
            np.max(np.abs(one_startup - startup) / startup),
            np.max(np.abs(one_alarm - alarm) / alarm),
        )
    )
    return {
        "n": n,
        "vector_solve_ms": vector_s * 1e3,
        "loop_ms_per_scenario": loop_s * 1e3,
        "speedup_vs_scenario_loop": loop_s * n / vector_s,
        "startup_s_range": [float(np.min(result.startup_time)), float(np.max(result.startup_time))],
        "time_to_alarm_min_range": [
            float(np.min(result.time_to_alarm)) / 60.0,
            float(np.max(result.time_to_alarm)) / 60.0,
        ],
        "max_relative_difference": diff,
        "agree": bool(diff < 1e-3),
    }
