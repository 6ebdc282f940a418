"""Junctions: transmission of a step and splitting a pipe in two.

* A step dH arriving along pipe 1 at a junction transmits s = 2 (A1/a1) / sum(Ai/ai) dH into every
  other pipe (Wylie & Streeter, Fluid Transients in Systems, 1993, sec. 3.2 / Chaudhry, Applied
  Hydraulic Transients, 2014, sec. 3.x: series and branching junctions, from memory of the section).
  Exact for the method of characteristics.
* Splitting a pipe at a two-pipe junction reproduces the undivided pipe exactly (same grid).
"""

import numpy as np

from knockproof.transient import simulate
from knockproof.transient.build import OutletSpec, PipeSpec, tree_network

G = 9.80665


def _area(d):
    return np.pi * d * d / 4


def test_step_transmitted_at_a_branching_junction():
    # the step starts at the valve and arrives at the junction along the valve pipe (index 3 below)
    pipes = [
        PipeSpec("feed", "supply", "junction", 100.0, 0.05, 1000.0),
        PipeSpec("side", "junction", "dead", 240.0, 0.04, 1200.0),
        PipeSpec("run", "junction", "valve", 260.0, 0.03, 1300.0),
    ]
    flow = 0.5 * _area(0.03)
    net = tree_network(pipes, "supply", 300.0, {}, [OutletSpec("valve", flow, 0.0, "instant")])
    result = simulate(net, 0.32, time_step_s=0.01, record_nodes=[1, 3], cavitation=False)
    rho_g = net.density_kg_m3 * G
    step = 1300.0 * 0.5 / G  # Joukowsky step leaving the valve, a V / g
    admittance = [_area(0.05) / 1000.0, _area(0.04) / 1200.0, _area(0.03) / 1300.0]
    transmitted = 2 * admittance[2] / sum(admittance) * step  # Wylie & Streeter junction rule
    junction = result.traces_pressure_pa[1] / rho_g - 300.0
    valve = result.traces_pressure_pa[3] / rho_g - 300.0
    assert abs(valve[1] - step) < 1e-9 * step
    assert np.all(np.abs(junction[:21]) < 1e-9)  # the front needs 0.2 s to reach the junction
    np.testing.assert_allclose(junction[21:], transmitted, rtol=1e-12)


def test_split_pipe_reproduces_undivided_pipe():
    flow = 1.2 * _area(0.025)
    outlet = [OutletSpec("valve", flow, 0.05, "linear-area")]
    whole = tree_network(
        [PipeSpec("p", "supply", "valve", 60.0, 0.025, 1200.0, 0.02)],
        "supply", 60.0, {}, outlet,
    )  # fmt: skip
    split = tree_network(
        [
            PipeSpec("p1", "supply", "mid", 24.0, 0.025, 1200.0, 0.02),
            PipeSpec("p2", "mid", "valve", 36.0, 0.025, 1200.0, 0.02),
        ],
        "supply", 60.0, {}, outlet,
    )  # fmt: skip
    dt = 60.0 / 1200.0 / 20
    a = simulate(whole, 0.4, time_step_s=dt, record_nodes=[1])
    b = simulate(split, 0.4, time_step_s=dt, record_nodes=[2])
    np.testing.assert_allclose(
        b.traces_pressure_pa[2], a.traces_pressure_pa[1], rtol=1e-12, atol=1e-6
    )
    np.testing.assert_allclose(
        np.concatenate([b.final_pipe_head_m["p1"], b.final_pipe_head_m["p2"][1:]]),
        a.final_pipe_head_m["p"],
        rtol=1e-12,
    )
