"""Results as data (issue 11, contracts B-D): conditions, models_used, outside_range, recipes."""

from __future__ import annotations

import warnings

import numpy as np
import pytest

import rheoline
from rheoline.errors import InputRangeError, RangeWarning
from rheoline.model.conditions import CONDITIONS
from rheoline.model.curves import flow_curves
from rheoline.model.delivery import falling_head_delivery_time
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import GRAVITY, Line
from rheoline.model.parts import Catheter, Fitting, MeasuredPart, Needle, Tube
from rheoline.model.provenance import REGISTRY
from rheoline.model.tolerance import flow_tolerance

BLOOD_KEYS = {
    "blood-scaling",
    "wells-merrill-1962",
    "additive-solution-medium",
    "quemada-1978",
    "cho-kensey-1991",
    "merrill-1965",
    "pries-1992",
    "pries-1994",
    "giersiepen-1990",
    "leverett-1972",
    "blood-density-mixture",
}


def _line():
    return Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18)])


def _quiet(call, *args, **kwargs):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", RangeWarning)
        return call(*args, **kwargs)


# ------------------------------------------------------------------ conditions
def test_every_condition_is_an_array_of_the_scenario_shape():
    heads = np.array([[0.2], [1.0], [20.0]])
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=14, length=0.03)])
    result = line.solve(rheoline.fluid("saline-0.9"), head=heads, back_pressure=[0.0, 2e3])
    assert set(result.conditions) == set(CONDITIONS)
    for key, mask in result.conditions.items():
        assert mask.dtype == bool and mask.shape == (3, 2), key
    per_part = {k for k, c in CONDITIONS.items() if c.per_part}
    assert set(result.part_conditions) == per_part
    for key, mask in result.part_conditions.items():
        assert mask.shape == (2, 3, 2), key
        np.testing.assert_array_equal(result.conditions[key], mask.any(axis=0))
    # 20 m of head through a 14G catheter is turbulent (Re well above 4000); 0.2 m is not
    assert result.conditions["turbulent"][2].all() and not result.conditions["turbulent"][0].any()
    # the drive 0.2 m of saline (about 2 kPa) does not beat a 2 kPa back pressure
    assert result.conditions["no_forward_flow"][0, 1]
    assert not result.conditions["no_forward_flow"][1:].any()


def test_flags_are_rendered_from_the_conditions():
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=14, length=0.03)])
    result = line.solve(
        rheoline.fluid("saline-0.9"), flow=np.array([1e-6, 2e-3]), pressure_limit=5e4
    )
    assert result.conditions["over_pressure_limit"].tolist() == [False, True]
    assert "pressure limit exceeded in 1 of 2 scenarios" in result.flags
    turbulent = [f for f in result.flags if "turbulent flow" in f]
    assert turbulent and all("in 1 of 2 scenarios" in f for f in turbulent)
    quiet = line.solve(rheoline.fluid("saline-0.9"), flow=1e-7)
    assert not any(mask.any() for key, mask in quiet.conditions.items() if key != "catalogue_size")


def test_hemolysis_only_for_fluids_with_red_cells():
    line = _line()
    saline = line.solve(rheoline.fluid("saline-0.9"), head=1.0)
    assert np.isnan(saline.hemolysis_index) and np.isnan(saline.part_hemolysis_index).all()
    assert (
        not saline.conditions["hemolysis_concern"]
        and not saline.conditions["hemolysis_extrapolated"]
    )
    plasma = line.solve(rheoline.fluid("plasma"), head=1.0)  # no red cells either
    assert np.isnan(plasma.hemolysis_index)
    blood = line.solve(rheoline.fluid("whole-blood"), head=1.0)
    assert np.isfinite(blood.hemolysis_index) and blood.hemolysis_index > 0


def test_hemolysis_concern_uses_the_model_threshold():
    from rheoline.model.hemolysis import HEMOLYSIS_CONCERN_STRESS
    from rheoline.scenario.compare import HEMOLYSIS_CONCERN_STRESS as reexported

    assert reexported is HEMOLYSIS_CONCERN_STRESS == 150.0  # Leverett et al. 1972, from memory
    blood = rheoline.fluid("whole-blood")
    result = Line([Needle(gauge=25, length=0.016)]).solve(blood, flow=np.array([1e-8, 2e-6]))
    expected = np.asarray(result.max_wall_shear_stress) > HEMOLYSIS_CONCERN_STRESS
    np.testing.assert_array_equal(result.conditions["hemolysis_concern"], expected)
    assert expected.tolist() == [False, True]


