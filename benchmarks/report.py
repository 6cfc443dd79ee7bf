"""The benchmark report: every figure by a flat key, every target, and the printed table.

Targets come from issue 7 (the shared line, the Monte Carlo band, the import) and issue 14
(the general path, very many scenarios, packs and JSON at the file limit, every view).
"""

from __future__ import annotations

__all__ = ["targets", "figures", "table", "TARGETS"]

#: Targets of the flow-solve rows: key -> (speed-up at least, residual passes at most).
FLOW_TARGETS = {
    "newtonian_flow": (100.0, 4.0),  # issue 7: the shared line
    "blood_flow": (50.0, 4.0),
    "newtonian_flow_newton_path": (100.0, 4.0),  # issue 14: the general path
    "blood_flow_newton_path": (200.0, 4.0),
}
#: Pressure solves: one evaluation per scenario; their residual passes at most.
PRESSURE_PASSES = 2.0
MS_TARGET = 100.0
IMPORT_TARGET = 300.0
RSS_TARGET_MB = 1500.0
PACK_TARGET_S = 8.0
JSON_TARGET_S = 2.0
TARGETS = {
    "large_n_peak_rss_mb": RSS_TARGET_MB,
    "pack_at_limit_s": PACK_TARGET_S,
    "json_at_limit_s": JSON_TARGET_S,
}


def _target(figure, value, op, bound):
    holds = value >= bound if op == ">=" else (value < bound if op == "<" else value <= bound)
    return (figure, value, f"{op} {bound:g}", bool(holds))


def targets(report):
    """[(figure key, value, target text, holds)] for every target."""
    out = []
    for row in report["solves"]:
        key = row["key"]
        if row["solve"] == "flow":
            speed, passes = FLOW_TARGETS[key]
            out.append(
                _target(f"{key}.speedup_vs_scalar_loop", row["speedup_vs_scalar_loop"], ">=", speed)
            )
        else:
            passes = PRESSURE_PASSES
        out.append(
            _target(
                f"{key}.residual_evals_equivalent", row["residual_evals_equivalent"], "<=", passes
            )
        )
    for kind, label in (("newtonian", "water"), ("blood", "blood")):
        case = report.get("large_n", {}).get(kind, {})
        if "peak_rss_mb" in case:
            out.append(
                _target(f"large_n_peak_rss_mb[{label}]", case["peak_rss_mb"], "<=", RSS_TARGET_MB)
            )
    packs = report.get("packs")
    if packs:
        out.append(_target("pack_at_limit_s", packs["pack_s"], "<=", PACK_TARGET_S))
        out.append(_target("json_at_limit_s", packs["json_s"], "<=", JSON_TARGET_S))
    out.append(_target("monte_carlo_10k_ms", report["monte_carlo_10k_ms"], "<", MS_TARGET))
    for name, value in report["widget_update_ms"].items():
        if isinstance(value, float):
            out.append(_target(f"widget_update_ms[{name}]", value, "<=", MS_TARGET))
    out.append(_target("import_model_ms", report["import_model_ms"], "<", IMPORT_TARGET))
    big = report.get("load_file")
    if big:  # reading a large scenario file (benchmarks/load_file.py)
        out.append(_target("load_file.load_s", big["load_s"], "<", big["target_s"]))
        out.append(_target("load_file.peak_mb", big["peak_mb"], "<", big["target_mb"]))
    return out


def figures(report):
    """Every figure by a flat key (what the table prints and the smoke test checks)."""
    flat = {}
    for row in report["solves"]:
        for key in (
            "speedup_vs_scalar_loop",
            "residual_evals_equivalent",
            "max_relative_difference",
            "vector_us_per_scenario",
            "scalar_us_per_scenario",
        ):
            flat[f"{row['key']}.{key}"] = row[key]
    for kind, label in (("newtonian", "water"), ("blood", "blood")):
        case = report.get("large_n", {}).get(kind, {})
        if "peak_rss_mb" in case:
            flat[f"large_n_peak_rss_mb[{label}]"] = case["peak_rss_mb"]
            flat[f"large_n_seconds[{label}]"] = case["seconds"]
    packs = report.get("packs")
    if packs:
        flat["pack_at_limit_s"] = packs["pack_s"]
        flat["json_at_limit_s"] = packs["json_s"]
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


