"""From a :class:`TransientNetwork` and a :class:`Grid` to the flat arrays the kernel runs on.

Layout (all pipes end to end): pipe ``i`` of the layout (network pipe ``pipe_index[i]``) owns
computing sections ``offset[i] .. offset[i] + N_i`` of the flat section arrays. The pipes are laid
out in depth-first preorder over the network, a pipe arriving at a node followed by one leaving it
where there is one: the two pipe-end sections of a two-pipe junction are then neighbours, and the
nodes, taken in order of their sections, run forward through memory. Consecutive pipes form blocks
of about :data:`BLOCK_SECTIONS` sections, which the kernel updates one at a time.

Nodes joined by lumped pipes are merged into one *group* (a union-find); each group has a list of
pipe ends (CSR: ``end_ptr``), in a canonical order (the arriving pipes' ends first, then the leaving
ones', each by pipe name), of valves (``valve_ptr``) and at most one arrestor. Groups are numbered:
the plain liquid junctions first, in seven classes (dead ends at a pipe's last section; at its
first; two-pipe junctions whose two pipe-end sections are neighbours; junctions of one arriving and
two leaving pipes; of one arriving and three leaving; of one arriving and more leaving; the others:
a tree laid out from its supply has none), within a class by their number of
pipe ends and then by their last section; then the groups holding a reservoir, valve or arrestor,
by the first of their nodes' names. Neither the pipe order nor the group numbers change a result:
every sum at a node runs over its pipe ends in the canonical order, the supplies' flows are summed
in the order of those names, and the sums over all pipes or groups run in network order.

The initial state is made exactly steady on the grid: group heads are rebuilt from the reservoir
heads and the pipes' friction losses on the grid (``N R Q|Q|``, with the friction coefficient the
kernel uses: ``R/B^2`` rounded to single precision, a relative change below 6e-8), and heads inside
a pipe fall by ``R Q|Q|`` per reach (Wylie & Streeter 1993, sec. 3.1: steady state as the initial
condition).

Input checks (each raises :class:`~knockproof.errors.SimulationError` naming the pipe or node):
finite and positive pipe data, node indices in range, initial heads consistent with the friction
losses (1 mm), flow continuity at every node, valve head drop consistent with the node head (1 mm).

:func:`build_layout` keeps the layouts it made (all but the arrestors' gas data) for reuse on the
same network and grid: ``check`` simulates each event bare and with arrestors, and sizes them by
simulating the same event with other gas volumes.
"""

from __future__ import annotations

from collections import OrderedDict
from dataclasses import dataclass, replace

import numpy as np

from knockproof.errors import SimulationError
from knockproof.transient.closure import law_code
from knockproof.transient.grid import Grid
from knockproof.transient.network import (
    GRAVITY_M_PER_S2,
    GasCushion,
    Reservoir,
    TransientNetwork,
    Valve,
    friction_head_loss_m,
    steady_heads,
)

HEAD_TOLERANCE_M = 1e-3
"""Allowed mismatch [m] between given initial heads and the friction losses (a chosen tolerance)."""


BLOCK_SECTIONS = 1024
"""Sections per block of consecutive pipes (about): the kernel looks for sections below their
vapour head block by block, against a bound of each block's own vapour heads."""


