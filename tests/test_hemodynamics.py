"""Vascular resistance, SVR/PVR and body surface area, checked against outside sources."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

import rheoline
from rheoline.errors import InputRangeError, RangeWarning
from rheoline.model.hemodynamics import (
    WOOD_UNIT_TO_DYN_S_PER_CM5,
    WOOD_UNIT_TO_PA_S_PER_M3,
    body_surface_area,
    cardiac_index,
    dubois_1916_body_surface_area,
    mosteller_1987_body_surface_area,
    pulmonary_vascular_resistance,
    pulmonary_vascular_resistance_index,
    systemic_vascular_resistance,
    systemic_vascular_resistance_index,
    typical_adult_range,
    vascular_resistance,
)

# --- published values: the unit factor ---------------------------------------------------


def test_wood_unit_factor_derived_from_nist_sp811():
    # NIST SP 811 (Thompson & Taylor 2008) Appendix B.8: 1 mmHg = 1.333 224 E+02 Pa (seven
    # digits, so rel 1e-6 at most). 1 WU = 1 mmHg min/L = 133.3224 Pa * 60 s / 0.001 m^3
    # = 7 999 344 Pa s/m^3.
    assert WOOD_UNIT_TO_PA_S_PER_M3 == pytest.approx(7_999_344.0, rel=1e-6)
    # 1 Pa s/m^3 = 1 N s m^-5 = 1e5 dyn s / (1e2 cm)^5 = 1e-5 dyn s cm^-5,
    # so 1 WU = 79.99344 dyn s cm^-5, which rounds to the 79.99 quoted clinically.
    assert WOOD_UNIT_TO_DYN_S_PER_CM5 == pytest.approx(79.99344, rel=1e-6)
    assert round(WOOD_UNIT_TO_DYN_S_PER_CM5, 2) == 79.99


def test_one_mmhg_factor_serves_the_model_and_the_edge():
    # the package defines 1 mmHg once (rheoline.model.conversions); the clinical formulas
    # and the unit parser at the edge use that one number
    from rheoline.model.conversions import MMHG
    from rheoline.model.hemodynamics import MMHG_TO_PA
    from rheoline.units import parse_quantity

    assert MMHG_TO_PA is MMHG
    assert parse_quantity("1 mmHg", "pressure") == pytest.approx(MMHG, rel=1e-15)


# --- worked examples computed by hand -----------------------------------------------------


def test_vascular_resistance_worked_example_exact_and_rounded():
    # Hand arithmetic: (100 - 20) mmHg / 4 L/min = 20 WU;
    # exact: 20 * 79.99344 = 1599.869 dyn s cm^-5 (NIST SP 811's seven digits, so rel 1e-6);
    # rounded: 20 * 80 = 1600.
    exact = vascular_resistance(100.0, 20.0, 4.0)
    assert exact.wood_units == pytest.approx(20.0, rel=1e-15)
    assert exact.dyn_s_per_cm5 == pytest.approx(1599.869, rel=1e-6)
    assert exact.pa_s_per_m3 == pytest.approx(20 * 7_999_344.0, rel=1e-6)
    rounded = vascular_resistance(100.0, 20.0, 4.0, factor="rounded")
    assert rounded.dyn_s_per_cm5 == pytest.approx(1600.0, rel=1e-15)
    # the SI value does not depend on the display factor
    assert rounded.pa_s_per_m3 == exact.pa_s_per_m3


def test_public_name_reaches_the_same_function():
    assert rheoline.vascular_resistance is vascular_resistance
    assert rheoline.body_surface_area is body_surface_area


def test_svr_worked_example():
    # Hand arithmetic: MAP 93, CVP 3, CO 6 L/min -> (93 - 3) / 6 = 15 WU;
    # 15 * 79.99344 = 1199.902 dyn s cm^-5; rounded 15 * 80 = 1200.
    svr = systemic_vascular_resistance(93.0, 3.0, 6.0)
    assert svr.wood_units == pytest.approx(15.0, rel=1e-15)
    assert svr.dyn_s_per_cm5 == pytest.approx(1199.902, rel=1e-6)
    assert systemic_vascular_resistance(93.0, 3.0, 6.0, "rounded").dyn_s_per_cm5 == 1200.0


def test_pvr_worked_example():
    # Hand arithmetic: mPAP 20, wedge 12, CO 4 -> (20 - 12) / 4 = 2 WU;
    # 2 * 79.99344 = 159.9869 dyn s cm^-5.
    pvr = pulmonary_vascular_resistance(20.0, 12.0, 4.0)
    assert pvr.wood_units == pytest.approx(2.0, rel=1e-15)
    assert pvr.dyn_s_per_cm5 == pytest.approx(159.9869, rel=1e-6)


def test_indexed_worked_examples():
    # Hand arithmetic: CI = 6 / 1.5 = 4 L/min/m^2; SVRI = (93 - 3) / 4 = 22.5 WU m^2
    # = SVR * BSA = 15 * 1.5; in dyn: 22.5 * 79.99344 = 1799.852 dyn s cm^-5 m^2.
    assert cardiac_index(6.0, 1.5) == pytest.approx(4.0)
    svri = systemic_vascular_resistance_index(93.0, 3.0, 6.0, 1.5)
    assert svri.indexed
    assert svri.wood_units == pytest.approx(22.5, rel=1e-15)
    assert svri.dyn_s_per_cm5 == pytest.approx(1799.852, rel=1e-6)
    # PVRI = (20 - 12) / (4 / 2) = 4 WU m^2
    assert pulmonary_vascular_resistance_index(20.0, 12.0, 4.0, 2.0).wood_units == pytest.approx(
        4.0
    )


def test_vectorized_over_arrays():
    # (90 - 5) / [5, 8.5] = [17, 10] WU, by hand
    r = systemic_vascular_resistance(90.0, 5.0, np.array([5.0, 8.5]))
    np.testing.assert_allclose(r.wood_units, [17.0, 10.0], rtol=1e-14)


# --- typical adult ranges (sanity) --------------------------------------------------------


def test_typical_resting_adult_lies_in_typical_ranges():
    # common practice, no source: a resting adult with MAP 90, CVP 6, CO 6,
    # mPAP 15, wedge 9 has SVR near 1100 and PVR near 80 dyn s cm^-5.
    svr = systemic_vascular_resistance(90.0, 6.0, 6.0).dyn_s_per_cm5
    pvr = pulmonary_vascular_resistance(15.0, 9.0, 6.0).dyn_s_per_cm5
    lo, hi = typical_adult_range("svr")
    assert lo <= svr <= hi
    lo, hi = typical_adult_range("pvr")
    assert lo <= pvr <= hi
    # common practice, no source: pulmonary resistance is roughly a tenth of systemic
    assert 0.03 < pvr / svr < 0.3


def test_typical_range_in_wood_units():
    # common practice, no source: SVR about 10-15 WU
    lo, hi = typical_adult_range("svr", unit="wood_units", factor="rounded")
    assert (lo, hi) == (10.0, 15.0)


# --- body surface area --------------------------------------------------------------------


def test_mosteller_1987_formula_values():
    # Mosteller 1987 (NEJM 317:1098): BSA = sqrt(H[cm] * W[kg] / 3600).
    # Hand arithmetic: 160 * 90 = 14400 -> sqrt(4) = 2; 144 * 25 = 3600 -> 1;
    # 180 * 81 = 14580 -> sqrt(4.05) = 2.01246...
    assert mosteller_1987_body_surface_area(160.0, 90.0) == pytest.approx(2.0, rel=1e-15)
    assert body_surface_area(144.0, 25.0) == pytest.approx(1.0, rel=1e-15)
    assert body_surface_area(180.0, 81.0) == pytest.approx(4.05**0.5, rel=1e-15)


def test_dubois_1916_formula_values():
    # DuBois & DuBois 1916: A[cm^2] = 71.84 * W^0.425 * H^0.725.
    # Hand arithmetic for 170 cm, 70 kg: 70^0.425 = exp(0.425 * 4.24850) = exp(1.80561)
    # = 6.0837; 170^0.725 = exp(0.725 * 5.13580) = exp(3.72345) = 41.407;
    # 71.84 * 6.0837 * 41.407 = 18097 cm^2 = 1.8097 m^2 (the often-quoted 1.81 m^2 for
    # that build, from memory).
    assert dubois_1916_body_surface_area(170.0, 70.0) == pytest.approx(1.8097, abs=1e-4)
    # 150 cm, 50 kg: 50^0.425 = exp(0.425 * 3.91202) = 5.2731; 150^0.725 = exp(0.725 *
    # 5.01064) = 37.815; 71.84 * 5.2731 * 37.815 = 14325 cm^2 = 1.4325 m^2
    assert body_surface_area(150.0, 50.0, method="dubois") == pytest.approx(1.4325, abs=1e-4)


def test_mosteller_and_dubois_agree_for_average_adults():
    # Mosteller 1987 presents his formula as a simplification that tracks DuBois within
    # a few percent for ordinary adult builds (from memory).
    h = np.array([160.0, 170.0, 180.0])
    w = np.array([55.0, 70.0, 85.0])
    np.testing.assert_allclose(
        body_surface_area(h, w), body_surface_area(h, w, "dubois"), rtol=0.03
    )


@given(st.floats(100.0, 220.0), st.floats(20.0, 200.0), st.floats(1.01, 2.0))
def test_bsa_grows_with_weight_and_height(height, weight, scale):
    for method in ("mosteller", "dubois"):
        base = body_surface_area(height, weight, method)
        assert body_surface_area(height, weight * scale, method) > base
        assert body_surface_area(min(height * scale, 250.0), weight, method) >= base


# --- bad input ----------------------------------------------------------------------------


def test_bad_factor_raises():
    with pytest.raises(InputRangeError, match="factor must be one of"):
        vascular_resistance(90.0, 5.0, 5.0, factor="approx")


def test_zero_flow_raises():
    with pytest.raises(InputRangeError, match="flow_l_min must be greater than 0"):
        vascular_resistance(90.0, 5.0, 0.0)


def test_swapped_pressures_raise():
    with pytest.raises(InputRangeError, match="mean_arterial_mmhg must be at least central"):
        systemic_vascular_resistance(5.0, 90.0, 5.0)


def test_cardiac_output_outside_adult_range_warns():
    with pytest.warns(RangeWarning, match="cardiac_output_l_min"):
        pulmonary_vascular_resistance(15.0, 9.0, 60.0)


def test_bsa_unknown_method_raises():
    with pytest.raises(InputRangeError, match="method must be one of"):
        body_surface_area(170.0, 70.0, method="haycock")


def test_bsa_height_in_metres_gets_a_hint():
    with pytest.raises(InputRangeError, match="if that is metres, pass 170"):
        body_surface_area(1.70, 70.0)


def test_bsa_negative_weight_raises():
    with pytest.raises(InputRangeError, match="weight_kg must be greater than 0"):
        body_surface_area(170.0, -70.0)


def test_typical_range_bad_kind_raises():
    with pytest.raises(InputRangeError, match="kind must be one of"):
        typical_adult_range("cvr")