def _header(report):
    m = report["machine"]
    code = report.get("bytecode")
    out = [
        f"rheoline benchmarks: N = {report['n']:,} scenarios of {report['line']}, seed "
        f"{report['seed']}",
        f"machine: {m['cpu_count']} CPUs ({m['cpus_usable']} usable), {m['cpu_model']}; "
        f"Python {m['python']}, numpy {m['numpy']}, scipy {m['scipy']}; "
        f"BLAS {_blas_text(m['blas'])}",
        f"load average (1, 5, 15 min) before {report['load_average_before']}, after "
        f"{report['load_average_after']}",
    ]
    if code:
        compiled = code.get("compiled_by_benchmark")
        out.append(
            f"bytecode: {code['cached']} of {code['modules']} modules compiled before the run"
            + ("" if code["writes_bytecode"] else " (PYTHONDONTWRITEBYTECODE: none is written)")
            + (
                "; not compiled by the benchmark (--no-compile)"
                if compiled is None
                else f"; {compiled} compiled after the benchmark's compileall, before every "
                "timing (a regular install's state after its first run)"
            )
        )
    for kind, counts in report["regime_counts"].items():
        missing = [k for k, v in counts.items() if v == 0]
        out.append(
            f"regimes, {kind} line: "
            + ", ".join(f"{k} {v:,}" for k, v in counts.items())
            + (f"  (none {'/'.join(missing)})" if missing else "")
        )
    return out


def _solve_table(report):
    head = (
        f"{'solve':<66} {'path':>6} {'vector':>8} {'resid.':>7} {'vector':>8} {'scalar':>9} "
        f"{'speedup':>8} {'passes':>6} {'max rel':>8}"
    )
    out = [
        head,
        f"{'':<66} {'':>6} {'[ms]':>8} {'[ms]':>7} {'[us/case]':>8} {'[us/case]':>9} "
        f"{'[x]':>8} {'equiv':>6} {'diff':>8}",
        "-" * len(head),
    ]
    for row in report["solves"]:
        engine = {"characteristic": "curve", "Newton": "Newton"}.get(row.get("engine_path"), "")
        out.append(
            f"{row['label']:<66} {engine:>6} {row['vector_solve_ms']:8.1f} "
            f"{row['vector_residual_ms']:7.1f} {row.get('vector_us_per_scenario', 0.0):8.3f} "
            f"{row['scalar_us_per_scenario']:9.1f} {row['speedup_vs_scalar_loop']:8.0f} "
            f"{row['residual_evals_equivalent']:6.2f} {row['max_relative_difference']:8.1e}"
        )
    out.append(
        "(scalar: plain-Python residual of the same physics, brentq per scenario for flows, "
        "one evaluation per scenario for pressures; strided subset timed. passes: the solve's "
        "time over one vectorized residual pass at the answer)"
    )
    return out


def _cases(report):
    out = []
    for kind, case in report.get("large_n", {}).items():
        if "error" in case:
            out.append(f"{case['n']:,} scenarios, {kind}, general path: FAILED ({case['error']})")
            continue
        out.append(
            f"{case['n']:,} scenarios, {kind}, general path (fresh process): {case['seconds']:.1f} s, "
            f"peak memory {case['peak_rss_mb']:.0f} MB ({case['rss_before_solve_mb']:.0f} MB "
            f"before the solve), {case['iterations']} iterations, converged {case['converged']}"
        )
    packs = report.get("packs")
    if packs:
        out.append(
            f"scenario file of {packs['points']:,} points (fresh processes): review pack "
            f"{packs['pack_s']:.1f} s, --json {packs['json_s']:.1f} s "
            f"({packs['json_records']:,} records); outputs complete: {packs['agree']}"
        )
    first = report.get("packs_first_run")
    if first:
        out.append(
            f"  the same without the package's bytecode (one run each, before the compile): "
            f"review pack {first['pack_s']:.1f} s, --json {first['json_s']:.1f} s"
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
    return out


def table(report):
    """The printed report (the README's table is this text from a real run)."""
    out = _header(report) + [""] + _solve_table(report) + _cases(report) + [""]
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
        f"vectorized and scalar answers agree within 1e-06: {'yes' if report['all_agree'] else 'NO'}"
    )
    return "\n".join(out)
