"""Delivery time from a falling-head bag and a decaying pressure bag, against closed forms."""

import numpy as np
import pytest

from rheoline.errors import InputRangeError
from rheoline.model.delivery import falling_head_delivery_time, pressure_bag_delivery_time
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import GRAVITY, Line
from rheoline.model.parts import Catheter, MeasuredPart, Tube

WATER = newtonian_fluid("water", viscosity=1.0e-3, density=1000.0)
A = 1e9   # demo data: a purely linear part, dp = A Q  [Pa s/m^3]
LINEAR = Line([MeasuredPart(flows=[1e-6, 2e-6], pressure_drops=[A * 1e-6, A * 2e-6])])


def test_falling_head_closed_form():
    # linear resistance, Q = rho g h / A, head linear in delivered volume:
    # T = V A / (rho g (h_full - h_empty)) ln(h_full / h_empty)   (integrated by hand)
    v, hf, he = 1e-3, 1.2, 0.4
    r = falling_head_delivery_time(LINEAR, WATER, v, hf, he)
    exact = v * A / (1000.0 * GRAVITY * (hf - he)) * np.log(hf / he)
    assert r.time == pytest.approx(exact, rel=1e-9)
    assert r.initial_flow == pytest.approx(1000.0 * GRAVITY * hf / A)
    assert r.final_flow == pytest.approx(1000.0 * GRAVITY * he / A)


def test_pressure_decaying_in_time_closed_form():
    # Q = p0 exp(-t/tau) / A  =>  V(t) = p0 tau / A (1 - exp(-t/tau)),
    # T = -tau ln(1 - V A / (p0 tau))   (integrated by hand); beyond p0 tau / A: never
    p0, tau = 2e4, 60.0
    volumes = np.array([0.5e-3, 1.0e-3, 1.19e-3, 1.3e-3])
    r = pressure_bag_delivery_time(LINEAR, WATER, volumes, p0, time_constant=tau)
    exact = -tau * np.log(1 - volumes[:3] * A / (p0 * tau))
    assert np.allclose(r.time[:3], exact, rtol=1e-5)
    assert np.isinf(r.time[3])


def test_pressure_falling_with_volume():
    # p linear in delivered volume: T = V A / (p_full - p_empty) ln(p_full / p_empty)
    v, pf, pe = 1e-3, 4e4, 1e4
    r = pressure_bag_delivery_time(LINEAR, WATER, v, pf, pressure_empty=pe)
    assert r.time == pytest.approx(v * A / (pf - pe) * np.log(pf / pe), rel=1e-9)


def test_real_line_falling_head_between_constant_heads():
    # the falling-head time lies between the times at the constant full and empty heads
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18)])
    r = falling_head_delivery_time(line, WATER, 1e-3, 1.0, 0.6)
    fast = 1e-3 / line.solve(WATER, head=1.0).flow
    slow = 1e-3 / line.solve(WATER, head=0.6).flow
    assert fast < r.time < slow


def test_flow_stops_before_delivery():
    r = falling_head_delivery_time(LINEAR, WATER, 1e-3, 1.0, 0.2, back_pressure=5000.0)
    assert np.isinf(r.time)


def test_bad_delivery_input():
    with pytest.raises(InputRangeError, match="volume must be greater than 0"):
        falling_head_delivery_time(LINEAR, WATER, 0.0, 1.0, 0.5)
    with pytest.raises(InputRangeError, match="exactly one decay law"):
        pressure_bag_delivery_time(LINEAR, WATER, 1e-3, 2e4)
