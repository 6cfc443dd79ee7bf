"""Reliability: fuzzing the scenario loader and ``rheoline check`` (hypothesis).

Two generators, both at the "ci" budget:

* structured documents: scenarios built from the format's own field names (and near
  misses) with values drawn from good quantities, wrong units, bare and huge numbers,
  NaN and infinity, booleans, lists, range tables and hostile text, written as TOML
  (tomli-w) or JSON;
* mutated files: the shipped examples and the malformed corpus with bytes inserted,
  deleted, replaced by format tokens, lines duplicated or the file cut short.

Each input goes through :func:`rheoline.scenario.files.load_scenarios` (a ScenarioSet or a
ScenarioError, nothing else) and through ``rheoline check`` in-process (exit 0 with the
caution, or exit 2 with one line on stderr; never exit 1, never a traceback); inputs that
check clean are also run (``rheoline run --json``), and inputs that fail are run with
``--out`` to prove that nothing is written.  Counts are recorded for README.
"""

from __future__ import annotations

import contextlib
import io
import json
import math
import os
import re
import sys
from pathlib import Path

import pytest
import tomli_w
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from rel_record import bump, module_recorder

import rheoline
from rheoline import cli
from rheoline.errors import ScenarioError
from rheoline.scenario.files import (
    PART_FIELDS,
    SCENARIO_FIELDS,
    example_names,
    example_path,
    load_scenarios,
)

bump("fuzz:tracebacks_seen", 0)  # recorded even when none is seen
_record = module_recorder("fuzz", "fuzz:")

MALFORMED = Path(__file__).with_name("malformed")
SEEDS = [example_path(n) for n in example_names()] + sorted(
    p for p in MALFORMED.iterdir() if p.suffix in (".toml", ".json")
)

# --------------------------------------------------------------------------- generators
good_quantities = st.sampled_from(
    [
        "300 mmHg",
        "1.8 m",
        "100 cm",
        "22 degC",
        "4 degC",
        "150 mL/h",
        "5 mL/min",
        "1.1 cP",
        "3 mm",
        "0.5 mm",
        "45 mm",
        "40 kPa",
        "2 psi",
        "10 cmH2O",
        "500 mL",
        "0.45",
        "45 %",
        "37 degC",
        "1 L/min",
        "1e-3 m",
        "0.1 bar",
    ]
)
bad_quantities = st.sampled_from(
    [
        "300 mL",
        "-1 m",
        "1e400 mmHg",
        "nan",
        "inf m",
        "18G",
        "1.3 mm",
        "3 mmHg/s",
        "degC",
        "",
        " ",
        "1..2 m",
        "__import__('os')",
        "1 m; rm -rf /",
        "${HOME}",
        "0x10 m",
        "\u202e3 mm",
        "3\u00a0mm",
        "1 \u00b5m",
        "10 \u00b0C",
        "+-3 m",
        "1e-300 m",
        "99999999999 m",
        '=HYPERLINK("x")',
        "<script>alert(1)</script>",
    ]
)
numbers = st.one_of(
    st.integers(-(10**20), 10**20),
    st.floats(allow_nan=True, allow_infinity=True),
    st.sampled_from([0, 1, 18, 45, 0.45, 300, 1e-300, 1e300, -0.0]),
)
texts = st.text(st.characters(codec="utf-8", exclude_categories=("Cs",)), max_size=30)
scalars = st.one_of(
    good_quantities,
    bad_quantities,
    numbers,
    st.booleans(),
    texts,
    st.sampled_from(rheoline.fluid_names() + ["blood", "salin", "Water"]),
)
ranges = st.fixed_dictionaries(
    {},
    optional={
        "start": st.one_of(good_quantities, numbers),
        "stop": st.one_of(good_quantities, numbers),
        "step": st.one_of(good_quantities, numbers),
        "count": st.one_of(st.integers(-5, 600), numbers),
        "junk": scalars,
    },
)
values = st.one_of(scalars, st.lists(scalars, max_size=3), ranges)

scenario_keys = st.sampled_from([*SCENARIO_FIELDS, "nmae", "fluids", "hed", "pressure"])
part_types = st.sampled_from([*PART_FIELDS, "Tube", "cath", "", "valve"])
part_keys = st.sampled_from(
    sorted({k for f in PART_FIELDS.values() for k in f}) + ["gage", "diameter", "len"]
)

