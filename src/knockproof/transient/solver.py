"""Run a transient (water-hammer) simulation on a :class:`TransientNetwork`.

Method: the method of characteristics on a fixed grid with Courant number 1 in every pipe (Wylie &
Streeter, *Fluid Transients in Systems*, 1993, ch. 3; Chaudhry, *Applied Hydraulic Transients*,
2014, ch. 3), quasi-steady friction, and the discrete vapour-cavity model for column separation
(Wylie & Streeter 1993, sec. 8.4; Chaudhry 2014, ch. 11). The grid rules are in
:mod:`knockproof.transient.grid`, the node equations in :mod:`knockproof.transient.kernel`.

Reporting peaks around cavities: the first cavity collapse anywhere in the network splits the run in
two. ``node_first_peak_pressure_pa`` is each node's maximum before it (the first-cycle,
Joukowsky-type peak); ``node_collapse_peak_pressure_pa`` is its maximum from that step on (the
collapse peak). Only the first cavity cycle is a reliable figure: with friction, cavities along a
pipe form and collapse in ways that depend on the grid, so later peaks are indicative (Wylie &
Streeter 1993, sec. 8.4 discuss the model's spurious pressure spikes; Chaudhry 2014, ch. 11).

numba is imported only when :func:`simulate` runs. The grid and the layout of the last networks
simulated are kept (keyed by their content: :data:`GRID_CACHE_SIZE`,
:data:`~knockproof.transient.assembly.SKELETON_CACHE_SIZE`): ``check`` simulates the same event
bare, with arrestors and with other gas volumes, and the per-call setup then costs little.
"""

from __future__ import annotations

import heapq
import time
from collections import OrderedDict
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np

from knockproof.errors import SimulationError
from knockproof.transient.assembly import build_layout, check_network
from knockproof.transient.grid import Grid, choose_grid
from knockproof.transient.network import GRAVITY_M_PER_S2, TransientNetwork

CAVITY_WEIGHT = 1.0
"""``psi`` of the DVCM volume update: 1 weights the new flows fully (from memory: usual choice)."""

ROUND_TRIPS_IN_DEFAULT_DURATION = 20
""":func:`default_duration_s` runs this many valve-to-supply round trips after the last closure."""


@dataclass(frozen=True, eq=False)
class TransientResult:
    """What a simulation found. Arrays are indexed like the network's nodes or pipes.

    Attributes
    ----------
    time_step_s : float
        Global time step [s].
    duration_s : float
        Simulated time [s] (``steps * time_step_s``, the requested duration rounded up).
    steps : int
        Number of time steps.
    reaches_per_pipe : np.ndarray
        Reaches per pipe (0 for a lumped pipe).
    wave_speed_used_m_per_s : np.ndarray
        Wave speed per pipe after the grid adjustment [m/s].
    largest_wave_speed_adjustment : float
        Largest ``|a'/a - 1|`` over the pipes [-].
    node_max_head_m, node_min_head_m : np.ndarray
        Highest and lowest piezometric head at each node over the run [m], initial state included.
    node_max_pressure_pa, node_min_pressure_pa : np.ndarray
        Highest and lowest gauge pressure at each node [Pa].
    node_first_peak_pressure_pa : np.ndarray
        Highest gauge pressure [Pa] up to and including the step of the first cavity collapse in the
        network (the whole run if none collapses).
    node_collapse_peak_pressure_pa : np.ndarray
        Highest gauge pressure [Pa] from the step after the first cavity collapse on; NaN if no
        cavity collapsed.
    first_collapse_time_s : float
        Time of the first cavity collapse [s]; NaN if none.
    cavity_collapses : int
        Number of cavity collapses (nodes and sections).
    node_cavity : np.ndarray
        True where a vapour cavity formed at the node itself, or at an interior computing section in
        the half of an attached pipe nearer to this node.
    pipe_cavity : np.ndarray
        True where a vapour cavity formed at an interior computing section of the pipe.
    times_s : np.ndarray
        Times of the recorded traces [s].
    traces_pressure_pa : dict[int, np.ndarray]
        Gauge pressure [Pa] against ``times_s`` at each recorded node.
    lumped_pipes : tuple[str, ...]
        Names of the pipes lumped into their end nodes.
    final_pipe_head_m : dict[str, np.ndarray]
        Head [m] at the computing sections of each unlumped pipe at the end of the run, upstream
        first. stats : dict
        Figures about the run: ``sections``, ``node_updates``, ``kernel_seconds``,
        ``setup_seconds``,
        ``supply_volume_m3`` (volume delivered by the constant-head nodes), ``valve_volume_m3``
        (per valve, network order), ``cavity_volume_m3`` (left at the end),
        ``max_cavity_volume_m3``,
        ``gas_volume_initial_m3`` and ``gas_volume_final_m3`` (per arrestor, network order),
        ``friction_number`` (the largest ``R'|q| = f dt V/(2 D)`` per reach at the initial flows:
        the explicit friction term is accurate while it is small, about 0.002 in building piping at
        1 ms; results are not to be trusted near 1/2).
    """

    time_step_s: float
    duration_s: float
    steps: int
    reaches_per_pipe: np.ndarray
    wave_speed_used_m_per_s: np.ndarray
    largest_wave_speed_adjustment: float
    node_max_head_m: np.ndarray
    node_min_head_m: np.ndarray
    node_max_pressure_pa: np.ndarray
    node_min_pressure_pa: np.ndarray
    node_first_peak_pressure_pa: np.ndarray
    node_collapse_peak_pressure_pa: np.ndarray
    first_collapse_time_s: float
    cavity_collapses: int
    node_cavity: np.ndarray
    pipe_cavity: np.ndarray
    times_s: np.ndarray
    traces_pressure_pa: dict[int, np.ndarray]
    lumped_pipes: tuple[str, ...]
    final_pipe_head_m: dict[str, np.ndarray] = field(repr=False)
    stats: dict[str, object] = field(repr=False)


