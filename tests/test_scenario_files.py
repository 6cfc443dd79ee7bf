"""Scenario files: the examples, units, sweeps, limits, formats and the malformed corpus.

Fuzzing of the loader: tests/test_scenario_files_fuzz.py; the description and the round
trip of every kind of field: tests/test_scenario_description.py.
"""

import json
from pathlib import Path

import pytest
from scenario_doc import MMHG_PA, one

from rheoline.errors import ScenarioError
from rheoline.scenario import files, schema, writing
from rheoline.scenario.files import (
    MAX_AXIS_VALUES,
    MAX_FILE_BYTES,
    MAX_PARTS,
    MAX_SCENARIOS,
    Axis,
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

# MMHG_PA (tests/scenario_doc.py): NIST SP 811 (2008), Appendix B.8; 1 cmH2O = 98.0665 Pa;
# 1 mL/min = 1e-6 m^3 / 60 s by definition of the litre.


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
