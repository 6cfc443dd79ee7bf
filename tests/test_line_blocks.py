"""Large solves in blocks, warm starts and the tabulated rheology: the same answers.

A solve of more scenarios than one block holds is laid out and solved a block at a time
(``rheoline.model.line_blocks``); it must give what the whole solve at once gives, for every
kind of part, per-scenario fluids, grids of scenarios and both solves.  No timing is
asserted (speed is what ``benchmarks/run.py`` reports); the working memory is.
"""

import tracemalloc

import numpy as np
import pytest

import rheoline
from rheoline.errors import InputRangeError
from rheoline.model import line_blocks, line_characteristic
from rheoline.model.fluid_base import Fluid
from rheoline.model.line import GRAVITY, Line
from rheoline.model.line_blocks import Block, Blocks
from rheoline.model.parts import Catheter, Fitting, MeasuredPart, Tube
from rheoline.model.rheology import Casson, PowerLaw
from rheoline.model.shapes import Semicircle

WATER = rheoline.fluid("water", temperature_c=22.0)
BLOOD = rheoline.fluid("whole-blood", temperature_c=37.0)

FIELDS = (
    "flow",
    "required_pressure",
    "net_drive",
    "part_pressure_drops",
    "exit_pressure_drop",
    "part_reynolds",
    "part_mean_velocity",
    "part_wall_shear_stress",
    "hemolysis_index",
    "exceeds_pressure_limit",
)


def _same(a, b, rtol):
    for name in FIELDS:
        x, y = np.asarray(getattr(a, name)), np.asarray(getattr(b, name))
        assert x.shape == y.shape, name
        if x.dtype == bool:
            assert np.array_equal(x, y), name
        else:
            # a source pressure that cancels the head to rounding compares on the scale
            scale = 0.0
            if name == "required_pressure":
                scale = rtol * (np.max(np.abs(b.net_drive)) + np.max(np.abs(y)))
            np.testing.assert_allclose(x, y, rtol=rtol, atol=scale, equal_nan=True, err_msg=name)
    for key, value in a.conditions.items():
        assert np.array_equal(value, b.conditions[key]), key
    assert a.models_used == b.models_used


def _mixed_line(n):
    rng = np.random.default_rng(5)
    return Line(
        [
            Tube(inner_diameter=rng.uniform(2.5e-3, 3.5e-3, n), length=1.8),
            Fitting(k=1.5),
            MeasuredPart(flows=[1e-7, 1e-6, 3e-6], pressure_drops=[40.0, 520.0, 2400.0]),
            Tube(shape=Semicircle(2.0e-3), length=0.3),
            Catheter(gauge=18),
        ]
    )


@pytest.fixture
def small_blocks(monkeypatch):
    """Blocks of 64 scenarios, so that a few hundred scenarios take several blocks."""
    monkeypatch.setattr(line_blocks, "BLOCK_ELEMENTS", 64)
    monkeypatch.setattr(line_blocks, "MIN_BLOCK_SCENARIOS", 16)


@pytest.mark.parametrize("fluid", [WATER, BLOOD], ids=["water", "whole-blood"])
def test_blocked_solve_equals_the_whole_solve(fluid, small_blocks, monkeypatch):
    n = 300
    heads = np.random.default_rng(1).uniform(0.2, 2.0, n)
    line = _mixed_line(n)
    blocked = line.solve(fluid, head=heads, back_pressure=1000.0, pressure_limit=2e4)
    back = line.solve(fluid, flow=blocked.flow, back_pressure=1000.0, pressure_limit=2e4)
    assert len(Blocks((n,), 4)) > 1
    monkeypatch.setattr(line_blocks, "BLOCK_ELEMENTS", 10**9)
    whole = line.solve(fluid, head=heads, back_pressure=1000.0, pressure_limit=2e4)
    _same(blocked, whole, 1e-12)
    _same(
        back, line.solve(fluid, flow=blocked.flow, back_pressure=1000.0, pressure_limit=2e4), 1e-12
    )
    np.testing.assert_allclose(back.required_pressure, back.net_drive + 1000.0, rtol=1e-12)
    np.testing.assert_allclose(back.net_drive, fluid.density * GRAVITY * heads - 1000.0, rtol=1e-9)
    np.testing.assert_allclose(
        line.pressure_drop(fluid, blocked.flow), blocked.net_drive, rtol=1e-9
    )


