"""Build a steady :class:`TransientNetwork` for a tree of pipes from a few plain numbers.

Given the pipes of a tree fed by one constant-head node and the flows of its open valves, the steady
state follows without iteration: each pipe carries the sum of the valve flows beyond it, and heads
fall by the Darcy-Weisbach loss along each pipe (Wylie & Streeter, *Fluid Transients in Systems*,
1993, sec. 3.1, steady state as initial condition). Used by the tests, the one-run estimate and any
caller that has no steady solver of its own.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from knockproof.errors import SimulationError
from knockproof.physics.gas_cushion import ARRESTOR_POLYTROPIC_EXPONENT
from knockproof.transient.network import (
    GasCushion,
    Reservoir,
    TransientNetwork,
    Valve,
    friction_head_loss_m,
    steady_heads,
)


@dataclass(frozen=True)
class PipeSpec:
    """One pipe: name, end node names (flow upstream -> downstream when open), and its data.

    ``length_m`` [m], ``diameter_m`` [m] inside, ``wave_speed_m_per_s`` [m/s], ``friction_factor``
    Darcy [-].
    """

    name: str
    upstream: str
    downstream: str
    length_m: float
    diameter_m: float
    wave_speed_m_per_s: float
    friction_factor: float = 0.0


@dataclass(frozen=True)
class OutletSpec:
    """An open valve at a node: steady flow [m^3/s] and how it closes (see :class:`Valve`)."""

    node: str
    flow_m3_per_s: float
    closure_time_s: float
    law: str = "linear-area"
    start_time_s: float = 0.0


@dataclass(frozen=True)
class CushionSpec:
    """A gas cushion at a node (see :class:`GasCushion`); ``None`` pressure: the line pressure."""

    node: str
    gas_volume_m3: float
    gas_pressure_abs_pa: float | None = None
    polytropic_exponent: float = ARRESTOR_POLYTROPIC_EXPONENT
    throat_loss_s2_per_m5: float = 1.0e3


def tree_network(
    pipes: Sequence[PipeSpec],
    supply_node: str,
    supply_head_m: float,
    elevations_m: dict[str, float],
    outlets: Sequence[OutletSpec] = (),
    cushions: Sequence[CushionSpec] = (),
    *,
    density_kg_m3: float = 998.2,
    vapour_pressure_abs_pa: float = 2339.0,
    atmospheric_pa: float = 101325.0,
    node_order: Sequence[str] | None = None,
) -> TransientNetwork:
    """A steady :class:`TransientNetwork` for a tree fed at ``supply_node`` with head [m].

    Nodes are numbered in ``node_order`` if given, else in order of first appearance in ``pipes``.
    Elevations default to 0 m for nodes missing from ``elevations_m``.

    Raises
    ------
    SimulationError
        When the pipes do not form a tree reaching every outlet from the supply.
    """
    names: list[str] = list(node_order) if node_order is not None else []
    for spec in pipes:
        for name in (spec.upstream, spec.downstream):
            if name not in names:
                names.append(name)
    index = {name: i for i, name in enumerate(names)}
    if supply_node not in index:
        raise SimulationError(f"supply node {supply_node!r} is not on any pipe")
    n_nodes = len(names)
    up = np.array([index[p.upstream] for p in pipes], dtype=np.int64)
    down = np.array([index[p.downstream] for p in pipes], dtype=np.int64)
    if len(pipes) != n_nodes - 1:
        raise SimulationError(f"{len(pipes)} pipes on {n_nodes} nodes is not a tree")
    # orient from the supply, find each node's parent pipe
    adjacency: list[list[int]] = [[] for _ in range(n_nodes)]
    for k in range(len(pipes)):
        adjacency[up[k]].append(k)
        adjacency[down[k]].append(k)
    root = index[supply_node]
    parent_pipe = np.full(n_nodes, -1, dtype=np.int64)
    order = [root]
    seen = {root}
    for node in order:
        for k in adjacency[node]:
            other = int(down[k] if up[k] == node else up[k])
            if other not in seen:
                seen.add(other)
                parent_pipe[other] = k
                order.append(other)
    if len(seen) != n_nodes:
        raise SimulationError("the pipes do not connect every node to the supply")
    demand = np.zeros(n_nodes)
    for o in outlets:
        demand[index[o.node]] += o.flow_m3_per_s
    flow = np.zeros(len(pipes))
    for node in reversed(order[1:]):
        k = int(parent_pipe[node])
        sign = 1.0 if down[k] == node else -1.0
        flow[k] = sign * demand[node]
        parent = int(up[k] if down[k] == node else down[k])
        demand[parent] += demand[node]
    length = np.array([p.length_m for p in pipes], dtype=float)
    diameter = np.array([p.diameter_m for p in pipes], dtype=float)
    friction = np.array([p.friction_factor for p in pipes], dtype=float)
    loss = friction_head_loss_m(length, diameter, friction, flow)
    head = steady_heads(n_nodes, up, down, loss, {root: float(supply_head_m)})
    elevation = np.array([float(elevations_m.get(n, 0.0)) for n in names])
    rho_g = density_kg_m3 * 9.80665
    valves = tuple(
        Valve(
            node=index[o.node],
            initial_flow_m3_per_s=o.flow_m3_per_s,
            initial_head_drop_m=float(head[index[o.node]] - elevation[index[o.node]]),
            closure_time_s=o.closure_time_s,
            law=o.law,
            start_time_s=o.start_time_s,
        )
        for o in outlets
    )
    arrestors = tuple(
        GasCushion(
            node=index[c.node],
            gas_volume_m3=c.gas_volume_m3,
            gas_pressure_abs_pa=(
                c.gas_pressure_abs_pa
                if c.gas_pressure_abs_pa is not None
                else rho_g * (head[index[c.node]] - elevation[index[c.node]]) + atmospheric_pa
            ),
            polytropic_exponent=c.polytropic_exponent,
            throat_loss_s2_per_m5=c.throat_loss_s2_per_m5,
        )
        for c in cushions
    )
    return TransientNetwork(
        node_names=tuple(names),
        node_elevation_m=elevation,
        pipe_names=tuple(p.name for p in pipes),
        pipe_upstream=up,
        pipe_downstream=down,
        pipe_length_m=length,
        pipe_diameter_m=diameter,
        pipe_wave_speed_m_per_s=np.array([p.wave_speed_m_per_s for p in pipes], dtype=float),
        pipe_friction_factor=friction,
        pipe_initial_flow_m3_per_s=flow,
        node_initial_head_m=head,
        reservoirs=(Reservoir(node=root, head_m=float(supply_head_m)),),
        valves=valves,
        arrestors=arrestors,
        density_kg_m3=density_kg_m3,
        vapour_pressure_abs_pa=vapour_pressure_abs_pa,
        atmospheric_pa=atmospheric_pa,
    )
