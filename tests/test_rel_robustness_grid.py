"""Reliability: the robustness grid.

Every fluid of :func:`rheoline.fluid_names` (and, for blood, every blood rheology model; for
a bench analog, every model of :data:`rheoline.RHEOLOGY_MODELS`) is solved over the grid

* inner diameter 0.1 mm to 10 mm, length 1 mm to 10 m,
* gravity head 0 to 3 m, source pressure 0 to 2,000 mmHg,
* temperature 0 to 45 degC, hematocrit 0 to 0.8 (blood fluids),

each fluid in one vectorized call (no Python loop per scenario).  A grid point fails when
the flow is not finite or negative, or when the line's own residual (losses at the returned
flow minus the drive, :meth:`rheoline.Line.pressure_residual`) exceeds 1e-6 of the drive;
the failures are counted (target zero) and the first few reported.  Results outside a
correlation's validated range must carry a RangeWarning (fluid properties) or a flag
(regime, developing flow); the flag counts are checked against the Reynolds numbers.
"""

from __future__ import annotations

import re
import warnings

import numpy as np
import pytest
from rel_record import bump, module_recorder

import rheoline
from rheoline.errors import RangeWarning
from rheoline.model.blood import BLOOD_RHEOLOGY_MODELS
from rheoline.model.fluid_base import Fluid
from rheoline.model.line import GRAVITY, Line
from rheoline.model.lumen import LAMINAR_LIMIT_REYNOLDS, TURBULENT_LIMIT_REYNOLDS
from rheoline.model.parts import Catheter, Fitting, Tube
from rheoline.model.rheology import RHEOLOGY_MODELS

_record = module_recorder("grid", "grid:")

MMHG = 133.322387415  # NIST SP 811
REL_RESIDUAL = 1e-6

DIAMETERS = np.geomspace(1e-4, 1e-2, 7)  # m
LENGTHS = np.geomspace(1e-3, 10.0, 7)  # m
HEADS = np.array([0.0, 0.5, 1.5, 3.0])  # m
SOURCE_PRESSURES = np.array([0.0, 50.0, 300.0, 2000.0]) * MMHG
TEMPERATURES = np.array([0.0, 15.0, 37.0, 45.0])  # degC
HEMATOCRITS = np.array([0.0, 0.3, 0.55, 0.8])

#: Temperature span [degC] each library fluid's property models are validated over, as the
#: fluid modules document it; a temperature outside it must warn.
VALIDATED_TEMPERATURE_C = {
    "water": (0.0, 100.0),  # IAPWS 2008 / Kell 1975 at 1 atm
    "saline-0.9": (0.0, 100.0),  # Laliberte 2007
    "lactated-ringers": (0.0, 100.0),
    "dextrose-5": (0.0, 100.0),
    "plasma": (0.0, 42.0),
    # albumin: its saline base's span (Laliberte 2007); the albumin factor states none
    "albumin-5": (0.0, 100.0),
    "albumin-20": (0.0, 100.0),
    "albumin-25": (0.0, 100.0),
    "whole-blood": (0.0, 42.0),
    "packed-red-cells": (0.0, 42.0),
    "glycerol-water": (0.0, 40.0),  # Volk & Kaehler 2018 density, as viscosity.py uses it
}

BLOOD = ("whole-blood", "packed-red-cells")

#: Bench analogs for every generic rheology model (invented demo parameters, in the span of
#: blood-mimicking fluids).
ANALOG_PARAMETERS = {
    "newtonian": {"mu": 3.5e-3},
    "power-law": {"consistency": 0.0127, "flow_index": 0.78},
    "carreau": {
        "mu_zero": 0.056,
        "mu_inf": 0.00345,
        "relaxation_time": 3.313,
        "flow_index": 0.3568,
    },
    "carreau-yasuda": {
        "mu_zero": 0.056,
        "mu_inf": 0.00345,
        "relaxation_time": 1.902,
        "flow_index": 0.22,
        "a": 1.25,
    },
    "casson": {"yield_stress": 0.005, "casson_viscosity": 3.5e-3},
}


