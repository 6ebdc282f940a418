"""Properties of the simulation on random small trees (hypothesis).

* Renumbering the nodes and reordering the pipes changes no result (the layout, the node classes and
  the order of every sum follow names, not numbers).
* Volume: what the supply delivers minus what the valves discharge equals the water stored by
  compressibility plus what the gas cushions took in, minus the vapour cavities left open (the
  continuity equation; Wylie & Streeter, Fluid Transients in Systems, 1993, sec. 2.x and 3.1),
  with the stored water integrated independently from the final section heads.
* Pipes written against the flow (so that a junction has no arriving pipe, or two) give the same
  heads as the same tree written along it (to rounding; without vapour cavities, which amplify
  rounding).

The trees are invented: 2 to 9 pipes of building sizes, one to three closing valves, sometimes a
gas cushion, at heads from low (vapour cavities) to high.
"""

from __future__ import annotations

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from transient_nets import permuted, stored_volume_change

from knockproof.transient import simulate
from knockproof.transient.build import CushionSpec, OutletSpec, PipeSpec, tree_network

DIAMETERS = (0.0138, 0.0199, 0.0258, 0.0320)  # m, about 1/2 to 1-1/4 in type L copper
LAWS = ("instant", "solenoid", "quadratic")
DT = 2.0e-4


@st.composite
def trees(draw):
    """(pipes, elevations, outlets, cushions, supply head)."""
    n = draw(st.integers(2, 9))
    parent = [draw(st.integers(0, i)) for i in range(n)]  # node i+1 hangs from parent[i]
    flip = [draw(st.booleans()) for _ in range(n)]
    pipes, elevation = [], {"n0": 0.0}
    for i in range(n):
        up, down = f"n{parent[i]}", f"n{i + 1}"
        rise = draw(st.sampled_from((0.0, 0.0, 1.0, 3.0)))
        elevation[down] = elevation[up] + rise
        length = draw(st.floats(0.5, 15.0))
        d = draw(st.sampled_from(DIAMETERS))
        a = draw(st.floats(1100.0, 1400.0))
        f = draw(st.floats(0.015, 0.035))
        ends = (down, up) if flip[i] else (up, down)
        pipes.append(PipeSpec(f"p{i}", *ends, length, d, a, f))
    leaves = sorted({f"n{i + 1}" for i in range(n)} - {f"n{p}" for p in parent})
    chosen = draw(st.lists(st.sampled_from(leaves), min_size=1, max_size=3, unique=True))
    outlets = [
        OutletSpec(
            node,
            draw(st.floats(0.05e-3, 0.3e-3)),
            draw(st.floats(0.0, 0.03)),
            draw(st.sampled_from(LAWS)),
            draw(st.floats(0.0, 0.01)),
        )
        for node in chosen
    ]
    cushions = []
    if draw(st.booleans()):
        cushions.append(CushionSpec(draw(st.sampled_from(chosen)), draw(st.floats(5e-6, 60e-6))))
    head = draw(st.floats(25.0, 90.0))
    return pipes, elevation, outlets, cushions, head


def _network(spec):
    pipes, elevation, outlets, cushions, head = spec
    return tree_network(pipes, "n0", head, elevation, outlets, cushions)


SETTINGS = settings(
    max_examples=50, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.too_slow]
)


@SETTINGS
@given(trees(), st.integers(0, 2**31 - 1))
def test_renumbering_changes_nothing(spec, seed):
    net = _network(spec)
    rng = np.random.default_rng(seed)
    node_perm = rng.permutation(net.n_nodes)
    other = permuted(net, node_perm, rng.permutation(net.n_pipes))
    a = simulate(net, 0.15, time_step_s=DT)
    b = simulate(other, 0.15, time_step_s=DT)
    for field in ("node_max_pressure_pa", "node_min_pressure_pa", "node_first_peak_pressure_pa"):
        np.testing.assert_array_equal(getattr(b, field), getattr(a, field)[node_perm])
    np.testing.assert_array_equal(b.node_cavity, a.node_cavity[node_perm])
    assert b.cavity_collapses == a.cavity_collapses
    assert b.stats["supply_volume_m3"] == a.stats["supply_volume_m3"]
    for name, heads in a.final_pipe_head_m.items():
        np.testing.assert_array_equal(b.final_pipe_head_m[name], heads)


@SETTINGS
@given(trees())
def test_volume_is_conserved(spec):
    # Without vapour cavities: with hundreds of cavity collapses the bookkeeping drifts further (up
    # to 2.5e-3 of the volumes moved, measured alike with the earlier kernel); the cavitating cases
    # are held to the tree tests and to the renumbering property above.
    net = _network(spec)
    result = simulate(net, 0.2, time_step_s=DT, cavitation=False)
    s = result.stats
    delivered = s["supply_volume_m3"] - s["valve_volume_m3"].sum()
    gas_taken = s["gas_volume_initial_m3"].sum() - s["gas_volume_final_m3"].sum()
    balance = stored_volume_change(net, result) + gas_taken - s["cavity_volume_m3"]
    scale = s["valve_volume_m3"].sum() + abs(gas_taken) + s["max_cavity_volume_m3"] + abs(delivered)
    # tolerance chosen as in test_transient_tree: trapezoid integration of the boundary flows
    # against the discrete state (measured below 6e-5 of the volumes moved on 60 random trees)
    assert abs(delivered - balance) <= 1e-4 * scale + 1e-12


@SETTINGS
@given(trees())
def test_pipe_direction_as_written_changes_nothing(spec):
    pipes, elevation, outlets, cushions, head = spec
    along = [
        PipeSpec(p.name, p.upstream, p.downstream, p.length_m, p.diameter_m,
                 p.wave_speed_m_per_s, p.friction_factor)
        for p in pipes
    ]  # fmt: skip
    # written along the flow: each pipe from the end nearer the supply (node numbers grow away)
    along = [
        p if int(p.upstream[1:]) < int(p.downstream[1:])
        else PipeSpec(p.name, p.downstream, p.upstream, p.length_m, p.diameter_m,
                      p.wave_speed_m_per_s, p.friction_factor)
        for p in along
    ]  # fmt: skip
    # Without vapour cavities: a reversed pipe's sections are updated in the other order, and with
    # cavities such last-bit differences grow through the cavity dynamics (measured up to 7e-4 of a
    # peak here), as any tiny perturbation of a run with column separation does.
    net_a, net_b = _network(spec), _network((along, elevation, outlets, cushions, head))
    a = simulate(net_a, 0.15, time_step_s=DT, cavitation=False)
    b = simulate(net_b, 0.15, time_step_s=DT, cavitation=False)
    same = [net_a.node_names.index(n) for n in net_b.node_names]  # numbered as met in the pipes
    np.testing.assert_allclose(b.node_max_pressure_pa, a.node_max_pressure_pa[same], rtol=1e-9)
    np.testing.assert_allclose(b.node_min_pressure_pa, a.node_min_pressure_pa[same], rtol=1e-9)
