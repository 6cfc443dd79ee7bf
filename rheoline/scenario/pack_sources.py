"""What a review pack says about its basis: the cautions and the run's notes."""

from __future__ import annotations

__all__ = ["cautions_list", "run_notes"]

#: Hazards that no flow estimate accounts for; every pack lists them.
_HAZARDS = (
    "Air embolism: pressure bags, infusers and emptying bags can push air into a vein; "
    "nothing here accounts for air in the line.",
    "Extravasation: higher pressure makes infiltration worse and is not visible in a flow "
    "estimate.",
    "Over-pressure: compare the required pressure with the rating of every part; rheoline "
    "knows only the limit you give.",
    "Occlusion: kinks, clots, closed clamps and clogged filters are not modelled.",
    "Flagged results (turbulent or transitional flow, developing flow, correlations outside "
    "their range) need a bench test.",
    "Catalogue dimensions are typical nominal values, not a particular maker's; some are "
    "recalled from memory.",
)


def run_notes(run) -> list[str]:
    """The run's notes from the models as sentences, one per note, scenario named first."""
    return [str(n) for n in getattr(run, "warnings", ())]


def cautions_list(run, caution: str) -> list[str]:
    """The cautions of a pack: the short caution, the hazards, and this run's notes."""
    items = [caution, *_HAZARDS[:3]]
    items += [
        "Hemolysis: the indicator is a screening flag from a laboratory correlation "
        "(Giersiepen 1990), not a prediction in a patient.",
        "Cold blood products flow far more slowly and can cool a patient; warm only with "
        "approved warmers and per protocol.",
        *_HAZARDS[3:],
    ]
    items += [f"This run: {note}" for note in run_notes(run)]
    return items
