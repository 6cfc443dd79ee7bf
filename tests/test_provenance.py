"""The provenance registry (issue 11, contract B): one entry per named model, read by all."""

from __future__ import annotations

import importlib
import re
import warnings

import numpy as np
import pytest

from rheoline.errors import InputRangeError, RangeWarning
from rheoline.model.provenance import REGISTRY, ModelEntry, entries, merge_models, model_entry
from rheoline.model.validation import outside_mask, warn_outside

_KEY = re.compile(r"^[a-z0-9]+(?:[-.][a-z0-9]+)*$")
_DOI = re.compile(r"^10\.\d{4,9}/\S+$")


def _resolve(dotted):
    """The object (function, class or module) at a dotted path."""
    parts = dotted.split(".")
    for cut in range(len(parts), 0, -1):
        try:
            obj = importlib.import_module(".".join(parts[:cut]))
        except ImportError:
            continue
        for name in parts[cut:]:
            obj = getattr(obj, name)
        return obj
    raise ImportError(dotted)


@pytest.mark.parametrize("key", sorted(REGISTRY))
def test_entry_is_complete(key):
    entry = REGISTRY[key]
    assert isinstance(entry, ModelEntry) and entry.key == key and _KEY.match(key)
    for text in (entry.title, entry.role, entry.reference, entry.validity, entry.cite):
        assert isinstance(text, str) and text.strip()
    assert entry.doi is None or _DOI.match(entry.doi), entry.doi
    for quantity, (low, high) in entry.ranges.items():
        assert isinstance(quantity, str)
        assert low is None or high is None or low < high
    if "from memory" in entry.reference:
        assert entry.recalled


@pytest.mark.parametrize("key", sorted(REGISTRY))
def test_entry_is_cited_where_it_is_applied(key):
    entry = REGISTRY[key]
    assert entry.used_in, f"{key}: no function names where it is applied"
    for dotted in entry.used_in:
        obj = _resolve(dotted)
        module = importlib.import_module(getattr(obj, "__module__", None) or obj.__name__)
        text = (obj.__doc__ or "") + (module.__doc__ or "")
        assert entry.cite.lower() in text.lower(), f"{dotted} does not cite {entry.cite!r}"


def test_unknown_key_names_the_near_miss():
    with pytest.raises(InputRangeError, match="did you mean 'churchill-1977'") as info:
        model_entry("churchil-1977")
    assert info.value.field == "key" and info.value.value == "churchil-1977"


def test_registry_is_read_only():
    with pytest.raises(TypeError):
        REGISTRY["x"] = None  # type: ignore[index]
    with pytest.raises(TypeError):
        REGISTRY["iapws-2008"].ranges["temperature_c"] = (0.0, 1.0)  # type: ignore[index]


def test_merge_and_entries_keep_first_use_order():
    assert merge_models(("b", "a"), ("a", "c")) == ("b", "a", "c")
    assert [e.key for e in entries(["kell-1975", "iapws-2008", "kell-1975"])] == [
        "kell-1975",
        "iapws-2008",
    ]


def test_range_warning_reads_its_range_from_the_registry():
    # IAPWS R12-08 is used here for liquid water at 1 atm: 0-100 degC (the registry's words)
    low, high = REGISTRY["iapws-2008"].ranges["temperature_c"]
    assert (low, high) == (0.0, 100.0)
    t = np.array([-5.0, 20.0, 105.0])
    assert outside_mask("iapws-2008", "temperature_c", t).tolist() == [True, False, True]
    with pytest.warns(
        RangeWarning, match=r"-5\.\.105 degC is outside the validated range 0\.\.100"
    ):
        assert warn_outside("iapws-2008", "temperature_c", t, unit="degC")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        assert not warn_outside("iapws-2008", "temperature_c", 20.0)


def test_range_warning_rejects_a_quantity_without_a_range():
    with pytest.raises(InputRangeError, match="has no range for 'hematocrit'"):
        warn_outside("iapws-2008", "hematocrit", 0.4)


def test_pries_range_shown_in_micrometres():
    # Pries et al. 1992 fitted glass tubes of 3.3-1978 um
    with pytest.warns(RangeWarning, match=r"3\.3\.\.1978 um of Pries 1992") as caught:
        from rheoline.model.blood import pries_1992_relative_viscosity

        pries_1992_relative_viscosity(2e-6, 0.45)
    assert caught[0].message.model == "pries-1992"


def test_older_form_still_warns_without_a_key():
    with pytest.warns(RangeWarning, match="of my bench fit") as caught:
        warn_outside("temperature_c", 50.0, 10.0, 40.0, "my bench fit", "degC")
    assert caught[0].message.model is None and caught[0].message.high == 40.0
