"""How many different ways one scenario file writes its units.

Each new unit spelling (``"mm"``, ``"mL/min"``, but also ``"mm*cm/cm"``, ``"mm*inch/inch"``)
costs a parse by the unit library, about 0.3 ms; the parsed units are cached, but a file
that writes every quantity a new way defeats the cache: 16,000 quantities each spelled
anew took 7.5 s of CPU to read.  While one file is read (:func:`counting_unit_spellings`,
entered by :func:`rheoline.scenario.reading.parse_scenarios`), the value parser counts
each spelling it meets (:func:`count_spelling`), and the spelling past
:data:`rheoline.scenario.schema.MAX_UNIT_SPELLINGS` is refused, naming the file, the
scenario and the field.  The count lives in a context variable: one count per read, per
thread and per task.

Examples
--------
>>> from rheoline.scenario.values import Where
>>> with counting_unit_spellings():
...     for unit in ["mm", "m", "mm"]:
...         count_spelling(unit, Where("a.toml"), "length")
>>> count_spelling("mm*cm/cm", Where("a.toml"), "length")  # outside a read: not counted
"""

from __future__ import annotations

import contextlib
import contextvars

from rheoline.scenario import schema

__all__ = ["count_spelling", "counting_unit_spellings"]

#: The unit spellings met so far in the file being read (None outside a read).
_SPELLINGS: contextvars.ContextVar[set | None] = contextvars.ContextVar(
    "rheoline_unit_spellings", default=None
)


@contextlib.contextmanager
def counting_unit_spellings():
    """Count the different unit spellings of the values parsed inside (one file's read)."""
    token = _SPELLINGS.set(set())
    try:
        yield
    finally:
        _SPELLINGS.reset(token)


def count_spelling(unit: str, at, path: str) -> None:
    """Count ``unit`` (the text after a value's number) among the file's spellings; past
    :data:`rheoline.scenario.schema.MAX_UNIT_SPELLINGS` of them, ``at.fail`` names
    ``path`` (a :class:`~rheoline.errors.ScenarioError`).  Nothing is counted outside
    :func:`counting_unit_spellings`."""
    seen = _SPELLINGS.get()
    if seen is None or not unit or unit in seen:
        return
    seen.add(unit)
    if len(seen) > schema.MAX_UNIT_SPELLINGS:
        shown = unit if len(unit) <= 40 else unit[:37] + "..."
        at.fail(
            f"the file writes units in more than {schema.MAX_UNIT_SPELLINGS} different ways "
            f"(this one: {shown!r}); write each unit one way, e.g. 'mm', 'mL/min'",
            path,
        )
