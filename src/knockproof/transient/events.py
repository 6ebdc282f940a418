"""Simulating the building's own closure events: from the supply tree to a transient run per event.

For one event (a valve, or a group closing together) the initial state is the steady flow of the
closing valves alone, every other outlet shut: heads fall from the supply by the Darcy-Weisbach loss
along the valves' paths, and stand still elsewhere.

**The zone.** Only the part of the tree within an acoustic travel time ``tau`` of the valve is
simulated; where the zone cuts the tree, the cut node is held at its steady head (a constant-head
boundary). By causality this is exact for the valve's history up to ``2 tau`` (Wylie & Streeter 1993,
characteristics carry information at speed a); beyond it the held cut acts like the strong
reflections the tree already has. ``tau`` reaches ``ZONE_MARGIN_S`` past the event's reflection
node (the tee where the area opens up), within ``MIN_ZONE_TRAVEL_S``..``MAX_ZONE_TRAVEL_S`` and at
most half the run; the tests show that doubling it moves the reported peaks by less than the
tolerance stated there.

**Time step.** At most ``MAX_TIME_STEP_S`` and fine enough to resolve the closure and the
reflection round trip in ``STEPS_PER_CLOSURE`` steps each.

**Duration.** The closure time plus ``ROUND_TRIPS`` round trips of the event's reflection length
(critical time 2L/a), at least ``MIN_AFTER_CLOSURE_S`` after the closure, plus ``CUSHION_EXTRA_S``
(an arrestor's gas spring rings more slowly than the bare line; bare and with-arrestor runs take the
same length so that their peaks compare like with like). A chosen rule: the first
peak comes within one round trip of the end of a rapid closure, and near the end of a slow one.
"""

from __future__ import annotations

import heapq
import math
from collections.abc import Sequence
from dataclasses import dataclass, replace

import networkx as nx
import numpy as np

from knockproof import catalog
from knockproof.errors import SimulationError
from knockproof.physics import friction
from knockproof.physics.constants import ATM_PA, G
from knockproof.results import Analysis, EventResult

ROUND_TRIPS = 4
MIN_AFTER_CLOSURE_S = 0.04
CUSHION_EXTRA_S = 0.15
#: Zone radius in one-way travel time: beyond the reflection node by ZONE_MARGIN_S, at least
#: MIN_ZONE_TRAVEL_S, at most MAX_ZONE_TRAVEL_S (and never more than half the run).
ZONE_MARGIN_S = 0.010
MIN_ZONE_TRAVEL_S = 0.020
MAX_ZONE_TRAVEL_S = 0.040
#: Time-step target: the closure and the reflection round trip resolved in this many steps.
STEPS_PER_CLOSURE = 20
MAX_TIME_STEP_S = 0.001

#: Closure law of the solver for each valve type (shapes from memory; see transient/closure.py).
VALVE_LAWS = {
    "solenoid": "solenoid",
    "sensor": "solenoid",
    "lever": "lever",
    "self-closing": "self-closing",
    "flush-valve": "flush-valve",
    "manual": "quarter-turn",
}


@dataclass(frozen=True)
class EventSimulation:
    """The simulated result of one closure event (gauge pressures [Pa]).

    Attributes
    ----------
    peak_pressure_pa : float
        Highest pressure at the valve over the run (including any cavity-collapse peak).
    first_peak_pressure_pa : float
        Highest pressure at the valve before the first cavity collapse (the reliable figure).
    collapse_peak_pressure_pa : float | None
        Highest pressure at the valve after the first collapse (grid-dependent; None if no collapse).
    min_pressure_pa : float
        Lowest pressure on the event's path (valve to the zone's edge).
    cavity : bool
        A vapour cavity formed somewhere in the zone.
    path_peak_pressure_pa : dict[str, float]
        Peak at each node of the event's path that lies in the zone (the peak envelope).
    """

    event_id: str
    duration_s: float
    time_step_s: float
    zone_pipes: int
    largest_wave_speed_adjustment: float
    peak_pressure_pa: float
    first_peak_pressure_pa: float
    collapse_peak_pressure_pa: float | None
    min_pressure_pa: float
    cavity: bool
    path_peak_pressure_pa: dict[str, float]
    times_s: np.ndarray
    valve_pressure_pa: np.ndarray
    arrestors: tuple[tuple[str, float], ...] = ()


