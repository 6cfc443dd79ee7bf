"""The comparison's candidates: the lines of the scenario set, each at one point.

A candidate is one scenario of the set (a :class:`~rheoline.widgets.document.ScenarioDocument`)
at one point of its part sweeps: a scenario that sweeps its catheter gauge over four values
gives four candidates, one line each.  Its other sweeps (fluid, temperature, head) are shown
at their first point.  Scenarios with a prescribed flow (a pump) are not candidates: the
comparison sweeps a gravity or pressure drive, and the line view shows them.

The comparison's shared controls show the first candidate's inputs and, when changed, set
that field in every scenario the comparison draws (:func:`with_shared`); each candidate is
drawn at its own inputs, and :func:`differences` names where one differs from what the
controls show.  Nothing here computes physics.

Examples
--------
>>> from rheoline.scenario.reading import example_path, load_scenarios
>>> found = find_candidates(load_scenarios(example_path("bench-sweep")).scenarios)
>>> [c.name for c in found.shown][:2], len(found.shown), len(found.hidden)
(['water, gauge x height 14G', 'water, gauge x height 16G'], 6, 0)
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, field

from rheoline.scenario.description import DEFAULT_TEMPERATURE_C, Scenario
from rheoline.widgets.base import CONTROL_FIELDS
from rheoline.widgets.edits import (
    at_point,
    first_si,
    parsed,
    part_with_tolerance,
    shown_amount,
    sweep_notes,
    unshown_fields,
    with_fields,
    with_part,
    with_tolerance,
    written,
)
from rheoline.widgets.line_view import SHOWN_FIELDS, fluid_options
from rheoline.widgets.parts_editor import part_spec, sized_part_index

__all__ = [
    "Candidate",
    "Found",
    "MAX_SHOWN_CANDIDATES",
    "SHARED",
    "DRAWN_FIELDS",
    "DEFAULT_SET_PART",
    "find_candidates",
    "shared_amounts",
    "with_shared",
    "shared_scenario",
    "differences",
    "not_drawn",
    "sweep_words",
    "default_candidates",
]

#: Most candidates the comparison draws; the status line names the others.
MAX_SHOWN_CANDIDATES = 7
#: shared control -> the scenario field it shows and sets.
SHARED = {
    **CONTROL_FIELDS,
    "temperature_tolerance_c": "tolerance.temperature",
    "bore_tolerance_percent": "tolerance of the sized part's bore",
}
#: The scenario fields a candidate is drawn with (the others are named as not drawn).
DRAWN_FIELDS = (SHOWN_FIELDS - {"notes", "flow", "pressure_limit"}) | {"tolerance.temperature"}
#: The 3.0 mm x 1.8 m administration set in front of a new candidate (invented demo part).
DEFAULT_SET_PART = part_spec("tube", "administration set", inner_diameter="3.0 mm", length="180 cm")


@dataclass(frozen=True)
class Candidate:
    """One line the comparison draws.

    Attributes
    ----------
    name : str
        How the chart and table name it: the scenario's name, and the point of its part
        sweeps (``"gravity 14G"``).
    scenario : str
        The name of its scenario in the set.
    chosen : tuple
        ``((path, index), ...)`` of its point in the scenario's part sweeps.
    description : Scenario
        The scenario at that point (its other sweeps at their first point), for computing.
    source : Scenario
        The scenario as the set holds it.
    """

    name: str
    scenario: str
    chosen: tuple = ()
    description: Scenario = field(default=None, compare=False)
    source: Scenario = field(default=None, compare=False, repr=False)

    @property
    def parts(self):
        """The candidate's parts (PartSpecs), source to outlet."""
        return self.description.parts


@dataclass(frozen=True)
class Found:
    """The candidates of a set: those drawn, those beyond :data:`MAX_SHOWN_CANDIDATES`
    (names), and the pump scenarios and branched scenarios (names) that are not
    candidates."""

    shown: tuple
    hidden: tuple
    pumps: tuple
    networks: tuple = ()


def _points(sc):
    """The points of a scenario's part sweeps: ``[(suffix, chosen), ...]``."""
    axes = [(p, a) for p, a in sc.axes if p.startswith("part[")]
    if not axes:
        return [("", ())]
    out = []
    for idx in itertools.product(*(range(len(a)) for _, a in axes)):
        suffix = " ".join(str(a.shown[i]) for (_, a), i in zip(axes, idx, strict=True))
        out.append((f" {suffix}", tuple((p, i) for (p, _), i in zip(axes, idx, strict=True))))
    return out


def find_candidates(scenarios, limit: int = MAX_SHOWN_CANDIDATES) -> Found:
    """The candidates of ``scenarios`` (file order, then sweep order), the first ``limit``
    drawn."""
    found, pumps, networks, names = [], [], [], set()
    for sc in scenarios:
        if sc.topology is not None:  # the network view draws these
            networks.append(sc.name)
            continue
        if sc.mode == "flow":
            pumps.append(sc.name)
            continue
        for suffix, chosen in _points(sc):
            name, k = sc.name + suffix, 2
            while name in names:
                name, k = f"{sc.name}{suffix} #{k}", k + 1
            names.add(name)
            found.append(Candidate(name, sc.name, chosen, at_point(sc, dict(chosen)), sc))
    hidden = tuple(c.name for c in found[limit:])
    return Found(tuple(found[:limit]), hidden, tuple(pumps), tuple(networks))


