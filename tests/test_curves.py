"""Flow curves for candidate lines."""

import numpy as np
import pytest

import rheoline
from rheoline.errors import InputRangeError
from rheoline.model.curves import flow_curves
from rheoline.model.line import Line
from rheoline.model.parts import Catheter, Tube

WATER = rheoline.fluid("water", temperature_c=22.0)
LINES = {
    "18G": Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18)]),
    "22G": Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=22)]),
}


def test_flow_vs_head_matches_single_solves():
    heads = np.array([0.3, 0.9, 1.5])
    curves = flow_curves(LINES, WATER, over="head", values=heads)
    for label, line in LINES.items():
        assert np.all(np.diff(curves.flows[label]) > 0)
        assert curves.flows[label][1] == pytest.approx(line.solve(WATER, head=0.9).flow, rel=1e-9)
    assert set(curves.table["line"]) == {"18G", "22G"}
    assert "head [m]" in curves.table.columns


def test_flow_vs_diameter_temperature_hematocrit():
    d = flow_curves(LINES, WATER, over="inner_diameter", values=[0.5e-3, 0.8e-3, 1.1e-3], head=1.0)
    assert np.all(np.diff(d.flows["22G"]) > 0)
    t = flow_curves(LINES, WATER, over="temperature_c", values=[5.0, 22.0, 37.0], head=1.0)
    assert np.all(np.diff(t.flows["18G"]) > 0)  # warmer water is thinner (IAPWS 2008)
    blood = rheoline.fluid("whole-blood", hematocrit=0.45, temperature_c=37.0)
    h = flow_curves(LINES, blood, over="hematocrit", values=[0.2, 0.4, 0.6], head=1.0)
    assert np.all(np.diff(h.flows["18G"]) < 0)  # more cells, more viscous


def test_bad_curve_input():
    with pytest.raises(InputRangeError, match="over 'length' is not a curve variable"):
        flow_curves(LINES, WATER, over="length", values=[1.0])
    with pytest.raises(InputRangeError, match="is not a lumen of the line"):
        flow_curves(LINES, WATER, over="inner_diameter", values=[1e-3], part="pump")
    with pytest.raises(InputRangeError, match="hematocrit curve needs a blood fluid"):
        flow_curves(LINES, WATER, over="hematocrit", values=[0.3])
