"""Reliability: answers that would be wrong without a word (issue 12).

Each test holds one class: non-physical inputs are refused with the field named, and
answers outside what the model can vouch for carry a condition (an array on the result)
and a flag in the table, never a bare number.
"""

from __future__ import annotations

import contextlib
import io
import json
import math

import numpy as np
import pytest

import rheoline
from rheoline import cli
from rheoline.errors import RheolineError, ScenarioError
from rheoline.model.conditions import CONDITIONS, IMPLAUSIBLE_PRESSURE, IMPLAUSIBLE_VELOCITY
from rheoline.model.line import Line
from rheoline.model.parts import Catheter, MeasuredPart, Needle, Tube
from rheoline.scenario.files import loads_scenarios
from rheoline.scenario.run import run_scenarios
from rheoline.units import ML_PER_MIN, MMHG

SALINE = rheoline.fluid("saline-0.9")


def _cli(argv):
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        status = cli.main(argv)
    return status, out.getvalue(), err.getvalue()


def _scenario(body, fluid="saline-0.9", parts='[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'):
    return f'format_version = 1\n[[scenario]]\nname = "s"\nfluid = "{fluid}"\n{body}\n{parts}'


_BENCH = (
    '[[scenario.part]]\ntype = "tube"\ninner_diameter = "3 mm"\nlength = "1 m"\n'
    '[[scenario.part]]\ntype = "measured"\nlabel = "filter"\n'
    'flows = ["100 mL/min", "150 mL/min", "200 mL/min"]\n'
    "pressure_drops = {drops}\n"
)


# --------------------------------------------------------------------------- bench data
@pytest.mark.parametrize(
    ("drops", "words"),
    [
        ('["0 mmHg", "0 mmHg", "0 mmHg"]', "all 0"),
        ('["120 mmHg", "80 mmHg", "50 mmHg"]', "fall as the flow rises"),
    ],
)
def test_non_physical_bench_data_is_refused(drops, words):
    with pytest.raises(ScenarioError, match=words) as info:
        from rheoline.scenario.build import check_scenarios

        check_scenarios(
            loads_scenarios(_scenario('head = "1 m"', parts=_BENCH.format(drops=drops)))
        )
    assert info.value.field == "part[2].pressure_drops"
    q = np.array([100.0, 150.0, 200.0]) * ML_PER_MIN
    dp = np.array([float(v) for v in json.loads(drops.replace(" mmHg", ""))]) * MMHG
    with pytest.raises(RheolineError, match=words):
        MeasuredPart(flows=q, pressure_drops=dp)


def test_repeated_bench_points_at_one_flow_may_differ():
    part = MeasuredPart(flows=[1e-6, 1e-6, 2e-6], pressure_drops=[100.0, 140.0, 300.0])
    assert part.a > 0


def test_a_measured_part_far_outside_its_bench_flows_is_flagged():
    """100-200 mL/min bench data used at 20 L/min (a pump) and at 150 mL/min."""
    text = _scenario(
        'flow = ["150 mL/min", "20 L/min"]',
        parts=_BENCH.format(drops='["20 mmHg", "35 mmHg", "55 mmHg"]'),
    )
    run = run_scenarios(loads_scenarios(text))
    flags = run.table["flags"].tolist()
    assert "measured part used outside its bench flows" not in flags[0]
    assert "measured part used outside its bench flows" in flags[1]
    part = MeasuredPart(flows=np.array([100.0, 200.0]) * ML_PER_MIN, pressure_drops=[2e3, 5e3])
    res = Line([Tube(inner_diameter=3e-3, length=1.0), part]).solve(
        SALINE, flow=np.array([50.0, 150.0, 20_000.0]) * ML_PER_MIN
    )
    assert res.conditions["measured_extrapolated"].tolist() == [True, False, True]
    assert res.part_conditions["measured_extrapolated"][0].tolist() == [False] * 3
    assert CONDITIONS["measured_extrapolated"].per_part
    assert any("outside its bench flows" in f for f in res.flags)


