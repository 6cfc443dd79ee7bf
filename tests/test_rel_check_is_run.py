"""Reliability: ``rheoline check`` accepts exactly what ``rheoline run`` can solve.

A file that ``check`` accepts must solve and write its review pack (exit 0); a file that
cannot be solved must be refused by ``check`` already, with the file, the scenario and the
field named.  One generator draws valid-looking documents from every part type and every
optional field (sizes given every allowed way, tolerances relative and absolute, uniform
and normal, delivery laws at their documented bounds, ranges with extreme steps, names
with odd Unicode) and holds the property over them; the cases that first broke it are
kept below as plain tests.
"""

from __future__ import annotations

import contextlib
import io
import itertools
import json

import numpy as np
import pytest
import tomli_w
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from rel_record import bump, module_recorder

import rheoline
from rheoline import cli
from rheoline.errors import RheolineError, ScenarioError
from rheoline.scenario.files import load_scenarios, loads_scenarios
from rheoline.scenario.run import run_scenarios

_record = module_recorder("check_is_run", "check_is_run:")

_PACKS = itertools.count()
HEADER = 'format_version = 1\n[[scenario]]\nname = "s1"\nfluid = "saline-0.9"\n'


def _cli(argv):
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        status = cli.main(argv)
    return status, out.getvalue(), err.getvalue()


def _agree(path, tmp_path):
    """check's and run's verdicts on ``path``: both accept (and the pack is written), or
    both refuse with one line naming the file; never an internal error."""
    status, _, err = _cli(["check", str(path)])
    assert status in (0, 2) and "internal error" not in err, err
    pack = tmp_path / f"pack{next(_PACKS)}"
    run_status, _, run_err = _cli(["run", str(path), "--out", str(pack)])
    assert "internal error" not in run_err, run_err
    assert run_status == status, (err, run_err)
    assert pack.exists() == (status == 0)
    return status, err


# --------------------------------------------------------------------------- the cases found
def test_a_cannula_given_by_its_bore_solves_in_files_and_python(tmp_path):
    path = tmp_path / "c.toml"
    path.write_text(
        HEADER + 'head = "1 m"\n[[scenario.part]]\ntype = "cannula"\n'
        'inner_diameter = "2 mm"\nlength = "0.1 m"\n'
    )
    assert _agree(path, tmp_path)[0] == 0
    from rheoline.model.parts import Cannula

    part = Cannula(inner_diameter=2e-3, length=0.1)
    assert part.outer_diameter is None and part.inner_diameter == 2e-3
    with pytest.raises(RheolineError, match="french.*inner_diameter"):
        Cannula(length=0.1)
    with pytest.raises(RheolineError, match="wall_thickness.*french"):
        Cannula(inner_diameter=2e-3, wall_thickness=1e-3)


def test_a_lone_surrogate_in_a_json_string_is_refused_by_check(tmp_path):
    path = tmp_path / "s.json"
    path.write_text(
        '{"format_version": 1, "scenario": [{"name": "s\\ud800", "fluid": "saline-0.9", '
        '"head": "1 m", "part": [{"type": "catheter", "gauge": 18}]}]}'
    )
    status, err = _agree(path, tmp_path)
    assert status == 2 and "surrogate" in err and "s.json" in err
    with pytest.raises(ScenarioError, match="surrogate") as info:
        loads_scenarios(path.read_text(), fmt="json")
    assert info.value.field == "scenario[1].name"


def test_a_range_with_a_tiny_step_is_refused_by_check(tmp_path):
    path = tmp_path / "r.toml"
    path.write_text(
        HEADER + 'head = "1 m"\n[[scenario.part]]\ntype = "tube"\n'
        'inner_diameter = { start = "1 mm", stop = "2 mm", step = 1e-320 }\nlength = "1 m"\n'
    )
    status, err = _agree(path, tmp_path)
    assert status == 2 and "part[1].inner_diameter.step" in err and "larger step" in err


