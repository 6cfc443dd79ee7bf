"""The series line: drives, the vectorized solve and its inverse, results and flags."""

import subprocess
import sys

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

import rheoline
from rheoline.errors import InputRangeError
from rheoline.model import catalogue, fluids
from rheoline.model.fluid_base import Fluid, newtonian_fluid
from rheoline.model.line import GRAVITY, Line
from rheoline.model.lumen import poiseuille_flow, power_law_tube_flow
from rheoline.model.parts import Catheter, Fitting, MeasuredPart, Needle, Tube
from rheoline.model.rheology import PowerLaw

ML_PER_MIN = 1e-6 / 60.0
WATER_22 = rheoline.fluid("water", temperature_c=22.0)
PLAIN = newtonian_fluid("test liquid", viscosity=1.0e-3, density=1000.0)


def _line():
    return Line([Tube(inner_diameter=3.0e-3, length=1.8), Catheter(gauge=18)])


# --- against Hagen-Poiseuille ---------------------------------------------------------------


def test_long_narrow_lumen_is_poiseuille():
    # Hagen-Poiseuille holds for long lumens at low Re; entrance/exit terms are small there
    tube = Tube(inner_diameter=0.3e-3, length=1.0)
    head = 0.5
    result = Line([tube]).solve(PLAIN, head=head)
    drive = 1000.0 * GRAVITY * head
    assert result.max_reynolds < 100
    assert result.flow == pytest.approx(poiseuille_flow(drive, 0.15e-3, 1.0, 1.0e-3), rel=0.02)


def test_short_wide_lumen_falls_well_below_poiseuille():
    # kinetic (entrance, developing-flow and exit) losses dominate a short wide bore
    result = Line([Tube(inner_diameter=3e-3, length=0.02)]).solve(PLAIN, head=1.0)
    ideal = poiseuille_flow(1000.0 * GRAVITY, 1.5e-3, 0.02, 1.0e-3)
    assert result.flow < 0.2 * ideal


def test_power_law_fluid_long_tube_is_exact():
    # power-law tube flow, exact closed form (Bird, Armstrong & Hassager 1987)
    fluid = Fluid(name="pl", temperature_c=20.0, density=1000.0, rheology=PowerLaw(0.05, 0.6))
    tube = Tube(inner_diameter=1e-3, length=2.0)
    result = Line([tube]).solve(fluid, source_pressure=2e4)
    exact = power_law_tube_flow(2e4, 0.5e-3, 2.0, 0.05, 0.6)
    assert result.max_reynolds < 50
    assert result.flow == pytest.approx(exact, rel=0.005)


# --- facts of the trade -----------------------------------------------------------------------


def test_larger_bore_much_more_gravity_flow():
    # common practice, no source: each step down in gauge number buys a lot of flow;
    # 14G carries over ten times what 26G does under the same head
    flows = {
        g: Line([Catheter(gauge=g)]).solve(WATER_22, head=0.525).flow
        for g in catalogue.CATHETER_GAUGES
    }
    gauges = sorted(flows)
    assert all(flows[a] > 1.3 * flows[b] for a, b in zip(gauges, gauges[1:], strict=False))
    assert flows[14] > 10 * flows[26]


@pytest.mark.parametrize("gauge", sorted(catalogue.CATHETER_GAUGES))
def test_labelled_gravity_flows_within_wide_band(gauge):
    # Labelled flows of peripheral catheters (water, catheter alone, a head of about
    # 0.525 m at about 22 degC, the ISO 10555 test): values from memory in the catalogue.
    # Makers' bores and lengths differ, so the stated band is wide: 0.5x to 1.5x.
    labelled = catalogue.CATHETER_GAUGES[gauge][3]
    flow = Line([Catheter(gauge=gauge)]).solve(WATER_22, head=0.525).flow
    assert 0.5 * labelled < flow < 1.5 * labelled


def test_needle_thin_wall_flows_more():
    # common practice, no source: thin-wall needles of the same gauge flow more
    regular = Line([Needle(gauge=21)]).solve(WATER_22, source_pressure=2e4).flow
    thin = Line([Needle(gauge=21, wall="thin")]).solve(WATER_22, source_pressure=2e4).flow
    assert thin > 1.2 * regular


