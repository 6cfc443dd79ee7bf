"""Comparison runs: tables with units, agreement with the line engine, rank and filter helpers."""

import math

import numpy as np
import pytest

import rheoline
from rheoline.errors import ScenarioError
from rheoline.scenario.compare import (
    HEMOLYSIS_CONCERN_STRESS,
    filter_cases,
    rank,
    run_scenarios,
    smallest_reaching,
)
from rheoline.scenario.files import example_names, example_path, load_scenarios, parse_scenarios

MMHG = 133.322387415  # Pa, NIST SP 811 (2008) Appendix B.8
ML_PER_MIN = 1e-6 / 60


def doc(*scenarios):
    return {"format_version": 1, "scenario": list(scenarios)}


def sc(name="case", parts=None, **fields):
    out = {"name": name, "fluid": "water", "temperature": "20 degC"}
    out.update(fields)
    out["part"] = parts or [{"type": "catheter", "gauge": 18}]
    return out


def run(*scenarios):
    return run_scenarios(parse_scenarios(doc(*scenarios)))


# --------------------------------------------------------------------------- table shape
def test_a_row_per_sweep_point_with_units_in_the_columns():
    r = run(sc(head=["50 cm", "1 m"], parts=[{"type": "catheter", "gauge": [14, 18, 22]}]))
    t = r.table
    assert len(t) == 6
    for col in (
        "flow [mL/min]",
        "flow [mL/h]",
        "required pressure [mmHg]",
        "max wall shear stress [Pa]",
        "dominant share [%]",
        "head [cm]",
    ):
        assert col in t.columns
    assert {"max Reynolds number", "regime", "dominant part", "hemolysis concern", "flags"} <= set(
        t
    )
    assert t["case"].tolist()[0] == "case | 50 cm, 14G"
    assert t["gauge"].tolist() == [14, 18, 22, 14, 18, 22]
    assert t["flow [mL/h]"].to_numpy() == pytest.approx(60 * t["flow [mL/min]"].to_numpy())
    # one row per part plus the outlet, for every case
    assert len(r.parts) == 6 * 2


def test_vectorized_sweep_equals_scalar_engine_solves():
    r = run(
        sc(
            head=["40 cm", "1.5 m"],
            back_pressure="8 mmHg",
            parts=[
                {"type": "tube", "inner_diameter": "3 mm", "length": "1.8 m"},
                {"type": "catheter", "gauge": [16, 20]},
            ],
        )
    )
    water = rheoline.fluid("water", temperature_c=20.0)
    for row in r.table.to_dict("records"):
        line = rheoline.Line(
            [rheoline.Tube(inner_diameter=3e-3, length=1.8), rheoline.Catheter(gauge=row["gauge"])]
        )
        res = line.solve(water, head=row["head [cm]"] / 100, back_pressure=8 * MMHG)
        assert row["flow [mL/min]"] == pytest.approx(res.flow / ML_PER_MIN, rel=1e-9)
        assert row["max Reynolds number"] == pytest.approx(res.max_reynolds, rel=1e-9)


def test_low_reynolds_narrow_tube_matches_hagen_poiseuille_by_hand():
    # Hagen-Poiseuille, Q = pi r^4 dp / (8 mu L), worked by hand:
    # r = 0.25 mm, dp = 300 mmHg = 39996.7 Pa, mu(water, 20 degC) = 1.0016 mPa s
    # (IAPWS 2008, Huber et al. 2009, Table 4), L = 2 m:
    # Q = pi * 3.906e-15 * 39996.7 / (8 * 1.0016e-3 * 2) = 3.064e-8 m^3/s = 1.838 mL/min,
    # Re = rho u D / mu = 998.2 * 0.156 * 0.5e-3 / 1.0016e-3 = 78 (laminar; exit loss ~0.03 %).
    r = run(
        sc(
            source_pressure="300 mmHg",
            parts=[{"type": "tube", "inner_diameter": "0.5 mm", "length": "2 m"}],
        )
    )
    assert r.table["flow [mL/min]"].iloc[0] == pytest.approx(1.838, rel=0.02)
    assert r.table["regime"].iloc[0] == "laminar"


