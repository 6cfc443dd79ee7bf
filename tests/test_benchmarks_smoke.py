"""Smoke test of benchmarks/run.py at a tiny N, and of its plain-Python reference.

No timing assertions (speed is what the benchmark reports, not what the suite checks):
the script must run, report every figure, and the vectorized and scalar answers must agree.
"""

import importlib.util
import json
import math
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

import rheoline

BENCHMARKS = Path(__file__).resolve().parents[1] / "benchmarks"


def _load(name):
    spec = importlib.util.spec_from_file_location(f"_bench_{name}", BENCHMARKS / f"{name}.py")
    module = importlib.util.module_from_spec(spec)
    sys.path.insert(0, str(BENCHMARKS))
    try:
        spec.loader.exec_module(module)
    finally:
        sys.path.remove(str(BENCHMARKS))
    return module


scalar = _load("scalar_reference")

EXPECTED_FIGURES = [
    f"{kind}_{what}{path}.{figure}"
    for kind in ("newtonian", "blood")
    for what in ("flow", "pressure")
    for path in ("", "_newton_path")
    for figure in (
        "speedup_vs_scalar_loop",
        "residual_evals_equivalent",
        "max_relative_difference",
        "vector_us_per_scenario",
        "scalar_us_per_scenario",
    )
] + [
    "large_n_peak_rss_mb[water]",
    "large_n_seconds[water]",
    "large_n_peak_rss_mb[blood]",
    "large_n_seconds[blood]",
    "pack_at_limit_s",
    "json_at_limit_s",
    "monte_carlo_10k_ms",
    "widget_update_ms[line_view head]",
    "widget_update_ms[comparison_view temperature]",
    "widget_update_ms[comparison_view head]",
    "widget_update_ms[comparison_view temperature, bore+temperature band]",
    "widget_update_ms[blood_view hematocrit]",
    "widget_update_ms[network_view head]",
    "widget_update_ms[time_view set rate]",
    "import_model_ms",
    "network.speedup_vs_scipy_loop",
    "network.residual_passes",
    "network.max_relative_difference",
    "transient.speedup_vs_scenario_loop",
    "transient.vector_solve_ms",
    "transient.max_relative_difference",
    "load_file.load_s",
    "load_file.peak_mb",
]
#: The figures the issues name for their targets (issue 14's list among them).
NAMED_TARGETS = {
    "newtonian_flow_newton_path.speedup_vs_scalar_loop",
    "newtonian_flow_newton_path.residual_evals_equivalent",
    "blood_flow_newton_path.speedup_vs_scalar_loop",
    "blood_flow_newton_path.residual_evals_equivalent",
    "large_n_peak_rss_mb[water]",
    "large_n_peak_rss_mb[blood]",
    "pack_at_limit_s",
    "json_at_limit_s",
    "widget_update_ms[comparison_view temperature, bore+temperature band]",
}


@pytest.mark.slow
def test_benchmark_script_runs_at_tiny_n_and_reports_every_figure():
    done = subprocess.run(
        [
            sys.executable,
            str(BENCHMARKS / "run.py"),
            "--n",
            "300",
            "--json",
            "--repeats",
            "1",
            "--widget-repeats",
            "1",
            "--import-repeats",
            "1",
            "--subset-scale",
            "0.05",
            "--large-n",
            "3000",
            "--pack-points",
            "80",
            "--pack-repeats",
            "1",
        ],
        capture_output=True,
        text=True,
        timeout=600,
    )
    assert done.returncode == 0, done.stderr
    report = json.loads(done.stdout)
    for key, value in report["figures"].items():
        print(f"{key} = {value:.4g}")
    assert sorted(report["figures"]) == sorted(EXPECTED_FIGURES)
    assert all(math.isfinite(v) and v >= 0 for v in report["figures"].values())
    assert report["all_agree"] is True
    assert all(row["max_relative_difference"] <= 1e-6 for row in report["solves"])
    counts = report["regime_counts"]["newtonian"]
    assert sum(counts.values()) == 300 and counts["laminar"] > 0
    assert {t["figure"] for t in report["targets"]} <= set(report["figures"])
    assert NAMED_TARGETS <= {t["figure"] for t in report["targets"]}
    # no speed-up target for a pressure solve: it evaluates the losses once (no root to
    # find), so it is held to residual passes only
    assert not any(
        "pressure" in t["figure"] and "speedup" in t["figure"] for t in report["targets"]
    )
    assert report["packs"]["json_records"] == 80 and report["packs"]["agree"]
    assert all(case["converged"] for case in report["large_n"].values())
    assert all(isinstance(t["holds"], bool) for t in report["targets"])
    assert report["machine"]["cpu_count"] >= 1 and report["machine"]["numpy"] == np.__version__


