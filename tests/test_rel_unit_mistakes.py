"""Reliability: unit mistakes are caught at the edge, naming the field and the likely fix.

Each mistake is written the way an engineer would write it, in a TOML file and in the
same scenario as JSON, and put through ``rheoline check`` in-process: exit status 2, one
line on stderr naming the field, a hint at the fix, no traceback, nothing on stdout.
(The scenario owner's tests/test_scenario_files.py checks the loader's messages for a few
of these; here each goes end to end through the command line and both file formats.)
"""

from __future__ import annotations

import json
import math
import re

import pytest
from hypothesis import example, given
from hypothesis import strategies as st
from rel_record import bump, module_recorder

from rheoline import cli
from rheoline.errors import InputRangeError, UnitError
from rheoline.scenario.files import loads_scenarios
from rheoline.units import parse_quantity

_record = module_recorder("unit_mistakes", "units:")


def scenario(fluid="saline-0.9", part=None, **fields):
    """One scenario as plain data (what TOML or JSON would give)."""
    sc = {"name": "case", "fluid": fluid, **fields}
    if "head" not in sc and "source_pressure" not in sc and "flow" not in sc:
        sc["head"] = "1 m"
    sc["part"] = [part or {"type": "catheter", "gauge": 18}]
    return {"format_version": 1, "scenario": [sc]}


def to_toml(doc):
    import tomli_w

    return tomli_w.dumps(doc)


#: (id, scenario, field named, regex of the fix the message must suggest)
MISTAKES = [
    (
        "pressure-in-mL",
        scenario(source_pressure="300 mL"),
        "source_pressure",
        r"not a unit of pressure.*(mmHg|kPa)",
    ),
    (
        "back-pressure-in-mL",
        scenario(back_pressure="8 mL"),
        "back_pressure",
        r"not a unit of pressure",
    ),
    (
        "pressure-as-a-length",
        scenario(source_pressure="1 m"),
        "source_pressure",
        r"for a bag height use head",
    ),
    (
        "head-in-mmHg",
        scenario(head="300 mmHg"),
        "head",
        r"height of fluid.*for a pressure bag use source_pressure",
    ),
    (
        "head-in-cmH2O",
        scenario(head="100 cmH2O"),
        "head",
        r"for a pressure bag use source_pressure",
    ),
    (
        "head-bare-centimetres",
        scenario(head=100),
        "head",
        r"bare number is read in m, write the unit",
    ),
    ("flow-as-a-pressure", scenario(flow="300 mmHg"), "flow", r"not a unit of flow.*mL/min"),
    (
        "hematocrit-percent-number",
        scenario("whole-blood", hematocrit=45),
        "hematocrit",
        r"percent.*0\.45",
    ),
    (
        "hematocrit-percent-text",
        scenario("whole-blood", hematocrit="45"),
        "hematocrit",
        r"percent.*0\.45",
    ),
    (
        "hematocrit-with-a-unit",
        scenario("whole-blood", hematocrit="0.45 mm"),
        "hematocrit",
        r"fraction such as 0\.45",
    ),
    (
        "gauge-as-a-diameter",
        scenario(part={"type": "catheter", "gauge": 1.3}),
        "part[1].gauge",
        r"use inner_diameter",
    ),
    (
        "gauge-as-a-diameter-with-unit",
        scenario(part={"type": "catheter", "gauge": "1.3 mm"}),
        "part[1].gauge",
        r"inner_diameter",
    ),
    (
        "needle-gauge-as-a-diameter",
        scenario(part={"type": "needle", "gauge": 0.8}),
        "part[1].gauge",
        r"inner_diameter",
    ),
    (
        "bore-given-as-a-gauge",
        scenario(part={"type": "catheter", "inner_diameter": 18, "length": "45 mm"}),
        "part[1].inner_diameter",
        r"gauge",
    ),
    (
        "bore-with-a-gauge-unit",
        scenario(part={"type": "tube", "inner_diameter": "18G", "length": "1 m"}),
        "part[1].inner_diameter",
        r"for a catalogue size use gauge",
    ),
    (
        "temperature-in-kelvin-bare",
        scenario(temperature=310),
        "temperature",
        r"bare number is read in degC, write the unit",
    ),
    (
        "temperature-in-fahrenheit-bare",
        scenario(temperature=98.6),
        "temperature",
        r"bare number is read in degC",
    ),
    (
        "catheter-length-in-mm-bare",
        scenario(part={"type": "catheter", "gauge": 18, "length": 45}),
        "part[1].length",
        r"bare number is read in m, write the unit",
    ),
    ("volume-as-a-flow", scenario(volume="100 mL/h"), "volume", r"a volume \(mL, L\)"),
]


def _check(capsys, path):
    try:
        status = cli.main(["check", str(path)])
    except SystemExit as exc:  # pragma: no cover - main returns, argparse may exit
        status = exc.code
    out, err = capsys.readouterr()
    return status, out, err


@pytest.mark.parametrize(
    ("doc", "field", "fix"), [m[1:] for m in MISTAKES], ids=[m[0] for m in MISTAKES]
)
@pytest.mark.parametrize("fmt", ["toml", "json"])
def test_unit_mistake_names_the_field_and_the_fix(
    doc, field, fix, fmt, capsys, tmp_path, monkeypatch
):
    monkeypatch.chdir(tmp_path)
    path = tmp_path / f"mistake.{fmt}"
    path.write_text(to_toml(doc) if fmt == "toml" else json.dumps(doc), encoding="utf-8")
    bump("units:files_checked")
    status, out, err = _check(capsys, path)
    assert status == 2, (status, out, err)
    assert out == ""
    assert err.startswith("rheoline: error: ") and err.count("\n") == 1, err
    assert "Traceback" not in err
    assert f"field '{field}'" in err, err
    assert re.search(fix, err, flags=re.IGNORECASE), err
    assert sorted(p.name for p in tmp_path.iterdir()) == [path.name]  # nothing written