def _axes(extra):
    """Grid axes as broadcastable arrays: d, L, head, source pressure, then ``extra``."""
    base = [DIAMETERS, LENGTHS, HEADS, SOURCE_PRESSURES, *extra]
    n = len(base)
    return [a.reshape([-1 if i == j else 1 for j in range(n)]) for i, a in enumerate(base)]


def _build_fluid(name, model, temperature, hematocrit):
    """The library fluid on the grid, with the RangeWarnings it raised."""
    options = {}
    if name in BLOOD:
        options = {"hematocrit": hematocrit, "model": model}
    elif name == "glycerol-water":
        options = {"mass_fraction": 0.4}
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", RangeWarning)
        fl = rheoline.fluid(name, temperature_c=temperature, **options)
    return fl, [w for w in caught if issubclass(w.category, RangeWarning)]


def _failures(line, fl, head, ps, result, pries_correction=False):
    """Boolean array of failed grid points and the relative residual."""
    drive = ps + fl.density * GRAVITY * head
    drive = np.broadcast_to(drive, np.shape(result.flow))
    q = np.asarray(result.flow, dtype=float)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RangeWarning)
        residual = np.asarray(
            line.pressure_residual(
                fl, q, head=head, source_pressure=ps, pries_correction=pries_correction
            )
        )
    moving = drive > 0
    rel = np.where(moving, np.abs(residual) / np.where(moving, drive, 1.0), 0.0)
    # a yield-stress fluid stays put while its losses at vanishing flow (the yield pressure,
    # 4 L tau_y / D for one tube) exceed the drive: zero flow is then the answer
    held = (q == 0) & (residual >= 0)
    rel = np.where(held, 0.0, rel)
    bad = ~np.isfinite(q) | (q < 0) | ~np.isfinite(rel) | (rel > REL_RESIDUAL)
    bad |= ~moving & (q != 0)
    return bad, rel


def _solve_and_count(line, fl, head, ps, axes, label, before_check=None, pries_correction=False):
    """Solve the grid in one call, count points and failures, fail with the first few."""
    result = line.solve(fl, head=head, source_pressure=ps, pries_correction=pries_correction)
    if before_check is not None:
        before_check(result)
    bad, rel = _failures(line, fl, head, ps, result, pries_correction)
    q = np.asarray(result.flow)
    bump("grid:points_solved", q.size)
    bump("grid:failures", int(np.count_nonzero(bad)))
    bump("grid:cases", 1)
    assert not bad.any(), (
        f"{label}: {np.count_nonzero(bad)} of {bad.size} grid points "
        f"failed: {_describe(bad, axes, rel, q)}"
    )
    return result, q


def _describe(bad, axes, rel, q, limit=3):
    out = []
    for idx in list(zip(*np.nonzero(bad), strict=True))[:limit]:
        values = [float(np.ravel(a)[i]) for a, i in zip(axes, idx, strict=False)]
        out.append(f"point {values}: flow {q[idx]!r}, relative residual {rel[idx]:.3g}")
    return "; ".join(out)


def _check_regime_flags(result, part_index=0):
    """The regime flags count exactly the scenarios whose Reynolds number needs them."""
    re_ = np.nan_to_num(result.part_reynolds[part_index])
    moving = np.asarray(result.flow) > 0
    turbulent = int(np.count_nonzero(moving & (re_ >= TURBULENT_LIMIT_REYNOLDS)))
    transitional = int(
        np.count_nonzero(
            moving & (re_ >= LAMINAR_LIMIT_REYNOLDS) & (re_ < TURBULENT_LIMIT_REYNOLDS)
        )
    )
    text = " | ".join(result.flags)
    for word, expected in (("turbulent flow", turbulent), ("transitional flow", transitional)):
        m = re.search(word + r"[^|]*? in (\d+) of (\d+) scenarios", text)
        if expected == 0:
            assert m is None, f"flag '{word}' without any such scenario: {text}"
        else:
            assert m is not None, f"{expected} {word} scenarios carry no flag: {text}"
            assert int(m.group(1)) == expected
    return turbulent + transitional


