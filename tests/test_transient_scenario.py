"""The time solve from scenario files: run columns, --json records, packs.

Each value of the run is checked against something outside the scenario layer: closed forms
of one compliance behind a linear line (Hagen-Poiseuille resistance with the IAPWS viscosity
of the reference library ``iapws``), the geometry of the line, and the model API
(:func:`rheoline.model.transient.simulate_infusion` called by hand with the same inputs).
"""

import csv
import json

import numpy as np
import openpyxl
import pytest

import rheoline
from rheoline import cli
from rheoline.errors import ScenarioError
from rheoline.scenario.build import build, groups
from rheoline.scenario.export import write_pack
from rheoline.scenario.files import example_path, load_scenarios
from rheoline.scenario.pack_folder import is_review_pack
from rheoline.scenario.reading import loads_scenarios
from rheoline.scenario.run import run_scenarios
from rheoline.scenario.transient_step import NULL_REASONS, RECORD_KEYS

MMHG = 133.322387415  # Pa, NIST SP 811 (2008) Appendix B.8
ML, ML_H = 1e-6, 1e-6 / 3600.0
UL_PER_MMHG = 1e-9 / MMHG
BORE, LENGTH = 0.5e-3, 1.0

OCCLUDED = """
format_version = 1
[[scenario]]
name = "occluded"
fluid = "water"
temperature = "20 degC"
flow = ["1 mL/h", "4 mL/h"]
back_pressure = "10 mmHg"
syringe_compliance = "1.5 uL/mmHg"

[scenario.occlusion]
part = 1
time = "10 min"
alarm_pressure = "300 mmHg"

[[scenario.part]]
type = "tube"
inner_diameter = "0.5 mm"
length = "1 m"

[[scenario]]
name = "steady only"
fluid = "water"
temperature = "20 degC"
flow = "1 mL/h"

[[scenario.part]]
type = "tube"
inner_diameter = "0.5 mm"
length = "1 m"
"""


@pytest.fixture(scope="module")
def occluded():
    return run_scenarios(loads_scenarios(OCCLUDED))


@pytest.fixture(scope="module")
def neonatal():
    return run_scenarios(load_scenarios(example_path("neonatal-syringe-line")))


def _resistance():
    # Hagen-Poiseuille: dp = 128 mu L Q / (pi D^4); viscosity of water at 20 degC and 1 atm
    # from IAPWS (Huber et al. 2009) through the reference library iapws
    iapws = pytest.importorskip("iapws")
    mu = iapws.IAPWS95(T=293.15, P=0.101325).mu
    return 128.0 * mu * LENGTH / (np.pi * BORE**4)


# ------------------------------------------------------------------ closed forms
def test_startup_alarm_and_bolus_follow_the_closed_forms(occluded):
    # one compliance C behind a linear line R (Re below 10 here, so the entrance and exit
    # losses are below 0.1 % of the Poiseuille loss): start-up t90 = R C ln 10; time to
    # alarm = C (p_alarm - p_running) / Q with p_running = p_back + R Q; bolus with the pump
    # stopped = C (p_alarm - p_back).  The tube's own liquid (IAPWS-95 compressibility) adds
    # 4e-17 m^3/Pa to the syringe's 1.1e-11: below the tolerances.
    t = occluded.table[occluded.table["scenario"] == "occluded"]
    r, c = _resistance(), 1.5 * UL_PER_MMHG
    q = np.array([1.0, 4.0]) * ML_H
    running = 10 * MMHG + r * q
    assert t["start-up time [min]"].to_numpy() * 60 == pytest.approx(
        [r * c * np.log(10.0)] * 2, rel=2e-3
    )
    assert t["time to alarm [min]"].to_numpy() * 60 == pytest.approx(
        c * (300 * MMHG - running) / q, rel=1e-3
    )
    assert t["bolus [mL]"].to_numpy() * ML == pytest.approx([c * 290 * MMHG] * 2, rel=1e-4)
    # the internal volume of a lumen: pi D^2 L / 4
    assert t["internal volume [mL]"].to_numpy() * ML == pytest.approx(
        [np.pi * BORE**2 * LENGTH / 4] * 2, rel=1e-12
    )