def test_regime_transition_in_a_line():
    # common practice, no source: laminar below about 2300, turbulent above 4000
    tube = Tube(inner_diameter=4e-3, length=0.5)
    low = Line([tube]).solve(PLAIN, head=0.05)
    high = Line([tube]).solve(PLAIN, head=20.0)
    assert low.regime == "laminar" and low.max_reynolds < 2300
    assert high.regime == "turbulent" and high.max_reynolds > 4000
    assert any("turbulent flow" in f for f in high.flags)


# --- bookkeeping, inverse, vectorization --------------------------------------------------------


def test_result_table_and_bookkeeping():
    result = _line().solve(WATER_22, head=1.0, back_pressure=500.0)
    drive = WATER_22.density * GRAVITY * 1.0 - 500.0
    assert result.part_pressure_drops.sum() + result.exit_pressure_drop == pytest.approx(drive)
    table = result.parts
    for column in (
        "part",
        "reynolds",
        "regime",
        "pressure_drop [Pa]",
        "wall_shear_stress [Pa]",
        "wall_shear_rate [1/s]",
        "mean_velocity [m/s]",
        "entrance_length [m]",
        "share [-]",
    ):
        assert column in table.columns
    assert list(table["part"]) == ["tube 3 mm x 1.8 m", "18G catheter", "exit"]
    assert table["pressure_drop [Pa]"].sum() == pytest.approx(drive)
    assert table["share [-]"].sum() == pytest.approx(1.0)
    assert result.dominant_part == "18G catheter"
    assert 0.5 < result.dominant_share < 1.0
    assert result.required_pressure == pytest.approx(0.0, abs=1e-6)
    # Newtonian wall shear of fully developed laminar flow: tau = 8 mu u / D (Poiseuille);
    # the reported length-averaged stress adds Shah 1978's developing excess (x+ ~ 0.9)
    u = result.part_mean_velocity[0]
    assert result.part_developed_wall_shear_stress[0] == pytest.approx(
        8 * WATER_22.viscosity() * u / 3e-3, rel=1e-6
    )
    ratio = result.part_wall_shear_stress[0] / result.part_developed_wall_shear_stress[0]
    assert 1.0 < ratio < 1.05
    assert result.part_wall_shear_rate[0] == pytest.approx(
        result.part_wall_shear_stress[0] / WATER_22.viscosity(), rel=1e-6
    )


def test_prescribed_flow_and_pressure_limit():
    line = _line()
    q = 200 * ML_PER_MIN
    result = line.solve(WATER_22, flow=q, head=0.5, pressure_limit=20_000.0)
    gravity = WATER_22.density * GRAVITY * 0.5
    assert result.required_pressure == pytest.approx(result.net_drive - gravity)
    assert result.exceeds_pressure_limit == (result.required_pressure > 20_000.0)
    flagged = line.solve(WATER_22, flow=q, pressure_limit=1000.0)
    assert flagged.exceeds_pressure_limit
    assert any("pressure limit exceeded" in f for f in flagged.flags)


def test_no_forward_flow():
    result = _line().solve(WATER_22, head=0.1, back_pressure=5000.0)
    assert result.flow == 0.0
    assert any("no forward flow" in f for f in result.flags)
    assert not np.any(np.isnan(result.part_pressure_drops))


drive_heads = st.floats(0.05, 3.0)
diameters = st.floats(0.2e-3, 5e-3)
lengths = st.floats(0.01, 3.0)
viscosities = st.floats(0.5e-3, 50e-3)


@given(drive_heads, diameters, lengths, viscosities)
def test_drops_add_up_and_inverse_round_trip(head, diameter, length, viscosity):
    fluid = newtonian_fluid("liquid", viscosity=viscosity, density=1000.0)
    line = Line([Tube(inner_diameter=diameter, length=length), Catheter(gauge=20)])
    result = line.solve(fluid, head=head)
    drive = 1000.0 * GRAVITY * head
    assert np.isfinite(result.flow) and result.flow > 0
    assert result.part_pressure_drops.sum() + result.exit_pressure_drop == pytest.approx(
        drive, rel=1e-9
    )
    back = line.solve(fluid, flow=result.flow)
    assert back.required_pressure == pytest.approx(drive, rel=1e-3)  # 0.1 % round trip
    assert back.required_pressure == pytest.approx(drive, rel=1e-8)


