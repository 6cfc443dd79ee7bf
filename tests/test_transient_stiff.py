"""The time solve's fast path: a junction that stores only its liquid's compression is solved
quasi-statically (not a node), the line's law is evaluated from its tables for every segment
at once, and the pumps' profiles on the flat scenario axis.  Checked against an independent
tight-tolerance solve of the full stiff model (that junction kept as a node), and the tables
against the line's own solve."""

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from rheoline.model import line_nodes
from rheoline.model.compliance import LIQUID_COMPRESSIBILITY, Compliance, SyringePump
from rheoline.model.flow_tables import FlowTable, SegmentFlows, tabulate
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import Line
from rheoline.model.parts import Tube
from rheoline.model.rate_profile import FlatProfile, RateProfile
from rheoline.model.transient import Occlusion, simulate_infusion

ML_H = 1e-6 / 3600.0
MMHG = 133.322  # NIST SP 811
WATER = newtonian_fluid("test water", viscosity=1.0e-3, density=1000.0)
SYRINGE = 1.5e-9 / MMHG  # demo value: 1.5 uL/mmHg
EXTENSION = 0.06e-9 / MMHG  # demo value: a 1.5 m microbore extension, lumped
ALARM = 300 * MMHG
OCCLUDED_AT = 1800.0  # s
# extension, a rigid connector, a rigid fine-bore tail (demo dimensions; the tail keeps the
# release laminar, Reynolds number below about 200, where Poiseuille holds)
BORES, LENGTHS = (0.5e-3, 1.0e-3, 0.3e-3), (1.5, 0.03, 0.2)


def _poiseuille(d, length, mu=1.0e-3):
    # Hagen-Poiseuille: dp = 128 mu L Q / (pi D^4)
    return 128.0 * mu * length / (np.pi * d**4)


R = [_poiseuille(d, length) for d, length in zip(BORES, LENGTHS, strict=True)]
LIQUID = [
    LIQUID_COMPRESSIBILITY * np.pi / 4 * d * d * length
    for d, length in zip(BORES, LENGTHS, strict=True)
]
# the full model's nodes: the syringe, boundary 1, boundary 2 (the junction of connector and
# cannula, whose only compliance is the compression of the liquid on either side)
C = [SYRINGE + EXTENSION / 2, EXTENSION / 2 + LIQUID[1] / 2, LIQUID[1] / 2 + LIQUID[2] / 2]


def _line():
    return Line([Tube(inner_diameter=d, length=x) for d, x in zip(BORES, LENGTHS, strict=True)])


def _solve(rate, occluded_part=None, release_time=None, rtol=1e-6):
    occlusion = None
    if occluded_part is not None:
        occlusion = Occlusion(
            part=occluded_part, time=OCCLUDED_AT, alarm_pressure=ALARM, release_time=release_time
        )
    return simulate_infusion(
        _line(),
        WATER,
        SyringePump(rate=rate, compliance=Compliance(SYRINGE)),
        part_compliance={0: Compliance(EXTENSION)},
        occlusion=occlusion,
        rtol=rtol,
    )


def _full_model(rate, shut=None, pumping=True):
    """The right-hand side of the full three-node compliance + Poiseuille model, written out
    here (the outlet at 0 Pa): C_j dp_j/dt = inflow - outflow, the pump into node 0, segment
    ``shut`` passing nothing; state (p0, p1, p2, delivered volume)."""

    def f(t, y):
        q = [(y[0] - y[1]) / R[0], (y[1] - y[2]) / R[1], y[2] / R[2]]
        if shut is not None:
            q[shut] = 0.0
        pump = rate(t) if pumping else 0.0
        return [(pump - q[0]) / C[0], (q[0] - q[1]) / C[1], (q[1] - q[2]) / C[2], q[2]]

    return f


OPTS = {"method": "Radau", "rtol": 1e-10, "atol": 1e-14, "dense_output": True}


def _crossing(sol, value, t0, t1):
    """First time in [t0, t1] where ``value(t, y)`` of a dense solution turns positive."""
    t = np.linspace(t0, t1, 200001)
    k = int(np.argmax(value(t, sol(t)) > 0))
    assert k > 0
    a, b = t[k - 1], t[k]
    for _ in range(80):  # bisection on the dense output
        m = 0.5 * (a + b)
        a, b = (m, b) if value(m, sol(m)) <= 0 else (a, m)
    return 0.5 * (a + b)