def default_duration_s(network: TransientNetwork) -> float:
    """A run length [s] that covers the closures and the first cavity cycles.

    The last valve's end of closure plus :data:`ROUND_TRIPS_IN_DEFAULT_DURATION` round trips ``2T``,
    where ``T`` is the largest acoustic travel time from a valve to its nearest constant-head node
    (shortest path by ``L/a``). A chosen rule, not a published one.
    """
    travel = np.asarray(network.pipe_length_m, float) / np.asarray(
        network.pipe_wave_speed_m_per_s, float
    )
    adjacency: list[list[tuple[int, float]]] = [[] for _ in range(network.n_nodes)]
    for p, (u, d) in enumerate(zip(network.pipe_upstream, network.pipe_downstream, strict=True)):
        adjacency[int(u)].append((int(d), float(travel[p])))
        adjacency[int(d)].append((int(u), float(travel[p])))
    best = np.full(network.n_nodes, np.inf)
    queue = [(0.0, r.node) for r in network.reservoirs]
    for _, n in queue:
        best[n] = 0.0
    heapq.heapify(queue)
    while queue:
        d, n = heapq.heappop(queue)
        if d > best[n]:
            continue
        for m, w in adjacency[n]:
            if d + w < best[m]:
                best[m] = d + w
                heapq.heappush(queue, (d + w, m))
    far = max((best[v.node] for v in network.valves if np.isfinite(best[v.node])), default=0.0)
    if far == 0.0:
        far = float(travel.sum())
    end = max((v.start_time_s + v.closure_time_s for v in network.valves), default=0.0)
    return float(end + ROUND_TRIPS_IN_DEFAULT_DURATION * 2.0 * far)


