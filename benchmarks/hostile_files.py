"""Benchmark case of reading hostile scenario files (issue 12).

Any file within the documented 1 MB limit must be refused or read within 2 s and 300 MB.
:func:`hostile_files` builds the corpus in memory, each file as large as the limit allows:

* files built to make the readers expand or recurse: dotted keys and table headers of
  thousands of parts (Python's TOML reader expands them into nested tables before any
  limit applies), deep lists and inline tables, too many keys, headers or list entries, in
  TOML and JSON; the raw-text guard refuses them before any parser runs;
* the heaviest files the guard lets through: distinct table headers and dotted keys of the
  deepest nesting allowed, as many as the key limit allows, a hundred thousand headers;
* long strings, escapes, keys and multi-line strings;
* a valid-looking file that writes its units in thousands of different ways (each new
  spelling costs a parse by the unit library), and one that stays within the limit on
  spellings.

``tests/test_rel_fuzz_loader.py`` reads the same corpus under an address-space limit and
checks each outcome (no timing there); this script times it.  Each file is read by
:func:`rheoline.scenario.files.load_scenarios` in its own child process, after the readers'
lazy imports and the unit registry are loaded (that one-time start-up of a fresh process is
reported on its own).  Reported per file: its size, refused or loaded, the wall-clock and
the CPU seconds of the read, and how much the child's peak resident memory grew during it;
then the largest of each against the targets, and the valid 770 KB file of ``load_file.py``
read the same way.  On a shared machine the wall-clock times move with the load (printed
beside them); the CPU seconds move less.

Run ``python benchmarks/hostile_files.py [--json] [--only NAME ...]`` from the repository
root.  A report, not a test: exit status 0 whether or not the targets hold.
"""

from __future__ import annotations

import argparse
import itertools
import json
import os
import subprocess
import sys
import tempfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

import load_file  # noqa: E402  (the script's own folder)

#: The documented file size limit (``rheoline.scenario.schema.MAX_FILE_BYTES``).
LIMIT_BYTES = 1_000_000
TARGET_S = 2.0
TARGET_MB = 300.0

#: Just above the raw-text guard's item limit (``text_guard.MAX_TEXT_ITEMS``).
_MANY = 100_005
_LENGTH_UNITS = (
    "m cm mm um km dm nm inch ft yd mile mil hand point angstrom fathom furlong league"
).split()


