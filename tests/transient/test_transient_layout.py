"""The kernel's layout: blocks, node classes, pipe order and reused layouts change no result.

The kernel updates the sections block by block and treats dead ends, two-pipe junctions and the
other junctions in separate loops (see kernel.py); the pipes are laid out in depth-first order
(assembly.py), and a layout is kept for the next run on the same network. None of this may change
the arithmetic: the checks below compare results bit for bit (or, for a network drawn with some
pipes the other way round, to 1e-12).
"""

import numpy as np
import pytest

from knockproof.transient import assembly, simulate, solver
from knockproof.transient.build import CushionSpec, OutletSpec, PipeSpec, tree_network
from knockproof.transient.network import TransientNetwork

G = 9.80665

FIELDS = (
    "node_max_head_m",
    "node_min_head_m",
    "node_first_peak_pressure_pa",
    "node_collapse_peak_pressure_pa",
    "node_cavity",
    "pipe_cavity",
)


def _floor(units=3, cushion_volume=None):
    """One floor of dwellings: a header, fixture runs ending in short stubs, two closing valves;
    with a gas cushion at the first unit's washer when ``cushion_volume`` is given."""
    pipes = [PipeSpec("main", "S", "F", 12.0, 0.026, 1310.0, 0.022)]
    elevation = {"S": 0.0}
    corridor = "F"
    for u in range(units):
        pipes += [
            PipeSpec(f"corridor{u}", corridor, f"C{u}", 6.0, 0.026, 1310.0, 0.022),
            PipeSpec(f"unit{u}", f"C{u}", f"U{u}", 3.0, 0.020, 1320.0, 0.022),
        ]
        for k, length in enumerate((4.0, 1.5, 2.5, 6.0, 1.2)):
            pipes += [
                PipeSpec(f"run{u}.{k}", f"U{u}", f"E{u}.{k}", length, 0.014, 1340.0, 0.025),
                PipeSpec(f"stub{u}.{k}", f"E{u}.{k}", f"V{u}.{k}", 0.3, 0.014, 1340.0, 0.025),
            ]
            elevation[f"V{u}.{k}"] = 0.3
        corridor = f"C{u}"
    outlets = [
        OutletSpec("V0.3", 0.25e-3, 0.02, "solenoid"),
        OutletSpec("V1.0", 0.15e-3, 0.0, "instant", 0.004),
    ]
    cushions = [CushionSpec("V0.3", cushion_volume)] if cushion_volume else []
    return tree_network(pipes, "S", 25.0, elevation, outlets, cushions)


def _run(net, **kw):
    assembly._SKELETONS.clear()
    solver._GRIDS.clear()
    return simulate(net, 0.15, time_step_s=2.3e-4, record_nodes=[1, 5], **kw)


def _assert_identical(a, b):
    for field in FIELDS:
        np.testing.assert_array_equal(getattr(a, field), getattr(b, field), err_msg=field)
    assert a.cavity_collapses == b.cavity_collapses
    for k in a.traces_pressure_pa:
        np.testing.assert_array_equal(a.traces_pressure_pa[k], b.traces_pressure_pa[k])
    for name in a.final_pipe_head_m:
        np.testing.assert_array_equal(a.final_pipe_head_m[name], b.final_pipe_head_m[name])
    for key in ("supply_volume_m3", "valve_volume_m3", "cavity_volume_m3", "max_cavity_volume_m3"):
        np.testing.assert_array_equal(a.stats[key], b.stats[key])


@pytest.mark.parametrize("block", [2, 7, 40])
def test_block_size_changes_no_result(monkeypatch, block):
    # small blocks: many blocks, two-pipe junctions split between blocks, cavities in some blocks
    net = _floor()
    reference = _run(net)
    assert reference.cavity_collapses > 0  # the comparison covers the cavity path
    monkeypatch.setattr(assembly, "BLOCK_SECTIONS", block)
    _assert_identical(_run(net), reference)