@given(drive_heads, diameters, lengths, viscosities, st.floats(1.05, 2.0))
def test_flow_monotone_in_drive_diameter_length_viscosity(head, diameter, length, viscosity, k):
    def solve(h=head, d=diameter, length_=length, mu=viscosity):
        fluid = newtonian_fluid("liquid", viscosity=mu, density=1000.0)
        return Line([Tube(inner_diameter=d, length=length_)]).solve(fluid, head=h)

    base = solve()
    assert solve(h=head * k).flow > base.flow
    assert solve(d=diameter * k).flow > base.flow
    assert solve(length_=length * k).flow < base.flow
    thicker = solve(mu=viscosity * k)
    if base.max_reynolds < 2000:
        # laminar: more viscous, less flow.  (In the transitional band the friction factor
        # jumps up with Re, so at a fixed drive a thicker liquid that falls back to laminar
        # flow can carry more: a property of the Churchill 1977 curve and of real pipes.)
        assert thicker.flow < base.flow


def test_vectorized_equals_scalar():
    heads = np.array([0.3, 0.8, 1.5, 6.0])
    ids = np.array([2.5e-3, 3.0e-3, 3.5e-3, 4.0e-3])
    line = Line([Tube(inner_diameter=ids, length=1.8), Catheter(gauge=18), Fitting(k=0.8)])
    vec = line.solve(WATER_22, head=heads)
    assert vec.flow.shape == (4,)
    assert vec.part_pressure_drops.shape == (3, 4)
    for i in range(4):
        one = Line(
            [Tube(inner_diameter=ids[i], length=1.8), Catheter(gauge=18), Fitting(k=0.8)]
        ).solve(WATER_22, head=heads[i])
        assert vec.flow[i] == pytest.approx(one.flow, rel=1e-9)
        assert vec.regime[i] == one.regime
        assert vec.dominant_part[i] == one.dominant_part
    table = vec.parts
    assert list(table.columns)[0] == "scenario"
    assert len(table) == 4 * 4


def test_fluid_temperature_array_broadcasts():
    # water thins with temperature (IAPWS 2008), so gravity flow rises
    warm = rheoline.fluid("water", temperature_c=np.array([10.0, 22.0, 37.0]))
    flows = _line().solve(warm, head=1.0).flow
    assert np.all(np.diff(flows) > 0)


def test_fittings_and_measured_parts_in_a_line():
    q = np.array([1.0, 2.0, 4.0]) * 1e-6
    filt = MeasuredPart(flows=q, pressure_drops=3e9 * q + 2e14 * q**2, name="filter")
    stopcock = Fitting(k=2.0, name="stopcock")
    line = Line([Tube(inner_diameter=3e-3, length=1.0), stopcock, filt, Catheter(gauge=20)])
    result = line.solve(PLAIN, flow=2e-6)
    drops = dict(zip(line.part_names, result.part_pressure_drops, strict=True))
    assert drops["filter"] == pytest.approx(3e9 * 2e-6 + 2e14 * 4e-12, rel=1e-6)
    u = 2e-6 / (np.pi * (3e-3) ** 2 / 4)  # stopcock K refers to the upstream tube
    assert drops["stopcock"] == pytest.approx(2.0 * 1000.0 * u**2 / 2)
    assert result.part_reynolds[2] != result.part_reynolds[2]  # NaN: no bore