def test_pump_pressure_drives_the_same_flow_back():
    pumped = run(
        sc(
            flow="120 mL/min",
            back_pressure="8 mmHg",
            parts=[{"type": "set", "kind": "gravity-set"}, {"type": "catheter", "gauge": 18}],
        )
    ).table.iloc[0]
    driven = run(
        sc(
            source_pressure=f"{float(pumped['required pressure [mmHg]'])!r} mmHg",
            back_pressure="8 mmHg",
            parts=[{"type": "set", "kind": "gravity-set"}, {"type": "catheter", "gauge": 18}],
        )
    ).table.iloc[0]
    assert driven["flow [mL/min]"] == pytest.approx(120.0, rel=1e-3)  # the 0.1 %


def test_pressure_limit_flag_agrees_with_the_numbers():
    t = run(sc(flow=["50 mL/min", "400 mL/min"], pressure_limit="300 mmHg")).table
    assert t["over pressure limit"].tolist() == [
        bool(p > 300) for p in t["required pressure [mmHg]"]
    ]
    assert t["over pressure limit"].tolist() == [False, True]
    assert "over pressure limit" in t["flags"].iloc[1]


def test_time_to_deliver_at_a_constant_drive_is_volume_over_flow():
    t = run(sc(head="1 m", volume="500 mL")).table.iloc[0]
    assert t["time to deliver [min]"] == pytest.approx(500 / t["flow [mL/min]"], rel=1e-12)


def test_hemolysis_concern_only_for_blood_above_the_threshold():
    t = run(
        sc(
            name="blood",
            fluid="whole-blood",
            temperature="37 degC",
            flow="150 mL/min",
            parts=[{"type": "catheter", "gauge": [14, 20]}],
        ),
        sc(
            name="saline",
            fluid="saline-0.9",
            flow="150 mL/min",
            parts=[{"type": "catheter", "gauge": [20]}],
        ),
    ).table
    for row in t.to_dict("records"):
        blood = row["fluid"] == "whole-blood"
        assert row["hemolysis concern"] == (
            blood and row["max wall shear stress [Pa]"] > HEMOLYSIS_CONCERN_STRESS
        )
    assert t["hemolysis concern"].any()
    assert not t[t["fluid"] == "saline-0.9"]["hemolysis concern"].any()


# --------------------------------------------------------------------------- tolerances
def _tol_run(width, seed=3):
    return run(
        sc(
            head="1 m",
            tolerance={"seed": seed, "samples": 1000},
            parts=[{"type": "catheter", "gauge": 18, "tolerance": {"inner_diameter": width}}],
        )
    ).table.iloc[0]


def test_tolerance_band_brackets_the_nominal_and_widens_with_the_tolerance():
    narrow, wide = _tol_run("2 %"), _tol_run("8 %")
    for row in (narrow, wide):
        assert row["flow p5 [mL/min]"] < row["flow [mL/min]"] < row["flow p95 [mL/min]"]
    spread = [r["flow p95 [mL/min]"] - r["flow p5 [mL/min]"] for r in (narrow, wide)]
    assert spread[1] > 2.5 * spread[0]


def test_tolerance_band_is_reproducible_with_its_seed():
    a, b, c = _tol_run("5 %", 7), _tol_run("5 %", 7), _tol_run("5 %", 8)
    assert a["flow p5 [mL/min]"] == b["flow p5 [mL/min]"]
    assert a["flow p5 [mL/min]"] != c["flow p5 [mL/min]"]


