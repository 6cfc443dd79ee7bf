"""Benchmarks of rheoline's vectorized line solves against the straightforward alternative.

Run ``python benchmarks/run.py [--n N] [--json]`` from the repository root after
``pip install -e '.[widgets,test]'``.  It measures, in one run on one machine:

1. ``speedup_vs_scalar_loop``: :meth:`rheoline.Line.solve` of N scenarios of a two-part
   line (a 3.0 mm x 1.8 m tube, then an 18G catalogue catheter; water at 22 degC; heads
   uniform in 0.3-1.5 m, seeded) against a plain-Python residual of the same physics
   (``benchmarks/scalar_reference.py``) solved by :func:`scipy.optimize.brentq` one scenario
   at a time (a strided subset of the loop is timed and scaled per scenario);
2. ``residual_evals_equivalent``: the solve's time over the time of one vectorized
   :meth:`rheoline.Line.pressure_residual` for all N scenarios;
3. the same two figures for the same line carrying packed red cells (Carreau rheology) and
   for the prescribed-flow (pressure) solve, plus, for information, the same solves with
   per-scenario parts (which take the engine's Newton path instead of the shared
   characteristic);
4. ``monte_carlo_10k_ms``: a 10,000-sample tolerance band (:func:`rheoline.flow_tolerance`);
5. ``network``: a 4-branch network for N scenarios (``benchmarks/network.py``): Newton steps,
   residual passes and the ratio against a per-scenario :func:`scipy.optimize.root` loop;
   ``transient``: start-up time and time to occlusion alarm for min(N, 10,000) scenarios
   in one time solve (``benchmarks/transient.py``), with the ratio against solving them one
   scenario at a time;
6. ``widget_update_ms``: one control change in the line view and the comparison view
   (7 candidates x 200 points, 2,000-sample tolerance band), median of 20;
7. ``import_model_ms``: importing the model layer in a fresh interpreter;
8. ``load_file``: reading a valid 200-scenario, 40-part scenario file of about 770 KB
   (``benchmarks/load_file.py``): seconds and peak memory against 2 s and 300 MB.

Times are medians of repeats (wall clock, ``time.perf_counter``, garbage collector off).
The machine, its load average and numpy's BLAS are printed beside the figures; the ratios
are the headline, the absolute times move with the machine and its load.  Each target is
printed with whether it holds.  Exit status 0 whether or not targets hold (it is a report),
1 when the vectorized and scalar answers disagree by more than 1e-6 relative.
"""

from __future__ import annotations

import argparse
import gc
import json
import os
import platform
import statistics
import subprocess
import sys
import time
from functools import partial
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))

import load_file as load_file_case  # noqa: E402  (the script's own folder)
import network as network_case  # noqa: E402  (the script's own folder)
import scalar_reference as scalar  # noqa: E402
import transient as transient_case  # noqa: E402  (the script's own folder)

import rheoline  # noqa: E402
from rheoline.model.line import Line  # noqa: E402
from rheoline.model.parts import Catheter, Tube  # noqa: E402

#: Seed of the random heads (the same seed, the same scenarios).
SEED = 20261201
HEAD_RANGE = (0.3, 1.5)  # [m]
TUBE = (3.0e-3, 1.8)  # inner diameter, length [m]
GAUGE = 18
TEMPERATURE_C = 22.0
AGREEMENT = 1e-6  # largest relative difference accepted, vector vs scalar

#: Targets of issue 7: figure -> (comparison, bound).
SPEEDUP_TARGET = {"newtonian": 100.0, "blood": 50.0}
EVALS_TARGET = 8.0
MS_TARGET = 100.0
IMPORT_TARGET = 300.0

#: Scenarios of the scalar loop timed per solve (strided over the N), scaled per scenario.
SCALAR_SUBSET = {
    ("newtonian", "flow"): 2000,
    ("blood", "flow"): 200,
    ("newtonian", "pressure"): 20000,
    ("blood", "pressure"): 2000,
}

IMPORT_SNIPPET = (
    "import time; t = time.perf_counter(); import rheoline; "
    "rheoline.Line; rheoline.Tube; rheoline.Catheter; rheoline.fluid; rheoline.flow_tolerance; "
    "print(time.perf_counter() - t)"
)


