"""Chains of short pipes in series (knockproof.transient.series): merged, never lumped away.

Checks against the analytic Joukowsky rise (dp = rho a V0 at an instantaneous closure of a
frictionless line, at the valve and at every point the front passes; Wylie & Streeter, Fluid
Transients in Systems, 1993, sec. 1.4), and, for a slow closure with friction (no closed form),
against the project's own solver run on the same length drawn as one undivided pipe on a fine grid
(whole-network fine-grid reference; a split uniform pipe is the same pipe).
"""

import numpy as np
import pytest

from knockproof.transient import simulate
from knockproof.transient.build import OutletSpec, PipeSpec, tree_network

G = 9.80665
RHO = 998.2
FT = 0.3048
D, A_WAVE, V0, HEAD = 0.0254, 1300.0, 1.5, 40.0
AREA = np.pi * D**2 / 4


def _chain(pieces, piece_m, friction=0.0, closure_s=0.0, law="instant"):
    names = ["supply"] + [f"n{i}" for i in range(1, pieces)] + ["valve"]
    pipes = [
        PipeSpec(f"p{i}", names[i], names[i + 1], piece_m, D, A_WAVE, friction)
        for i in range(pieces)
    ]
    return tree_network(
        pipes, "supply", HEAD, {}, [OutletSpec("valve", V0 * AREA, closure_s, law)],
        density_kg_m3=RHO,
    )  # fmt: skip


@pytest.mark.parametrize(("pieces", "piece_ft"), [(50, 1.0), (500, 0.1), (12, 0.5)])
def test_chain_of_short_pipes_runs_and_gives_joukowsky(pieces, piece_ft):
    # at a 1 ms step every piece is far shorter than half a reach: lumped one by one they would
    # leave no pipe at all (the run used to stop with "every pipe ... would be lumped")
    net = _chain(pieces, piece_ft * FT)
    res = simulate(net, 0.05, time_step_s=1e-3, cavitation=False)
    valve = net.node_names.index("valve")
    rise = res.node_first_peak_pressure_pa[valve] - RHO * G * HEAD
    assert abs(rise / (RHO * A_WAVE * V0) - 1.0) <= 0.01  # Joukowsky, true wave speed
    assert res.lumped_pipes == ()
    # every point of the chain sees the front pass: its first peak is the same Joukowsky rise. The
    # grid resolves one reach (a' dt): a point within half a reach of the supply takes the
    # supply's own section, so the check starts one reach down the chain
    reach_m = A_WAVE * (1 + res.largest_wave_speed_adjustment) * res.time_step_s
    first = int(np.ceil(reach_m / (piece_ft * FT)))
    inner = [net.node_names.index(f"n{i}") for i in range(first, pieces)]
    rises = res.node_first_peak_pressure_pa[inner] - RHO * G * HEAD
    assert np.all(np.abs(rises / (RHO * A_WAVE * V0) - 1.0) <= 0.01)


def test_chain_keeps_length_inertia_and_friction_on_a_slow_closure():
    # 50 ft as fifty 1 ft pieces with friction, a 60 ms linear closure (slow: 2L/a = 23 ms, so the
    # whole column's inertia sets the peak); reference: one 50 ft pipe on a fine grid (L/(a dt) =
    # 40 reaches exactly, nothing merged or lumped). The first peak (before any cavity collapse) is
    # compared: collapse peaks depend on the grid (knockproof.transient.solver notes).
    f = 0.03
    chain = _chain(50, FT, f, 0.06, "linear-area")
    whole = _chain(1, 50 * FT, f, 0.06, "linear-area")
    res_chain = simulate(chain, 0.3, time_step_s=1e-3)
    fine = 50 * FT / A_WAVE / 40
    res_whole = simulate(whole, 0.3, time_step_s=fine, lump_ratio=0.0)
    assert res_whole.largest_wave_speed_adjustment == pytest.approx(0.0, abs=1e-12)
    valve = chain.node_names.index("valve")
    p_chain = res_chain.node_first_peak_pressure_pa[valve]
    p_whole = res_whole.node_first_peak_pressure_pa[1]
    assert p_whole > RHO * G * HEAD + 0.2 * RHO * A_WAVE * V0  # a real surge, not a trickle
    assert abs(p_chain / p_whole - 1.0) <= 0.01
    # the steady head loss along the chain is that of the whole length (Darcy-Weisbach)
    loss = f * 50 * FT / D * V0**2 / (2 * G)
    assert chain.node_initial_head_m[valve] == pytest.approx(HEAD - loss, rel=1e-9)


def test_merged_away_node_takes_its_place_in_the_pipe():
    # a node 25 ft down a 50 x 1 ft chain, against the same place as a real node between two
    # 25 ft pipes on a fine grid (exact split of a uniform pipe); instant closure, no cavities
    chain = _chain(50, FT)
    names = ["supply", "mid", "valve"]
    split = tree_network(
        [
            PipeSpec("a", names[0], names[1], 25 * FT, D, A_WAVE, 0.0),
            PipeSpec("b", names[1], names[2], 25 * FT, D, A_WAVE, 0.0),
        ],
        "supply", HEAD, {}, [OutletSpec("valve", V0 * AREA, 0.0, "instant")], density_kg_m3=RHO,
    )  # fmt: skip
    fine = 25 * FT / A_WAVE / 20
    ref = simulate(split, 0.05, time_step_s=fine, lump_ratio=0.0, cavitation=False)
    res = simulate(chain, 0.05, time_step_s=1e-3, cavitation=False)
    mid = chain.node_names.index("n25")
    dh = RHO * A_WAVE * V0  # scale of the comparison: the Joukowsky rise
    assert abs(res.node_max_pressure_pa[mid] - ref.node_max_pressure_pa[1]) <= 0.01 * dh
    assert abs(res.node_min_pressure_pa[mid] - ref.node_min_pressure_pa[1]) <= 0.02 * dh


def test_recorded_node_inside_a_chain_is_kept():
    chain = _chain(50, FT)
    mid = chain.node_names.index("n25")
    res = simulate(chain, 0.05, time_step_s=1e-3, cavitation=False, record_nodes=[mid])
    assert set(res.traces_pressure_pa) == {mid}
    assert res.traces_pressure_pa[mid].max() == pytest.approx(
        res.node_max_pressure_pa[mid], rel=1e-12
    )