def simulate(
    network: TransientNetwork,
    duration_s: float,
    *,
    time_step_s: float | None = None,
    record_nodes: Sequence[int] = (),
    cavitation: bool = True,
    max_wave_speed_adjustment: float = 0.10,
    percentile: float = 10.0,
    lump_ratio: float = 0.5,
    max_refinement: float = 16.0,
    record_every: int = 1,
) -> TransientResult:
    """Simulate the network from its steady state for ``duration_s`` seconds.

    Parameters
    ----------
    network : TransientNetwork
        The network, in its steady initial state.
    duration_s : float
        Simulated time [s]; rounded up to whole steps. :func:`default_duration_s` suggests one.
    time_step_s : float, optional
        Target time step [s]; default from the pipes' travel times (see :func:`choose_grid`).
    record_nodes : sequence of int
        Nodes whose pressure history is returned in ``traces_pressure_pa``.
    cavitation : bool
        Model vapour cavities (DVCM). Without it the head may fall below vapour pressure.
    max_wave_speed_adjustment, percentile, lump_ratio, max_refinement :
        Grid rules, see :func:`knockproof.transient.grid.choose_grid`.
    record_every : int
        Keep every ``record_every``-th step in the traces.

    Chains of short pipes in series are merged into longer pipes first (unless ``lump_ratio`` is 0:
    nothing lumped, nothing merged); results are told on the given network
    (:mod:`knockproof.transient.series`).

    Raises
    ------
    SimulationError
        Bad input (names the pipe or node), a grid that cannot be built, or a state that becomes
        non-finite during the run (names the pipe).
    """
    check_network(network)
    for n in record_nodes:
        if not (0 <= int(n) < network.n_nodes):
            raise SimulationError(f"record node {n} out of range 0..{network.n_nodes - 1}")
    if lump_ratio > 0.0:
        # chains of short pipes in series become longer pipes (knockproof.transient.series)
        from knockproof.transient.series import expand_result, merge_series

        travel = np.asarray(network.pipe_length_m, float) / np.asarray(
            network.pipe_wave_speed_m_per_s, float
        )
        target = (
            float(np.percentile(travel, percentile)) if time_step_s is None else time_step_s
        )
        merged = merge_series(network, target, lump_ratio, {int(n) for n in record_nodes})
        if merged is not None:
            reduced, how = merged
            record = [int(how.node_new[int(n)]) for n in record_nodes]
            result = _simulate(
                reduced, duration_s, target, record, cavitation, max_wave_speed_adjustment,
                percentile, lump_ratio, max_refinement, record_every, how.watch,
            )  # fmt: skip
            return expand_result(result, how, network, reduced)
    return _simulate(
        network, duration_s, time_step_s, record_nodes, cavitation, max_wave_speed_adjustment,
        percentile, lump_ratio, max_refinement, record_every,
    )  # fmt: skip


