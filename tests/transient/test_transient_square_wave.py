"""Instantaneous closure of a frictionless reservoir-pipe-valve line at Courant number 1.

Check: the head at the valve is a square wave of amplitude a V0 / g (Joukowsky) and period 4L/a (the
analytic solution of the water-hammer equations; Wylie & Streeter, Fluid Transients in Systems,
1993, sec. 1.4 and 3.1; Chaudhry, Applied Hydraulic Transients, 2014, sec. 2.x). The method of
characteristics is exact in this case, so the match is to round-off.
"""

import numpy as np

from knockproof.transient import simulate
from knockproof.transient.build import OutletSpec, PipeSpec, tree_network

G = 9.80665
LENGTH, SPEED, DIAMETER, VELOCITY, HEAD = 100.0, 1000.0, 0.05, 1.0, 200.0


def _line():
    area = np.pi * DIAMETER**2 / 4
    return tree_network(
        [PipeSpec("line", "supply", "valve", LENGTH, DIAMETER, SPEED, 0.0)],
        "supply",
        HEAD,
        {},
        [OutletSpec("valve", VELOCITY * area, 0.0, "instant")],
    )


def test_square_wave_amplitude_and_period():
    net = _line()
    dt = 0.01  # L/(a dt) = 10 reaches exactly: no wave-speed adjustment
    result = simulate(net, 0.8, time_step_s=dt, record_nodes=[1], cavitation=False)
    assert result.largest_wave_speed_adjustment == 0.0
    head = result.traces_pressure_pa[1] / (net.density_kg_m3 * G)  # valve at z = 0
    rise = SPEED * VELOCITY / G  # Joukowsky, analytic
    two_l_over_a = round(2 * LENGTH / SPEED / dt)  # 20 steps
    n = np.arange(len(head))
    phase = ((n - 1) // two_l_over_a) % 2  # 0: first half period (high), 1: second (low)
    expected = np.where(phase == 0, HEAD + rise, HEAD - rise)
    expected[0] = HEAD
    np.testing.assert_allclose(head, expected, rtol=0, atol=1e-9 * HEAD)


def test_square_wave_peak_reported_as_first_peak():
    net = _line()
    result = simulate(net, 0.8, time_step_s=0.01, cavitation=False)
    rise_pa = net.density_kg_m3 * SPEED * VELOCITY  # Joukowsky dp = rho a dV
    peak = result.node_first_peak_pressure_pa[1]
    assert abs(peak - (net.density_kg_m3 * G * HEAD + rise_pa)) < 1e-9 * peak
    assert np.isnan(result.first_collapse_time_s)
    assert np.isnan(result.node_collapse_peak_pressure_pa[1])


def test_square_wave_holds_over_a_long_run():
    # 9,000 steps: the kernel moves its drifting state back to its starting place every 4,096 steps
    # (kernel.REBASE_STEPS); the analytic square wave must run on unchanged across those moves.
    net = _line()
    dt = 0.01
    result = simulate(net, 90.0, time_step_s=dt, record_nodes=[1], cavitation=False)
    assert result.steps == 9000
    head = result.traces_pressure_pa[1] / (net.density_kg_m3 * G)
    rise = SPEED * VELOCITY / G  # Joukowsky, analytic
    n = np.arange(len(head))
    phase = ((n - 1) // round(2 * LENGTH / SPEED / dt)) % 2
    expected = np.where(phase == 0, HEAD + rise, HEAD - rise)
    expected[0] = HEAD
    np.testing.assert_allclose(head, expected, rtol=0, atol=1e-9 * HEAD)
