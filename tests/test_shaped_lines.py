"""Non-circular lumens in a line, catalogue multi-lumen catheters, check valves, the parts split."""

import numpy as np
import pytest

import rheoline
from rheoline.errors import InputRangeError
from rheoline.model.fluid_base import newtonian_fluid
from rheoline.model.line import Line
from rheoline.model.parts import CheckValve, Fitting, Tube
from rheoline.model.shapes import Annulus, Circle, Crescent, Rectangle, Semicircle

WATER = newtonian_fluid("water", viscosity=1.0e-3, density=998.0)


def _laminar_drop(shape, length, flow, viscosity):
    # fully developed laminar flow of any duct: dp = 2 (f Re) mu L u / D_h^2, u = Q / A
    # (Fanning f = tau_w / (rho u^2 / 2), tau_w = dp D_h / (4 L); Shah & London 1978, ch. 1)
    u = flow / shape.area
    return 2.0 * shape.laminar_f_re * viscosity * length * u / shape.hydraulic_diameter**2


@pytest.mark.parametrize(
    "shape",
    [
        Semicircle(3.0e-3),
        Annulus(outer_diameter=2.0e-3, inner_diameter=0.9e-3),
        Annulus(outer_diameter=2.0e-3, inner_diameter=0.9e-3, eccentricity=0.6),
        Crescent(outer_diameter=2.5e-3, inner_diameter=1.3e-3),
        Rectangle(width=3e-3, height=0.5e-3),
    ],
    ids=lambda s: s.key,
)
def test_a_long_laminar_shaped_lumen_has_its_exact_drop(shape):
    # at Re ~ 0.5 over 2 m the entrance, developing-flow and exit terms are below 1e-4
    line = Line([Tube(shape=shape, length=2.0)])
    flow = 1e-9
    result = line.solve(WATER, flow=flow)
    exact = _laminar_drop(shape, 2.0, flow, 1.0e-3)
    assert result.required_pressure == pytest.approx(exact, rel=2e-4)
    # and the flow solve inverts it
    back = line.solve(WATER, source_pressure=exact)
    assert back.flow == pytest.approx(flow, rel=2e-4)
    assert back.part_reynolds[0] == pytest.approx(
        998.0 * back.flow / shape.area * shape.hydraulic_diameter / 1e-3, rel=1e-12
    )


def test_a_circle_shape_is_the_plain_tube():
    plain = Line([Tube(inner_diameter=1.2e-3, length=0.3)]).solve(WATER, head=1.0)
    shaped = Line([Tube(shape=Circle(1.2e-3), length=0.3)]).solve(WATER, head=1.0)
    assert shaped.flow == pytest.approx(plain.flow, rel=1e-12)


def test_a_d_lies_between_the_circles_of_its_area_and_of_its_hydraulic_diameter():
    # the same area as a circle but a smaller hydraulic diameter: more resistance; a circle
    # of the D's hydraulic diameter (an "equivalent diameter") has far less area: less flow
    d = Semicircle(3.0e-3)
    same_area = Tube(inner_diameter=np.sqrt(4 * d.area / np.pi), length=0.2)
    same_dh = Tube(inner_diameter=d.hydraulic_diameter, length=0.2)
    q_d = Line([Tube(shape=d, length=0.2)]).solve(WATER, head=1.0).flow
    q_area = Line([same_area]).solve(WATER, head=1.0).flow
    q_dh = Line([same_dh]).solve(WATER, head=1.0).flow
    assert 1.2 * q_dh < q_d < 0.95 * q_area


def test_turbulent_shaped_lumen_uses_the_hydraulic_diameter():
    gap = Annulus(outer_diameter=6e-3, inner_diameter=2e-3)
    result = Line([Tube(shape=gap, length=1.0)]).solve(WATER, source_pressure=3e5)
    assert result.regime == "turbulent"
    assert any("non-circular lumen (annulus 6 mm around 2 mm" in f for f in result.flags)


def test_blood_through_a_double_d_lumen_converges_and_says_it_is_approximate():
    blood = rheoline.fluid("whole-blood")
    from rheoline.model.devices import multi_lumen_catheter_lumen

    part = multi_lumen_catheter_lumen("13.5 Fr double-D", "arterial")
    result = Line([part]).solve(blood, flow=300e-6 / 60)  # 300 mL/min, a dialysis flow
    assert result.converged
    assert any(
        "apparent viscosity of a circle of its hydraulic diameter" in f for f in result.flags
    )
    back = Line([part]).solve(blood, source_pressure=result.required_pressure)
    assert back.flow == pytest.approx(300e-6 / 60, rel=1e-8)
    # a Newtonian fluid of the same high-shear viscosity loses less than shear-thinning blood
    # at low shear, never more than 3 times less at this flow (a plausibility band)
    newt = newtonian_fluid("n", blood.rheology.infinite_shear_viscosity, blood.density)
    ratio = result.required_pressure / Line([part]).solve(newt, flow=300e-6 / 60).required_pressure
    assert 1.0 < ratio < 3.0