def _stored(y):
    return sum(c * p for c, p in zip(C, y[:3], strict=True))


@pytest.mark.parametrize("rate_ml_h", [1.0, 4.0])
def test_an_occlusion_alarm_and_release_match_the_full_stiff_model(rate_ml_h):
    q = rate_ml_h * ML_H
    r = _solve(q, occluded_part=2)
    # the junction of connector and cannula is quasi-static: two nodes, the junction's
    # liquid stored with boundary 1
    assert r.node_compliance.shape == (2,)
    assert r.node_compliance == pytest.approx([C[0], C[1] + C[2]], rel=1e-6)
    assert C[2] < line_nodes.QUASI_STATIC * sum(C)
    run = solve_ivp(_full_model(lambda t: q), (0.0, OCCLUDED_AT), [0.0] * 4, **OPTS)
    startup = _crossing(run.sol, lambda t, y: y[2] / R[2] - 0.9 * q, 0.0, OCCLUDED_AT)
    # the line's own law (developing flow, entrance, contraction and exit losses) is within
    # a few 1e-4 of Poiseuille's at these flows; test_transient holds start-up to 2e-3
    assert r.startup_time == pytest.approx(startup, rel=1e-3)
    occ = solve_ivp(
        _full_model(lambda t: q, shut=2), (OCCLUDED_AT, 1e6), run.y[:, -1], **OPTS,
        events=lambda t, y: y[0] - ALARM,
    )  # fmt: skip
    t_alarm = occ.t_events[0][0]
    assert r.occlusion.time_to_alarm == pytest.approx(t_alarm - OCCLUDED_AT, rel=1e-5)
    at_alarm = occ.sol(t_alarm)
    assert r.occlusion.bolus_volume == pytest.approx(_stored(at_alarm), rel=1e-5)
    # the release, the pump stopped: 90 % of the bolus delivered
    release = solve_ivp(
        _full_model(lambda t: q, pumping=False), (0.0, 600.0), [*at_alarm[:3], 0.0], **OPTS
    )
    bolus = _stored(at_alarm)
    # the release runs at a Reynolds number near 130 in the cannula, where the line's own
    # law (entrance and exit losses) is some 0.3 % above Poiseuille's (as in test_transient)
    t90 = _crossing(release.sol, lambda t, y: y[3] - 0.9 * bolus, 0.0, 600.0)
    assert r.occlusion.bolus_time_90 == pytest.approx(t90, rel=3e-3)
    assert r.occlusion.bolus_delivered == pytest.approx(bolus, rel=1e-4)
    # the peak: the full model's outlet flow once the junction (time constant C2 R1 R2 /
    # (R1 + R2), under a microsecond) has settled, a thousand of its time constants on,
    # which is boundary 1 at its alarm-time pressure through connector and cannula in series
    tau_junction = C[2] * R[1] * R[2] / (R[1] + R[2])
    settled = release.sol(1e3 * tau_junction)[2] / R[2]
    assert settled == pytest.approx(at_alarm[1] / (R[1] + R[2]), rel=1e-3)
    # ... where the engine's peak is that of the line's own law (the steady solve of
    # connector and tail at that pressure; about 1 % below Poiseuille's at Re near 170)
    tail = Line(_line().parts[1:]).solve(WATER, source_pressure=at_alarm[1])
    assert r.occlusion.bolus_peak_flow == pytest.approx(tail.flow, rel=1e-3)
    assert r.occlusion.bolus_peak_flow == pytest.approx(settled, rel=2e-2)


def test_an_occlusion_cleared_before_its_alarm_matches_the_full_stiff_model():
    # the connector occluded 10 min, then cleared with the pump running (demo timing)
    q, clear = 1.0 * ML_H, OCCLUDED_AT + 600.0
    r = _solve(q, occluded_part=1, release_time=clear)
    assert np.isinf(r.occlusion.time_to_alarm)
    run = solve_ivp(_full_model(lambda t: q), (0.0, OCCLUDED_AT), [0.0] * 4, **OPTS)
    occ = solve_ivp(_full_model(lambda t: q, shut=1), (OCCLUDED_AT, clear), run.y[:, -1], **OPTS)
    at_clear = occ.y[:, -1]
    # the bolus: what is stored above the steady state at the set rate
    steady = [q * sum(R), q * (R[1] + R[2]), q * R[2]]
    bolus = _stored(at_clear) - _stored(steady)
    assert r.occlusion.bolus_volume == pytest.approx(bolus, rel=1e-4)
    release = solve_ivp(_full_model(lambda t: q), (0.0, 600.0), [*at_clear[:3], 0.0], **OPTS)
    t90 = _crossing(release.sol, lambda t, y: y[3] - q * t - 0.9 * bolus, 0.0, 600.0)
    assert r.occlusion.bolus_time_90 == pytest.approx(t90, rel=3e-3)


