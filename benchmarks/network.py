"""Benchmark case of a branched line: a 4-branch network for N scenarios at once.

A gravity bag (head uniform in 0.5-1.5 m) feeds a 3.0 mm x 1.8 m set to a Y-site, where a
pump (0-100 mL/min, seeded) joins through a 1.0 mm x 1.5 m line; a 1.5 mm x 0.5 m extension
runs to the hub of an 18G catalogue catheter into a vein at 8 mmHg; water at 22 degC.  Some
scenarios push fluid back into the bag.  :meth:`rheoline.model.branched.PartNetwork.solve`
solves all N together; the reference solves each scenario alone with
:func:`scipy.optimize.root` (hybr) on the 7 equations (4 branch laws, 3 node balances),
each law evaluated through the same line physics for one scenario (a strided subset is
timed and scaled per scenario).  Reported: residual passes and Newton steps of the
vectorized solve, its time, the scipy loop's time per scenario, their ratio, and the
largest relative difference of the branch flows.
"""

from __future__ import annotations

import argparse
import json
import sys
import time
from pathlib import Path

import numpy as np
from scipy.optimize import root

import rheoline
from rheoline.model.branched import Branch, PartNetwork, PressureNode, Pump
from rheoline.model.parts import Catheter, Tube

sys.path.insert(0, str(Path(__file__).resolve().parent))
from timing import load_average, machine  # noqa: E402

SEED = 20261217
HEADS = (0.5, 1.5)  # [m]
PUMP_ML_MIN = (0.0, 100.0)
VEIN_PA = 8 * 133.322
SUBSET = 60  # scenarios of the scipy loop timed (times --subset-scale)


def network(n, seed=SEED):
    """The benchmark network with N seeded scenarios."""
    rng = np.random.default_rng(seed)
    heads = rng.uniform(*HEADS, n)
    pump = rng.uniform(*PUMP_ML_MIN, n) * 1e-6 / 60
    return (
        PartNetwork(
            [
                Branch("set", "bag", "y-site", [Tube(inner_diameter=3.0e-3, length=1.8)]),
                Branch("pump line", "pump", "y-site", [Tube(inner_diameter=1.0e-3, length=1.5)]),
                Branch("extension", "y-site", "hub", [Tube(inner_diameter=1.5e-3, length=0.5)]),
                Branch("catheter", "hub", "vein", [Catheter(gauge=18)]),
            ],
            [
                PressureNode("bag", head=heads, label="gravity bag"),
                PressureNode("vein", pressure=VEIN_PA, outlet=True),
            ],
            [Pump("pump", flow=pump, label="pump")],
        ),
        heads,
        pump,
    )


def _scipy_one(net, fluid, head, pump):
    """One scenario by scipy.optimize.root on flows and free-node pressures."""
    branches = net.branches
    m = len(branches)
    free = list(net.topology.free_nodes)
    laws = [(b.line, b.line._layout(fluid, ())) for b in branches]
    back = [(r, r._layout(fluid, ())) for r in net._reversed]
    fixed = {"bag": fluid.density * 9.80665 * head, "vein": VEIN_PA}

    def law(k, q):
        line, layout = (laws if q >= 0 else back)[k]
        loss = line._exact_losses(layout, fluid, np.asarray(max(abs(q), 1e-18)))[0]
        return float(loss) if q >= 0 else -float(loss)

    def residual(x):
        q, p = x[:m], dict(zip(free, x[m:], strict=True))
        p.update(fixed)
        out = [law(k, q[k]) - (p[b.start] - p[b.end]) for k, b in enumerate(branches)]
        for node in free:
            out_flow = sum(q[k] for k, b in enumerate(branches) if b.start == node)
            in_flow = sum(q[k] for k, b in enumerate(branches) if b.end == node)
            out.append((out_flow - in_flow - (pump if node == "pump" else 0.0)) * 1e9)
        return out

    guess = np.concatenate([np.full(m, 1e-6), np.full(len(free), fixed["bag"])])
    return root(residual, guess, method="hybr", options={"xtol": 1e-12}).x[:m]


def run(n, repeats=3, subset_scale=1.0):
    """The network figures (a JSON-ready dict)."""
    fluid = rheoline.fluid("water", temperature_c=22.0)
    net, heads, pump = network(n)
    times, result = [], None
    for _ in range(max(1, repeats)):
        start = time.perf_counter()
        result = net.solve(fluid)
        times.append(time.perf_counter() - start)
    vector_s = float(np.median(times))
    size = max(3, min(n, int(round(SUBSET * subset_scale))))
    picks = np.unique(np.linspace(0, n - 1, size).astype(int))
    start = time.perf_counter()
    flows = np.array([_scipy_one(net, fluid, heads[i], pump[i]) for i in picks])
    scipy_s = (time.perf_counter() - start) / picks.size
    mine = result.branch_flow[:, picks].T
    scale = np.max(np.abs(mine), axis=1, keepdims=True)
    diff = float(np.max(np.abs(flows - mine) / scale))
    return {
        "n": int(n),
        "branches": len(net.branches),
        "iterations": result.iterations,
        "residual_passes": result.residual_passes,
        "reversed_scenarios": int(np.count_nonzero(result.reversed[0])),
        "vector_solve_ms": vector_s * 1e3,
        "scipy_us_per_scenario": scipy_s * 1e6,
        "speedup_vs_scipy_loop": scipy_s * n / vector_s,
        "max_relative_difference": diff,
        "agree": bool(diff < 1e-6 and result.converged),
    }


def main(argv=None):
    """Run the case alone and print one JSON object (with the machine and its load)."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--n", type=int, default=100_000, help="scenarios solved together")
    parser.add_argument("--repeats", type=int, default=3, help="vectorized solves (median)")
    parser.add_argument(
        "--subset-scale", type=float, default=1.0, help="scale the scipy loop's timed subset"
    )
    args = parser.parse_args(argv)
    before = load_average()
    report = run(args.n, args.repeats, args.subset_scale)
    report = {"machine": machine(), "load_average_before": before, **report}
    report["load_average_after"] = load_average()
    print(json.dumps(report, indent=1))
    return 0 if report["agree"] else 1


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