# --------------------------------------------------------------------------- implausible results
def test_a_result_beyond_physical_plausibility_is_flagged():
    """20 L/min forced through a 27G needle: a mean velocity of thousands of km/s and a
    pressure of 10^19 mmHg carried only a "turbulent" flag."""
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Needle(gauge=27)])
    res = line.solve(SALINE, flow=np.array([1.0, 20_000.0]) * ML_PER_MIN)
    assert np.nanmax(res.part_mean_velocity[:, 1]) > IMPLAUSIBLE_VELOCITY
    assert res.required_pressure[1] > IMPLAUSIBLE_PRESSURE
    assert res.conditions["implausible"].tolist() == [False, True]
    assert CONDITIONS["implausible"].severity == "fault"
    text = _scenario(
        'flow = ["1 mL/min", "20 L/min"]',
        parts='[[scenario.part]]\ntype = "needle"\ngauge = 27\n',
    )
    flags = run_scenarios(loads_scenarios(text)).table["flags"].tolist()
    assert "implausible" not in flags[0] and "physically implausible" in flags[1]


def test_ordinary_lines_are_not_flagged_implausible():
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=14)])
    res = line.solve(SALINE, source_pressure=np.array([0.0, 300.0, 1000.0]) * MMHG, head=1.0)
    assert not res.conditions["implausible"].any()


# --------------------------------------------------------------------------- contradictions
def test_a_falling_head_that_rises_is_refused():
    text = _scenario('head = "1 m"\nhead_when_empty = "1.5 m"\nvolume = "500 mL"')
    from rheoline.scenario.build import check_scenarios

    with pytest.raises(ScenarioError, match="is above head") as info:
        check_scenarios(loads_scenarios(text))
    assert info.value.field == "head_when_empty"
    from rheoline.model.delivery import falling_head_delivery_time, pressure_bag_delivery_time

    line = Line([Catheter(gauge=18)])
    with pytest.raises(RheolineError, match="head_empty 1.5 m is above head_full 1 m"):
        falling_head_delivery_time(line, SALINE, 5e-4, head_full=1.0, head_empty=1.5)
    with pytest.raises(RheolineError, match="pressure_empty .* is above pressure_full"):
        pressure_bag_delivery_time(line, SALINE, 5e-4, 300 * MMHG, pressure_empty=400 * MMHG)
    cuff = _scenario(
        'source_pressure = "200 mmHg"\nsource_pressure_when_empty = "300 mmHg"\nvolume = "1 L"'
    )
    with pytest.raises(ScenarioError, match="300 mmHg is above source_pressure 200 mmHg"):
        check_scenarios(loads_scenarios(cuff))


# --------------------------------------------------------------------------- case keys
def test_cases_that_share_a_label_keep_their_own_parts_everywhere(tmp_path):
    """Repeated sweep values give cases the same label; each case key is unique and the
    parts rows, the JSON records and the pack's parts.csv follow the key."""
    text = _scenario(
        'head = "1 m"', parts='[[scenario.part]]\ntype = "catheter"\ngauge = [18, 22, 18]\n'
    )
    path = tmp_path / "dup.toml"
    path.write_text(text)
    run = run_scenarios(loads_scenarios(text))
    keys = run.table["case"].tolist()
    assert len(set(keys)) == 3 and keys[2].endswith("#2")
    status, out, _ = _cli(["run", str(path), "--json"])
    records = json.loads(out)
    assert [r["name"] for r in records] == keys
    assert [r["parts"][0]["part"] for r in records] == [
        "18G catheter",
        "22G catheter",
        "18G catheter",
    ]
    status, _, _ = _cli(["run", str(path), "--out", str(tmp_path / "pack")])
    import pandas as pd

    parts = pd.read_csv(tmp_path / "pack" / "parts.csv", skiprows=1)
    lumens = parts[parts["kind"] == "lumen"]
    assert lumens.groupby("case")["part"].apply(list).to_dict() == {
        keys[0]: ["18G catheter"],
        keys[1]: ["22G catheter"],
        keys[2]: ["18G catheter"],
    }
    # the report's charts: one bar per case key (a repeated label would stack two cases'
    # drops on one bar), each case's own catheter and drop
    from rheoline.scenario.pack_report import _budget_figure, _flow_figure

    flow_bars = _flow_figure(run.table).data[0]
    assert list(flow_bars.y) == keys
    assert list(flow_bars.x) == run.table["flow [mL/min]"].tolist()
    drops = {}
    for trace in _budget_figure(run, run.table).data:
        assert len(set(trace.y)) == len(trace.y), trace.name  # no case key twice in a trace
        for case, part, drop in zip(trace.y, trace.hovertext, trace.x, strict=True):
            drops.setdefault(case, []).append((part, drop))
    rows = run.parts
    for case in keys:
        mine = rows[rows["case"] == case]
        assert sorted(drops[case]) == sorted(
            zip(mine["part"], mine["pressure drop [mmHg]"], strict=True)
        )
    assert sorted(drops[keys[0]]) == sorted(drops[keys[2]]) != sorted(drops[keys[1]])


