"""Time-dependent infusion: closed forms, bench brackets, mass balance, trends, vectors, errors."""

import numpy as np
import pytest

from rheoline.errors import InputRangeError
from rheoline.model.compliance import Compliance, SyringePump
from rheoline.model.conditions import SEVERITIES
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import GRAVITY, Line
from rheoline.model.parts import Catheter, Fitting, Tube
from rheoline.model.rate_profile import RateProfile
from rheoline.model.transient import InjectionPort, Occlusion, simulate_infusion
from rheoline.model.transient_results import TRANSIENT_CONDITIONS

ML_H = 1e-6 / 3600.0
MMHG = 133.322  # NIST SP 811
WATER = newtonian_fluid("test water", viscosity=1.0e-3, density=1000.0)
SYRINGE = Compliance(1.5e-9 / MMHG)  # demo value: 1.5 uL/mmHg
BORE, LENGTH = 0.5e-3, 1.0


def _resistance(d=BORE, length=LENGTH, mu=1.0e-3):
    # Hagen-Poiseuille: dp = 128 mu L Q / (pi D^4)
    return 128.0 * mu * length / (np.pi * d**4)


def _linear_line():
    return Line([Tube(inner_diameter=BORE, length=LENGTH)])


# ------------------------------------------------------------------ closed forms
def test_startup_and_rate_change_follow_the_first_order_closed_form():
    # one compliance C filled at Q and drained through R: Q_out = Q (1 - exp(-t / RC)), the
    # exact solution of C dp/dt = Q - p/R, so t90 = RC ln 10 and t50 = RC ln 2
    pump = SyringePump(
        rate=RateProfile.steps([0.0, 200.0], [1.0 * ML_H, 3.0 * ML_H]), compliance=SYRINGE
    )
    r = simulate_infusion(_linear_line(), WATER, pump, duration=400.0)
    rc = _resistance() * r.node_compliance[0]
    assert r.startup_time == pytest.approx(rc * np.log(10.0), rel=2e-3)
    start, step = r.rate_changes
    assert (start.time_50, start.time_90) == pytest.approx(
        (rc * np.log(2), rc * np.log(10)), rel=2e-3
    )
    assert step.rate_before == pytest.approx(1.0 * ML_H) and step.rate_after == pytest.approx(
        3 * ML_H
    )
    assert step.time_90 == pytest.approx(rc * np.log(10.0), rel=2e-3)
    assert r.steady_pressure == pytest.approx(_resistance() * 3 * ML_H, rel=1e-4)


def test_time_to_alarm_and_bolus_follow_the_closed_forms():
    # complete occlusion: the syringe fills at Q, t = C (p_alarm - p_running) / Q; released
    # with the pump stopped it empties to the outlet pressure: bolus = C (p_alarm - p_out)
    back = 10 * MMHG
    alarm = 300 * MMHG
    pump = SyringePump(rate=2.0 * ML_H, compliance=SYRINGE)
    r = simulate_infusion(
        _linear_line(),
        WATER,
        pump,
        back_pressure=back,
        occlusion=Occlusion(part=0, time=300.0, alarm_pressure=alarm),
    )
    c = r.node_compliance[0]
    running = back + _resistance() * 2.0 * ML_H
    occ = r.occlusion
    assert occ.running_pressure == pytest.approx(running, rel=1e-4)
    assert occ.time_to_alarm == pytest.approx(c * (alarm - running) / (2.0 * ML_H), rel=1e-4)
    assert occ.bolus_volume == pytest.approx(c * (alarm - back), rel=1e-6)
    assert occ.bolus_delivered == pytest.approx(occ.bolus_volume, rel=1e-4)
    rc = _resistance() * c
    assert occ.bolus_time_90 == pytest.approx(rc * np.log(10.0), rel=2e-3)
    # the peak leaves at the alarm pressure through the line's own law (Re about 150 here, so
    # its entrance and exit losses take 0.3 % off the Poiseuille flow)
    peak = _linear_line().solve(WATER, source_pressure=alarm, back_pressure=back).flow
    assert occ.bolus_peak_flow == pytest.approx(peak, rel=2e-3)
    assert peak < (alarm - back) / _resistance()


