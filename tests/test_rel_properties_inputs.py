"""Reliability: property-based tests (hypothesis) of the model layer's answers at the edges.

Budget: the "ci" profile of tests/conftest.py, 200 examples per property.  Each property
counts the examples it ran (tests/rel_record.py); the figures in README's "Reliability"
section come from a dedicated run.  The strategies are shared with the other
tests/test_rel_properties_*.py modules (tests/rel_model_strategies.py).

Kinds of property checked here:

* no NaN or infinity for any valid input (Newtonian fluids, blood, vessel viscosity laws);
* a clear library error (a RheolineError naming the field) for every invalid input, and
  for the mistakes a user makes with the Python API.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import assume, example, given
from hypothesis import strategies as st
from rel_model_strategies import (
    _blood_models,
    _count,
    _finite,
    _log_uniform,
    _lumen_rows,
    blood_temperatures,
    bores,
    fluid_temperatures,
    hematocrits,
    lengths,
    lines,
    simple_fluids,
    source_pressures,
)
from rel_record import bump, module_recorder

import rheoline
from rheoline.errors import InputRangeError, RheolineError
from rheoline.model.line import Line
from rheoline.model.lumen import poiseuille_flow
from rheoline.model.network import VesselNetwork
from rheoline.model.parts import Catheter, Needle, Tube
from rheoline.model.vessels import Vessel

_record = module_recorder("properties", "prop:")


# --------------------------------------------------------------------------- no NaN, no inf
@given(
    line=lines(),
    fluid_name=simple_fluids,
    head=st.floats(0.0, 3.0),
    ps=source_pressures,
    t=fluid_temperatures,
)
@example(
    line=Line([Tube(inner_diameter=1e-3, length=1.0)]),
    fluid_name="water",
    head=0.0,
    ps=1e-300,
    t=20.0,
)  # a vanishing but valid drive (bug B1 in the reliability notes)
def test_no_nan_or_inf_for_valid_newtonian_input(line, fluid_name, head, ps, t):
    _count("finite_newtonian")
    fl = rheoline.fluid(fluid_name, temperature_c=t)
    r = line.solve(fl, head=head, source_pressure=ps)
    rows = _lumen_rows(r)
    assert _finite(
        r.flow,
        r.required_pressure,
        r.net_drive,
        r.max_reynolds,
        r.max_wall_shear_stress,
        r.part_pressure_drops,
        r.part_reynolds[rows],
        r.part_wall_shear_stress[rows],
        r.part_wall_shear_rate[rows],
        r.dominant_share,
    )
    assert r.flow >= 0
    # a hemolysis index only for a fluid with red cells (NaN otherwise, never a number)
    assert _finite(r.hemolysis_index) if fl.is_blood else np.isnan(r.hemolysis_index)


@given(
    d=bores,
    length=lengths,
    head=st.floats(0.0, 3.0),
    ps=source_pressures,
    h=hematocrits,
    t=blood_temperatures,
    model=_blood_models(),
    name=st.sampled_from(["whole-blood", "packed-red-cells"]),
)
def test_no_nan_or_inf_for_valid_blood_input(d, length, head, ps, h, t, model, name):
    _count("finite_blood")
    fl = rheoline.fluid(name, temperature_c=t, hematocrit=h, model=model)
    r = Line([Tube(inner_diameter=d, length=length)]).solve(fl, head=head, source_pressure=ps)
    assert _finite(
        r.flow,
        r.required_pressure,
        r.max_reynolds,
        r.max_wall_shear_stress,
        r.part_pressure_drops,
        r.part_wall_shear_rate,
    )
    assert r.flow >= 0


@given(d=_log_uniform(3e-6, 1e-2), h=st.floats(0.0, 0.95))
def test_no_nan_in_vessel_viscosity_laws(d, h):
    _count("finite_vessel_laws")
    import warnings

    from rheoline.errors import RangeWarning

    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RangeWarning)  # outside 3.3-1978 um: flagged, not here
        rel92 = rheoline.pries_1992_relative_viscosity(d, h)
        rel94 = rheoline.pries_1994_relative_viscosity(d, h)
    assert _finite(rel92, rel94)
    assert rel92 >= 1.0 - 1e-12 and rel94 >= 1.0 - 1e-12


# --------------------------------------------------------------------------- invalid input
bad_positive = st.one_of(
    st.floats(max_value=0.0, allow_nan=False),
    st.just(float("nan")),
    st.just(float("inf")),
    st.just(-float("inf")),
)
bad_finite = st.one_of(st.just(float("nan")), st.just(float("inf")), st.just(-float("inf")))


_GOOD_DIMENSIONS = {
    Tube: {"inner_diameter": 1e-3, "length": 1.0},
    Vessel: {"radius": 1e-3, "length": 0.1},
}


@pytest.mark.parametrize("cls", [Tube, Vessel], ids=["tube", "vessel"])
@given(bad=bad_positive, which=st.integers(0, 1))
def test_bad_dimension_names_the_field(cls, bad, which):
    _count(f"invalid_{cls.__name__.lower()}_dimension")
    kwargs = dict(_GOOD_DIMENSIONS[cls])
    field = list(kwargs)[which]
    kwargs[field] = bad
    with pytest.raises(InputRangeError, match=field):
        cls(**kwargs)


@given(bad=bad_finite, field=st.sampled_from(["head", "source_pressure", "back_pressure"]))
def test_non_finite_drive_names_the_field(bad, field):
    _count("invalid_drive")
    line = Line([Tube(inner_diameter=1e-3, length=1.0)])
    with pytest.raises(InputRangeError, match=field):
        line.solve(rheoline.fluid("water"), **{field: bad})


@given(bad=st.one_of(st.floats(max_value=-1e-30, allow_nan=False), bad_finite))
def test_bad_prescribed_flow_names_the_field(bad):
    _count("invalid_flow")
    line = Line([Tube(inner_diameter=1e-3, length=1.0)])
    with pytest.raises(InputRangeError, match="flow"):
        line.solve(rheoline.fluid("water"), flow=bad)


@given(pct=st.floats(1.5, 100.0))
def test_hematocrit_as_percent_suggests_the_fraction(pct):
    _count("invalid_hematocrit_percent")
    with pytest.raises(RheolineError, match=r"hematocrit.*percent, pass"):
        rheoline.fluid("whole-blood", hematocrit=pct)
    with pytest.raises(RheolineError, match=r"hematocrit.*percent"):
        rheoline.blood_viscosity(pct)
    with pytest.raises(RheolineError, match=r"hematocrit.*percent"):
        Vessel(radius=1e-3, length=0.1, hematocrit=pct)


@given(bad=st.one_of(st.floats(max_value=-1e-9, allow_nan=False), bad_finite))
def test_bad_hematocrit_names_the_field(bad):
    _count("invalid_hematocrit")
    with pytest.raises(RheolineError, match="hematocrit"):
        rheoline.blood_viscosity(bad)


@given(bad=bad_finite)
def test_non_finite_temperature_names_the_field(bad):
    _count("invalid_temperature")
    with pytest.raises(RheolineError, match="temperature"):
        rheoline.water_viscosity(bad)
    with pytest.raises(RheolineError, match="temperature"):
        rheoline.fluid("saline-0.9", temperature_c=bad)


@given(name=st.text(min_size=1, max_size=30))
def test_unknown_fluid_is_a_library_error(name):
    _count("invalid_fluid_name")
    assume(name.strip().lower().replace("_", "-").replace(" ", "-") not in rheoline.fluid_names())
    with pytest.raises(RheolineError, match="not in the library"):
        rheoline.fluid(name)


@given(bad=bad_positive, field=st.sampled_from(["pressure_drop", "radius", "length", "viscosity"]))
def test_bad_poiseuille_input_names_the_field(bad, field):
    _count("invalid_poiseuille")
    kwargs = {"pressure_drop": 100.0, "radius": 1e-3, "length": 1.0, "viscosity": 1e-3}
    if field == "pressure_drop" and bad == 0.0:
        return  # zero pressure drop is valid (no flow)
    kwargs[field] = bad
    with pytest.raises(InputRangeError, match=field):
        poiseuille_flow(**kwargs)


def _solve_with(fluid):
    return Line([Tube(inner_diameter=1e-3, length=1.0)]).solve(fluid, head=1.0)


#: Mistakes a user makes with the Python API: each must be a RheolineError (a ValueError)
#: whose message names the argument.  (call, regex the message must match)
API_MISTAKES = [
    ("fluid-name-instead-of-fluid", lambda: _solve_with("water"), r"fluid"),
    ("no-fluid", lambda: _solve_with(None), r"fluid"),
    ("one-part-not-a-list", lambda: Line(Tube(inner_diameter=1e-3, length=1.0)), r"part"),
    ("string-part", lambda: Line(["tube"]), r"part\[0\]"),
    ("several-catheter-gauges", lambda: Catheter(gauge=np.array([18, 20])), r"gauge"),
    ("several-needle-gauges", lambda: Needle(gauge=[18, 20]), r"gauge"),
    (
        "shapes-that-do-not-broadcast",
        lambda: Line([Tube(inner_diameter=np.full(3, 1e-3), length=1.0)]).solve(
            rheoline.fluid("water"), head=np.ones(4)
        ),
        r"broadcast|shape",
    ),
    (
        "flow-and-source-pressure",
        lambda: Line([Tube(inner_diameter=1e-3, length=1.0)]).solve(
            rheoline.fluid("water"), flow=1e-6, source_pressure=1.0
        ),
        r"flow.*source_pressure",
    ),
    ("unknown-blood-model", lambda: rheoline.fluid("whole-blood", model="bingham"), r"model"),
    (
        "unknown-entrance",
        lambda: Line([Tube(inner_diameter=1e-3, length=1.0)], entrance="rounded-ish"),
        r"entrance|rounded-ish",
    ),
    (
        "format-in-a-unit-of-another-kind",
        lambda: rheoline.format_quantity(1.0, "pressure", "m"),
        r"pressure|unit",
    ),
    (
        "format-in-an-unknown-unit",
        lambda: rheoline.format_quantity(1.0, "pressure", "furlong"),
        r"unit|furlong",
    ),
    (
        "list-as-a-network-node",
        lambda: VesselNetwork([["a"]], ["b"], [1e9], pressures={"b": 0.0}),
        r"node label",
    ),
]


@pytest.mark.parametrize(
    "call, match", [m[1:] for m in API_MISTAKES], ids=[m[0] for m in API_MISTAKES]
)
def test_api_mistakes_are_library_errors_naming_the_argument(call, match):
    bump("prop:api_mistakes_checked")
    with pytest.raises(RheolineError, match=match):
        call()