def test_a_ramped_rate_change_matches_the_full_stiff_model():
    profile = RateProfile.from_points([0.0, 600.0, 900.0], [1.0 * ML_H, 1.0 * ML_H, 3.0 * ML_H])
    r = _solve(profile)
    run = solve_ivp(_full_model(lambda t: float(profile.rate(t))), (0.0, 1500.0), [0.0] * 4, **OPTS)
    change = r.rate_changes[-1]
    for fraction, figure in ((0.5, change.time_50), (0.9, change.time_90)):
        level = (1.0 + 2.0 * fraction) * ML_H
        t = _crossing(run.sol, lambda t, y, lv=level: y[2] / R[2] - lv, 600.0, 1500.0)
        assert figure == pytest.approx(t - change.start, rel=1e-4)


FIGURES = ("time_to_alarm", "bolus_volume", "bolus_delivered", "bolus_time_90")


@pytest.mark.parametrize(
    "case",
    [
        {"rate": np.array([0.5, 1.0, 4.0]) * ML_H, "occluded_part": 2},
        {"rate": 1.0 * ML_H, "occluded_part": 1, "release_time": OCCLUDED_AT + 600.0},
        {"rate": RateProfile.from_points([0.0, 0.0, 600.0, 900.0], [0.0, ML_H, ML_H, 0.3 * ML_H])},
    ],
    ids=["alarm-and-release", "cleared-before-alarm", "ramp-down"],
)
def test_the_fast_path_agrees_with_a_tight_solve_that_keeps_every_node(case, monkeypatch):
    # the reference: the same engine with the junction kept as a node (the stiff model) at
    # rtol 1e-9 (at 1e-10 the kept junction makes BDF fail at the occlusion: the step it
    # needs is below the time's spacing); the fast path: quasi-static junction, default rtol 1e-6.  Every figure but
    # the release's peak flow (the kept junction's sub-microsecond discharge, see the test
    # above) agrees to 2e-4, the default tolerance's own error on these cases.
    fast = _solve(**case)
    monkeypatch.setattr(line_nodes, "QUASI_STATIC", 0.0)
    reference = _solve(**case, rtol=1e-9)
    assert reference.node_compliance.shape[0] == 3 and fast.node_compliance.shape[0] == 2
    pairs = [(fast.startup_time, reference.startup_time)]
    for got, ref in zip(fast.rate_changes, reference.rate_changes, strict=True):
        pairs += [(got.time_50, ref.time_50), (got.time_90, ref.time_90)]
    if fast.occlusion is not None:
        pairs += [(getattr(fast.occlusion, k), getattr(reference.occlusion, k)) for k in FIGURES]
    for got, ref in pairs:
        # the same figures computed (an occlusion cleared first has no alarm: inf in both)
        finite = np.isfinite(ref)
        assert np.array_equal(np.isfinite(got), finite)
        assert np.count_nonzero(finite) > 0 or np.all(np.isinf(ref))
        assert np.asarray(got)[finite] == pytest.approx(np.asarray(ref)[finite], rel=2e-4)
    # (one table of the joined parts against two: their interpolation errors differ)
    assert fast.steady_pressure == pytest.approx(reference.steady_pressure, rel=1e-6)


