"""The library's exception base and warning classes.

Every error rheoline raises on purpose is a :class:`RheolineError`, which is a
:class:`ValueError`, so ``except ValueError`` in a user's notebook catches it.
Messages name the field, the bad value, what is allowed, and a likely fix.

Warnings are for results that are still computed but rest on an assumption
that no longer holds (a correlation used outside its validated range, a
turbulent or developing flow, a non-Newtonian fluid treated simply).  They are
never silent and the library never prints.
"""

from __future__ import annotations

__all__ = [
    "RheolineError",
    "InputRangeError",
    "UnitError",
    "ScenarioError",
    "NetworkError",
    "RheolineWarning",
    "RangeWarning",
    "RegimeWarning",
]


class RheolineError(ValueError):
    """Base of every error raised on purpose by rheoline."""


class InputRangeError(RheolineError):
    """A numeric input is negative, NaN, infinite or outside its valid range."""


class UnitError(RheolineError):
    """A quantity string has no unit, an unknown unit, or a unit of the wrong kind."""


class ScenarioError(RheolineError):
    """A scenario file is malformed; the message names the file, scenario and field.

    Parameters
    ----------
    message : str
        What is wrong and how to fix it.
    source : str, optional
        The file (or ``"<string>"``) the scenario came from.
    scenario : str, optional
        The scenario's name or index.
    field : str, optional
        The dotted path of the offending field, e.g. ``"part[2].inner_diameter"``.
    """

    def __init__(self, message: str, *, source=None, scenario=None, field=None):
        self.source = source
        self.scenario = scenario
        self.field = field
        where = []
        if source is not None:
            where.append(str(source))
        if scenario is not None:
            where.append(f"scenario {scenario!s}")
        if field is not None:
            where.append(f"field '{field}'")
        prefix = ": ".join([", ".join(where)]) + ": " if where else ""
        super().__init__(prefix + message)


class NetworkError(RheolineError):
    """A vessel network is disconnected, singular or has unknown nodes."""


class RheolineWarning(UserWarning):
    """Base of rheoline's warnings: a result whose assumptions are strained."""


class RangeWarning(RheolineWarning):
    """An input lies outside the validated range of the correlation used."""


class RegimeWarning(RheolineWarning):
    """The flow regime departs from what a model assumes (turbulence, developing flow)."""