@pytest.mark.parametrize("distribution", ["uniform", "normal"])
def test_a_bore_tolerance_never_draws_a_bore_of_zero_or_less(tmp_path, distribution):
    """50 % read as two standard deviations drew bores below zero; the normal is now
    truncated at three standard deviations, and a width that still reaches zero is
    refused by check, naming the field."""
    path = tmp_path / "t.toml"
    text = (
        HEADER + f'head = "1 m"\ntolerance = {{ distribution = "{distribution}" }}\n'
        '[[scenario.part]]\ntype = "tube"\ninner_diameter = "1 mm"\nlength = "1 m"\n'
        'tolerance = { inner_diameter = "50 %" }\n'
    )
    path.write_text(text)
    assert _agree(path, tmp_path)[0] == 0
    band = run_scenarios(load_scenarios(path)).table.iloc[0]
    # Poiseuille: flow ~ D^4; the 5th percentile of a bore spread of +/-50 % is positive
    assert 0 < band["flow p5 [mL/min]"] < band["flow [mL/min]"] < band["flow p95 [mL/min]"]
    path.write_text(text.replace('"50 %"', '"0.7 mm"'))
    status, err = _agree(path, tmp_path)
    if distribution == "normal":  # 1.5 x 0.7 mm reaches below zero
        assert status == 2 and "part[1].tolerance.inner_diameter" in err
        assert "normal" in err and "below 0.667 mm" in err
    else:
        assert status == 0


def test_the_model_refuses_a_draw_out_of_its_domain_instead_of_clipping():
    from rheoline.model.line import Line
    from rheoline.model.parts import Tube
    from rheoline.model.tolerance import flow_tolerance

    line = Line([Tube(inner_diameter=1e-3, length=1.0)])
    blood = rheoline.fluid("whole-blood", hematocrit=0.05)
    with pytest.raises(RheolineError, match="hematocrit_tolerance 0.1 around hematocrit 0.05"):
        flow_tolerance(line, blood, head=1.0, hematocrit_tolerance=0.1, n_samples=100)
    with pytest.raises(RheolineError, match="diameter_tolerance.*zero or less"):
        flow_tolerance(
            line, blood, head=1.0, diameter_tolerance=0.7, distribution="normal", n_samples=100
        )
    band = flow_tolerance(
        line, blood, head=1.0, diameter_tolerance=0.6, distribution="normal", n_samples=5000
    )
    assert np.all(band.samples > 0)


def test_a_hematocrit_tolerance_that_reaches_below_zero_is_refused_by_check(tmp_path):
    path = tmp_path / "h.toml"
    path.write_text(
        'format_version = 1\n[[scenario]]\nname = "s1"\nfluid = "whole-blood"\n'
        'hematocrit = 0.1\nhead = "1 m"\ntolerance = { hematocrit = 0.2 }\n'
        '[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
    )
    status, err = _agree(path, tmp_path)
    assert status == 2 and "tolerance.hematocrit" in err and "-0.1" in err


def test_an_absolute_bore_tolerance_larger_than_the_bore_is_refused_by_check(tmp_path):
    path = tmp_path / "t.toml"
    path.write_text(
        HEADER + 'head = "1 m"\n[[scenario.part]]\ntype = "tube"\ninner_diameter = "1 mm"\n'
        'length = "1 m"\ntolerance = { inner_diameter = "2 mm" }\n'
    )
    status, err = _agree(path, tmp_path)
    assert status == 2
    assert "part[1].tolerance.inner_diameter" in err and "2 mm" in err and "relative" not in err


def test_the_shortest_pressure_time_constant_solves(tmp_path):
    path = tmp_path / "p.toml"
    path.write_text(
        HEADER + 'head = "0 cm"\nsource_pressure = "300 mmHg"\npressure_time_constant = "1 ms"\n'
        'volume = "500 mL"\n[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
    )
    assert _agree(path, tmp_path)[0] == 0
    run = run_scenarios(load_scenarios(path))
    assert run.table["time to deliver [min]"].iloc[0] == float("inf")  # the cuff is gone