# ---------------------------------------------------------------------------- timing
def median_time(function, repeats, warmup=True):
    """Median wall time [s] of ``function()`` over ``repeats`` calls (gc off), and its value.

    One untimed call first (``warmup``) so that lazy imports and caches are not timed.
    """
    times = []
    value = function() if warmup else None
    for _ in range(max(1, repeats)):
        gc.collect()
        gc.disable()
        try:
            start = time.perf_counter()
            value = function()
            times.append(time.perf_counter() - start)
        finally:
            gc.enable()
    return statistics.median(times), value


def interleaved_medians(functions, repeats, limited=None):
    """Median wall times [s] of several functions timed in turn, round after round.

    Interleaving keeps a ratio of two medians fair on a shared machine whose load drifts.
    Each function is called once untimed first; a function listed in ``limited`` (index ->
    rounds) is timed in that many rounds only (a long scalar loop).  Returns the medians and
    each function's last value.
    """
    limited = limited or {}
    values = [f() for f in functions]
    times = [[] for _ in functions]
    for round_ in range(max(1, repeats)):
        for i, f in enumerate(functions):
            if round_ >= limited.get(i, repeats):
                continue
            gc.collect()
            gc.disable()
            try:
                start = time.perf_counter()
                values[i] = f()
                times[i].append(time.perf_counter() - start)
            finally:
                gc.enable()
    return [statistics.median(t) for t in times], values


def machine():
    """CPU count, model, Python, numpy/scipy versions and BLAS (threadpoolctl)."""
    info = {
        "cpu_count": os.cpu_count(),
        "cpus_usable": len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else None,
        "cpu_model": _cpu_model(),
        "python": platform.python_version(),
        "numpy": np.__version__,
        "scipy": __import__("scipy").__version__,
        "rheoline": rheoline.__version__,
    }
    try:
        from threadpoolctl import threadpool_info

        info["blas"] = [
            {k: pool.get(k) for k in ("internal_api", "version", "num_threads", "threading_layer")}
            for pool in threadpool_info()
            if pool.get("user_api") == "blas"
        ]
    except ImportError:
        info["blas"] = "threadpoolctl not installed (pip install threadpoolctl)"
    return info


def _cpu_model():
    try:
        for row in Path("/proc/cpuinfo").read_text().splitlines():
            if row.startswith("model name"):
                return row.split(":", 1)[1].strip()
    except OSError:
        pass
    return platform.processor() or "unknown"


def load_average():
    """1-, 5- and 15-minute load averages (None where the OS has none)."""
    try:
        return [round(x, 2) for x in os.getloadavg()]
    except OSError:
        return None


# ---------------------------------------------------------------------------- lines
def benchmark_line(per_scenario_parts=0):
    """The benchmark line; with ``per_scenario_parts=n`` the tube bore is an array of n equal
    values, which makes the engine take its Newton path (no shared characteristic)."""
    bore = TUBE[0] if not per_scenario_parts else np.full(per_scenario_parts, TUBE[0])
    return Line([Tube(inner_diameter=bore, length=TUBE[1]), Catheter(gauge=GAUGE)])


def scalar_line():
    """The same line for the plain-Python reference."""
    cath = Catheter(gauge=GAUGE)
    return scalar.ScalarLine([TUBE, (cath.inner_diameter, cath.length)])