# --------------------------------------------------------------------------- shared inputs
def shared_amounts(candidate: Candidate, bore_fraction: float = 0.0) -> dict:
    """What the shared controls show for ``candidate``: ``{control: amount}``.

    ``bore_fraction`` is its sized part's bore tolerance as a fraction of the nominal bore
    (the solver knows the nominal bore of a catalogue part).
    """
    sc = candidate.description
    values = {k: first_si(v) for g in sc.groups() for k, v in g.items()}
    defaults = {"temperature": DEFAULT_TEMPERATURE_C, **fluid_options(values["fluid"])}
    out = {"fluid": values["fluid"]}
    for control, key in SHARED.items():
        if key in ("fluid",) or key.startswith("tolerance"):
            continue
        blank = None if key in ("hematocrit", "mass_fraction") else 0.0  # not an option: None
        value = values.get(key, defaults.get(key, blank))
        out[control] = None if value is None else shown_amount(key, value)
    tolerance = sc.tolerance.get("temperature", 0.0) if sc.tolerance else 0.0
    out["temperature_tolerance_c"] = float(tolerance)
    out["bore_tolerance_percent"] = float(f"{100 * bore_fraction:.12g}")
    return out


def differences(candidate: Candidate, shown: dict, bore_fraction: float = 0.0) -> list:
    """Where ``candidate``'s inputs differ from what the shared controls show: phrases
    such as ``"source pressure 300 mmHg"``."""
    own = shared_amounts(candidate, bore_fraction)
    words = {
        "fluid": ("fluid", ""),
        "temperature_c": ("temperature", " degC"),
        "hematocrit": ("hematocrit", ""),
        "mass_fraction": ("mass fraction", ""),
        "head_cm": ("head", " cm"),
        "source_pressure_mmhg": ("source pressure", " mmHg"),
        "back_pressure_mmhg": ("back pressure", " mmHg"),
        "temperature_tolerance_c": ("temperature tolerance", " degC"),
        "bore_tolerance_percent": ("bore tolerance", " %"),
    }
    out = []
    for control, (word, unit) in words.items():
        mine = own.get(control)
        if mine is not None and mine != shown.get(control):
            if control in ("hematocrit", "mass_fraction") and own["fluid"] != shown.get("fluid"):
                continue  # the fluid differs already
            text = f"{mine:g}" if isinstance(mine, float) else str(mine)
            out.append(f"{word} {text}{unit}")
    return out


def with_shared(sc: Scenario, control: str, amount, amounts: dict) -> Scenario:
    """``sc`` with the field a shared control shows set to ``amount`` (``amounts`` holds
    every shared control's amount, for the options of a newly chosen fluid)."""
    key = SHARED[control]
    if control == "fluid":
        options = fluid_options(amount)
        fields = {
            k: parsed(k, amounts[k]) if k in options else None
            for k in ("hematocrit", "mass_fraction")
        }
        return with_fields(sc, fluid=parsed("fluid", amount), **fields)
    if control in ("hematocrit", "mass_fraction"):
        name = first_si(sc.fluid.name)
        return with_fields(sc, **{key: parsed(key, amount)}) if key in fluid_options(name) else sc
    if control == "temperature_tolerance_c":
        value = parsed(key, written(key, amount)) if amount else None
        return with_tolerance(sc, "temperature", value)
    if control == "bore_tolerance_percent":
        try:
            index = sized_part_index(sc.parts)
        except ValueError:
            return sc  # no lumen to give a bore tolerance
        return with_part(sc, index, part_with_tolerance(sc.parts[index], "inner_diameter", amount))
    return with_fields(sc, **{key: parsed(key, written(key, amount))})


def shared_scenario(name: str, parts, amounts: dict) -> Scenario:
    """A new scenario called ``name`` with ``parts`` and the shared controls' inputs
    (a zero source or back pressure and a zero tolerance are left out)."""
    from rheoline.scenario.description import DriveSpec, FluidSpec

    sc = Scenario(name, FluidSpec(parsed("fluid", amounts["fluid"])), DriveSpec(), tuple(parts))
    sc = with_shared(sc, "fluid", amounts["fluid"], amounts)
    for control in ("temperature_c", "head_cm"):
        sc = with_shared(sc, control, amounts[control], amounts)
    for control in (
        "source_pressure_mmhg",
        "back_pressure_mmhg",
        "temperature_tolerance_c",
        "bore_tolerance_percent",
    ):
        if amounts[control]:
            sc = with_shared(sc, control, amounts[control], amounts)
    return sc


def default_candidates(amounts: dict, gauges=(16, 18, 20)) -> tuple:
    """The invented starting candidates: catheters of ``gauges`` behind the same set."""
    return tuple(
        shared_scenario(f"set + {g}G", (DEFAULT_SET_PART, part_spec("catheter", gauge=g)), amounts)
        for g in gauges
    )


# --------------------------------------------------------------------------- what is not drawn
def not_drawn(candidate: Candidate) -> list:
    """The fields of ``candidate``'s scenario the comparison does not use, as phrases: the
    scenario fields outside :data:`DRAWN_FIELDS` and the part tolerances other than the
    sized part's bore (a band covers that bore and the temperature only)."""
    sc = candidate.description
    out = unshown_fields(sc, DRAWN_FIELDS)
    try:
        sized = sized_part_index(sc.parts)
    except ValueError:
        sized = None
    for i, part in enumerate(sc.parts):
        for key, width in part.tolerance.items():
            if i != sized or key != "inner_diameter":
                text = width.written if width.written is not None else width.width
                out.append(f"part[{i + 1}].tolerance.{key} {text}")
    return out


def sweep_words(candidate: Candidate) -> list:
    """The sweeps of ``candidate``'s scenario other than its part sweeps, shown at their
    first point: ``["head 80 cm (1 of 2)"]``."""
    chosen = dict(candidate.chosen)
    sc = candidate.source
    notes = sweep_notes(sc, chosen)
    return [note for (path, _), note in zip(sc.axes, notes, strict=True) if path not in chosen]
