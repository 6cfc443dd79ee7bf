"""Scenario files: reading, validation, sweeps, limits and the round trip."""

import dataclasses
import json
import math
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from rheoline.errors import ScenarioError
from rheoline.scenario import files, schema, writing
from rheoline.scenario.files import (
    MAX_AXIS_VALUES,
    MAX_FILE_BYTES,
    MAX_PARTS,
    MAX_SCENARIOS,
    Axis,
    FrozenMap,
    ToleranceWidth,
    Value,
    dump_scenarios,
    example_names,
    example_path,
    load_scenarios,
    loads_scenarios,
    parse_scenarios,
    save_scenarios,
    sweep_points,
)

MALFORMED = Path(__file__).with_name("malformed")

# Conversion factors from NIST SP 811 (2008), Appendix B.8: 1 mmHg = 133.3224 Pa,
# 1 cmH2O = 98.0665 Pa; 1 mL/min = 1e-6 m^3 / 60 s by definition of the litre.
MMHG_PA = 133.3224


def one(**fields):
    """A valid one-scenario document (plain data) with ``fields`` overriding the defaults."""
    scenario = {
        "name": "case",
        "fluid": "water",
        "head": "1 m",
        "part": [{"type": "catheter", "gauge": 18}],
    }
    scenario.update(fields)
    scenario = {k: v for k, v in scenario.items() if v is not None}
    return {"format_version": 1, "scenario": [scenario]}


# --------------------------------------------------------------------------- examples
@pytest.mark.parametrize("name", example_names())
def test_every_example_round_trips(name, tmp_path):
    original = load_scenarios(example_path(name))
    text = dump_scenarios(original)
    assert loads_scenarios(text) == original
    saved = save_scenarios(original, tmp_path / f"{name}.toml")
    again = load_scenarios(saved)
    assert again == original
    as_json = load_scenarios(save_scenarios(original, tmp_path / f"{name}.json"))
    assert as_json == original
    assert [s.n_points for s in again.scenarios] == [s.n_points for s in original.scenarios]


def test_examples_are_shipped_with_the_package():
    names = example_names()
    assert {"rapid-transfusion-cart", "minimal"} <= set(names)
    with pytest.raises(ScenarioError, match="did you mean 'minimal'"):
        example_path("minimall")


def test_demo_covers_the_review_brief():
    demo = load_scenarios(example_path("rapid-transfusion-cart"))
    fluids, temps, gauges, modes, sources = set(), set(), set(), set(), set()
    tolerances = False
    for s in demo.scenarios:
        f = s.values["fluid"]
        fluids |= set(f.values) if isinstance(f, Axis) else {f}
        t = s.values["temperature"]
        temps |= set(t.values) if isinstance(t, Axis) else {t}
        g = s.parts[-1].values["gauge"]
        gauges |= set(g.values) if isinstance(g, Axis) else {g}
        modes.add(s.mode)
        sources.add(round(s.values.get("source_pressure", 0.0) / MMHG_PA))
        tolerances |= bool(s.parts[-1].tolerance)
    assert {"saline-0.9"} < fluids and len(fluids) == 2
    assert temps == {4.0, 37.0}
    assert gauges == {14, 16, 18, 20}
    assert modes == {"flow", "drive"}
    assert 300 in sources
    assert tolerances


# --------------------------------------------------------------------------- units
def test_quantities_parse_to_si():
    s = parse_scenarios(
        one(
            source_pressure="300 mmHg",
            back_pressure="10 cmH2O",
            temperature="37 degC",
            head="80 cm",
        )
    ).scenarios[0]
    assert s.values["source_pressure"] == pytest.approx(300 * MMHG_PA, rel=1e-6)
    assert s.values["back_pressure"] == pytest.approx(980.665, rel=1e-9)
    assert s.values["temperature"] == pytest.approx(37.0)
    assert s.values["head"] == pytest.approx(0.8)