def event_duration_s(event: EventResult, with_cushion: bool = True) -> float:
    """Run length [s]; the bare and the with-arrestor runs of an event take the same length so
    that their peaks compare like with like."""
    after = max(ROUND_TRIPS * event.critical_time_s, MIN_AFTER_CLOSURE_S)
    return event.closure_time_s + after + CUSHION_EXTRA_S


@dataclass
class _Cache:
    """Per (tree, analysis) lookups, built once: thousands of events reuse them."""

    fixtures: dict
    pipes: dict
    nodes: dict
    adjacency: dict  # node -> list of (neighbour, (u, v), travel time [s])


#: The last few (tree, analysis) pairs' lookups, kept here rather than on the graph so that a tree
#: sent to a worker process does not carry a second copy of the analysis with it.
_CACHES: dict[tuple[int, int], tuple[nx.DiGraph, Analysis, _Cache]] = {}


def _cache(tree: nx.DiGraph, analysis: Analysis) -> _Cache:
    key = (id(tree), id(analysis))
    found = _CACHES.get(key)
    if found is not None and found[0] is tree and found[1] is analysis:
        return found[2]
    pipes = {p.id: p for p in analysis.pipes}
    adjacency: dict[str, list] = {n: [] for n in tree.nodes}
    for u, v, p in tree.edges(data="pipe"):
        tt = p.length_m / pipes[p.id].wave_speed_m_per_s
        adjacency[u].append((v, (u, v), tt))
        adjacency[v].append((u, (u, v), tt))
    c = _Cache(
        {f.id: f for f in tree.graph["building"].fixtures},
        pipes,
        {n.id: n for n in analysis.nodes},
        adjacency,
    )
    if len(_CACHES) >= 4:
        _CACHES.pop(next(iter(_CACHES)))
    _CACHES[key] = (tree, analysis, c)
    return c


def _closing_members(
    tree: nx.DiGraph, event: EventResult, cache: _Cache
) -> list[tuple[str, float, float, str]]:
    """(node, flow, closure time, law) of each valve that closes in the event."""
    by_id = cache.fixtures
    out = []
    for fid in event.fixtures:
        f = by_id[fid]
        node = f.node(event.side)  # type: ignore[arg-type]
        assert node is not None
        out.append(
            (node, f.flow_m3_per_s, f.closure_time_s, VALVE_LAWS.get(f.valve, "linear-area"))
        )
    return out


def _travel_times(adjacency: dict, start: str, limit: float) -> dict[str, float]:
    """Acoustic travel time from ``start`` to every node within ``limit`` (undirected)."""
    best = {start: 0.0}
    queue = [(0.0, start)]
    while queue:
        d, n = heapq.heappop(queue)
        if d > best.get(n, math.inf) or d > limit:
            continue
        for m, _, tt in adjacency[n]:
            nd = d + tt
            if nd < best.get(m, math.inf):
                best[m] = nd
                heapq.heappush(queue, (nd, m))
    return best


