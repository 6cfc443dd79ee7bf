"""Benchmark case: the general-path flow solve of very many scenarios, time and peak memory.

The benchmark line (``solves.benchmark_line``) with its tube's bore given per scenario (N
equal values, so that the engine takes its general Newton path), heads uniform in 0.3-1.5 m,
for water and for whole blood (Carreau).  Each fluid is solved in a fresh interpreter
(``python benchmarks/large_n.py --fluid water --n 10000000``), which reports the solve's
wall time and the process's peak resident memory (``ru_maxrss``: the interpreter, numpy and
scipy, the N heads and bores given as input, the result's arrays and the solve's working
memory), so that one case's memory does not hide in another's.  The issue's target is a peak
of 1.5 GB at 10^7 scenarios.
"""

from __future__ import annotations

import argparse
import json
import resource
import subprocess
import sys
import time
from pathlib import Path

__all__ = ["run", "measure"]

HERE = Path(__file__).resolve().parent


def measure(kind, n):
    """Solve ``n`` scenarios of fluid ``kind`` here; the figures as a dict."""
    sys.path.insert(0, str(HERE))
    import numpy as np
    from solves import benchmark_line, fluids, heads

    fluid = fluids()[kind][1]
    line = benchmark_line(n)
    head = heads(n)
    before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    start = time.perf_counter()
    result = line.solve(fluid, head=head)
    seconds = time.perf_counter() - start
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    flows = np.asarray(result.flow)
    return {
        "fluid": kind,
        "n": int(n),
        "seconds": seconds,
        "peak_rss_mb": peak / 1024.0,  # ru_maxrss is in kB on Linux
        "rss_before_solve_mb": before / 1024.0,
        "iterations": int(result.iterations),
        "converged": bool(result.converged),
        "all_flowing": bool(np.all(flows > 0)),
    }


def run(n, kinds=("newtonian", "blood")):
    """{kind: figures} of each fluid, each measured in a fresh interpreter."""
    out = {}
    for kind in kinds:
        done = subprocess.run(
            [sys.executable, str(HERE / "large_n.py"), "--fluid", kind, "--n", str(int(n))],
            capture_output=True,
            text=True,
            check=False,
        )
        if done.returncode != 0:
            out[kind] = {"fluid": kind, "n": int(n), "error": done.stderr.strip()[-400:]}
            continue
        out[kind] = json.loads(done.stdout.strip().splitlines()[-1])
    return out


def main(argv=None):
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--fluid", choices=("newtonian", "blood"), required=True)
    parser.add_argument("--n", type=int, default=10_000_000)
    args = parser.parse_args(argv)
    print(json.dumps(measure(args.fluid, args.n)))


if __name__ == "__main__":
    main()