def test_blood_line_round_trip_and_flags():
    # whole blood aggregates, so it is shear-thinning (red cells in additive solution do not)
    blood = rheoline.fluid("whole-blood", hematocrit=0.65, temperature_c=4.0)
    line = _line()
    result = line.solve(blood, head=np.array([0.5, 1.0, 1.5]))
    assert np.all(np.diff(result.flow) > 0)
    back = line.solve(blood, flow=result.flow)
    drive = blood.density * GRAVITY * np.array([0.5, 1.0, 1.5])
    assert np.allclose(back.required_pressure, drive, rtol=1e-6)
    assert any("Rabinowitsch-Mooney" in f for f in result.flags)
    assert np.all(result.hemolysis_index > 0)
    # shear thinning: blood flows more than a Newtonian liquid at its zero-shear viscosity
    thick = newtonian_fluid("mu0", viscosity=blood.rheology.mu_zero, density=blood.density)
    assert np.all(result.flow > line.solve(thick, head=np.array([0.5, 1.0, 1.5])).flow)


def test_pries_correction_lowers_resistance_of_narrow_lumens():
    # Pries 1992: apparent viscosity falls below ~1 mm (Fahraeus-Lindqvist effect)
    blood = rheoline.fluid("whole-blood", hematocrit=0.45, temperature_c=37.0)
    line = Line([Tube(inner_diameter=0.3e-3, length=0.05)])
    plain = line.solve(blood, source_pressure=2e4)
    corrected = line.solve(blood, source_pressure=2e4, pries_correction=True)
    assert corrected.flow > plain.flow
    assert any("Pries 1992" in f for f in corrected.flags)
    with pytest.raises(InputRangeError, match="pries_correction applies to blood"):
        line.solve(PLAIN, head=1.0, pries_correction=True)


def test_bad_input():
    line = _line()
    with pytest.raises(InputRangeError, match="either flow .* or source_pressure"):
        line.solve(PLAIN, flow=1e-6, source_pressure=1e3)
    with pytest.raises(InputRangeError, match="flow must be 0 m\\^3/s or more"):
        line.solve(PLAIN, flow=-1e-6)
    with pytest.raises(InputRangeError, match="head must be finite"):
        line.solve(PLAIN, head=np.inf)
    with pytest.raises(InputRangeError, match="at least one part"):
        Line([])
    with pytest.raises(InputRangeError, match="part\\[1\\] is 'catheter', not a rheoline part"):
        Line([Tube(inner_diameter=1e-3, length=1.0), "catheter"])
    with pytest.raises(InputRangeError, match="entrance 'funnel' is not known"):
        Line([Catheter(gauge=18)], entrance="funnel")


def test_model_import_does_not_load_pandas():
    code = "import sys, rheoline.model.line, rheoline.model.parts; print('pandas' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


@pytest.mark.parametrize(
    "fluid",
    [WATER_22, rheoline.fluid("packed-red-cells", hematocrit=0.65, temperature_c=4.0)],
    ids=["water", "packed-red-cells"],
)
def test_shared_characteristic_path_equals_newton_path(fluid, monkeypatch):
    # many drives through one line: the tabulated-characteristic path must match the
    # per-scenario Newton path (same physics) within its checked interpolation error
    import rheoline.model.line_characteristic as curve_module

    heads = np.random.default_rng(3).uniform(0.3, 1.5, 20000)
    line = _line()
    fast = line.solve(fluid, head=heads)
    fast_back = line.solve(fluid, flow=fast.flow)
    assert fast.iterations == 0  # the curve path was taken (cheaper at 20,000 drives)
    monkeypatch.setattr(curve_module, "cheaper_than_newton", lambda *args, **kw: False)
    slow = line.solve(fluid, head=heads)
    slow_back = line.solve(fluid, flow=fast.flow)
    assert slow.iterations > 0
    assert np.allclose(fast.flow, slow.flow, rtol=1e-8, atol=0)
    assert np.allclose(fast.part_pressure_drops, slow.part_pressure_drops, rtol=1e-8, atol=0)
    assert np.allclose(fast_back.required_pressure, slow_back.required_pressure, rtol=1e-8)
    assert np.allclose(fast_back.part_pressure_drops, slow_back.part_pressure_drops, rtol=1e-8)
    assert np.allclose(fast.part_reynolds, slow.part_reynolds, rtol=1e-8)
    drive = fluid.density * GRAVITY * heads
    assert np.allclose(fast.part_pressure_drops.sum(0) + fast.exit_pressure_drop, drive, rtol=1e-8)


