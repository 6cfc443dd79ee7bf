"""What a pack says about its basis: the assumptions sheet from models_used and a registry.

The generator is checked here against a registry of invented entries (the provenance
registry's own ``ModelEntry``); the packs of real runs, read against the real registry, are
checked in tests/test_export_models.py.
"""

from __future__ import annotations

import pytest

from rheoline.model.provenance import ModelEntry as Entry
from rheoline.scenario.pack_sources import ASSUMPTION_COLUMNS, assumptions_table

# Invented entries: only their shape matters here.
REGISTRY = {
    "law-a": Entry(
        "law-a", "Law A", "friction of a lumen", "Author A, J. X 1 (1901) 1-2", None, "Re < 10"
    ),
    "law-b": Entry(
        "law-b", "Law B", "viscosity", "Author B, J. Y 2 (1902) 3-4", "10.0/xyz", "0-40 degC"
    ),
    "law-c": Entry(
        "law-c", "Law C", "threshold", "Author C, J. Z 3 (1903) 5", None, "any", recalled=True
    ),
}


def test_one_row_per_model_used_in_first_use_order():
    table = assumptions_table(["law-b", "law-a", "law-b"], REGISTRY)
    assert list(table.columns) == list(ASSUMPTION_COLUMNS)
    assert table["model"].tolist() == ["law-b", "law-a"]
    assert table["title"].tolist() == ["Law B", "Law A"]
    assert table["reference"].tolist() == [REGISTRY["law-b"].reference, REGISTRY["law-a"].reference]
    assert table["validity"].tolist() == ["0-40 degC", "Re < 10"]


def test_doi_only_where_the_work_has_one_and_recalled_values_are_marked():
    table = assumptions_table(["law-a", "law-b", "law-c"], REGISTRY).set_index("model")
    assert table.loc["law-a", "DOI"] == "" and table.loc["law-b", "DOI"] == "10.0/xyz"
    assert table.loc["law-c", "recalled values"].startswith("from memory")
    assert table.loc["law-a", "recalled values"] == ""


def test_nothing_is_listed_that_the_run_did_not_use():
    assert assumptions_table(["law-a"], REGISTRY)["model"].tolist() == ["law-a"]
    empty = assumptions_table([], REGISTRY)
    assert empty.empty and list(empty.columns) == list(ASSUMPTION_COLUMNS)


def test_a_key_missing_from_the_registry_is_a_defect_named_by_its_key():
    with pytest.raises(KeyError, match="'law-z', which the provenance registry does not hold"):
        assumptions_table(["law-a", "law-z"], REGISTRY)
