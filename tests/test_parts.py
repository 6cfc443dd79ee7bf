"""Parts and the catalogue: dimensions, conversions, fits and bad input."""

import numpy as np
import pytest

from rheoline.errors import InputRangeError
from rheoline.model import catalogue
from rheoline.model.parts import (
    Cannula,
    Catheter,
    Fitting,
    MeasuredPart,
    Needle,
    Tube,
    central_line_lumen,
    circuit_tubing,
    extension_set,
)


def test_catheter_catalogue_is_ordered_by_gauge():
    # common practice, no source: a smaller gauge number is a larger bore
    gauges = sorted(catalogue.CATHETER_GAUGES)
    ids = [Catheter(gauge=g).inner_diameter for g in gauges]
    ods = [Catheter(gauge=g).outer_diameter for g in gauges]
    assert ids == sorted(ids, reverse=True)
    assert ods == sorted(ods, reverse=True)
    assert all(i < o for i, o in zip(ids, ods, strict=True))


def test_catheter_user_dimensions_override():
    c = Catheter(gauge=18, inner_diameter=1.05e-3, length=0.032, name="my 18G")
    assert (c.inner_diameter, c.length, c.name) == (1.05e-3, 0.032, "my 18G")


def test_needle_iso_9626_nominal_sizes():
    # ISO 9626 outer diameters, from memory: 18G 1.20-1.30 mm, 22G 0.698-0.730 mm,
    # 25G 0.500-0.530 mm (nominal mid-range values held)
    assert 1.20e-3 <= Needle(gauge=18).outer_diameter <= 1.30e-3
    assert 0.698e-3 <= Needle(gauge=22).outer_diameter <= 0.730e-3
    assert 0.500e-3 <= Needle(gauge=25).outer_diameter <= 0.530e-3
    # a thin wall has a larger bore at the same gauge
    for g in catalogue.NEEDLE_GAUGES:
        assert Needle(gauge=g, wall="thin").inner_diameter >= Needle(gauge=g).inner_diameter


def test_cannula_french_scale():
    # Charriere scale: 1 Fr = 1/3 mm outer diameter
    c = Cannula(french=18, inner_diameter=5.0e-3)
    assert c.outer_diameter == pytest.approx(6.0e-3)
    typical = Cannula(french=9)
    assert typical.inner_diameter == pytest.approx(3e-3 - 2 * catalogue.CANNULA_TYPICAL_WALL)


def test_circuit_tubing_inch_sizes():
    # by definition of the nominal size: 3/8 inch = 9.525 mm
    assert circuit_tubing("3/8", 1.0).inner_diameter == pytest.approx(9.525e-3)
    assert circuit_tubing("1/4", 1.0).inner_diameter == pytest.approx(6.35e-3)
    assert circuit_tubing("1/2", 1.0).inner_diameter == pytest.approx(12.7e-3)


def test_sets_and_central_lines():
    assert extension_set("microbore-extension").inner_diameter < extension_set().inner_diameter
    distal = central_line_lumen("distal")
    proximal = central_line_lumen("proximal")
    assert distal.inner_diameter > proximal.inner_diameter
    assert "16G equivalent" in distal.name


def test_measured_part_fit_recovers_coefficients():
    # demo data: pairs made from a = 2e9 Pa s/m^3, b = 5e13 Pa s^2/m^6
    q = np.array([0.5, 1.0, 2.0, 3.0]) * 1e-6
    part = MeasuredPart(flows=q, pressure_drops=2e9 * q + 5e13 * q**2)
    assert part.a == pytest.approx(2e9, rel=1e-6)
    assert part.b == pytest.approx(5e13, rel=1e-6)
    assert part.pressure_drop(1e-6) == pytest.approx(2e3 + 50.0)
    scaled = MeasuredPart(flows=q, pressure_drops=2e9 * q, test_viscosity=1e-3)
    assert scaled.pressure_drop(1e-6, viscosity=3e-3) == pytest.approx(6e3, rel=1e-6)


def test_array_dimensions():
    t = Tube(inner_diameter=np.array([1e-3, 2e-3]), length=1.0)
    assert t.inner_diameter.shape == (2,)
    assert "1-2 mm" in t.name