def test_laminar_bore_tolerance_follows_the_fourth_power():
    # A long laminar lumen: Q ~ d^4 (Hagen-Poiseuille), so a uniform +/-5 % bore gives
    # p95/p5 of about ((1 + 0.9 * 0.05) / (1 - 0.9 * 0.05))^4 = 1.44 (5th and 95th
    # percentiles of a uniform spread lie at -/+ 0.9 of its half-width).
    t = run(
        sc(
            source_pressure="100 mmHg",
            tolerance={"samples": 4000},
            parts=[
                {
                    "type": "tube",
                    "inner_diameter": "0.4 mm",
                    "length": "2 m",
                    "tolerance": {"inner_diameter": "5 %"},
                }
            ],
        )
    ).table.iloc[0]
    ratio = t["flow p95 [mL/min]"] / t["flow p5 [mL/min]"]
    assert ratio == pytest.approx((1.045 / 0.955) ** 4, rel=0.03)


def test_pump_tolerance_band_is_on_the_pressure():
    t = run(sc(flow="100 mL/min", tolerance={"temperature": "3 degC"})).table.iloc[0]
    assert math.isnan(t["flow p5 [mL/min]"])
    assert t["pressure p5 [mmHg]"] < t["required pressure [mmHg]"] < t["pressure p95 [mmHg]"]


# --------------------------------------------------------------------------- questions
@pytest.fixture(scope="module")
def bench():
    return run_scenarios(load_scenarios(example_path("bench-sweep"))).table


def test_smallest_catheter_reaching_a_flow_at_one_metre(bench):
    best = smallest_reaching(bench, 100.0, **{"head [cm]": 100.0})
    assert len(best) == 1
    at_1m = bench[np.isclose(bench["head [cm]"], 100.0)]
    reaching = at_1m[at_1m["flow [mL/min]"] >= 100.0]
    assert best["smallest bore [mm]"].iloc[0] == reaching["smallest bore [mm]"].min()
    # the next smaller catheter does not reach it
    smaller = at_1m[at_1m["smallest bore [mm]"] < best["smallest bore [mm]"].iloc[0]]
    assert (smaller["flow [mL/min]"] < 100.0).all() and len(smaller) > 0


def test_flow_falls_with_gauge_number(bench):
    # larger gauge number, smaller bore, less flow (common practice, no source)
    at_1m = bench[np.isclose(bench["head [cm]"], 100.0)].sort_values("gauge")
    assert np.all(np.diff(at_1m["flow [mL/min]"].to_numpy()) < 0)


def test_nothing_reaches_an_impossible_flow(bench):
    assert smallest_reaching(bench, 1e6).empty


def test_rank_and_filter(bench):
    ranked = rank(bench)
    assert ranked["flow [mL/min]"].is_monotonic_decreasing
    assert len(filter_cases(bench, gauge=18)) == 5
    with pytest.raises(ScenarioError, match="did you mean 'head \\[cm\\]'"):
        filter_cases(bench, **{"head [cn]": 100})


# --------------------------------------------------------------------------- echo
def test_inputs_table():
    # (the models a run used are its models_used; the pack lists them: tests/test_export_models.py)
    r = run(sc(head="80 cm", fluid="saline-0.9"))
    assert ("case", "head", "80 cm") in set(map(tuple, r.inputs.to_numpy()))
    assert ("case", "part[1].gauge", "18") in set(map(tuple, r.inputs.to_numpy()))


def test_records_are_json_ready_and_carry_the_caution():
    import json

    rec = run(sc(head="1 m")).records()
    text = json.dumps(rec, allow_nan=False)
    assert rheoline.CAUTION in text
    assert {"pressure_drop_pa", "reynolds", "wall_shear_stress_pa"} <= set(rec[0]["parts"][0])


def test_falling_head_time_lies_between_the_full_and_empty_bag_times():
    parts = [{"type": "set", "kind": "gravity-set"}, {"type": "catheter", "gauge": 18}]
    t = run(
        sc(name="falling", head="1 m", head_when_empty="60 cm", volume="1 L", parts=parts),
        sc(name="full", head="1 m", parts=parts),
        sc(name="empty", head="60 cm", parts=parts),
    ).table.set_index("case")
    full = 1000 / t.loc["full", "flow [mL/min]"]
    empty = 1000 / t.loc["empty", "flow [mL/min]"]
    assert full < t.loc["falling", "time to deliver [min]"] < empty


