"""From a :class:`TransientNetwork` and a :class:`Grid` to the flat arrays the kernel runs on.

Layout (all pipes end to end): pipe ``p`` owns computing sections ``offset[p] .. offset[p] + N_p``
of the flat section arrays. Nodes joined by lumped pipes are merged into one *group* (a union-find);
each group has a list of pipe ends (CSR: ``end_ptr``), of valves (``valve_ptr``) and at most one
arrestor. The initial state is made exactly steady on the grid: group heads are rebuilt from the
reservoir heads and the pipes' friction losses, and heads inside a pipe fall by ``R Q|Q|`` per reach
(Wylie & Streeter 1993, sec. 3.1: steady state as the initial condition).

Input checks (each raises :class:`~knockproof.errors.SimulationError` naming the pipe or node):
finite and positive pipe data, node indices in range, initial heads consistent with the friction
losses (1 mm), flow continuity at every node, valve head drop consistent with the node head (1 mm).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from knockproof.errors import SimulationError
from knockproof.transient.closure import law_code
from knockproof.transient.grid import Grid
from knockproof.transient.network import (
    GRAVITY_M_PER_S2,
    TransientNetwork,
    friction_head_loss_m,
    steady_heads,
)

HEAD_TOLERANCE_M = 1e-3
"""Allowed mismatch [m] between given initial heads and the friction losses (a chosen tolerance)."""


@dataclass(eq=False)
class Layout:
    """Flat arrays for the kernel (see the module docstring). Internal to the transient package."""

    # sections
    head: np.ndarray
    scaled_flow: np.ndarray
    section_r_scaled: np.ndarray
    section_threshold: np.ndarray
    # pipes (only the unlumped ones, in ``pipe_index`` order)
    pipe_index: np.ndarray
    offset: np.ndarray
    reaches: np.ndarray
    b_coef: np.ndarray
    r_coef: np.ndarray
    vapour_head_start: np.ndarray
    vapour_head_step: np.ndarray
    area: np.ndarray
    reach_length: np.ndarray
    # groups
    node_group: np.ndarray
    group_count: int
    group_kind: np.ndarray
    group_fixed_head: np.ndarray
    group_vapour_head: np.ndarray
    group_head: np.ndarray
    group_bs: np.ndarray
    plain_count: int
    class_start: np.ndarray
    class_degree: np.ndarray
    end_ptr: np.ndarray
    end_section: np.ndarray
    end_neighbour: np.ndarray
    end_sign: np.ndarray
    end_r_scaled: np.ndarray
    end_inv_b: np.ndarray
    end_in: np.ndarray
    end_out: np.ndarray
    end_sign_f: np.ndarray
    state0: np.ndarray
    block_pipe: np.ndarray
    # valves
    valve_ptr: np.ndarray
    valve_order: np.ndarray
    valve_flow0: np.ndarray
    valve_drop0: np.ndarray
    valve_elevation: np.ndarray
    valve_family: np.ndarray
    valve_exponent: np.ndarray
    valve_closure: np.ndarray
    valve_start: np.ndarray
    # arrestors
    group_arrestor: np.ndarray
    arrestor_c0: np.ndarray
    arrestor_n: np.ndarray
    arrestor_k: np.ndarray
    arrestor_volume0: np.ndarray
    arrestor_elevation: np.ndarray
    barometric_head: float
    lumped_names: tuple[str, ...]


def check_network(net: TransientNetwork) -> None:
    """Check shapes, finiteness, signs and indices of the network arrays (names pipe or node)."""
    n_nodes, n_pipes = net.n_nodes, net.n_pipes
    names = net.pipe_names
    per_pipe = {
        "pipe_upstream": net.pipe_upstream,
        "pipe_downstream": net.pipe_downstream,
        "pipe_length_m": net.pipe_length_m,
        "pipe_diameter_m": net.pipe_diameter_m,
        "pipe_wave_speed_m_per_s": net.pipe_wave_speed_m_per_s,
        "pipe_friction_factor": net.pipe_friction_factor,
        "pipe_initial_flow_m3_per_s": net.pipe_initial_flow_m3_per_s,
    }
    for field_name, values in per_pipe.items():
        if np.shape(values) != (n_pipes,):
            raise SimulationError(
                f"{field_name} has shape {np.shape(values)}; expected ({n_pipes},), one per pipe"
            )
    for field_name, values in {
        "node_elevation_m": net.node_elevation_m,
        "node_initial_head_m": net.node_initial_head_m,
    }.items():
        if np.shape(values) != (n_nodes,):
            raise SimulationError(
                f"{field_name} has shape {np.shape(values)}; expected ({n_nodes},), one per node"
            )
        bad = np.flatnonzero(~np.isfinite(np.asarray(values, dtype=float)))
        if bad.size:
            raise SimulationError(
                f"node {net.node_names[bad[0]]!r}: {field_name} is {values[bad[0]]!r}; expected a "
                "finite number"
            )
    positive = ("pipe_length_m", "pipe_diameter_m", "pipe_wave_speed_m_per_s")
    for field_name, values in per_pipe.items():
        v = np.asarray(values, dtype=float)
        for i in range(n_pipes):
            if not np.isfinite(v[i]):
                raise SimulationError(
                    f"pipe {names[i]!r}: {field_name} is {v[i]!r}; expected a finite number"
                )
            if field_name in positive and v[i] <= 0.0:
                raise SimulationError(
                    f"pipe {names[i]!r}: {field_name} is {v[i]!r}; expected a positive number"
                )
            if field_name == "pipe_friction_factor" and v[i] < 0.0:
                raise SimulationError(
                    f"pipe {names[i]!r}: friction factor is {v[i]!r}; expected >= 0"
                )
            if field_name in ("pipe_upstream", "pipe_downstream") and not (0 <= v[i] < n_nodes):
                raise SimulationError(
                    f"pipe {names[i]!r}: {field_name} is {v[i]!r}; expected a node index in "
                    f"0..{n_nodes - 1}"
                )
        if field_name == "pipe_downstream":
            same = np.flatnonzero(np.asarray(net.pipe_upstream) == v)
            if same.size:
                raise SimulationError(f"pipe {names[same[0]]!r} joins a node to itself")
    for item in (*net.reservoirs, *net.valves, *net.arrestors):
        if not (0 <= item.node < n_nodes):
            raise SimulationError(f"{item!r}: node index out of range 0..{n_nodes - 1}")


def _union_find_groups(n_nodes: int, up: np.ndarray, down: np.ndarray, lumped: np.ndarray):
    parent = list(range(n_nodes))

    def find(i: int) -> int:
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    for p in np.flatnonzero(lumped):
        a, b = find(int(up[p])), find(int(down[p]))
        if a != b:
            parent[max(a, b)] = min(a, b)
    roots = np.array([find(i) for i in range(n_nodes)], dtype=np.int64)
    _, group = np.unique(roots, return_inverse=True)
    return group.astype(np.int64), int(group.max()) + 1


BLOCK_SECTIONS = 256
"""The kernel's flat pass counts sections below their vapour head per block of about this many."""