def fluids():
    """{kind: (label, rheoline Fluid, scalar fluid)} for the Newtonian and the blood line."""
    water = rheoline.fluid("water", temperature_c=TEMPERATURE_C)
    blood = rheoline.fluid("packed-red-cells", temperature_c=TEMPERATURE_C, model="carreau")
    r = blood.rheology
    return {
        "newtonian": (
            f"water {TEMPERATURE_C:g} degC",
            water,
            scalar.ScalarNewtonian(water.rheology.mu, water.density),
        ),
        "blood": (
            f"packed red cells {TEMPERATURE_C:g} degC Carreau",
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


def solve_rows(n, repeats, scalar_repeats=3, subset_scale=1.0):
    """Every line-solve row: vector, residual and scalar times, ratios and agreement."""
    h = heads(n)
    rows, regimes, loops = [], {}, {}
    sline = scalar_line()
    for kind, (label, fluid, sfluid) in fluids().items():
        flows = None
        for path, line in (("shared", benchmark_line()), ("newton", benchmark_line(n))):
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
                (t_solve, t_res), result = medians[:2], values[0]
                if len(functions) == 3:
                    loops[(kind, what)] = medians[2], values[2]
                t_loop, reference = loops[(kind, what)]
                if what == "flow" and path == "shared":
                    flows = np.asarray(result.flow, dtype=float)
                    regimes[kind] = regime_counts(result)
                answer = np.asarray(
                    result.flow if what == "flow" else result.required_pressure, dtype=float
                )
                diff = float(np.max(np.abs(answer[idx] / np.asarray(reference) - 1.0)))
                per_scenario = t_loop / idx.size
                rows.append(
                    {
                        "key": f"{kind}_{what}" + ("" if path == "shared" else "_newton_path"),
                        "label": f"{label}: {'flow at head' if what == 'flow' else 'pressure for flow'}"
                        + ("" if path == "shared" else ", per-scenario parts"),
                        "kind": kind,
                        "solve": what,
                        "path": path,
                        "headline": path == "shared",
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
                    }
                )
    return rows, regimes


# ---------------------------------------------------------------------------- others
def monte_carlo_ms(repeats, n_samples=10_000):
    """A tolerance band of the benchmark line: bores 5 %, lengths 2 %, temperature 2 degC."""
    line = benchmark_line()
    water = rheoline.fluid("water", temperature_c=TEMPERATURE_C)

    def band():
        return rheoline.flow_tolerance(
            line,
            water,
            head=1.0,
            diameter_tolerance=0.05,
            length_tolerance=0.02,
            temperature_tolerance=2.0,
            n_samples=n_samples,
            seed=SEED,
        )

    t, result = median_time(band, repeats)
    return 1e3 * t, result


def _timed_change(view, name, value):
    """Seconds of one control change: the views' hook, or the observer call timed here."""
    if hasattr(view, "set_control"):
        return view.set_control(name, value)
    start = time.perf_counter()  # observers run synchronously inside the setter
    view.controls[name].value = value
    return time.perf_counter() - start


def _median_change(view, name, values):
    """Median ms of setting ``name`` to each of ``values`` (each must differ from the last)."""
    seconds = []
    for value in values:
        gc.collect()
        seconds.append(_timed_change(view, name, value))
    return 1e3 * statistics.median(seconds)


def widget_ms(repeats):
    """{view: median ms of one control change} (new values each time, so no cache hit)."""
    out = {}
    try:
        from rheoline.widgets.line_view import LineView
    except ImportError as exc:
        return {"pending": f"line view not importable: {exc}"}
    view = LineView(fluid="water")
    out["line_view head"] = _median_change(
        view, "head_cm", [100.0 + (k + 1) for k in range(repeats)]
    )
    try:
        from rheoline.widgets import compare_view
    except ImportError as exc:
        out["comparison_view pending"] = f"comparison view not importable: {exc}"
        return out
    out["comparison_band_samples"] = compare_view.BAND_SAMPLES
    view = _comparison_case(compare_view)
    # temperature: every curve, band and table row is recomputed (nothing cached)
    out["comparison_view temperature"] = _median_change(
        view, "temperature_c", [TEMPERATURE_C + 0.1 * (k + 1) for k in range(repeats)]
    )
    # head: the head-sweep curves and bands are cached; the table's operating points are not
    out["comparison_view head"] = _median_change(
        view, "head_cm", [100.0 + (k + 1) for k in range(repeats)]
    )
    # a temperature spread as well: every band sample is solved (no bore-only shortcut)
    view.controls["temperature_tolerance_c"].value = 2.0
    out["comparison_view temperature, bore+temperature band"] = _median_change(
        view, "temperature_c", [TEMPERATURE_C - 0.1 * (k + 1) for k in range(repeats)]
    )
    return out


def _comparison_case(compare_view):
    """7 candidates (catheters 14G-26G behind the set) x 200 points, 5 % bore band: the
    view's own responsiveness case where it has one."""
    if hasattr(compare_view, "responsiveness_case"):
        return compare_view.responsiveness_case(points=200, bore_tolerance_percent=5.0)
    set_tube = {
        "type": "tube",
        "label": "administration set",
        "inner_diameter_mm": 3.0,
        "length_cm": 180.0,
    }
    candidates = [
        {"name": f"set + {g}G", "parts": [dict(set_tube), {"type": "catheter", "gauge": g}]}
        for g in (14, 16, 18, 20, 22, 24, 26)
    ]
    return compare_view.ComparisonView(
        candidates=candidates, points=200, bore_tolerance_percent=5.0
    )


def import_ms(repeats):
    """Median ms of importing the model layer (and resolving its main names) in a fresh
    interpreter; interpreter start-up is not counted."""
    times = []
    for _ in range(max(1, repeats)):
        done = subprocess.run(
            [sys.executable, "-c", IMPORT_SNIPPET], capture_output=True, text=True, check=True
        )
        times.append(float(done.stdout.strip().splitlines()[-1]))
    return 1e3 * statistics.median(times)


# ---------------------------------------------------------------------------- targets
def targets(report):
    """[(figure key, value, target text, holds)] for every target of issue 7."""
    out = []
    for row in report["solves"]:
        if row["headline"]:
            bound = SPEEDUP_TARGET[row["kind"]]
            out.append(
                (
                    f"{row['key']}.speedup_vs_scalar_loop",
                    row["speedup_vs_scalar_loop"],
                    f">= {bound:g}",
                    row["speedup_vs_scalar_loop"] >= bound,
                )
            )
        out.append(
            (
                f"{row['key']}.residual_evals_equivalent",
                row["residual_evals_equivalent"],
                f"<= {EVALS_TARGET:g}",
                row["residual_evals_equivalent"] <= EVALS_TARGET,
            )
        )
    out.append(
        (
            "monte_carlo_10k_ms",
            report["monte_carlo_10k_ms"],
            f"< {MS_TARGET:g}",
            report["monte_carlo_10k_ms"] < MS_TARGET,
        )
    )
    for name, value in report["widget_update_ms"].items():
        if isinstance(value, float):
            out.append((f"widget_update_ms[{name}]", value, f"< {MS_TARGET:g}", value < MS_TARGET))
    out.append(
        (
            "import_model_ms",
            report["import_model_ms"],
            f"< {IMPORT_TARGET:g}",
            report["import_model_ms"] < IMPORT_TARGET,
        )
    )
    big = report.get("load_file")
    if big:  # reading a large scenario file (benchmarks/load_file.py)
        out.append(
            (
                "load_file.load_s",
                big["load_s"],
                f"< {big['target_s']:g}",
                big["load_s"] < big["target_s"],
            )
        )
        out.append(
            (
                "load_file.peak_mb",
                big["peak_mb"],
                f"< {big['target_mb']:g}",
                big["peak_mb"] < big["target_mb"],
            )
        )
    return out


def figures(report):
    """Every figure by a flat key (what the table prints and the smoke test checks)."""
    flat = {}
    for row in report["solves"]:
        for key in (
            "speedup_vs_scalar_loop",
            "residual_evals_equivalent",
            "max_relative_difference",
        ):
            flat[f"{row['key']}.{key}"] = row[key]
    flat["monte_carlo_10k_ms"] = report["monte_carlo_10k_ms"]
    for name, value in report["widget_update_ms"].items():
        if isinstance(value, float):
            flat[f"widget_update_ms[{name}]"] = value
    flat["import_model_ms"] = report["import_model_ms"]
    net = report.get("network")
    if net:  # the 4-branch network case (benchmarks/network.py)
        for key in ("speedup_vs_scipy_loop", "residual_passes", "max_relative_difference"):
            flat[f"network.{key}"] = float(net[key])
    tr = report.get("transient")
    if tr:  # start-up and time to alarm (benchmarks/transient.py)
        for key in ("speedup_vs_scenario_loop", "vector_solve_ms", "max_relative_difference"):
            flat[f"transient.{key}"] = float(tr[key])
    big = report.get("load_file")
    if big:  # reading a large scenario file (benchmarks/load_file.py)
        for key in ("load_s", "peak_mb"):
            flat[f"load_file.{key}"] = float(big[key])
    return flat


# ---------------------------------------------------------------------------- run
def run(n=100_000, repeats=7, widget_repeats=20, import_repeats=7, subset_scale=1.0):
    """Measure everything; return the report (a JSON-ready dict)."""
    load_before = load_average()
    rows, regimes = solve_rows(
        n, repeats, scalar_repeats=min(3, repeats), subset_scale=subset_scale
    )
    mc_ms, band = monte_carlo_ms(repeats)
    report = {
        "n": int(n),
        "seed": SEED,
        "line": f"tube {TUBE[0] * 1e3:g} mm x {TUBE[1]:g} m + {GAUGE}G catheter "
        f"(catalogue), heads {HEAD_RANGE[0]:g}-{HEAD_RANGE[1]:g} m",
        "machine": machine(),
        "load_average_before": load_before,
        "regime_counts": regimes,
        "solves": rows,
        "monte_carlo_10k_ms": mc_ms,
        "monte_carlo_dominant_input": band.dominant_input,
        "widget_update_ms": widget_ms(widget_repeats),
        "import_model_ms": import_ms(import_repeats),
        "network": network_case.run(n, min(3, repeats), subset_scale),
        "transient": transient_case.run(n, 1, subset_scale),
        "load_file": load_file_case.run(min(3, repeats)),
    }
    report["load_average_after"] = load_average()
    report["figures"] = figures(report)
    report["targets"] = [
        {"figure": k, "value": v, "target": t, "holds": bool(ok)} for k, v, t, ok in targets(report)
    ]
    report["all_agree"] = (
        all(row["agree"] for row in rows)
        and report["network"]["agree"]
        and report["transient"]["agree"]
    )
    return report


def _blas_text(blas):
    if isinstance(blas, str):
        return blas
    if not blas:
        return "none found by threadpoolctl"
    return "; ".join(
        f"{b['internal_api']} {b['version']} ({b['num_threads']} threads"
        + (f", {b['threading_layer']}" if b.get("threading_layer") else "")
        + ")"
        for b in blas
    )


def table(report):
    """The printed report (the README's table is this text from a real run)."""
    m = report["machine"]
    out = [
        f"rheoline benchmarks: N = {report['n']:,} scenarios of {report['line']}, seed "
        f"{report['seed']}",
        f"machine: {m['cpu_count']} CPUs ({m['cpus_usable']} usable), {m['cpu_model']}; "
        f"Python {m['python']}, numpy {m['numpy']}, scipy {m['scipy']}; "
        f"BLAS {_blas_text(m['blas'])}",
        f"load average (1, 5, 15 min) before {report['load_average_before']}, after "
        f"{report['load_average_after']}",
    ]
    for kind, counts in report["regime_counts"].items():
        missing = [k for k, v in counts.items() if v == 0]
        out.append(
            f"regimes, {kind} line: "
            + ", ".join(f"{k} {v:,}" for k, v in counts.items())
            + (f"  (none {'/'.join(missing)})" if missing else "")
        )
    out.append("")
    head = (
        f"{'solve':<70} {'vector':>8} {'residual':>8} {'scalar':>9} {'speedup':>8} "
        f"{'evals':>6} {'max rel':>8}"
    )
    out += [
        head,
        f"{'':<70} {'[ms]':>8} {'[ms]':>8} {'[us/case]':>9} {'[x]':>8} {'equiv':>6} {'diff':>8}",
        "-" * len(head),
    ]
    for row in report["solves"]:
        out.append(
            f"{row['label']:<70} {row['vector_solve_ms']:8.1f} "
            f"{row['vector_residual_ms']:8.1f} {row['scalar_us_per_scenario']:9.1f} "
            f"{row['speedup_vs_scalar_loop']:8.0f} {row['residual_evals_equivalent']:6.2f} "
            f"{row['max_relative_difference']:8.1e}"
        )
    out.append(
        "(scalar: plain-Python residual of the same physics, brentq per scenario for "
        "flows, one evaluation per scenario for pressures; strided subset timed)"
    )
    net = report.get("network")
    if net:
        out.append(
            f"4-branch network (benchmarks/network.py), {net['n']:,} scenarios: "
            f"{net['vector_solve_ms']:.1f} ms, {net['iterations']} Newton steps, "
            f"{net['residual_passes']} residual passes; scipy root per scenario "
            f"{net['scipy_us_per_scenario']:.0f} us; ratio {net['speedup_vs_scipy_loop']:.0f}x; "
            f"max rel diff {net['max_relative_difference']:.1e}; "
            f"{net['reversed_scenarios']:,} with backflow into the bag"
        )
    tr = report.get("transient")
    if tr:
        out.append(
            f"time solve (benchmarks/transient.py), {tr['n']:,} scenarios, start-up and time to "
            f"alarm: {tr['vector_solve_ms']:.0f} ms; one scenario at a time "
            f"{tr['loop_ms_per_scenario']:.0f} ms each; ratio {tr['speedup_vs_scenario_loop']:.0f}x; "
            f"max rel diff {tr['max_relative_difference']:.1e}"
        )
    big = report.get("load_file")
    if big:
        out.append(
            f"scenario file (benchmarks/load_file.py), {big['file_kb']:.0f} KB, "
            f"{big['scenarios']} scenarios x {big['parts'] // big['scenarios']} parts: read in "
            f"{big['load_s']:.2f} s, peak {big['peak_mb']:.0f} MB (Python allocations)"
        )
    out.append("")
    w = report["widget_update_ms"]
    extra = {
        "monte_carlo_10k_ms": f"10,000 samples; dominant: {report['monte_carlo_dominant_input']}"
    }
    if "comparison_band_samples" in w:
        extra["widget_update_ms[comparison_view ...]"] = (
            f"7 candidates x 200 points, {w['comparison_band_samples']:,}-sample band of a 5 % "
            "bore tolerance (+ 2 degC temperature in the last row)"
        )
    out.append(f"{'target':<72} {'value':>9} {'target':>8}  holds")
    out.append("-" * 100)
    for t in report["targets"]:
        out.append(
            f"{t['figure']:<72} {t['value']:9.2f} {t['target']:>8}  {'yes' if t['holds'] else 'NO'}"
        )
    for key, note in extra.items():
        out.append(f"  {key}: {note}")
    for key, value in w.items():
        if isinstance(value, str):
            out.append(f"  widget_update_ms[{key}]: {value}")
    out.append(
        f"vectorized and scalar answers agree within {AGREEMENT:g}: "
        f"{'yes' if report['all_agree'] else 'NO'}"
    )
    return "\n".join(out)


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--n", type=int, default=100_000, help="scenarios per solve")
    parser.add_argument("--repeats", type=int, default=7, help="repeats per timing (median)")
    parser.add_argument(
        "--widget-repeats", type=int, default=20, help="control changes per view (median)"
    )
    parser.add_argument(
        "--import-repeats",
        type=int,
        default=7,
        help="fresh interpreters for the import time (median)",
    )
    parser.add_argument(
        "--subset-scale", type=float, default=1.0, help="scale the scalar loop's timed subset"
    )
    parser.add_argument("--json", action="store_true", help="print one JSON object instead")
    parser.add_argument(
        "--json-out",
        metavar="FILE",
        help="also write the JSON object to FILE (the table is printed)",
    )
    args = parser.parse_args(argv)
    if args.n < 1:
        parser.error(f"--n must be at least 1, got {args.n}")
    report = run(args.n, args.repeats, args.widget_repeats, args.import_repeats, args.subset_scale)
    if args.json_out:
        Path(args.json_out).write_text(json.dumps(report, indent=1) + "\n")
    print(json.dumps(report, indent=1) if args.json else table(report))
    return 0 if report["all_agree"] else 1


if __name__ == "__main__":
    sys.exit(main())