#: plausible values by field kind (FieldSpec.kind), so that many documents pass validation
#: and reach the solver with odd but valid values
GOOD_BY_KIND = {
    "length": ["0 m", "0.3 m", "1.8 m", "100 cm", "45 mm", "3 mm", "0.5 mm", "0.1 mm", 2.5],
    "pressure": ["0 mmHg", "300 mmHg", "2000 mmHg", "40 kPa", "10 cmH2O", "5 psi", 300],
    "flow": ["150 mL/h", "5 mL/min", "1 L/min", "1e-3 mL/h", 100],
    "temperature": ["0 degC", "4 degC", "22 degC", "37 degC", "45 degC", 60, "300 K"],
    "fraction": [0.0, 0.3, 0.45, "45 %", 0.8, 0.1],
    "volume": ["500 mL", "1 L", "5 mL", 250],
    "viscosity": ["1 cP", "3.5 mPa s", 1.2],
    "density": ["1000 kg/m^3", "1.05 g/mL", 998],
    "gauge": [14, 16, 18, "20G", 22, 24, 26, 27, 30],
    "number": [0.0, 0.5, 1.5, 7.0, 10, 20],
    "choice": rheoline.fluid_names() + ["regular", "thin", "gravity-set", "standard-extension"],
    "quantity_list": [["100 mL/min", "200 mL/min"], ["50 mmHg", "120 mmHg"]],
}


def _good(spec):
    options = GOOD_BY_KIND.get(spec.kind)
    if not options:
        return scalars
    good = st.sampled_from(options)
    swept = st.lists(good, min_size=1, max_size=3) if spec.sweep else good
    return st.one_of(good, good, swept)


def _value_for(spec, hostile):
    """Plausible values for the field; in a hostile document, sometimes anything at all."""
    if spec is None:
        return values
    return st.one_of(_good(spec), _good(spec), values) if hostile else _good(spec)


_PART_TEMPLATES = {
    "tube": {"inner_diameter": "3 mm", "length": "1.8 m"},
    "catheter": {"gauge": 18},
    "needle": {"gauge": 21},
    "cannula": {"french": 12, "inner_diameter": "3 mm"},
    "set": {"kind": "gravity-set"},
    "fitting": {"k": 0.8},
    "measured": {"flows": ["100 mL/min", "200 mL/min"], "pressure_drops": ["50 mmHg", "120 mmHg"]},
}


@st.composite
def parts(draw, hostile):
    ptype = draw(
        st.one_of(st.sampled_from(sorted(PART_FIELDS)), part_types)
        if hostile
        else st.sampled_from(sorted(PART_FIELDS))
    )
    fields = PART_FIELDS.get(ptype, {})
    part = {"type": ptype, **_PART_TEMPLATES.get(ptype, {})}
    keys = sorted(k for k in fields if k not in ("type", "tolerance", "label"))
    key_strategy = st.sampled_from(keys or ["len"])
    if hostile:
        key_strategy = st.one_of(key_strategy, part_keys)
    for key in draw(st.lists(key_strategy, max_size=2, unique=True)):
        if key != "type":
            part[key] = draw(_value_for(fields.get(key), hostile))
    return part


@st.composite
def scenario_docs(draw):
    hostile = draw(st.integers(0, 3)) == 0  # one document in four is hostile throughout
    sc = {
        "name": draw(texts) if hostile else "case",
        "fluid": draw(st.sampled_from(rheoline.fluid_names())),
        "head": "1 m",
    }
    keys = [
        k
        for k, spec in SCENARIO_FIELDS.items()
        if spec.kind not in ("parts", "text", "notes", "tolerance")
    ]
    key_strategy = (
        st.one_of(st.sampled_from(keys), scenario_keys) if hostile else st.sampled_from(keys)
    )
    for key in draw(st.lists(key_strategy, max_size=3, unique=True)):
        if key in ("part", "name"):
            continue
        if key in ("flow", "source_pressure") and draw(st.booleans()):
            sc.pop("head", None)
        sc[key] = draw(_value_for(SCENARIO_FIELDS.get(key), hostile))
    sc["part"] = draw(st.lists(parts(hostile), min_size=0 if hostile else 1, max_size=3))
    version = st.sampled_from([1, 2, "1", 1.0, True]) if hostile else st.just(1)
    doc = {"format_version": draw(version)}
    if draw(st.booleans()):
        doc["title"] = draw(texts) if hostile else "fuzzed set"
    doc["scenario"] = [sc] if draw(st.booleans()) else [sc, {**sc, "name": "case 2"}]
    return doc


