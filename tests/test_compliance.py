"""Compliance laws, pump rate profiles and slack: closed forms, round trips and bad input."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import quad

from rheoline.errors import InputRangeError
from rheoline.model.compliance import (
    LIQUID_COMPRESSIBILITY,
    Compliance,
    SyringePump,
    VolumeLaw,
    linear_bolus,
    linear_rise_time,
    linear_time_to_alarm,
    plunger_pressure,
)
from rheoline.model.rate_profile import RateProfile

ML_H = 1e-6 / 3600.0
MMHG = 133.322  # NIST SP 811


def test_liquid_compressibility_against_iapws_95():
    # IAPWS-95 through the reference library iapws (Wagner & Pruss 2002): kappa [1/MPa]
    iapws = pytest.importorskip("iapws")
    for t_c in (20.0, 25.0, 37.0):
        kappa = iapws.IAPWS95(T=273.15 + t_c, P=0.101325).kappa * 1e-6  # 1/Pa
        assert LIQUID_COMPRESSIBILITY == pytest.approx(kappa, rel=0.025)


def test_table_law_volume_is_the_integral_of_compliance():
    # V(p) = int_0^p C dp' with C piecewise linear (compared with scipy's quad)
    table = Compliance.per_metre(
        pressures=[-1e4, 0.0, 2e4, 6e4], values=[3e-15, 2e-15, 1e-15, 5e-16]
    )
    law = table.law(length=1.5)
    for p in (-2e4, -5e3, 0.0, 1e4, 2e4, 4e4, 9e4):
        expected, _ = quad(lambda x: float(law.compliance(x)), 0.0, p, points=[-1e4, 0, 2e4, 6e4])
        assert float(law.volume(p)) == pytest.approx(expected, rel=1e-10, abs=1e-25)


@settings(max_examples=60, deadline=None)
@given(
    st.lists(st.floats(1e-16, 1e-10), min_size=2, max_size=5),
    st.floats(-5e4, 3e5),
)
def test_table_law_pressure_inverts_volume(values, pressure):
    pressures = np.linspace(-1e4, 1e5, len(values))
    law = Compliance(pressures=pressures, values=values).law()
    assert float(law.pressure(law.volume(pressure))) == pytest.approx(pressure, rel=1e-9, abs=1e-6)


def test_laws_add_on_the_union_of_breakpoints():
    a = Compliance(pressures=[0.0, 1e4], values=[2e-12, 1e-12]).law()
    b = VolumeLaw.constant(np.array([1e-12, 3e-12]))
    total = a + b
    p = np.array([[5e3], [2e4]])
    assert np.allclose(total.volume(p), a.volume(p) + b.volume(p), rtol=1e-12)


def test_linear_closed_forms():
    # one compliance C behind a linear resistance R: C dp/dt = Q - p/R (exact solution)
    r, c = 2e11, 3e-12
    assert linear_rise_time(r, c) == pytest.approx(r * c * np.log(10.0))
    assert linear_rise_time(r, c, 0.5) == pytest.approx(r * c * np.log(2.0))
    q = 1.0 * ML_H
    assert linear_time_to_alarm(c, 500 * MMHG, 5 * MMHG, q) == pytest.approx(c * 495 * MMHG / q)
    assert linear_bolus(c, 500 * MMHG, 10 * MMHG) == pytest.approx(c * 490 * MMHG)


def test_plunger_pressure_is_force_over_bore_area():
    # definition of pressure: F / (pi D^2 / 4)
    assert plunger_pressure(5.0, 20e-3) == pytest.approx(5.0 / (np.pi * 0.02**2 / 4))


def test_rate_profile_steps_ramps_and_volume():
    p = RateProfile.from_points([0.0, 600.0, 600.0, 1200.0], [0.0, 2 * ML_H, ML_H, ML_H])
    assert p.rate(300.0) == pytest.approx(ML_H)  # half-way up the ramp
    assert p.rate(600.0) == pytest.approx(ML_H)  # the step is right-continuous
    assert p.volume(600.0) == pytest.approx(0.5 * 600 * 2 * ML_H)
    assert p.volume(1800.0) == pytest.approx(600 * ML_H + 1200 * ML_H)
    for v in (1e-9, 1e-7, 5e-7):
        assert p.volume(p.time_at_volume(v)) == pytest.approx(v, rel=1e-12)
    assert np.isinf(RateProfile.steps([0.0, 60.0], [ML_H, 0.0]).time_at_volume(1.0))
    changes = p.changes()
    assert [float(c.start) for c in changes] == [0.0, 600.0]


def test_rate_profile_vectorized_rates_and_slack():
    rates = np.array([0.5, 1.0, 5.0]) * ML_H
    p = RateProfile.constant(rates, start=10.0)
    slack = 0.1e-6
    eff = p.after_volume(slack)
    t_take = 10.0 + slack / rates
    assert np.allclose(eff.rate(t_take - 1e-6), 0.0)
    assert np.allclose(eff.rate(t_take + 1e-6), rates)
    late = 1e5
    assert np.allclose(p.volume(late) - eff.volume(late), slack, rtol=1e-9)


def test_syringe_pump_effective_rate_and_defaults():
    pump = SyringePump(rate=2 * ML_H, slack_volume=0.2e-6)
    assert pump.effective_rate().time_at_volume(1e-12) == pytest.approx(
        (0.2e-6 + 1e-12) / (2 * ML_H)
    )
    assert pump.compliance is None and pump.head == 0.0


def test_bad_compliance_and_profiles_are_named():
    with pytest.raises(InputRangeError, match="exactly one of value"):
        Compliance()
    with pytest.raises(InputRangeError, match="strictly increase"):
        Compliance(pressures=[0.0, 0.0, 1.0], values=[1e-12, 1e-12, 1e-12])
    with pytest.raises(InputRangeError, match="compliance values must be greater than 0"):
        Compliance(pressures=[0.0, 1.0], values=[1e-12, 0.0])
    with pytest.raises(InputRangeError, match="compliance must be 0 m\\^3/Pa or more"):
        Compliance(-1e-12)
    with pytest.raises(InputRangeError, match="per metre"):
        Compliance.per_metre(1e-15).law()
    with pytest.raises(InputRangeError, match="must not decrease"):
        RateProfile.from_points([0.0, 10.0, 5.0], [0.0, 1e-9, 1e-9])
    with pytest.raises(InputRangeError, match="rates must be 0 m\\^3/s or more"):
        RateProfile.steps([0.0], [-1e-9])
    with pytest.raises(InputRangeError, match="lumped"):
        SyringePump(rate=1e-9, compliance=Compliance.per_metre(1e-15))
    with pytest.raises(InputRangeError, match="wrap the number"):
        SyringePump(rate=1e-9, compliance=1e-11)
    err = pytest.raises(InputRangeError, Compliance, value=-1.0)
    assert err.value.field == "compliance"
