"""Reliability: scenario files are untrusted data.

* No code path from file content: an AST scan of the modules that read files or take their
  text (rheoline/scenario/, rheoline/cli.py, rheoline/units.py, the widgets' files view)
  finds no eval, exec, compile, __import__, importlib, pickle/marshal/shelve, pandas
  eval/query, os.system or subprocess.
* Reading a file's text opens no other file, whatever paths the text names.
* The documented limits hold, and are checked before the expensive work: file size, nesting
  depth, huge integers, sweep axes and sweep cross products (a step of 1e-300 m over 10 m
  must be refused without building the list).
* Every malformed file of tests/malformed (the scenario owner's corpus) goes through
  ``rheoline check`` and ``rheoline run --out`` in-process: exit 2, no traceback, no file
  written; the count is recorded.
"""

from __future__ import annotations

import ast
import builtins
import io
import os
import pathlib
from pathlib import Path

import pytest
from rel_record import bump, module_recorder

import rheoline
from rheoline import cli
from rheoline.errors import ScenarioError
from rheoline.scenario import files
from rheoline.scenario.files import example_names, example_path, loads_scenarios

bump("untrusted:tracebacks_seen", 0)  # recorded even when none is seen
_record = module_recorder("untrusted", "untrusted:")

ROOT = Path(rheoline.__file__).resolve().parent
MALFORMED = Path(__file__).with_name("malformed")

SCANNED = sorted(
    [
        *ROOT.joinpath("scenario").glob("*.py"),
        ROOT / "cli.py",
        ROOT / "units.py",
        *ROOT.joinpath("widgets").glob("files_view.py"),
    ]
)

FORBIDDEN_CALLS = {"eval", "exec", "compile", "__import__", "breakpoint"}
FORBIDDEN_MODULES = {
    "pickle",
    "cPickle",
    "dill",
    "marshal",
    "shelve",
    "importlib",
    "subprocess",
    "runpy",
    "code",
    "codeop",
    "ctypes",
    "yaml",
}
FORBIDDEN_ATTRIBUTES = {
    ("os", "system"),
    ("os", "popen"),
    ("os", "execv"),
    ("os", "execl"),
    ("os", "spawnv"),
    ("os", "startfile"),
}
# pandas evaluates expression strings in DataFrame.eval/query and pd.eval
FORBIDDEN_METHODS = {"eval", "query", "import_module", "loads_pickle", "read_pickle"}


def _offences(path: Path):
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    found = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            found += [
                f"import {a.name}" for a in node.names if a.name.split(".")[0] in FORBIDDEN_MODULES
            ]
        elif isinstance(node, ast.ImportFrom):
            if node.module and node.module.split(".")[0] in FORBIDDEN_MODULES:
                found.append(f"from {node.module} import ...")
        elif isinstance(node, ast.Call):
            f = node.func
            if isinstance(f, ast.Name) and f.id in FORBIDDEN_CALLS:
                found.append(f"{f.id}() at line {node.lineno}")
            elif isinstance(f, ast.Attribute):
                owner = f.value.id if isinstance(f.value, ast.Name) else None
                if (owner, f.attr) in FORBIDDEN_ATTRIBUTES or f.attr in FORBIDDEN_METHODS:
                    found.append(f"{owner or '...'}.{f.attr}() at line {node.lineno}")
    return found


@pytest.mark.parametrize("path", SCANNED, ids=lambda p: str(p.relative_to(ROOT)))
def test_no_code_path_from_file_content(path):
    bump("untrusted:modules_scanned")
    assert _offences(path) == []


def test_the_scan_finds_what_it_looks_for(tmp_path):
    # the scanner itself must be able to fail
    bad = tmp_path / "bad.py"
    bad.write_text(
        "import pickle\nfrom importlib import import_module\n"
        "x = eval(s)\nframe.query(text)\nos.system(cmd)\nexec(code)\n"
    )
    assert len(_offences(bad)) == 6


def test_reading_scenario_text_opens_no_file(monkeypatch):
    text = """format_version = 1
title = "/etc/passwd"
notes = "../../../../etc/shadow"
[[scenario]]
name = "~/.ssh/id_rsa"
fluid = "saline-0.9"
head = "1 m"
[[scenario.part]]
type = "tube"
label = "file:///etc/hosts"
inner_diameter = "3 mm"
length = "1.8 m"
"""
    from rheoline.scenario.compare import check_scenarios

    check_scenarios(loads_scenarios(text))  # warm the lazy imports first
    opened = []

    def refuse(*args, **kwargs):
        opened.append(args[:1])
        raise AssertionError(f"opened {args[:1]!r}")

    for target, name in (
        (builtins, "open"),
        (io, "open"),
        (os, "open"),
        (pathlib.Path, "open"),
        (pathlib.Path, "read_text"),
        (pathlib.Path, "read_bytes"),
    ):
        monkeypatch.setattr(target, name, refuse)
    sset = loads_scenarios(text)
    check_scenarios(sset)
    assert opened == []
    assert sset.title == "/etc/passwd"  # kept as text, never followed


