"""The time solve's faster paths give the full solve's numbers: the run from rest kept for a
solve that differs only in its occlusion (rheoline.model.transient_reuse), and a set rate or
a valve that changes at an interval's end taken there as its left limit.

The reference here is the same engine solving afresh; the physics of every figure is checked
against closed forms and published data in test_transient.py and test_transient_stiff.py."""

import numpy as np
import pytest

from rheoline.model import line_dynamics as dyn
from rheoline.model import transient_reuse
from rheoline.model.compliance import Compliance, SyringePump
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import Line
from rheoline.model.parts import Tube
from rheoline.model.rate_profile import RateProfile
from rheoline.model.transient import Occlusion, simulate_infusion

ML_H = 1e-6 / 3600.0
MMHG = 133.322  # NIST SP 811
WATER = newtonian_fluid("test water", viscosity=1.0e-3, density=1000.0)
KEY = ("a demo line", 0)  # names the line, fluid and pump of _solve


def _solve(alarm_mmhg=300.0, part=0, occluded_at=1800.0, release=None, key=None, break_mmhg=0.0):
    # demo values: a microbore extension and a fine tail, a 1.5 uL/mmHg syringe whose rate
    # doubles at 20 min
    line = Line([Tube(inner_diameter=0.5e-3, length=1.5), Tube(inner_diameter=0.3e-3, length=0.2)])
    pump = SyringePump(
        rate=RateProfile.steps([0.0, 1200.0], [1.0 * ML_H, 2.0 * ML_H]),
        compliance=Compliance(1.5e-9 / MMHG),
        break_loose_pressure=break_mmhg * MMHG,
    )
    occlusion = Occlusion(
        part=part, time=occluded_at, alarm_pressure=alarm_mmhg * MMHG, release_time=release
    )
    return simulate_infusion(line, WATER, pump, occlusion=occlusion, reuse_key=key)


def _figures(result):
    occ = result.occlusion
    figures = {
        "startup": result.startup_time,
        "time_to_alarm": occ.time_to_alarm,
        "bolus": occ.bolus_volume,
        "delivered": occ.bolus_delivered,
        "peak": occ.bolus_peak_flow,
        "release_90": occ.bolus_time_90,
    }
    for k, change in enumerate(result.rate_changes):
        figures[f"change{k}_50"] = change.time_50
        figures[f"change{k}_90"] = change.time_90
    for name, series in (("run", result.run), ("occ", occ.occluded), ("rel", occ.release)):
        figures[f"{name}_time"] = series.time
        figures[f"{name}_pressure"] = series.source_pressure
        figures[f"{name}_flow"] = series.outlet_flow
    return figures


def _assert_same(a, b):
    fa, fb = _figures(a), _figures(b)
    for name in fa:
        np.testing.assert_allclose(
            np.asarray(fa[name], float), np.asarray(fb[name], float), rtol=1e-9, err_msg=name
        )
    assert a.conditions.keys() == b.conditions.keys()
    for name in a.conditions:
        np.testing.assert_array_equal(a.conditions[name], b.conditions[name], err_msg=name)


@pytest.mark.parametrize(
    "edit",
    [
        {"alarm_mmhg": 250.0},
        {"part": 1},
        {"release": 3600.0},
    ],
)
def test_a_kept_run_gives_the_fresh_solve(edit):
    transient_reuse.clear()
    _solve(key=KEY)  # the run kept
    reused = _solve(key=KEY, **edit)
    assert len(transient_reuse._KEPT) == 1  # the same run served both
    _assert_same(reused, _solve(**edit))


def test_a_run_that_differs_is_solved_again():
    transient_reuse.clear()
    _solve(key=KEY)
    moved = _solve(key=KEY, occluded_at=2400.0)  # the run ends elsewhere: another key
    assert len(transient_reuse._KEPT) == 2
    _assert_same(moved, _solve(occluded_at=2400.0))
    assert moved.occlusion.time == 2400.0