def test_bare_numbers_take_the_documented_default_unit():
    s = parse_scenarios(
        one(
            head=1.2,
            source_pressure=300,
            temperature=4,
            part=[{"type": "tube", "inner_diameter": 3, "length": 1.8}],
        )
    ).scenarios[0]
    assert s.values["head"] == pytest.approx(1.2)  # m
    assert s.values["source_pressure"] == pytest.approx(300 * MMHG_PA, rel=1e-6)  # mmHg
    assert s.values["temperature"] == pytest.approx(4.0)  # degC
    assert s.parts[0].values["inner_diameter"] == pytest.approx(3e-3)  # mm
    assert s.parts[0].values["length"] == pytest.approx(1.8)  # m


def test_flow_mode_and_units():
    s = parse_scenarios(one(head=None, flow="150 mL/h", pressure_limit="300 mmHg")).scenarios[0]
    assert s.mode == "flow"
    assert s.values["flow"] == pytest.approx(150e-6 / 3600)


def test_hematocrit_as_percent_string_is_a_fraction():
    s = parse_scenarios(one(hematocrit="45 %")).scenarios[0]
    assert s.values["hematocrit"] == pytest.approx(0.45)


@pytest.mark.parametrize(
    "field, value, match",
    [
        ("source_pressure", "300 mL", "'mL' is not a unit of pressure"),
        ("head", "100 mmHg", "head is a height of fluid"),
        ("hematocrit", 45, "if that is a percent, write 0.45"),
        ("temperature", "-5 degC", "outside the allowed range"),
        ("back_pressure", float("nan"), "not a finite number"),
    ],
)
def test_unit_and_range_mistakes_name_the_field(field, value, match):
    with pytest.raises(ScenarioError, match=match) as info:
        parse_scenarios(one(**{field: value}), source="mine.toml")
    assert f"field '{field}'" in str(info.value)
    assert "mine.toml" in str(info.value) and "scenario 'case'" in str(info.value)
    assert info.value.field == field


def test_a_bound_written_in_another_unit_is_the_bound_itself():
    # 20 L/min = 20000 mL/min = 1200 L/h (definition of the litre); pint's conversion lands a
    # few ulps above the documented high of 2e4 mL/min, which must still be accepted, and
    # then as the bound itself
    for text in ("20 L/min", "20000 mL/min", "1200 L/h"):
        s = parse_scenarios(one(flow=text, head=None)).scenarios[0]
        assert s.values["flow"] == 20e-3 / 60
    with pytest.raises(ScenarioError, match="outside the allowed range"):
        parse_scenarios(one(flow="20.0001 L/min", head=None))
    with pytest.raises(ScenarioError, match="outside the allowed range"):
        parse_scenarios(one(volume="50.001 L"))


@pytest.mark.parametrize("char", ["\u202e", "\u2066", "\u200b", "\u00ad", "\ufeff"])
@pytest.mark.parametrize("where", ["name", "notes", "label"])
def test_invisible_format_characters_in_names_are_refused(char, where):
    # bidirectional overrides and isolates can make a name read as another one
    # (Boucher & Anderson 2021, "Trojan Source: Invisible Vulnerabilities")
    text = f"18G{char} cart"
    doc = (
        one(part=[{"type": "catheter", "gauge": 18, "label": text}])
        if where == "label"
        else one(**{where: text})
    )
    with pytest.raises(ScenarioError, match=rf"invisible character U\+{ord(char):04X}.*remove"):
        parse_scenarios(doc)


def test_joiners_that_emoji_and_scripts_need_are_kept():
    name = "team \U0001f468\u200d\U0001f469 \u0645\u06cc\u200c\u062e\u0648\u0627\u0647\u0645"
    assert parse_scenarios(one(name=name)).scenarios[0].name == name


def test_gauge_given_as_a_diameter_points_to_inner_diameter():
    with pytest.raises(ScenarioError, match="use inner_diameter"):
        parse_scenarios(one(part=[{"type": "catheter", "gauge": 1.2}]))


# --------------------------------------------------------------------------- sweeps
def test_lists_expand_to_the_cross_product_in_file_order():
    s = parse_scenarios(
        one(
            head=["50 cm", "1 m"],
            fluid=["water", "saline-0.9"],
            part=[{"type": "catheter", "gauge": [14, 18, 20]}],
        )
    ).scenarios[0]
    assert s.n_points == 12
    points = sweep_points(s)
    assert len(points) == 12
    assert [p for p, _ in s.axes] == ["fluid", "head", "part[1].gauge"]
    assert points[0] == {
        "fluid": ("water", "water"),
        "head": (0.5, "50 cm"),
        "part[1].gauge": (14, "14G"),
    }
    assert points[-1]["fluid"][0] == "saline-0.9" and points[-1]["part[1].gauge"][0] == 20
    assert len({tuple(v[0] for v in p.values()) for p in points}) == 12