def test_shared_characteristic_only_where_it_is_cheaper():
    # its grid (some 1,100 points for these heads, known before it is built) costs two
    # passes a point; a Newton solve some 3.5 passes a scenario: 600 drives take Newton
    heads = np.random.default_rng(3).uniform(0.3, 1.5, 600)
    assert _line().solve(WATER_22, head=heads).iterations > 0
    assert _line().solve(WATER_22, head=np.resize(heads, 20000)).iterations == 0


def test_yield_stress_fluid_needs_the_yield_pressure():
    # Casson (1959): no flow until the wall stress exceeds the yield stress, i.e. until the
    # drive exceeds 4 L tau_y / D; the losses at vanishing flow equal that yield pressure
    from rheoline.model.rheology import Casson

    fluid = Fluid(
        name="casson",
        temperature_c=20.0,
        density=1050.0,
        rheology=Casson(yield_stress=0.01, casson_viscosity=0.004),
    )
    line = Line([Tube(inner_diameter=0.2e-3, length=2.0)])
    yield_pressure = 4 * 2.0 * 0.01 / 0.2e-3  # 400 Pa, by hand
    below = line.solve(fluid, source_pressure=0.9 * yield_pressure)
    above = line.solve(fluid, source_pressure=3.0 * yield_pressure)
    assert below.flow == 0.0 and any("no forward flow" in f for f in below.flags)
    assert above.flow > 0 and above.converged
    residual = line.pressure_residual(fluid, 0.0, source_pressure=yield_pressure)
    assert residual == pytest.approx(0.0, abs=1e-3 * yield_pressure)


@pytest.mark.parametrize("drive", [1e-300, 1e-120, 1e-30])
def test_vanishing_drives_stay_finite(drive):
    result = _line().solve(WATER_22, source_pressure=drive)
    assert np.isfinite(result.flow) and result.flow >= 0
    assert np.all(np.isfinite(result.part_pressure_drops))
    assert np.isfinite(result.required_pressure)


def test_hemolysis_index_is_giersiepen_at_wall_stress_and_residence_time():
    # Giersiepen et al. 1990 power law evaluated per lumen at its wall shear stress and
    # mean residence time L/u, summed over the lumens
    from rheoline.model.hemolysis import giersiepen_1990_hemolysis_index

    blood = rheoline.fluid("whole-blood", hematocrit=0.45, temperature_c=37.0)
    result = Line([Needle(gauge=22, length=0.03)]).solve(blood, flow=50e-6 / 60)
    tau = result.part_wall_shear_stress[0]
    t = 0.03 / result.part_mean_velocity[0]
    assert result.hemolysis_index == pytest.approx(
        giersiepen_1990_hemolysis_index(tau, t, warn=False), rel=1e-9
    )
    faster = Line([Needle(gauge=22, length=0.03)]).solve(blood, flow=200e-6 / 60)
    assert faster.max_wall_shear_stress > result.max_wall_shear_stress


def test_catalogue_dimensions_are_flagged():
    typical = Line([Catheter(gauge=20)]).solve(WATER_22, head=1.0)
    measured = Line([Catheter(gauge=20, inner_diameter=0.82e-3, length=0.030)]).solve(
        WATER_22, head=1.0
    )
    assert any("typical catalogue bore/length (from memory)" in f for f in typical.flags)
    assert not any("catalogue" in f for f in measured.flags)
    needle = Line([Needle(gauge=25)]).solve(WATER_22, head=1.0)
    assert any("ISO 9626 minimum bore" in f for f in needle.flags)


def test_turbulent_tube_against_fluids_library_assembly():
    # independent assembly with the fluids library (fluids.friction.Churchill_1977,
    # fluids.fittings.entrance_sharp(method="Crane"), fluids.fittings.exit_normal):
    # rho g h = (f L/D + K_entrance + K_exit) rho u^2 / 2, solved with scipy brentq
    import fluids.fittings
    import fluids.friction
    from scipy.optimize import brentq

    d, length, head = 4e-3, 2.0, 20.0
    rho, mu = WATER_22.density, WATER_22.viscosity()
    k = fluids.fittings.entrance_sharp(method="Crane") + fluids.fittings.exit_normal()

    def residual(u):
        re = rho * u * d / mu
        f = fluids.friction.Churchill_1977(re, 0.0)
        return (f * length / d + k) * rho * u * u / 2 - rho * GRAVITY * head

    u = brentq(residual, 1e-3, 100.0, xtol=1e-12)
    expected = u * np.pi * d * d / 4
    result = Line([Tube(inner_diameter=d, length=length)]).solve(WATER_22, head=head)
    assert result.regime == "turbulent"
    # the developing-flow (Shah) term left inside the blend is negligible at Re ~ 2e4
    assert result.flow == pytest.approx(expected, rel=1e-6)


