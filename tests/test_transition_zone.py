"""The transition-zone flag (issue 13): near the laminar-turbulent transition a warmer or
thinner fluid can flow less; such a case is never reported without a word."""

from __future__ import annotations

import warnings

import numpy as np

import rheoline
from rheoline import Catheter, Line, Needle, Tube
from rheoline.model.conditions import CONDITIONS
from rheoline.model.friction import (
    LAMINAR_LIMIT_REYNOLDS,
    TRANSITION_ZONE_REYNOLDS,
    TURBULENT_LIMIT_REYNOLDS,
)
from rheoline.scenario.reading import loads_scenarios
from rheoline.scenario.run import run_scenarios

_LINES = {
    "tube 4 mm x 3 m": [Tube(inner_diameter=4e-3, length=3.0)],
    "set + 18G": [Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18)],
    "set + 14G": [Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=14)],
    "tube + 16G needle": [Tube(inner_diameter=2e-3, length=0.5), Needle(gauge=16)],
}


def test_the_zone_is_1800_up_to_turbulent():
    # common practice, no source: 1800 (below the 2300 called laminar), up to 4000
    assert TRANSITION_ZONE_REYNOLDS == 1800.0
    assert TRANSITION_ZONE_REYNOLDS < LAMINAR_LIMIT_REYNOLDS < TURBULENT_LIMIT_REYNOLDS
    assert CONDITIONS["transition_zone"].per_part


def test_warming_water_near_the_transition_flows_less_and_is_flagged():
    # the case: water warmed from 22 to 37 degC in a 4 mm x 3 m tube under 40 cm
    # flows some 12 % less (the friction blend rises as Re passes 2300); both are flagged
    line = Line(_LINES["tube 4 mm x 3 m"])
    cold = line.solve(rheoline.fluid("water", temperature_c=22), head=0.40)
    warm = line.solve(rheoline.fluid("water", temperature_c=37), head=0.40)
    assert warm.flow < 0.93 * cold.flow
    assert cold.conditions["transition_zone"] and warm.conditions["transition_zone"]
    assert warm.part_conditions["transition_zone"][0]


def test_laminar_case_near_transition_says_so_in_its_flags():
    # printed "laminar" (Re below 2300) but in the zone: the flags say it in words
    line = Line(_LINES["set + 18G"])
    r = line.solve(rheoline.fluid("water", temperature_c=22), head=1.0)
    assert r.regime == "laminar" and r.max_reynolds > TRANSITION_ZONE_REYNOLDS
    assert r.conditions["transition_zone"]
    assert any("near the transition" in f and "18G catheter" in f for f in r.flags)
    calm = line.solve(rheoline.fluid("water", temperature_c=22), head=0.3)
    assert not calm.conditions["transition_zone"]
    assert not any("near the transition" in f for f in calm.flags)


def test_glycerol_thinned_mix_flows_less_and_is_flagged():
    # a little less glycerol (a thinner fluid) in the zone: lower flow, flagged
    line = Line(_LINES["tube 4 mm x 3 m"])
    heads = np.linspace(0.2, 1.5, 120)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        thick = line.solve(rheoline.fluid("glycerol-water", mass_fraction=0.10), head=heads)
        thin = line.solve(rheoline.fluid("glycerol-water", mass_fraction=0.05), head=heads)
    slower = thin.flow < thick.flow
    assert slower.any()
    assert thin.conditions["transition_zone"][slower].all()


def test_a_warmer_fluid_is_never_slower_without_the_flag():
    # four lines, heads 5 cm - 5 m, water from 5 to 42 degC in 3 degC steps: wherever the
    # warmer case flows less, it carries the transition-zone condition
    heads = np.linspace(0.05, 5.0, 400)
    slower_cases = 0
    for parts in _LINES.values():
        line = Line(parts)
        for t in range(5, 40, 3):
            r1 = line.solve(rheoline.fluid("water", temperature_c=t), head=heads)
            r2 = line.solve(rheoline.fluid("water", temperature_c=t + 3), head=heads)
            slower = r2.flow < r1.flow
            slower_cases += int(slower.sum())
            assert r2.conditions["transition_zone"][slower].all()
    assert slower_cases > 100  # the check has cases to bite on


def test_run_table_flags_the_zone():
    text = """
format_version = 1
[[scenario]]
name = "warming"
fluid = "water"
temperature = ["15 degC", "37 degC"]
head = "40 cm"
[[scenario.part]]
type = "tube"
label = "long tube"
inner_diameter = "4 mm"
length = "3 m"
[[scenario.part]]
type = "tube"
label = "calm tube"
inner_diameter = "8 mm"
length = "0.1 m"
"""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        run = run_scenarios(loads_scenarios(text, "warming.toml"))
    t = run.table
    assert t["transition zone"].tolist() == [True, True]
    flows = t["flow [mL/min]"].tolist()
    assert flows[1] < 0.95 * flows[0]
    assert t["regime"].tolist() == ["laminar", "transitional"]
    cold_flags = run.flags[t["case"].iloc[0]]
    # 15 degC: Re 1800-2300 in the long tube, printed laminar (the calm tube is far below);
    # at 37 degC the same line flows some 6 % less
    assert any("near transition" in f and "long tube" in f for f in cold_flags)
    assert not any("calm tube" in f for f in cold_flags)