def test_range_tables_with_step_and_count():
    s = parse_scenarios(
        one(
            head={"start": "50 cm", "stop": "150 cm", "step": "25 cm"},
            temperature={"start": "4 degC", "stop": "37 degC", "count": 3},
            part=[{"type": "catheter", "gauge": {"start": 14, "stop": 24, "step": 2}}],
        )
    ).scenarios[0]
    head = s.values["head"]
    assert head.values == pytest.approx((0.5, 0.75, 1.0, 1.25, 1.5))
    assert head.shown == ("50 cm", "75 cm", "100 cm", "125 cm", "150 cm")
    assert s.values["temperature"].values == pytest.approx((4.0, 20.5, 37.0))
    assert s.parts[0].values["gauge"].values == (14, 16, 18, 20, 22, 24)
    assert s.n_points == 5 * 3 * 6


def test_temperature_step_is_a_difference():
    s = parse_scenarios(
        one(temperature={"start": "20 degC", "stop": "30 degC", "step": "5 K"})
    ).scenarios[0]
    assert s.values["temperature"].values == pytest.approx((20.0, 25.0, 30.0))


def test_nothing_swept_is_one_point():
    s = parse_scenarios(one()).scenarios[0]
    assert s.n_points == 1 and sweep_points(s) == [{}]


def test_measured_part_lists_are_data_not_sweeps():
    s = parse_scenarios(
        one(
            head=None,
            flow="100 mL/min",
            part=[
                {
                    "type": "measured",
                    "flows": ["50 mL/min", "100 mL/min"],
                    "pressure_drops": ["10 mmHg", "30 mmHg"],
                }
            ],
        )
    ).scenarios[0]
    assert s.n_points == 1
    assert s.parts[0].values["pressure_drops"] == pytest.approx(
        (10 * MMHG_PA, 30 * MMHG_PA), rel=1e-6
    )


# --------------------------------------------------------------------------- limits
def test_file_size_limit_is_checked_before_parsing(tmp_path):
    big = tmp_path / "big.toml"
    big.write_text("format_version = 1\n# " + "x" * MAX_FILE_BYTES + "\n")
    with pytest.raises(ScenarioError, match=f"above the limit of {MAX_FILE_BYTES} bytes"):
        load_scenarios(big)


def test_scenario_count_limit():
    doc = one()
    doc["scenario"] = [dict(doc["scenario"][0], name=f"s{i}") for i in range(MAX_SCENARIOS + 1)]
    with pytest.raises(ScenarioError, match=f"above the limit of {MAX_SCENARIOS}"):
        parse_scenarios(doc)


def test_part_count_limit():
    with pytest.raises(ScenarioError, match=f"above the limit of {MAX_PARTS}"):
        parse_scenarios(one(part=[{"type": "fitting", "k": 0.5}] * (MAX_PARTS + 1)))


def test_axis_limit():
    with pytest.raises(ScenarioError, match=f"above the limit of {MAX_AXIS_VALUES}"):
        parse_scenarios(one(back_pressure=list(range(MAX_AXIS_VALUES + 1))))


def test_total_points_limit(monkeypatch):
    monkeypatch.setattr(schema, "MAX_TOTAL_POINTS", 5)
    doc = one(head=["1 m", "2 m", "3 m"])
    doc["scenario"].append(dict(doc["scenario"][0], name="second"))
    with pytest.raises(ScenarioError, match="more than 5 sweep points"):
        parse_scenarios(doc)