def test_the_tables_reproduce_the_lines_own_solve_between_grid_points():
    # a laminar microbore line and a turbulent one (a 3 mm set at litres per minute)
    for line, q_lo, q_hi in (
        (_line(), 1e-12, 1e-6),
        (Line([Tube(inner_diameter=3e-3, length=1.8)]), 1e-8, 1e-3),
    ):
        n_parts = len(line.parts)
        (table,), _ = tabulate(line, WATER, [tuple(range(n_parts))], 0, q_lo, q_hi, 1, ())
        # flows half-way between grid points (in logs), the worst place for the interpolant
        mid = np.exp(0.5 * (table.log_q[:-1] + table.log_q[1:]))[::7]
        drops = line.solve(WATER, flow=mid).net_drive
        flows, _, beyond = table.flow(np.asarray(drops))
        assert not np.any(beyond)
        # 1e-4 where the law bends (the transition zone), far less where it is laminar
        assert np.max(np.abs(flows / mid - 1.0)) < 1e-4


def test_every_segment_at_once_equals_each_table_alone():
    rng = np.random.default_rng(20261202)
    log_q = np.linspace(np.log(1e-12), np.log(1e-5), 120)
    q_grid = np.exp(log_q)
    # three linear laws and one that bends (a loss quadratic in flow added)
    bent = FlowTable(log_q, np.log(R[0] * q_grid * (1.0 + 1e6 * q_grid))[:, None])
    tables = [FlowTable(log_q, np.log(r * q_grid)[:, None]) for r in R] + [bent]
    dp = rng.choice([-1.0, 1.0], size=(4, 50)) * np.exp(rng.uniform(-5, 25, size=(4, 50)))
    stacked = SegmentFlows(tables)
    assert stacked.stacked
    q, g, beyond = stacked.flow(dp)
    for s, table in enumerate(tables):
        q1, g1, b1 = table.flow(dp[s])
        assert np.array_equal(q[s], q1) and np.array_equal(g[s], g1)
    assert np.array_equal(
        beyond, np.any([t.flow(d)[2] for t, d in zip(tables, dp, strict=True)], axis=0)
    )
    # reversed flow is the same law, below the grid the laminar continuation Q = G0 dp
    q_back, _, _ = stacked.flow(-dp)
    assert np.array_equal(q_back, -q)
    tiny = np.full((4, 1), 1e-30)
    assert stacked.flow(tiny)[0][:3, 0] == pytest.approx(1e-30 / np.array(R), rel=1e-9)


def test_the_flat_profile_equals_the_rate_profile():
    # a step and a ramp, per scenario of a (3, 2) set flattened to 6
    profile = RateProfile.from_points(
        [0.0, 60.0, 60.0, 300.0], [[1e-9, 2e-9], [1e-9, 2e-9], [3e-9, 0.0], [5e-9, 1e-9]]
    )
    flat = FlatProfile(profile, (3, 2), 6)
    per_scenario = np.linspace(0.0, 400.0, 6)
    for t, shaped in [(x, x) for x in (0.0, 30.0, 60.0, 200.0, 1e5)] + [
        (per_scenario, per_scenario.reshape(3, 2))
    ]:
        for got, expected in (
            (flat.rate(t), profile.rate(shaped)),
            (flat.volume(t), profile.volume(shaped)),
        ):
            expected = np.broadcast_to(expected, (3, 2)).ravel()
            assert got == pytest.approx(expected, rel=1e-14, abs=1e-30)


def test_a_point_of_a_sweep_from_rigid_to_compliant_tubing_equals_it_solved_alone():
    # A boundary negligible at one point of a sweep (near-rigid tubing) and not at another
    # stays a node at both (review finding: it was dropped at every point, moving the
    # compliant point's start-up by 13 % and its bolus peak flow by half).  Reference: the
    # same point solved alone, where the boundary is a node (the full model, as above).
    per_m = 1e-9 / MMHG  # 1 uL/mmHg per metre of tubing (demo values)

    def solve(c, alarm):
        tubing = {k: Compliance.per_metre(c * per_m) for k in (0, 2)}
        return simulate_infusion(
            _line(),
            WATER,
            SyringePump(rate=2 * ML_H, compliance=Compliance(SYRINGE)),
            part_compliance=tubing,
            occlusion=Occlusion(part=1, time=OCCLUDED_AT, alarm_pressure=alarm),
        )

    swept = solve(np.array([1e-6, 0.5]), np.array([ALARM, ALARM]))
    alone = solve(0.5, ALARM)
    for name in ("startup_time", "time_to_alarm", "bolus_volume"):
        np.testing.assert_allclose(
            np.asarray(getattr(swept, name))[1], getattr(alone, name), rtol=2e-4, err_msg=name
        )
