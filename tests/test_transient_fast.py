"""The time solve's faster paths give the full solve's numbers: a set rate or a valve that
changes at an interval's end taken there as its left limit.

The reference here is the same engine solving afresh; the physics of every figure is checked
against closed forms and published data in test_transient.py and test_transient_stiff.py."""

import numpy as np

from rheoline.model import line_dynamics as dyn
from rheoline.model.compliance import Compliance, SyringePump
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import Line
from rheoline.model.parts import Tube
from rheoline.model.rate_profile import RateProfile
from rheoline.model.transient import Occlusion, simulate_infusion

ML_H = 1e-6 / 3600.0
MMHG = 133.322  # NIST SP 811
WATER = newtonian_fluid("test water", viscosity=1.0e-3, density=1000.0)


def _solve(alarm_mmhg=300.0, part=0, occluded_at=1800.0, release=None, break_mmhg=0.0):
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
    return simulate_infusion(line, WATER, pump, occlusion=occlusion)


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