CASES = [(name, None) for name in rheoline.fluid_names() if name not in BLOOD] + [
    (name, model) for name in BLOOD for model in sorted(BLOOD_RHEOLOGY_MODELS)
]


@pytest.mark.parametrize(("name", "model"), CASES, ids=[f"{n}-{m}" if m else n for n, m in CASES])
def test_library_fluid_grid_converges_everywhere(name, model):
    blood = name in BLOOD
    extra = [TEMPERATURES, HEMATOCRITS] if blood else [TEMPERATURES]
    axes = _axes(extra)
    d, length, head, ps, temperature = axes[:5]
    hematocrit = axes[5] if blood else None
    fl, range_warnings = _build_fluid(name, model, temperature, hematocrit)
    low, high = VALIDATED_TEMPERATURE_C.get(name, (-np.inf, np.inf))
    if TEMPERATURES.min() < low or TEMPERATURES.max() > high:
        assert any("outside the validated range" in str(w.message) for w in range_warnings), (
            f"{name}: temperatures outside {low}..{high} degC gave no RangeWarning"
        )
    line = Line([Tube(inner_diameter=d, length=length)])
    # regime flags are checked first, so a convergence failure does not hide them
    _solve_and_count(
        line,
        fl,
        head,
        ps,
        axes,
        f"{name} ({model})",
        lambda r: bump("grid:flagged_regime_points", _check_regime_flags(r)),
    )


@pytest.mark.parametrize("model", sorted(BLOOD_RHEOLOGY_MODELS))
def test_blood_with_the_pries_correction_converges_on_the_grid(model):
    # the Pries 1992 diameter correction scales each lumen's apparent viscosity (bores below
    # 1.978 mm); temperatures within the blood models' range, so only Pries' own range warns
    axes = _axes([TEMPERATURES[:3], HEMATOCRITS])
    d, length, head, ps, temperature, hematocrit = axes
    fl, _ = _build_fluid("whole-blood", model, temperature, hematocrit)
    line = Line([Tube(inner_diameter=d, length=length)])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RangeWarning)  # 10 mm is above Pries' 1978 um
        _solve_and_count(
            line, fl, head, ps, axes, f"whole-blood ({model}) with Pries", pries_correction=True
        )


@pytest.mark.parametrize("model", sorted(RHEOLOGY_MODELS))
def test_every_rheology_model_converges_on_the_grid(model):
    rheology = RHEOLOGY_MODELS[model](**ANALOG_PARAMETERS[model])
    fl = Fluid(name=f"analog ({model})", temperature_c=22.0, density=1050.0, rheology=rheology)
    axes = _axes([])
    d, length, head, ps = axes
    line = Line([Tube(inner_diameter=d, length=length)])
    _solve_and_count(line, fl, head, ps, axes, model)


@pytest.mark.parametrize("name", ["saline-0.9", "whole-blood"])
def test_composite_line_grid_and_round_trip(name):
    # a set, a stopcock-like K fitting and a catheter of varying bore: flow-solve, then
    # pressure-solve at the flows found, must give back the source pressures (0.1 %)
    extra = [TEMPERATURES[:3]]
    axes = _axes(extra)
    d, length, head, ps, temperature = axes
    fl, _ = _build_fluid(name, "carreau", temperature, 0.45)
    line = Line(
        [
            Tube(inner_diameter=3e-3, length=1.8),
            Fitting(k=1.5),
            Tube(inner_diameter=d, length=np.minimum(length, 1.5)),
            Catheter(gauge=18),
        ]
    )
    _, q = _solve_and_count(line, fl, head, ps, axes, f"{name} composite line")
    moving = q > 0
    back = line.solve(fl, flow=q, head=head)
    required = np.broadcast_to(back.required_pressure, q.shape)
    target = np.broadcast_to(ps, q.shape)
    scale = np.broadcast_to(ps + fl.density * GRAVITY * head, q.shape)
    error = np.abs(required - target)[moving] / scale[moving]
    bump("grid:round_trips", int(np.count_nonzero(moving)))
    assert error.max() < 1e-3


