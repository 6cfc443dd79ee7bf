"""What a review pack says about its basis: the models the run used, and the cautions.

The assumptions-and-references sheet (CSV/XLSX sheet ``assumptions``, the HTML report's
"Models used" section) is generated from the run's ``models_used`` (the provenance keys of
every model result of the run, in first-use order) and the provenance registry
(:data:`rheoline.model.provenance.REGISTRY`): one row per entry the run actually used, with
its title, its role here, the full reference, the DOI where one exists, the validity range
and whether its values were recalled rather than read.  Nothing is listed that the run did
not compute: a saline-only run names no blood model, no Pries correction and no hemolysis
law.

The cautions are the short caution, the hazards every estimate shares, the ones that
concern red cells only when the run had a fluid with red cells, and this run's notes.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping

__all__ = ["ASSUMPTION_COLUMNS", "assumptions_table", "cautions_list", "run_notes"]

#: The columns of the assumptions sheet.
ASSUMPTION_COLUMNS = (
    "model",
    "title",
    "role",
    "reference",
    "DOI",
    "validity",
    "recalled values",
)

#: The hemolysis law, used for every fluid with red cells and for no other (contract B):
#: its presence in ``models_used`` is how a pack knows the run had red cells.
_RED_CELL_LAW = "giersiepen-1990"

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


def _registry(registry):
    if registry is not None:
        return registry
    from rheoline.model.provenance import REGISTRY

    return REGISTRY


def assumptions_table(models_used: Iterable[str], registry: Mapping | None = None):
    """The assumptions and references of a run: one row per model it used.

    Parameters
    ----------
    models_used : iterable of str
        Provenance keys, in first-use order (a key given twice is listed once).
    registry : mapping of str to ModelEntry, optional
        The provenance registry (default :data:`rheoline.model.provenance.REGISTRY`).

    Returns
    -------
    pandas.DataFrame
        Columns :data:`ASSUMPTION_COLUMNS`; ``DOI`` is empty where the work has none and
        ``recalled values`` says "from memory" where the entry's values were recalled
        rather than read from the source.

    Raises
    ------
    KeyError
        When a key is not in the registry (a defect: every model a result records is
        registered), naming the key.
    """
    import pandas as pd

    entries = _registry(registry)
    rows = []
    for key in dict.fromkeys(models_used):
        try:
            entry = entries[key]
        except KeyError:
            raise KeyError(
                f"the run used model {key!r}, which the provenance registry does not hold"
            ) from None
        rows.append(
            [
                entry.key,
                entry.title,
                entry.role,
                entry.reference,
                entry.doi or "",
                entry.validity,
                "from memory: verify before relying on it" if entry.recalled else "",
            ]
        )
    return pd.DataFrame(rows, columns=list(ASSUMPTION_COLUMNS))


def run_notes(run) -> list[str]:
    """The run's notes from the models as sentences, one per note, scenario named first."""
    return list(run.warnings)


def cautions_list(run, caution: str, registry: Mapping | None = None) -> list[str]:
    """The cautions of a pack: the short caution, the hazards, and this run's notes.

    The hemolysis and cold-blood cautions appear only when the run had a fluid with red
    cells (its ``models_used`` holds the hemolysis law, named from its registry entry).
    """
    items = [caution, *_HAZARDS]
    if _RED_CELL_LAW in run.models_used:
        law = _registry(registry)[_RED_CELL_LAW]
        items += [
            f"Hemolysis: the indicator is a screening flag from a laboratory correlation "
            f"({law.title}), not a prediction in a patient.",
            "Cold blood products flow far more slowly and can cool a patient; warm only with "
            "approved warmers and per protocol.",
        ]
    items += [f"This run: {note}" for note in run_notes(run)]
    return items
