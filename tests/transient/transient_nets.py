"""Helpers for the transient tests (a module, not a test): a network with its nodes and pipes
renumbered, and the water stored by compressibility, integrated from the final section heads."""

from __future__ import annotations

import numpy as np

from knockproof.transient import TransientNetwork
from knockproof.transient.network import Reservoir, Valve

G = 9.80665


def stored_volume_change(net, result):
    """sum over pipes of (g A / a^2) * integral(H - H0) dx (Wylie & Streeter 1993: the continuity
    equation), from the final section heads, against the steady (linear) initial heads."""
    total = 0.0
    for p, name in enumerate(net.pipe_names):
        final = result.final_pipe_head_m[name]
        n = len(final) - 1
        initial = np.linspace(
            net.node_initial_head_m[net.pipe_upstream[p]],
            net.node_initial_head_m[net.pipe_downstream[p]],
            n + 1,
        )  # steady friction gradient is linear
        area = np.pi * net.pipe_diameter_m[p] ** 2 / 4
        speed = result.wave_speed_used_m_per_s[p]
        total += G * area / speed**2 * np.trapezoid(final - initial, dx=net.pipe_length_m[p] / n)
    return total


def permuted(net: TransientNetwork, node_perm, pipe_perm) -> TransientNetwork:
    """The same network with node ``node_perm[i]`` numbered ``i`` and pipes taken in the order
    ``pipe_perm`` (valves listed in reverse)."""
    new_of_old = np.empty_like(node_perm)
    new_of_old[node_perm] = np.arange(len(node_perm))
    return TransientNetwork(
        node_names=tuple(net.node_names[i] for i in node_perm),
        node_elevation_m=net.node_elevation_m[node_perm],
        pipe_names=tuple(net.pipe_names[i] for i in pipe_perm),
        pipe_upstream=new_of_old[net.pipe_upstream[pipe_perm]],
        pipe_downstream=new_of_old[net.pipe_downstream[pipe_perm]],
        pipe_length_m=net.pipe_length_m[pipe_perm],
        pipe_diameter_m=net.pipe_diameter_m[pipe_perm],
        pipe_wave_speed_m_per_s=net.pipe_wave_speed_m_per_s[pipe_perm],
        pipe_friction_factor=net.pipe_friction_factor[pipe_perm],
        pipe_initial_flow_m3_per_s=net.pipe_initial_flow_m3_per_s[pipe_perm],
        node_initial_head_m=net.node_initial_head_m[node_perm],
        reservoirs=tuple(Reservoir(int(new_of_old[r.node]), r.head_m) for r in net.reservoirs),
        valves=tuple(
            Valve(
                int(new_of_old[v.node]),
                v.initial_flow_m3_per_s,
                v.initial_head_drop_m,
                v.closure_time_s,
                v.law,
                v.start_time_s,
            )
            for v in reversed(net.valves)
        ),  # fmt: skip
        arrestors=tuple(
            type(a)(
                int(new_of_old[a.node]),
                a.gas_volume_m3,
                a.gas_pressure_abs_pa,
                a.polytropic_exponent,
                a.throat_loss_s2_per_m5,
            )
            for a in net.arrestors
        ),  # fmt: skip
    )
