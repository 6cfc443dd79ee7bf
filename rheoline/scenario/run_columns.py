"""The scenario run's vocabulary: the columns of its tables and the words of its flags.

:data:`TABLE_COLUMNS` (one row per case) and :data:`PART_COLUMNS` (one row per case and
part) name every column :func:`rheoline.scenario.run.run_scenarios` fills, units in the
names; :data:`FLAG_WORDS` holds the words of each condition a row may flag, and
:func:`render_flags` renders them from a case's data (the one place sentences are made).
"""

from __future__ import annotations

from rheoline.model.friction import LAMINAR_LIMIT_REYNOLDS, TRANSITION_ZONE_REYNOLDS
from rheoline.scenario.transient_step import FLAG_WORDS as TRANSIENT_FLAG_WORDS
from rheoline.scenario.transient_step import TRANSIENT_COLUMNS

__all__ = ["TABLE_COLUMNS", "PART_COLUMNS", "FLAG_WORDS", "render_flags"]

TABLE_COLUMNS = [
    "case",
    "scenario",
    "point",
    "fluid",
    "temperature [degC]",
    "drive",
    "gauge",
    "smallest bore [mm]",
    "head [cm]",
    "source pressure [mmHg]",
    "back pressure [mmHg]",
    "flow [mL/min]",
    "flow [mL/h]",
    "required pressure [mmHg]",
    "pressure limit [mmHg]",
    "over pressure limit",
    "max Reynolds number",
    "regime",
    "transition zone",
    "dominant part",
    "dominant share [%]",
    "max wall shear stress [Pa]",
    "hemolysis index [%]",
    "hemolysis concern",
    "flow p5 [mL/min]",
    "flow p95 [mL/min]",
    "pressure p5 [mmHg]",
    "pressure p95 [mmHg]",
    "dominant tolerance",
    "flow model low [mL/min]",
    "flow model high [mL/min]",
    "pressure model low [mmHg]",
    "pressure model high [mmHg]",
    "model band driver",
    "time to deliver [min]",
    "catheter-to-vein ratio [-]",
    "reversed flow [mL/min]",
    "reversed branch",
    *TRANSIENT_COLUMNS,
    "flags",
]
PART_COLUMNS = [
    "case",
    "part",
    "kind",
    "inner diameter [mm]",
    "length [m]",
    "reynolds",
    "regime",
    "pressure drop [Pa]",
    "pressure drop [mmHg]",
    "share [%]",
    "mean velocity [m/s]",
    "wall shear stress [Pa]",
    "wall shear rate [1/s]",
    "entrance length [m]",
]

#: The words of each condition in a row's ``flags``, in the order they are shown; a
#: callable renders words from the case's data (the parts concerned, the ratio).
FLAG_WORDS = {
    "backflow_into_source": lambda d: _backflow_words(d["backflow"]),
    "reversed_flow": lambda d: f"reversed flow in {', '.join(d['reversed'])}",
    "check_valve_closed": lambda d: f"check valve closed in {', '.join(d['closed'])}",
    "pump_blocked": lambda d: (
        f"pump occluded at {', '.join(d['blocked'])}: a check valve is closed against its set "
        "flow (no solution with it; shown with the pump delivering nothing, its pressure "
        "left empty)"
    ),
    "turbulent": lambda d: f"turbulent: {', '.join(d['turbulent'])}",
    "transitional": lambda d: f"transitional: {', '.join(d['transitional'])}",
    "transition_zone": lambda d: (
        f"laminar near transition (Re {TRANSITION_ZONE_REYNOLDS:.0f}-"
        f"{LAMINAR_LIMIT_REYNOLDS:.0f}), a warmer or thinner fluid may flow less: "
        f"{', '.join(d['transition_zone'])}"
    ),
    "over_pressure_limit": "over pressure limit",
    "hemolysis_concern": "hemolysis concern",
    "hemolysis_extrapolated": "hemolysis index extrapolated",
    "no_forward_flow": "no forward flow",
    "never_delivers": "never delivers the whole volume: the flow stops first (the drive "
    "falls to the back pressure)",
    "delivery_not_computed": "time to deliver not computed",
    "implausible": "physically implausible (velocity or pressure beyond any line)",
    "measured_extrapolated": "measured part used outside its bench flows",
    "not_converged": "solver not converged",
    "large_catheter": lambda d: f"catheter fills {d['ratio']:.0%} of the vein diameter",
    "outside_range": "outside a correlation's range (see notes)",
    **TRANSIENT_FLAG_WORDS,  # the time solve's, in the model's words
}


def _backflow_words(backflow):
    """'12.3 mL/min pushed back into saline bag by syringe pump' per bag or source."""
    return "; ".join(
        f"{q:.3g} mL/min pushed back into {node}" + (f" by {' and '.join(by)}" if by else "")
        for node, q, by in backflow
    )


def render_flags(conditions, data, col):
    """The flags of point ``col`` (a tuple of words), in :data:`FLAG_WORDS` order, for each
    condition that holds there; ``data`` gives what a callable's words name."""
    return tuple(
        words(data) if callable(words) else words
        for key, words in FLAG_WORDS.items()
        if key in conditions and conditions[key][col]
    )