def _toml_or_json(doc, fmt):
    if fmt == "json":
        return json.dumps(doc, allow_nan=True).encode("utf-8")
    try:
        return tomli_w.dumps(doc).encode("utf-8")
    except (
        TypeError,
        ValueError,
    ):  # tomli-w refuses some values (e.g. mixed arrays in old versions)
        return json.dumps(doc, allow_nan=True).encode("utf-8")


TOKENS = [
    b"=",
    b"[",
    b"]",
    b"[[scenario]]",
    b"[[scenario.part]]",
    b"{",
    b"}",
    b",",
    b'"',
    b"'",
    b"\n",
    b"#",
    b"nan",
    b"inf",
    b"-",
    b"1e999",
    b"\x00",
    b"\xff\xfe",
    b"\\u0000",
    b'head = "300 mmHg"',
    b"gauge = 1.3",
    b"hematocrit = 45",
    b"format_version = 2",
    b'type = "measured"',
    b"count = 100000",
    b'"""',
    b"\r\n",
    b"\t",
    b"\xe2\x80\xae",
]


@st.composite
def mutated_files(draw):
    seed = draw(st.sampled_from(SEEDS))
    data = bytearray(seed.read_bytes())
    for _ in range(draw(st.integers(1, 6))):
        op = draw(st.sampled_from(["insert", "delete", "replace", "duplicate", "truncate"]))
        pos = draw(st.integers(0, max(len(data) - 1, 0)))
        if op == "insert":
            data[pos:pos] = draw(st.one_of(st.sampled_from(TOKENS), st.binary(max_size=8)))
        elif op == "delete":
            del data[pos : pos + draw(st.integers(1, 20))]
        elif op == "replace":
            data[pos : pos + draw(st.integers(1, 8))] = draw(st.sampled_from(TOKENS))
        elif op == "duplicate":
            lines = bytes(data).split(b"\n")
            i = draw(st.integers(0, len(lines) - 1))
            lines.insert(i, lines[i])
            data = bytearray(b"\n".join(lines))
        else:
            data = data[:pos]
    return seed.suffix, bytes(data)


# --------------------------------------------------------------------------- the harness
@contextlib.contextmanager
def _inside(folder: Path):
    here = os.getcwd()
    os.chdir(folder)
    try:
        yield
    finally:
        os.chdir(here)


def _cli(argv):
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            status = cli.main(argv)
        except SystemExit as exc:  # pragma: no cover - main returns its status
            status = exc.code
    return status, out.getvalue(), err.getvalue()


def _exercise(work: Path, suffix: str, payload: bytes):
    """Loader, check, and run (--json on success, --out on failure); assert the contract."""
    bump("fuzz:inputs_tried")
    case = work / f"input{suffix}"
    case.write_bytes(payload)
    try:
        load_scenarios(case)
        loaded = True
    except ScenarioError as exc:
        loaded = False
        assert str(exc)
    except Exception:  # noqa: BLE001 - counted, then the test fails
        bump("fuzz:tracebacks_seen")
        raise
    status, out, err = _cli(["check", str(case)])
    if status == 1 or "Traceback" in err or "internal error" in err:
        bump("fuzz:tracebacks_seen")
    assert status in (0, 2), (status, err)
    assert "Traceback" not in err
    if status == 0:
        bump("fuzz:accepted")
        assert loaded and rheoline.CAUTION in out and err == ""
        status, out, err = _cli(["run", str(case), "--json"])
        bump("fuzz:runs_solved")
        if status == 1 or "Traceback" in err:
            bump("fuzz:tracebacks_seen")
        assert status in (0, 2), err
        if status == 0:
            records = json.loads(out)
            assert all(isinstance(r, dict) and "flow_ml_min" in r for r in records)
            assert all(r["flow_ml_min"] is None or math.isfinite(r["flow_ml_min"]) for r in records)
    else:
        bump("fuzz:rejected")
        assert out == "" and err.startswith("rheoline: error: ") and err.count("\n") == 1, err
        status, out, err = _cli(["run", str(case), "--out", "pack"])
        assert status == 2 and not (work / "pack").exists(), err
    leftovers = sorted(p.name for p in work.iterdir() if p.name != case.name)
    assert leftovers == [], leftovers  # nothing written by a check or a failed run
    case.unlink()


_fuzz_settings = settings(suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])


@pytest.fixture(scope="module")
def work(tmp_path_factory):
    return tmp_path_factory.mktemp("fuzz")