def test_a_loosening_pressure_bag_takes_longer_than_a_steady_one():
    parts = [{"type": "set", "kind": "gravity-set"}, {"type": "catheter", "gauge": 18}]
    t = run(
        sc(name="steady", head="80 cm", source_pressure="300 mmHg", volume="1 L", parts=parts),
        sc(
            name="loosening",
            head="80 cm",
            source_pressure="300 mmHg",
            source_pressure_when_empty="100 mmHg",
            volume="1 L",
            parts=parts,
        ),
        sc(
            name="leaking",
            head="80 cm",
            source_pressure="300 mmHg",
            pressure_time_constant="20 min",
            volume="1 L",
            parts=parts,
        ),
    ).table.set_index("case")
    steady = t.loc["steady", "time to deliver [min]"]
    assert t.loc["loosening", "time to deliver [min]"] > steady
    assert t.loc["leaking", "time to deliver [min]"] > steady


def test_vein_diameter_gives_the_catheter_to_vein_ratio():
    # 14G catheter, outer diameter 2.1 mm (catalogue, typical nominal), in a 4 mm vein: 0.525
    t = run(
        sc(head="1 m", vein_diameter=["4 mm", "8 mm"], parts=[{"type": "catheter", "gauge": 14}])
    ).table
    assert t["catheter-to-vein ratio [-]"].tolist() == pytest.approx([2.1 / 4, 2.1 / 8])
    assert "catheter fills 52% of the vein diameter" in t["flags"].iloc[0]
    assert "vein" not in t["flags"].iloc[1]


def test_a_vein_smaller_than_the_catheter_is_a_scenario_error():
    from rheoline.scenario.compare import check_scenarios

    sset = parse_scenarios(
        doc(sc(head="1 m", vein_diameter="1.5 mm", parts=[{"type": "catheter", "gauge": 14}])),
        source="v.toml",
    )
    with pytest.raises(ScenarioError, match="field 'vein_diameter'.*smaller than vein_diameter"):
        check_scenarios(sset)


def test_the_dominant_tolerance_is_named():
    # 22G catheter bore +/-5 % against a 1 % set bore: the catheter's bore dominates
    # (Q ~ D^4 in the laminar part that takes most of the pressure budget).
    t = run(
        sc(
            head="1 m",
            tolerance={"viscosity": "1 %", "samples": 2000},
            parts=[
                {
                    "type": "tube",
                    "label": "set",
                    "inner_diameter": "3 mm",
                    "length": "1.8 m",
                    "tolerance": {"inner_diameter": "1 %"},
                },
                {"type": "catheter", "gauge": 22, "tolerance": {"inner_diameter": "0.03 mm"}},
            ],
        )
    ).table.iloc[0]
    assert t["dominant tolerance"] == "inner_diameter of 22G catheter"


def test_tolerance_of_a_glycerol_mixture_keeps_its_mass_fraction():
    t = run(
        sc(
            fluid="glycerol-water",
            mass_fraction=[0.2, 0.5],
            head="1 m",
            tolerance={"temperature": "2 degC", "samples": 500},
        )
    ).table
    assert (t["flow p5 [mL/min]"] < t["flow [mL/min]"]).all()
    assert (t["flow [mL/min]"] < t["flow p95 [mL/min]"]).all()
    assert t["flow [mL/min]"].iloc[0] > t["flow [mL/min]"].iloc[1]


def test_a_catheter_given_by_its_measured_bore_is_that_lumen():
    by_bore = run(
        sc(head="1 m", parts=[{"type": "catheter", "inner_diameter": "1.1 mm", "length": "45 mm"}])
    ).table.iloc[0]
    water = rheoline.fluid("water", temperature_c=20.0)
    res = rheoline.Line([rheoline.Tube(inner_diameter=1.1e-3, length=0.045)]).solve(water, head=1.0)
    assert by_bore["flow [mL/min]"] == pytest.approx(res.flow / ML_PER_MIN, rel=1e-9)