def test_a_rate_change_reaches_the_outlet_as_the_closed_form_says():
    # one compliance C behind a linear line R: a step of the set rate reaches the outlet as
    # Q_out = Q1 + (Q2 - Q1) (1 - exp(-t / RC)), so t50 = R C ln 2 and t90 = R C ln 10
    text = (
        OCCLUDED.split("[scenario.occlusion]")[0].replace('["1 mL/h", "4 mL/h"]', '"1 mL/h"')
        + 'rate_changes = [{ time = "5 min", rate = "3 mL/h" }]\n'
        + ('[[scenario.part]]\ntype = "tube"\ninner_diameter = "0.5 mm"\nlength = "1 m"\n')
    )
    run = run_scenarios(loads_scenarios(text))
    row = run.table.iloc[0]
    rc = _resistance() * 1.5 * UL_PER_MMHG
    assert row["rate change t50 [min]"] * 60 == pytest.approx(rc * np.log(2.0), rel=2e-3)
    assert row["rate change t90 [min]"] * 60 == pytest.approx(rc * np.log(10.0), rel=2e-3)
    (record,) = run.records()
    assert record["rate_change_50_s"] == pytest.approx(row["rate change t50 [min]"] * 60)
    assert "rate_change_50_s" not in record["not_computed"]


def test_more_syringe_compliance_means_longer_alarm_and_bigger_bolus():
    # Snijder et al. 2015 (the syringe's compliance sets alarm times and boluses): the trend
    one = run_scenarios(loads_scenarios(OCCLUDED)).table.iloc[:2]
    more = run_scenarios(
        loads_scenarios(OCCLUDED.replace('"1.5 uL/mmHg"', '"3 uL/mmHg"'))
    ).table.iloc[:2]
    for column in ("start-up time [min]", "time to alarm [min]", "bolus [mL]"):
        assert (more[column].to_numpy() > one[column].to_numpy()).all(), column


# ------------------------------------------------------------------ the model API
def _by_hand(sset, index):
    """The model's answer for scenario ``index`` of the neonatal example, built by hand
    from the model API (the line and fluid from the scenario builder)."""
    from rheoline.model.compliance import Compliance, SyringePump, plunger_pressure
    from rheoline.model.rate_profile import RateProfile
    from rheoline.model.transient import InjectionPort, Occlusion, simulate_infusion

    sc = sset.scenarios[index]
    (g,) = groups(sc)
    built = build(g, sset.source)
    tubing = {0: Compliance.per_metre(0.04 * UL_PER_MMHG)}
    if index == 0:
        pump = SyringePump(
            rate=g.values["flow"],
            compliance=Compliance(1.5 * UL_PER_MMHG),
            slack_volume=30e-9,
            break_loose_pressure=plunger_pressure(5.0, 26.6e-3),  # the 50 mL barrel
        )
        return simulate_infusion(
            built.line,
            built.fluid,
            pump,
            back_pressure=8 * MMHG,
            part_compliance=tubing,
            occlusion=Occlusion(part=2, time=1800.0, alarm_pressure=300 * MMHG),
        )
    flow = g.values["flow"]
    rate = RateProfile.from_points(
        [0.0, 0.0, 7200.0, 7800.0],
        np.stack([np.zeros(2), flow, flow, np.full(2, 0.5 * ML_H)]),
    )
    drug = SyringePump(
        rate=RateProfile.from_points([1800.0, 1800.0], [0.0, 0.5 * ML_H]),
        compliance=Compliance(0.8 * UL_PER_MMHG),
    )
    pump = SyringePump(rate=rate, compliance=Compliance(1.5 * UL_PER_MMHG), slack_volume=30e-9)
    port = InjectionPort(boundary=0, pump=drug, concentration=0.2)
    return simulate_infusion(
        built.line,
        built.fluid,
        pump,
        back_pressure=8 * MMHG,
        part_compliance=tubing,
        ports=(port,),
    )