def test_a_failure_while_solving_names_the_file_the_scenario_and_the_field(monkeypatch, tmp_path):
    """Any model error a run meets (here one forced in the delivery law) is reported with
    the file, the scenario and the field, never as a bare model message."""
    from rheoline.model import delivery

    def broken(*args, **kwargs):
        raise rheoline.errors.InputRangeError("forced", field="time_constant", value=1.0)

    monkeypatch.setattr(delivery, "pressure_bag_delivery_time", broken)
    path = tmp_path / "p.toml"
    path.write_text(
        HEADER + 'head = "0 cm"\nsource_pressure = "300 mmHg"\npressure_time_constant = "10 s"\n'
        'volume = "500 mL"\n[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
    )
    with pytest.raises(ScenarioError, match="forced") as info:
        run_scenarios(load_scenarios(path))
    err = info.value
    assert err.source.endswith("p.toml") and err.scenario == "'s1'"
    assert err.field == "pressure_time_constant"


# --------------------------------------------------------------------------- the property
_SIZES = ["0.3 mm", "1 mm", "2.5 mm", "4 mm"]
_TOLERANCES = ["1 %", "10 %", "30 %", "50 %", "0.01 mm", "0.2 mm", "2 mm", "5 mm", "1 cm"]
_PART_FIELDS = {
    "tube": {"inner_diameter": _SIZES, "length": ["1 cm", "1 m", "3 m"], "roughness": ["0.01 mm"]},
    "catheter": {"gauge": [14, 18, 24], "inner_diameter": _SIZES[:2], "length": ["30 mm"]},
    "needle": {"gauge": [18, 25], "wall": ["regular", "thin"], "length": ["40 mm"]},
    "cannula": {
        "french": [6, 12, 21],
        "inner_diameter": _SIZES,
        "wall_thickness": ["0.3 mm", "1 mm", "4 mm"],
        "length": ["0.15 m"],
    },
    "set": {"kind": ["gravity-set", "microbore-extension"], "inner_diameter": _SIZES},
    "fitting": {"k": [0, 0.8, 20], "equivalent_length": ["5 cm"], "inner_diameter": _SIZES},
}
_REQUIRED = {"tube": ("inner_diameter", "length"), "set": ("kind",), "needle": ("gauge",)}
#: Part types that need one of two fields (the first is added when neither is drawn).
_ONE_OF = {"catheter": ("gauge", "inner_diameter"), "cannula": ("french", "inner_diameter")}
_BENCH = [
    (["100 mL/min", "200 mL/min"], ["50 mmHg", "120 mmHg"]),
    (["100 mL/min", "200 mL/min"], ["0 mmHg", "0 mmHg"]),
    (["100 mL/min", "200 mL/min"], ["120 mmHg", "50 mmHg"]),
    (["1 mL/min", "2 mL/min", "4 mL/min"], ["1 mmHg", "2 mmHg", "5 mmHg"]),
]
_NAMES = st.one_of(
    st.just("case"),
    st.text(st.characters(codec="utf-16", categories=("L", "Cs")), min_size=1, max_size=4),
)


@st.composite
def _part(draw):
    ptype = draw(st.sampled_from([*_PART_FIELDS, "measured"]))
    part = {"type": ptype}
    if ptype == "measured":
        part["flows"], part["pressure_drops"] = draw(st.sampled_from(_BENCH))
        return part
    fields = _PART_FIELDS[ptype]
    chosen = set(draw(st.lists(st.sampled_from(sorted(fields)), max_size=3, unique=True)))
    if ptype in _ONE_OF and not chosen & set(_ONE_OF[ptype]):
        chosen.add(_ONE_OF[ptype][0])
    if ptype == "fitting" and not chosen & {"k", "equivalent_length"}:
        chosen.add("k")
    for key in sorted(chosen | set(_REQUIRED.get(ptype, ()))):
        part[key] = draw(st.sampled_from(fields[key]))
    if ptype != "fitting" and draw(st.booleans()):
        key = draw(st.sampled_from(["inner_diameter", "length"]))
        part["tolerance"] = {key: draw(st.sampled_from(_TOLERANCES))}
    return part