def _fill(unit: str, head: str = "", tail: str = "", budget: int = LIMIT_BYTES - 64) -> str:
    """``head`` + as many ``unit`` as fit in ``budget`` bytes + ``tail``."""
    return head + unit * ((budget - len(head) - len(tail)) // len(unit)) + tail


def _lines(line, budget=LIMIT_BYTES - 64, limit=None):
    """Lines ``line(i)`` for i = 0, 1, ... while they fit in ``budget`` bytes (at most
    ``limit`` lines)."""
    out, size = [], 0
    for i in itertools.count():
        text = line(i)
        size += len(text.encode())
        if size > budget or (limit is not None and i >= limit):
            return "".join(out)
        out.append(text)


def unit_spellings(n=None):
    """Distinct spellings of the millimetre (``mm*cm/cm``, ``mm*cm/cm*inch/inch``, ...) of
    at most 40 characters, every one a valid length unit."""
    out = []
    for k in (1, 2, 3):
        for combo in itertools.product(_LENGTH_UNITS, repeat=k):
            spelled = "mm" + "".join(f"*{u}/{u}" for u in combo)
            if len(spelled) <= 40:
                out.append(spelled)
            if n is not None and len(out) >= n:
                return out
    return out


def _spelled_file(spellings):
    """200 scenarios of 40 tubes (the largest file the other limits allow) whose bores and
    lengths cycle through ``spellings``, as far as 1 MB allows."""
    spelled = itertools.cycle(spellings)
    out = ["format_version = 1\n"]
    for i in range(200):
        out.append(f'[[scenario]]\nname = "c{i}"\nfluid = "water"\nhead = "1 m"\n')
        for _ in range(40):
            out.append(
                f'[[scenario.part]]\ntype = "tube"\ninner_diameter = "2 {next(spelled)}"\n'
                f'length = "900 {next(spelled)}"\n'
            )
    text = "".join(out)
    while len(text.encode()) > LIMIT_BYTES:  # drop whole scenarios until it fits
        text = text[: text.rindex("[[scenario]]")]
    return text


def hostile_files():
    """The corpus: a list of ``(name, suffix, text, guarded)``, ``guarded`` True where the
    raw-text guard must refuse the file before any parser runs."""
    half = (LIMIT_BYTES - 64) // 2
    # the deepest a header and a dotted key may go (MAX_DEPTH = 8): a header of 8 parts
    # opens 8 tables, a dotted key of 9 parts opens 8 tables and sets a value in the last
    header = ".".join("bcdefgh")  # [k<i>.b.c.d.e.f.g.h]
    dotted = ".".join("abcdefgh")  # k<i>.a.b.c.d.e.f.g.h = 1
    n_headers, n_dotted = 100_000 // 8 - 10, 100_000 // 9 - 10  # parts just within the limit
    return [
        ("dotted-key-40kB", ".toml", "a." * 20_000 + "b = 1\n", True),
        ("dotted-key-1MB", ".toml", _fill("a.", tail="b = 1\n"), True),
        ("dotted-key-after-header", ".toml", _fill("a.", "[s.t]\n", "b = 1\n"), True),
        ("table-header-1MB", ".toml", _fill("a.", "[", "b]\n"), True),
        ("array-of-tables-header", ".toml", _fill("a.", "[[", "b]]\n"), True),
        ("quoted-dotted-key", ".toml", _fill('"a".', tail="b = 1\n"), True),
        ("deep-array", ".toml", "x = " + "[" * half + "]" * half + "\n", True),
        ("deep-inline-table", ".toml", _fill("{a = ", "x = ", "1}\n", budget=half), True),
        ("many-keys", ".toml", "k=1\n" * _MANY, True),
        ("many-headers", ".toml", "[t]\n" * _MANY, True),
        ("many-list-entries", ".toml", "x = [" + "1," * _MANY + "]\n", True),
        ("many-inline-keys", ".toml", "x = {" + "a=1," * _MANY + "b=1}\n", True),
        ("deepest-headers-1MB", ".toml", _lines(lambda i: f"[k{i}.{header}]\n"), True),
        ("deepest-dotted-keys-1MB", ".toml", _lines(lambda i: f"k{i}.{dotted} = 1\n"), True),
        (
            "deepest-headers-within-the-limit",
            ".toml",
            _lines(lambda i: f"[k{i}.{header}]\n", limit=n_headers),
            False,
        ),
        (
            "deepest-dotted-keys-within-the-limit",
            ".toml",
            _lines(lambda i: f"k{i}.{dotted} = 1\n", limit=n_dotted),
            False,
        ),
        ("headers-within-the-limit", ".toml", _lines(lambda i: f"[t{i}]\n", limit=99_000), False),
        ("keys-within-the-limit", ".toml", _lines(lambda i: f"k{i} = 1\n", limit=99_000), False),
        ("long-string", ".toml", _fill("a", 'title = "', '"\n'), False),
        ("long-escapes", ".toml", _fill("\\u0041", 'title = "', '"\n'), False),
        ("long-multiline", ".toml", _fill("a\\\n", 'notes = """', '"""\n'), False),
        ("long-literal", ".toml", _fill("[", "notes = '", "'\n"), False),
        ("long-key", ".toml", _fill("a", tail=" = 1\n"), False),
        ("unit-spellings", ".toml", _spelled_file(unit_spellings()), False),
        # 199 spellings and the head's "m": the limit's 200 (schema.MAX_UNIT_SPELLINGS)
        ("unit-spellings-within-the-limit", ".toml", _spelled_file(unit_spellings(199)), False),
        ("json-deep-array", ".json", "[" * half + "]" * half, True),
        ("json-deep-object", ".json", _fill('{"a":', tail="1}"), True),
        ("json-many-keys", ".json", "{" + '"k":1,' * _MANY + '"k":1}', True),
        ("json-many-entries", ".json", "[" + "1," * _MANY + "1]", True),
        ("json-long-string", ".json", _fill("a", '{"title": "', '"}'), False),
        ("json-long-escapes", ".json", _fill("\\u0041", '{"title": "', '"}'), False),
    ]


#: The child: warm up, then read one file and print what it cost (one JSON line).
_CHILD = r"""
import json, resource, sys, time
t0, c0 = time.perf_counter(), time.process_time()
from rheoline.errors import ScenarioError
from rheoline.scenario.files import example_path, load_scenarios
load_scenarios(example_path("minimal"))  # lazy imports and the unit registry
startup = (time.perf_counter() - t0, time.process_time() - c0)
before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
t0, c0 = time.perf_counter(), time.process_time()
try:
    load_scenarios(sys.argv[1])
    outcome, message = "loaded", ""
except ScenarioError as exc:
    outcome, message = "refused", str(exc)
seconds, cpu = time.perf_counter() - t0, time.process_time() - c0
grown = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss - before
print(json.dumps(dict(outcome=outcome, message=message[:160], load_s=seconds, cpu_s=cpu,
                      grown_mb=grown / 1024, startup_s=startup[0], startup_cpu_s=startup[1])))
"""


def _read_in_child(path: Path) -> dict:
    env = {**os.environ, "OPENBLAS_NUM_THREADS": "1", "OMP_NUM_THREADS": "1"}
    done = subprocess.run(
        [sys.executable, "-c", _CHILD, str(path)],
        capture_output=True,
        text=True,
        env=env,
        check=True,
        timeout=600,
    )
    return json.loads(done.stdout.strip().splitlines()[-1])


def run(only=None) -> dict:
    """Read every file of the corpus (or those named in ``only``) and the valid large file,
    each in its own child process; the figures as a dict."""
    corpus = [c for c in hostile_files() if not only or c[0] in only]
    rows = []
    with tempfile.TemporaryDirectory() as folder:
        for name, suffix, text, guarded in corpus:
            path = Path(folder, name + suffix)
            path.write_text(text, encoding="utf-8")
            rows.append(
                {"name": name, "kb": path.stat().st_size / 1024, "guarded": guarded}
                | _read_in_child(path)
            )
            path.unlink()
        valid = Path(folder, "valid-large.toml")
        valid.write_text(load_file.large_file(), encoding="utf-8")
        valid_row = {"name": valid.stem, "kb": valid.stat().st_size / 1024} | _read_in_child(valid)
    return {
        "files": rows,
        "valid": valid_row,
        "max_load_s": max(r["load_s"] for r in rows),
        "max_cpu_s": max(r["cpu_s"] for r in rows),
        "max_grown_mb": max(r["grown_mb"] for r in rows),
        "startup_s": max(r["startup_s"] for r in [*rows, valid_row]),
        "target_s": TARGET_S,
        "target_mb": TARGET_MB,
        "load_average": list(os.getloadavg()),
        "cpus": os.cpu_count(),
    }


def _report(r) -> str:
    out = [
        f"hostile files: each read in its own process ({r['cpus']} CPUs; load average now "
        f"{', '.join(f'{x:.2f}' for x in r['load_average'])}); targets < {TARGET_S:g} s, "
        f"< {TARGET_MB:g} MB",
        f"{'file':40s} {'KB':>6s} {'outcome':>8s} {'wall s':>7s} {'CPU s':>6s} {'+MB':>6s}",
    ]
    for row in [*r["files"], r["valid"]]:
        out.append(
            f"{row['name']:40s} {row['kb']:6.0f} {row['outcome']:>8s} {row['load_s']:7.2f} "
            f"{row['cpu_s']:6.2f} {row['grown_mb']:6.1f}"
        )
    held = r["max_load_s"] < TARGET_S and r["max_grown_mb"] < TARGET_MB
    out.append(
        f"largest: {r['max_load_s']:.2f} s wall, {r['max_cpu_s']:.2f} s CPU, "
        f"+{r['max_grown_mb']:.0f} MB ({'targets hold' if held else 'TARGET MISSED'}); "
        f"a fresh process's start-up (imports, unit registry) {r['startup_s']:.2f} s, not counted"
    )
    return "\n".join(out)


if __name__ == "__main__":  # pragma: no cover
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    parser.add_argument("--only", nargs="+", help="read only these files of the corpus")
    args = parser.parse_args()
    result = run(args.only)
    print(json.dumps(result, indent=1) if args.json else _report(result))