def test_percent_written_with_its_sign_is_read_as_a_fraction():
    # the fix the messages suggest must itself work
    for written in ("45 %", "45%", 0.45):
        s = loads_scenarios(to_toml(scenario("whole-blood", hematocrit=written)))
        assert s.scenarios[0].values["hematocrit"] == pytest.approx(0.45)
    bump("units:fixes_checked", 3)


def test_model_layer_names_metres_for_a_vessel_radius_in_millimetres():
    from rheoline.model.vessels import Vessel

    with pytest.raises(InputRangeError, match=r"pass metres \(1 mm = 1e-3 m\)"):
        Vessel(radius=1.5, length=0.1)


def test_model_layer_catalogue_gauge_given_as_a_diameter():
    from rheoline.model.parts import Catheter, Needle

    with pytest.raises(InputRangeError, match=r"catheter gauge.*inner_diameter"):
        Catheter(gauge=1.3e-3)
    with pytest.raises(InputRangeError, match=r"gauge.*inner_diameter|inner_diameter.*gauge"):
        Needle(gauge=0.8)


def test_catheter_given_by_its_measured_bore_checks_and_runs(capsys, tmp_path):
    # the fix the gauge messages suggest ("use inner_diameter") must itself work end to end
    path = tmp_path / "bore.toml"
    path.write_text(
        to_toml(scenario(part={"type": "catheter", "inner_diameter": "1.1 mm", "length": "45 mm"})),
        encoding="utf-8",
    )
    status, out, err = _check(capsys, path)
    assert (status, err) == (0, ""), err
    assert "ok:" in out


_UNIT_TOKENS = list("0123456789.eE+-/ *^()%") + [
    "mmHg",
    "cmH2O",
    "mL",
    "min",
    "h",
    "degC",
    "K",
    "Pa",
    "kPa",
    "psi",
    "bar",
    "cP",
    "s",
    "m",
    "L",
    "inch",
    "Fr",
    "**",
    "1e999",
    "nan",
    "inf",
    "__class__",
    "Quantity",
    "exp",
    "1/0",
    "°",
    "µ",
]


@given(
    text=st.one_of(
        st.lists(st.sampled_from(_UNIT_TOKENS), max_size=8).map("".join),
        st.floats(allow_nan=True, allow_infinity=True),
    ),
    kind=st.sampled_from(
        ["pressure", "length", "flow", "temperature", "viscosity", "dimensionless", "volume"]
    ),
    default=st.sampled_from([None, "mmHg", "m", "degC", "mL/min"]),
)
@example(text="1e999", kind="dimensionless", default=None)  # bug U1 in the notes
@example(text=float("nan"), kind="dimensionless", default=None)
def test_parse_quantity_gives_a_finite_number_or_a_unit_error(text, kind, default):
    # the edge of the package: anything typed in must become a finite SI float or a
    # UnitError naming the field, never another exception or a NaN/inf
    bump("units:parse_examples")
    try:
        value = parse_quantity(text, kind, default_unit=default, field="x")
    except UnitError as exc:
        assert str(exc).startswith("x: ") or "x" in str(exc)
        return
    assert isinstance(value, float) and math.isfinite(value), (text, kind, value)


#: Each documented limit, written as a person would copy it from the message or the docs.
BOUNDARIES = [
    ("flow", "20 L/min", {"head": None}),
    ("flow", "20000 mL/min", {"head": None}),
    ("head", "10 m", {}),
    ("head", "0 m", {"source_pressure": "100 mmHg"}),
    ("source_pressure", "30 bar", {}),
    ("back_pressure", "1000 mmHg", {}),
    ("back_pressure", "-200 mmHg", {}),
    ("temperature", "60 degC", {}),
    ("temperature", "0 degC", {}),
    ("volume", "50 L", {}),
    ("pressure_limit", "60 bar", {"head": None, "flow": "100 mL/min"}),
]


@pytest.mark.parametrize(
    ("field", "text", "others"), BOUNDARIES, ids=[f"{f}={t}" for f, t, _ in BOUNDARIES]
)
def test_a_documented_limit_itself_is_accepted(field, text, others):
    fields = {field: text, **{k: v for k, v in others.items() if v is not None}}
    doc = scenario(**fields)
    for key, value in others.items():
        if value is None:
            doc["scenario"][0].pop(key, None)
    bump("units:boundaries_checked")
    loads_scenarios(to_toml(doc))


@pytest.mark.parametrize(
    ("field", "text"),
    [("inner_diameter", "60 mm"), ("length", "30 m"), ("inner_diameter", "0.01 mm")],
)
def test_a_documented_tube_limit_itself_is_accepted(field, text):
    part = {"type": "tube", "inner_diameter": "3 mm", "length": "1 m", field: text}
    loads_scenarios(to_toml(scenario(part=part)))


def test_a_viscosity_rising_with_temperature_is_questioned():
    # a liquid thins as it warms (Andrade's law; common practice, no source): measured
    # viscosities that rise with temperature are most likely typed in the wrong order, and
    # must be refused or warned about, not become a silent fluid
    import warnings

    from rheoline import user_fluid_from_temperatures
    from rheoline.errors import RheolineError, RheolineWarning

    pattern = r"(rise|increase|grow)s? with temperature"
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            user_fluid_from_temperatures("swapped", [20.0, 40.0], [0.025, 0.060], 870.0)
            questioned = any(
                issubclass(w.category, RheolineWarning) and re.search(pattern, str(w.message))
                for w in caught
            )
        except RheolineError as exc:
            questioned = bool(re.search(pattern, str(exc)))
    assert questioned
