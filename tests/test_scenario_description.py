"""Scenario files: the description and the round trip.

A file with every kind of field (EVERY_FIELD) loads, dumps and loads to itself in TOML and
JSON; every field has one home in the description; a description edited in code saves and
loads to itself and is range checked, frozen, hashable and picklable; any valid document
round-trips (hypothesis); a field is read and replaced by its path.
"""

import dataclasses

import pytest
from hypothesis import given
from hypothesis import strategies as st
from scenario_doc import MMHG_PA, one

from rheoline.errors import ScenarioError
from rheoline.scenario.files import (
    FrozenMap,
    ToleranceWidth,
    Value,
    dump_scenarios,
    load_scenarios,
    loads_scenarios,
    parse_scenarios,
    save_scenarios,
)

# MMHG_PA (tests/scenario_doc.py): NIST SP 811 (2008), Appendix B.8.

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