_DRIVES = st.sampled_from(
    [
        {"head": "1 m"},
        {"head": "0 cm", "source_pressure": "300 mmHg"},
        {"head": "1 m", "source_pressure": "300 mmHg", "volume": "500 mL"},
        {"head": "2 m", "head_when_empty": "1.5 m", "volume": "500 mL"},
        {"head": "1 m", "head_when_empty": "1.5 m", "volume": "500 mL"},
        {
            "head": "0 m",
            "source_pressure": "300 mmHg",
            "pressure_time_constant": "1 ms",
            "volume": "1 L",
        },
        {"source_pressure": "300 mmHg", "pressure_time_constant": "1e7 s", "volume": "1 L"},
        {"source_pressure": "300 mmHg", "source_pressure_when_empty": "0 mmHg", "volume": "1 L"},
        {"flow": "100 mL/min", "pressure_limit": "300 mmHg", "volume": "50 mL"},
        {"flow": "20 L/min"},
        {"head": {"start": "10 cm", "stop": "20 cm", "step": "1e-3 mm"}},
        {"head": {"start": "10 cm", "stop": "20 cm", "step": 1e-300}},
        {"head": {"start": "10 cm", "stop": "20 cm", "count": 3}},
    ]
)
_SCENARIO_TOLERANCE = st.sampled_from(
    [
        None,
        {"distribution": "normal", "samples": 100},
        {"temperature": "2 degC", "viscosity": "5 %", "samples": 100},
        {"hematocrit": 0.3, "samples": 100, "distribution": "normal"},
    ]
)


@st.composite
def _documents(draw):
    fluid = draw(st.sampled_from(["saline-0.9", "water", "whole-blood", "glycerol-water"]))
    sc = {"name": draw(_NAMES), "fluid": fluid, **draw(_DRIVES)}
    if fluid == "glycerol-water":
        sc["mass_fraction"] = 0.4
    tolerance = draw(_SCENARIO_TOLERANCE)
    sc["part"] = draw(st.lists(_part(), min_size=1, max_size=3))
    has_part_tolerance = any("tolerance" in p for p in sc["part"])
    if tolerance is not None and fluid != "whole-blood" and draw(st.integers(0, 3)):
        tolerance = {k: v for k, v in tolerance.items() if k != "hematocrit"}
    if tolerance is not None or has_part_tolerance:
        sc["tolerance"] = dict(tolerance or {"samples": 100})
    return {"format_version": 1, "scenario": [sc]}


@settings(
    max_examples=120,
    deadline=None,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large],
)
@given(doc=_documents(), fmt=st.sampled_from(["toml", "json"]))
def test_every_file_check_accepts_runs_and_writes_its_pack(tmp_path_factory, doc, fmt):
    work = tmp_path_factory.mktemp("agree")
    if fmt == "toml":
        try:
            text = tomli_w.dumps(doc)
        except (UnicodeEncodeError, ValueError):
            text = json.dumps(doc)
            fmt = "json"
    else:
        text = json.dumps(doc)
    path = work / f"doc.{fmt}"
    path.write_text(text, encoding="utf-8", errors="surrogatepass")
    bump("check_is_run:documents")
    status, err = _agree(path, work)
    bump("check_is_run:accepted_and_solved" if status == 0 else "check_is_run:refused_by_both")
    if status == 2:
        assert str(path) in err or path.name in err, err


@pytest.mark.parametrize(
    ("extra", "field"),
    [
        ('tolerance = { distribution = "normal" }\n', "field 'tolerance'"),  # no half-width
        ("tolerance = { hematocrit = 0.02 }\n", "field 'tolerance.hematocrit'"),  # saline
    ],
)
def test_a_tolerance_that_samples_nothing_is_refused_by_check(tmp_path, extra, field):
    path = tmp_path / "t.toml"
    path.write_text(
        HEADER + 'head = "1 m"\n' + extra + '[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
    )
    status, err = _agree(path, tmp_path)
    assert status == 2 and field in err


def test_a_line_of_one_fitting_without_a_bore_is_refused_by_check(tmp_path):
    path = tmp_path / "f.toml"
    path.write_text(HEADER + 'head = "1 m"\n[[scenario.part]]\ntype = "fitting"\nk = 0.8\n')
    status, err = _agree(path, tmp_path)
    assert status == 2 and "field 'part[1].inner_diameter'" in err