def test_measured_part_with_its_bench_fluid_in_several_scenarios():
    part = {
        "type": "measured",
        "flows": ["100 mL/min", "200 mL/min"],
        "pressure_drops": ["50 mmHg", "120 mmHg"],
        "test_density": "1000 kg/m^3",
        "test_viscosity": "1 cP",
    }
    t = run(
        sc(name="a", head="1 m", parts=[part]), sc(name="b", head=["1 m", "2 m"], parts=[part])
    ).table
    assert len(t) == 3 and (t["flow [mL/min]"] > 0).all()
    assert t["flow [mL/min]"].iloc[2] > t["flow [mL/min]"].iloc[1]


def test_hemolysis_index_is_given_for_blood_only():
    t = run(
        sc(name="saline", fluid="saline-0.9", head="1 m"),
        sc(name="blood", fluid="whole-blood", temperature="37 degC", head="1 m"),
    ).table
    assert math.isnan(t["hemolysis index [%]"].iloc[0])
    assert t["hemolysis index [%]"].iloc[1] > 0


@pytest.mark.parametrize("name", example_names())
def test_every_example_runs_to_finite_positive_flows(name):
    from rheoline.scenario.compare import check_scenarios

    sset = load_scenarios(example_path(name))
    check_scenarios(sset)
    t = run_scenarios(sset).table
    assert len(t) == sset.n_points
    assert np.isfinite(t["flow [mL/min]"]).all() and (t["flow [mL/min]"] > 0).all()
    assert np.isfinite(t["required pressure [mmHg]"]).all()


OUTSIDE = "outside a correlation's range"


def test_range_flags_mark_each_sweep_point_by_its_own_temperature():
    from rheoline.model.blood import BLOOD_TEMPERATURE_RANGE_C

    temps = [0.0, 20.0, 42.0, 50.0, 60.0]
    r = run(
        sc(
            fluid="whole-blood",
            temperature=[f"{t:g} degC" for t in temps],
            source_pressure="200 mmHg",
            parts=[{"type": "catheter", "gauge": [18, 20]}],
        )
    )
    low, high = BLOOD_TEMPERATURE_RANGE_C
    flagged = r.table["flags"].str.contains(OUTSIDE, regex=False).tolist()
    expected = [not low <= t <= high for t in temps for _ in (18, 20)]
    assert flagged == expected and any(expected) and not all(expected)
    assert any("outside the validated range" in w for w in r.warnings)


def test_a_tolerance_band_reaching_outside_a_range_flags_only_its_case():
    # 41 degC +- 2 degC samples up to 43 degC, beyond the blood models' 42 degC; 30 degC does not
    r = run(
        sc(
            fluid="whole-blood",
            temperature=["30 degC", "41 degC"],
            source_pressure="200 mmHg",
            tolerance={"temperature": "2 degC", "samples": 200},
        )
    )
    flagged = r.table["flags"].str.contains(OUTSIDE, regex=False).tolist()
    assert flagged == [False, True]
    assert r.table["flow p5 [mL/min]"].notna().all()


