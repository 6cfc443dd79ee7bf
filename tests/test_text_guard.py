"""The raw-text guard (rheoline.scenario.text_guard): nesting and key-count bombs are refused
before any parser runs, with the file, the line and the limit named, and never a file that the
parsed-data check would accept.

The memory side (each bomb within the 1 MB file limit loads in bounded memory, in a child
process under an address-space limit) is in tests/test_rel_fuzz_loader.py.
"""

from __future__ import annotations

import json
import tomllib

import pytest
import tomli_w
from hypothesis import given
from hypothesis import strategies as st

from rheoline import cli
from rheoline.errors import ScenarioError
from rheoline.scenario import files
from rheoline.scenario.files import example_names, example_path, loads_scenarios, parse_scenarios
from rheoline.scenario.text_guard import MAX_TEXT_ITEMS, check_text, max_depth

LIMIT = files.MAX_DEPTH


@pytest.fixture()
def parsers_refused(monkeypatch):
    """Make both parsers fail loudly: a bomb must be refused before either runs."""

    def refuse(*args, **kwargs):
        raise AssertionError("a parser ran on a file the guard should have refused")

    monkeypatch.setattr(tomllib, "loads", refuse)
    monkeypatch.setattr(json, "loads", refuse)


BOMBS = {
    # name: (text, format, line of the offence)
    "dotted-key": ("format_version = 1\n" + "a." * 20_000 + "b = 1\n", "toml", 2),
    "table-header": ("format_version = 1\n\n[" + "a." * 100_000 + "b]\n", "toml", 3),
    "array-of-tables-header": ("[[" + "a." * 100_000 + "b]]\n", "toml", 1),
    "quoted-dotted-key": ('"a".' * 5_000 + "b = 1\n", "toml", 1),
    "spaced-dotted-key": ("a . " * 5_000 + "b = 1\n", "toml", 1),
    "deep-array": ("x = " + "[" * 200_000 + "]" * 200_000 + "\n", "toml", 1),
    "deep-inline-table": ("x = " + "{a = " * 100_000 + "1" + "}" * 100_000 + "\n", "toml", 1),
    "dotted-key-in-inline-table": ("x = {" + "a." * 50_000 + "b = 1}\n", "toml", 1),
    "deep-array-on-many-lines": ("x = [\n" * 50 + "]\n" * 50, "toml", 9),
    "many-keys": ("k=1\n" * (MAX_TEXT_ITEMS + 5), "toml", MAX_TEXT_ITEMS + 1),
    "many-entries": ("x = [" + "1," * (MAX_TEXT_ITEMS + 5) + "]\n", "toml", 1),
    "many-headers": ("[t]\n" * (MAX_TEXT_ITEMS + 5), "toml", MAX_TEXT_ITEMS + 1),
    # each part of a header or dotted key counts: distinct headers of the deepest nesting
    # allowed (8 parts) cost the TOML reader 8 times what one part does
    "many-deepest-headers": (
        "".join(f"[k{i}.b.c.d.e.f.g.h]\n" for i in range(MAX_TEXT_ITEMS // 8 + 5)),
        "toml",
        MAX_TEXT_ITEMS // 8 + 1,
    ),
    "many-deepest-dotted-keys": (
        "".join(f"k{i}.a.b.c.d.e.f.g.h = 1\n" for i in range(MAX_TEXT_ITEMS // 9 + 5)),
        "toml",
        MAX_TEXT_ITEMS // 9 + 1,
    ),
    "json-deep-array": ("[" * 300_000 + "]" * 300_000, "json", 1),
    "json-deep-object": ('{"a":' * 100_000 + "1" + "}" * 100_000, "json", 1),
    "json-many-keys": ("{" + '"k":1,' * (MAX_TEXT_ITEMS + 5) + '"k":1}', "json", 1),
    "json-many-entries": ("[" + "1," * (MAX_TEXT_ITEMS + 5) + "1]", "json", 1),
}


@pytest.mark.parametrize("name", sorted(BOMBS))
def test_a_bomb_is_refused_before_any_parser_with_file_line_and_limit(name, parsers_refused):
    text, fmt, line = BOMBS[name]
    assert len(text.encode()) <= files.MAX_FILE_BYTES  # within the documented size limit
    source = f"bomb.{fmt}"
    with pytest.raises(ScenarioError, match=r"limit") as err:
        loads_scenarios(text, source=source, fmt=fmt)
    message = str(err.value)
    assert message.startswith(f"{source}: line ")
    assert message.startswith(f"{source}: line {line}: ")
    assert err.value.source == source
    assert len(message) < 300  # the message names the place; it never quotes the bomb


def test_the_guard_uses_the_parsed_data_limit():
    assert max_depth() == files.MAX_DEPTH


@pytest.mark.parametrize(
    "text",
    [
        'notes = "[[a.b.c.d.e.f.g.h.i.j.k]] {{{{{{{{{{ [[[[[[[[[[ a.a.a.a.a.a.a.a.a.a.a = 1"\n',
        "notes = '''\n[[a.a.a.a.a.a.a.a.a.a.a]]\n" + "{" * 20 + "\n'''\n",
        'notes = """\n[a.a.a.a.a.a.a.a.a.a.a]\n\\"""' + "[" * 20 + '\n"""\n',
        "# [[a.a.a.a.a.a.a.a.a.a.a]] " + "[" * 20 + "\n",
        '"a.b.c.d.e.f.g.h.i.j.k.l" = 1\n',
        "'a.b.c.d.e.f.g.h.i.j.k.l' = 1\n",
        "x = [1.5, 2.5e3, 1979-05-27T07:32:00Z, 1979-05-27 07:32:00, -inf, 0x1f]\n",
        'x = "\\"[[[[[[[[[[[[" \n',
        'x = """a""""\ny = "[[[[[[[[[[[["\n',
    ],
    ids=[
        "basic-string",
        "multiline-literal",
        "multiline-basic",
        "comment",
        "quoted-key",
        "literal-key",
        "numbers-and-dates",
        "escaped-quote",
        "quotes-closing-a-multiline",
    ],
)
def test_structure_inside_strings_and_comments_is_text(text):
    check_text(text, "toml", "s.toml")  # no refusal
    tomllib.loads(text)  # and the text is valid TOML, so this is a fair case


def test_json_strings_are_text():
    check_text(json.dumps({"notes": "[" * 100 + "{" * 100 + "a:" * 100}), "json", "s.json")


@pytest.mark.parametrize("name", example_names())
def test_the_shipped_examples_pass_the_guard(name):
    path = example_path(name)
    check_text(path.read_text(encoding="utf-8"), "toml", path.name)


def test_the_item_limit_is_exact():
    # one key and its list's entries (counted by their commas)
    check_text("x = [" + "1," * (MAX_TEXT_ITEMS - 1) + "]\n", "toml", "s.toml")
    with pytest.raises(ScenarioError, match=f"more than {MAX_TEXT_ITEMS} keys"):
        check_text("x = [" + "1," * MAX_TEXT_ITEMS + "]\n", "toml", "s.toml")


@pytest.mark.parametrize(
    ("line", "parts"),
    [("[k{i}.b.c.d]\n", 4), ("[[k{i}.b.c.d]]\n", 4), ("k{i}.b.c.d = 1\n", 4), ("k{i} = 1\n", 1)],
    ids=["header", "array-of-tables-header", "dotted-key", "key"],
)
def test_each_part_of_a_key_or_header_counts_toward_the_item_limit(line, parts):
    n = MAX_TEXT_ITEMS // parts
    text = "".join(line.format(i=i) for i in range(n))
    check_text(text, "toml", "s.toml")  # n x parts items: at the limit
    with pytest.raises(ScenarioError, match=rf"^s\.toml: line {n + 1}: .*more than"):
        check_text(text + line.format(i=n), "toml", "s.toml")


# ------------------------------------------------------------- agreement with the data check
def _data_refuses(data) -> bool:
    try:
        parse_scenarios(data, source="d")
    except ScenarioError as exc:
        return "nested" in str(exc)
    return False


def _guard_refuses(text, fmt) -> bool:
    try:
        check_text(text, fmt, "t")
    except ScenarioError:
        return True
    return False


@given(
    header=st.integers(0, LIMIT + 2),
    key=st.integers(1, LIMIT + 3),
    lists=st.integers(0, LIMIT + 2),
    inline=st.integers(0, 3),
)
def test_toml_guard_agrees_with_the_data_check_exactly(header, key, lists, inline):
    # header parts, dotted key parts, nested lists and inline tables: without arrays of
    # tables the guard's count is the data check's count, so they refuse the same files
    head = f"[{'.'.join(['h'] * header)}]\n" if header else ""
    value = "{v = " * inline + "[" * lists + "1" + "]" * lists + "}" * inline
    text = f"{head}{'.'.join(['k'] * key)} = {value}\n"
    assert _guard_refuses(text, "toml") == _data_refuses(tomllib.loads(text))


_LEAVES = st.one_of(st.integers(0, 9), st.sampled_from(["[", "a.b", "{", "x = [[["]))


@st.composite
def _nested(draw, keys):
    """A table whose deepest value is 0 to LIMIT + 3 containers down (tables and lists in
    any order), with scalar and shallow siblings at each level."""
    value = draw(_LEAVES)
    for _ in range(draw(st.integers(0, LIMIT + 3))):
        siblings = draw(st.lists(st.one_of(_LEAVES, st.lists(_LEAVES, max_size=2)), max_size=2))
        if draw(st.booleans()):
            value = [value, *siblings] if draw(st.booleans()) else [*siblings, value]
        else:
            table = {draw(keys): v for v in siblings}
            table[draw(keys)] = value
            value = table
    top = {draw(keys): draw(_LEAVES)}
    top[draw(keys)] = value if isinstance(value, dict) or draw(st.booleans()) else [value]
    return top


@given(data=_nested(st.sampled_from(["x", "y.z", "[w]", "a b"])))
def test_json_guard_refuses_exactly_what_the_data_check_refuses(data):
    assert _guard_refuses(json.dumps(data), "json") == _data_refuses(data)


@given(data=_nested(st.sampled_from(["x", "y.z", "w", "a b"])))
def test_toml_guard_never_refuses_what_the_data_check_accepts(data):
    try:
        text = tomli_w.dumps(data)
    except (TypeError, ValueError):  # a shape tomli-w cannot write (e.g. a bare list on top)
        return
    if _guard_refuses(text, "toml"):
        assert _data_refuses(tomllib.loads(text))


# ------------------------------------------------------------- the command line
def test_the_command_line_refuses_a_bomb_in_one_line(tmp_path, capsys):
    path = tmp_path / "bomb.toml"
    path.write_text("format_version = 1\n" + "a." * 2_000 + "b = 1\n")
    assert cli.main(["check", str(path)]) == 2
    out, err = capsys.readouterr()
    assert out == "" and err.count("\n") == 1
    assert "bomb.toml: line 2: " in err and f"limit of {LIMIT} levels" in err