@pytest.mark.parametrize("name", ["water", "packed-red-cells"])
def test_drive_only_sweep_matches_point_solves(name):
    # Many drives on one line (the engine may tabulate the line's characteristic for this):
    # every point must still satisfy the line's own residual.
    heads = np.linspace(0.0, 3.0, 40)[:, None]
    ps = np.linspace(0.0, 2000.0, 41)[None, :] * MMHG
    fl, _ = _build_fluid(name, "carreau", 20.0, 0.65)
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=16)])
    _, q = _solve_and_count(line, fl, heads, ps, [heads, ps], f"{name} drive sweep")
    picks = [(0, 5), (17, 0), (39, 40), (25, 33)]
    for i, j in picks:
        one = line.solve(fl, head=float(heads[i, 0]), source_pressure=float(ps[0, j]))
        assert q[i, j] == pytest.approx(one.flow, rel=1e-6, abs=1e-15)


def test_out_of_range_hematocrit_and_diameter_warn():
    # Pries 1992 was fitted to 3.3-1978 um tubes; blood models above H 0.8 extrapolate.
    with pytest.warns(RangeWarning, match="outside the validated range"):
        rheoline.pries_1992_relative_viscosity(5e-3, 0.45)
    with pytest.warns(RangeWarning, match="hematocrit"):
        rheoline.fluid("whole-blood", hematocrit=0.9)
    line = Line([Tube(inner_diameter=DIAMETERS, length=1.0)])
    blood = rheoline.fluid("whole-blood", hematocrit=0.45)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RangeWarning)
        result = line.solve(blood, source_pressure=300 * MMHG, pries_correction=True)
    assert any("Pries 1992" in f for f in result.flags)


def test_residual_at_zero_flow_is_finite_for_a_yield_stress_fluid():
    # At Q = 0 a Casson fluid's losses equal the yield pressure 4 L tau_y / D (Casson 1959);
    # the residual is then that minus the drive, a finite number.
    blood = rheoline.fluid("whole-blood", hematocrit=0.8, model="casson")
    line = Line([Tube(inner_diameter=1e-4, length=10.0)])
    yield_pressure = 4.0 * 10.0 * blood.rheology.yield_stress / 1e-4
    residual = line.pressure_residual(blood, 0.0, source_pressure=50 * MMHG)
    assert np.isfinite(residual)
    assert residual == pytest.approx(yield_pressure - 50 * MMHG, rel=1e-3)


def test_range_flags_in_a_swept_table_mark_only_the_points_outside():
    # A sweep across a model's validated temperature span (blood: 0-42 degC): the table's
    # validity flag must single out the points outside it, not the whole sweep.
    from rheoline.scenario.compare import run_scenarios
    from rheoline.scenario.files import loads_scenarios

    text = (
        'format_version = 1\n[[scenario]]\nname = "warm and hot"\nfluid = "whole-blood"\n'
        'temperature = ["20 degC", "37 degC", "55 degC"]\nsource_pressure = "300 mmHg"\n'
        '[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
    )
    table = run_scenarios(loads_scenarios(text)).table
    flagged = table["flags"].astype(str).str.contains("outside").tolist()
    bump("grid:table_points_flag_checked", len(flagged))
    assert flagged == [False, False, True]


def test_a_delivery_that_never_finishes_is_flagged():
    # a bag that empties down to the outlet level (or is hung below the vein) never delivers
    # the last of its volume: the table's time is inf, and the row must say why in words,
    # since JSON has no infinity (the record's time is null, as when no volume is asked)
    from rheoline.scenario.compare import run_scenarios
    from rheoline.scenario.files import loads_scenarios

    text = (
        'format_version = 1\n[[scenario]]\nname = "down to the outlet"\n'
        'fluid = "saline-0.9"\nhead = "1 m"\nhead_when_empty = "0 m"\nvolume = "500 mL"\n'
        '[[scenario.part]]\ntype = "catheter"\ngauge = 18\n'
    )
    table = run_scenarios(loads_scenarios(text)).table
    assert table["time to deliver [min]"].iloc[0] == float("inf")
    assert re.search(r"deliver|never|not finish|stops", str(table["flags"].iloc[0]))