@dataclass(eq=False)
class Layout:
    """Flat arrays for the kernel (see the module docstring). Internal to the transient package."""

    # sections, in layout order
    section_count: int
    state0: np.ndarray  # C+ = H + q - R' q|q| of every section, then C- = H - q + R' q|q|
    section_r: np.ndarray  # R' = R/B^2 (float32), read by the kernel's flat loop
    # pipes (only the unlumped ones, in layout order)
    pipe_index: np.ndarray
    pipe_rank: np.ndarray  # layout index of each unlumped pipe, in network order
    offset: np.ndarray
    reaches: np.ndarray
    b_coef: np.ndarray
    r_scaled: np.ndarray
    vapour_head_start: np.ndarray
    vapour_head_step: np.ndarray
    block_pipe: np.ndarray  # first pipe of each block, then the number of pipes
    # groups
    node_group: np.ndarray
    group_count: int
    group_rank: np.ndarray  # group numbers in the order of the numbering the heads were built in
    group_kind: np.ndarray
    group_fixed_head: np.ndarray
    group_vapour_head: np.ndarray
    group_head: np.ndarray
    group_bs: np.ndarray
    plain_count: int
    node_classes: np.ndarray  # where the 2nd to 7th classes of plain junctions start
    end_ptr: np.ndarray
    end_section: np.ndarray
    end_sign_f: np.ndarray  # +1 at a pipe's last section, -1 at its first
    end_inv_b: np.ndarray
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
    supply0: float
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
        finite = np.isfinite(v)
        bad = ~finite
        if field_name in positive:
            bad |= v <= 0.0
        elif field_name == "pipe_friction_factor":
            bad |= v < 0.0
        elif field_name in ("pipe_upstream", "pipe_downstream"):
            bad |= ~((v >= 0) & (v < n_nodes))
        if bad.any():  # the first bad pipe, with the first of its checks that fails
            i = int(np.flatnonzero(bad)[0])
            if not finite[i]:
                raise SimulationError(
                    f"pipe {names[i]!r}: {field_name} is {v[i]!r}; expected a finite number"
                )
            if field_name in positive:
                raise SimulationError(
                    f"pipe {names[i]!r}: {field_name} is {v[i]!r}; expected a positive number"
                )
            if field_name == "pipe_friction_factor":
                raise SimulationError(
                    f"pipe {names[i]!r}: friction factor is {v[i]!r}; expected >= 0"
                )
            raise SimulationError(
                f"pipe {names[i]!r}: {field_name} is {v[i]!r}; expected a node index in "
                f"0..{n_nodes - 1}"
            )
        if field_name == "pipe_downstream":
            same = np.flatnonzero(np.asarray(net.pipe_upstream) == v)
            if same.size:
                raise SimulationError(f"pipe {names[same[0]]!r} joins a node to itself")
    placed: list[Reservoir | Valve | GasCushion] = [*net.reservoirs, *net.valves, *net.arrestors]
    for item in placed:
        if not (0 <= item.node < n_nodes):
            raise SimulationError(f"{item!r}: node index out of range 0..{n_nodes - 1}")


def _union_find_groups(n_nodes: int, up: np.ndarray, down: np.ndarray, lumped: np.ndarray):
    """Group of each node (nodes joined by lumped pipes share one) and the number of groups; the
    groups are numbered in order of their lowest node number."""
    which = np.flatnonzero(lumped)
    if which.size == 0:
        return np.arange(n_nodes, dtype=np.int64), n_nodes
    a, b = up[which], down[which]
    label = np.arange(n_nodes, dtype=np.int64)  # each node ends labelled by its group's lowest
    while True:
        low = np.minimum(label[a], label[b])
        new = label.copy()
        np.minimum.at(new, a, low)
        np.minimum.at(new, b, low)
        new = new[new]
        if np.array_equal(new, label):
            break
        label = new
    _, group = np.unique(label, return_inverse=True)
    return group.astype(np.int64), int(group.max()) + 1


def _preorder(n_groups: int, gup: list[int], gdown: list[int], root: int) -> np.ndarray:
    """Pipes in depth-first preorder from ``root``; at each node the pipes that start there come
    first, so a pipe arriving at a node is followed by one leaving it where there is one."""
    adjacency: list[list[int]] = [[] for _ in range(n_groups)]
    for p, u in enumerate(gup):  # pipes starting at a node before those ending there
        adjacency[u].append(p)
    for p, d in enumerate(gdown):
        adjacency[d].append(p)
    order: list[int] = []
    seen_pipe = [False] * len(gup)
    seen = [False] * n_groups
    for start in (root, *range(n_groups)):
        if seen[start]:
            continue
        seen[start] = True
        stack = [[start, 0]]
        while stack:
            top = stack[-1]
            g, i = top
            if i == len(adjacency[g]):
                stack.pop()
                continue
            top[1] = i + 1
            p = adjacency[g][i]
            if seen_pipe[p]:
                continue
            seen_pipe[p] = True
            order.append(p)
            other = gdown[p] if gup[p] == g else gup[p]
            if not seen[other]:
                seen[other] = True
                stack.append([other, 0])
    return np.array(order, dtype=np.int64)