def test_neonatal_run_equals_the_model_api(neonatal):
    t = neonatal.table
    first = t[t["scenario"] == "carrier start-up and occlusion"]
    res = _by_hand(neonatal.scenario_set, 0)
    assert first["start-up time [min]"].to_numpy() * 60 == pytest.approx(res.startup_time)
    assert first["time to alarm [min]"].to_numpy() * 60 == pytest.approx(res.time_to_alarm)
    assert first["bolus [mL]"].to_numpy() * ML == pytest.approx(res.bolus_volume)
    assert first["internal volume [mL]"].to_numpy() * ML == pytest.approx(res.internal_volume)
    second = t[t["scenario"] == "drug joining the carrier at a port"]
    res = _by_hand(neonatal.scenario_set, 1)
    (port,) = res.ports
    assert second["drug delay t50 [min]"].to_numpy() * 60 == pytest.approx(port.delay_50)
    assert second["drug delay t90 [min]"].to_numpy() * 60 == pytest.approx(port.delay_90)
    assert second["port dead volume [mL]"].to_numpy() * ML == pytest.approx(port.dead_volume)
    assert second["rate change t90 [min]"].to_numpy() * 60 == pytest.approx(
        res.rate_changes[1].time_90
    )
    assert second["rate change t50 [min]"].to_numpy() * 60 == pytest.approx(
        res.rate_changes[1].time_50
    )
    assert set(res.models_used) <= set(neonatal.models_used)


def test_neonatal_alarm_matches_the_steady_solve(neonatal):
    # linear_time_to_alarm's closed form with the running pressure of the steady solve (the
    # table's required pressure, back pressure included): C (p_alarm - p) / Q, C the syringe's
    # 1.5 uL/mmHg plus the microbore line's 0.04 uL/mmHg/m x 1.5 m upstream of the cannula
    t = neonatal.table[neonatal.table["scenario"] == "carrier start-up and occlusion"]
    c = (1.5 + 0.04 * 1.5) * UL_PER_MMHG
    p = t["required pressure [mmHg]"].to_numpy() * MMHG
    q = t["flow [mL/h]"].to_numpy() * ML_H
    want = c * (300 * MMHG - p) / q
    # the connector's and cannula's liquid and half the tube's compliance sit downstream of
    # the node the pressure is read at: 1 % covers them
    assert t["time to alarm [min]"].to_numpy() * 60 == pytest.approx(want, rel=1e-2)


# ------------------------------------------------------------------ records and CLI
def test_json_records_carry_every_key_null_with_a_reason(occluded, capsys):
    status = cli.main(["run", "--json", str(example_path("neonatal-syringe-line"))])
    out = capsys.readouterr().out
    assert status == 0
    records = json.loads(out.split("\n" + rheoline.CAUTION)[0])
    assert len(records) == 6
    for r in records:
        for key in RECORD_KEYS:
            assert key in r, key  # null, never absent
            assert (r[key] is None) == (key in r["not_computed"]), (r["name"], key)
    table = run_scenarios(load_scenarios(example_path("neonatal-syringe-line"))).table
    assert [r["time_to_alarm_s"] for r in records[:4]] == pytest.approx(
        (table["time to alarm [min]"].iloc[:4] * 60).tolist()
    )
    assert records[0]["not_computed"]["drug_delay_90_s"] == NULL_REASONS["no_port"]
    assert records[4]["not_computed"]["bolus_ml"] == NULL_REASONS["no_occlusion"]
    assert records[4]["drug_delay_50_s"] < records[4]["drug_delay_90_s"]
    steady = occluded.records()[-1]
    assert steady["internal_volume_ml"] == pytest.approx(np.pi * BORE**2 * LENGTH / 4 / ML)
    assert steady["startup_time_s"] is None
    assert steady["not_computed"]["startup_time_s"] == NULL_REASONS["no_time_solve"]
    assert "internal_volume_ml" not in steady["not_computed"]