@_fuzz_settings
@given(doc=scenario_docs(), fmt=st.sampled_from(["toml", "json"]))
def test_structured_documents_never_crash_the_loader_or_check(work, doc, fmt):
    with _inside(work):
        _exercise(work, f".{fmt}", _toml_or_json(doc, fmt))


@_fuzz_settings
@given(mutated=mutated_files())
def test_mutated_files_never_crash_the_loader_or_check(work, mutated):
    suffix, payload = mutated
    with _inside(work):
        _exercise(work, suffix, payload)


# --------------------------------------------------------------------------- the argument line
_ARG_TOKENS = st.sampled_from(
    [
        "run",
        "check",
        "fluids",
        "parts",
        "fields",
        "examples",
        "--json",
        "--force",
        "--out",
        "pack",
        "--kind",
        "catheter",
        "needle",
        "valve",
        "--help",
        "--version",
        "-h",
        "--bogus",
        "minimal",
        "no-such-example",
        str(example_path("minimal")),
        str(MALFORMED / "empty_name.toml"),
        "missing.toml",
        ".",
        "",
        "-",
        "--",
        "\u00e9\u00e8",
        "--out=pack2",
        "--kind=needle",
    ]
)


@_fuzz_settings
@given(argv=st.lists(_ARG_TOKENS, max_size=5))
def test_any_argument_line_exits_0_or_2_without_a_traceback(work, argv):
    # the demo is left out only because it is slow; its options are the same as run's
    bump("fuzz:argument_lines_tried")
    with _inside(work):
        status, out, err = _cli(list(argv))
        written = sorted(p.name for p in work.iterdir())
        for p in work.iterdir():  # a successful run --out may write a pack: clear it
            import shutil

            shutil.rmtree(p) if p.is_dir() else p.unlink()
    if status == 1 or "Traceback" in err:
        bump("fuzz:tracebacks_seen")
    assert status in (0, 2), (argv, err)
    assert "Traceback" not in err and "internal error" not in err
    if status == 2:  # one line on stderr, or (no command at all) the help on stdout
        assert written == [], (argv, written)
        assert err.count("\n") == 1 or (err == "" and "usage" in out.lower()), (argv, out, err)


# --------------------------------------------------------------------------- raw-text bombs
# Files within the documented size limit built to make the readers expand or recurse: dotted
# keys and table headers of thousands of parts (the TOML reader's work grows with the square of
# the parts), deep lists and inline tables, long strings and keys, too many keys or entries,
# the heaviest files the raw-text guard lets through, and units spelled thousands of ways, in
# TOML and JSON (the corpus of benchmarks/hostile_files.py, which times the same files).  Each
# goes through the loader and ``rheoline check`` in a child process whose address space is
# capped at its size after start-up plus BOMB_MEMORY: a file is refused (a ScenarioError) or
# loaded, never a MemoryError.  No timing is asserted.
BOMB_MEMORY = 300 * 2**20


def _hostile_corpus():
    import importlib.util

    folder = Path(__file__).resolve().parents[1] / "benchmarks"
    spec = importlib.util.spec_from_file_location("_bench_hostile", folder / "hostile_files.py")
    module = importlib.util.module_from_spec(spec)
    sys.path.insert(0, str(folder))  # it reads load_file.py beside it
    try:
        spec.loader.exec_module(module)
    finally:
        sys.path.remove(str(folder))
    return module


_BOMB_CHILD = r"""
import contextlib, io, json, resource, sys, tomllib
from rheoline import cli
from rheoline.errors import ScenarioError
from rheoline.scenario.files import example_path, load_scenarios

load_scenarios(example_path("minimal"))  # lazy imports done before the cap
cli.main(["check", str(example_path("minimal"))])

def vm_size():
    with open("/proc/self/status") as fh:
        return next(int(l.split()[1]) * 1024 for l in fh if l.startswith("VmSize:"))

budget = int(sys.argv[1])
start_rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
cap = vm_size() + budget
resource.setrlimit(resource.RLIMIT_AS, (cap, cap))
parsed = []
real_toml, real_json = tomllib.loads, json.loads
tomllib.loads = lambda *a, **k: (parsed.append("toml"), real_toml(*a, **k))[1]
json.loads = lambda *a, **k: (parsed.append("json"), real_json(*a, **k))[1]
for path in sys.argv[2:]:
    parsed.clear()
    try:
        load_scenarios(path)
        outcome, message = "loaded", ""
    except ScenarioError as exc:
        outcome, message = "refused", str(exc)
    except MemoryError:
        outcome, message = "out of memory", ""
    parser_ran = bool(parsed)
    err = io.StringIO()
    with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(err):
        try:
            status = cli.main(["check", path])
        except MemoryError:
            status = "out of memory"
    grown = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024 - start_rss
    print(json.dumps(dict(path=path, outcome=outcome, message=message[:300],
                          parser_ran=parser_ran, status=status, err=err.getvalue()[:300],
                          grown=grown)), flush=True)
"""


