"""Monte Carlo tolerance bands and their attribution."""

import numpy as np
import pytest

import rheoline
from rheoline.errors import InputRangeError
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import Line
from rheoline.model.parts import Catheter, Tube
from rheoline.model.tolerance import flow_tolerance, scale_viscosity

WATER = newtonian_fluid("water", viscosity=1.0e-3, density=1000.0)


def test_laminar_diameter_tolerance_is_fourth_power():
    # Hagen-Poiseuille, Q ~ D^4: +/-5 % on the bore gives about +22 % / -19 % on flow
    line = Line([Tube(inner_diameter=0.4e-3, length=1.5)])
    band = flow_tolerance(line, WATER, head=1.0, diameter_tolerance=0.05, n_samples=4000)
    assert band.samples.max() / band.nominal == pytest.approx(1.05**4, rel=0.01)
    assert band.samples.min() / band.nominal == pytest.approx(0.95**4, rel=0.01)
    assert band.shares == {"inner_diameter of tube 0.4 mm x 1.5 m": pytest.approx(1.0)}


def test_seeded_and_attribution_names_the_part():
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=22)])
    kwargs = dict(head=1.0, diameter_tolerance=0.03, length_tolerance=0.05, n_samples=3000)
    first = flow_tolerance(line, WATER, seed=7, **kwargs)
    again = flow_tolerance(line, WATER, seed=7, **kwargs)
    assert np.array_equal(first.samples, again.samples)
    assert first.dominant_input == "inner_diameter of 22G catheter"
    assert first.dominant_part == "22G catheter"
    assert sum(first.shares.values()) == pytest.approx(1.0)
    assert first.percentiles[5.0] < first.percentiles[50.0] < first.percentiles[95.0]


def test_viscosity_and_fluid_tolerances():
    line = Line([Tube(inner_diameter=0.5e-3, length=1.0)])
    band = flow_tolerance(line, WATER, head=1.0, viscosity_tolerance=0.1, n_samples=2000)
    # laminar: Q ~ 1/mu, so the extremes are 1/1.1 and 1/0.9 of nominal
    assert band.samples.min() / band.nominal == pytest.approx(1 / 1.1, rel=0.01)
    blood = rheoline.fluid("whole-blood", hematocrit=0.45, temperature_c=37.0)
    band = flow_tolerance(
        line, blood, head=1.0, hematocrit_tolerance=0.05, temperature_tolerance=1.0, n_samples=2000
    )
    assert band.dominant_input == "hematocrit"
    assert band.dominant_part is None


def test_required_pressure_band():
    line = Line([Catheter(gauge=20)])
    band = flow_tolerance(line, WATER, flow=1e-6, diameter_tolerance=0.05, n_samples=1000)
    assert band.quantity == "required_pressure"
    assert band.samples.max() > band.nominal > band.samples.min()


def test_scale_viscosity_carreau():
    blood = rheoline.fluid("whole-blood", hematocrit=0.45, temperature_c=37.0)
    thicker = scale_viscosity(blood, 2.0)
    assert thicker.rheology.mu_zero == pytest.approx(2 * blood.rheology.mu_zero)
    assert thicker.rheology.relaxation_time == blood.rheology.relaxation_time


def test_bad_tolerance_input():
    line = Line([Catheter(gauge=20)])
    with pytest.raises(InputRangeError, match="no tolerance given"):
        flow_tolerance(line, WATER, head=1.0)
    with pytest.raises(InputRangeError, match="is relative \\(0.05 = 5 %\\)"):
        flow_tolerance(line, WATER, head=1.0, diameter_tolerance=5.0)
    with pytest.raises(InputRangeError, match="hematocrit_tolerance needs a blood fluid"):
        flow_tolerance(
            line, rheoline.fluid("water", temperature_c=22.0), head=1.0, hematocrit_tolerance=0.02
        )
    with pytest.raises(InputRangeError, match="needs fluid_builder for the fluid 'bench oil'"):
        flow_tolerance(
            line, newtonian_fluid("bench oil", 0.05, 870.0), head=1.0, temperature_tolerance=1.0
        )
    with pytest.raises(InputRangeError, match="distribution 'flat' is not known"):
        flow_tolerance(line, WATER, head=1.0, diameter_tolerance=0.01, distribution="flat")