def build_event_network(
    tree: nx.DiGraph,
    analysis: Analysis,
    event: EventResult,
    cushions: Sequence[tuple[str, float]] = (),
    *,
    zone_travel_s: float | None = None,
):  # -> tuple[TransientNetwork, dict[str, int], float]
    """The transient network of one event's zone, its node index, and the run's duration [s]."""
    from knockproof.transient.build import CushionSpec, OutletSpec, PipeSpec, tree_network
    from knockproof.transient.network import Reservoir

    building = tree.graph["building"]
    side = event.side
    rho = analysis.density_hot_kg_m3 if side == "hot" else analysis.density_cold_kg_m3
    cache = _cache(tree, analysis)
    pipe_res = cache.pipes
    duration = event_duration_s(event, bool(cushions))
    if zone_travel_s is None:
        tau = event.critical_time_s / 2.0 + ZONE_MARGIN_S
        tau = min(max(tau, MIN_ZONE_TRAVEL_S), MAX_ZONE_TRAVEL_S, duration / 2.0)
    else:
        tau = zone_travel_s
    members = _closing_members(tree, event, cache)
    dist: dict[str, float] = {}
    for node, *_ in members:
        for n, d in _travel_times(cache.adjacency, node, tau).items():
            dist[n] = min(d, dist.get(n, math.inf))
    zone_nodes = {n for n, d in dist.items() if d <= tau}
    # Pipes with their near end in the zone; their far ends join the zone.
    edge_set = {e for n in zone_nodes for _, e, _ in cache.adjacency[n]}
    edges = sorted(edge_set)
    nodes = {n for e in edges for n in e}
    # Steady flow of the closing valves and the head along their paths.
    flow: dict[tuple[str, str], float] = {}
    for node, q, _, _ in members:
        n = node
        while True:
            preds = list(tree.predecessors(n))
            if not preds:
                break
            e = (preds[0], n)
            flow[e] = flow.get(e, 0.0) + q
            n = preds[0]
    root = tree.nodes[members[0][0]]["root"]
    supply = tree.nodes[root]["supply"]
    node_res = cache.nodes
    h_root = node_res[root].static_pressure_pa / (rho * G) + tree.nodes[root]["elevation_m"]
    # zone top: the zone node nearest the root on the lead valve's path
    top = members[0][0]
    n = top
    while True:
        preds = list(tree.predecessors(n))
        if not preds or preds[0] not in nodes:
            top = n
            break
        n = preds[0]
    h_top = h_root
    n = top
    while True:  # friction loss from the root down to the zone top
        preds = list(tree.predecessors(n))
        if not preds:
            break
        e = (preds[0], n)
        h_top -= _loss(tree.edges[e]["pipe"], flow.get(e, 0.0), pipe_res, rho, side, building)
        n = preds[0]
    _ = supply
    specs = []
    for u, v in edges:
        p = tree.edges[u, v]["pipe"]
        r = pipe_res[p.id]
        q = flow.get((u, v), 0.0)
        f = _event_friction(p, q, pipe_res, rho, side, building) if q > 0 else r.friction_factor
        specs.append(
            PipeSpec(
                p.id,
                u,
                v,
                p.length_m + p.fittings_length_m * 0.0,
                p.inside_diameter_m,
                r.wave_speed_m_per_s,
                f,
            )
        )
    elevations = {n: tree.nodes[n]["elevation_m"] for n in nodes}
    outlets = [OutletSpec(node, q, tc, law) for node, q, tc, law in members]
    # the schedule states a gas volume at the static pressure at its node (absolute); the solver
    # brings it to the flowing pressure there before the closure (physics/gas_cushion.py notes)
    stated = {n: node_res[n].static_pressure_pa + ATM_PA for n, _ in cushions if n in nodes}
    cushion_specs = [
        CushionSpec(node, vol, stated[node] if stated[node] > 0.0 else None)
        for node, vol in cushions
        if node in nodes
    ]
    order = sorted(nodes, key=lambda n: (dist.get(n, math.inf), n))
    vapour = _vapour(analysis, side)
    net = tree_network(
        specs,
        top,
        h_top,
        elevations,
        outlets,
        cushion_specs,
        density_kg_m3=rho,
        vapour_pressure_abs_pa=vapour,
        node_order=order,
    )
    index = {name: i for i, name in enumerate(net.node_names)}
    # Hold every cut node (one with pipes outside the zone) at its steady head.
    cuts = []
    for n in nodes:
        if n == top:
            continue
        if any(e not in edge_set for _, e, _ in cache.adjacency[n]):
            cuts.append(n)
    if cuts:
        heads = np.asarray(net.node_initial_head_m, float)
        extra = tuple(Reservoir(index[c], float(heads[index[c]])) for c in sorted(cuts))
        net = replace(net, reservoirs=tuple(net.reservoirs) + extra)
    return net, index, duration


