"""Young & Tsai 1973 stenosis: worked values, the zero-stenosis limit, steep severe stenoses."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from rheoline.errors import InputRangeError
from rheoline.model.stenosis import (
    StenosedVessel,
    stenosis_flow_fraction_lost,
    throat_diameter,
    young_tsai_1973_coefficients,
    young_tsai_1973_pressure_drop,
)
from rheoline.model.vessels import Vessel

MU = 3.5e-3  # demo blood viscosity [Pa s]


def artery(radius=2e-3, length=0.05):
    """Demo data: a 4 mm, 5 cm artery with one Newtonian blood viscosity."""
    return Vessel(radius=radius, length=length, viscosity_law="newtonian", viscosity=MU)


def test_worked_example_by_hand():
    # Young & Tsai 1973 form, computed by hand: Q = 5e-6 m^3/s, D0 = 4 mm, D1 = 2 mm,
    # Ls = 1 cm, mu = 3.5e-3 Pa s, rho = 1060 kg/m^3.
    # A0 = pi * 0.004^2 / 4 = 1.256637e-5 m^2; U = Q / A0 = 0.397887 m/s;
    # K_v = 32 * (0.01 / 0.004) * (A0/A1)^2 = 32 * 2.5 * 16 = 1280;
    # viscous = 1280 * 3.5e-3 * 0.397887 / 0.004 = 445.634 Pa;
    # expansion = 1.52 * 1060 / 2 * (4 - 1)^2 * 0.397887^2 = 805.6 * 9 * 0.158314 = 1147.84 Pa.
    dp = young_tsai_1973_pressure_drop(5e-6, 4e-3, 2e-3, 1e-2, MU)
    assert dp == pytest.approx(445.634 + 1147.84, rel=1e-5)
    kv, kt = young_tsai_1973_coefficients(4e-3, 2e-3, 1e-2)
    assert kv == pytest.approx(1280.0, rel=1e-12)
    # Young & Tsai 1973 (J. Biomech. 6:395): K_t = 1.52 (from memory)
    assert kt == 1.52


def test_seeley_young_1976_viscous_coefficient():
    # Seeley & Young 1976 (J. Biomech. 9:439): K_v = 32 (0.83 Ls + 1.64 D1) / D0 (A0/A1)^2
    # (from memory). By hand: 32 * (0.0083 + 0.00328) / 0.004 * 16 = 32 * 2.895 * 16 = 1482.24
    kv, _ = young_tsai_1973_coefficients(4e-3, 2e-3, 1e-2, viscous_model="seeley-young-1976")
    assert kv == pytest.approx(1482.24, rel=1e-12)


def test_zero_stenosis_limit_is_the_plain_segment():
    # Hagen-Poiseuille: with D1 = D0 the expansion term vanishes and the viscous term is
    # 32 mu U Ls / D0^2, the plain tube over the stenosis length.
    v = artery()
    q = 5e-6
    dp = young_tsai_1973_pressure_drop(q, 4e-3, 4e-3, 1e-2, MU)
    assert dp == pytest.approx(np.asarray(v.resistance) * q * (0.01 / 0.05), rel=1e-12)
    s = StenosedVessel(v, reduction_percent=0.0, stenosis_length=1e-2)
    assert s.pressure_drop(q) == pytest.approx(v.pressure_drop(q), rel=1e-12)
    assert s.flow(500.0) == pytest.approx(v.flow(500.0), rel=1e-12)
    assert s.flow_fraction_lost(500.0) == pytest.approx(0.0, abs=1e-12)


def test_diameter_and_area_statements_agree():
    # geometry: 50 % diameter reduction leaves (0.5)^2 = 25 % of the area, a 75 % area reduction
    assert throat_diameter(4e-3, 50.0, "diameter") == pytest.approx(
        throat_diameter(4e-3, 75.0, "area"), rel=1e-12
    )
    v = artery()
    a = stenosis_flow_fraction_lost(v, 1000.0, 75.0, kind="area")
    d = stenosis_flow_fraction_lost(v, 1000.0, 50.0, kind="diameter")
    assert a == pytest.approx(d, rel=1e-12)


def test_pressure_drop_rises_steeply_past_seventy_percent_area():
    # common practice, no source: a stenosis matters little below about 50 % area
    # reduction and its pressure drop climbs steeply past about 70 %.
    pct = np.arange(30.0, 96.0, 5.0)
    s = StenosedVessel(artery(), pct, stenosis_length=1e-2)
    dp = np.asarray(s.stenosis_pressure_drop(5e-6))
    assert np.all(np.diff(dp, 2) > 0)  # convex in percent reduction
    at = dict(zip(pct, dp, strict=True))
    assert at[90.0] - at[70.0] > 10 * (at[50.0] - at[30.0])
    assert at[90.0] > 10 * at[50.0]


def test_flow_lost_curve_with_a_downstream_bed():
    # common practice, no source: with the bed downstream, flow is nearly unchanged up to
    # about 50-60 % area reduction and falls off fast beyond about 75-80 %.
    v = artery()
    pct = np.array([0.0, 30.0, 50.0, 60.0, 70.0, 80.0, 90.0, 95.0])
    lost = stenosis_flow_fraction_lost(v, 12000.0, pct, downstream_resistance=2.4e9)
    assert np.all(np.diff(lost) > 0)
    assert lost[2] < 0.03
    assert lost[6] > 0.3
    assert lost[7] > 0.6


@given(st.floats(0.0, 95.0), st.floats(10.0, 20000.0))
def test_flow_inverts_pressure_drop(percent, drive):
    s = StenosedVessel(artery(), percent, downstream_resistance=1e9)
    q = s.flow(drive)
    assert s.pressure_drop(q) == pytest.approx(drive, rel=1e-9)
    assert s.flow(-drive) == pytest.approx(-q, rel=1e-12)


def test_vectorized_over_reduction_and_drive():
    s = StenosedVessel(artery(), np.array([0.0, 50.0, 80.0]))
    q = s.flow(np.array([[100.0], [1000.0]]))
    assert np.shape(q) == (2, 3)


# --- bad input ---------------------------------------------------------------------------


def test_full_occlusion_raises():
    with pytest.raises(InputRangeError, match="complete occlusion"):
        throat_diameter(4e-3, 100.0)


def test_unknown_kind_raises():
    with pytest.raises(InputRangeError, match="kind must be one of"):
        throat_diameter(4e-3, 50.0, kind="radius")
    with pytest.raises(InputRangeError, match="kind must be one of"):
        StenosedVessel(artery(), 50.0, kind="radius")


def test_throat_wider_than_vessel_raises():
    with pytest.raises(InputRangeError, match="throat_diameter must not exceed diameter"):
        young_tsai_1973_pressure_drop(1e-6, 4e-3, 5e-3, 1e-2, MU)


def test_stenosis_longer_than_vessel_raises():
    with pytest.raises(InputRangeError, match="stenosis_length must not exceed"):
        StenosedVessel(artery(length=0.01), 50.0, stenosis_length=0.02)


def test_unknown_viscous_model_raises():
    with pytest.raises(InputRangeError, match="viscous_model must be one of"):
        young_tsai_1973_coefficients(4e-3, 2e-3, 1e-2, viscous_model="idelchik")


def test_not_a_vessel_raises():
    with pytest.raises(InputRangeError, match="vessel must be a rheoline Vessel"):
        StenosedVessel("artery", 50.0)