def _blocks(offset: np.ndarray, total: int) -> np.ndarray:
    """First pipe of each block of consecutive pipes (about BLOCK_SECTIONS sections), then the
    number of pipes."""
    starts = [0]
    for i in range(1, len(offset)):
        if offset[i] - offset[starts[-1]] >= BLOCK_SECTIONS:
            starts.append(i)
    starts.append(len(offset))
    return np.array(starts, dtype=np.int64)


def build_layout(net: TransientNetwork, grid: Grid, *, cavitation: bool) -> Layout:
    """Check the network and lay it out for the kernel."""
    check_network(net)
    g = GRAVITY_M_PER_S2
    rho = float(net.density_kg_m3)
    n_nodes = net.n_nodes
    up = np.asarray(net.pipe_upstream, dtype=np.int64)
    down = np.asarray(net.pipe_downstream, dtype=np.int64)
    length = np.asarray(net.pipe_length_m, dtype=float)
    diameter = np.asarray(net.pipe_diameter_m, dtype=float)
    friction = np.asarray(net.pipe_friction_factor, dtype=float)
    flow = np.asarray(net.pipe_initial_flow_m3_per_s, dtype=float)
    elevation = np.asarray(net.node_elevation_m, dtype=float)
    given_head = np.asarray(net.node_initial_head_m, dtype=float)
    area = net.pipe_area_m2()
    loss = friction_head_loss_m(length, diameter, friction, flow)

    # steady state of the given network
    mismatch = given_head[up] - given_head[down] - loss
    bad = np.flatnonzero(np.abs(mismatch) > HEAD_TOLERANCE_M)
    if bad.size:
        p = int(bad[0])
        raise SimulationError(
            f"pipe {net.pipe_names[p]!r}: initial heads are not a steady state: head drop "
            f"{given_head[up[p]] - given_head[down[p]]:.6g} m, friction loss {loss[p]:.6g} m "
            f"(allowed difference {HEAD_TOLERANCE_M:g} m)"
        )
    balance = np.zeros(n_nodes)
    np.add.at(balance, down, flow)
    np.add.at(balance, up, -flow)
    for v in net.valves:
        balance[v.node] -= v.initial_flow_m3_per_s
    reservoir_nodes = {r.node for r in net.reservoirs}
    scale = 1e-12 + 1e-6 * max(float(np.abs(flow).max(initial=0.0)), 1e-9)
    for node in np.flatnonzero(np.abs(balance) > scale):
        if int(node) not in reservoir_nodes:
            raise SimulationError(
                f"node {net.node_names[node]!r}: initial flows do not balance (net inflow "
                f"{balance[node]:.6g} m^3/s; expected 0, valves included)"
            )
    for v in net.valves:
        if not (np.isfinite(v.initial_flow_m3_per_s) and v.initial_flow_m3_per_s >= 0.0):
            raise SimulationError(
                f"valve at node {net.node_names[v.node]!r}: initial flow "
                f"{v.initial_flow_m3_per_s!r}; expected a finite number >= 0"
            )
        drop = given_head[v.node] - elevation[v.node]
        if abs(drop - v.initial_head_drop_m) > HEAD_TOLERANCE_M:
            raise SimulationError(
                f"valve at node {net.node_names[v.node]!r}: initial head drop "
                f"{v.initial_head_drop_m:.6g} m differs from node head minus elevation {drop:.6g} m"
            )
        if v.initial_flow_m3_per_s > 0.0 and v.initial_head_drop_m <= 0.0:
            raise SimulationError(
                f"valve at node {net.node_names[v.node]!r}: flowing with head drop "
                f"{v.initial_head_drop_m:.6g} m; expected > 0"
            )
        if not (np.isfinite(v.closure_time_s) and v.closure_time_s >= 0.0):
            raise SimulationError(
                f"valve at node {net.node_names[v.node]!r}: closure time {v.closure_time_s!r}; "
                "expected a finite number >= 0"
            )
        try:
            law_code(v.law, v.closure_time_s)
        except ValueError as exc:
            raise SimulationError(f"valve at node {net.node_names[v.node]!r}: {exc}") from None

    # groups of nodes joined by lumped pipes
    group, n_groups = _union_find_groups(n_nodes, up, down, grid.lumped)
    kept = np.flatnonzero(~grid.lumped)
    # renumber groups: plain junctions first, by degree (the kernel loops over them in classes of
    # equal degree), then the groups holding a reservoir, valve or arrestor
    special = np.zeros(n_groups, dtype=bool)
    for item in (*net.reservoirs, *net.valves, *net.arrestors):
        special[group[item.node]] = True
    degree = np.zeros(n_groups, dtype=np.int64)
    np.add.at(degree, group[up[kept]], 1)
    np.add.at(degree, group[down[kept]], 1)
    rank = np.empty(n_groups, dtype=np.int64)
    rank[np.lexsort((degree, special))] = np.arange(n_groups)
    group = rank[group]
    degree = degree[np.argsort(rank)]
    special = special[np.argsort(rank)]
    n_plain = int((~special).sum())
    class_degree, first = np.unique(degree[:n_plain], return_index=True)
    class_start = np.append(first, n_plain).astype(np.int64)
    fixed: dict[int, float] = {}
    group_kind = np.zeros(n_groups, dtype=np.int64)
    for r in net.reservoirs:
        gi = int(group[r.node])
        if gi in fixed and abs(fixed[gi] - r.head_m) > HEAD_TOLERANCE_M:
            raise SimulationError(
                f"node {net.node_names[r.node]!r}: two constant-head nodes with different heads "
                "are "
                "joined (directly or through a lumped pipe)"
            )
        fixed[gi] = float(r.head_m)
        group_kind[gi] = 1
    kept_names = tuple(net.pipe_names[p] for p in kept)
    head_g = steady_heads(
        n_groups, group[up[kept]], group[down[kept]], loss[kept], fixed, pipe_names=kept_names
    )
    while np.isnan(head_g).any():  # a part of the network without a reservoir: trust given heads
        missing = int(np.flatnonzero(np.isnan(head_g))[0])
        member = int(np.flatnonzero(group == missing)[0])
        extra = {i: float(head_g[i]) for i in np.flatnonzero(~np.isnan(head_g))}
        extra[missing] = float(given_head[member])
        head_g = steady_heads(
            n_groups,
            group[up[kept]],
            group[down[kept]],
            loss[kept],
            {**extra, **fixed},
            pipe_names=kept_names,
        )

    # sections
    reaches = grid.reaches[kept].astype(np.int64)
    offset = np.zeros(len(kept), dtype=np.int64)
    offset[1:] = np.cumsum(reaches + 1)[:-1]
    total = int((reaches + 1).sum())
    a_used = grid.wave_speed_m_per_s[kept]
    area_k = area[kept]
    dx = length[kept] / reaches
    b_coef = a_used / (g * area_k)
    r_coef = friction[kept] * dx / (2.0 * g * diameter[kept] * area_k**2)
    head = np.empty(total)
    q = np.empty(total)
    vapour_offset = (net.vapour_pressure_abs_pa - net.atmospheric_pa) / (rho * g)
    hv_start = np.empty(len(kept))
    hv_step = np.empty(len(kept))
    section_r = np.empty(total)
    threshold = np.full(total, -1.0e6)
    for i, p in enumerate(kept):
        j = np.arange(reaches[i] + 1)
        q0 = flow[p]
        head[offset[i] : offset[i] + reaches[i] + 1] = head_g[group[up[p]]] - j * r_coef[
            i
        ] * q0 * abs(q0)
        q[offset[i] : offset[i] + reaches[i] + 1] = q0 * b_coef[i]
        z0, z1 = elevation[up[p]], elevation[down[p]]
        hv_start[i] = z0 + vapour_offset
        hv_step[i] = (z1 - z0) / reaches[i]
        section_r[offset[i] : offset[i] + reaches[i] + 1] = r_coef[i] / b_coef[i] ** 2
        if cavitation and reaches[i] > 1:
            threshold[offset[i] + 1 : offset[i] + reaches[i]] = hv_start[i] + hv_step[i] * j[1:-1]

    # groups: ends
    ends_of: list[list[tuple[int, int, int, int]]] = [[] for _ in range(n_groups)]
    for i, p in enumerate(kept):
        o, n = int(offset[i]), int(reaches[i])
        ends_of[group[up[p]]].append((i, -1, o, o + 1))
        ends_of[group[down[p]]].append((i, +1, o + n, o + n - 1))
    for (
        es
    ) in ends_of:  # a canonical order (by pipe name): sums at a node do not depend on numbering
        es.sort(key=lambda e: (kept_names[e[0]], e[1]))
    end_ptr = np.zeros(n_groups + 1, dtype=np.int64)
    end_ptr[1:] = np.cumsum([len(e) for e in ends_of])
    flat_ends = [e for es in ends_of for e in es]
    end_pipe = np.array([e[0] for e in flat_ends], dtype=np.int64)
    end_sign = np.array([e[1] for e in flat_ends], dtype=np.int64)
    end_section = np.array([e[2] for e in flat_ends], dtype=np.int64)
    end_neighbour = np.array([e[3] for e in flat_ends], dtype=np.int64)
    end_inv_b = 1.0 / b_coef[end_pipe]
    inv_sum = np.zeros(n_groups)
    for gi in range(n_groups):
        if end_ptr[gi + 1] == end_ptr[gi]:
            raise SimulationError(
                f"node {net.node_names[np.flatnonzero(group == gi)[0]]!r} is on no pipe"
            )
        inv_sum[gi] = end_inv_b[end_ptr[gi] : end_ptr[gi + 1]].sum()
    group_bs = 1.0 / inv_sum
    top = np.full(n_groups, -np.inf)
    np.maximum.at(top, group, elevation)
    group_vapour = top + vapour_offset if cavitation else np.full(n_groups, -1.0e6)
    fixed_head = np.zeros(n_groups)
    for gi, h in fixed.items():
        fixed_head[gi] = h

    # valves, grouped
    valves = list(net.valves)
    order = sorted(
        range(len(valves)),
        key=lambda k: (int(group[valves[k].node]), net.node_names[valves[k].node]),
    )
    valve_ptr = np.zeros(n_groups + 1, dtype=np.int64)
    for k in order:
        valve_ptr[group[valves[k].node] + 1] += 1
    valve_ptr = np.cumsum(valve_ptr)
    codes = [law_code(valves[k].law, valves[k].closure_time_s) for k in order]
    valve_drop = np.array(
        [head_g[group[valves[k].node]] - elevation[valves[k].node] for k in order], dtype=float
    )
    valve_flow = np.array([valves[k].initial_flow_m3_per_s for k in order], dtype=float)
    for j, k in enumerate(order):
        if valve_flow[j] > 0.0 and valve_drop[j] <= 0.0:
            raise SimulationError(
                f"valve at node {net.node_names[valves[k].node]!r}: the head at the node is not "
                "above "
                "the outlet once lumped pipes are merged; give a smaller time step"
            )

    # arrestors
    group_arrestor = np.full(n_groups, -1, dtype=np.int64)
    arrestors = list(net.arrestors)
    barometric = net.atmospheric_pa / (rho * g)
    c0 = np.empty(len(arrestors))
    vol0 = np.empty(len(arrestors))
    for j, a in enumerate(arrestors):
        gi = int(group[a.node])
        name = net.node_names[a.node]
        if group_kind[gi] == 1:
            raise SimulationError(f"arrestor at node {name!r}: the node has a constant head")
        if group_arrestor[gi] >= 0:
            raise SimulationError(f"arrestor at node {name!r}: a second arrestor at the same node")
        if not (a.gas_volume_m3 > 0.0 and a.gas_pressure_abs_pa > 0.0):
            raise SimulationError(
                f"arrestor at node {name!r}: gas volume {a.gas_volume_m3!r} m^3 and pressure "
                f"{a.gas_pressure_abs_pa!r} Pa; expected positive numbers"
            )
        if not (a.polytropic_exponent >= 1.0 and a.throat_loss_s2_per_m5 >= 0.0):
            raise SimulationError(
                f"arrestor at node {name!r}: polytropic exponent {a.polytropic_exponent!r} "
                f"(expected >= 1) or throat loss {a.throat_loss_s2_per_m5!r} (expected >= 0)"
            )
        group_arrestor[gi] = j
        line_abs = rho * g * (head_g[gi] - elevation[a.node]) + net.atmospheric_pa
        if line_abs <= 0.0:
            raise SimulationError(f"arrestor at node {name!r}: initial absolute pressure <= 0")
        vol0[j] = a.gas_volume_m3 * a.gas_pressure_abs_pa / line_abs
        c0[j] = line_abs / (rho * g) * vol0[j] ** a.polytropic_exponent
    for gi in range(n_groups):
        if group_kind[gi] == 0 and (valve_ptr[gi + 1] > valve_ptr[gi] or group_arrestor[gi] >= 0):
            group_kind[gi] = 2

    return Layout(
        head=head,
        scaled_flow=q,
        section_r_scaled=section_r,
        section_threshold=threshold,
        pipe_index=kept.astype(np.int64),
        offset=offset,
        reaches=reaches,
        b_coef=b_coef,
        r_coef=r_coef,
        vapour_head_start=hv_start,
        vapour_head_step=hv_step,
        area=area_k,
        reach_length=dx,
        node_group=group,
        group_count=n_groups,
        group_kind=group_kind,
        group_fixed_head=fixed_head,
        group_vapour_head=group_vapour,
        group_head=head_g,
        group_bs=group_bs,
        plain_count=n_plain,
        class_start=class_start,
        class_degree=class_degree.astype(np.int64),
        end_ptr=end_ptr,
        end_section=end_section,
        end_neighbour=end_neighbour,
        end_sign=end_sign,
        end_r_scaled=r_coef[end_pipe] / b_coef[end_pipe] ** 2,
        end_inv_b=end_inv_b,
        end_in=end_neighbour + np.where(end_sign < 0, total, 0),
        end_out=end_section + np.where(end_sign > 0, total, 0),
        end_sign_f=end_sign.astype(float),
        state0=np.concatenate(
            [head + q - section_r * q * np.abs(q), head - q + section_r * q * np.abs(q)]
        ),
        block_pipe=_blocks(offset, total),
        valve_ptr=valve_ptr.astype(np.int64),
        valve_order=np.array(order, dtype=np.int64),
        valve_flow0=valve_flow,
        valve_drop0=valve_drop,
        valve_elevation=np.array([elevation[valves[k].node] for k in order], dtype=float),
        valve_family=np.array([c[0] for c in codes], dtype=np.int64),
        valve_exponent=np.array([c[1] for c in codes], dtype=float),
        valve_closure=np.array([valves[k].closure_time_s for k in order], dtype=float),
        valve_start=np.array([valves[k].start_time_s for k in order], dtype=float),
        group_arrestor=group_arrestor,
        arrestor_c0=c0,
        arrestor_n=np.array([a.polytropic_exponent for a in arrestors], dtype=float),
        arrestor_k=np.array([a.throat_loss_s2_per_m5 for a in arrestors], dtype=float),
        arrestor_volume0=vol0,
        arrestor_elevation=np.array([elevation[a.node] for a in arrestors], dtype=float),
        barometric_head=barometric,
        lumped_names=tuple(net.pipe_names[p] for p in np.flatnonzero(grid.lumped)),
    )
