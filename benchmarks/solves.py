"""The line-solve rows: the vectorized engine against a per-scenario scalar loop.

The line: a 3.0 mm x 1.8 m tube, then the catalogue's 18G catheter; heads uniform in
0.3-1.5 m (seeded); water at 22 degC, and whole blood at 37 degC (Carreau: shear thinning,
so every evaluation of the scalar reference integrates the Rabinowitsch relation).

Each fluid is solved on both of the engine's paths:

* **shared**: one line and one fluid for every scenario, only the head varies; the engine
  takes the line's tabulated characteristic where that is cheaper (it is at 100,000
  scenarios), else Newton;
* **general** (``_newton_path``): the tube's bore given as an array of N equal values, so
  the parts differ per scenario as far as the engine knows (what tolerance bands, bore and
  temperature sweeps and every view with a band ask of it): Newton iterations, in blocks.

Flow solves race :func:`scalar_reference.solve_flow` (brentq, one scenario at a time);
pressure solves (a prescribed flow) race :func:`scalar_reference.solve_pressure`, which
evaluates the budget once per scenario (nothing to solve), so they are compared by time
per scenario and by residual passes, not by a speed-up target.
"""

from __future__ import annotations

from functools import partial

import numpy as np
import scalar_reference as scalar
from timing import interleaved_medians

import rheoline
from rheoline.model.line import Line
from rheoline.model.parts import Catheter, Tube

__all__ = ["SEED", "HEAD_RANGE", "TUBE", "GAUGE", "fluids", "heads", "benchmark_line", "solve_rows"]

#: Seed of the random heads (the same seed, the same scenarios).
SEED = 20261201
HEAD_RANGE = (0.3, 1.5)  # [m]
TUBE = (3.0e-3, 1.8)  # inner diameter, length [m]
GAUGE = 18
AGREEMENT = 1e-6  # largest relative difference accepted, vector vs scalar

#: Scenarios of the scalar loop timed per solve (strided over the N), scaled per scenario.
SCALAR_SUBSET = {
    ("newtonian", "flow"): 2000,
    ("blood", "flow"): 200,
    ("newtonian", "pressure"): 20000,
    ("blood", "pressure"): 2000,
}
PATHS = {"shared": "", "newton": "_newton_path"}


def benchmark_line(per_scenario_parts=0):
    """The benchmark line; with ``per_scenario_parts=n`` the tube bore is an array of n equal
    values, which makes the engine take its general (Newton) path."""
    bore = TUBE[0] if not per_scenario_parts else np.full(per_scenario_parts, TUBE[0])
    return Line([Tube(inner_diameter=bore, length=TUBE[1]), Catheter(gauge=GAUGE)])


def scalar_line():
    """The same line for the plain-Python reference."""
    cath = Catheter(gauge=GAUGE)
    return scalar.ScalarLine([TUBE, (cath.inner_diameter, cath.length)])


def fluids():
    """{kind: (label, rheoline Fluid, scalar fluid)} for the Newtonian and the blood line."""
    water = rheoline.fluid("water", temperature_c=22.0)
    blood = rheoline.fluid("whole-blood", temperature_c=37.0, model="carreau")
    r = blood.rheology
    return {
        "newtonian": (
            "water 22 degC",
            water,
            scalar.ScalarNewtonian(water.rheology.mu, water.density),
        ),
        "blood": (
            "whole blood 37 degC Carreau",
            blood,
            scalar.ScalarCarreau(
                r.mu_zero, r.mu_inf, r.relaxation_time, r.flow_index, blood.density
            ),
        ),
    }


def heads(n):
    """N heads [m], uniform in HEAD_RANGE, seeded."""
    return np.random.default_rng(SEED).uniform(*HEAD_RANGE, n)


def regime_counts(result):
    """{"laminar": k, "transitional": k, "turbulent": k} of a vectorized result."""
    regimes = np.asarray(result.regime)
    return {
        name: int(np.count_nonzero(regimes == name))
        for name in ("laminar", "transitional", "turbulent")
    }


def _subset(n, size):
    return np.unique(np.linspace(0, n - 1, min(n, size)).astype(int))


def _scalar_flows(sline, sfluid, inputs):
    return [scalar.solve_flow(sline, sfluid, head=x)[0] for x in inputs]


def _scalar_pressures(sline, sfluid, inputs):
    return [scalar.solve_pressure(sline, sfluid, x) for x in inputs]


def _row(kind, label, path, what, n, medians, result, reference, idx):
    """One row of the table from the interleaved timings and the two answers."""
    t_solve, t_res, t_loop = medians
    answer = np.asarray(result.flow if what == "flow" else result.required_pressure, dtype=float)
    diff = float(np.max(np.abs(answer[idx] / np.asarray(reference) - 1.0)))
    per_scenario = t_loop / idx.size
    general = path == "newton"
    return {
        "key": f"{kind}_{what}{PATHS[path]}",
        "label": f"{label}: {'flow at head' if what == 'flow' else 'pressure for flow'}"
        + (", general path" if general else ", shared line"),
        "kind": kind,
        "solve": what,
        "path": path,
        "vector_solve_ms": 1e3 * t_solve,
        "vector_residual_ms": 1e3 * t_res,
        "vector_us_per_scenario": 1e6 * t_solve / n,
        "scalar_us_per_scenario": 1e6 * per_scenario,
        "scalar_scenarios_timed": int(idx.size),
        "speedup_vs_scalar_loop": per_scenario * n / t_solve,
        "residual_evals_equivalent": t_solve / t_res,
        "max_relative_difference": diff,
        "agree": diff <= AGREEMENT,
        "iterations": int(result.iterations),
        "engine_path": "characteristic" if result.iterations == 0 else "Newton",
    }


def solve_rows(n, repeats, scalar_repeats=3, subset_scale=1.0):
    """Every line-solve row: vector, residual and scalar times, ratios and agreement."""
    h = heads(n)
    rows, regimes, loops = [], {}, {}
    sline = scalar_line()
    for kind, (label, fluid, sfluid) in fluids().items():
        flows = None
        for path in PATHS:
            line = benchmark_line(n if path == "newton" else 0)
            for what in ("flow", "pressure"):
                if what == "flow":
                    drive = {"head": h}
                    solve = partial(line.solve, fluid, **drive)
                    at = flows if flows is not None else np.asarray(solve().flow, dtype=float)
                else:
                    drive = {"head": 0.0}
                    solve = partial(line.solve, fluid, flow=flows)
                    at = flows
                residual = partial(line.pressure_residual, fluid, at, **drive)
                idx = _subset(n, max(1, int(SCALAR_SUBSET[(kind, what)] * subset_scale)))
                functions = [solve, residual]
                if (kind, what) not in loops:  # the same loop serves both engine paths
                    inputs = (h if what == "flow" else flows)[idx].tolist()
                    loop = partial(
                        _scalar_flows if what == "flow" else _scalar_pressures, sline, sfluid
                    )
                    loop(inputs[:1])  # warm up on one scenario, untimed
                    functions.append(partial(loop, inputs))
                medians, values = interleaved_medians(functions, repeats, {2: scalar_repeats})
                if len(functions) == 3:
                    loops[(kind, what)] = medians[2], values[2]
                t_loop, reference = loops[(kind, what)]
                result = values[0]
                if what == "flow" and path == "shared":
                    flows = np.asarray(result.flow, dtype=float)
                    regimes[kind] = regime_counts(result)
                rows.append(
                    _row(kind, label, path, what, n, (*medians[:2], t_loop), result, reference, idx)
                )
    return rows, regimes
