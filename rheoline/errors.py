"""Every exception and warning class of the library, each carrying its data.

Every error rheoline raises on purpose is a :class:`RheolineError`, which is a
:class:`ValueError`, so ``except ValueError`` in a user's notebook catches it.
Messages name the field, the bad value, what is allowed, and a likely fix; the
same facts travel as attributes, so code that needs them reads ``err.field`` and
``err.value`` and never searches the message:

* ``field``: the argument name (``"hematocrit"``) or a dotted file path
  (``"part[2].inner_diameter"``); None where no single field is at fault;
* ``value``: the offending value as given (None where not known).

Warnings are for results that are still computed but rest on an assumption
that no longer holds (a correlation used outside its validated range, a
turbulent or developing flow, a non-Newtonian fluid treated simply).  They are
never silent and the library never prints.  A :class:`RangeWarning` names the
model by its provenance key (:data:`rheoline.model.provenance.REGISTRY`), the
quantity, and the range it left.

Examples
--------
>>> err = InputRangeError("hematocrit must be a fraction", field="hematocrit", value=45.0)
>>> err.field, err.value, isinstance(err, ValueError)
('hematocrit', 45.0, True)
>>> str(ScenarioError("must be positive", source="a.toml", scenario="'x'", field="head"))
"a.toml, scenario 'x', field 'head': must be positive"
>>> w = RangeWarning("too hot", model="iapws-2008", quantity="temperature_c", low=0.0, high=100.0)
>>> w.model, w.quantity, (w.low, w.high)
('iapws-2008', 'temperature_c', (0.0, 100.0))
"""

from __future__ import annotations

__all__ = [
    "RheolineError",
    "InputRangeError",
    "UnitError",
    "ScenarioError",
    "OutputError",
    "PackExistsError",
    "NetworkError",
    "RheolineWarning",
    "RangeWarning",
    "RegimeWarning",
]


class RheolineError(ValueError):
    """Base of every error raised on purpose by rheoline.

    Parameters
    ----------
    message : str
        What is wrong and how to fix it (shown as ``str(err)``).
    field : str, optional
        The argument name or dotted file path of the offending input.
    value : object, optional
        The offending value.
    """

    def __init__(self, message: str = "", *, field=None, value=None):
        super().__init__(message)
        self.field = field
        self.value = value


class InputRangeError(RheolineError):
    """A numeric input is negative, NaN, infinite or outside its valid range."""


class UnitError(RheolineError):
    """A quantity string has no unit, an unknown unit, or a unit of the wrong kind.

    Parameters
    ----------
    message : str
    field, value
        As in :class:`RheolineError` (``value`` is the text as written).
    kind : str, optional
        The quantity kind expected (a key of :data:`rheoline.units.KINDS`).
    unit : str, optional
        The unit as written, where one was read.
    """

    def __init__(self, message: str = "", *, field=None, value=None, kind=None, unit=None):
        super().__init__(message, field=field, value=value)
        self.kind = kind
        self.unit = unit


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
    value : object, optional
        The offending value.
    """

    def __init__(self, message: str = "", *, source=None, scenario=None, field=None, value=None):
        where = []
        if source is not None:
            where.append(str(source))
        if scenario is not None:
            where.append(f"scenario {scenario!s}")
        if field is not None:
            where.append(f"field '{field}'")
        prefix = ": ".join([", ".join(where)]) + ": " if where else ""
        super().__init__(prefix + message, field=field, value=value)
        self.source = source
        self.scenario = scenario


class OutputError(ScenarioError, OSError):
    """A scenario file or a review pack cannot be written where asked (a folder in the
    way, a missing or read-only folder, a full disk).

    A :class:`ScenarioError` naming the path, so views and the command line show it as a
    message, and an :class:`OSError`, so ``except OSError`` still catches it (as
    :class:`io.UnsupportedOperation` is both).  ``reason`` is the why alone (the system's
    words, such as "No space left on device"), for a caller's own message.
    """

    def __init__(self, message: str = "", *, source=None, reason=None, field=None, value=None):
        super().__init__(message, source=source, field=field, value=value)
        self.reason = reason or message


class PackExistsError(ScenarioError):
    """The output folder exists and may not be replaced.

    Raised when ``force`` was not given, when the target is a file, and (even with
    ``force``) when the folder is not an unchanged rheoline review pack.  The message is
    the command line's; ``kind`` says which case, for a caller's own words: ``"link"`` (a
    symbolic link), ``"not a folder"``, ``"not a pack"`` (``detail`` says why: "no
    manifest.json", a file changed or added) or ``"exists"`` (an earlier pack, replaced
    only with ``force``).
    """

    def __init__(self, message: str = "", *, source=None, kind=None, detail=None, **where):
        super().__init__(message, source=source, **where)
        self.kind = kind
        self.detail = detail


class NetworkError(RheolineError):
    """A vessel network is disconnected, singular or has unknown nodes."""


class RheolineWarning(UserWarning):
    """Base of rheoline's warnings: a result whose assumptions are strained.

    Parameters
    ----------
    message : str
    model : str, optional
        Provenance key of the model concerned (see :mod:`rheoline.model.provenance`).
    """

    def __init__(self, message: str = "", *, model=None):
        super().__init__(message)
        self.model = model


class RangeWarning(RheolineWarning):
    """An input lies outside the validated range of the correlation used.

    Parameters
    ----------
    message : str
    model : str, optional
        Provenance key of the correlation (its range lives in the registry entry).
    quantity : str, optional
        The input outside the range (``"temperature_c"``, ``"hematocrit"``, ``"diameter"``).
    low, high : float, optional
        The validated range, in the quantity's own unit (SI; degC for ``*_c``).
    """

    def __init__(self, message: str = "", *, model=None, quantity=None, low=None, high=None):
        super().__init__(message, model=model)
        self.quantity = quantity
        self.low = low
        self.high = high


class RegimeWarning(RheolineWarning):
    """The flow regime departs from what a model assumes (turbulence, developing flow).

    Parameters
    ----------
    message : str
    model : str, optional
        Provenance key of the model whose assumption breaks.
    quantity : str, optional
        The quantity that crossed the limit (e.g. ``"reynolds"``).
    value : float, optional
        Its largest value.
    limit : float, optional
        The limit it crossed.
    """

    def __init__(self, message: str = "", *, model=None, quantity=None, value=None, limit=None):
        super().__init__(message, model=model)
        self.quantity = quantity
        self.value = value
        self.limit = limit
