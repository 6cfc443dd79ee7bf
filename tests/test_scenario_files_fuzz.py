"""Scenario files under fuzzing: random documents, hostile unit text, mutated example text.

Whatever a file holds gives a ScenarioError or a valid set that writes and loads back the
same; and the scenario layer never evaluates, unpickles or imports anything a file names.
"""

import math
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st
from scenario_doc import one

from rheoline.errors import ScenarioError
from rheoline.scenario import files
from rheoline.scenario.files import (
    dump_scenarios,
    example_path,
    loads_scenarios,
    parse_scenarios,
)

# --------------------------------------------------------------------------- fuzz
_leaf = st.one_of(
    st.none(),
    st.booleans(),
    st.integers(),
    st.floats(allow_nan=True),
    st.text(max_size=12),
    st.sampled_from(
        [
            "300 mmHg",
            "1.8 m",
            "22 degC",
            "150 mL/h",
            "18G",
            "-1 m",
            "nan",
            "3 mL",
            "catheter",
            "tube",
            "water",
        ]
    ),
)
_keys = st.sampled_from(
    [
        "name",
        "fluid",
        "head",
        "flow",
        "part",
        "type",
        "gauge",
        "length",
        "inner_diameter",
        "tolerance",
        "start",
        "stop",
        "step",
        "count",
        "scenario",
        "format_version",
        "temperature",
        "xyz",
    ]
)
_tree = st.recursive(
    _leaf,
    lambda kids: st.one_of(st.lists(kids, max_size=4), st.dictionaries(_keys, kids, max_size=5)),
    max_leaves=25,
)


@given(_tree)
def test_fuzzed_documents_give_a_scenario_error_or_a_valid_set(data):
    doc = {"format_version": 1, "scenario": [data]} if not isinstance(data, dict) else data
    for candidate in (data, doc):
        candidate = (
            {k: v for k, v in candidate.items() if v is not None}
            if isinstance(candidate, dict)
            else candidate
        )
        try:
            sset = parse_scenarios(candidate)
        except ScenarioError as exc:
            assert str(exc)
        else:
            assert all(s.n_points >= 1 and math.isfinite(s.n_points) for s in sset.scenarios)
            for fmt in ("toml", "json"):  # whatever loads, writes and loads back the same
                assert loads_scenarios(dump_scenarios(sset, fmt), fmt=fmt) == sset


@pytest.mark.parametrize(
    "text",
    [
        "1 m/0",
        "1 (m",
        "1 m**(1/0)",
        "1 9**9**9",
        "1 m^999999999",
        "1 10**1000 m",
        "1 __class__",
        "1 m; import os",
    ],
)
def test_hostile_unit_text_is_refused_before_pint(text):
    with pytest.raises(ScenarioError, match="field 'head'"):
        parse_scenarios(one(head=text))


_EXAMPLE_TEXT = example_path("rapid-transfusion-cart").read_text(encoding="utf-8")
_EDIT = st.tuples(
    st.integers(0, len(_EXAMPLE_TEXT)),
    st.integers(0, 8),
    st.text(alphabet=st.sampled_from(list("=[]{}\"',.-+#\n 0123456789eEnaifm%G")), max_size=6),
)


@given(st.lists(_EDIT, min_size=1, max_size=4))
def test_mutated_example_text_gives_a_scenario_error_or_a_valid_set(edits):
    """Random cuts and insertions in the demo file: never anything but a ScenarioError."""
    from rheoline.scenario.compare import check_scenarios

    text = _EXAMPLE_TEXT
    for at, cut, insert in edits:
        at = min(at, len(text))
        text = text[:at] + insert + text[at + cut :]
    try:
        sset = loads_scenarios(text, source="mutated.toml")
        check_scenarios(sset)
    except ScenarioError as exc:
        assert "mutated.toml" in str(exc)


def test_no_code_paths_from_file_content():
    """The scenario layer never evaluates, unpickles or imports anything a file names."""
    import ast

    import rheoline.cli

    banned_calls = {"eval", "exec", "compile", "__import__"}  # builtins, called by name
    banned_modules = {"pickle", "marshal", "shelve", "importlib", "dill"}
    sources = sorted(Path(files.__file__).parent.glob("*.py")) + [Path(rheoline.cli.__file__)]
    assert len(sources) >= 10  # every module of the scenario layer, and the command line
    for source in sources:
        module = source.name
        tree = ast.parse(source.read_text(encoding="utf-8"))
        for node in ast.walk(tree):
            if isinstance(node, ast.Call):
                f = node.func
                if isinstance(f, ast.Name):
                    assert f.id not in banned_calls, (module, node.lineno)
                else:
                    assert getattr(f, "attr", "") != "import_module", (module, node.lineno)
            if isinstance(node, ast.Import | ast.ImportFrom):
                names = [a.name for a in node.names] + [getattr(node, "module", None) or ""]
                assert not {n.split(".")[0] for n in names} & banned_modules, module