def test_a_swept_tube_is_named_by_each_points_own_size():
    # 1 mm x 0.1 m vs 1 mm x 30 m at a 9 m head: the long point is dominated by the tube,
    # whose row must not carry the 30 m name on the 0.1 m point, nor "3-3 mm" for a size
    # that is one value in the whole sweep
    r = run(
        sc(
            head="9 m",
            parts=[
                {"type": "tube", "inner_diameter": "1 mm", "length": ["0.1 m", "30 m"]},
                {"type": "tube", "inner_diameter": "3 mm", "length": "1 m"},
                {"type": "catheter", "gauge": 18},
            ],
        )
    )
    short, long = (
        rheoline.Tube(inner_diameter=1e-3, length=0.1).name,
        rheoline.Tube(inner_diameter=1e-3, length=30.0).name,
    )
    plain = rheoline.Tube(inner_diameter=3e-3, length=1.0).name
    assert r.table["dominant part"].tolist()[1] == long
    parts = r.parts[r.parts["kind"] == "lumen"]["part"].tolist()
    assert parts == [short, plain, "18G catheter", long, plain, "18G catheter"]
    # per-row flags: a turbulent 5 mm tube at a 2 m head (Re well above 4000 at both lengths)
    t = run(
        sc(
            head="2 m",
            parts=[{"type": "tube", "inner_diameter": "5 mm", "length": ["0.5 m", "3 m"]}],
        )
    ).table
    assert t["flags"].tolist() == [
        f"turbulent: {rheoline.Tube(inner_diameter=5e-3, length=x).name}" for x in (0.5, 3.0)
    ]
    # one line, one trace per part in the pack's pressure-budget chart
    from rheoline.scenario.pack_report import pack_figures

    assert [t.name for t in pack_figures(r)[1].data][1:] == [plain, "18G catheter", "exit"]


def test_a_bag_emptying_to_the_outlet_level_is_flagged_as_never_delivering():
    # Q -> 0 as the head falls to 0, and the time for the last of the volume diverges
    # (T = V ln(h_full/h_empty) / (c (h_full - h_empty)) for a linear line)
    r = run(sc(fluid="saline-0.9", head="1 m", head_when_empty=["0 m", "20 cm"], volume="500 mL"))
    t = r.table
    assert t["time to deliver [min]"].tolist()[0] == math.inf
    assert math.isfinite(t["time to deliver [min]"].tolist()[1])
    never = [("never delivers the whole volume" in f) for f in t["flags"]]
    assert never == [True, False]
    assert "never delivers the whole volume" in " ".join(r.records()[0]["flags"])


def test_notes_are_rendered_from_the_results_conditions_one_line_per_condition():
    from rheoline.model.conditions import CONDITIONS

    r = run(
        sc(
            name="blood",
            fluid="whole-blood",
            temperature="37 degC",
            head="1 m",
            parts=[{"type": "catheter", "gauge": [14, 18]}],
        )
    )
    by_key = {}
    for note in r.notes:
        by_key.setdefault(note.key, []).append(note.text)
    # one line naming both catalogue catheters, in the parts' own words
    (catalogue,) = by_key["catalogue_size"]
    assert catalogue.startswith("14G catheter, 18G catheter: typical catalogue bore")
    assert by_key["non_newtonian"] == [
        f"{CONDITIONS['non_newtonian'].words}; {CONDITIONS['non_newtonian'].meaning}"
    ]
    # the rows' own flags are not repeated as notes
    assert not {"turbulent", "transitional", "over_pressure_limit", "hemolysis_concern"} & set(
        by_key
    )
    saline = run(sc(name="saline", fluid="saline-0.9", head="1 m"))
    assert not {"non_newtonian", "blood_as_newtonian"} & {n.key for n in saline.notes}


def test_models_used_are_those_the_results_used():
    saline = run(sc(fluid="saline-0.9", head="1 m")).models_used
    assert {"hagen-poiseuille", "laliberte-2007", "nist-sp811"} <= set(saline)
    assert not {"giersiepen-1990", "pries-1992", "leverett-1972"} & set(saline)
    assert "saltelli-2008" not in saline and "catheter-vein-ratio" not in saline
    blood = run(
        sc(
            fluid="whole-blood",
            temperature="37 degC",
            head="1 m",
            vein_diameter="6 mm",
            tolerance={"temperature": "1 degC", "samples": 200},
        )
    ).models_used
    assert {"giersiepen-1990", "saltelli-2008", "catheter-vein-ratio"} <= set(blood)
    assert len(blood) == len(set(blood))