def test_array_scenarios_equal_one_call_per_scenario():
    # common random numbers: the same seed draws the same deviations for every scenario, so
    # a vectorized band over heads and bores equals the bands computed one scenario at a time
    bores = np.array([0.8e-3, 1.0e-3, 1.2e-3])
    heads = np.array([[0.5], [1.0]])
    line = Line(
        [Tube(inner_diameter=3e-3, length=1.8), Tube(inner_diameter=bores, length=0.03, name="tip")]
    )
    kwargs = dict(
        diameter_tolerance={1: 0.05},
        length_tolerance=0.02,
        viscosity_tolerance=0.05,
        n_samples=500,
        seed=3,
    )
    band = flow_tolerance(line, WATER, head=heads, **kwargs)
    assert band.samples.shape == (500, 2, 3)
    assert band.percentiles[50.0].shape == (2, 3) and band.dominant_input.shape == (2, 3)
    for i, j in [(0, 0), (1, 2)]:
        one_line = Line(
            [
                Tube(inner_diameter=3e-3, length=1.8),
                Tube(inner_diameter=bores[j], length=0.03, name="tip"),
            ]
        )
        one = flow_tolerance(one_line, WATER, head=float(heads[i, 0]), **kwargs)
        np.testing.assert_allclose(band.samples[:, i, j], one.samples, rtol=1e-10)
        assert band.nominal[i, j] == pytest.approx(one.nominal, rel=1e-12)
        assert band.percentiles[95.0][i, j] == pytest.approx(one.percentiles[95.0], rel=1e-10)
        for label, share in one.shares.items():
            assert band.shares[label][i, j] == pytest.approx(share, abs=1e-9)
        assert band.dominant_input[i, j] == one.dominant_input
        assert band.dominant_part[i, j] == one.dominant_part


@pytest.mark.parametrize(
    "name, options",
    [
        ("glycerol-water", {"mass_fraction": 0.5}),
        ("whole-blood", {"hematocrit": 0.4, "model": "casson"}),
        ("packed-red-cells", {"model": "power-law"}),
        ("albumin-20", {"concentration": 250.0}),
    ],
)
def test_default_builder_keeps_the_library_options(name, options):
    # the default builder must rebuild the fluid with its own options (mass fraction, blood
    # model, albumin concentration), i.e. give the same band as an explicit builder
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=20)])
    nominal = rheoline.fluid(name, temperature_c=22.0, **options)
    fixed = {k: v for k, v in options.items() if k != "hematocrit"}
    kwargs = dict(head=1.0, temperature_tolerance=2.0, n_samples=300, seed=5)
    band = flow_tolerance(line, nominal, **kwargs)
    explicit = flow_tolerance(
        line, nominal, **kwargs, fluid_builder=lambda **kw: rheoline.fluid(name, **fixed, **kw)
    )
    np.testing.assert_allclose(band.samples, explicit.samples, rtol=1e-6)
    assert band.percentiles[5.0] < band.nominal < band.percentiles[95.0]


def test_default_builder_refuses_a_fluid_it_cannot_reproduce():
    import dataclasses

    line = Line([Catheter(gauge=20)])
    thick = scale_viscosity(rheoline.fluid("water", temperature_c=22.0), 2.0)
    assert thick.recipe is None  # scaled: the library recipe no longer describes it
    with pytest.raises(InputRangeError, match=r"'water' .*has no recipe") as info:
        flow_tolerance(line, thick, head=1.0, temperature_tolerance=1.0)
    assert info.value.field == "fluid_builder"
    # changed after it was built, keeping a recipe that no longer describes it
    heavy = dataclasses.replace(rheoline.fluid("water", temperature_c=22.0), density=1500.0)
    with pytest.raises(
        InputRangeError, match=r"'water' rebuilt from its recipe .* does not reproduce"
    ):
        flow_tolerance(line, heavy, head=1.0, temperature_tolerance=1.0)
    # with its own builder it runs
    band = flow_tolerance(
        line,
        thick,
        head=1.0,
        temperature_tolerance=1.0,
        n_samples=100,
        fluid_builder=lambda **kw: scale_viscosity(rheoline.fluid("water", **kw), 2.0),
    )
    assert band.dominant_input == "temperature"
