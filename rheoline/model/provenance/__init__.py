"""The registry of named models and correlations: one entry each, read by everything.

Every published method, handbook table and recalled data set the toolkit applies has
one :class:`ModelEntry` in :data:`REGISTRY`, under a stable lowercase key
(``"churchill-1977"``; review packs cite it).  The entry holds the full reference
(with a DOI only where one is known for certain), the validity range in words, and
the same range as data (``ranges``), so that

* the range warnings (:func:`rheoline.model.validation.warn_outside`) read their
  limits from the entry, and a range lives in one place;
* each result records, as ``models_used`` (a tuple of keys in first-use order), the
  entries it actually applied: ``Fluid.models_used``, ``LineResult.models_used``,
  ``DeliveryResult.models_used``, ``ToleranceResult.models_used``,
  ``CurveSet.models_used``, ``Vessel.models_used``;
* review packs, views and docs list exactly those entries (:func:`entries`).

Ranges are keyed by the quantity's argument name and given in SI, except where the
name states its unit (``temperature_c`` in degC, ``cardiac_output_l_min`` in L/min,
``body_surface_area_m2`` in m^2).  ``None`` is an open end.

Examples
--------
>>> model_entry("churchill-1977").title
'Churchill 1977 friction factor, all regimes'
>>> model_entry("iapws-2008").ranges["temperature_c"]
(0.0, 100.0)
>>> merge_models(("iapws-2008", "kell-1975"), ("kell-1975", "hagen-poiseuille"))
('iapws-2008', 'kell-1975', 'hagen-poiseuille')
>>> [e.key for e in entries(("giersiepen-1990",))]
['giersiepen-1990']
"""

from __future__ import annotations

import difflib
from collections.abc import Iterable, Mapping
from types import MappingProxyType

from rheoline.errors import InputRangeError
from rheoline.model.provenance.entry import ModelEntry
from rheoline.model.provenance.flow_models import FLOW_ENTRIES
from rheoline.model.provenance.fluid_models import FLUID_ENTRIES
from rheoline.model.provenance.transient_models import TRANSIENT_ENTRIES

__all__ = ["ModelEntry", "REGISTRY", "model_entry", "entries", "merge_models"]


#: Every named model and correlation by key (read-only).  Warnings, results, packs and
#: docs read this one mapping.
REGISTRY: Mapping[str, ModelEntry] = MappingProxyType(
    {e.key: e for e in (*FLUID_ENTRIES, *FLOW_ENTRIES, *TRANSIENT_ENTRIES)}
)


def model_entry(key: str) -> ModelEntry:
    """The registry entry of ``key``.

    Raises
    ------
    InputRangeError
        For an unknown key, naming the near misses and every known key.

    Examples
    --------
    >>> model_entry("shah-1978").doi
    '10.1115/1.3448626'
    >>> model_entry("churchil-1977")
    Traceback (most recent call last):
    ...
    rheoline.errors.InputRangeError: model 'churchil-1977' is not in the registry; did you mean 'churchill-1977'? ...
    """
    try:
        return REGISTRY[key]
    except (KeyError, TypeError):
        near = difflib.get_close_matches(str(key), list(REGISTRY), n=1)
        hint = f"; did you mean {near[0]!r}?" if near else ""
        raise InputRangeError(
            f"model {key!r} is not in the registry{hint} Known: {', '.join(REGISTRY)}",
            field="key",
            value=key,
        ) from None


def entries(keys: Iterable[str]) -> tuple[ModelEntry, ...]:
    """The entries of ``keys`` in the order given (duplicates dropped).

    Examples
    --------
    >>> [e.title for e in entries(["kell-1975", "kell-1975"])]
    ['Kell 1975 density of water']
    """
    return tuple(model_entry(k) for k in dict.fromkeys(keys))


def merge_models(*groups: Iterable[str]) -> tuple[str, ...]:
    """The union of several ``models_used`` tuples, in first-use order.

    Examples
    --------
    >>> merge_models(("a",), ("b", "a"), ())
    ('a', 'b')
    """
    return tuple(dict.fromkeys(k for group in groups for k in group))