def test_part_points_limit_counts_every_scenario(monkeypatch):
    # sweep points x parts over the whole file bounds the work a file can ask for
    monkeypatch.setattr(schema, "MAX_PART_POINTS", 10)
    parts = [
        {"type": "tube", "inner_diameter": "3 mm", "length": "1.8 m"},
        {"type": "catheter", "gauge": 18},
    ]
    doc = one(head=["1 m", "2 m", "3 m"], part=parts)  # 3 points x 2 parts = 6
    parse_scenarios(doc)  # one scenario fits
    doc["scenario"].append(dict(doc["scenario"][0], name="second"))  # 12 > 10
    with pytest.raises(ScenarioError, match="more than 10 part solves"):
        parse_scenarios(doc)


def test_file_tolerance_solves_limit(monkeypatch):
    monkeypatch.setattr(schema, "MAX_FILE_TOLERANCE_SOLVES", 150)
    doc = one(tolerance={"temperature": "1 degC", "samples": 100})
    parse_scenarios(doc)  # 100 solves fit
    doc["scenario"].append(dict(doc["scenario"][0], name="second"))
    with pytest.raises(ScenarioError, match="more than 150 tolerance solves"):
        parse_scenarios(doc)


# --------------------------------------------------------------------------- formats
def test_json_reads_like_toml():
    doc = one(head=["50 cm", "1 m"])
    from_json = loads_scenarios(json.dumps(doc), fmt="json")
    import tomli_w

    from_toml = loads_scenarios(tomli_w.dumps(doc))
    assert from_json == from_toml
    assert from_json.sha256 and len(from_json.sha256) == 64


def test_a_json_key_given_twice_names_the_key_and_its_object(tmp_path):
    # RFC 8259 section 4: names within an object SHOULD be unique; TOML requires it
    text = json.dumps(one(head="1 m")).replace('"head": "1 m"', '"head": "1 m", "head": "10 m"')
    with pytest.raises(
        ScenarioError,
        match=r"dup\.json: key 'head' is given more than once "
        r"in one JSON object \(in the object named 'case'\)",
    ):
        loads_scenarios(text, source="dup.json", fmt="json")
    path = tmp_path / "dup.json"
    path.write_text(json.dumps(one()).replace('"gauge": 18', '"gauge": 18, "gauge": 14'))
    with pytest.raises(ScenarioError, match="key 'gauge' is given more than once"):
        load_scenarios(path)


def test_save_never_overwrites_without_force(tmp_path):
    target = tmp_path / "s.toml"
    target.write_text("keep me")
    sset = parse_scenarios(one())
    with pytest.raises(ScenarioError, match="exists already"):
        save_scenarios(sset, target)
    assert target.read_text() == "keep me"
    save_scenarios(sset, target, force=True)
    assert load_scenarios(target) == sset
    assert [p.name for p in tmp_path.iterdir()] == ["s.toml"]


def test_save_where_nothing_can_be_written_is_a_scenario_error_naming_the_path(
    tmp_path, monkeypatch
):
    sset = parse_scenarios(one())
    (tmp_path / "a folder").mkdir()
    cases = [
        (tmp_path / "a folder", "is a folder; give a file name"),
        (tmp_path / "none" / "s.toml", "the folder .*none' does not exist"),
    ]
    for target, match in cases:
        with pytest.raises(files.OutputError, match=match) as info:
            save_scenarios(sset, target, force=True)
        assert isinstance(info.value, ScenarioError) and isinstance(info.value, OSError)
        assert str(target) in str(info.value)

    def disk_full(*args, **kwargs):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(writing.os, "replace", disk_full)
    with pytest.raises(
        files.OutputError, match="s.toml: cannot write the scenario file: No space left on device"
    ) as info:
        save_scenarios(sset, tmp_path / "s.toml")
    assert info.value.errno == 28 and info.value.reason == "No space left on device"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a folder"]  # no temporary file


@pytest.mark.parametrize(
    "path",
    sorted(p for p in MALFORMED.iterdir() if p.name != "expected.json"),
    ids=lambda p: p.name,
)
def test_malformed_corpus_fails_in_the_loader_or_the_model_check(path):
    """Each file fails with a ScenarioError that names what its entry in expected.json says."""
    expected = json.loads((MALFORMED / "expected.json").read_text())[path.name]
    try:
        sset = load_scenarios(path)
    except ScenarioError as exc:
        assert expected.lower() in str(exc).lower()
        assert path.name in str(exc)
        return
    # names only the model knows (fluids, catalogue sizes) are caught by the model check
    from rheoline.scenario.compare import check_scenarios

    with pytest.raises(ScenarioError, match=expected.replace("[", r"\[").replace("]", r"\]")):
        check_scenarios(sset)