def test_occlusion_cleared_before_its_alarm_releases_what_was_pumped_meanwhile():
    # nothing leaves the occluded syringe, so it stores all it is pumped, Q x the occlusion's
    # length; cleared with the pump running, that store is the bolus above the set rate
    q = 2.0 * ML_H
    pump = SyringePump(rate=q, compliance=SYRINGE)
    late = Occlusion(part=0, time=300.0, alarm_pressure=300 * MMHG)
    r = simulate_infusion(
        _linear_line(),
        WATER,
        pump,
        occlusion=Occlusion(part=0, time=300.0, alarm_pressure=300 * MMHG, release_time=420.0),
    )
    occ = r.occlusion
    assert r.conditions["released_before_alarm"] and not r.conditions["no_alarm"]
    assert np.isinf(occ.time_to_alarm) and occ.release_time == 420.0
    assert occ.bolus_volume == pytest.approx(q * 120.0, rel=1e-4)
    assert occ.bolus_delivered == pytest.approx(occ.bolus_volume, rel=1e-3)
    # a release after the alarm: the pumps stopped there, the same bolus, released later
    alarmed = simulate_infusion(_linear_line(), WATER, pump, occlusion=late)
    held = simulate_infusion(
        _linear_line(),
        WATER,
        pump,
        occlusion=Occlusion(part=0, time=300.0, alarm_pressure=300 * MMHG, release_time=1e4),
    )
    assert held.bolus_volume == pytest.approx(alarmed.bolus_volume, rel=1e-9)
    assert held.occlusion.release_time == 1e4
    assert alarmed.occlusion.release_time == pytest.approx(300.0 + alarmed.time_to_alarm)
    with pytest.raises(InputRangeError, match="release_time 200 s must come after"):
        Occlusion(part=0, time=300.0, alarm_pressure=1e4, release_time=200.0)


def test_time_to_alarm_with_a_pressure_dependent_compliance():
    # a stiffening syringe: the time to alarm is the volume the compliance table stores
    # between the running and the alarm pressure, over the rate, V = int C dp (scipy quad)
    from scipy.integrate import quad

    p_table = np.array([0.0, 100.0, 400.0]) * MMHG
    c_table = np.array([3.0, 1.5, 0.8]) * 1e-9 / MMHG
    table = Compliance(pressures=p_table, values=c_table)
    q = 1.0 * ML_H
    r = simulate_infusion(
        _linear_line(),
        WATER,
        SyringePump(rate=q, compliance=table),
        occlusion=Occlusion(part=0, time=300.0, alarm_pressure=500 * MMHG),
    )
    running = r.occlusion.running_pressure
    stored, _ = quad(lambda p: np.interp(p, p_table, c_table), running, 500 * MMHG, points=p_table)
    liquid = r.node_compliance[0] - c_table[0]  # the tube's liquid, in the syringe's node
    expected = (stored + liquid * (500 * MMHG - running)) / q
    assert r.time_to_alarm == pytest.approx(expected, rel=1e-4)
    # 500 mmHg lies beyond the table's last pressure: its end value was held, and said so
    assert r.conditions["outside_compliance_table"]


def _port_setup(transport, diffusivity=None):
    carrier = SyringePump(rate=2.0 * ML_H, name="carrier")  # rigid: steady within milliseconds
    drug = SyringePump(rate=RateProfile.constant(1.0 * ML_H, start=600.0), name="drug")
    down = Tube(inner_diameter=0.5e-3, length=1.5)
    line = Line([Tube(inner_diameter=1.0e-3, length=0.5), down])
    port = InjectionPort(boundary=1, pump=drug, concentration=2.0, diffusivity=diffusivity)
    r = simulate_infusion(line, WATER, carrier, ports=[port], transport=transport, duration=5000.0)
    return r, down.internal_volume / (3.0 * ML_H)