@pytest.mark.timeout(600)
@pytest.mark.skipif(not Path("/proc/self/status").exists(), reason="needs Linux /proc")
def test_raw_text_bombs_are_refused_or_loaded_in_bounded_memory(tmp_path):
    import subprocess

    from rheoline.scenario.files import MAX_FILE_BYTES

    hostile = _hostile_corpus()
    assert hostile.LIMIT_BYTES == MAX_FILE_BYTES  # the benchmark's limit is the documented one
    bombs = hostile.hostile_files()
    paths = []
    for name, suffix, text, _ in bombs:
        path = tmp_path / f"{name}{suffix}"
        path.write_text(text, encoding="utf-8")
        assert path.stat().st_size <= MAX_FILE_BYTES, name
        paths.append(str(path))
    env = {**os.environ, "OPENBLAS_NUM_THREADS": "1", "OMP_NUM_THREADS": "1"}
    done = subprocess.run(
        [sys.executable, "-c", _BOMB_CHILD, str(BOMB_MEMORY), *paths],
        capture_output=True,
        text=True,
        env=env,
        timeout=560,
    )
    results = [json.loads(line) for line in done.stdout.splitlines() if line.startswith("{")]
    assert len(results) == len(bombs), done.stderr[-3000:]
    for (name, suffix, _, guarded), r in zip(bombs, results, strict=True):
        bump("fuzz:bombs_tried")
        assert r["outcome"] in ("refused", "loaded"), (name, r)
        assert r["status"] in (0, 2), (name, r)
        assert r["grown"] < BOMB_MEMORY, (name, r["grown"])
        if guarded:  # refused from the raw text: file, line and limit named, no parser run
            assert r["outcome"] == "refused" and not r["parser_ran"], (name, r)
            assert re.match(rf"{re.escape(name + suffix)}: line \d+: .*limit", r["message"])
            assert r["status"] == 2 and "line " in r["err"] and r["err"].count("\n") == 1
            bump("fuzz:bombs_refused_before_parsing")


_BOMB_UNITS = {
    "dotted-key": ("toml", lambda n: "a." * n + "b = 1"),
    "header": ("toml", lambda n: "[" + "a." * n + "b]"),
    "array-of-tables": ("toml", lambda n: "[[" + "a." * n + "b]]"),
    "deep-array": ("toml", lambda n: "x = " + "[" * n + "]" * n),
    "deep-inline": ("toml", lambda n: "x = " + "{a = " * n + "1" + "}" * n),
    "inline-dotted": ("toml", lambda n: "x = {" + "a." * n + "b = 1}"),
}


@_fuzz_settings
@given(
    kind=st.sampled_from(sorted(_BOMB_UNITS)),
    parts=st.integers(files_max_depth := 8, 50_000),
    seed=st.sampled_from(SEEDS[: len(example_names())]),
    where=st.floats(0, 1),
)
def test_a_bomb_anywhere_in_a_good_file_is_refused_before_parsing(kind, parts, seed, where):
    # the guard reads the whole text: a bomb after the first lines of a real file is caught
    # at its own line, and neither parser runs
    import tomllib

    from rheoline.scenario.files import MAX_DEPTH, loads_scenarios

    assert files_max_depth == MAX_DEPTH
    lines = seed.read_text(encoding="utf-8").splitlines()
    # a statement boundary before a table header (or the end), so the bomb stands on its own
    starts = [i for i, line in enumerate(lines) if line.startswith("[")] + [len(lines)]
    at = starts[min(int(where * len(starts)), len(starts) - 1)]
    fmt, unit = _BOMB_UNITS[kind]
    text = "\n".join([*lines[:at], unit(parts + 2), *lines[at:]]) + "\n"
    bump("fuzz:bombs_tried")
    with pytest.MonkeyPatch.context() as patch:
        patch.setattr(tomllib, "loads", lambda *a, **k: pytest.fail("the TOML reader ran"))
        with pytest.raises(ScenarioError, match=rf"^{seed.stem}\.toml: line {at + 1}: .*limit"):
            loads_scenarios(text, source=f"{seed.stem}.toml", fmt=fmt)