def test_corpus_is_large_enough():
    assert len(json.loads((MALFORMED / "expected.json").read_text())) >= 30


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


# --------------------------------------------------------------------------- the description
#: A file that uses every kind of field: sweeps as lists and as range tables (step and
#: count), a pump case with a limit, falling-head and decaying-pressure deliveries, a site,
#: scenario and part tolerances, a measured part, a needle wall, a set, a cannula, JSON-style
#: bare numbers next to quantities.  Demo data, invented.
EVERY_FIELD = """
format_version = 1
title = "every field"
notes = "invented"

[[scenario]]
name = "gravity sweep"
notes = "two lines"
fluid = ["whole-blood", "packed-red-cells"]
temperature = { start = "20 degC", stop = "37 degC", count = 3 }
hematocrit = "40 %"
head = { start = "50 cm", stop = "1.5 m", step = "50 cm" }
back_pressure = 8
volume = "0.5 L"
head_when_empty = "30 cm"
vein_diameter = ["4 mm", "6 mm"]
tolerance = { temperature = "1 K", hematocrit = 0.02, viscosity = "3 %", distribution = "normal", samples = 200, seed = 5 }

[[scenario.part]]
type = "set"
kind = "gravity-set"

[[scenario.part]]
type = "tube"
label = "line"
inner_diameter = [2.5, "3 mm"]
length = "1.5 m"
roughness = "0.001 mm"
tolerance = { inner_diameter = "0.02 mm", length = "2 %" }

[[scenario.part]]
type = "catheter"
gauge = { start = 14, stop = 20, step = 2 }

[[scenario]]
name = "pump"
fluid = "glycerol-water"
mass_fraction = 0.4
flow = ["60 mL/h", "2 mL/min"]
pressure_limit = "900 mmHg"

[[scenario.part]]
type = "measured"
label = "filter"
flows = ["50 mL/h", 2.5]
pressure_drops = ["8 mmHg", "26 mmHg"]
test_viscosity = "1 cP"
test_density = "1000 kg/m^3"

[[scenario.part]]
type = "fitting"
equivalent_length = "5 cm"
inner_diameter = "3 mm"

[[scenario.part]]
type = "needle"
gauge = "25G"
wall = "Thin"
length = "25 mm"

[[scenario]]
name = "cuff"
fluid = "saline-0.9"
head = "80 cm"
source_pressure = "300 mmHg"
pressure_time_constant = "20 min"
volume = "1 L"

[[scenario.part]]
type = "cannula"
french = 12
length = "20 cm"
wall_thickness = "0.3 mm"
"""


@pytest.mark.parametrize("fmt", ["toml", "json"])
def test_load_dump_load_is_the_identity_for_every_kind_of_field(fmt):
    original = loads_scenarios(EVERY_FIELD, source="every.toml")
    text = dump_scenarios(original, fmt=fmt)
    again = loads_scenarios(text, fmt=fmt)
    assert again == original
    assert dump_scenarios(again, fmt=fmt) == text  # the writer is stable
    # each value keeps what the file wrote, and its SI value
    sc = original.scenarios[0]
    assert sc.drive.head.written == FrozenMap(start="50 cm", stop="1.5 m", step="50 cm")
    assert sc.drive.head.values == pytest.approx((0.5, 1.0, 1.5))
    assert sc.drive.back_pressure == Value(pytest.approx(8 * MMHG_PA, rel=1e-6), 8)
    assert sc.parts[1].tolerance["inner_diameter"] == ToleranceWidth(
        "absolute", pytest.approx(2e-5), "0.02 mm"
    )
    assert sc.tolerance.distribution.si == "normal" and sc.tolerance.n_samples == 200
    pump = original.scenarios[1]
    assert pump.mode == "flow" and pump.delivery is None and pump.site is None
    assert pump.parts[2].fields["wall"] == Value("thin", "Thin")
    assert pump.parts[0].fields["flows"].written == ("50 mL/h", 2.5)


