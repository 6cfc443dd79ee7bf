"""One registry entry: :class:`ModelEntry` (see :mod:`rheoline.model.provenance`)."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from types import MappingProxyType

__all__ = ["ModelEntry"]

#: Prefix of the dotted names in ``ModelEntry.used_in``.
MODEL = "rheoline.model."


@dataclass(frozen=True)
class ModelEntry:
    """One named model or correlation.

    Attributes
    ----------
    key : str
        Stable lowercase hyphenated key (``"churchill-1977"``); packs cite it.
    title : str
        Short name with author and year.
    role : str
        What it computes in this toolkit.
    reference : str
        Full citation: authors, title, journal, volume, pages, year.
    doi : str or None
        The DOI where one is known for certain, else None.
    validity : str
        The validity range in words.
    ranges : Mapping[str, tuple]
        Quantity -> (low, high), machine-readable (SI unless the name states the unit);
        None is an open end.  The range warnings read these.
    recalled : bool
        True where parameters or values are recalled rather than read from the source
        ("from memory"): verify before relying on them.
    cite : str
        The words (author and year) a docstring that applies the entry uses to cite it.
    used_in : tuple of str
        Dotted names of the functions or classes that apply it (their docstrings, or
        their module's, cite ``cite``; a test checks).
    """

    key: str
    title: str
    role: str
    reference: str
    doi: str | None
    validity: str
    ranges: Mapping[str, tuple] = field(default_factory=dict)
    recalled: bool = False
    cite: str = ""
    used_in: tuple = ()

    def __post_init__(self):
        object.__setattr__(self, "ranges", MappingProxyType(dict(self.ranges)))
