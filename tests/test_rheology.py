"""Rheology models: textbook formulas evaluated by hand, limits, inverses and bad input.

Formulas: Bird, Armstrong & Hassager, "Dynamics of Polymeric Liquids" Vol. 1 (1987) for the
power law, Carreau and Carreau-Yasuda; Casson (1959) for the Casson model.
"""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from rheoline.errors import InputRangeError
from rheoline.model.rheology import (
    PARAMETER_UNITS,
    RHEOLOGY_MODELS,
    Carreau,
    CarreauYasuda,
    Casson,
    Newtonian,
    PowerLaw,
)

MODELS = [
    Newtonian(1.0e-3),
    PowerLaw(0.02, 0.7),
    Carreau(mu_zero=0.056, mu_inf=0.00345, relaxation_time=3.313, flow_index=0.3568),
    CarreauYasuda(mu_zero=0.056, mu_inf=0.00345, relaxation_time=1.902, flow_index=0.22, a=1.25),
    Casson(yield_stress=0.004, casson_viscosity=0.0035),
]


def test_power_law_by_hand():
    # Bird et al. 1987: mu = K g^(n-1): 0.02 * 100^-0.3 = 0.02 / 3.98107 = 5.0238e-3 Pa s
    assert PowerLaw(0.02, 0.7).viscosity(100.0) == pytest.approx(5.0238e-3, rel=1e-4)
    assert PowerLaw(0.02, 0.7).stress(100.0) == pytest.approx(0.50238, rel=1e-4)


def test_carreau_by_hand():
    # Bird et al. 1987: mu = mu_inf + (mu0 - mu_inf)(1 + (lambda g)^2)^((n-1)/2)
    # lambda g = 1: 0.004 + 0.046 * 2^(-0.25) = 0.004 + 0.046 * 0.840896 = 0.0426812
    m = Carreau(mu_zero=0.05, mu_inf=0.004, relaxation_time=1.0, flow_index=0.5)
    assert m.viscosity(1.0) == pytest.approx(0.0426812, rel=1e-6)


def test_carreau_yasuda_with_a_2_is_carreau():
    # Bird et al. 1987: a = 2 reduces Carreau-Yasuda to Carreau
    kw = {"mu_zero": 0.05, "mu_inf": 0.004, "relaxation_time": 0.7, "flow_index": 0.4}
    g = np.logspace(-3, 4, 15)
    assert np.allclose(
        CarreauYasuda(**kw, a=2.0).viscosity(g), Carreau(**kw).viscosity(g), rtol=1e-14
    )


def test_casson_by_hand():
    # Casson 1959: sqrt(tau) = sqrt(tau_y) + sqrt(eta_c g): (sqrt(0.004) + sqrt(0.0035 * 100))^2
    # = (0.0632456 + 0.5916080)^2 = 0.428835 Pa
    m = Casson(yield_stress=0.004, casson_viscosity=0.0035)
    assert m.stress(100.0) == pytest.approx(0.428835, rel=1e-5)
    assert m.shear_rate_at_stress(0.003) == 0.0  # below the yield stress: no flow
    assert m.zero_shear_viscosity == np.inf


def test_newtonian_returns_plain_floats():
    m = Newtonian(1.0e-3)
    assert type(m.stress(100.0)) is float and m.stress(100.0) == pytest.approx(0.1)
    assert m.viscosity() == 1.0e-3 and m.is_newtonian


@pytest.mark.parametrize("model", MODELS, ids=lambda m: m.name)
def test_inverse_round_trip(model):
    g = np.logspace(-2, 5, 29)
    tau = model.stress(g)
    assert np.allclose(model.shear_rate_at_stress(tau), g, rtol=1e-8)


@given(st.floats(1e-3, 1e5))
def test_stress_monotone_and_viscosity_finite(g):
    for m in MODELS:
        assert m.stress(g * 1.01) > m.stress(g)
        assert np.isfinite(m.viscosity(g)) and m.viscosity(g) > 0
        assert m.viscosity(g * 1.01) <= m.viscosity(g) * (1 + 1e-12)  # none thickens


def test_array_parameters_broadcast():
    m = Carreau(mu_zero=np.array([0.05, 0.06]), mu_inf=0.004, relaxation_time=1.0, flow_index=0.5)
    g = np.array([[1.0], [10.0], [100.0]])
    out = m.viscosity(g)
    assert out.shape == (3, 2)
    assert out[0, 1] == Carreau(
        mu_zero=0.06, mu_inf=0.004, relaxation_time=1.0, flow_index=0.5
    ).viscosity(1.0)


def test_parameters_and_describe():
    m = Casson(yield_stress=0.004, casson_viscosity=0.0035)
    assert m.parameters == {"yield_stress": 0.004, "casson_viscosity": 0.0035}
    assert m.describe() == "casson: yield_stress=0.004 Pa, casson_viscosity=0.0035 Pa s"
    for cls in RHEOLOGY_MODELS.values():
        assert all(name in PARAMETER_UNITS for name in cls.__dataclass_fields__)


def test_registry_names_match_classes():
    assert {name: cls.name for name, cls in RHEOLOGY_MODELS.items()} == {
        n: n for n in RHEOLOGY_MODELS
    }


def test_bad_parameters_raise_naming_field():
    with pytest.raises(InputRangeError, match="viscosity must be greater than 0 Pa s"):
        Newtonian(-1.0)
    with pytest.raises(InputRangeError, match="flow_index must be finite"):
        PowerLaw(0.01, float("nan"))
    with pytest.raises(InputRangeError, match="mu_zero must be at least mu_inf"):
        Carreau(mu_zero=0.001, mu_inf=0.004, relaxation_time=1.0, flow_index=0.5)
    with pytest.raises(InputRangeError, match="yield_stress must be 0 Pa or more"):
        Casson(yield_stress=-0.1, casson_viscosity=0.0035)