def test_bad_parts():
    with pytest.raises(InputRangeError, match="catheter gauge 19 is not in the catalogue"):
        Catheter(gauge=19)
    with pytest.raises(InputRangeError, match="needle wall 'extra' is not known"):
        Needle(gauge=18, wall="extra")
    with pytest.raises(InputRangeError, match="inner_diameter must be greater than 0"):
        Tube(inner_diameter=-1e-3, length=1.0)
    with pytest.raises(InputRangeError, match="outer_diameter .* must exceed inner_diameter"):
        Tube(inner_diameter=2e-3, length=1.0, outer_diameter=1e-3)
    with pytest.raises(InputRangeError, match="exactly one of k"):
        Fitting()
    with pytest.raises(InputRangeError, match="needs inner_diameter"):
        Fitting(equivalent_length=0.1)
    with pytest.raises(InputRangeError, match="leaves no bore"):
        Cannula(french=3, wall_thickness=0.6e-3)
    with pytest.raises(InputRangeError, match="equal, non-zero length"):
        MeasuredPart(flows=[1e-6, 2e-6], pressure_drops=[1.0])
    with pytest.raises(InputRangeError, match="circuit tubing size '5/8'"):
        circuit_tubing("5/8", 1.0)


def test_several_gauges_in_one_part_say_how_to_sweep_sizes():
    with pytest.raises(
        InputRangeError,
        match=r"catheter gauge must be one catalogue size .*"
        r"\[Catheter\(gauge=g\).*inner_diameter=np\.array",
    ):
        Catheter(gauge=np.array([18, 20]))
    with pytest.raises(
        InputRangeError,
        match=r"needle gauge must be one catalogue size .*"
        r"got \[18, 20\]",
    ):
        Needle(gauge=[18, 20])
    # one size given as a numpy scalar or a whole float is still that size
    assert Catheter(gauge=np.int64(18)).name == Catheter(gauge=np.array(18)).name == "18G catheter"
    assert Needle(gauge=22.0).inner_diameter == Needle(gauge=22).inner_diameter
    # sweeping the bore of one catalogue part is the vectorized way
    swept = Catheter(gauge=18, inner_diameter=np.array([0.9e-3, 1.0e-3, 1.1e-3]))
    assert swept.inner_diameter.shape == (3,)


def test_a_measured_bore_beyond_the_catalogue_outer_diameter_names_the_size():
    # the catalogue 16G outer diameter is 1.7 mm (from memory): a 1.71 mm bore cannot be a
    # 16G catheter; the message names the bore and the size, not an outer_diameter never given
    with pytest.raises(
        InputRangeError,
        match=r"inner_diameter 1\.2-1\.71 mm of a 16G catheter "
        r"reaches its typical outer diameter 1\.7 mm.*Tube",
    ):
        Catheter(gauge=16, inner_diameter=np.array([1.2e-3, 1.71e-3]))
    with pytest.raises(InputRangeError, match=r"of a 18G needle reaches its typical outer"):
        Needle(gauge=18, inner_diameter=2e-3)


def test_internal_volume_of_lumens_is_the_bore_cylinder():
    # geometry of a cylinder, pi D^2 L / 4: a 1 mm x 1.5 m microbore holds 1.178 mL
    tube = Tube(inner_diameter=1.0e-3, length=1.5)
    assert tube.internal_volume == pytest.approx(np.pi * 1.0e-6 * 1.5 / 4.0, rel=1e-15)
    assert tube.volume_note is None
    cath = Catheter(gauge=18)
    assert cath.internal_volume == pytest.approx(np.pi * cath.inner_diameter**2 * cath.length / 4.0)
    swept = Tube(inner_diameter=np.array([0.5e-3, 1.0e-3]), length=2.0)
    assert swept.internal_volume == pytest.approx(np.pi * np.array([0.25e-6, 1e-6]) * 2.0 / 4.0)
    assert swept.internal_volume[1] == pytest.approx(4.0 * swept.internal_volume[0])


def test_internal_volume_of_fittings_and_measured_parts_is_given_or_noted():
    plain = Fitting(k=0.9)
    assert plain.internal_volume == 0.0
    assert "internal volume not given" in plain.volume_note
    given = Fitting(k=0.9, internal_volume=0.1e-6)
    assert (given.internal_volume, given.volume_note) == (0.1e-6, None)
    crane = Fitting.crane("stopcock-branch", inner_diameter=2e-3, internal_volume=0.2e-6)
    assert crane.internal_volume == 0.2e-6
    hooper = Fitting.hooper("elbow-90-standard", inner_diameter=2e-3)
    assert hooper.internal_volume == 0.0 and hooper.volume_note
    q = np.array([1.0, 2.0]) * 1e-6
    filt = MeasuredPart(flows=q, pressure_drops=1e9 * q, internal_volume=2.5e-6)
    assert (filt.internal_volume, filt.volume_note) == (2.5e-6, None)
    assert MeasuredPart(flows=q, pressure_drops=1e9 * q).volume_note


def test_internal_volume_rejects_negative_and_nan():
    with pytest.raises(InputRangeError, match=r"internal_volume must be 0 m\^3 or more"):
        Fitting(k=0.5, internal_volume=-1e-7)
    with pytest.raises(InputRangeError, match="internal_volume must be finite"):
        MeasuredPart(flows=[1e-6], pressure_drops=[1e3], internal_volume=float("nan"))
