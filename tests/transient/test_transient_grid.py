"""Grid rules (knockproof.transient.grid): reaches, wave-speed adjustment, lumping; closure laws."""

import numpy as np
import pytest

from knockproof.transient import choose_grid, effective_area_ratio, simulate
from knockproof.transient.build import OutletSpec, PipeSpec, tree_network


def test_reaches_and_adjustment_follow_the_rule():
    grid = choose_grid([10.0, 26.0, 7.0], [1000.0, 1300.0, 1400.0], time_step_s=1e-3)
    # N = round(L / (a dt)): 10, 20, 5 exactly -> no adjustment (hand arithmetic)
    np.testing.assert_array_equal(grid.reaches, [10, 20, 5])
    assert grid.largest_wave_speed_adjustment == pytest.approx(0.0, abs=1e-12)


def test_adjustment_is_reported_and_bounded():
    # no refinement allowed: the adjustment at the target step itself
    grid = choose_grid(
        [10.4, 20.0], [1000.0, 1000.0], time_step_s=1e-3, tight_refinement=1.0,
        max_refinement=1.0,
    )
    # 10.4 m at 1 m per reach -> 10 reaches, a' = 1040 m/s: +4 % (hand arithmetic)
    assert grid.reaches[0] == 10
    assert grid.wave_speed_m_per_s[0] == pytest.approx(1040.0)
    assert grid.largest_wave_speed_adjustment == pytest.approx(0.04)


def test_wave_speed_is_raised_rather_than_lowered():
    # 10.6 m at 1 m per reach: rounding to 11 reaches would give a' = 963.6 m/s (-3.6 %); the rule
    # takes 10 reaches, a' = 1060 m/s (+6 %) (hand arithmetic)
    grid = choose_grid(
        [10.6, 20.0], [1000.0, 1000.0], time_step_s=1e-3, tight_refinement=1.0,
        max_refinement=1.0,
    )
    assert grid.reaches[0] == 10
    assert grid.wave_speed_m_per_s[0] == pytest.approx(1060.0)
    assert grid.largest_wave_speed_adjustment == pytest.approx(0.06)  # signed, largest magnitude


def test_small_adjustment_preferred_within_a_modest_refinement():
    # 10.6 m and 20 m at 1000 m/s: at dt = 0.9618 ms, 11.02 and 20.79 travel steps -> 11 and 21
    # reaches, within -1 % .. +1 % (hand arithmetic); the search must find such a step above
    # 1 ms / 1.5
    grid = choose_grid([10.6, 20.0], [1000.0, 1000.0], time_step_s=1e-3)
    assert 1e-3 / 1.5 <= grid.time_step_s <= 1e-3
    assert np.all(grid.adjustment >= -0.01 - 1e-12)
    assert np.all(grid.adjustment <= 0.01 + 1e-12)


def test_step_refined_when_an_adjustment_would_exceed_the_limit():
    # 1.5 reaches at the target step is 33 % off; the step must shrink until both pipes fit 10 %
    grid = choose_grid([1.5, 20.0], [1000.0, 1000.0], time_step_s=1e-3)
    assert grid.time_step_s < 1e-3
    assert grid.largest_wave_speed_adjustment <= 0.10 + 1e-12
    x = np.array([1.5, 20.0]) / 1000.0 / grid.time_step_s
    assert np.all(x / grid.reaches - 1 <= 0.10 + 1e-12)
    assert np.all(x / grid.reaches - 1 >= -0.01 - 1e-12)  # never lowered by more than 1 %


def test_default_step_from_percentile_and_stubs_lumped():
    lengths = np.array([0.05] + [3.0] * 9 + [6.0] * 10)
    grid = choose_grid(lengths, np.full(20, 1300.0))
    # 10th percentile of L/a lies among the 3 m pipes; a 5 cm stub is far below half a reach
    assert grid.target_time_step_s == pytest.approx(3.0 / 1300.0, rel=0.3)
    assert grid.lumped[0] and not grid.lumped[1:].any()
    assert grid.reaches[0] == 0


def test_lumping_a_stub_changes_the_valve_peak_little():
    # a 0.2 m stub to the valve at the end of a 30 m run; lumped at a coarse step, resolved at a
    # fine
    pipes = [
        PipeSpec("run", "supply", "elbow", 30.0, 0.02, 1300.0, 0.02),
        PipeSpec("stub", "elbow", "valve", 0.2, 0.015, 1320.0, 0.025),
    ]
    flow = 1.0 * np.pi * 0.015**2 / 4
    net = tree_network(pipes, "supply", 60.0, {"valve": 0.2}, [OutletSpec("valve", flow, 0.02)])
    lumped = simulate(net, 0.2, time_step_s=30.0 / 1300.0 / 20)
    resolved = simulate(net, 0.2, time_step_s=0.2 / 1320.0 / 2, lump_ratio=0.0)
    assert lumped.lumped_pipes == ("stub",)
    assert resolved.lumped_pipes == ()
    a = lumped.node_first_peak_pressure_pa[2]
    b = resolved.node_first_peak_pressure_pa[2]
    # stated tolerance for the lumping rule (grid.py docstring): less than 2 %
    assert abs(a - b) < 0.02 * b


@pytest.mark.parametrize(
    ("law", "half_way"),
    [("linear-area", 0.5), ("solenoid", 0.5), ("quadratic", 0.25), ("quarter-turn", 0.75)],
)
def test_closure_laws_at_half_time(law, half_way):
    # values of (1 - s)^m or 1 - s^m at s = 1/2 (closure.py table)
    tau = effective_area_ratio(law, [0.0, 0.05, 0.1, 0.2], closure_time_s=0.1)
    np.testing.assert_allclose(tau, [1.0, half_way, 0.0, 0.0])


def test_instant_law_drops_at_start():
    tau = effective_area_ratio("instant", [0.0, 0.009, 0.01, 0.02], 0.0, start_time_s=0.01)
    np.testing.assert_array_equal(tau, [1.0, 1.0, 0.0, 0.0])