def test_every_scenario_field_has_one_home_in_the_description():
    from dataclasses import fields

    from rheoline.scenario.description import (
        DeliverySpec,
        DriveSpec,
        FluidSpec,
        SiteSpec,
        SyringeSpec,
    )
    from rheoline.scenario.schema import SCENARIO_FIELDS
    from rheoline.scenario.transient_schema import TRANSIENT_KEYS

    classes = {
        "fluid": FluidSpec,
        "drive": DriveSpec,
        "delivery": DeliverySpec,
        "site": SiteSpec,
        "syringe": SyringeSpec,
    }
    for group, cls in classes.items():
        keys = [k for k, spec in SCENARIO_FIELDS.items() if spec.group == group]
        built = cls(**{f.name: Value(i) for i, f in enumerate(fields(cls))})
        assert [k for k, _ in built.items()] == keys, group
    grouped = {k for k, spec in SCENARIO_FIELDS.items() if spec.group}
    # "node" and "branch" are held by Scenario.topology (rheoline.scenario.topology); the time
    # solve's lists and tables by Scenario.transient (transient_spec.py)
    tables = {"name", "notes", "model_band", "tolerance", "part", "node", "branch", *TRANSIENT_KEYS}
    assert grouped | tables == set(SCENARIO_FIELDS)


def test_a_description_edited_in_code_saves_and_loads_to_itself(tmp_path):
    from dataclasses import replace

    from rheoline.scenario.files import axis_of, value_of, width_of

    sset = loads_scenarios(EVERY_FIELD)
    pump = sset.scenarios[1]
    edited_pump = replace(
        pump,
        drive=replace(pump.drive, flow=axis_of("flow", [1e-6, 2e-6, 3e-6])),
        fluid=replace(pump.fluid, temperature=value_of("temperature", 30.0)),
    )
    first = sset.scenarios[0]
    tube = first.parts[1]
    edited_tube = replace(
        tube,
        fields={
            **tube.fields,
            "inner_diameter": value_of("part[2].inner_diameter", 2.7e-3, "tube"),
        },
        tolerance={
            "inner_diameter": width_of("part[2].tolerance.inner_diameter", "relative", 0.04)
        },
    )
    edited_first = replace(first, parts=(first.parts[0], edited_tube, first.parts[2]))
    edited = replace(sset, scenarios=(edited_first, edited_pump, sset.scenarios[2]))
    again = load_scenarios(save_scenarios(edited, tmp_path / "edited.toml"))
    assert again == edited
    assert again.scenarios[1].drive.flow.shown == ("60 mL/min", "120 mL/min", "180 mL/min")
    assert again.scenarios[1].values["temperature"] == 30.0
    assert again.scenarios[0].parts[1].values["inner_diameter"] == 2.7e-3
    # the originals are untouched (frozen)
    assert sset.scenarios[1].drive.flow.written == ("60 mL/h", "2 mL/min")


def test_values_built_in_code_are_range_checked():
    from rheoline.scenario.files import value_of

    with pytest.raises(ScenarioError, match="field 'head'.*outside the allowed range"):
        value_of("head", 50.0)


def test_the_description_is_frozen_hashable_and_picklable():
    import dataclasses
    import pickle

    sset = loads_scenarios(EVERY_FIELD)
    sc = sset.scenarios[0]
    with pytest.raises(dataclasses.FrozenInstanceError):
        sc.name = "other"
    with pytest.raises(TypeError):
        sc.parts[1].fields["length"] = Value(1.0)
    assert hash(sc) == hash(loads_scenarios(EVERY_FIELD).scenarios[0])
    assert pickle.loads(pickle.dumps(sset)) == sset


def test_a_scenario_without_temperature_uses_the_documented_default_and_writes_none():
    sset = parse_scenarios(one())
    sc = sset.scenarios[0]
    assert sc.fluid.temperature is None and sc.values["temperature"] == 22.0
    assert "temperature" not in dump_scenarios(sset)


def _swept(values):
    """A field written as one value or as a list of them."""
    one = st.sampled_from(values)
    return st.one_of(one, st.lists(one, min_size=1, max_size=3))