def _simulate(
    network: TransientNetwork,
    duration_s: float,
    time_step_s: float | None,
    record_nodes: Sequence[int],
    cavitation: bool,
    max_wave_speed_adjustment: float,
    percentile: float,
    lump_ratio: float,
    max_refinement: float,
    record_every: int,
    watch: Sequence[tuple[int, float]] = (),
) -> TransientResult:
    """:func:`simulate` on a checked network, no series merging; ``watch`` (pipe, distance [m]
    from its upstream end) are places inside pipes whose head envelope goes to ``stats``
    (``watch_max_first_head_m``, ``watch_max_after_head_m``, ``watch_min_head_m``)."""
    from knockproof.transient import kernel  # deferred: numba loads only here

    started = time.perf_counter()
    if not (np.isfinite(duration_s) and duration_s > 0.0):
        raise SimulationError(
            f"duration must be a positive number of seconds; found {duration_s!r}"
        )
    grid = _grid(
        network, time_step_s, percentile, lump_ratio, max_wave_speed_adjustment, max_refinement
    )
    lay = build_layout(network, grid, cavitation=cavitation, checked=True)
    dt = grid.time_step_s
    steps = max(1, int(np.ceil(duration_s / dt - 1e-9)))
    record = [int(n) for n in record_nodes]
    for n in record:
        if not (0 <= n < network.n_nodes):
            raise SimulationError(f"record node {n} out of range 0..{network.n_nodes - 1}")
    record_every = max(1, int(record_every))
    rec_groups = (
        lay.node_group[np.array(record, dtype=np.int64)] if record else np.zeros(0, dtype=np.int64)
    )
    rows = steps // record_every + 1
    rec_out = np.zeros((rows, len(record)))
    n_groups = lay.group_count
    gmax_first = np.zeros(n_groups)
    gmax_after = np.zeros(n_groups)
    gmin = np.zeros(n_groups)
    gcav = np.zeros(n_groups, dtype=np.bool_)
    n_kept = len(lay.pipe_index)
    cav_up = np.zeros(n_kept, dtype=np.bool_)
    cav_dn = np.zeros(n_kept, dtype=np.bool_)
    vvol = np.zeros(len(lay.valve_flow0))
    acc = np.zeros(4)
    acc[kernel.ACC_SUPPLY] = lay.supply0
    stats = np.zeros(8, dtype=np.int64)
    layout_of = np.full(network.n_pipes, -1, dtype=np.int64)
    layout_of[lay.pipe_index] = np.arange(len(lay.pipe_index))
    watch_kept = np.array([layout_of[p] >= 0 for p, _ in watch], dtype=bool)
    seen = [(int(layout_of[p]), p, x) for p, x in watch if layout_of[p] >= 0]
    wpipe = np.array([i for i, _, _ in seen], dtype=np.int64)
    wsec = np.array(
        [
            lay.offset[i] + int(round(lay.reaches[i] * x / float(network.pipe_length_m[p])))
            for i, p, x in seen
        ],
        dtype=np.int64,
    )
    wmax_first = np.zeros(len(seen))
    wmax_after = np.zeros(len(seen))
    wmin = np.zeros(len(seen))
    setup_seconds = time.perf_counter() - started

    started = time.perf_counter()
    final_head, gas_final, cavity_left = kernel.run(
        steps, dt, CAVITY_WEIGHT, cavitation,
        lay.state0,
        lay.offset, lay.reaches, lay.b_coef, lay.r_scaled,
        lay.vapour_head_start, lay.vapour_head_step, lay.section_r,
        lay.block_pipe, lay.pipe_rank,
        lay.plain_count, lay.node_classes,
        lay.group_kind, lay.group_fixed_head, lay.group_vapour_head, lay.group_bs, lay.group_head,
        lay.group_rank,
        lay.end_ptr, lay.end_sign_f, lay.end_inv_b, lay.end_section,
        lay.valve_ptr, lay.valve_flow0, lay.valve_drop0, lay.valve_elevation,
        lay.valve_family, lay.valve_exponent, lay.valve_closure, lay.valve_start,
        lay.group_arrestor, lay.arrestor_c0, lay.arrestor_n, lay.arrestor_k,
        lay.arrestor_elevation, lay.arrestor_volume0, lay.barometric_head,
        rec_groups, record_every,
        rec_out, wsec, wpipe, wmax_first, wmax_after, wmin,
        gmax_first, gmax_after, gmin, gcav, cav_up, cav_dn, vvol, acc, stats,
    )  # fmt: skip
    kernel_seconds = time.perf_counter() - started

    status = int(stats[kernel.ST_STATUS])
    if status != kernel.STATUS_OK:
        when = int(stats[kernel.ST_STEP]) * dt
        where = int(stats[kernel.ST_WHERE])
        if status == kernel.STATUS_PIPE_NONFINITE:
            name = network.pipe_names[lay.pipe_index[where]]
            raise SimulationError(
                f"pipe {name!r}: the head became non-finite or beyond {kernel.HEAD_LIMIT_M:g} m at "
                f"t = {when:.6g} s (numerical blow-up; check friction factor and time step)"
            )
        nodes = np.flatnonzero(lay.node_group == where)
        node_name = network.node_names[nodes[0]]
        e = int(lay.end_ptr[where])
        pipe_name = _pipe_at_end(lay, e, network)
        if status == kernel.STATUS_NODE_NONFINITE:
            raise SimulationError(
                f"pipe {pipe_name!r}: the head at its end node {node_name!r} became non-finite or "
                f"beyond {kernel.HEAD_LIMIT_M:g} m at t = {when:.6g} s (numerical blow-up)"
            )
        raise SimulationError(
            f"pipe {pipe_name!r}: the arrestor at its end node {node_name!r} did not converge at "
            f"t = {when:.6g} s"
        )

    rho_g = network.density_kg_m3 * GRAVITY_M_PER_S2
    z = np.asarray(network.node_elevation_m, float)
    group = lay.node_group
    max_first = gmax_first[group]
    collapse_step = int(stats[kernel.ST_FIRST_COLLAPSE])
    max_after = gmax_after[group] if collapse_step >= 0 else np.full(network.n_nodes, np.nan)
    max_head = np.fmax(max_first, max_after)
    min_head = gmin[group]

    node_cavity = gcav[group].copy()
    pipe_cavity = np.zeros(network.n_pipes, dtype=bool)
    pipe_cavity[lay.pipe_index] = cav_up | cav_dn
    node_cavity[np.asarray(network.pipe_upstream)[lay.pipe_index[cav_up]]] = True
    node_cavity[np.asarray(network.pipe_downstream)[lay.pipe_index[cav_dn]]] = True

    times = np.arange(rows) * dt * record_every
    traces = {n: rho_g * (rec_out[:, j] - z[n]) for j, n in enumerate(record)}
    ends = (lay.offset + lay.reaches + 1).tolist()
    starts = lay.offset.tolist()
    names = network.pipe_names
    final_pipe_head = {  # views of the kernel's own fresh array
        names[p]: final_head[starts[i] : ends[i]]
        for i, p in zip(lay.pipe_rank.tolist(), np.sort(lay.pipe_index).tolist(), strict=True)
    }
    valve_volume = np.zeros(len(network.valves))
    valve_volume[lay.valve_order] = vvol
    sections = lay.section_count
    # R'|q| per reach at the initial flows (= f dt V / (2 D)): the explicit friction term is
    # accurate while it is small (and the cavity pass needs it under 1/2, see kernel._arrived)
    q0 = np.abs(np.asarray(network.pipe_initial_flow_m3_per_s, float)[lay.pipe_index])
    friction_number = float((lay.r_scaled * lay.b_coef * q0).max(initial=0.0))
    return TransientResult(
        time_step_s=dt,
        duration_s=steps * dt,
        steps=steps,
        reaches_per_pipe=grid.reaches.copy(),
        wave_speed_used_m_per_s=grid.wave_speed_m_per_s.copy(),
        largest_wave_speed_adjustment=grid.largest_wave_speed_adjustment,
        node_max_head_m=max_head,
        node_min_head_m=min_head,
        node_max_pressure_pa=rho_g * (max_head - z),
        node_min_pressure_pa=rho_g * (min_head - z),
        node_first_peak_pressure_pa=rho_g * (max_first - z),
        node_collapse_peak_pressure_pa=rho_g * (max_after - z),
        first_collapse_time_s=collapse_step * dt if collapse_step >= 0 else float("nan"),
        cavity_collapses=int(stats[kernel.ST_COLLAPSES]),
        node_cavity=node_cavity,
        pipe_cavity=pipe_cavity,
        times_s=times,
        traces_pressure_pa=traces,
        lumped_pipes=lay.lumped_names,
        final_pipe_head_m=final_pipe_head,
        stats={
            "sections": sections,
            "node_updates": sections * steps,
            "kernel_seconds": kernel_seconds,
            "setup_seconds": setup_seconds,
            "supply_volume_m3": float(acc[kernel.ACC_SUPPLY_VOLUME]),
            "valve_volume_m3": valve_volume,
            "cavity_volume_m3": float(cavity_left),
            "max_cavity_volume_m3": float(acc[kernel.ACC_MAX_CAVITY]),
            "gas_volume_initial_m3": lay.arrestor_volume0.copy(),
            "gas_volume_final_m3": np.asarray(gas_final).copy(),
            "friction_number": friction_number,
            # per watched place (NaN where its pipe was lumped)
            "watch_max_first_head_m": _per_watch(watch_kept, wmax_first),
            "watch_max_after_head_m": _per_watch(watch_kept, wmax_after),
            "watch_min_head_m": _per_watch(watch_kept, wmin),
        },
    )