def _vapour(analysis: Analysis, side: str) -> float:
    from knockproof.physics import water

    pr = next((p for p in analysis.pipes if p.side == side), None)
    t = pr.temperature_c if pr is not None else 15.0
    return water.vapour_pressure(t)


def _event_friction(pipe, q, pipe_res, rho, side, building) -> float:
    from knockproof.physics import water

    m = catalog.get_material(pipe.material)
    t = building.temperature_c(side)
    v = q / (math.pi * pipe.inside_diameter_m**2 / 4)
    re = friction.reynolds(v, pipe.inside_diameter_m, rho, water.viscosity(t))
    return friction.friction_factor(re, m.roughness_m / pipe.inside_diameter_m)


def _loss(pipe, q, pipe_res, rho, side, building) -> float:
    if q <= 0:
        return 0.0
    f = _event_friction(pipe, q, pipe_res, rho, side, building)
    v = q / (math.pi * pipe.inside_diameter_m**2 / 4)
    return f * pipe.length_m / pipe.inside_diameter_m * v * v / (2 * G)


def event_time_step_s(event: EventResult) -> float:
    """Target time step [s] for an event (see the module notes)."""
    return min(
        MAX_TIME_STEP_S,
        event.closure_time_s / STEPS_PER_CLOSURE,
        max(event.critical_time_s, 1e-4) / STEPS_PER_CLOSURE,
    )


def simulate_event(
    tree: nx.DiGraph,
    analysis: Analysis,
    event: EventResult,
    cushions: Sequence[tuple[str, float]] = (),
    *,
    zone_travel_s: float | None = None,
    time_step_s: float | None = None,
    record: bool = True,
) -> EventSimulation:
    """Simulate one event (with gas-cushion arrestors at ``cushions``: (node, gas volume m^3)).

    ``record=False`` keeps no pressure history (``times_s`` and ``valve_pressure_pa`` empty): what
    a whole-building run wants, thousands of events at a time.
    """
    from knockproof.transient.solver import simulate

    net, index, duration = build_event_network(
        tree, analysis, event, cushions, zone_travel_s=zone_travel_s
    )
    valve = index[event.node]
    if time_step_s is None:
        time_step_s = event_time_step_s(event)
    record_nodes = [valve] if record else []
    try:
        res = simulate(net, duration, record_nodes=record_nodes, time_step_s=time_step_s)
    except SimulationError as e:
        # A stub short enough to be lumped into its node drops its friction loss; where the zone's
        # cuts hold heads on both sides of such a stub the initial state no longer balances. Run
        # again with no stub lumped (a finer grid instead).
        if "not a steady state" not in str(e) and "constant-head" not in str(e):
            raise
        res = simulate(
            net, duration, record_nodes=record_nodes, time_step_s=time_step_s, lump_ratio=0.0
        )
    on_path = [index[p.node] for p in event.path if p.node in index]
    path_peaks = {
        p.node: float(res.node_max_pressure_pa[index[p.node]])
        for p in event.path
        if p.node in index
    }
    collapse = float(res.node_collapse_peak_pressure_pa[valve])
    return EventSimulation(
        event_id=event.id,
        duration_s=float(res.duration_s),
        time_step_s=float(res.time_step_s),
        zone_pipes=len(net.pipe_names),
        largest_wave_speed_adjustment=float(res.largest_wave_speed_adjustment),
        peak_pressure_pa=float(res.node_max_pressure_pa[valve]),
        first_peak_pressure_pa=float(res.node_first_peak_pressure_pa[valve]),
        collapse_peak_pressure_pa=None if math.isnan(collapse) else collapse,
        min_pressure_pa=float(np.min(res.node_min_pressure_pa[on_path])),
        cavity=bool(np.any(res.node_cavity)),
        path_peak_pressure_pa=path_peaks,
        times_s=np.asarray(res.times_s) if record else np.zeros(0),
        valve_pressure_pa=np.asarray(res.traces_pressure_pa[valve]) if record else np.zeros(0),
        arrestors=tuple(cushions),
    )