def test_api_mistakes_name_the_argument_and_the_fix():
    line = Line([Tube(inner_diameter=1e-3, length=1.0)])
    with pytest.raises(InputRangeError, match=r"got the name 'water'.*rheoline\.fluid\('water'\)"):
        line.solve("water", head=1.0)
    with pytest.raises(InputRangeError, match=r"fluid must be a Fluid object, got None"):
        line.pressure_residual(None, 1e-6, head=1.0)
    with pytest.raises(InputRangeError, match=r"got one Tube .*Pass a list of parts"):
        Line(Tube(inner_diameter=1e-3, length=1.0))
    with pytest.raises(InputRangeError, match=r"head \(4,\), part\[0\] .*inner_diameter \(3,\)"):
        Line([Tube(inner_diameter=np.full(3, 1e-3), length=1.0)]).solve(WATER_22, head=np.ones(4))
    with pytest.raises(InputRangeError, match=r"fluid\.temperature_c \(2,\).*length \(3,\)"):
        Line([Tube(inner_diameter=1e-3, length=np.ones(3))]).solve(
            rheoline.fluid("water", temperature_c=np.array([20.0, 30.0])), head=1.0
        )
    with pytest.raises(InputRangeError, match=r"back_pressure \(3,\), flow \(2,\)"):
        line.solve(WATER_22, flow=np.ones(2) * 1e-6, back_pressure=np.zeros(3))
    # shapes that broadcast still solve: a 4 x 3 grid of heads against bores
    grid = Line([Tube(inner_diameter=np.full(3, 1e-3), length=1.0)]).solve(
        WATER_22, head=np.ones((4, 1))
    )
    assert np.shape(grid.flow) == (4, 3)


def test_functions_taking_a_line_reject_a_list_of_parts():
    from rheoline.model.delivery import falling_head_delivery_time
    from rheoline.model.tolerance import flow_tolerance

    parts = [Tube(inner_diameter=1e-3, length=1.0)]
    with pytest.raises(InputRangeError, match=r"line must be a Line, got list.*Line\(\["):
        falling_head_delivery_time(parts, WATER_22, 1e-4, 1.0, 0.5)
    with pytest.raises(InputRangeError, match=r"rheoline\.fluid\('saline-0\.9'\)"):
        flow_tolerance(Line(parts), "saline-0.9", head=1.0, diameter_tolerance=0.05)


def test_a_line_that_resists_nothing_is_refused_naming_the_parts():
    # with every loss coefficient zero, dp = K rho u^2 / 2 (Crane 1988, TP-410, eq. 2-4,
    # the definition of K) is zero at any flow: the flow would be unbounded
    fluid_ = fluids.fluid("saline-0.9")
    with pytest.raises(InputRangeError, match="no part of this line resists flow") as err:
        Line([Fitting(k=0.0, inner_diameter=0.3e-3)])
    assert err.value.field == "parts"
    with pytest.raises(InputRangeError, match="give a fitting k > 0"):
        Line([Fitting(k=np.array([0.0, 1.0]), inner_diameter=0.3e-3)])
    # one fitting with a loss is enough to bound the flow: dp = k rho u^2 / 2
    res = Line([Fitting(k=1.0, inner_diameter=0.3e-3)]).solve(fluid_, head=0.0, source_pressure=1e3)
    area = np.pi * (0.3e-3) ** 2 / 4.0
    assert res.flow == pytest.approx(area * np.sqrt(2.0 * 1e3 / fluid_.density), rel=1e-6)