def test_multi_lumen_catalogue_lumens_have_their_shapes():
    from rheoline.model import catalogue
    from rheoline.model.devices import multi_lumen_catheter_lumen

    for kind, entry in catalogue.MULTI_LUMEN_CATHETERS.items():
        for lumen, (key, _dims) in entry["lumens"].items():
            part = multi_lumen_catheter_lumen(kind, lumen)
            assert part.length == entry["length"]
            assert (part.shape.key if part.shape is not None else "circle") == key
            # every lumen lies inside the catheter's outer diameter (French / 3 mm)
            assert part.shape.hydraulic_diameter < entry["french"] / 3 * 1e-3
    with pytest.raises(InputRangeError, match="multi-lumen catheter 'x' is not in the catalogue"):
        multi_lumen_catheter_lumen("x", "venous")
    with pytest.raises(InputRangeError, match="lumen of the 13.5 Fr double-D 'distal'"):
        multi_lumen_catheter_lumen("13.5 Fr double-D", "distal")


def test_a_shaped_lumen_resizes_keeping_its_shape():
    part = Tube(shape=Annulus(outer_diameter=2e-3, inner_diameter=1e-3), length=0.5)
    resized = part.resized(inner_diameter=np.array([0.5e-3, 2e-3]))
    np.testing.assert_allclose(resized.inner_diameter, [0.5e-3, 2e-3])
    np.testing.assert_allclose(resized.shape.laminar_f_re, part.laminar_f_re)
    assert Tube(inner_diameter=1e-3, length=1.0).resized(length=2.0).length == 2.0


def test_shaped_lumen_errors_name_the_fix():
    with pytest.raises(InputRangeError, match="needs inner_diameter .* or shape="):
        Tube(length=1.0)
    with pytest.raises(InputRangeError, match="give a non-circular lumen its shape only"):
        Tube(inner_diameter=1e-3, length=1.0, shape=Semicircle(2e-3))
    with pytest.raises(InputRangeError, match="shape must be a cross-section"):
        Tube(length=1.0, shape="d-shaped")
    with pytest.raises(InputRangeError, match="Tube needs length"):
        Tube(inner_diameter=1e-3)


def test_a_check_valve_is_a_one_way_k_fitting_in_a_line():
    valve = CheckValve(k=3.0, inner_diameter=2e-3)
    assert valve.one_way and not Fitting(k=3.0).one_way
    with_valve = Line([Tube(inner_diameter=2e-3, length=1.0), valve]).solve(WATER, head=1.0)
    with_k = Line([Tube(inner_diameter=2e-3, length=1.0), Fitting(k=3.0, inner_diameter=2e-3)])
    assert with_valve.flow == pytest.approx(with_k.solve(WATER, head=1.0).flow, rel=1e-14)
    with pytest.raises(InputRangeError, match="CheckValve needs k"):
        CheckValve(equivalent_length=0.1, inner_diameter=1e-3)


def test_devices_still_import_from_parts():
    from rheoline.model import devices, parts

    assert parts.Catheter is devices.Catheter
    assert rheoline.central_line_lumen is devices.central_line_lumen
    with pytest.raises(AttributeError, match="has no attribute 'Nothing'"):
        parts.Nothing  # noqa: B018


def test_tolerance_bands_and_bore_sweeps_keep_a_lumens_shape():
    from rheoline.model.curves import flow_curves
    from rheoline.model.tolerance import flow_tolerance

    part = Tube(shape=Semicircle(3e-3), length=0.2)
    line = Line([part])
    band = flow_tolerance(line, WATER, head=1.0, diameter_tolerance=0.02, n_samples=200, seed=1)
    assert band.samples.size == 200
    curves = flow_curves(
        [line], WATER, over="inner_diameter", values=[part.inner_diameter], head=1.0
    )
    (flows,) = curves.flows.values()
    assert flows[0] == pytest.approx(line.solve(WATER, head=1.0).flow, rel=1e-9)


def test_parts_still_offers_its_catalogue_module():
    from rheoline.model import catalogue, parts

    assert parts.catalogue is catalogue
