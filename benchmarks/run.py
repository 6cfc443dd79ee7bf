"""Benchmarks of rheoline: the vectorized engine against the straightforward alternative.

Run ``python benchmarks/run.py [--n N] [--json]`` from the repository root after
``pip install -e '.[widgets,test]'``.  It measures, in one run on one machine:

1. the line solves (``solves.py``): N scenarios of a tube and an 18G catheter, water and
   whole blood (Carreau), on both of the engine's paths (the shared line's characteristic,
   and the general Newton path with per-scenario parts), flows and pressures, against a
   plain-Python residual of the same physics (``scalar_reference.py``) solved by brentq one
   scenario at a time: ``speedup_vs_scalar_loop``, and ``residual_evals_equivalent`` (the
   solve's time over one vectorized residual pass at the answer);
2. ``large_n``: the general-path flow solve of 10^7 scenarios of each fluid, in a fresh
   process: seconds and peak memory (``large_n.py``);
3. ``packs``: a scenario file at the documented limit (20,000 points) written as a review
   pack and as JSON by the command line, in fresh processes (``packs.py``);
4. ``monte_carlo_10k_ms``: a 10,000-sample tolerance band (:func:`rheoline.flow_tolerance`);
5. ``network`` (a 4-branch network, ``network.py``) and ``transient`` (start-up and time to
   alarm of many syringe-pump scenarios, ``transient.py``);
6. ``widget_update_ms``: one control change in each view (``views.py``);
7. ``import_model_ms``: importing the model layer in a fresh interpreter;
8. ``load_file``: reading a valid 200-scenario, 40-part scenario file of about 770 KB
   (``benchmarks/load_file.py``): seconds and peak memory against 2 s and 300 MB.

The package's bytecode is compiled first (``python -m compileall``, as a regular install
has it after its first run; ``--no-compile`` skips it), so the fresh-process figures are
those of a user's ordinary run; where none was compiled before, one pack and one ``--json``
run at the limit are timed first without it (the first-run figures, printed beside).  The
machine, its load average, numpy's BLAS and how many modules had bytecode before the run
and after the compile are printed beside the figures (``timing.py``); each target is printed with whether it holds
(``report.py``).  Exit status 0 whether or not targets hold (it is a report), 1 when the
vectorized and scalar answers disagree by more than 1e-6 relative or an output is incomplete.
"""

from __future__ import annotations

import argparse
import json
import statistics
import subprocess
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

import large_n  # noqa: E402  (the script's own folder)
import load_file as load_file_case  # noqa: E402
import network as network_case  # noqa: E402
import packs  # noqa: E402
import report as report_text  # noqa: E402
import transient as transient_case  # noqa: E402
from solves import GAUGE, HEAD_RANGE, SEED, TUBE, benchmark_line, solve_rows  # noqa: E402
from timing import (  # noqa: E402
    bytecode_status,
    compile_package,
    load_average,
    machine,
    median_time,
)
from views import widget_ms  # noqa: E402

import rheoline  # noqa: E402

IMPORT_SNIPPET = (
    "import time; t = time.perf_counter(); import rheoline; "
    "rheoline.Line; rheoline.Tube; rheoline.Catheter; rheoline.fluid; rheoline.flow_tolerance; "
    "print(time.perf_counter() - t)"
)


def monte_carlo_ms(repeats, n_samples=10_000):
    """A tolerance band of the benchmark line: bores 5 %, lengths 2 %, temperature 2 degC."""
    line = benchmark_line()
    water = rheoline.fluid("water", temperature_c=22.0)

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


def run(args):
    """Measure everything; return the report (a JSON-ready dict)."""
    bytecode = bytecode_status()
    load_before = load_average()
    first_run = None
    if args.pack_points and bytecode["cached"] < bytecode["modules"]:
        first_run = packs.cold(args.pack_points)
    if args.compile:
        # a regular install has the package's bytecode after its first run (pip compiles
        # it); the fresh-process figures below are those of a user's ordinary run
        bytecode["compiled_by_benchmark"] = compile_package()["cached"]
    rows, regimes = solve_rows(
        args.n, args.repeats, scalar_repeats=min(3, args.repeats), subset_scale=args.subset_scale
    )
    mc_ms, band = monte_carlo_ms(args.repeats)
    report = {
        "n": int(args.n),
        "seed": SEED,
        "line": f"tube {TUBE[0] * 1e3:g} mm x {TUBE[1]:g} m + {GAUGE}G catheter "
        f"(catalogue), heads {HEAD_RANGE[0]:g}-{HEAD_RANGE[1]:g} m",
        "machine": machine(),
        "bytecode": bytecode,
        "load_average_before": load_before,
        "regime_counts": regimes,
        "solves": rows,
        "large_n": large_n.run(args.large_n) if args.large_n else {},
        "packs": packs.run(args.pack_points, args.pack_repeats) if args.pack_points else None,
        "packs_first_run": first_run,
        "monte_carlo_10k_ms": mc_ms,
        "monte_carlo_dominant_input": band.dominant_input,
        "widget_update_ms": widget_ms(args.widget_repeats),
        "import_model_ms": import_ms(args.import_repeats),
        "network": network_case.run(args.n, min(3, args.repeats), args.subset_scale),
        "transient": transient_case.run(args.n, 1, args.subset_scale),
        "load_file": load_file_case.run(min(3, args.repeats)),
    }
    report["load_average_after"] = load_average()
    report["figures"] = report_text.figures(report)
    report["targets"] = [
        {"figure": k, "value": v, "target": t, "holds": bool(ok)}
        for k, v, t, ok in report_text.targets(report)
    ]
    large = report["large_n"].values()
    report["all_agree"] = (
        all(row["agree"] for row in rows)
        and report["network"]["agree"]
        and report["transient"]["agree"]
        and all(case.get("converged") and case.get("all_flowing") for case in large)
        and (report["packs"] is None or report["packs"]["agree"])
    )
    return report


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--n", type=int, default=100_000, help="scenarios per solve")
    parser.add_argument("--repeats", type=int, default=7, help="repeats per timing (median)")
    parser.add_argument(
        "--widget-repeats", type=int, default=20, help="control changes per view (median)"
    )
    parser.add_argument(
        "--import-repeats", type=int, default=7, help="fresh interpreters for the import time"
    )
    parser.add_argument(
        "--subset-scale", type=float, default=1.0, help="scale the scalar loop's timed subset"
    )
    parser.add_argument(
        "--large-n", type=int, default=10_000_000, help="scenarios of the large case (0: skip)"
    )
    parser.add_argument(
        "--pack-points",
        type=int,
        default=packs.LIMIT_POINTS,
        help="sweep points of the pack and JSON case (0: skip)",
    )
    parser.add_argument("--pack-repeats", type=int, default=3, help="fresh runs per pack time")
    parser.add_argument(
        "--no-compile",
        dest="compile",
        action="store_false",
        help="do not compile the package's bytecode before the fresh-process timings",
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
    report = run(args)
    if args.json_out:
        Path(args.json_out).write_text(json.dumps(report, indent=1) + "\n")
    print(json.dumps(report, indent=1) if args.json else report_text.table(report))
    return 0 if report["all_agree"] else 1


if __name__ == "__main__":
    sys.exit(main())
