"""How the benchmarks time things, and what they ran on.

Times are wall clock (``time.perf_counter``) with the garbage collector off during a timed
call, medians of repeats; ratios of two times are taken from interleaved rounds so that a
load that drifts hits both alike.  The machine, its load average before and after, numpy's
BLAS and whether the package's bytecode was already compiled are reported beside the figures.
"""

from __future__ import annotations

import compileall
import gc
import importlib.util
import os
import platform
import statistics
import sys
import time
from pathlib import Path

import numpy as np

import rheoline

__all__ = [
    "median_time",
    "interleaved_medians",
    "machine",
    "load_average",
    "bytecode_status",
    "compile_package",
]


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


def bytecode_status():
    """Whether the package's modules had compiled bytecode (``__pycache__``) up to date with
    their sources when the benchmarks started: ``{"modules", "cached", "writes_bytecode"}``.

    A first import without it compiles every module (some hundreds of milliseconds), so the
    import and command-line times depend on it.
    """
    root = Path(rheoline.__file__).resolve().parent
    sources = sorted(root.rglob("*.py"))
    cached = 0
    for source in sources:
        compiled = Path(importlib.util.cache_from_source(str(source)))
        if compiled.exists() and compiled.stat().st_mtime >= source.stat().st_mtime:
            cached += 1
    return {
        "modules": len(sources),
        "cached": cached,
        "writes_bytecode": not sys.dont_write_bytecode,
    }


def compile_package():
    """Compile the package's modules to bytecode (``__pycache__``, git-ignored), as
    ``python -m compileall -q rheoline`` does and as pip does on a regular install; Python
    reads that bytecode even where ``PYTHONDONTWRITEBYTECODE`` keeps it from writing any.

    Returns the :func:`bytecode_status` afterwards (a read-only install stays as it was).
    """
    root = Path(rheoline.__file__).resolve().parent
    compileall.compile_dir(str(root), quiet=2)
    return bytecode_status()