# ------------------------------------------------------------------ outside_range per scenario
def test_outside_range_marks_only_the_scenarios_outside():
    # blood models are used 0-42 degC (registry "blood-scaling"); 45 degC is outside
    blood = _quiet(rheoline.fluid, "whole-blood", temperature_c=np.array([37.0, 45.0, 20.0]))
    assert blood.outside_range.tolist() == [False, True, False]
    result = _line().solve(blood, head=1.0)
    assert result.conditions["outside_range"].tolist() == [False, True, False]
    water = _quiet(rheoline.fluid, "water", temperature_c=[[20.0], [105.0]])
    assert water.outside_range.tolist() == [[False], [True]]
    inside = rheoline.fluid("water", temperature_c=37.0)
    assert inside.outside_range is False


def test_outside_range_of_a_band_and_a_delivery_follow_the_samples():
    line = _line()
    blood = rheoline.fluid("whole-blood", temperature_c=np.array([37.0, 41.5]))
    band = _quiet(
        flow_tolerance, line, blood, head=1.0, temperature_tolerance=1.0, n_samples=50, seed=1
    )
    # 41.5 +/- 1 degC crosses 42 degC in some samples; 37 +/- 1 never does
    assert band.outside_range.tolist() == [False, True]
    assert band.models_used[-1] == "saltelli-2008" and "cho-kensey-1991" in band.models_used
    delivery = falling_head_delivery_time(line, rheoline.fluid("water"), 1e-3, 1.0, 0.8)
    assert delivery.outside_range is False
    assert delivery.models_used[:2] == ("iapws-2008", "kell-1975")


# ------------------------------------------------------------------ models_used
def test_saline_line_names_no_blood_model():
    result = _line().solve(rheoline.fluid("saline-0.9"), head=1.0)
    used = set(result.models_used)
    assert not used & BLOOD_KEYS
    assert {"laliberte-2007", "hagen-poiseuille", "shah-1978", "crane-tp410"} <= used
    assert "churchill-1977" not in used  # laminar everywhere: Churchill's terms are not used
    assert "rabinowitsch-mooney" not in used and "hooper-1981" not in used
    assert all(key in REGISTRY for key in result.models_used)


def test_blood_line_names_its_model_and_pries_only_when_applied():
    line = _line()
    casson = rheoline.fluid("whole-blood", model="casson")
    plain = line.solve(casson, head=1.0)
    assert {"merrill-1965", "casson", "rabinowitsch-mooney", "giersiepen-1990"} <= set(
        plain.models_used
    )
    assert "carreau" not in plain.models_used and "wells-merrill-1962" not in plain.models_used
    # the blood's own high-shear viscosity is Pries 1992's largest tube; the line's diameter
    # correction is applied only when asked for
    assert "pries-1992" in casson.models_used and not plain.pries_correction
    corrected = line.solve(casson, head=1.0, pries_correction=True)
    assert corrected.pries_correction and "pries-1992" in corrected.models_used
    packed = rheoline.fluid("packed-red-cells")  # in an additive solution: no aggregation
    assert "additive-solution-medium" in packed.models_used
    assert "wells-merrill-1962" not in packed.models_used
    newtonian = line.solve(rheoline.fluid("whole-blood", model="newtonian"), head=1.0)
    assert "rabinowitsch-mooney" not in newtonian.models_used
    assert newtonian.conditions["blood_as_newtonian"]


def test_hooper_and_churchill_only_where_applied():
    water = rheoline.fluid("water")
    two_k = Line([Tube(inner_diameter=2e-3, length=1.0), Fitting.hooper("elbow-90-standard", 2e-3)])
    constant = Line([Tube(inner_diameter=2e-3, length=1.0), Fitting(k=0.9)])
    assert "hooper-1981" in two_k.solve(water, head=1.0).models_used
    assert "hooper-1981" not in constant.solve(water, head=1.0).models_used
    fast = Line([Catheter(gauge=14, length=0.03)]).solve(water, head=10.0)
    assert fast.conditions["turbulent"] and "churchill-1977" in fast.models_used
    assert "iso-9626" in Line([Needle(gauge=22)]).solve(water, head=1.0).models_used
    measured = Line([MeasuredPart(flows=[1e-6, 2e-6], pressure_drops=[1e3, 2.2e3])])
    assert measured.solve(water, head=1.0).models_used == ("iapws-2008", "kell-1975")


def test_curves_and_user_fluids_record_their_models():
    curves = flow_curves({"18G": _line()}, rheoline.fluid("water"), "temperature_c", [20.0, 30.0])
    assert curves.models_used[:2] == ("iapws-2008", "kell-1975")
    oil = rheoline.user_fluid_from_temperatures("bench oil", [20.0, 40.0], [0.06, 0.025], 870.0)
    assert oil.models_used == ("andrade-1930",)
    assert newtonian_fluid("x", 1e-3, 998.0).models_used == ()