_PARTS = st.sampled_from(
    [
        {"type": "catheter", "gauge": 18},
        {"type": "catheter", "gauge": ["14G", 20]},
        {"type": "catheter", "gauge": {"start": 16, "stop": 22, "step": 2}},
        {"type": "tube", "inner_diameter": ["3 mm", 2.5], "length": "1.8 m", "label": "set"},
        {
            "type": "tube",
            "inner_diameter": "0.1 in",
            "length": {"start": "1 m", "stop": "2 m", "count": 3},
        },
        {"type": "set", "kind": "gravity-set", "tolerance": {"inner_diameter": "4 %"}},
        {"type": "fitting", "k": [0.5, 2]},
        {"type": "needle", "gauge": 25, "wall": "regular", "tolerance": {"length": "1 mm"}},
    ]
)


#: Parts with the time solve's fields (a pump's line only).
_TIME_PARTS = st.sampled_from(
    [
        {"type": "tube", "inner_diameter": "0.5 mm", "length": "1.5 m", "compliance": "0.04"},
        {
            "type": "tube",
            "inner_diameter": "0.5 mm",
            "length": "150 cm",
            "compliance_pressures": ["0 mmHg", "300 mmHg"],
            "compliance_values": ["0.06 uL/mmHg/m", 0.04],
        },
        {
            "type": "fitting",
            "equivalent_length": "3 cm",
            "inner_diameter": "1 mm",
            "internal_volume": "0.07 mL",
            "compliance": "0.1 uL/mmHg",
        },
        {"type": "catheter", "gauge": 24, "compliance": "0.01 uL/mmHg/m"},
    ]
)
_CHANGES = st.sampled_from(
    [
        [],
        [{"time": "60 min", "rate": "2 mL/h"}],
        [{"time": 30, "rate": 1.5, "ramp": "5 min"}, {"time": "2 h", "rate": "0 mL/h"}],
    ]
)


def _time_solve(draw, sc):
    """The time solve's fields of a pump scenario (drawn after its parts)."""
    if draw(st.booleans()):
        sc["part"] = sc["part"] + [draw(_TIME_PARTS)]
    syringe = {  # single values: a pump's sweep stays within the time solve's limit
        "syringe_compliance": st.sampled_from(["1.5 uL/mmHg", 2, "10 nL/kPa"]),
        "slack": st.sampled_from(["30 uL", 50, "0.1 mL"]),
        "break_loose_pressure": st.sampled_from(["50 mmHg", 40]),
    }
    for key in draw(st.lists(st.sampled_from(sorted(syringe)), max_size=2, unique=True)):
        sc[key] = draw(syringe[key])
    if "break_loose_pressure" not in sc and draw(st.booleans()):
        sc["break_loose_force"] = draw(st.sampled_from(["5 N", 3]))
        if draw(st.booleans()):
            sc["barrel_diameter"] = "26.6 mm"
        else:
            sc["syringe_size"] = draw(st.sampled_from(["20 mL", 50]))
    if "syringe_compliance" not in sc and draw(st.booleans()):
        sc["syringe_compliance_pressures"] = ["0 mmHg", "50 mmHg", 300]
        sc["syringe_compliance_values"] = ["4 uL/mmHg", "1.5 uL/mmHg", 1.2]
    changes = draw(_CHANGES)
    if changes:
        sc["rate_changes"] = changes
    if draw(st.booleans()):
        sc["duration"] = draw(st.sampled_from(["6 h", 300]))
    n = len(sc["part"])
    if draw(st.booleans()):
        sc["occlusion"] = {"part": draw(st.integers(1, n)), "time": "20 min", "alarm_pressure": 300}
        if draw(st.booleans()):
            sc["occlusion"]["release"] = "90 min"
    if draw(st.booleans()):
        port = {"boundary": draw(st.integers(0, n)), "flow": "0.5 mL/h", "concentration": 0.2}
        extra = {"label": "drug", "start": "10 min", "syringe_compliance": 0.8, "slack": "10 uL"}
        for key in draw(st.lists(st.sampled_from(sorted(extra)), max_size=3, unique=True)):
            port[key] = extra[key]
        if draw(st.booleans()):
            port["rate_changes"] = [{"time": "1 h", "rate": "1 mL/h", "ramp": 0}]
        sc["port"] = [port]


