"""Model evidence in every review pack (issue 13): for the fluids and part kinds a run used,
the validation error of the models behind them and the data sets that back them; whatever
no packaged measurement checks is listed as unvalidated."""

from __future__ import annotations

import csv
import math
import warnings

import openpyxl
import pytest

import rheoline
from rheoline.scenario.export import PACK_FILES, write_pack
from rheoline.scenario.pack_evidence import EVIDENCE_COLUMNS, TESTED, evidence_table
from rheoline.scenario.reading import loads_scenarios
from rheoline.scenario.run import run_scenarios
from rheoline.validation import model_validation

DOC = """
format_version = 1
title = "evidence check"
[[scenario]]
name = "bag"
fluid = "{fluid}"
temperature = "37 degC"
head = "1 m"
[[scenario.part]]
type = "tube"
label = "set"
inner_diameter = "3 mm"
length = "1.8 m"
[[scenario.part]]
type = "catheter"
gauge = 18
"""

BLOOD_MODELS = {"carreau", "carreau-yasuda", "casson", "power-law", "cho-kensey-1991", "pries-1992"}


def _run(fluid):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return run_scenarios(loads_scenarios(DOC.format(fluid=fluid), "evidence.toml"))


@pytest.fixture(scope="module")
def saline():
    return _run("saline-0.9")


@pytest.fixture(scope="module")
def blood():
    return _run("whole-blood")


def _rows(table, subject, what=None):
    sub = table[table["subject"] == subject]
    return sub if what is None else sub[sub["what"] == what]


def test_saline_run_lists_saline_and_its_parts_unvalidated_where_no_data(saline):
    t = evidence_table(saline)
    assert list(t.columns) == list(EVIDENCE_COLUMNS)
    fluid = _rows(t, "fluid saline-0.9", "measured viscosity").iloc[0]
    assert fluid["rows"] == 0 and fluid["status"].startswith("unvalidated")
    assert math.isnan(fluid["median abs. error [%]"])
    catheter = _rows(t, "part kind catheter", "measured flow").iloc[0]
    assert catheter["status"].startswith("unvalidated")
    # the tube flows of the packaged AguaClara data are a test, never a fit
    tube = _rows(t, "part kind tube", "measured flow").iloc[0]
    assert tube["rows"] > 0 and tube["status"] == TESTED
    assert tube["data sets"] == "aguaclara-dosing-tube (test)"
    # no blood model, no hemolysis law in a saline-only pack
    assert not BLOOD_MODELS & set(t["item"])
    assert "giersiepen-1990" not in set(t["item"])
    # every model the run used is listed, under its fluid, a part kind or the line
    assert set(saline.models_used) <= set(t.loc[t["what"] == "model", "item"])


def test_model_rows_are_model_validation_in_per_cent(blood):
    t = evidence_table(blood)
    rows = t[t["what"] == "model"]
    stats = model_validation(rows["item"].unique())
    for _, r in rows.iterrows():
        s = stats[r["item"]]
        assert r["rows"] == s.n
        if s.validated:
            assert r["median abs. error [%]"] == pytest.approx(100 * s.median_abs_error, abs=0.006)
            assert r["max abs. error [%]"] == pytest.approx(100 * s.max_abs_error, abs=0.006)
            assert r["data sets"].split(" (")[0] == s.datasets[0]
        else:
            assert r["status"].startswith("unvalidated")


def test_blood_run_shows_the_fit_for_what_it_is(blood):
    t = evidence_table(blood)
    fluid = _rows(t, "fluid whole-blood", "measured viscosity").iloc[0]
    # Wells & Merrill 1962 is the data the zero-shear amplitude was fitted to
    assert fluid["rows"] > 0 and "wells-merrill-1962 (fit)" in fluid["data sets"]
    assert fluid["status"].startswith("fit only")
    models = set(_rows(t, "fluid whole-blood", "model")["item"])
    assert {"carreau", "pries-1992", "wells-merrill-1962"} <= models
    # the hemolysis law of a run with red cells is listed, and unvalidated here
    hemo = t[t["item"] == "giersiepen-1990"].iloc[0]
    assert hemo["status"].startswith("unvalidated")


def test_plasma_is_validated_against_an_independent_study():
    # held-out plasma rows: Rosenson et al. 1996 and Woodward, Koenig et al. 2003 (abstracts),
    # and OpenStax College Physics Table 12.1 (a textbook table built on water's temperature
    # ratio, the library's own assumption: a "check", not independent)
    t = evidence_table(_run("plasma"))
    fluid = _rows(t, "fluid plasma", "measured viscosity").iloc[0]
    assert fluid["status"] == TESTED
    assert fluid["data sets"].split(", ") == [
        "rosenson-1996 (test)",
        "koenig-2003 (test)",
    ]  # the textbook table is not independent: listed per data set, never judged here


def test_tested_is_not_a_claim_of_agreement():
    # Ko et al. 2022 (J Korean Med Sci 37:e71, abstract): 5 % albumin 1.74 x saline; the
    # library's 1.24 x is tested on that held-out row and shown 29 % low, never "validated"
    t = evidence_table(_run("albumin-5"))
    fluid = _rows(t, "fluid albumin-5", "measured viscosity").iloc[0]
    assert fluid["status"] == TESTED and "ko-2022 (test)" in fluid["data sets"]
    assert fluid["median error [%]"] == pytest.approx(-28.8, abs=0.5)
    assert "validated" not in TESTED


@pytest.mark.parametrize("fluid", ["saline-0.9", "whole-blood"])
def test_every_pack_carries_the_evidence_in_csv_xlsx_and_html(fluid, tmp_path, saline, blood):
    run = saline if fluid == "saline-0.9" else blood
    folder = write_pack(run, tmp_path / "pack")
    assert "model-evidence.csv" in PACK_FILES
    with (folder / "model-evidence.csv").open(encoding="utf-8", newline="") as fh:
        rows = list(csv.reader(fh))
    assert rows[0] == ["caution: " + rheoline.CAUTION]
    assert rows[1] == list(EVIDENCE_COLUMNS)
    subjects = {r[0] for r in rows[2:]}
    assert f"fluid {fluid}" in subjects and "part kind catheter" in subjects
    wb = openpyxl.load_workbook(folder / "results.xlsx", read_only=True)
    assert "model evidence" in wb.sheetnames
    sheet = list(wb["model evidence"].iter_rows(values_only=True))
    assert sheet[1] == tuple(EVIDENCE_COLUMNS) and len(sheet) == len(rows)
    page = (folder / "report.html").read_text(encoding="utf-8")
    assert '<h2 id="model-evidence">Model evidence</h2>' in page
    assert "unvalidated: no packaged measurement" in page
    if fluid == "whole-blood":
        assert "wells-merrill-1962 (fit)" in page
    else:
        assert "wells-merrill-1962" not in page
