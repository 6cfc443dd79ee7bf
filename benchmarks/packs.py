"""Benchmark case: a scenario file at the documented limit, as a review pack and as JSON.

The documented limit of a scenario file is 20,000 sweep points
(:data:`rheoline.scenario.schema.MAX_TOTAL_POINTS`).  :func:`limit_file` writes such a file
(invented bench data: four scenarios of 5,000 points each, a head, bag-pressure or pump-flow
sweep of 500 values across ten catheter sizes, water, saline and blood), and :func:`run`
times, each in a fresh interpreter as a user runs them (imports, pint's registry, reading,
solving, writing):

* ``rheoline run FILE --out DIR`` (``pack_at_limit_s``: every file of the review pack);
* ``rheoline run FILE --json`` written to a file (``json_at_limit_s``).

``benchmarks/run.py`` compiles the package's bytecode first, as a regular install has it
(:func:`timing.compile_package`); where none was compiled before, :func:`cold` times one run
of each without it first (the figure of a first run, and of every run where no bytecode is
ever written).

It also checks the outputs: every pack file present, one JSON record per point, each with
the caution.
"""

from __future__ import annotations

import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

__all__ = ["limit_file", "run", "cold", "LIMIT_POINTS"]

#: Sweep points of the file at the documented limit.
LIMIT_POINTS = 20_000
_GAUGES = [14, 16, 18, 20, 22, 24, 26, 16, 18, 20]
_SET = """
[[scenario.part]]
type = "tube"
label = "extension set"
inner_diameter = "2.5 mm"
length = "1.5 m"
"""
_SCENARIOS = (
    ("water gravity", "water", "22 degC", "head", "cm", 10.0, 0.5, 'back_pressure = "8 mmHg"'),
    (
        "saline pressure bag",
        "saline-0.9",
        "37 degC",
        "source_pressure",
        "mmHg",
        10.0,
        0.5,
        'head = "80 cm"\nback_pressure = "8 mmHg"',
    ),
    (
        "blood gravity",
        "whole-blood",
        "37 degC",
        "head",
        "cm",
        10.0,
        0.5,
        'back_pressure = "8 mmHg"',
    ),
    (
        "packed cells pump",
        "packed-red-cells",
        "22 degC",
        "flow",
        "mL/min",
        1.0,
        0.5,
        'pressure_limit = "300 mmHg"\nback_pressure = "8 mmHg"',
    ),
)


def limit_file(points=LIMIT_POINTS):
    """The text of a scenario file of ``points`` sweep points (a multiple of 40)."""
    per_scenario = max(1, points // (len(_SCENARIOS) * len(_GAUGES)))
    out = [
        "# A bench sweep at the documented file limit (invented data): four scenarios,",
        "# each a sweep across ten catheter sizes.",
        "format_version = 1",
        f'title = "Sweep of {points:,} points (invented benchmark file)"',
    ]
    for name, fluid, temperature, swept, unit, start, step, rest in _SCENARIOS:
        stop = start + step * (per_scenario - 1)
        sweep = (
            f'{{ start = "{start:g} {unit}", stop = "{stop:g} {unit}", step = "{step:g} {unit}" }}'
        )
        out += [
            "",
            "[[scenario]]",
            f'name = "{name}"',
            f'fluid = "{fluid}"',
            f'temperature = "{temperature}"',
            f"{swept} = {sweep}" if per_scenario > 1 else f'{swept} = "{start:g} {unit}"',
            rest,
            _SET,
            "[[scenario.part]]",
            'type = "catheter"',
            f"gauge = {_GAUGES}",
        ]
    return "\n".join(out) + "\n"


def _timed(arguments, stdout=None, env=None):
    start = time.perf_counter()
    done = subprocess.run(
        [sys.executable, "-m", "rheoline.cli", *arguments],
        stdout=stdout or subprocess.DEVNULL,
        stderr=subprocess.PIPE,
        text=True,
        check=False,
        env=env,
    )
    seconds = time.perf_counter() - start
    if done.returncode != 0:
        raise RuntimeError(f"rheoline {' '.join(arguments)} failed: {done.stderr.strip()[-400:]}")
    return seconds


def run(points=LIMIT_POINTS, repeats=3):
    """Seconds of a review pack and of ``--json`` at ``points`` sweep points (medians of
    ``repeats`` fresh runs), and the checks of their outputs."""
    with tempfile.TemporaryDirectory(prefix="rheoline-bench-") as tmp:
        folder = Path(tmp)
        source = folder / "limit.toml"
        source.write_text(limit_file(points), encoding="utf-8")
        pack_times, json_times = [], []
        for k in range(max(1, repeats)):
            pack_times.append(_timed(["run", str(source), "--out", str(folder / f"pack{k}")]))
            with (folder / "out.json").open("w", encoding="utf-8") as fh:
                json_times.append(_timed(["run", str(source), "--json"], stdout=fh))
        records = json.loads((folder / "out.json").read_text(encoding="utf-8"))
        pack = folder / "pack0"
        files = sorted(p.name for p in pack.iterdir())
        sizes = {p.name: p.stat().st_size for p in pack.iterdir()}
    expected = {"results.csv", "parts.csv", "assumptions.csv", "results.xlsx", "report.html"}
    return {
        "points": int(points),
        "pack_s": statistics.median(pack_times),
        "json_s": statistics.median(json_times),
        "pack_files": files,
        "pack_bytes": sizes,
        "json_records": len(records),
        "agree": expected <= set(files)
        and len(records) == points
        and all(r.get("caution") for r in records),
    }


def cold(points=LIMIT_POINTS):
    """Seconds of one review pack and one ``--json`` run at ``points`` sweep points, each
    in a fresh process that writes no bytecode (``PYTHONDONTWRITEBYTECODE``), so that both
    compile whatever modules have none: run before the package is compiled, the figures of
    a first run."""
    env = dict(os.environ, PYTHONDONTWRITEBYTECODE="1")
    with tempfile.TemporaryDirectory(prefix="rheoline-bench-") as tmp:
        folder = Path(tmp)
        source = folder / "limit.toml"
        source.write_text(limit_file(points), encoding="utf-8")
        pack_s = _timed(["run", str(source), "--out", str(folder / "pack")], env=env)
        with (folder / "out.json").open("w", encoding="utf-8") as fh:
            json_s = _timed(["run", str(source), "--json"], stdout=fh, env=env)
    return {"pack_s": pack_s, "json_s": json_s}