def test_blocks_of_a_grid_of_scenarios_and_per_scenario_fluids(small_blocks, monkeypatch):
    # a 12 x 20 grid: bores down the rows, hematocrits (one blood per column) across
    bores = np.linspace(0.6e-3, 1.2e-3, 12).reshape(12, 1)
    blood = rheoline.fluid("whole-blood", temperature_c=37.0, hematocrit=np.linspace(0.3, 0.5, 20))
    line = Line([Tube(inner_diameter=3e-3, length=1.5), Tube(inner_diameter=bores, length=0.05)])
    blocked = line.solve(blood, head=1.2, pries_correction=True)
    monkeypatch.setattr(line_blocks, "BLOCK_ELEMENTS", 10**9)
    whole = line.solve(blood, head=1.2, pries_correction=True)
    assert blocked.scenario_shape == (12, 20)
    _same(blocked, whole, 1e-12)


def test_block_take_reads_the_blocks_values_of_any_broadcast_input():
    shape = (4, 3, 5)
    values = np.arange(60.0).reshape(shape)
    row = np.arange(3.0).reshape(3, 1)
    for block in Blocks(shape, size=7):
        flat = np.arange(block.start, block.stop)
        assert np.array_equal(block.take(values), values.reshape(-1)[flat])
        assert np.array_equal(block.take(row), np.broadcast_to(row, shape).reshape(-1)[flat])
        assert block.take(2.5) == 2.5 and block.take(None) is None
    assert Block((10,), 2, 5).take(np.array([7.0])) == 7.0


def test_yield_stress_fluid_in_blocks(small_blocks, monkeypatch):
    # Casson 1959: no flow below the yield pressure 4 L tau_y / D, in every block alike
    paste = Fluid("casson", 20.0, 1050.0, rheology=Casson(yield_stress=0.01, casson_viscosity=4e-3))
    line = Line([Tube(inner_diameter=0.2e-3, length=2.0)])
    pressures = np.linspace(0.0, 1200.0, 200)
    blocked = line.solve(paste, source_pressure=pressures)
    monkeypatch.setattr(line_blocks, "BLOCK_ELEMENTS", 10**9)
    whole = line.solve(paste, source_pressure=pressures)
    _same(blocked, whole, 1e-12)
    assert np.array_equal(blocked.flow > 0, pressures > 4 * 2.0 * 0.01 / 0.2e-3)


def test_working_memory_of_a_large_solve_stays_bounded():
    # 200,000 scenarios: the answers take (flow, net, required, exit, moving, converged
    # and 3 per-part arrays of 2 parts) about 8 MB a part-array; the working memory of the
    # blocks comes on top and must stay a few MB, not the hundreds a whole solve would need
    n = 200_000
    heads = np.random.default_rng(2).uniform(0.3, 1.5, n)
    line = Line([Tube(inner_diameter=np.full(n, 3e-3), length=1.8), Catheter(gauge=18)])
    Line([Catheter(gauge=18)]).solve(WATER, head=heads[:10])  # imports and caches first
    tracemalloc.start()
    result = line.solve(WATER, head=heads)
    current, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    answers = 4 * 8 * n + 2 * n + 3 * 2 * 8 * n  # float per-scenario, bool, per-part
    assert result.converged
    assert peak - answers < 40e6, f"peak {peak / 1e6:.0f} MB above {answers / 1e6:.0f} MB answers"


# --- warm starts -------------------------------------------------------------------------------


