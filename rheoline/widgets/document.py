"""The scenario set the views show and edit: one description for every view.

A :class:`ScenarioDocument` holds one :class:`~rheoline.scenario.description.ScenarioSet`.
The line view edits one of its scenarios, the comparison view compares them, and the files
view loads a file into it, saves it and writes its review pack.  Each view observes the
document and redraws when another view changed it, so no view keeps a copy of its own and
no view reaches into another.

Every edit goes through the scenario file's own writer and reader
(:func:`rheoline.scenario.writing.scenario_data`,
:func:`rheoline.scenario.reading.parse_scenarios`): an edit the file format would refuse (a
pump flow next to a head, a tube without a bore) is refused with the reader's message, and
what the document holds is exactly what a saved file reads back to.  Nothing a file gave is
dropped by showing it: loading a file and saving it again gives an equal set.

Examples
--------
>>> from rheoline.scenario.reading import example_path, load_scenarios
>>> doc = ScenarioDocument(load_scenarios(example_path("minimal")))
>>> doc.names()
['18G on a gravity set']
>>> doc.scenario_set == load_scenarios(example_path("minimal"))
True
"""

from __future__ import annotations

from collections.abc import Mapping

from rheoline.errors import ScenarioError
from rheoline.scenario.description import Scenario, ScenarioSet
from rheoline.scenario.reading import parse_scenarios
from rheoline.scenario.schema import FORMAT_VERSION
from rheoline.scenario.writing import scenario_data

__all__ = ["ScenarioDocument", "checked_scenario", "EDITED_SOURCE"]

#: How the source of an edited set reads (the pack names it; the loaded file's name follows).
EDITED_SOURCE = "edited in the views"


def checked_scenario(scenario: Scenario) -> Scenario:
    """``scenario`` as the scenario file's reader reads it back after the writer wrote it.

    Raises the reader's :class:`~rheoline.errors.ScenarioError` (naming the scenario and
    the field) for a description a file could not hold.
    """
    data = {"format_version": FORMAT_VERSION, "scenario": [scenario_data(scenario)]}
    return parse_scenarios(data, source="<views>").scenarios[0]


class ScenarioDocument:
    """One scenario set shared by the views, with observers called after every change.

    Parameters
    ----------
    scenario_set : ScenarioSet
        What the views start from (a loaded file, or the app's demo scenarios).

    Notes
    -----
    An observer is called as ``callback(by)`` after each change, ``by`` being whatever the
    editor passed (a view passes itself, so it can tell its own edits from others').
    While nothing has been edited since the last :meth:`load`, :attr:`scenario_set` is the
    loaded set itself, with its file name, text and bytes (the review pack copies them);
    after an edit its source reads ``"<file> (edited in the views)"`` and it carries no
    text or bytes, so a pack writes the edited description instead of the old file.
    """

    def __init__(self, scenario_set: ScenarioSet):
        self._observers = []
        self._loaded = scenario_set
        self._set = scenario_set
        self.version = 0

    # -- reading ---------------------------------------------------------------------
    @property
    def scenario_set(self) -> ScenarioSet:
        """The current set (see the class notes for its source, text and bytes)."""
        return self._set

    @property
    def scenarios(self) -> tuple:
        """The scenarios, in file order."""
        return self._set.scenarios

    @property
    def edited(self) -> bool:
        """Whether the set differs from the one loaded last."""
        return self._set is not self._loaded

    def names(self) -> list:
        """The scenarios' names, in file order."""
        return [s.name for s in self._set.scenarios]

    def line_names(self) -> list:
        """The names of the line scenarios (those without a network), in file order: what
        the line and comparison views show."""
        return [s.name for s in self._set.scenarios if s.topology is None]

    def branched(self) -> tuple:
        """The branched scenarios (those with a network), in file order: what the network
        view shows."""
        return tuple(s for s in self._set.scenarios if s.topology is not None)

    def scenario(self, name: str) -> Scenario:
        """The scenario called ``name``."""
        for s in self._set.scenarios:
            if s.name == name:
                return s
        raise ScenarioError(f"no scenario named {name!r}; the set holds {self.names()}")

    def unique_name(self, name: str) -> str:
        """``name``, or ``"name (2)"``, ``"name (3)"``, ... when it is taken."""
        taken = set(self.names())
        out, k = name, 2
        while out in taken:
            out, k = f"{name} ({k})", k + 1
        return out

    # -- observing -------------------------------------------------------------------
    def observe(self, callback):
        """Call ``callback(by)`` after every change."""
        self._observers.append(callback)

    def _changed(self, scenarios, by):
        if tuple(scenarios) == self._set.scenarios:
            return
        loaded = self._loaded
        if tuple(scenarios) == loaded.scenarios:
            self._set = loaded
        else:
            source = loaded.source
            edited = f"{source} ({EDITED_SOURCE})" if source else EDITED_SOURCE
            self._set = ScenarioSet(tuple(scenarios), loaded.title, loaded.notes, edited)
        self._notify(by)

    def _notify(self, by):
        self.version += 1
        for callback in list(self._observers):
            callback(by)

    # -- editing ---------------------------------------------------------------------
    def load(self, scenario_set: ScenarioSet, by=None):
        """Replace the whole set (a file was loaded)."""
        if not scenario_set.scenarios:
            raise ScenarioError("the scenario set holds no scenario; add a [[scenario]] table")
        self._loaded = self._set = scenario_set
        self._notify(by)

    def replace(self, changes: Mapping, by=None) -> dict:
        """Replace scenarios by name: ``{name: new scenario}``, all checked before any is
        kept (one change for the observers).  Returns ``{name: scenario as kept}``."""
        kept = {name: checked_scenario(sc) for name, sc in changes.items()}
        known = set(self.names())
        missing = [name for name in kept if name not in known]
        if missing:
            raise ScenarioError(f"no scenario named {missing[0]!r}; the set holds {self.names()}")
        new_names = [sc.name for sc in kept.values()]
        others = known - set(kept)
        if len(set(new_names)) != len(new_names) or others & set(new_names):
            raise ScenarioError(f"scenario names must stay unique: {new_names}", field="name")
        self._changed([kept.get(s.name, s) for s in self._set.scenarios], by)
        return kept

    def add(self, scenario: Scenario, by=None) -> Scenario:
        """Append ``scenario`` (renamed ``"name (2)"`` if its name is taken); returns it as
        kept."""
        from dataclasses import replace

        kept = checked_scenario(replace(scenario, name=self.unique_name(scenario.name)))
        self._changed([*self._set.scenarios, kept], by)
        return kept

    def remove(self, names, by=None):
        """Remove the named scenarios (at least one scenario stays)."""
        gone = set(names)
        keep = [s for s in self._set.scenarios if s.name not in gone]
        if not keep:
            raise ScenarioError("a scenario set keeps at least one scenario; add another first")
        self._changed(keep, by)