def test_plug_flow_drug_delay_is_volume_over_flow():
    # plug flow: the drug front crosses the shared volume V in V / Q
    r, tau = _port_setup("plug")
    port = r.ports[0]
    assert port.dead_volume == pytest.approx(np.pi * 0.25e-6 * 1.5 / 4)
    assert port.steady_delivery == pytest.approx(2.0 * ML_H)
    assert (port.delay_50, port.delay_90) == pytest.approx((tau, tau), rel=2e-3)
    assert port.transport_model == "plug"


def test_laminar_drug_delay_follows_levenspiel():
    # Levenspiel's F = 1 - (tau / 2t)^2 reaches 50 % at t = tau / (2 sqrt 0.5) and 90 % at
    # t = tau / (2 sqrt 0.1)
    r, tau = _port_setup("laminar")
    port = r.ports[0]
    assert port.delay_50 == pytest.approx(tau / (2 * np.sqrt(0.5)), rel=3e-3)
    assert port.delay_90 == pytest.approx(tau / (2 * np.sqrt(0.1)), rel=3e-3)
    assert "levenspiel-1999" in r.models_used


def test_a_drug_joining_at_the_syringe_is_diluted_by_the_carrier_before_it_travels():
    # a port at boundary 0 joins the main syringe's node, where no segment arrives: the
    # carrier entering there is the main pump's own displacement.  Levenspiel's laminar F
    # over the whole line, as for a port further down (50 % at tau / (2 sqrt 0.5), 90 % at
    # tau / (2 sqrt 0.1)), and the drug arrives diluted to 1/3 (1 of 3 mL/h)
    carrier = SyringePump(rate=2.0 * ML_H, name="carrier")
    drug = SyringePump(rate=RateProfile.constant(1.0 * ML_H, start=600.0), name="drug")
    line = Line([Tube(inner_diameter=0.5e-3, length=1.5)])
    port = InjectionPort(boundary=0, pump=drug, concentration=2.0)
    r = simulate_infusion(line, WATER, carrier, ports=[port], transport="laminar", duration=5000.0)
    tau = line.parts[0].internal_volume / (3.0 * ML_H)
    p = r.ports[0]
    assert p.delay_50 == pytest.approx(tau / (2 * np.sqrt(0.5)), rel=3e-3)
    assert p.delay_90 == pytest.approx(tau / (2 * np.sqrt(0.1)), rel=3e-3)
    assert p.delivery[-1] == pytest.approx(p.steady_delivery, rel=1e-3)


def test_dispersed_drug_delay_is_centred_on_the_plug_delay():
    # Taylor-Aris, small dispersion: a Gaussian about V/Q, 90 % at V/Q + 1.2816 sigma
    r, tau = _port_setup("dispersion", diffusivity=5e-10)
    port = r.ports[0]
    a, q = 0.25e-3, 3.0 * ML_H
    area = np.pi * a * a
    u = q / area
    d_eff = 5e-10 + u * u * a * a / (48 * 5e-10)
    sigma_t = np.sqrt(2 * d_eff * 1.5 * area * area / u) / q
    assert port.delay_50 == pytest.approx(tau, rel=2e-3)
    assert port.delay_90 == pytest.approx(tau + 1.2816 * sigma_t, rel=3e-3)
    assert {"taylor-1953", "aris-1956"} <= set(r.models_used)


# ------------------------------------------------------------------ published bench data
def test_time_to_alarm_brackets_donmez_2005():
    # Donmez et al., Paediatr. Anaesth. 15 (2005) 293-296 (abstract): 50 mL syringe, saline,
    # occluded with a stopcock: 117.3 +/- 9.4 min at 0.5 mL/h and 15.0 +/- 7.1 min at 5 mL/h.
    # Assumed beside them: syringe compliance 9.0e-9 to 2.1e-8 L/Pa, the range Snijder et al.,
    # Biomed. Tech. 60 (2015) (abstract) give for syringes; alarm pressure 300 to 900 mmHg
    # (assumed, a range of pump settings; common practice, no source); a short extension.
    c = np.array([9.0e-12, 2.1e-11])[:, None, None]
    alarm = np.array([300.0, 900.0])[None, :, None] * MMHG
    rate = np.array([0.5, 5.0])[None, None, :] * ML_H
    pump = SyringePump(rate=rate, compliance=Compliance(c))
    line = Line([Tube(inner_diameter=1.0e-3, length=0.3)])
    r = simulate_infusion(
        line, WATER, pump, occlusion=Occlusion(part=0, time=120.0, alarm_pressure=alarm)
    )
    minutes = r.time_to_alarm / 60.0
    low, high = minutes[0, 0], minutes[1, 1]
    assert low[0] < 117.3 < high[0]
    assert low[1] < 15.0 < high[1]
    # the rate law: calibrated on the 0.5 mL/h mean, the 5 mL/h figure lies within one SD
    ratio = minutes[:, :, 1] / minutes[:, :, 0]
    assert np.allclose(ratio, 0.1, rtol=0.02)
    assert abs(117.3 * ratio.mean() - 15.0) < 7.1