@st.composite
def _valid_documents(draw):
    scenarios = []
    for i in range(draw(st.integers(1, 3))):
        sc = {"name": f"s{i}", "fluid": draw(_swept(["water", "saline-0.9", "dextrose-5"]))}
        if draw(st.booleans()):
            sc["temperature"] = draw(_swept(["4 degC", 37, "20.5 degC", "300 K"]))
        if draw(st.booleans()):
            sc["flow"] = draw(_swept(["60 mL/h", 2, "0.1 L/min"]))
            if draw(st.booleans()):
                sc["pressure_limit"] = draw(st.sampled_from(["300 mmHg", 40, "2 bar"]))
        else:
            head_range = {"start": "50 cm", "stop": "1 m", "step": "25 cm"}
            sc["head"] = draw(st.one_of(_swept(["50 cm", 1, "0.8 m"]), st.just(head_range)))
            if draw(st.booleans()):
                sc["source_pressure"] = draw(_swept(["300 mmHg", 40, "5 kPa"]))
        if draw(st.booleans()):
            sc["back_pressure"] = draw(st.sampled_from(["8 mmHg", -5, "10 cmH2O"]))
        if draw(st.booleans()):
            sc["volume"] = draw(st.sampled_from(["500 mL", 250, "1 L"]))
        if draw(st.booleans()):
            sc["tolerance"] = {
                "temperature": "1 degC",
                "samples": 200,
                "seed": draw(st.integers(0, 9)),
            }
        sc["part"] = draw(st.lists(_PARTS, min_size=1, max_size=2))
        if any("tolerance" in p for p in sc["part"]):  # within the Monte Carlo budget
            sc.setdefault("tolerance", {})["samples"] = 100
        if "flow" in sc and draw(st.booleans()):
            _time_solve(draw, sc)
        scenarios.append(sc)
    return {"format_version": 1, "title": draw(st.sampled_from(["", "t"])), "scenario": scenarios}


@given(_valid_documents())
def test_any_valid_document_loads_dumps_and_loads_to_the_same_description(doc):
    sset = parse_scenarios(doc)
    for fmt in ("toml", "json"):
        text = dump_scenarios(sset, fmt)
        again = loads_scenarios(text, fmt=fmt)
        assert again == sset
        assert dump_scenarios(again, fmt) == text


def test_one_field_read_and_replaced_by_its_path_saves_and_loads():
    from rheoline.scenario.files import axis_of, value_of, width_of

    sset = loads_scenarios(EVERY_FIELD)
    first, pump, cuff = sset.scenarios
    assert first.field("head") is first.drive.head
    assert first.field("fluid") is first.fluid.name
    assert first.field("tolerance.samples").si == 200
    assert first.field("part[2].tolerance.length").written == "2 %"
    assert first.field("part[3].gauge").values == (14, 16, 18, 20)
    assert cuff.field("vein_diameter") is None and pump.field("tolerance.seed") is None
    edited = (
        first.with_field("head", value_of("head", 1.2))
        .with_field("part[3].gauge", axis_of("part[3].gauge", [18, 20], "catheter"))
        .with_field("part[2].tolerance.length", None)
        .with_field("volume", None)
        .with_field("head_when_empty", None)
    )
    assert edited.drive.head.si == 1.2 and edited.delivery is None
    assert "length" not in edited.parts[1].tolerance
    pump2 = pump.with_field("tolerance.samples", value_of("tolerance.samples", 500)).with_field(
        "part[3].tolerance.inner_diameter",
        width_of("part[3].tolerance.inner_diameter", "absolute", 1e-5),
    )
    assert pump2.tolerance.n_samples == 500 and pump2.n_samples == 500
    cuff2 = cuff.with_field("vein_diameter", value_of("vein_diameter", 5e-3))
    again = loads_scenarios(
        dump_scenarios(dataclasses.replace(sset, scenarios=(edited, pump2, cuff2)))
    )
    assert again.scenarios == (edited, pump2, cuff2)
    with pytest.raises(KeyError, match="no field 'colour'"):
        first.field("colour")
