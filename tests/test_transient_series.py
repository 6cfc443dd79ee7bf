"""The time series of a time solve: every row a state the solve computed, each phase's rows
up to its end event (the alarm, a release), checked against an independent solve."""

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from rheoline.model.compliance import Compliance, SyringePump
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import Line
from rheoline.model.parts import Tube
from rheoline.model.transient import Occlusion, simulate_infusion

ML_H = 1e-6 / 3600.0
MMHG = 133.322  # NIST SP 811
WATER = newtonian_fluid("test water", viscosity=1.0e-3, density=1000.0)
RATES = np.array([1.0, 4.0]) * ML_H  # demo values
SYRINGE = 1.5e-9 / MMHG  # demo value: 1.5 uL/mmHg
EXTENSION = 1.0e-9 / MMHG  # demo value: a soft 2 m extension, 1 uL/mmHg lumped
CANNULA = 0.02e-9 / MMHG  # demo value
ALARM = 300 * MMHG
OCCLUDED_AT = 600.0  # s


def _poiseuille(d, length, mu=1.0e-3):
    # Hagen-Poiseuille: dp = 128 mu L Q / (pi D^4)
    return 128.0 * mu * length / (np.pi * d**4)


R0, R1 = _poiseuille(0.3e-3, 2.0), _poiseuille(0.5e-3, 0.5)


def _solve(release_time=None):
    line = Line([Tube(inner_diameter=0.3e-3, length=2.0), Tube(inner_diameter=0.5e-3, length=0.5)])
    return simulate_infusion(
        line,
        WATER,
        SyringePump(rate=RATES, compliance=Compliance(SYRINGE)),
        part_compliance={0: Compliance(EXTENSION), 1: Compliance(CANNULA)},
        occlusion=Occlusion(
            part=1, time=OCCLUDED_AT, alarm_pressure=ALARM, release_time=release_time
        ),
    )


def _reference(rate):
    """Independent reference: scipy's solve_ivp (Radau) of the same two-node compliance +
    Poiseuille line model, written out here.  Node 0 holds the syringe and half the
    extension, node 1 the other half and half the cannula (the outlet half sits at the
    back pressure, 0):

        C0 dp0/dt = Q - (p0 - p1) / R0
        C1 dp1/dt = (p0 - p1) / R0 - open(t) p1 / R1,   open = 0 from the occlusion on

    with dW/dt = open(t) p1 / R1 the volume delivered; the alarm is p0 = ALARM.  Returns
    (dense solution of the run until the occlusion, dense solution of the occluded line,
    alarm time)."""
    c0, c1 = SYRINGE + EXTENSION / 2, EXTENSION / 2 + CANNULA / 2

    def rhs(open_):
        def f(t, y):
            q0, q1 = (y[0] - y[1]) / R0, open_ * y[1] / R1
            return [(rate - q0) / c0, (q0 - q1) / c1, q1]

        return f

    def alarm(t, y):
        return y[0] - ALARM

    alarm.terminal = True
    opts = {"method": "Radau", "rtol": 1e-11, "atol": 1e-12, "dense_output": True}
    run = solve_ivp(rhs(1.0), (0.0, OCCLUDED_AT), [0.0, 0.0, 0.0], **opts)
    occ = solve_ivp(rhs(0.0), (OCCLUDED_AT, 1e6), run.y[:, -1], events=alarm, **opts)
    return run.sol, occ.sol, occ.t_events[0][0], (c0, c1)


def test_occluded_rows_end_at_the_alarm_with_the_alarm_pressure():
    r = _solve()
    occ = r.occlusion
    series = occ.occluded
    for col in range(RATES.size):
        p = series.source_pressure[:, col]
        kept = np.isfinite(p)
        t_last = series.time[kept][-1]
        # the last occluded row is the alarm, not the solver's last step before it
        assert t_last == pytest.approx(OCCLUDED_AT + occ.time_to_alarm[col], rel=1e-12)
        assert p[kept][-1] == pytest.approx(ALARM, rel=1e-8)
        assert np.all(p[kept][:-1] < ALARM)
        # the release starts from that state: its first row is the alarm pressure too
        assert occ.release_time[col] == pytest.approx(t_last, rel=1e-12)
        assert occ.release.source_pressure[0, col] == pytest.approx(ALARM, rel=1e-8)


def test_every_row_matches_an_independent_solve_of_the_same_model():
    r = _solve()
    # the model's nodes hold the compliances the reference gives them
    for col, rate in enumerate(RATES):
        run_sol, occ_sol, t_alarm, (c0, c1) = _reference(rate)
        assert r.node_compliance[:2, col] == pytest.approx([c0, c1], rel=1e-6)
        assert r.occlusion.time_to_alarm[col] == pytest.approx(t_alarm - OCCLUDED_AT, rel=1e-5)
        # the run until the occlusion: syringe pressure, the outlet flow p1 / R1
        run = r.run
        before = run.time <= OCCLUDED_AT
        ref = run_sol(run.time[before])
        scale = rate * (R0 + R1)
        assert np.max(np.abs(run.source_pressure[before, col] - ref[0])) < 1e-4 * scale
        assert np.max(np.abs(run.outlet_flow[before, col] - ref[1] / R1)) < 1e-4 * rate
        assert np.max(np.abs(run.delivered_volume[before, col] - ref[2])) < 1e-4 * rate * 60
        # the occluded line: both nodes' pressures at every row, to the alarm row included
        occ = r.occlusion.occluded
        kept = np.isfinite(occ.source_pressure[:, col])
        assert occ.time[kept][-1] == pytest.approx(t_alarm, rel=1e-5)
        ref = occ_sol(np.minimum(occ.time[kept], t_alarm))
        pressures = occ.node_pressures[kept, :2, col].T
        assert np.max(np.abs(pressures - ref[:2])) < 1e-4 * ALARM
        # nothing leaves the occluded line; the extension's flow charges node 1 meanwhile
        assert np.all(occ.outlet_flow[kept, col] == 0.0)
        assert np.all(occ.delivered_volume[kept, col] == 0.0)


def test_occluded_series_counts_the_pumped_volume_from_the_occlusion():
    # the pumps displace Q (t - t_occ) from the occlusion until they stop at the alarm
    r = _solve()
    series = r.occlusion.occluded
    t_alarm = OCCLUDED_AT + r.occlusion.time_to_alarm
    expected = RATES[None] * (np.minimum(series.time[:, None], t_alarm[None]) - OCCLUDED_AT)
    assert series.pumped_volume[0] == pytest.approx([0.0, 0.0], abs=1e-15)
    assert np.asarray(series.pumped_volume) == pytest.approx(expected, rel=1e-9, abs=1e-15)


def test_an_occlusion_held_past_its_alarm_shows_the_held_state_until_the_release():
    release = 7200.0
    r = _solve(release_time=release)
    occ = r.occlusion
    series = occ.occluded
    assert series.time[-1] == release
    for col in range(RATES.size):
        kept = np.isfinite(series.source_pressure[:, col])
        # the alarm row, then the held state (pumps stopped, line shut) at the release
        assert series.time[kept][-2] == pytest.approx(OCCLUDED_AT + occ.time_to_alarm[col])
        assert series.source_pressure[kept][-2:, col] == pytest.approx([ALARM, ALARM], rel=1e-8)
        assert series.outlet_flow[-1, col] == 0.0
        assert occ.release_time[col] == release
        assert occ.release.source_pressure[0, col] == pytest.approx(ALARM, rel=1e-8)