@pytest.mark.parametrize("fluid", [WATER, BLOOD], ids=["water", "whole-blood"])
def test_warm_start_gives_the_same_answer(fluid):
    heads = np.linspace(0.3, 1.5, 50)
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=18)])
    cold = line.solve(fluid, head=heads)
    warm = line.solve(fluid, head=heads * 1.0001, initial_flow=cold.flow)
    again = line.solve(fluid, head=heads * 1.0001)
    np.testing.assert_allclose(warm.flow, again.flow, rtol=1e-11)
    assert warm.iterations <= again.iterations
    if fluid.is_newtonian:  # a Newtonian line starts within 1e-4 and needs one pass fewer
        assert warm.iterations < again.iterations
    # entries that cannot start a solve are ignored, not used
    odd = np.where(np.arange(50) % 2, cold.flow, np.nan)
    np.testing.assert_allclose(
        line.solve(fluid, head=heads, initial_flow=odd).flow, cold.flow, rtol=1e-11
    )


def test_warm_start_is_not_for_a_prescribed_flow():
    with pytest.raises(InputRangeError, match="initial_flow"):
        Line([Catheter(gauge=18)]).solve(WATER, flow=1e-6, initial_flow=1e-6)


# --- the shared characteristic's per-part check ------------------------------------------------


@pytest.mark.parametrize("fluid", [WATER, BLOOD], ids=["water", "whole-blood"])
def test_characteristic_parts_agree_with_newton_within_its_checked_bound(fluid, monkeypatch):
    # the check at the grid midpoints bounds each lumen's interpolated drop and apparent
    # viscosity by 1e-9 (line_characteristic.CURVE_TOLERANCE), as its flows
    heads = np.random.default_rng(4).uniform(0.05, 3.0, 30000)
    line = Line([Tube(inner_diameter=3e-3, length=1.8), Catheter(gauge=14, length=0.03)])
    curve = line.solve(fluid, head=heads)
    assert curve.iterations == 0
    monkeypatch.setattr(line_characteristic, "cheaper_than_newton", lambda *a, **k: False)
    newton = line.solve(fluid, head=heads)
    assert newton.iterations > 0
    for name in ("flow", "part_pressure_drops", "part_reynolds", "part_wall_shear_stress"):
        np.testing.assert_allclose(
            getattr(curve, name), getattr(newton, name), rtol=2e-9, atol=0, err_msg=name
        )


def test_power_law_and_table_agree_with_the_closed_form():
    # power-law tube flow, exact closed form (Bird, Armstrong & Hassager 1987, eq. 4.2-9):
    # the tabulated relation of a large solve must keep it
    fluid = Fluid("pl", 20.0, 1000.0, rheology=PowerLaw(0.05, 0.6))
    pressures = np.linspace(1e4, 4e4, 40000)
    result = Line([Tube(inner_diameter=1e-3, length=2.0)]).solve(fluid, source_pressure=pressures)
    from rheoline.model.lumen import power_law_tube_flow

    exact = power_law_tube_flow(pressures, 0.5e-3, 2.0, 0.05, 0.6)
    np.testing.assert_allclose(result.flow, exact, rtol=0.005)


@pytest.mark.parametrize("n", [50, 300, 20000], ids=["one-block", "blocks", "characteristic"])
def test_equivalent_length_fitting_and_a_grid_of_drives(n, small_blocks):
    # a fitting given by its equivalent length is a lumen row of the layout (a short lumen
    # of its bore): every path must count it so; the drives span a 2-D grid of heads and
    # bag pressures, which the shared characteristic interpolates over both axes
    line = Line(
        [
            Tube(inner_diameter=3e-3, length=1.8),
            Fitting(inner_diameter=3e-3, equivalent_length=0.4),
            Catheter(gauge=18),
        ]
    )
    heads = np.linspace(0.3, 1.5, n // 10).reshape(-1, 1)
    bags = np.linspace(0.0, 2e4, 10)
    grid = line.solve(WATER, head=heads, source_pressure=bags)
    assert grid.part_pressure_drops.shape == (3, n // 10, 10)
    rows = [line.solve(WATER, head=float(h), source_pressure=bags) for h in heads[::7, 0]]
    for k, row in enumerate(rows):
        np.testing.assert_allclose(grid.flow[7 * k], row.flow, rtol=2e-9)
        np.testing.assert_allclose(
            grid.part_pressure_drops[:, 7 * k], row.part_pressure_drops, rtol=2e-9
        )
