"""The run's model band (issue 13): the band columns in the table, the summary, the JSON
records; the scenario file's switch; blood's alternatives chosen from the validation data."""

from __future__ import annotations

import math
import warnings

import numpy as np
import pytest

import rheoline
from rheoline.errors import ScenarioError
from rheoline.model.provenance import REGISTRY
from rheoline.scenario.files import dump_scenarios
from rheoline.scenario.model_band import (
    BAND_COLUMNS,
    BLOOD_TARGET,
    DRIVER_WORDS,
    qualified_blood_models,
)
from rheoline.scenario.reading import example_path, load_scenarios, loads_scenarios
from rheoline.scenario.run import TABLE_COLUMNS, run_scenarios

DOC = """
format_version = 1
[[scenario]]
name = "bag"
fluid = "{fluid}"
temperature = "37 degC"
{drive}
{switch}
[[scenario.part]]
type = "tube"
label = "set"
inner_diameter = "3 mm"
length = "1.8 m"
[[scenario.part]]
type = "catheter"
gauge = 18
"""


def _run(fluid="saline-0.9", drive='head = ["50 cm", "100 cm"]', switch=""):
    text = DOC.format(fluid=fluid, drive=drive, switch=switch)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return run_scenarios(loads_scenarios(text, "band.toml"))


def test_band_columns_sit_after_the_tolerance_band():
    i = TABLE_COLUMNS.index("dominant tolerance")
    assert tuple(TABLE_COLUMNS[i + 1 : i + 1 + len(BAND_COLUMNS)]) == BAND_COLUMNS


def test_drive_band_brackets_the_flow_and_names_its_driver():
    run = _run()
    t = run.table
    low, flow, high = (
        t[c].to_numpy()
        for c in ("flow model low [mL/min]", "flow [mL/min]", "flow model high [mL/min]")
    )
    assert np.all(low <= flow) and np.all(flow <= high) and np.all(low < flow)
    assert set(t["model band driver"]) <= set(DRIVER_WORDS.values())
    assert t["pressure model low [mmHg]"].isna().all()
    # the band's models are the run's models too (the pack lists them from the registry)
    assert {"hooper-1981", "hooper-1988"} <= set(run.models_used)
    assert set(run.models_used) <= set(REGISTRY)


def test_band_equals_the_model_layer_band_of_the_same_line():
    from rheoline import Catheter, Line, Tube
    from rheoline.model.model_band import model_band

    run = _run(drive='head = "100 cm"')
    line = Line([Tube(inner_diameter=3e-3, length=1.8, name="set"), Catheter(gauge=18)])
    band = model_band(line, rheoline.fluid("saline-0.9", temperature_c=37), head=1.0)
    t = run.table.iloc[0]
    assert t["flow model low [mL/min]"] == pytest.approx(band.low * 6e7, rel=1e-9)
    assert t["flow model high [mL/min]"] == pytest.approx(band.high * 6e7, rel=1e-9)
    assert t["model band driver"] == DRIVER_WORDS[band.driver]


def test_pump_band_is_a_pressure_band():
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        run = run_scenarios(load_scenarios(example_path("syringe-pump")))
    t = run.table
    assert t["flow model low [mL/min]"].isna().all()
    low, req, high = (
        t[c].to_numpy()
        for c in (
            "pressure model low [mmHg]",
            "required pressure [mmHg]",
            "pressure model high [mmHg]",
        )
    )
    assert np.all(low <= req + 1e-9) and np.all(req <= high) and np.all(high > req)


def test_the_file_switches_the_band_off_and_the_writer_keeps_it():
    run = _run(switch="model_band = false")
    t = run.table
    for column in BAND_COLUMNS[:4]:
        assert t[column].isna().all()
    assert (t["model band driver"] == "").all()
    assert "hooper-1988" not in run.models_used
    sset = run.scenario_set
    assert sset.scenarios[0].model_band is False
    text = dump_scenarios(sset)
    assert "model_band = false" in text
    assert loads_scenarios(text, "again.toml") == sset
    # on by default, and the writer says nothing then
    assert "model_band" not in dump_scenarios(_run().scenario_set)


@pytest.mark.parametrize("bad", ['"no"', "0", '["false"]'])
def test_a_switch_that_is_not_true_or_false_is_refused(bad):
    text = DOC.format(fluid="water", drive='head = "1 m"', switch=f"model_band = {bad}")
    with pytest.raises(ScenarioError, match="model_band.*must be true or false") as info:
        loads_scenarios(text, "bad.toml")
    assert info.value.field == "model_band"


def test_summary_and_records_carry_the_band():
    run = _run()
    summary = run.summary()
    assert "flow model band [mL/min]" in summary.columns
    assert "model band led by" in summary.columns
    record = run.records()[0]
    assert record["flow_model_low_ml_min"] == pytest.approx(
        run.table["flow model low [mL/min]"].iloc[0]
    )
    assert record["required_pressure_model_low_mmhg"] is None
    assert record["model_band_driver"] in DRIVER_WORDS.values()


def test_blood_band_uses_the_models_that_meet_the_accuracy_target():
    # the qualified models are those whose whole-blood predictions (hematocrit 0.2-0.6,
    # 10-200 1/s, 37 degC; Wells & Merrill 1962 as digitized) meet 15 % median and 35 %
    # largest error: recomputed here from the validation predictions
    from rheoline.validation import TARGETS, load_datasets, predict_row

    target = next(t for t in TARGETS if t.key == BLOOD_TARGET)
    errors = {}
    for d in load_datasets():
        for row in d.rows:
            if row.recalled or not target.selects(row):
                continue
            for p in predict_row(row):
                name = "carreau" if p.default else p.variant
                errors.setdefault(name, []).append(abs(p.error))
    meets = {
        m
        for m, e in errors.items()
        if np.median(e) <= target.median_limit and max(e) <= target.max_limit
    }
    assert set(qualified_blood_models()) == meets
    assert "carreau" in meets and "newtonian" not in meets
    run = _run(fluid="whole-blood")
    others = meets - {"carreau"}
    assert others and others <= set(run.models_used)
    assert not {"casson", "power-law"} & (set(run.models_used) - meets)
    saline = _run()
    assert not others & set(saline.models_used)
    assert set(run.models_used) <= set(REGISTRY)


def test_no_forward_flow_has_a_flat_band():
    run = _run(drive='head = "0 cm"')
    t = run.table.iloc[0]
    assert t["flow [mL/min]"] == 0.0
    assert t["flow model low [mL/min]"] == 0.0 == t["flow model high [mL/min]"]
    assert t["model band driver"] == ""
    assert not math.isnan(t["flow model low [mL/min]"])