# --------------------------------------------------------------------------- hemolysis
@pytest.mark.parametrize("name", ["saline-0.9", "dextrose-5", "water", "lactated-ringers"])
def test_no_hemolysis_index_for_fluids_without_red_cells(name, tmp_path):
    res = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18)]).solve(
        rheoline.fluid(name), head=1.0
    )
    assert math.isnan(float(res.hemolysis_index))
    assert np.isnan(res.part_hemolysis_index).all()
    text = _scenario('head = "1 m"', fluid=name)
    run = run_scenarios(loads_scenarios(text))
    assert run.table["hemolysis index [%]"].isna().all()
    path = tmp_path / "f.toml"
    path.write_text(text)
    records = json.loads(_cli(["run", str(path), "--json"])[1])
    assert records[0]["hemolysis_index_percent"] is None
    blood = Line([Catheter(gauge=18)]).solve(rheoline.fluid("whole-blood"), head=1.0)
    assert float(blood.hemolysis_index) > 0  # the index is there where there are red cells


@pytest.mark.parametrize("name", ["saline-0.9", "dextrose-5"])
def test_the_apps_line_view_shows_no_hemolysis_index_without_red_cells(name):
    pytest.importorskip("ipywidgets")
    from rheoline.widgets.line_view import LineView
    from rheoline.widgets.parts_editor import part_spec

    view = LineView(parts=[part_spec("catheter", gauge=18)], fluid=name, temperature_c=22.0)
    shown = view.results.value
    assert "hemolysis index <b>n/a</b> (no red cells)" in shown
    assert "Giersiepen" not in shown  # no screening number, nor its model, for this fluid
    blood = LineView(parts=[part_spec("catheter", gauge=18)], fluid="whole-blood")
    assert "n/a</b> (no red cells)" not in blood.results.value
    assert "Giersiepen 1990" in blood.results.value


# --------------------------------------------------------------------------- bare tolerances
@pytest.mark.parametrize("written", ["0.05", '"0.05"', "2"])
def test_a_bare_tolerance_number_is_refused_with_both_spellings(written):
    text = _scenario(
        'head = "1 m"',
        parts='[[scenario.part]]\ntype = "tube"\ninner_diameter = "1 mm"\nlength = "1 m"\n'
        f"tolerance = {{ inner_diameter = {written} }}\n",
    )
    with pytest.raises(ScenarioError, match="ambiguous") as info:
        loads_scenarios(text)
    assert info.value.field == "part[1].tolerance.inner_diameter"
    number = written.strip('"')
    assert f"'{number} mm'" in str(info.value) and f"'{float(number) * 100:g} %'" in str(info.value)


