"""JSON text put together by columns (``rheoline run --json``): byte for byte the text
``json.dumps`` writes of the same objects (Python's :mod:`json`, the reference here)."""

from __future__ import annotations

import json
import math
import warnings

import pytest

from rheoline import cli
from rheoline.scenario.files import example_names, example_path, load_scenarios
from rheoline.scenario.json_text import (
    Texts,
    numbers,
    object_texts,
    objects_array_pieces,
    objects_array_text,
    value_texts,
)
from rheoline.scenario.run import run_scenarios


def _run(name):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return run_scenarios(load_scenarios(example_path(name)))


@pytest.mark.parametrize("name", example_names())
def test_records_text_of_every_example_is_that_of_json_dumps(name):
    # lines, pumps, time solves, branched networks (extra keys before the caution), bands
    run = _run(name)
    assert run.records_json() == json.dumps(run.records(), allow_nan=False)


def test_command_line_json_is_json_dumps_of_the_records(capsys):
    status = cli.main(["run", str(example_path("trauma-bay")), "--json"])
    out, _ = capsys.readouterr()
    assert status == 0
    assert out == json.dumps(_run("trauma-bay").records(), allow_nan=False) + "\n"


def test_values_of_every_kind_are_written_as_json_writes_them():
    # 1, 1.0 and True are equal (and hash alike) in Python but not in JSON; text outside
    # ASCII is escaped; a list of objects cannot be a cache key
    values = [1, 1.0, True, None, False, 0, "é – ok", {"a": 1}, {"a": True}, [1, 2], [True, 2]]
    values += [[{"x": 1.5}], 'a"b\\c\n', -0.0, 0.0, 1e-7, 1e16, 123456789.123]
    # equal in Python, written differently: inside lists, tuples and objects too
    values += [[0.0], [-0.0], [(1,)], [(True,)], {"a": 0.0}, {"a": -0.0}, (1, 2), (True, 2)]
    values += [{1: "a"}, {True: "a"}, ["a", None], {"k": "v", "n": None}, ["a", None]]
    assert value_texts(values) == [json.dumps(v) for v in values]
    assert value_texts(["a", None, True, "a", False]) == ['"a"', "null", "true", '"a"', "false"]


@pytest.mark.parametrize(
    "column",
    [
        [0.1, 0.2, 1e-300, 2.5e300, -3.0],  # distinct: each written by repr
        [0.0, 0.0, 0.5, 0.5, None, None, 0.0, 7.25],  # repeated: each written once
        [0.0, -0.0, 0.0, -0.0, 1.0, 1.0],  # equal as keys, written differently
        [None, None, None],
    ],
)
def test_number_columns_are_written_as_json_writes_them(column):
    assert value_texts(numbers(column)) == [json.dumps(v) for v in column]


def test_a_number_that_json_cannot_hold_is_refused_as_json_refuses_it():
    with pytest.raises(ValueError, match="Out of range float values are not JSON compliant"):
        value_texts(["a", math.nan])
    with pytest.raises(ValueError, match="Out of range float values are not JSON compliant"):
        value_texts([math.inf])


def test_objects_with_tails_and_arrays_of_them():
    columns = {"case": ["a", "b", "c"], "flow": numbers([1.5, None, 0.0])}
    columns["parts"] = Texts(["[]", '[{"x": 1}]', "[]"])
    tails = [{"caution": "c"}, {"more": [1, {"y": None}], "caution": "c"}, {}]
    objects = [
        {"case": "a", "flow": 1.5, "parts": [], "caution": "c"},
        {"case": "b", "flow": None, "parts": [{"x": 1}], "more": [1, {"y": None}], "caution": "c"},
        {"case": "c", "flow": 0.0, "parts": []},
    ]
    assert object_texts(columns, tails) == [json.dumps(o) for o in objects]
    assert objects_array_text(columns, tails) == json.dumps(objects)
    assert object_texts({}, [{"a": 1}, {}]) == ['{"a": 1}', "{}"]
    assert objects_array_text({"a": []}) == "[]" == json.dumps([])


def test_columns_of_different_lengths_are_refused():
    with pytest.raises(ValueError, match="column 'b' has 1 values, not 2"):
        object_texts({"a": [1, 2], "b": [3]})


def test_array_in_pieces_is_the_whole_text():
    columns = {"i": list(range(5)), "x": numbers([0.5, None, 0.5, -0.0, 2.0])}
    columns["t"] = Texts(["[]", "{}", "[1]", "null", "true"])
    tails = [{"caution": "c"}] * 4 + [{"more": 1, "caution": "c"}]
    objects = [
        {"i": 0, "x": 0.5, "t": [], "caution": "c"},
        {"i": 1, "x": None, "t": {}, "caution": "c"},
        {"i": 2, "x": 0.5, "t": [1], "caution": "c"},
        {"i": 3, "x": -0.0, "t": None, "caution": "c"},
        {"i": 4, "x": 2.0, "t": True, "more": 1, "caution": "c"},
    ]
    pieces = list(objects_array_pieces(columns, tails, size=2))
    assert len(pieces) == 3 and "".join(pieces) == json.dumps(objects)
    written = Texts(json.dumps(t) for t in tails)  # tails given as their JSON text
    assert "".join(objects_array_pieces(columns, written, size=2)) == json.dumps(objects)
    assert list(objects_array_pieces({"a": []}, [])) == ["[]"]
    with pytest.raises(ValueError, match=r"different lengths: \[4, 5\]"):
        list(objects_array_pieces(columns, tails[:4]))