def _initial_supply(net, group, group_kind, kept, valve_order, valve_flow) -> float:
    """Flow [m^3/s] out of the constant-head groups in the initial state, summed in network
    order: for each unlumped pipe its outflow then its inflow, then the valves at such groups."""
    fixed = group_kind == 1
    flow = np.asarray(net.pipe_initial_flow_m3_per_s, dtype=float)[kept]
    up = fixed[group[np.asarray(net.pipe_upstream)[kept]]]
    down = fixed[group[np.asarray(net.pipe_downstream)[kept]]]
    terms = np.column_stack([np.where(up, flow, 0.0), -np.where(down, flow, 0.0)]).ravel()
    at_fixed = [fixed[group[net.valves[k].node]] for k in valve_order]
    terms = np.concatenate([terms, np.asarray(valve_flow, dtype=float)[at_fixed]])
    return float(np.cumsum(terms)[-1]) if terms.size else 0.0


def _blocks(offset: np.ndarray) -> np.ndarray:
    """First pipe of each block of consecutive pipes (a new block starts at the first pipe past
    each multiple of :data:`BLOCK_SECTIONS` sections), then the number of pipes."""
    first = np.flatnonzero(np.diff(offset // BLOCK_SECTIONS, prepend=-1) > 0)
    return np.append(first, len(offset)).astype(np.int64)


def _sequential_sums(values: np.ndarray, ptr: np.ndarray) -> np.ndarray:
    """``values[ptr[i]:ptr[i+1]].sum()`` for every i, rounded as numpy rounds it."""
    count = np.diff(ptr)
    out = np.zeros(len(count))
    if len(count) and count.max() < 8:  # numpy sums fewer than 8 terms one by one, in order
        for j in range(int(count.max())):
            has = count > j
            out[has] += values[ptr[:-1][has] + j]
        return out
    for i in range(len(count)):
        out[i] = values[ptr[i] : ptr[i + 1]].sum()
    return out


SKELETON_CACHE_SIZE = 16
"""How many layouts :func:`build_layout` keeps for reuse (least recently used dropped first)."""

_SKELETONS: OrderedDict[tuple, Layout] = OrderedDict()


def _array_key(values) -> tuple:
    a = np.asarray(values)
    return (a.dtype.str, a.shape, a.tobytes())


def _skeleton_key(net: TransientNetwork, grid: Grid, cavitation: bool) -> tuple:
    """Everything a layout depends on but the arrestors' gas data (their nodes are in)."""
    return (
        net.node_names,
        net.pipe_names,
        *(
            _array_key(v)
            for v in (
                net.node_elevation_m,
                net.node_initial_head_m,
                net.pipe_upstream,
                net.pipe_downstream,
                net.pipe_length_m,
                net.pipe_diameter_m,
                net.pipe_wave_speed_m_per_s,
                net.pipe_friction_factor,
                net.pipe_initial_flow_m3_per_s,
                grid.reaches,
                grid.wave_speed_m_per_s,
                grid.lumped,
            )
        ),
        net.reservoirs,
        net.valves,
        tuple(a.node for a in net.arrestors),
        float(net.density_kg_m3),
        float(net.vapour_pressure_abs_pa),
        float(net.atmospheric_pa),
        bool(cavitation),
        BLOCK_SECTIONS,
    )


def build_layout(
    net: TransientNetwork, grid: Grid, *, cavitation: bool, checked: bool = False
) -> Layout:
    """Check the network (unless ``checked``: :func:`check_network` has passed) and lay it out.

    Everything but the arrestors' gas data is kept for the next call on the same network and grid
    (arrestor sizing simulates one event again and again with other gas volumes); the key is the
    content of the arrays, so a layout is reused only where it would come out the same.
    """
    if not checked:
        check_network(net)
    key = _skeleton_key(net, grid, cavitation)
    lay = _SKELETONS.get(key)
    if lay is None:
        lay = _build_layout(net, grid, cavitation)
        _SKELETONS[key] = lay
        while len(_SKELETONS) > SKELETON_CACHE_SIZE:
            _SKELETONS.popitem(last=False)
    else:
        _SKELETONS.move_to_end(key)
    return _with_arrestors(lay, net)


def _with_arrestors(lay: Layout, net: TransientNetwork) -> Layout:
    """The layout with the arrestors' gas data of ``net`` (checked; names the node)."""
    arrestors = list(net.arrestors)
    if not arrestors:
        return lay
    g = GRAVITY_M_PER_S2
    rho = float(net.density_kg_m3)
    elevation = np.asarray(net.node_elevation_m, dtype=float)
    c0 = np.empty(len(arrestors))
    vol0 = np.empty(len(arrestors))
    for ja, a in enumerate(arrestors):
        name = net.node_names[a.node]
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
        gi = int(lay.node_group[a.node])
        line_abs = rho * g * (lay.group_head[gi] - elevation[a.node]) + net.atmospheric_pa
        if line_abs <= 0.0:
            raise SimulationError(f"arrestor at node {name!r}: initial absolute pressure <= 0")
        vol0[ja] = a.gas_volume_m3 * a.gas_pressure_abs_pa / line_abs
        c0[ja] = line_abs / (rho * g) * vol0[ja] ** a.polytropic_exponent
    return replace(
        lay,
        arrestor_c0=c0,
        arrestor_n=np.array([a.polytropic_exponent for a in arrestors], dtype=float),
        arrestor_k=np.array([a.throat_loss_s2_per_m5 for a in arrestors], dtype=float),
        arrestor_volume0=vol0,
    )


def _build_layout(net: TransientNetwork, grid: Grid, cavitation: bool) -> Layout:
    """The layout, with the arrestors' nodes but not their gas data (see :func:`build_layout`)."""
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

    # groups of nodes joined by lumped pipes; first numbered as the heads are computed (the walk
    # that rebuilds the steady heads depends on it), renumbered for the kernel further down
    group, n_groups = _union_find_groups(n_nodes, up, down, grid.lumped)
    kept = np.flatnonzero(~grid.lumped)
    special = np.zeros(n_groups, dtype=bool)
    for at_node in (
        [x.node for x in net.reservoirs]
        + [x.node for x in net.valves]
        + [x.node for x in net.arrestors]
    ):
        special[group[at_node]] = True
    degree = np.bincount(group[up[kept]], minlength=n_groups) + np.bincount(
        group[down[kept]], minlength=n_groups
    )
    rank = np.empty(n_groups, dtype=np.int64)
    rank[np.lexsort((degree, special))] = np.arange(n_groups)
    group = rank[group]
    degree = degree[np.argsort(rank)]
    special = special[np.argsort(rank)]
    n_plain = int((~special).sum())
    fixed: dict[int, float] = {}
    for r in net.reservoirs:
        gi = int(group[r.node])
        if gi in fixed and abs(fixed[gi] - r.head_m) > HEAD_TOLERANCE_M:
            raise SimulationError(
                f"node {net.node_names[r.node]!r}: two constant-head nodes with different heads "
                "are "
                "joined (directly or through a lumped pipe)"
            )
        fixed[gi] = float(r.head_m)
    names = net.pipe_names
    kept_names = names if len(kept) == len(names) else tuple(names[p] for p in kept.tolist())
    gup0, gdown0 = group[up[kept]], group[down[kept]]
    # friction coefficients on the grid: R' = R/B^2 per kept pipe, rounded to single precision
    # (relative change below 6e-8, far inside the friction factor's own uncertainty) and used so
    # everywhere, so that the kernel's flat loop reads it as a float32 stream; the group heads are
    # rebuilt with the same coefficients, so that the initial state is exactly steady on the grid
    reaches_k = grid.reaches[kept].astype(np.int64)
    area_kept = area[kept]
    b_kept = grid.wave_speed_m_per_s[kept] / (g * area_kept)
    r_kept = friction[kept] * (length[kept] / reaches_k) / (2.0 * g * diameter[kept] * area_kept**2)
    r_scaled_kept = (r_kept / b_kept**2).astype(np.float32).astype(np.float64)
    r_coef_kept = r_scaled_kept * b_kept**2
    grid_loss = reaches_k * r_coef_kept * flow[kept] * np.abs(flow[kept])
    head_g = steady_heads(
        n_groups,
        gup0,
        gdown0,
        grid_loss,
        fixed,
        pipe_names=kept_names,
        tolerance_m=HEAD_TOLERANCE_M,
    )
    while np.isnan(head_g).any():  # a part of the network without a reservoir: trust given heads
        missing = int(np.flatnonzero(np.isnan(head_g))[0])
        member = int(np.flatnonzero(group == missing)[0])
        extra = {int(i): float(head_g[i]) for i in np.flatnonzero(~np.isnan(head_g))}
        extra[missing] = float(given_head[member])
        head_g = steady_heads(
            n_groups,
            gup0,
            gdown0,
            grid_loss,
            {**extra, **fixed},
            pipe_names=kept_names,
            tolerance_m=HEAD_TOLERANCE_M,
        )

    # layout order of the pipes; final group numbers (see the module docstring)
    root = int(group[net.reservoirs[0].node]) if net.reservoirs else 0
    order = _preorder(n_groups, gup0.tolist(), gdown0.tolist(), root)
    lay_pipe = kept[order]
    n_kept = len(kept)
    reaches = grid.reaches[lay_pipe].astype(np.int64)
    offset = np.zeros(n_kept, dtype=np.int64)
    offset[1:] = np.cumsum(reaches + 1)[:-1]
    total = int((reaches + 1).sum())
    block_pipe = _blocks(offset)
    # pipe ends (pipe in layout order, -1 at its first section, +1 at its last), by group
    e_pipe = np.repeat(np.arange(n_kept), 2)
    e_sign = np.tile(np.array([-1, 1], dtype=np.int64), n_kept)
    e_group = np.where(e_sign < 0, gup0[order][e_pipe], gdown0[order][e_pipe])
    e_section = np.where(e_sign < 0, offset[e_pipe], offset[e_pipe] + reaches[e_pipe])
    by_group = np.argsort(e_group, kind="stable")
    first_end = np.searchsorted(e_group[by_group], np.arange(n_groups))
    one = by_group[first_end.clip(max=2 * n_kept - 1)]
    two = by_group[(first_end + 1).clip(max=2 * n_kept - 1)]
    plus = np.where(e_sign[one] > 0, one, two)
    minus = np.where(e_sign[one] > 0, two, one)
    arriving = np.bincount(e_group[e_sign > 0], minlength=n_groups)
    kind = np.full(n_groups, 6, dtype=np.int64)  # other plain junctions
    kind[(degree == 1) & (e_sign[one] > 0)] = 0  # dead end at a pipe's last section
    kind[(degree == 1) & (e_sign[one] < 0)] = 1  # dead end at a pipe's first section
    kind[
        (degree == 2) & (e_sign[one] != e_sign[two]) & (e_section[minus] == e_section[plus] + 1)
    ] = 2  # two-pipe junction whose two pipe-end sections are neighbours
    kind[(degree == 3) & (arriving == 1)] = 3  # one pipe arriving, two leaving
    kind[(degree == 4) & (arriving == 1)] = 4  # one pipe arriving, three leaving
    kind[(degree > 4) & (arriving == 1)] = 5  # one pipe arriving, more leaving
    kind[special] = 7
    # within a class, plain groups by their number of pipe ends (so that the kernel's loops over
    # them run the same number of times from one group to the next), then in the order of their
    # last section (memory order)
    last_section = np.zeros(n_groups, dtype=np.int64)
    last_section[e_group[by_group]] = e_section[by_group]  # ends of a group: sections increase
    second = degree * (total + 1) + last_section
    # the reservoirs, valves and arrestors by the first of their nodes' names (the kernel sums the
    # supplies' flows in this order: it must not depend on the node numbering)
    name_rank_node = np.empty(n_nodes, dtype=np.int64)
    name_rank_node[sorted(range(n_nodes), key=net.node_names.__getitem__)] = np.arange(n_nodes)
    first_name = np.full(n_groups, n_nodes, dtype=np.int64)
    np.minimum.at(first_name, group, name_rank_node)
    second[special] = first_name[special]
    renumber = np.empty(n_groups, dtype=np.int64)
    renumber[np.lexsort((second, kind))] = np.arange(n_groups)
    old_of_new = np.argsort(renumber)
    group = renumber[group]
    degree = degree[old_of_new]
    head_g = head_g[old_of_new]
    kind = kind[old_of_new]
    fixed = {int(renumber[k]): h for k, h in fixed.items()}
    node_classes = np.searchsorted(kind, [1, 2, 3, 4, 5, 6]).astype(np.int64)
    group_kind = np.zeros(n_groups, dtype=np.int64)
    fixed_head = np.zeros(n_groups)
    for gi, h in fixed.items():
        group_kind[gi] = 1
        fixed_head[gi] = h

    # sections
    gup = group[up[lay_pipe]]
    a_used = grid.wave_speed_m_per_s[lay_pipe]
    area_k = area[lay_pipe]
    b_coef = a_used / (g * area_k)
    r_coef = r_coef_kept[order]  # rounded as above
    r_scaled = r_scaled_kept[order]
    counts = reaches + 1
    owner = np.repeat(np.arange(n_kept), counts)
    j = np.arange(total) - offset[owner]
    q0 = flow[lay_pipe][owner]
    head = head_g[gup][owner] - j * r_coef[owner] * q0 * np.abs(q0)
    q = q0 * b_coef[owner]
    vapour_offset = (net.vapour_pressure_abs_pa - net.atmospheric_pa) / (rho * g)
    z0, z1 = elevation[up[lay_pipe]], elevation[down[lay_pipe]]
    hv_start = z0 + vapour_offset
    hv_step = (z1 - z0) / reaches
    section_r = r_scaled[owner]
    friction_term = section_r * q * np.abs(q)
    state0 = np.concatenate([head + q - friction_term, head - q + friction_term])

    # groups: pipe ends, in a canonical order at each node: the arriving pipes' ends (their last
    # sections) first, then the leaving ones', each by pipe name (the kernel's written-out
    # junctions of classes 2 to 4 expect the arriving end first)
    name_rank = np.empty(n_kept, dtype=np.int64)
    name_rank[sorted(range(n_kept), key=kept_names.__getitem__)] = np.arange(n_kept)
    e_group = group[np.where(e_sign < 0, up[lay_pipe][e_pipe], down[lay_pipe][e_pipe])]
    kept_pos = order[e_pipe]
    e_pos = np.lexsort((kept_pos, name_rank[kept_pos], -e_sign, e_group))
    e_pipe, e_sign, e_group = e_pipe[e_pos], e_sign[e_pos], e_group[e_pos]
    end_section = np.where(e_sign < 0, offset[e_pipe], offset[e_pipe] + reaches[e_pipe])
    end_ptr = np.zeros(n_groups + 1, dtype=np.int64)
    np.add.at(end_ptr, e_group + 1, 1)
    end_ptr = np.cumsum(end_ptr)
    empty = np.flatnonzero(end_ptr[1:] == end_ptr[:-1])
    if empty.size:
        raise SimulationError(
            f"node {net.node_names[np.flatnonzero(group == empty[0])[0]]!r} is on no pipe"
        )
    end_inv_b = 1.0 / b_coef[e_pipe]
    group_bs = 1.0 / _sequential_sums(end_inv_b, end_ptr)
    top = np.full(n_groups, -np.inf)
    np.maximum.at(top, group, elevation)
    group_vapour = top + vapour_offset if cavitation else np.full(n_groups, -1.0e6)

    # valves, grouped
    valves = list(net.valves)
    order_v = sorted(
        range(len(valves)),
        key=lambda k: (int(group[valves[k].node]), net.node_names[valves[k].node]),
    )
    valve_ptr = np.zeros(n_groups + 1, dtype=np.int64)
    for k in order_v:
        valve_ptr[group[valves[k].node] + 1] += 1
    valve_ptr = np.cumsum(valve_ptr)
    codes = [law_code(valves[k].law, valves[k].closure_time_s) for k in order_v]
    valve_drop = np.array(
        [head_g[group[valves[k].node]] - elevation[valves[k].node] for k in order_v], dtype=float
    )
    valve_flow = np.array([valves[k].initial_flow_m3_per_s for k in order_v], dtype=float)
    for jv, k in enumerate(order_v):
        if valve_flow[jv] > 0.0 and valve_drop[jv] <= 0.0:
            raise SimulationError(
                f"valve at node {net.node_names[valves[k].node]!r}: the head at the node is not "
                "above "
                "the outlet once lumped pipes are merged; give a smaller time step"
            )

    # arrestors (their gas data: _with_arrestors)
    group_arrestor = np.full(n_groups, -1, dtype=np.int64)
    arrestors = list(net.arrestors)
    barometric = net.atmospheric_pa / (rho * g)
    for ja, a in enumerate(arrestors):
        gi = int(group[a.node])
        name = net.node_names[a.node]
        if group_kind[gi] == 1:
            raise SimulationError(f"arrestor at node {name!r}: the node has a constant head")
        if group_arrestor[gi] >= 0:
            raise SimulationError(f"arrestor at node {name!r}: a second arrestor at the same node")
        group_arrestor[gi] = ja
    group_kind[(group_kind == 0) & ((np.diff(valve_ptr) > 0) | (group_arrestor >= 0))] = 2

    return Layout(
        section_count=total,
        state0=state0,
        section_r=section_r.astype(np.float32),  # exact: rounded to single precision above
        pipe_index=lay_pipe.astype(np.int64),
        pipe_rank=np.argsort(order),
        offset=offset,
        reaches=reaches,
        b_coef=b_coef,
        r_scaled=r_scaled,
        vapour_head_start=hv_start,
        vapour_head_step=hv_step,
        block_pipe=block_pipe,
        node_group=group,
        group_count=n_groups,
        group_rank=renumber,
        group_kind=group_kind,
        group_fixed_head=fixed_head,
        group_vapour_head=group_vapour,
        group_head=head_g,
        group_bs=group_bs,
        plain_count=n_plain,
        node_classes=node_classes,
        end_ptr=end_ptr,
        end_section=end_section,
        end_inv_b=end_inv_b,
        end_sign_f=e_sign.astype(float),
        valve_ptr=valve_ptr.astype(np.int64),
        valve_order=np.array(order_v, dtype=np.int64),
        valve_flow0=valve_flow,
        valve_drop0=valve_drop,
        valve_elevation=np.array([elevation[valves[k].node] for k in order_v], dtype=float),
        valve_family=np.array([c[0] for c in codes], dtype=np.int64),
        valve_exponent=np.array([c[1] for c in codes], dtype=float),
        valve_closure=np.array([valves[k].closure_time_s for k in order_v], dtype=float),
        valve_start=np.array([valves[k].start_time_s for k in order_v], dtype=float),
        group_arrestor=group_arrestor,
        arrestor_c0=np.zeros(len(arrestors)),
        arrestor_n=np.zeros(len(arrestors)),
        arrestor_k=np.zeros(len(arrestors)),
        arrestor_volume0=np.zeros(len(arrestors)),
        arrestor_elevation=np.array([elevation[a.node] for a in arrestors], dtype=float),
        barometric_head=barometric,
        supply0=_initial_supply(net, group, group_kind, kept, order_v, valve_flow),
        lumped_names=tuple(net.pipe_names[p] for p in np.flatnonzero(grid.lumped)),
    )