def test_reused_layout_gives_the_result_of_a_fresh_one():
    # arrestor sizing: the same event with other gas volumes reuses the layout (not the gas data)
    small, large = _floor(cushion_volume=5e-6), _floor(cushion_volume=40e-6)
    fresh_large = _run(large)
    _run(small)
    reused_large = simulate(large, 0.15, time_step_s=2.3e-4, record_nodes=[1, 5])
    assert len(assembly._SKELETONS) == 1  # the second network reused the first one's layout
    _assert_identical(reused_large, fresh_large)
    np.testing.assert_array_equal(
        reused_large.stats["gas_volume_initial_m3"], fresh_large.stats["gas_volume_initial_m3"]
    )
    assert not np.array_equal(
        fresh_large.node_max_head_m, _run(small).node_max_head_m
    )  # and the gas data did come from the network of each call


def _reversed(net: TransientNetwork, pipes) -> TransientNetwork:
    """The same network with the given pipes drawn the other way (ends swapped, flow negated)."""
    up = net.pipe_upstream.copy()
    down = net.pipe_downstream.copy()
    flow = net.pipe_initial_flow_m3_per_s.copy()
    for p in pipes:
        up[p], down[p] = net.pipe_downstream[p], net.pipe_upstream[p]
        flow[p] = -flow[p]
    fields = {k: getattr(net, k) for k in net.__dataclass_fields__}
    fields.update(pipe_upstream=up, pipe_downstream=down, pipe_initial_flow_m3_per_s=flow)
    return TransientNetwork(**fields)


def test_pipes_drawn_the_other_way_change_results_by_round_off_only():
    # Reversed stubs make dead ends at a pipe's first section; reversed runs and corridors break
    # the depth-first order's pairing of arriving and leaving pipes (other node classes).
    net = _floor()
    names = net.pipe_names
    flip = [i for i, n in enumerate(names) if n.startswith(("stub0", "run1", "corridor1"))]
    a = _run(net, cavitation=False)
    b = _run(_reversed(net, flip), cavitation=False)
    for field in ("node_max_head_m", "node_min_head_m", "node_first_peak_pressure_pa"):
        np.testing.assert_allclose(getattr(b, field), getattr(a, field), rtol=1e-12)
    for k in a.traces_pressure_pa:
        scale = np.abs(a.traces_pressure_pa[k]).max()
        np.testing.assert_allclose(
            b.traces_pressure_pa[k], a.traces_pressure_pa[k], rtol=0, atol=1e-12 * scale
        )


def test_step_transmitted_at_a_nine_pipe_junction():
    # Wylie & Streeter's junction rule, s = 2 (A1/a1) / sum(Ai/ai) dH, with nine pipes at the
    # node (a sum of more than seven terms, which numpy adds pairwise: the layout must match it)
    diameters = [0.05, 0.03, 0.02, 0.025, 0.04, 0.015, 0.035, 0.02, 0.045]
    speeds = [1000.0, 1300.0, 1250.0, 1200.0, 1100.0, 1350.0, 1150.0, 1300.0, 1050.0]
    pipes = [PipeSpec("feed", "supply", "junction", 2.0 * speeds[0], diameters[0], speeds[0])]
    pipes += [
        PipeSpec(f"side{i}", "junction", f"dead{i}", 2.4 * speeds[i], diameters[i], speeds[i])
        for i in range(1, 8)
    ]
    pipes.append(PipeSpec("run", "junction", "valve", 2.6 * speeds[8], diameters[8], speeds[8]))
    area = np.pi * np.array(diameters) ** 2 / 4
    net = tree_network(
        pipes, "supply", 300.0, {}, [OutletSpec("valve", 0.5 * area[8], 0.0, "instant")]
    )
    valve = net.node_names.index("valve")
    junction = net.node_names.index("junction")
    result = simulate(net, 2.9, time_step_s=0.1, record_nodes=[junction, valve], cavitation=False)
    rho_g = net.density_kg_m3 * G
    step = speeds[8] * 0.5 / G
    transmitted = 2 * (area[8] / speeds[8]) / np.sum(area / np.array(speeds)) * step
    head = result.traces_pressure_pa[junction] / rho_g - 300.0
    np.testing.assert_allclose(result.traces_pressure_pa[valve][1] / rho_g - 300.0, step)
    assert np.all(np.abs(head[:27]) < 1e-9)  # the front needs 2.6 s to reach the junction
    np.testing.assert_allclose(head[27:], transmitted, rtol=1e-12)  # no reflection back by 2.9 s
