"""Chains of short pipes in series, merged into longer pipes before the grid is chosen.

A building main is often drawn as many short pieces (a pipe between every fitting, idle tees,
couplings). The grid (:mod:`knockproof.transient.grid`) lumps a pipe shorter than half a reach
into its end nodes, leaving its water column out; a long chain of such pieces would lose its whole
length, inertia and storage (and a network made only of them would have nothing left to simulate).

Rule (document of record): a *series node* is a node with exactly two pipes, one arriving and one
leaving, of the same inside diameter and wave speed (to 1e-9 relative), carrying the same initial
flow, with no reservoir, valve or arrestor and not asked for by the caller (recorded nodes). Along a
chain of pipes joined by series nodes, each run of two or more consecutive *short* pipes (travel
time ``L/a`` below the target step) whose total travel time reaches ``lump_ratio`` times the target
step is replaced by one pipe (one pipe rounds to the grid far better than many pieces of one or two
reaches each, and it has no junctions for the adjusted wave speeds to differ across). A merged
pipe has the summed length, the common diameter and wave speed, the
length-weighted mean friction factor (so its steady friction loss is exactly the sum of the pieces':
the Darcy-Weisbach loss is linear in ``f L`` at a common flow) and the common flow. Length, mass,
inertia ``L/(g A)`` and storage ``g A L / a^2`` are those of the pieces, exactly: a uniform pipe
split at plain points is the same pipe (Wylie & Streeter, *Fluid Transients in Systems*, 1993,
sec. 3.1; ``tests/transient/test_transient_junction.py`` checks that a split pipe reproduces the
undivided one). A run whose total travel is under ``lump_ratio`` steps is left to the grid's
lumping (its whole column is then shorter than half a reach).

Results on the original network (:func:`expand_result`): a node merged away lies inside a merged
pipe; the kernel watches the computing section nearest to it (within half a reach: the grid
resolves nothing finer) and the node takes that section's highest and lowest heads, and its
pressure from its own elevation. Each piece reports the merged pipe's wave speed and cavity flag,
and the part of its final section heads that falls on it.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from knockproof.transient.network import GRAVITY_M_PER_S2, TransientNetwork

SAME = 1e-9
"""Relative tolerance for "the same diameter, wave speed, flow" of two pipes."""


@dataclass(frozen=True, eq=False)
class SeriesMerge:
    """How a network was reduced: what each new node and pipe stands for.

    Attributes
    ----------
    node_new : np.ndarray
        New index of each original node; -1 for a node merged away.
    pipe_new : np.ndarray
        New pipe of each original pipe (a merged pipe has several).
    pipe_start_m, pipe_end_m : np.ndarray
        Where each original pipe starts and ends along its new pipe [m] from its upstream end.
    inner : np.ndarray
        The original nodes merged away, increasing.
    watch : tuple[tuple[int, float], ...]
        For each of them: its new pipe and its distance [m] from that pipe's upstream end.
    """

    node_new: np.ndarray
    pipe_new: np.ndarray
    pipe_start_m: np.ndarray
    pipe_end_m: np.ndarray
    inner: np.ndarray
    watch: tuple[tuple[int, float], ...]


def _same(a: float, b: float) -> bool:
    return abs(a - b) <= SAME * max(abs(a), abs(b))


def merge_series(
    net: TransientNetwork,
    target_step_s: float,
    lump_ratio: float,
    keep_nodes: set[int] | frozenset[int] = frozenset(),
) -> tuple[TransientNetwork, SeriesMerge] | None:
    """The network with its chains of short pipes merged (module rule), or None if none is."""
    n_pipes = net.n_pipes
    if n_pipes < 2 or not (target_step_s > 0.0):
        return None
    up = np.asarray(net.pipe_upstream, dtype=np.int64).tolist()
    down = np.asarray(net.pipe_downstream, dtype=np.int64).tolist()
    length = np.asarray(net.pipe_length_m, dtype=float)
    diameter = np.asarray(net.pipe_diameter_m, dtype=float)
    speed = np.asarray(net.pipe_wave_speed_m_per_s, dtype=float)
    flow = np.asarray(net.pipe_initial_flow_m3_per_s, dtype=float)
    travel = (length / speed).tolist()
    arriving: list[list[int]] = [[] for _ in range(net.n_nodes)]
    leaving: list[list[int]] = [[] for _ in range(net.n_nodes)]
    for p in range(n_pipes):
        leaving[up[p]].append(p)
        arriving[down[p]].append(p)
    busy = set(keep_nodes)
    busy.update(r.node for r in net.reservoirs)
    busy.update(v.node for v in net.valves)
    busy.update(a.node for a in net.arrestors)

    def series(n: int) -> bool:
        if n in busy or len(arriving[n]) != 1 or len(leaving[n]) != 1:
            return False
        a, b = arriving[n][0], leaving[n][0]
        return (
            _same(diameter[a], diameter[b])
            and _same(speed[a], speed[b])
            and _same(flow[a], flow[b])
        )

    is_series = [series(n) for n in range(net.n_nodes)]
    if not any(is_series):
        return None
    # chains: start at every pipe whose upstream node is not a series node, follow downstream
    segments: list[list[int]] = []  # groups of original pipes that become one new pipe
    placed = [False] * n_pipes
    short = [t < target_step_s for t in travel]
    for p0 in range(n_pipes):
        if is_series[up[p0]]:
            continue
        chain = [p0]
        while is_series[down[chain[-1]]]:
            chain.append(leaving[down[chain[-1]]][0])
        run: list[int] = []
        for p in [*chain, -1]:
            if p >= 0 and short[p]:
                run.append(p)
                continue
            if len(run) > 1 and sum(travel[q] for q in run) >= lump_ratio * target_step_s:
                segments.append(run)
            else:
                segments.extend([q] for q in run)
            run = []
            if p >= 0:
                segments.append([p])
        for q in chain:
            placed[q] = True
    for p in range(n_pipes):  # pipes on a loop of series nodes only (not in a tree): unchanged
        if not placed[p]:
            segments.append([p])
    if all(len(s) == 1 for s in segments):
        return None
    segments.sort(key=lambda s: min(s))
    # nodes: keep every node that is not inside a merged segment, in the original order
    inner: dict[int, tuple[int, float]] = {}
    for i, seg in enumerate(segments):
        x = 0.0
        for q in seg[:-1]:
            x += float(length[q])
            inner[down[q]] = (i, x)
    node_new = np.full(net.n_nodes, -1, dtype=np.int64)
    kept_nodes = [n for n in range(net.n_nodes) if n not in inner]
    node_new[kept_nodes] = np.arange(len(kept_nodes))
    pipe_new = np.empty(n_pipes, dtype=np.int64)
    start = np.zeros(n_pipes)
    end = np.zeros(n_pipes)
    friction = np.asarray(net.pipe_friction_factor, dtype=float)
    new_len, new_f, new_up, new_down, new_names = [], [], [], [], []
    new_d, new_a, new_q = [], [], []
    for i, s in enumerate(segments):
        x = 0.0
        for q in s:
            pipe_new[q] = i
            start[q] = x
            x += length[q]
            end[q] = x
        new_len.append(x)
        new_f.append(float(sum(friction[q] * length[q] for q in s) / x))
        new_up.append(node_new[up[s[0]]])
        new_down.append(node_new[down[s[-1]]])
        names = [net.pipe_names[q] for q in s]
        new_names.append(names[0] if len(s) == 1 else f"{names[0]}..{names[-1]}")
        new_d.append(diameter[s[0]])
        new_a.append(speed[s[0]])
        new_q.append(flow[s[0]])
    reduced = replace(
        net,
        node_names=tuple(net.node_names[n] for n in kept_nodes),
        node_elevation_m=np.asarray(net.node_elevation_m, dtype=float)[kept_nodes],
        pipe_names=tuple(new_names),
        pipe_upstream=np.array(new_up, dtype=np.int64),
        pipe_downstream=np.array(new_down, dtype=np.int64),
        pipe_length_m=np.array(new_len),
        pipe_diameter_m=np.array(new_d),
        pipe_wave_speed_m_per_s=np.array(new_a),
        pipe_friction_factor=np.array(new_f),
        pipe_initial_flow_m3_per_s=np.array(new_q),
        node_initial_head_m=np.asarray(net.node_initial_head_m, dtype=float)[kept_nodes],
        reservoirs=tuple(replace(r, node=int(node_new[r.node])) for r in net.reservoirs),
        valves=tuple(replace(v, node=int(node_new[v.node])) for v in net.valves),
        arrestors=tuple(replace(a, node=int(node_new[a.node])) for a in net.arrestors),
    )
    order = sorted(inner)
    return reduced, SeriesMerge(
        node_new, pipe_new, start, end, np.array(order, dtype=np.int64),
        tuple(inner[n] for n in order),
    )  # fmt: skip


def expand_result(result, merge: SeriesMerge, net: TransientNetwork, reduced: TransientNetwork):
    """A :class:`~knockproof.transient.solver.TransientResult` of the reduced network, told on the
    original one (see the module docstring for the merged-away nodes)."""
    n = net.n_nodes
    kept = np.flatnonzero(merge.node_new >= 0)
    inner = merge.inner
    rho_g = net.density_kg_m3 * GRAVITY_M_PER_S2
    z = np.asarray(net.node_elevation_m, dtype=float)
    z_red = np.asarray(reduced.node_elevation_m, dtype=float)
    # where a watched place's pipe was lumped (not expected: a merged pipe is long enough to be
    # kept), the envelope of its two end nodes
    new_pipe = np.array([i for i, _ in merge.watch], dtype=np.int64)
    end_a = np.asarray(reduced.pipe_upstream, dtype=np.int64)[new_pipe]
    end_b = np.asarray(reduced.pipe_downstream, dtype=np.int64)[new_pipe]

    def spread(values: np.ndarray, watched, how) -> np.ndarray:
        out = np.empty(n, dtype=values.dtype)
        out[kept] = values
        if inner.size:
            fallback = how(values[end_a], values[end_b])
            w = np.asarray(watched)
            out[inner] = np.where(np.isnan(w), fallback, w)
        return out

    stats = result.stats
    max_first = spread(
        result.node_first_peak_pressure_pa / rho_g + z_red, stats["watch_max_first_head_m"],
        np.fmax,
    )  # fmt: skip
    after_watch = np.where(
        np.isneginf(stats["watch_max_after_head_m"]), np.nan, stats["watch_max_after_head_m"]
    )
    max_after = spread(
        result.node_collapse_peak_pressure_pa / rho_g + z_red, after_watch, np.fmax
    )
    if np.isnan(result.first_collapse_time_s):
        max_after[:] = np.nan
    max_head = np.fmax(max_first, max_after)
    min_head = spread(result.node_min_head_m, stats["watch_min_head_m"], np.fmin)
    cavity = np.zeros(n, dtype=bool)
    cavity[kept] = result.node_cavity
    if inner.size:
        cavity[inner] = result.pipe_cavity[new_pipe]
    final = {}
    reduced_names = reduced.pipe_names
    for p, name in enumerate(net.pipe_names):
        i = int(merge.pipe_new[p])
        heads = result.final_pipe_head_m.get(reduced_names[i])
        if heads is None:
            continue
        total = float(reduced.pipe_length_m[i])
        reaches = len(heads) - 1
        a = int(round(reaches * merge.pipe_start_m[p] / total))
        b = int(round(reaches * merge.pipe_end_m[p] / total))
        final[name] = heads[a : b + 1] if b > a else heads[[a, min(a + 1, reaches)]]
    lumped = tuple(
        net.pipe_names[p]
        for p in range(net.n_pipes)
        if reduced_names[merge.pipe_new[p]] in set(result.lumped_pipes)
    )
    share = np.asarray(net.pipe_length_m, dtype=float) / np.asarray(
        reduced.pipe_length_m, dtype=float
    )[merge.pipe_new]
    return replace(
        result,
        reaches_per_pipe=np.rint(result.reaches_per_pipe[merge.pipe_new] * share).astype(np.int64),
        wave_speed_used_m_per_s=result.wave_speed_used_m_per_s[merge.pipe_new],
        node_max_head_m=max_head,
        node_min_head_m=min_head,
        node_max_pressure_pa=rho_g * (max_head - z),
        node_min_pressure_pa=rho_g * (min_head - z),
        node_first_peak_pressure_pa=rho_g * (max_first - z),
        node_collapse_peak_pressure_pa=rho_g * (max_after - z),
        node_cavity=cavity,
        pipe_cavity=result.pipe_cavity[merge.pipe_new],
        traces_pressure_pa={int(kept[k]): t for k, t in result.traces_pressure_pa.items()},
        lumped_pipes=lumped,
        final_pipe_head_m=final,
    )