def test_printed_table_names_every_target():
    run = _load("report")
    report = {
        "n": 3,
        "seed": 1,
        "line": "demo",
        "load_average_before": [0.1, 0.1, 0.1],
        "load_average_after": [0.2, 0.1, 0.1],
        "machine": {
            "cpu_count": 2,
            "cpus_usable": 2,
            "cpu_model": "x",
            "python": "3",
            "numpy": "2",
            "scipy": "1",
            "blas": [],
        },
        "regime_counts": {"newtonian": {"laminar": 3, "transitional": 0, "turbulent": 0}},
        "solves": [
            {
                "key": "newtonian_flow",
                "label": "water",
                "kind": "newtonian",
                "solve": "flow",
                "path": "shared",
                "vector_us_per_scenario": 0.01,
                "vector_solve_ms": 1.0,
                "vector_residual_ms": 0.5,
                "scalar_us_per_scenario": 40.0,
                "speedup_vs_scalar_loop": 120.0,
                "residual_evals_equivalent": 2.0,
                "max_relative_difference": 1e-10,
                "agree": True,
            }
        ],
        "monte_carlo_10k_ms": 150.0,
        "monte_carlo_dominant_input": "bore",
        "widget_update_ms": {"line_view head": 20.0, "comparison_view pending": "not built"},
        "import_model_ms": 250.0,
        "all_agree": True,
    }
    report["targets"] = [
        {"figure": k, "value": v, "target": t, "holds": ok} for k, v, t, ok in run.targets(report)
    ]
    text = run.table(report)
    print(text)
    assert "newtonian_flow.speedup_vs_scalar_loop" in text
    assert "monte_carlo_10k_ms" in text and "NO" in text  # 150 ms misses < 100 ms
    assert "widget_update_ms[comparison_view pending]: not built" in text
    assert "(none transitional/turbulent)" in text


@pytest.mark.parametrize("model", ["newtonian", "carreau"])
def test_scalar_reference_matches_the_line_engine_in_every_regime(model):
    # laminar to turbulent: 1 m of head plus source pressures up to 60 kPa (pressure bag)
    line = rheoline.Line(
        [rheoline.Tube(inner_diameter=3.0e-3, length=1.8), rheoline.Catheter(gauge=18)]
    )
    cath = rheoline.Catheter(gauge=18)
    sline = scalar.ScalarLine([(3.0e-3, 1.8), (cath.inner_diameter, cath.length)])
    if model == "newtonian":
        fluid = rheoline.fluid("water", temperature_c=22.0)
        sfluid = scalar.ScalarNewtonian(fluid.rheology.mu, fluid.density)
    else:
        fluid = rheoline.fluid("packed-red-cells", temperature_c=37.0, model="carreau")
        r = fluid.rheology
        sfluid = scalar.ScalarCarreau(
            r.mu_zero, r.mu_inf, r.relaxation_time, r.flow_index, fluid.density
        )
    pressures = np.linspace(0.0, 6.0e4, 13)
    result = line.solve(fluid, head=1.0, source_pressure=pressures)
    flows = np.array(
        [scalar.solve_flow(sline, sfluid, head=1.0, source_pressure=p)[0] for p in pressures]
    )
    np.testing.assert_allclose(flows, result.flow, rtol=1e-6)
    if model == "newtonian":
        assert set(np.asarray(result.regime)) == {"laminar", "transitional", "turbulent"}
    drive = fluid.density * scalar.GRAVITY * 1.0 + pressures
    residuals = [
        scalar.residual(q * 1.1, sline, sfluid, d) for q, d in zip(flows, drive, strict=True)
    ]
    np.testing.assert_allclose(
        residuals,
        line.pressure_residual(fluid, flows * 1.1, head=1.0, source_pressure=pressures),
        rtol=1e-9,
    )
    back = [scalar.solve_pressure(sline, sfluid, q, head=1.0) for q in flows]
    np.testing.assert_allclose(back, pressures, rtol=1e-6, atol=1e-6 * pressures.max())