def test_run_key_names_what_the_run_takes_from_the_occlusion():
    tables = [dyn.FlowTable(np.log([1e-12, 1e-9]), np.log([[1.0], [1e3]]))]
    key = transient_reuse.run_key("k", 1, 1800.0, 5400.0, 1e-6, True, tables)
    assert key == transient_reuse.run_key("k", 1, 1800.0, 5400.0, 1e-6, True, tables)
    assert key != transient_reuse.run_key("k", 1, 1800.0, 6000.0, 1e-6, True, tables)
    wider = [dyn.FlowTable(np.log([1e-12, 1e-7]), np.log([[1.0], [1e5]]))]
    assert key != transient_reuse.run_key("k", 1, 1800.0, 5400.0, 1e-6, True, wider)
    assert transient_reuse.run_key(None, 1, 1800.0, 5400.0, 1e-6, True, tables) is None
    many = transient_reuse.REUSED_SCENARIOS + 1
    assert transient_reuse.run_key("k", many, 1800.0, 5400.0, 1e-6, True, tables) is None


def test_a_pump_starting_at_a_breakpoint_is_not_seen_before_it():
    # A line at rest until the stopper breaks loose: the interval before the break ends on
    # it, and its last step takes the valve as still shut (the left limit); the start-up is
    # found at the break itself, where the surge crosses 90 % of the set rate at once.
    steps = []
    step_done = dyn._step_done

    def counted(net, solver, trackers, recorder, end=np.inf):
        steps.append((solver.t_old, solver.t, end))
        return step_done(net, solver, trackers, recorder, end)

    dyn._step_done = counted
    try:
        r = _solve(break_mmhg=100.0)
    finally:
        dyn._step_done = step_done
    t_break = r.startup_time  # the surge crosses 90 % at the break
    ends = {end for _, _, end in steps}
    assert any(abs(end - t_break) <= 1e-9 * t_break for end in ends)
    before = [s for s in steps if s[2] == min(ends, key=lambda e: abs(e - t_break))]
    # the steps up to the break: the solver's growth from its first step, none shrinking
    # towards the break (they were some 20 more, each halving, when the valve was seen open)
    widths = [b - a for a, b, _ in before]
    assert widths[-1] >= 0.1 * max(widths)


def _example_scenario():
    from rheoline.scenario.files import example_path, load_scenarios

    scenarios = load_scenarios(example_path("neonatal-syringe-line")).scenarios
    return next(sc for sc in scenarios if sc.transient and sc.transient.occlusion)


def _with_alarm(sc, mmhg):
    from dataclasses import replace

    from rheoline.scenario.values import Value

    spec = sc.transient
    alarm = Value(mmhg * MMHG, f"{mmhg:g} mmHg")
    return replace(sc, transient=spec.with_occlusion(replace(spec.occlusion, alarm_pressure=alarm)))


def test_the_scenario_layer_names_the_run_by_all_but_the_occlusion():
    from rheoline.scenario.build import groups
    from rheoline.scenario.transient_step import _reuse_key

    sc = _example_scenario()
    other = _with_alarm(sc, 250.0)
    key = _reuse_key(groups(sc)[0])
    assert key == _reuse_key(groups(other)[0])
    assert key[0].transient.occlusion is None
    from rheoline.scenario.values import Value

    higher = sc.with_field("back_pressure", Value(15 * MMHG, "15 mmHg"))
    assert key != _reuse_key(groups(higher)[0])


def test_a_scenario_run_with_a_kept_run_gives_the_fresh_run():
    from rheoline.scenario.description import ScenarioSet
    from rheoline.scenario.run import run_scenarios

    sc = _example_scenario()
    edited = _with_alarm(sc, 250.0)

    def table(scenario):
        run = run_scenarios(ScenarioSet((scenario,), "reuse", source="<test>"))
        return run.table.select_dtypes("number")

    transient_reuse.clear()
    fresh = table(edited)
    transient_reuse.clear()
    table(sc)  # the run kept
    reused = table(edited)
    assert len(transient_reuse._KEPT) == 1
    np.testing.assert_allclose(reused.to_numpy(float), fresh.to_numpy(float), rtol=1e-9)
    assert reused.columns.tolist() == fresh.columns.tolist()


def test_a_fluid_registered_again_forgets_the_kept_runs():
    # a scenario names its fluid; registered again, the name builds another liquid
    from rheoline.model.fluids import register_fluid, unregister_fluid

    transient_reuse.clear()
    _solve(key=KEY)
    assert len(transient_reuse._KEPT) == 1
    register_fluid("reuse test liquid", lambda temperature_c: WATER, overwrite=True)
    assert len(transient_reuse._KEPT) == 0
    _solve(key=KEY)
    unregister_fluid("reuse test liquid")
    assert len(transient_reuse._KEPT) == 0
