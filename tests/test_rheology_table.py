"""The tabulated Rabinowitsch-Mooney relation of a shared rheology, and its error bound.

The table stores ln(wall shear stress) M against phi = ln(3Q/(pi R^3)) and is accepted only
when its cubic Hermite interpolant agrees with the exact inverse of
``rabinowitsch_flow`` at every interval's midpoint and quarter point within 1e-12
(``TABLE_TOLERANCE``).  These tests check that bound at points the builder never saw, the
two closed forms it must reproduce, and that a line solved with the table gives the
answer of the exact inner iteration.
"""

import numpy as np
import pytest

import rheoline
from rheoline.model import line_solvers, rheology_table
from rheoline.model.fluid_base import Fluid
from rheoline.model.line import Line
from rheoline.model.parts import Catheter, Tube
from rheoline.model.rabinowitsch import _solve_log_wall_shear_rate
from rheoline.model.rheology import Carreau, CarreauYasuda, Casson, Newtonian, PowerLaw
from rheoline.model.rheology_table import TABLE_TOLERANCE, cached_table

BLOOD = rheoline.fluid("whole-blood", temperature_c=37.0)


def _exact_log_stress(rheology, phi):
    """ln(tau_w) at phi from the Rabinowitsch inverse itself (R = 1)."""
    _, _, tau, _, _ = _solve_log_wall_shear_rate(rheology, np.pi * np.exp(phi) / 3.0, 1.0)
    return np.log(tau)


@pytest.mark.parametrize(
    "rheology",
    [
        BLOOD.rheology,
        rheoline.fluid("whole-blood", temperature_c=20.0, model="carreau-yasuda").rheology,
        Carreau(mu_zero=0.056, mu_inf=0.00345, relaxation_time=3.313, flow_index=0.3568),
        PowerLaw(0.01, 0.45),
    ],
    ids=["whole-blood", "carreau-yasuda", "cho-kensey", "power-law"],
)
def test_table_meets_its_bound_where_it_was_not_checked(rheology):
    table = rheology_table.rheology_table(rheology)
    assert table is not None and table.max_error < TABLE_TOLERANCE
    phi = np.random.default_rng(7).uniform(table.start, table.stop, 50_000)
    value, slope = table.evaluate(phi)
    assert np.max(np.abs(value - _exact_log_stress(rheology, phi))) < 2 * TABLE_TOLERANCE
    # the interpolant's slope is d ln(tau_w)/d phi of the same function: a central difference
    h = 1e-4
    numeric = (table.evaluate(phi + h)[0] - table.evaluate(phi - h)[0]) / (2 * h)
    inside = (phi - h > table.start) & (phi + h < table.stop)
    assert np.max(np.abs(slope - numeric)[inside]) < 1e-6


def test_newtonian_limit_is_hagen_poiseuille():
    # mu_zero = mu_inf: Hagen-Poiseuille, tau_w = mu 4Q/(pi R^3) (Sutera & Skalak, Annu. Rev.
    # Fluid Mech. 25 (1993) 1-19), i.e. M = ln(mu) + phi + ln(4/3) exactly
    mu = 3.2e-3
    table = rheology_table.rheology_table(Carreau(mu, mu, 3.313, 0.3568))
    phi = np.linspace(table.start, table.stop, 1001)
    value, slope = table.evaluate(phi)
    np.testing.assert_allclose(value, np.log(mu) + phi + np.log(4.0 / 3.0), rtol=0, atol=1e-12)
    np.testing.assert_allclose(slope, 1.0, atol=1e-9)


def test_power_law_table_follows_the_closed_form():
    # power law: tau_w = K ((3n+1)/(4n) 4Q/(pi R^3))^n (Bird, Armstrong & Hassager 1987,
    # Dynamics of Polymeric Liquids vol. 1, eq. 4.2-9); the 16-point rule the table
    # reproduces is within 1e-6 of it for n >= 0.3 (rabinowitsch_flow's notes)
    k, n = 0.05, 0.6
    table = rheology_table.rheology_table(PowerLaw(k, n))
    phi = np.linspace(table.start + 1.0, table.stop - 1.0, 500)
    closed = np.log(k) + n * (phi + np.log(4.0 / 3.0) + np.log((3 * n + 1) / (4 * n)))
    np.testing.assert_allclose(table.evaluate(phi)[0], closed, rtol=0, atol=1e-6)


def test_what_is_not_tabulated():
    assert rheology_table.rheology_table(Newtonian(1e-3)) is None
    assert rheology_table.rheology_table(Casson(0.005, 0.004)) is None  # a yield stress
    varying = CarreauYasuda(np.array([0.05, 0.06]), 0.0035, 3.3, 0.36, 2.0)
    assert rheology_table.rheology_table(varying) is None  # different in each scenario
    assert cached_table(Casson(0.005, 0.004)) is None


@pytest.mark.parametrize("n", [40, 60_000], ids=["few", "many"])
def test_line_with_the_table_equals_the_exact_inner_iteration(n, monkeypatch):
    heads = np.random.default_rng(9).uniform(0.05, 2.5, n)
    line = Line([Tube(inner_diameter=np.full(n, 3e-3), length=1.8), Catheter(gauge=20)])
    monkeypatch.setattr(line_solvers, "TABLE_MIN_EVALUATIONS", 0)
    tabulated = line.solve(BLOOD, head=heads)
    pumped = line.solve(BLOOD, flow=tabulated.flow)
    drops = line.pressure_drop(BLOOD, tabulated.flow)
    monkeypatch.setattr(line_solvers, "TABLE_MIN_EVALUATIONS", 10**18)
    monkeypatch.setattr(line_solvers, "cached_table", lambda rheology: False)
    exact = line.solve(BLOOD, head=heads)
    np.testing.assert_allclose(tabulated.flow, exact.flow, rtol=1e-10)
    np.testing.assert_allclose(tabulated.part_pressure_drops, exact.part_pressure_drops, rtol=1e-10)
    np.testing.assert_allclose(tabulated.part_reynolds, exact.part_reynolds, rtol=1e-10)
    np.testing.assert_allclose(
        pumped.required_pressure,
        line.solve(BLOOD, flow=tabulated.flow).required_pressure,
        rtol=1e-10,
    )
    np.testing.assert_allclose(drops, line.pressure_drop(BLOOD, tabulated.flow), rtol=1e-10)


def test_flows_outside_the_table_are_solved_exactly(monkeypatch):
    # a wall shear rate below the table's range (1e-4 1/s): the inner solve takes over
    monkeypatch.setattr(line_solvers, "TABLE_MIN_EVALUATIONS", 0)
    fluid = Fluid("slow blood", 37.0, BLOOD.density, rheology=BLOOD.rheology)
    line = Line([Tube(inner_diameter=3e-3, length=1.0)])
    result = line.solve(fluid, source_pressure=np.array([1e-6, 1e-3, 1.0]))
    shear = 4.0 * result.flow / (np.pi * 1.5e-3**3)
    assert shear[0] < 1e-4 < shear[2]
    monkeypatch.setattr(line_solvers, "TABLE_MIN_EVALUATIONS", 10**18)
    monkeypatch.setattr(line_solvers, "cached_table", lambda rheology: False)
    exact = line.solve(fluid, source_pressure=np.array([1e-6, 1e-3, 1.0]))
    np.testing.assert_allclose(result.flow, exact.flow, rtol=1e-10)
