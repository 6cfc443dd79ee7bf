"""Benchmark case of reading a large scenario file: 200 scenarios of 40 parts, about 770 KB.

Within the documented 1 MB limit, any file must be refused or parsed within 2 s and 300 MB
(issue 12; ``hostile_files.py`` reads the hostile ones).  The file is valid and built in
memory (invented sizes): every scenario has a fluid, a head, a back pressure, and 40 parts
that cycle through tubes with a bore and a length, catheters by gauge, fittings by K and
measured parts with three bench points, every quantity written with its unit.  Reported:
the file's size, the median time of :func:`rheoline.scenario.files.loads_scenarios` over
the repeats, and the peak memory the Python allocator saw while reading it (tracemalloc),
with the 2 s and 300 MB targets.
"""

from __future__ import annotations

import time
import tracemalloc

N_SCENARIOS = 200
N_PARTS = 40
TARGET_S = 2.0
TARGET_MB = 300.0


def _part(j):
    kind = j % 4
    if kind == 0:
        return (
            f'[[scenario.part]]\ntype = "tube"\nlabel = "tube {j}"\n'
            f'inner_diameter = "{2.0 + 0.01 * j:.2f} mm"\nlength = "{0.1 + 0.01 * j:.2f} m"\n'
        )
    if kind == 1:
        return f'[[scenario.part]]\ntype = "catheter"\nlabel = "cath {j}"\ngauge = {14 + 2 * (j % 6)}\n'
    if kind == 2:
        return f'[[scenario.part]]\ntype = "fitting"\nlabel = "fitting {j}"\nk = {0.5 + 0.01 * j:.2f}\n'
    return (
        f'[[scenario.part]]\ntype = "measured"\nlabel = "filter {j}"\n'
        'flows = ["100 mL/min", "150 mL/min", "200 mL/min"]\n'
        'pressure_drops = ["20 mmHg", "35 mmHg", "55 mmHg"]\n'
    )


def large_file(n_scenarios=N_SCENARIOS, n_parts=N_PARTS) -> str:
    """The benchmark's scenario file (TOML text)."""
    parts = "".join(_part(j) for j in range(n_parts))
    out = ['format_version = 1\ntitle = "large file benchmark (invented)"\n']
    for i in range(n_scenarios):
        out.append(
            f'[[scenario]]\nname = "case {i}"\nfluid = "saline-0.9"\ntemperature = "22 degC"\n'
            f'head = "{50 + i % 100} cm"\nback_pressure = "8 mmHg"\n' + parts
        )
    return "".join(out)


def run(repeats=3):
    """Median seconds and peak MB of reading :func:`large_file`."""
    from rheoline.scenario.files import loads_scenarios

    text = large_file()
    seconds = []
    for _ in range(repeats):
        start = time.perf_counter()
        sset = loads_scenarios(text, source="large.toml")
        seconds.append(time.perf_counter() - start)
    tracemalloc.start()
    loads_scenarios(text, source="large.toml")
    peak = tracemalloc.get_traced_memory()[1]
    tracemalloc.stop()
    seconds.sort()
    return {
        "file_kb": len(text.encode()) / 1024,
        "scenarios": len(sset.scenarios),
        "parts": N_SCENARIOS * N_PARTS,
        "load_s": seconds[len(seconds) // 2],
        "peak_mb": peak / 2**20,
        "target_s": TARGET_S,
        "target_mb": TARGET_MB,
    }


if __name__ == "__main__":  # pragma: no cover
    r = run()
    print(
        f"large file: {r['file_kb']:.0f} KB, {r['scenarios']} scenarios x {N_PARTS} parts; "
        f"read in {r['load_s']:.2f} s (target < {TARGET_S:g} s), peak {r['peak_mb']:.0f} MB "
        f"(target < {TARGET_MB:g} MB)"
    )