# --------------------------------------------------------------------------- the run's result
def test_the_run_result_is_frozen_data_with_structured_notes():
    import dataclasses

    from rheoline.scenario.compare import Note

    r = run(
        sc(name="cold blood", fluid="whole-blood", temperature=["0 degC", "37 degC"], head="1 m")
    )
    with pytest.raises(dataclasses.FrozenInstanceError):
        r.table = None
    assert r.notes and all(isinstance(n, Note) and n.scenario == "cold blood" for n in r.notes)
    assert r.warnings == tuple(dict.fromkeys(f"cold blood: {n.text}" for n in r.notes))
    # each case's flags are data; the table joins them
    assert set(r.flags) == set(r.table["case"])
    for case, text in zip(r.table["case"], r.table["flags"], strict=True):
        assert "; ".join(r.flags[case]) == text


def test_a_label_holding_the_flag_separator_stays_one_flag():
    # "a; b" labels a part that runs turbulent: its flag names it whole
    rec = run(
        sc(
            head="2 m",
            parts=[{"type": "tube", "label": "a; b", "inner_diameter": "5 mm", "length": "0.5 m"}],
        )
    ).records()
    assert rec[0]["flags"] == ["turbulent: a; b"]


def test_cases_that_share_a_label_keep_unique_keys_and_their_own_parts():
    # scenario "a | 1 m" and scenario "a" swept over one head of 1 m label their cases alike
    r = run(
        sc(name="a | 1 m", head="1 m", parts=[{"type": "catheter", "gauge": 14}]),
        sc(name="a", head=["1 m"], parts=[{"type": "catheter", "gauge": 22}]),
        sc(name="b", head="1 m", parts=[{"type": "catheter", "gauge": [18, "18G"]}]),
    )
    cases = r.table["case"].tolist()
    assert cases == ["a | 1 m", "a | 1 m #2", "b | 18G", "b | 18G #2"]
    by_case = {rec["name"]: [p["part"] for p in rec["parts"]] for rec in r.records()}
    assert by_case["a | 1 m"] == ["14G catheter", "exit"]
    assert by_case["a | 1 m #2"] == ["22G catheter", "exit"]
    assert r.parts.groupby("case").size().tolist() == [2, 2, 2, 2]


# --------------------------------------------------------------------------- within limits
def test_a_pump_case_over_its_pressure_limit_does_not_reach_a_flow():
    demo = run_scenarios(load_scenarios(example_path("rapid-transfusion-cart"))).table
    pump = demo[demo["scenario"] == "pump 150 mL/min, 300 mmHg limit"]
    over = pump[pump["over pressure limit"].astype(bool)]
    assert len(over) and (over["required pressure [mmHg]"] > 300).all()  # the demo's point
    best = smallest_reaching(demo, 100.0, scenario="pump 150 mL/min, 300 mmHg limit")
    assert len(best) == 1 and not best["over pressure limit"].item()
    assert best["required pressure [mmHg]"].item() <= 300
    # the smallest bore within the limit: every smaller pump case is over it
    smaller = pump[pump["smallest bore [mm]"] < best["smallest bore [mm]"].item()]
    assert len(smaller) and smaller["over pressure limit"].all()
    # a limit nothing meets: no case reaches any flow
    t = run(
        sc(
            flow="150 mL/min",
            pressure_limit="10 mmHg",
            parts=[{"type": "catheter", "gauge": [20, 22]}],
        )
    ).table
    assert t["over pressure limit"].all() and smallest_reaching(t, 1.0).empty


def test_rank_puts_cases_outside_their_limits_last_and_keeps_every_row():
    t = run(
        sc(
            flow=["50 mL/min", "300 mL/min"],
            pressure_limit="300 mmHg",
            parts=[{"type": "catheter", "gauge": 18}],
        )
    ).table
    assert t["over pressure limit"].tolist() == [False, True]
    ranked = rank(t)
    assert ranked["case"].tolist() == [t["case"].iloc[0], t["case"].iloc[1]]
    assert rank(t, within=False)["case"].iloc[0] == t["case"].iloc[1]  # plain sort
    assert len(filter_cases(t)) == 1 and len(filter_cases(t, within=False)) == 2
