"""Design flow from fixture units against the model code's Table E103.3(3).

Rows of IPC Table E103.3(3): "C" rows confirmed in a copy of a handbook table; "M" rows from memory.
"""

import tomllib
from importlib import resources

import pytest

from knockproof.physics.constants import GPM_M3_S
from knockproof.physics.demand import design_flow_m3_per_s

# (WSFU, gpm), confirmed (C) in a copy of a handbook table
CONFIRMED_FLUSH_TANK = [(1, 3.0), (2, 5.0), (4, 8.0), (8, 12.8), (15, 17.5), (30, 23.3), (50, 29.1)]
CONFIRMED_FLUSH_VALVE = [
    (5, 15.0),
    (7, 19.8),
    (10, 27.0),
    (15, 31.0),
    (20, 35.0),
    (30, 42.0),
    (50, 50.0),
]
# from memory (M)
MEMORY_FLUSH_TANK = [
    (5, 9.4),
    (7, 11.8),
    (10, 14.6),
    (20, 19.6),
    (100, 43.5),
    (200, 65.0),
    (500, 124.0),
    (1000, 208.0),
]
MEMORY_FLUSH_VALVE = [(8, 22.2), (100, 67.5), (200, 90.0), (500, 143.0), (1000, 208.0)]


def gpm(fixture_units, flush_valve):
    return design_flow_m3_per_s(fixture_units, flush_valve) / GPM_M3_S


@pytest.mark.parametrize(("units", "flow_gpm"), CONFIRMED_FLUSH_TANK)
def test_confirmed_flush_tank_rows(units, flow_gpm):
    assert gpm(units, False) == pytest.approx(flow_gpm, rel=1e-12)


@pytest.mark.parametrize(("units", "flow_gpm"), CONFIRMED_FLUSH_VALVE)
def test_confirmed_flush_valve_rows(units, flow_gpm):
    assert gpm(units, True) == pytest.approx(flow_gpm, rel=1e-12)


@pytest.mark.parametrize(("units", "flow_gpm"), MEMORY_FLUSH_TANK)
def test_from_memory_flush_tank_rows(units, flow_gpm):
    assert gpm(units, False) == pytest.approx(flow_gpm, rel=1e-12)


@pytest.mark.parametrize(("units", "flow_gpm"), MEMORY_FLUSH_VALVE)
def test_from_memory_flush_valve_rows(units, flow_gpm):
    assert gpm(units, True) == pytest.approx(flow_gpm, rel=1e-12)


def test_data_file_marks_exactly_the_confirmed_values_as_confirmed():
    text = resources.files("knockproof.catalog").joinpath("demand_table.toml").read_text("utf-8")
    rows = tomllib.loads(text)["row"]
    for curve, confirmed in (
        ("flush_tank", CONFIRMED_FLUSH_TANK),
        ("flush_valve", CONFIRMED_FLUSH_VALVE),
    ):
        marked = {r["wsfu"] for r in rows if r.get(f"{curve}_source") == "C"}
        assert marked == {u for u, _ in confirmed}, curve
        for r in rows:
            if f"{curve}_gpm" in r:
                assert r[f"{curve}_source"] in ("C", "M")


def test_zero_units_is_zero_flow():
    assert design_flow_m3_per_s(0.0, False) == 0.0
    assert design_flow_m3_per_s(0.0, True) == 0.0


def test_between_rows_is_linear():
    # Halfway between confirmed rows 30 -> 23.3 and 50 -> 29.1 gpm (flush tank): 26.2 gpm.
    assert gpm(40, False) == pytest.approx(26.2, rel=1e-12)
    # Halfway between confirmed rows 10 -> 27.0 and 15 -> 31.0 gpm (flush valve): 29.0 gpm.
    assert gpm(12.5, True) == pytest.approx(29.0, rel=1e-12)


def test_below_the_first_row_is_proportional():
    # Documented choice: a straight line through the origin and the first row.
    assert gpm(0.5, False) == pytest.approx(3.0 * 0.5, rel=1e-12)  # first row 1 -> 3.0
    assert gpm(2.5, True) == pytest.approx(15.0 / 5 * 2.5, rel=1e-12)  # first row 5 -> 15.0


def test_above_the_top_row_continues_the_last_segment():
    # Documented choice: flush tank continues 500 -> 124, 1000 -> 208 (0.168 gpm per WSFU);
    # the flush-valve curve is held at or above the flush-tank curve (its own last segment,
    # 0.13 gpm per WSFU, would fall below it).
    assert gpm(1500, False) == pytest.approx(208.0 + 0.168 * 500, rel=1e-12)
    assert gpm(1500, True) == pytest.approx(gpm(1500, False), rel=1e-15)


def test_both_curves_increase_and_flush_valve_is_never_below_flush_tank():
    grid = [0.05 * i for i in range(1, 400)] + [float(u) for u in range(20, 3000, 7)]
    for curve in (False, True):
        flows = [gpm(u, curve) for u in grid]
        assert all(b > a for a, b in zip(flows, flows[1:], strict=False))
    assert all(gpm(u, True) >= gpm(u, False) * (1 - 1e-12) for u in grid)  # equal below 1 WSFU


@pytest.mark.parametrize("units", [-1.0, float("nan"), float("inf")])
def test_bad_fixture_units_are_refused(units):
    with pytest.raises(ValueError, match="fixture units must be zero or positive"):
        design_flow_m3_per_s(units, False)