def test_alarm_not_reached_is_null_and_flagged():
    # a 3000 mmHg alarm in a 1 uL/mmHg syringe at 0.01 mL/h needs 8 days: beyond the 24 h wait
    text = OCCLUDED.replace('"300 mmHg"', '"3000 mmHg"').replace(
        '["1 mL/h", "4 mL/h"]', '"0.01 mL/h"'
    )
    run = run_scenarios(loads_scenarios(text))
    (record, _) = run.records()
    assert record["time_to_alarm_s"] is None
    assert record["not_computed"]["time_to_alarm_s"] == NULL_REASONS["no_alarm"]
    assert "no alarm" in record["flags"]


# ------------------------------------------------------------------ packs
def test_pack_has_the_time_series_and_the_time_plots(neonatal, tmp_path):
    folder = write_pack(neonatal, tmp_path / "pack")
    assert is_review_pack(folder)
    manifest = json.loads((folder / "manifest.json").read_text(encoding="utf-8"))
    assert "time-series.csv" in manifest["files_sha256"]
    with open(folder / "time-series.csv", newline="", encoding="utf-8") as fh:
        rows = list(csv.reader(fh))
    assert rheoline.CAUTION in rows[0][0]
    assert rows[1][:4] == ["case", "phase", "port", "time [min]"]
    phases = {row[1] for row in rows[2:]}
    assert phases == {"run", "occluded", "release", "drug"}
    # the last delivered volume of a case's run: the set rate times the run's time less the
    # volume still stored (mass balance: delivered = pumped - stored, bounded by pumped)
    case = neonatal.table["case"].iloc[0]
    run_rows = [r for r in rows[2:] if r[0] == case and r[1] == "run"]
    t_end, delivered = float(run_rows[-1][3]), float(run_rows[-1][6])
    assert 0 < delivered < 0.5 * t_end / 60
    sheet = openpyxl.load_workbook(folder / "results.xlsx", read_only=True)["time series"]
    head = list(sheet.iter_rows(min_row=1, max_row=3, values_only=True))
    assert rheoline.CAUTION in head[0][0] and head[1][:4] == ("case", "phase", "port", "time [min]")
    assert head[2][:2] == tuple(rows[2][:2])
    page = (folder / "report.html").read_text(encoding="utf-8")
    assert "Pressure, flow and drug delivery in time" in page
    for title in ("Pressure at the syringe", "Flow at the outlet", "Drug leaving the outlet"):
        assert title in page


def test_pack_without_the_time_solve_has_no_time_series(occluded, tmp_path):
    steady = run_scenarios(loads_scenarios(OCCLUDED.split('[[scenario]]\nname = "steady')[0]))
    assert not steady.time_series.empty
    only = "format_version = 1\n[[scenario]]" + OCCLUDED.split("[[scenario]]")[2]
    folder = write_pack(run_scenarios(loads_scenarios(only)), tmp_path / "p")
    assert not (folder / "time-series.csv").exists()
    assert "time series" not in openpyxl.load_workbook(folder / "results.xlsx").sheetnames
    assert "Pressure, flow and drug delivery in time" not in (folder / "report.html").read_text(
        encoding="utf-8"
    )


def test_a_solve_error_names_the_scenario_and_field():
    # an occlusion longer than the solve is refused by the reader, naming the field
    text = OCCLUDED.replace('syringe_compliance = "1.5 uL/mmHg"', 'duration = "5 min"')
    with pytest.raises(ScenarioError, match=r"field 'occlusion.time'.*lengthen duration"):
        loads_scenarios(text)