# --------------------------------------------------------------------------- limits
def _one_scenario(extra="", part='type = "catheter"\ngauge = 18'):
    return (
        'format_version = 1\n[[scenario]]\nname = "s"\nfluid = "saline-0.9"\n'
        f"{extra}\n[[scenario.part]]\n{part}\n"
    )


def test_size_limit_is_checked_before_reading(tmp_path, capsys, monkeypatch):
    path = tmp_path / "big.toml"
    with path.open("wb") as fh:  # a sparse file: huge on paper, nothing to parse
        fh.truncate(files.MAX_FILE_BYTES * 50)
    read = []
    real = pathlib.Path.open

    def spy(self, *args, **kwargs):
        read.append(self)
        return real(self, *args, **kwargs)

    monkeypatch.setattr(pathlib.Path, "open", spy)
    with pytest.raises(ScenarioError, match=f"above the limit of {files.MAX_FILE_BYTES} bytes"):
        files.load_scenarios(path)
    assert read == []
    monkeypatch.undo()
    assert cli.main(["check", str(path)]) == 2
    assert "above the limit" in capsys.readouterr().err


@pytest.mark.parametrize(
    "text",
    [
        "format_version = 1\nx = " + "[" * 50_000 + "]" * 50_000 + "\n",
        "format_version = 1\nx = " + "{a = " * 3000 + "1" + "}" * 3000 + "\n",
    ],
    ids=["deep-toml-array", "deep-toml-table"],
)
def test_deep_nesting_is_refused(text):
    with pytest.raises(ScenarioError, match="nested|limit|not valid TOML"):
        loads_scenarios(text)


def test_deep_json_is_refused():
    with pytest.raises(ScenarioError, match="nested|limit"):
        loads_scenarios(
            '{"format_version": 1, "x": ' + "[" * 100_000 + "]" * 100_000 + "}", fmt="json"
        )


def test_huge_integer_is_refused():
    with pytest.raises(ScenarioError, match="large|digit|parse"):
        loads_scenarios(_one_scenario("head = " + "9" * 5000))


@pytest.mark.parametrize(
    "extra",
    [
        'head = {start = "0 m", stop = "10 m", step = "1e-300 m"}',
        'head = {start = "0 m", stop = "10 m", count = 1000000000000}',
        'temperature = {start = "0 degC", stop = "60 degC", step = "1e-12 degC"}',
    ],
    ids=["tiny-step", "huge-count", "tiny-temperature-step"],
)
@pytest.mark.timeout(60)
def test_an_axis_too_long_is_refused_before_it_is_built(extra):
    with pytest.raises(ScenarioError, match=str(files.MAX_AXIS_VALUES)):
        loads_scenarios(_one_scenario(extra))


@pytest.mark.timeout(60)
def test_a_cross_product_too_large_is_refused():
    n = files.MAX_AXIS_VALUES
    extra = (
        f'head = {{start = "0 m", stop = "3 m", count = {n}}}\n'
        f'source_pressure = {{start = "0 mmHg", stop = "300 mmHg", count = {n}}}\n'
        f'temperature = {{start = "1 degC", stop = "40 degC", count = {n}}}'
    )
    with pytest.raises(ScenarioError, match=f"limit of {files.MAX_SWEEP_POINTS}"):
        loads_scenarios(_one_scenario(extra))


def test_a_file_of_many_scenarios_over_the_total_is_refused():
    per = files.MAX_SWEEP_POINTS
    count = files.MAX_TOTAL_POINTS // per + 1
    blocks = []
    for i in range(count):
        blocks.append(
            f'[[scenario]]\nname = "s{i}"\nfluid = "water"\n'
            f'head = {{start = "0 m", stop = "3 m", count = {per // 10}}}\n'
            '[[scenario.part]]\ntype = "needle"\n'
            "gauge = {start = 14, stop = 23, step = 1}\n"
        )
    with pytest.raises(ScenarioError, match=f"more than {files.MAX_TOTAL_POINTS}"):
        loads_scenarios("format_version = 1\n" + "".join(blocks))


