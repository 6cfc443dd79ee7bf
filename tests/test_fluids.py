"""The named fluid library and user fluids."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from rheoline.errors import InputRangeError, RangeWarning
from rheoline.model import blood, fluids, viscosity
from rheoline.model.fluid_base import Fluid

REQUIRED = [
    "water",
    "saline-0.9",
    "dextrose-5",
    "lactated-ringers",
    "plasma",
    "albumin-5",
    "albumin-20",
    "whole-blood",
    "packed-red-cells",
    "glycerol-water",
]


def test_required_names_listed():
    assert set(REQUIRED) <= set(fluids.fluid_names())
    assert [row["name"] for row in fluids.fluid_catalogue()] == fluids.fluid_names()


@pytest.mark.parametrize("name", REQUIRED)
def test_every_fluid_builds_with_density_and_viscosity(name):
    options = {"mass_fraction": 0.4} if name == "glycerol-water" else {}
    f = fluids.fluid(name, **options)
    assert isinstance(f, Fluid)
    assert 990.0 < f.density < 1120.0
    assert 0.4e-3 < f.viscosity() < 0.02
    assert f.source


def test_water_fluid_equals_water_functions():
    # the library fluid reports the same IAPWS 2008 / Kell 1975 values as the functions
    f = fluids.fluid("water", temperature_c=22.0)
    assert f.viscosity() == viscosity.water_viscosity(22.0)
    assert f.viscosity(shear_rate=1e4) == viscosity.water_viscosity(22.0)
    assert f.density == viscosity.water_density(22.0)
    assert f.is_newtonian and not f.is_blood


def test_default_temperatures():
    assert fluids.fluid("water").temperature_c == 20.0
    assert fluids.fluid("whole-blood").temperature_c == 37.0
    assert fluids.fluid("packed-red-cells").temperature_c == 4.0


def test_blood_fluids_carry_hematocrit_and_typical_note():
    wb = fluids.fluid("whole-blood", hematocrit=0.45)
    assert wb.is_blood and wb.hematocrit == 0.45 and not wb.is_newtonian
    # common practice, no source: whole blood at H 0.45, 37 degC, high shear is 3-4 mPa s
    assert 3e-3 <= wb.viscosity() <= 4e-3
    assert wb.plasma_viscosity == pytest.approx(blood.plasma_viscosity(37.0))
    prc = fluids.fluid("packed-red-cells")
    assert 0.6 <= prc.hematocrit <= 0.7
    assert any("typical" in n for n in prc.notes)
    warmed = fluids.fluid("packed-red-cells", temperature_c=37.0)
    assert prc.viscosity() > warmed.viscosity() > wb.viscosity()


def test_blood_model_option_and_broadcasting():
    h = np.array([0.3, 0.45, 0.6])
    t = np.array([[20.0], [37.0]])
    f = fluids.fluid("whole-blood", temperature_c=t, hematocrit=h, model="casson")
    assert f.density.shape == (2, 3)
    mu = f.viscosity(100.0)
    assert mu.shape == (2, 3)
    single = fluids.fluid("whole-blood", temperature_c=20.0, hematocrit=0.6, model="casson")
    assert mu[0, 2] == pytest.approx(single.viscosity(100.0), rel=1e-12)
    assert f.density[1, 1] == pytest.approx(single.density * 0 + blood.blood_density(0.45, 37.0))


def test_temperature_array_for_solution():
    t = np.array([4.0, 22.0, 37.0])
    f = fluids.fluid("saline-0.9", temperature_c=t)
    assert f.density.shape == (3,)
    assert np.allclose(f.viscosity(), [viscosity.saline_viscosity(x) for x in t], rtol=1e-12)


def test_glycerol_water_options():
    a = fluids.fluid("glycerol-water", mass_fraction=0.4, temperature_c=22.0)
    b = fluids.fluid("glycerol-water", target_viscosity=a.viscosity(), temperature_c=22.0)
    assert b.viscosity() == pytest.approx(a.viscosity(), rel=1e-9)
    with pytest.raises(InputRangeError, match="exactly one of mass_fraction="):
        fluids.fluid("glycerol-water")


def test_unknown_name_suggests_near_miss():
    with pytest.raises(
        InputRangeError, match=r"fluid 'saline' is not in the library; did you mean 'saline-0\.9'"
    ):
        fluids.fluid("saline")
    with pytest.raises(InputRangeError, match=r"did you mean 'whole-blood'.*Known fluids: water, "):
        fluids.fluid("whole-bloood")


def test_name_normalization():
    assert fluids.fluid("Whole_Blood").viscosity() == fluids.fluid("whole-blood").viscosity()


def test_unknown_option_lists_options():
    with pytest.raises(
        InputRangeError, match=r"'whole-blood' has no option 'hct'.*options: hematocrit, model"
    ):
        fluids.fluid("whole-blood", hct=0.4)
    with pytest.raises(InputRangeError, match=r"'water' has no option 'hematocrit'.*options: none"):
        fluids.fluid("water", hematocrit=0.4)


def test_hematocrit_percent_suggests_fraction():
    with pytest.raises(
        ValueError, match=r"hematocrit must be a fraction from 0 to 1, got 45; .*pass 0\.45"
    ):
        fluids.fluid("whole-blood", hematocrit=45)


def test_cold_range_warning_for_blood():
    with pytest.warns(RangeWarning, match=r"0\.\.42 degC"):
        fluids.fluid("whole-blood", temperature_c=-2.0)


@given(st.floats(0.0, 0.8), st.floats(0.0, 42.0))
def test_blood_fluid_is_finite(h, t):
    f = fluids.fluid("whole-blood", hematocrit=h, temperature_c=t)
    assert np.isfinite(f.density) and np.isfinite(f.viscosity()) and np.isfinite(f.viscosity(10.0))


# ---------------------------------------------------------------- user fluids


@pytest.fixture
def cleanup():
    names = []
    yield names
    for n in names:
        if n in fluids.FLUID_LIBRARY:
            fluids.unregister_fluid(n)


def test_user_fluid_andrade_reproduces_water_between_points(cleanup):
    # source: IAPWS 2008 water (this package, itself checked against iapws): Andrade through
    # 10, 25 and 40 degC reproduces 30 degC within 1 % (water follows Andrade closely over a few tens of K)
    temps = np.array([10.0, 25.0, 40.0])
    f = fluids.user_fluid_from_temperatures(
        "bench water",
        temps,
        viscosity.water_viscosity(temps),
        viscosity.water_density(temps),
        temperature_c=30.0,
        register=True,
    )
    cleanup.append("bench-water")
    assert f.viscosity() == pytest.approx(viscosity.water_viscosity(30.0), rel=0.01)
    assert f.density == pytest.approx(viscosity.water_density(30.0), rel=1e-3)
    assert "bench-water" in fluids.fluid_names()
    again = fluids.fluid("bench-water", temperature_c=30.0)
    assert again.viscosity() == f.viscosity()
    with pytest.warns(RangeWarning, match=r"10\.\.40 degC of this andrade fit"):
        fluids.fluid("bench-water", temperature_c=60.0)


def test_user_fluid_vft_recovers_parameters():
    # synthetic VFT data generated here: a = -10, b = 600 K, t0 = -120 degC
    temps = np.array([0.0, 20.0, 40.0, 60.0, 80.0])
    mu = np.exp(-10.0 + 600.0 / (temps + 120.0))
    from rheoline.model.fitting import fit_viscosity_temperature

    fit = fit_viscosity_temperature(temps, mu, "vft")
    assert fit.parameters["a"] == pytest.approx(-10.0, rel=1e-5)
    assert fit.parameters["b"] == pytest.approx(600.0, rel=1e-5)
    assert fit.parameters["t0_c"] == pytest.approx(-120.0, rel=1e-5)
    f = fluids.user_fluid_from_temperatures(
        "syrup", temps, mu, 1300.0, model="vft", temperature_c=50.0
    )
    assert f.viscosity() == pytest.approx(np.exp(-10.0 + 600.0 / 170.0), rel=1e-6)


def test_register_rules(cleanup):
    def build(temperature_c):
        return fluids.fluid("water", temperature_c)

    with pytest.raises(InputRangeError, match="built-in fluid and cannot be replaced"):
        fluids.register_fluid("water", build)
    fluids.register_fluid("my-rinse", build)
    cleanup.append("my-rinse")
    with pytest.raises(InputRangeError, match="already registered; pass overwrite=True"):
        fluids.register_fluid("my-rinse", build)
    fluids.register_fluid("my-rinse", build, overwrite=True)
    with pytest.raises(InputRangeError, match="cannot be removed"):
        fluids.unregister_fluid("plasma")


def test_user_fluid_input_errors():
    with pytest.raises(
        InputRangeError, match="andrade law needs viscosities at 2 or more distinct"
    ):
        fluids.user_fluid_from_temperatures("x", [20.0], [1e-3], 1000.0)
    with pytest.raises(InputRangeError, match="vft law needs viscosities at 3"):
        fluids.user_fluid_from_temperatures("x", [20.0, 30.0], [1e-3, 0.8e-3], 1000.0, model="vft")
    with pytest.raises(InputRangeError, match="did you mean 'andrade'"):
        fluids.user_fluid_from_temperatures(
            "x", [20.0, 30.0], [1e-3, 0.8e-3], 1000.0, model="andrad"
        )
    with pytest.raises(InputRangeError, match="viscosities must be greater than 0"):
        fluids.user_fluid_from_temperatures("x", [20.0, 30.0], [1e-3, -1.0], 1000.0)
    with pytest.raises(InputRangeError, match="density must be one value or one per temperature"):
        fluids.user_fluid_from_temperatures(
            "x", [20.0, 30.0, 40.0], [1e-3, 0.8e-3, 0.7e-3], [1000.0, 990.0]
        )


def test_describe_names_values_with_units():
    text = fluids.fluid("whole-blood", hematocrit=np.array([0.3, 0.5])).describe()
    assert text.startswith("whole-blood at 37 degC; hematocrit 0.3..0.5; density 10")
    assert "kg/m^3; carreau: mu_zero=" in text and "relaxation_time=3.313 s" in text