def test_scalar_friction_is_churchill_1977_for_long_lumens():
    # Churchill, Chem. Eng. 84 (1977) 91-92, as implemented by the `fluids` library
    # (fluids.friction.Churchill_1977); in a very long lumen the Shah 1978 developing term
    # tends to the fully developed 64/Re, so the blend is Churchill's own equation.
    fluids_friction = pytest.importorskip("fluids.friction")
    for re in (100.0, 1500.0, 3000.0, 1e4, 1e5):
        ours = scalar._apparent_darcy_friction(re, 1e12)
        assert ours == pytest.approx(fluids_friction.Churchill_1977(re, 0.0), rel=1e-6)


def test_scalar_carreau_tube_flow_limits():
    # Newtonian limit of the Rabinowitsch integral: mu_zero = mu_inf gives Hagen-Poiseuille,
    # Q = pi R^4 dp / (8 mu L) (Sutera & Skalak 1993), i.e. apparent viscosity = mu.
    fluid = scalar.ScalarCarreau(3.0e-3, 3.0e-3, 3.313, 0.3568, 1050.0)
    assert fluid.apparent_viscosity(1e-6, 0.5e-3) == pytest.approx(3.0e-3, rel=1e-12)
    # shear thinning: between mu_inf and mu_zero, lower at higher flow
    blood = scalar.ScalarCarreau(0.056, 0.00345, 3.313, 0.3568, 1050.0)
    slow, fast = (blood.apparent_viscosity(q, 0.5e-3) for q in (1e-9, 1e-6))
    assert 0.00345 < fast < slow < 0.056


def test_scalar_solve_flow_gives_no_flow_without_drive():
    sline = scalar.ScalarLine([(3.0e-3, 1.8)])
    assert scalar.solve_flow(sline, scalar.ScalarNewtonian(1e-3, 998.0), head=0.0) == (0.0, 0)


def test_transient_case_agrees_with_its_per_scenario_solves():
    # no timing asserted: the vectorized figures must equal the one-at-a-time ones
    case = _load("transient")
    report = case.run(4, repeats=1, subset_scale=0.5)
    assert report["n"] == 4 and report["agree"] is True
    assert report["max_relative_difference"] < 1e-3
    low, high = report["time_to_alarm_min_range"]
    assert 0 < low < high


@pytest.mark.slow
def test_hostile_files_benchmark_reads_its_files_and_reports_every_figure():
    # benchmarks/hostile_files.py (README's Reliability figures); no timing asserted
    hostile = _load("hostile_files")
    names = ["deepest-headers-1MB", "unit-spellings"]
    report = hostile.run(only=names)
    assert [row["name"] for row in report["files"]] == names
    assert all(row["outcome"] == "refused" for row in report["files"])
    assert report["valid"]["outcome"] == "loaded" and report["valid"]["kb"] > 700
    for key in ("max_load_s", "max_cpu_s", "max_grown_mb", "startup_s"):
        assert math.isfinite(report[key]) and report[key] >= 0, key
    text = hostile._report(report)
    assert all(name in text for name in names) and "largest:" in text