def test_startup_brackets_neff_2001_with_slack():
    # Neff et al., Paediatr. Anaesth. 11 (2001) 561-565 (abstract): at 1 mL/h the time to
    # steady delivery ranged 19.6 +/- 9.3 to 76.3 +/- 29.0 min over four pumps, which the
    # authors put down to free play; a 2 mL priming bolus cut it to 6.0-11.1 min.  Assumed:
    # slack 0.3 and 1.2 mL (free play) and the syringe compliance range of Snijder et al. 2015.
    slack = np.array([0.3e-6, 1.2e-6])[:, None]
    c = np.array([9.0e-12, 2.1e-11])[None, :]
    pump = SyringePump(rate=1.0 * ML_H, compliance=Compliance(c), slack_volume=slack)
    r = simulate_infusion(_linear_line(), WATER, pump, back_pressure=10 * MMHG)
    minutes = r.startup_time / 60.0
    assert minutes.min() < 19.6 and minutes.max() > 76.3 - 29.0
    primed = simulate_infusion(
        _linear_line(), WATER, SyringePump(rate=1.0 * ML_H, compliance=Compliance(c))
    )
    # the model without slack starts in well under the primed pumps' 6 min: the rest of their
    # delay is mechanics the model does not hold (a known limit, see the module notes)
    assert np.all(primed.startup_time / 60.0 < 6.0)


# ------------------------------------------------------------------ balance and trends
def test_mass_balance_in_time():
    # delivered = pumped - slack taken up - stored, at every step of the run
    carrier = SyringePump(
        rate=RateProfile.from_points([0.0, 300.0, 900.0], [0.0, 2 * ML_H, 1 * ML_H]),
        compliance=SYRINGE,
        slack_volume=np.array([0.02e-6, 0.05e-6]),
        break_loose_pressure=20 * MMHG,
    )
    drug = SyringePump(
        rate=RateProfile.constant(0.5 * ML_H, start=400.0), compliance=Compliance(0.5e-9 / MMHG)
    )
    line = Line(
        [
            Tube(inner_diameter=1e-3, length=1.0),
            Fitting(k=0.8, internal_volume=0.05e-6),
            Catheter(gauge=24),
        ]
    )
    port = InjectionPort(
        boundary=1, pump=drug, line=Line([Tube(inner_diameter=0.5e-3, length=0.3)])
    )
    r = simulate_infusion(
        line,
        WATER,
        carrier,
        ports=[port],
        part_compliance={0: Compliance.per_metre(0.05e-9 / MMHG)},
        duration=3000.0,
    )
    run = r.run
    balance = run.pumped_volume - run.slack_volume - run.stored_volume
    assert np.allclose(run.delivered_volume, balance, rtol=0, atol=1e-9 * run.pumped_volume.max())
    assert np.all(np.diff(run.delivered_volume, axis=0) >= -1e-15)