# --------------------------------------------------------------------------- fluid options
def test_every_option_rheoline_fluids_lists_is_accepted_in_files():
    from rheoline.scenario.compare import fluid_table
    from rheoline.scenario.schema import SCENARIO_FIELDS

    listed = {
        o.strip() for opts in fluid_table()["options"] for o in opts.split(",") if o.strip() != "-"
    }
    assert {"blood_model", "albumin_concentration", "target_viscosity"} <= listed
    assert listed <= set(SCENARIO_FIELDS)
    text = (
        'format_version = 1\n[[scenario]]\nname = "b"\nfluid = "whole-blood"\n'
        'blood_model = "casson"\nhead = "1 m"\n[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
        '[[scenario]]\nname = "a"\nfluid = "albumin-5"\nalbumin_concentration = "40 g/L"\n'
        'head = "1 m"\n[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
        '[[scenario]]\nname = "g"\nfluid = "glycerol-water"\ntarget_viscosity = "3.5 cP"\n'
        'head = "1 m"\n[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
    )
    sset = loads_scenarios(text)
    run = run_scenarios(sset)
    assert run.table["flow [mL/min]"].notna().all()
    from rheoline.scenario.build import build_fluid, groups

    built = [build_fluid(groups(sc)[0], "") for sc in sset.scenarios]
    assert built[0].rheology.name == "casson"
    assert built[1].recipe.options["concentration"] == pytest.approx(40.0)
    assert built[2].viscosity() == pytest.approx(3.5e-3, rel=1e-6)
    from rheoline.scenario.writing import dump_scenarios

    assert loads_scenarios(dump_scenarios(sset)).scenarios == sset.scenarios


@pytest.mark.parametrize(
    ("line", "field", "words"),
    [
        ('blood_model = "cason"', "blood_model", "did you mean 'casson'"),
        ('albumin_concentration = "40 g/L"', "albumin_concentration", "has no option"),
        ('target_viscosity = "3.5 cP"', "target_viscosity", "has no option"),
    ],
)
def test_fluid_options_are_validated(line, field, words):
    from rheoline.scenario.build import check_scenarios

    fluid = "whole-blood" if field == "blood_model" else "saline-0.9"
    with pytest.raises(ScenarioError, match=words) as info:
        check_scenarios(loads_scenarios(_scenario(f'head = "1 m"\n{line}', fluid=fluid)))
    assert info.value.field == field


# --------------------------------------------------------------------------- Python API
def test_parts_and_fluids_keep_copies_of_the_callers_arrays():
    d = np.array([1e-3, 2e-3])
    t = np.array([20.0, 30.0])
    h = np.array([0.3, 0.4])
    q, dp = np.array([1e-6, 2e-6]), np.array([100.0, 300.0])
    tube = Tube(inner_diameter=d, length=1.0)
    saline = rheoline.fluid("saline-0.9", temperature_c=t)
    blood = rheoline.fluid("whole-blood", hematocrit=h)
    part = MeasuredPart(flows=q, pressure_drops=dp)
    before = Line([tube]).solve(saline, head=1.0).flow.copy()
    d[:], t[:], h[:], q[:], dp[:] = -1.0, 99.0, 0.99, -1.0, -5.0
    assert tube.inner_diameter.tolist() == [1e-3, 2e-3]
    assert saline.temperature_c.tolist() == [20.0, 30.0]
    assert blood.hematocrit.tolist() == [0.3, 0.4]
    assert blood.recipe.options["hematocrit"].tolist() == [0.3, 0.4]
    assert part.flows.tolist() == [1e-6, 2e-6] and part.pressure_drops.tolist() == [100.0, 300.0]
    np.testing.assert_array_equal(Line([tube]).solve(saline, head=1.0).flow, before)
    for frozen in (tube.inner_diameter, saline.temperature_c, part.flows, blood.hematocrit):
        with pytest.raises(ValueError, match="read-only"):
            frozen[0] = 5.0


@pytest.mark.parametrize(
    ("kwargs", "field"),
    [
        ({"inner_diameter": 3, "length": 1.8}, "inner_diameter"),
        ({"inner_diameter": 3e-3, "length": 1800}, "length"),
    ],
)
def test_millimetres_typed_for_metres_get_the_unit_hint(kwargs, field):
    with pytest.raises(RheolineError, match="pass metres .1 mm = 1e-3 m., not millimetres") as info:
        Tube(**kwargs)
    assert info.value.field == field


@pytest.mark.parametrize(
    ("head", "words"), [(True, "yes/no value"), (None, "head is None"), ([1.0, None], "holds None")]
)
def test_a_head_that_is_not_a_number_gets_a_clear_message(head, words):
    line = Line([Catheter(gauge=18)])
    with pytest.raises(RheolineError, match=words) as info:
        line.solve(SALINE, head=head)
    assert info.value.field == "head"
