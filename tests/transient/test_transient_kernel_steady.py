"""The kernel's simplified node and section updates keep a flowing network's steady state, and a
dead end reflects a wave fully (its head is the arriving characteristic, no flow)."""

from __future__ import annotations

import numpy as np
import pytest

from knockproof.transient.build import OutletSpec, PipeSpec, tree_network
from knockproof.transient.solver import simulate


def _branching(start_s: float):
    """A supply main, a tee to a flowing run ending in a valve and to a dead-end branch."""
    pipes = [
        PipeSpec("main", "S", "T", 20.0, 0.026, 1310.0, 0.022),
        PipeSpec("run", "T", "V", 12.0, 0.020, 1320.0, 0.022),
        PipeSpec("branch", "T", "D", 8.0, 0.020, 1320.0, 0.022),
        PipeSpec("stub", "D", "E", 3.0, 0.014, 1340.0, 0.022),
    ]
    outlets = [OutletSpec("V", 3.0e-4, 0.0, "instant", start_time_s=start_s)]
    return tree_network(pipes, "S", 50.0, {"S": 0.0, "T": 0.0, "V": 0.0, "D": 0.0, "E": 0.0},
                        outlets)  # fmt: skip


def test_steady_state_holds_with_friction():
    # the valve closes only after the run: the friction losses on the grid (single-precision
    # coefficients, used so in the initial state too) keep every head where it started
    net = _branching(start_s=1.0)
    res = simulate(net, 0.2, time_step_s=1.0e-4)
    head0 = np.asarray(net.node_initial_head_m, float)
    np.testing.assert_allclose(res.node_max_head_m, res.node_min_head_m, rtol=0, atol=1e-9)
    np.testing.assert_allclose(res.node_max_head_m, head0, rtol=0, atol=1e-6)


def test_dead_end_doubles_the_arriving_step():
    # no friction, instant closure: the step that reaches the dead end E is doubled there
    pipes = [
        PipeSpec("main", "S", "T", 32.5, 0.026, 1300.0, 0.0),
        PipeSpec("run", "T", "V", 13.0, 0.026, 1300.0, 0.0),
        PipeSpec("branch", "T", "E", 6.5, 0.026, 1300.0, 0.0),
    ]
    net = tree_network(pipes, "S", 50.0, {}, [OutletSpec("V", 5.0e-4, 0.0, "instant")])
    dt = 6.5 / 1300.0 / 10
    names = list(net.node_names)
    v, e = names.index("V"), names.index("E")
    res = simulate(net, 0.02, time_step_s=dt, record_nodes=[v, e], cavitation=False)
    h0 = float(np.asarray(net.node_initial_head_m)[v])
    rise_valve = res.traces_pressure_pa[v] - res.traces_pressure_pa[v][0]
    rise_end = res.traces_pressure_pa[e] - res.traces_pressure_pa[e][0]
    step = rise_valve[int(round(0.001 / dt))]  # the Joukowsky step at the valve, before reflections
    # junction T: three equal pipes, each carries 2/3 of the arriving step on; E doubles it
    arrive = int(round((13.0 + 6.5) / 1300.0 / dt)) + 2
    assert h0 > 0
    assert res.largest_wave_speed_adjustment < 1e-12
    np.testing.assert_allclose(rise_end[arrive], 2.0 * (2.0 / 3.0) * step, rtol=1e-9)
    assert abs(rise_end[arrive - 4]) < 1e-6 * step  # not arrived yet


def test_arrived_characteristics_are_recovered_from_those_sent():
    # A liquid section sends a = C_P - R' q|q| and b = C_M + R' q|q| with q = (C_P - C_M)/2 (Wylie &
    # Streeter 1993, eqs. 3-18 to 3-21, in head units); the DVCM pass inverts that map. Check: the
    # inputs come back, for flows both ways and friction from none to far beyond building piping.
    from knockproof.transient.kernel import _arrived

    for r in (0.0, 1e-6, 1e-3, 0.05):
        for cp, cm in ((50.0, 49.0), (49.0, 50.0), (12.5, -3.0), (100.0, 100.0), (-2.0, 7.5)):
            q = 0.5 * (cp - cm)
            f = r * q * abs(q)
            back = _arrived(cp - f, cm + f, r)
            np.testing.assert_allclose(back, (cp, cm), rtol=0, atol=1e-12)


def test_friction_number_is_f_dt_v_over_2d():
    # R'|q| per reach = R|Q|/B = f dx |Q| / (2 g D A^2) * g A / a = f dt V / (2 D) at Courant number 1
    # (Wylie & Streeter 1993, eqs. 3-18 to 3-21): 0.02 * 1e-3 s * 2 m/s / (2 * 0.02 m) = 0.001.
    d, v, dt = 0.02, 2.0, 1.0e-3
    area = np.pi * d * d / 4
    net = tree_network(
        [PipeSpec("p", "S", "V", 10.0, d, 1000.0, 0.02)], "S", 60.0, {},
        [OutletSpec("V", v * area, 0.0, "instant", start_time_s=1.0)],
    )  # fmt: skip
    res = simulate(net, 0.01, time_step_s=dt)
    assert res.largest_wave_speed_adjustment == 0.0  # 10 m / (1000 m/s * 1 ms) = 10 reaches
    assert res.stats["friction_number"] == pytest.approx(0.02 * dt * v / (2 * d), rel=1e-6)