def test_more_compliance_means_longer_delays_and_bigger_bolus():
    c = np.array([0.5, 1.0, 2.0, 4.0]) * 1e-9 / MMHG
    pump = SyringePump(rate=1.0 * ML_H, compliance=Compliance(c))
    r = simulate_infusion(
        _linear_line(),
        WATER,
        pump,
        occlusion=Occlusion(part=0, time=600.0, alarm_pressure=200 * MMHG),
    )
    assert np.all(np.diff(r.startup_time) > 0)
    assert np.all(np.diff(r.time_to_alarm) > 0)
    assert np.all(np.diff(r.bolus_volume) > 0)
    drug = SyringePump(rate=RateProfile.constant(0.5 * ML_H, start=300.0), compliance=Compliance(c))
    line = Line([Tube(inner_diameter=1.0e-3, length=0.5), Tube(inner_diameter=0.5e-3, length=1.0)])
    port = InjectionPort(
        boundary=1,
        pump=drug,
        line=Line([Tube(inner_diameter=0.5e-3, length=0.2)]),
        diffusivity=5e-10,
    )
    r = simulate_infusion(
        line, WATER, SyringePump(rate=1.0 * ML_H, compliance=SYRINGE), ports=[port]
    )
    assert np.all(np.diff(r.ports[0].delay_50) > 0) and np.all(np.diff(r.ports[0].delay_90) > 0)


def test_vectorized_solve_matches_scalar_solves():
    rates = np.array([0.5, 2.0, 8.0]) * ML_H
    line = Line([Tube(inner_diameter=1e-3, length=1.2), Catheter(gauge=22)])
    kwargs = dict(occlusion=Occlusion(part=1, time=900.0, alarm_pressure=250 * MMHG))
    vec = simulate_infusion(line, WATER, SyringePump(rate=rates, compliance=SYRINGE), **kwargs)
    for i, q in enumerate(rates):
        one = simulate_infusion(line, WATER, SyringePump(rate=q, compliance=SYRINGE), **kwargs)
        assert one.startup_time == pytest.approx(vec.startup_time[i], rel=1e-4)
        assert one.time_to_alarm == pytest.approx(vec.time_to_alarm[i], rel=1e-4)
        assert one.bolus_volume == pytest.approx(vec.bolus_volume[i], rel=1e-6)


# ------------------------------------------------------------------ mechanics
def test_break_loose_holds_the_line_then_surges():
    # the stopper holds until the syringe reaches p_bl: no flow for C p_bl / Q, then the
    # charge reaches the line at p_bl, the line's own flow there (about p_bl / R)
    p_bl = 100 * MMHG
    pump = SyringePump(rate=1.0 * ML_H, compliance=SYRINGE, break_loose_pressure=p_bl)
    r = simulate_infusion(_linear_line(), WATER, pump, duration=1200.0)
    c = r.node_compliance[0]
    t_break = c * p_bl / (1.0 * ML_H)
    run = r.run
    assert np.all(run.outlet_flow[run.time < 0.999 * t_break] == 0.0)
    surge = _linear_line().solve(WATER, source_pressure=p_bl).flow
    assert run.outlet_flow.max() == pytest.approx(surge, rel=1e-3)
    assert surge == pytest.approx(p_bl / _resistance(), rel=3e-3)
    # the surge is above the set rate at once: the start-up ends when the stopper breaks loose
    assert r.startup_time == pytest.approx(t_break, rel=1e-6)


def test_head_lowers_the_syringe_pressure():
    head = 0.5
    pump = SyringePump(rate=1.0 * ML_H, compliance=SYRINGE, head=head)
    r = simulate_infusion(_linear_line(), WATER, pump, duration=200.0)
    expected = _resistance() * ML_H - WATER.density * GRAVITY * head
    assert r.steady_pressure == pytest.approx(expected, rel=1e-4)
    assert r.run.source_pressure[-1] == pytest.approx(expected, rel=1e-3)


# ------------------------------------------------------------------ results as data
def test_conditions_are_arrays_and_flags_render_from_them():
    pump = SyringePump(rate=np.array([0.1, 5.0]) * ML_H, compliance=SYRINGE)
    r = simulate_infusion(
        _linear_line(),
        WATER,
        pump,
        occlusion=Occlusion(part=0, time=60.0, alarm_pressure=300 * MMHG, max_wait=1800.0),
    )
    assert set(r.conditions) <= set(TRANSIENT_CONDITIONS)
    assert r.conditions["no_alarm"].tolist() == [True, False]
    assert np.isinf(r.time_to_alarm[0]) and np.isnan(r.bolus_volume[0])
    meaning = TRANSIENT_CONDITIONS["no_alarm"].meaning
    assert f"{meaning} in 1 of 2 scenarios" in r.flags
    assert {c.severity for c in TRANSIENT_CONDITIONS.values()} <= set(SEVERITIES)
    assert "lumped-compliance" in r.models_used