PUMP_FLOWS = np.geomspace(1e-12, 20e-3 / 60, 9)  # m^3/s: the scenario files' whole range


@pytest.mark.parametrize(("name", "model"), CASES, ids=[f"{n}-{m}" if m else n for n, m in CASES])
def test_pump_grid_pressure_is_finite_and_rises_with_flow(name, model):
    # the inverse problem over the same grid: a prescribed flow (pump) gives a finite source
    # pressure everywhere, rising strictly with the flow
    blood = name in BLOOD
    extra = [TEMPERATURES[:3], HEMATOCRITS] if blood else [TEMPERATURES[:3]]
    n = 3 + len(extra)
    shape = lambda i: [-1 if j == i else 1 for j in range(n)]  # noqa: E731
    d, length, flow = (
        DIAMETERS.reshape(shape(0)),
        LENGTHS.reshape(shape(1)),
        PUMP_FLOWS.reshape(shape(2)),
    )
    temperature = extra[0].reshape(shape(3))
    hematocrit = extra[1].reshape(shape(4)) if blood else None
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RangeWarning)  # checked in the flow grid above
        fl, _ = _build_fluid(name, model, temperature, hematocrit)
        result = Line([Tube(inner_diameter=d, length=length)]).solve(fl, flow=flow)
    required = np.asarray(result.required_pressure)
    bump("grid:pump_points_solved", required.size)
    bad = ~np.isfinite(required)
    bad[:, :, 1:] |= ~(np.diff(required, axis=2) > 0)
    bump("grid:pump_failures", int(np.count_nonzero(bad)))
    assert not bad.any(), f"{name} ({model}): {np.count_nonzero(bad)} pump points failed"


@pytest.mark.parametrize("name", rheoline.fluid_names())
def test_a_table_row_outside_its_fluid_range_is_flagged(name):
    # through the scenario layer: a fluid at 60 degC (the files' top temperature) is flagged
    # exactly when 60 degC is outside the span its property models are validated for
    from rheoline.scenario.compare import run_scenarios
    from rheoline.scenario.files import loads_scenarios

    extra = "mass_fraction = 0.4\n" if name == "glycerol-water" else ""
    text = (
        f'format_version = 1\n[[scenario]]\nname = "hot"\nfluid = "{name}"\n{extra}'
        'temperature = "60 degC"\nhead = "1 m"\n'
        '[[scenario.part]]\ntype = "tube"\ninner_diameter = "3 mm"\nlength = "1.8 m"\n'
    )
    table = run_scenarios(loads_scenarios(text)).table
    flagged = "outside" in str(table["flags"].iloc[0])
    low, high = VALIDATED_TEMPERATURE_C.get(name, (None, None))
    if low is None:
        pytest.skip(f"no documented temperature span for {name} in this test")
    assert flagged == (not low <= 60.0 <= high), table["flags"].iloc[0]


@pytest.mark.parametrize("model", sorted(BLOOD_RHEOLOGY_MODELS))
def test_a_drive_sweep_across_the_yield_pressure_matches_point_solves(model):
    # 400 drives from 0 to 1 kPa on one line (the engine may tabulate its characteristic);
    # for Casson blood the yield pressure 4 L tau_y / D (about 170 Pa here) lies inside
    fl, _ = _build_fluid("whole-blood", model, 37.0, 0.8)
    line = Line([Tube(inner_diameter=5e-4, length=1.0)])
    ps = np.linspace(0.0, 1000.0, 400)
    _, q = _solve_and_count(line, fl, 0.0, ps, [ps], f"{model} near the yield pressure")
    for i in range(0, 400, 19):
        one = line.solve(fl, source_pressure=float(ps[i])).flow
        assert q[i] == pytest.approx(one, rel=1e-6, abs=1e-18)