# ------------------------------------------------------------------ recipes
@pytest.mark.parametrize(
    "name, options",
    [
        ("water", {}),
        ("saline-0.9", {}),
        ("albumin-20", {"concentration": 250.0}),
        ("glycerol-water", {"mass_fraction": 0.4}),
        ("whole-blood", {"hematocrit": 0.4, "model": "carreau-yasuda"}),
        ("packed-red-cells", {"model": "casson"}),
    ],
)
def test_at_rebuilds_the_same_fluid_as_the_library(name, options):
    made = rheoline.fluid(name, temperature_c=25.0, **options)
    again = made.at(temperature_c=30.0)
    direct = rheoline.fluid(name, temperature_c=30.0, **options)
    assert again.recipe == direct.recipe
    assert again.density == direct.density
    for rate in (1.0, 100.0, 1e4):
        assert again.rheology.viscosity(rate) == direct.rheology.viscosity(rate)
    assert made.at() == made or made.at().rheology == made.rheology


def test_glycerol_asked_by_viscosity_keeps_its_mixture():
    # Cheng 2008: a glycerol-water mix made for 3.5 mPa s at 22 degC; warmed, it thins
    mix = rheoline.fluid("glycerol-water", temperature_c=22.0, target_viscosity=3.5e-3)
    assert set(mix.recipe.options) == {"mass_fraction"}
    warm = mix.at(temperature_c=37.0)
    assert warm.viscosity() < mix.viscosity()
    assert mix.viscosity() == pytest.approx(3.5e-3, rel=1e-9)


def test_at_changes_hematocrit_and_broadcasts():
    blood = rheoline.fluid("whole-blood", hematocrit=0.45)
    grid = blood.at(hematocrit=np.array([0.3, 0.45, 0.6]))
    assert grid.hematocrit.tolist() == [0.3, 0.45, 0.6]
    assert np.all(np.diff(grid.viscosity()) > 0)
    assert grid.recipe.options["hematocrit"].tolist() == [0.3, 0.45, 0.6]


def test_user_fluid_recipe_rebuilds_without_registration():
    oil = rheoline.user_fluid_from_temperatures("bench oil", [20.0, 40.0], [0.060, 0.025], 870.0)
    warm = oil.at(temperature_c=35.0)
    assert warm.viscosity() < oil.viscosity() and warm.name == "bench oil"


def test_fluid_without_recipe_names_the_fix():
    with pytest.raises(InputRangeError, match="has no recipe .*fluid_builder") as info:
        newtonian_fluid("bench oil", 0.05, 870.0).at(temperature_c=30.0)
    assert info.value.field == "recipe"


# ------------------------------------------------------------------ pressure_drop
@pytest.mark.parametrize("fluid_name", ["water", "whole-blood"])
def test_pressure_drop_inverts_solve(fluid_name):
    fluid = rheoline.fluid(fluid_name)
    line = Line(
        [
            Tube(inner_diameter=3e-3, length=1.8),
            Fitting(k=0.9),
            MeasuredPart(flows=[1e-6, 2e-6, 4e-6], pressure_drops=[400.0, 900.0, 2000.0]),
            Catheter(gauge=18),
        ]
    )
    heads = np.array([0.3, 1.0, 2.5])
    result = line.solve(fluid, head=heads)
    losses = line.pressure_drop(fluid, result.flow)
    np.testing.assert_allclose(losses, fluid.density * GRAVITY * heads, rtol=1e-9)
    np.testing.assert_allclose(losses, result.net_drive, rtol=1e-9)


@pytest.mark.parametrize("fluid_name", ["saline-0.9", "whole-blood"])
def test_pressure_drop_slope_matches_finite_differences(fluid_name):
    fluid = rheoline.fluid(fluid_name)
    line = Line(
        [
            Tube(inner_diameter=3e-3, length=1.8),
            Fitting.hooper("tee-through-branch", 3e-3),
            Catheter(gauge=16),
        ]
    )
    q = np.array([1e-7, 1e-6, 2e-5, 1e-4])  # laminar to turbulent in the catheter
    dp, slope = line.pressure_drop(fluid, q, with_slope=True)
    h = q * 1e-6
    central = (line.pressure_drop(fluid, q + h) - line.pressure_drop(fluid, q - h)) / (2 * h)
    np.testing.assert_allclose(slope, central, rtol=1e-5)
    assert np.all(np.diff(dp) > 0) and np.all(slope > 0)


def test_pressure_drop_broadcasts_and_checks_its_input():
    line = Line([Tube(inner_diameter=np.array([1e-3, 2e-3]), length=1.0)])
    water = rheoline.fluid("water")
    out = line.pressure_drop(water, np.array([[1e-7], [2e-7]]))
    assert out.shape == (2, 2) and out[0, 0] > out[0, 1]
    assert line.pressure_drop(water, 0.0).tolist() == [0.0, 0.0]
    with pytest.raises(InputRangeError, match="flow must be 0 m\\^3/s or more") as info:
        line.pressure_drop(water, -1e-6)
    assert info.value.field == "flow"