def test_a_file_that_spells_its_units_many_ways_is_refused_before_parsing_them_all(
    monkeypatch,
):
    # each new spelling ("mm*cm/cm", "mm*inch/inch", ...) costs the unit library a parse,
    # and 16,000 of them took 7.5 s to read: the spelling past the limit is refused,
    # naming its field, before the unit library sees it
    import itertools

    from rheoline import units

    names = "m cm mm um km dm nm inch ft yd mil hand point fathom furlong".split()
    spelled = [f"mm*{a}/{a}*{b}/{b}" for a, b in itertools.product(names, names)]
    limit = files.MAX_UNIT_SPELLINGS
    assert len(spelled) > limit

    def scenario(i, units_of_parts):
        parts = "".join(
            f'[[scenario.part]]\ntype = "tube"\ninner_diameter = "2 {u}"\nlength = "1000 {u}"\n'
            for u in units_of_parts
        )
        return f'[[scenario]]\nname = "s{i}"\nfluid = "water"\nhead = "1000 {spelled[0]}"\n{parts}'

    per = files.MAX_PARTS
    text = "format_version = 1\n" + "".join(
        scenario(i, spelled[j : j + per]) for i, j in enumerate(range(0, limit, per))
    )
    parsed = []
    real = units._parse_unit
    monkeypatch.setattr(units, "_parse_unit", lambda u, *a: parsed.append(u) or real(u, *a))
    units._checked_unit.cache_clear()
    loads_scenarios(text)  # the limit's spellings, each parsed once
    assert sorted(set(parsed)) == sorted(spelled[:limit])
    parsed.clear()
    units._checked_unit.cache_clear()
    one_more = scenario("-last", [spelled[limit]])
    with pytest.raises(ScenarioError, match=f"units in more than {limit} different ways") as err:
        loads_scenarios(text + one_more)
    assert (err.value.scenario, err.value.field) == ("'s-last'", "part[1].inner_diameter")
    assert spelled[limit] not in parsed  # refused before the unit library saw it


# --------------------------------------------------------------------------- the corpus
def _corpus():
    return sorted(p for p in MALFORMED.iterdir() if p.suffix in (".toml", ".json"))


@pytest.mark.parametrize("path", _corpus(), ids=lambda p: p.name)
def test_malformed_file_gives_exit_2_no_traceback_and_writes_nothing(
    path, capsys, tmp_path, monkeypatch
):
    monkeypatch.chdir(tmp_path)
    bump("untrusted:malformed_files_tried")
    for argv in (
        ["check", str(path)],
        ["run", str(path), "--out", "pack"],
        ["run", str(path), "--json"],
    ):
        status = cli.main(argv)
        out, err = capsys.readouterr()
        bump("untrusted:malformed_commands_run")
        if "Traceback" in err or "internal error" in err:
            bump("untrusted:tracebacks_seen")
        assert status == 2, (argv, err)
        assert out == "" and err.count("\n") == 1, (argv, out, err)
        assert "Traceback" not in err and "internal error" not in err
    assert list(tmp_path.iterdir()) == []


def test_example_files_pass_check(capsys, tmp_path, monkeypatch):
    # the other side of the coin: shipped examples are accepted and write nothing on check
    monkeypatch.chdir(tmp_path)
    for name in example_names():
        assert cli.main(["check", str(example_path(name))]) == 0, capsys.readouterr().err
    capsys.readouterr()
    assert list(tmp_path.iterdir()) == []


@pytest.mark.parametrize(
    "text",
    [
        '{"format_version": 1, "scenario": [{"name": "a", "fluid": "saline-0.9", "head": "1 m",'
        ' "head": "10 m", "part": [{"type": "catheter", "gauge": 18}]}]}',
        '{"format_version": 1, "format_version": 1, "scenario": [{"name": "a", "fluid": "water",'
        ' "head": "1 m", "part": [{"type": "catheter", "gauge": 18, "gauge": 14}]}]}',
    ],
    ids=["scenario-key", "part-key"],
)
def test_a_json_key_given_twice_is_refused(text):
    # TOML refuses a repeated key; JSON parsers keep the last one silently, so a reviewer
    # reading the first value would see another number than the one solved
    with pytest.raises(
        ScenarioError,
        match=r"(twice|more than once|duplicate|repeated).*"
        r"(head|gauge|format_version)|"
        r"(head|gauge|format_version).*(twice|more than once|"
        r"duplicate|repeated)",
    ):
        loads_scenarios(text, fmt="json")


@pytest.mark.timeout(60)
@pytest.mark.skipif(
    not hasattr(os, "mkfifo") or not Path("/dev/zero").exists(), reason="needs a POSIX system"
)
def test_special_files_are_refused_without_reading_forever(tmp_path, capsys):
    # an endless device and a pipe nobody writes to must not hang the loader
    fifo = tmp_path / "pipe.toml"
    os.mkfifo(fifo)
    for path in (Path("/dev/zero"), fifo):
        assert cli.main(["check", str(path)]) == 2
        assert "not a regular file" in capsys.readouterr().err