def test_retrograde_flow_into_a_port_line_is_flagged():
    # the carrier's pressure pushes back into a drug line whose pump has not started
    drug = SyringePump(
        rate=RateProfile.constant(0.5 * ML_H, start=1200.0), compliance=Compliance(1e-9 / MMHG)
    )
    line = Line([Tube(inner_diameter=1e-3, length=0.5), Tube(inner_diameter=0.5e-3, length=1.0)])
    port = InjectionPort(
        boundary=1, pump=drug, line=Line([Tube(inner_diameter=0.5e-3, length=0.3)])
    )
    r = simulate_infusion(
        line, WATER, SyringePump(rate=5 * ML_H, compliance=SYRINGE), ports=[port], duration=1500.0
    )
    assert r.conditions["retrograde_flow"]
    assert r.conditions["diffusivity_assumed"]


# ------------------------------------------------------------------ bad input
def test_bad_setups_name_the_field():
    line = _linear_line()
    pump = SyringePump(rate=ML_H, compliance=SYRINGE)
    with pytest.raises(
        InputRangeError, match="occlusion part 3 is not one of the line's parts"
    ) as err:
        simulate_infusion(
            line, WATER, pump, occlusion=Occlusion(part=3, time=1.0, alarm_pressure=1e4)
        )
    assert err.value.field == "occlusion.part"
    with pytest.raises(InputRangeError, match="after the end of the run"):
        simulate_infusion(
            line,
            WATER,
            pump,
            duration=10.0,
            occlusion=Occlusion(part=0, time=20.0, alarm_pressure=1e4),
        )
    with pytest.raises(
        InputRangeError, match=r"ports\[0\] must be an InjectionPort joining at a boundary 0 to 1"
    ):
        simulate_infusion(line, WATER, pump, ports=[InjectionPort(boundary=4, pump=pump)])
    with pytest.raises(InputRangeError, match="transport 'mixed' is not known"):
        simulate_infusion(line, WATER, pump, transport="mixed")
    with pytest.raises(InputRangeError, match="pump must be a SyringePump"):
        simulate_infusion(line, WATER, 1e-9)
    with pytest.raises(InputRangeError, match="no pump ever runs"):
        simulate_infusion(line, WATER, SyringePump(rate=0.0, compliance=SYRINGE))
    fitting_line = Line(
        [Tube(inner_diameter=1e-3, length=1.0), Fitting(k=0.5, internal_volume=1e-8)]
    )
    with pytest.raises(InputRangeError, match="not a lumen"):
        simulate_infusion(
            fitting_line, WATER, pump, part_compliance={1: Compliance.per_metre(1e-15)}
        )
    with pytest.raises(InputRangeError, match="a port at the outlet needs its own line"):
        simulate_infusion(line, WATER, pump, ports=[InjectionPort(boundary=1, pump=pump)])
    k_only = Line([Fitting(k=0.5, inner_diameter=1e-3, internal_volume=1e-8)])
    with pytest.raises(InputRangeError, match="no laminar loss"):
        simulate_infusion(k_only, WATER, pump)
    stuck = SyringePump(rate=ML_H, break_loose_pressure=1e3)
    two_part = Line([Tube(inner_diameter=1e-3, length=1.0), Tube(inner_diameter=1e-3, length=1.0)])
    with pytest.raises(InputRangeError, match="break-loose pressure but no line"):
        simulate_infusion(two_part, WATER, pump, ports=[InjectionPort(boundary=1, pump=stuck)])
    with pytest.raises(InputRangeError, match="part_compliance"):
        simulate_infusion(line, WATER, pump, part_compliance={5: Compliance(1e-12)})
