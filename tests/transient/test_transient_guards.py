"""Error paths: each raises SimulationError with a message naming the pipe or node."""

import subprocess
import sys

import numpy as np
import pytest

from knockproof.errors import SimulationError
from knockproof.transient import TransientNetwork, simulate
from knockproof.transient.build import OutletSpec, PipeSpec, tree_network


def _net(**changes) -> TransientNetwork:
    net = tree_network(
        [
            PipeSpec("feed", "supply", "tee", 20.0, 0.025, 1300.0, 0.02),
            PipeSpec("branch-7", "tee", "tap", 8.0, 0.02, 1300.0, 0.02),
        ],
        "supply", 40.0, {}, [OutletSpec("tap", 2e-4, 0.01)],
    )  # fmt: skip
    fields = {k: getattr(net, k) for k in net.__dataclass_fields__}
    fields.update(changes)
    return TransientNetwork(**fields)


def test_nan_initial_flow_names_the_pipe():
    base = _net()
    flow = base.pipe_initial_flow_m3_per_s.copy()
    flow[1] = np.nan
    with pytest.raises(SimulationError, match=r"pipe 'branch-7'.*pipe_initial_flow_m3_per_s.*nan"):
        simulate(_net(pipe_initial_flow_m3_per_s=flow), 0.1)


def _unstable_branch():
    """branch-7 with R|Q|/B = 10 at a creeping flow: explicit friction is unstable when 2 R|Q| > B
    (a perturbation is multiplied by 1 - 2R|Q|/B each step); the tap closes."""
    g, a, d, dt = 9.80665, 1300.0, 0.02, 1e-3
    area = np.pi * d * d / 4
    flow = 1e-3 * area
    b = a / (g * area)
    reaches = round(8.0 / (a * dt))
    r = 10.0 * b / flow
    friction = r * 2 * g * d * area**2 / (8.0 / reaches)  # R = f dx / (2 g D A^2)
    net = tree_network(
        [
            PipeSpec("feed", "supply", "tee", 20.0, 0.025, 1300.0, 0.02),
            PipeSpec("branch-7", "tee", "tap", 8.0, d, a, friction),
        ],
        "supply", 40.0, {}, [OutletSpec("tap", flow, 0.01)],
    )  # fmt: skip
    return net, dt


def test_blow_up_during_the_run_names_the_pipe():
    net, dt = _unstable_branch()
    with pytest.raises(SimulationError, match=r"pipe 'branch-7'.*non-finite"):
        simulate(net, 0.5, time_step_s=dt)


def test_blow_up_is_caught_whatever_step_the_run_ends_on():
    # Every run long enough to blow up must say so, also when it ends a step or two after the heads
    # pass the limit (before they overflow); shorter runs return heads within the limit.
    net, dt = _unstable_branch()
    failed_from = None
    for steps in range(1, 30):
        try:
            res = simulate(net, steps * dt, time_step_s=dt)
        except SimulationError as exc:
            assert "pipe 'branch-7'" in str(exc)
            failed_from = failed_from or steps
            continue
        assert failed_from is None, f"{steps} steps ran on after {failed_from} steps failed"
        for heads in res.final_pipe_head_m.values():
            assert np.all(np.abs(heads) <= 1e6)
    assert failed_from is not None


def test_unsteady_initial_heads_name_the_pipe():
    heads = _net().node_initial_head_m.copy()
    heads[1] += 0.5
    with pytest.raises(SimulationError, match=r"pipe 'feed': initial heads are not a steady"):
        simulate(_net(node_initial_head_m=heads), 0.1)


def test_unbalanced_flows_name_the_node():
    flow = _net().pipe_initial_flow_m3_per_s.copy()
    flow[1] *= 0.5
    with pytest.raises(SimulationError, match=r"not a steady state|node 'tee'"):
        simulate(_net(pipe_initial_flow_m3_per_s=flow), 0.1)


def test_grid_that_cannot_fit_names_the_pipe():
    # branch-7 spans 1.45 to 1.74 reaches over the allowed steps: never within 1 % of a whole number
    with pytest.raises(SimulationError, match=r"pipe 'branch-7'.*does not fit the grid"):
        simulate(
            _net(pipe_length_m=np.array([260.0, 18.85])),
            0.1,
            time_step_s=0.01,
            max_wave_speed_adjustment=0.01,
            max_refinement=1.2,
        )


def test_unknown_closure_law_is_reported():
    base = _net()
    valve = base.valves[0].__class__(2, 2e-4, base.valves[0].initial_head_drop_m, 0.01, "slam")
    with pytest.raises(SimulationError, match=r"node 'tap'.*unknown closure law 'slam'"):
        simulate(_net(valves=(valve,)), 0.1)


def test_import_does_not_load_numba():
    code = "import sys, knockproof.transient; print('numba' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"