def _per_watch(kept: np.ndarray, values: np.ndarray) -> np.ndarray:
    out = np.full(len(kept), np.nan)
    out[kept] = values
    return out


GRID_CACHE_SIZE = 64
"""How many grids :func:`simulate` keeps for reuse (least recently used dropped first)."""

_GRIDS: OrderedDict[tuple, Grid] = OrderedDict()


def _grid(
    network: TransientNetwork,
    time_step_s: float | None,
    percentile: float,
    lump_ratio: float,
    max_wave_speed_adjustment: float,
    max_refinement: float,
) -> Grid:
    """:func:`choose_grid` for the network, kept for the next call with the same pipes and rules
    (the grid depends on nothing else)."""
    length = np.asarray(network.pipe_length_m, dtype=float)
    speed = np.asarray(network.pipe_wave_speed_m_per_s, dtype=float)
    key = (
        length.shape,
        length.tobytes(),
        speed.tobytes(),
        time_step_s,
        percentile,
        lump_ratio,
        max_wave_speed_adjustment,
        max_refinement,
    )
    grid = _GRIDS.get(key)
    if grid is None:
        grid = choose_grid(
            length,
            speed,
            time_step_s,
            percentile=percentile,
            lump_ratio=lump_ratio,
            max_wave_speed_adjustment=max_wave_speed_adjustment,
            max_refinement=max_refinement,
            names=network.pipe_names,
        )
        _GRIDS[key] = grid
        while len(_GRIDS) > GRID_CACHE_SIZE:
            _GRIDS.popitem(last=False)
    else:
        _GRIDS.move_to_end(key)
    return grid


def _pipe_at_end(lay, end: int, network: TransientNetwork) -> str:
    """Name of the pipe owning flat pipe-end ``end`` (the first end of a node group)."""
    section = int(lay.end_section[end])
    i = int(np.searchsorted(lay.offset, section, side="right")) - 1
    return network.pipe_names[lay.pipe_index[i]]
