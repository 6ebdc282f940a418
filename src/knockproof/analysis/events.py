"""Closed-form closure events: for every quick-closing valve, the surge at the valve and along its path.

For a valve closing on flow Q at node n:

1. The velocity change in each pipe on the path back to the supply is Q / A_i (only this valve's flow
   stops; the rest of the demand flows on).
2. Walking up the path, the wave meets junctions. At each it transmits T = 2 Y_in / sum(Y) of its step
   into the pipe beyond (Y = A / a, Wylie & Streeter 1993 §3) and reflects T - 1. The first node where
   the reflected share 1 - T reaches ``STRONG_REFLECTION`` (a tee where the area opens up, a much
   larger main), or the supply, bounds the *reflection length* L. Its round-trip time 2 sum(L_i/a_i)
   is the critical time.
3. Closure at or under the critical time is rapid: surge = rho a_1 V_1 (Joukowsky, pipe 1 feeds the
   valve). Slower closure: Michaud's 2 rho sum(L_i V_i) / t_c with the rigid-column inertia of the
   whole path to the supply (every column between the valve and the point that holds its pressure
   must slow down: a short stub off a long main is not relieved by the tee when the closure is slow),
   never more than Joukowsky; so the surge never rises when the closure slows.
4. Along the path the surge reaching each node is the valve surge times the transmissions passed;
   the peak at a node is its static pressure plus that surge.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

import networkx as nx

from knockproof.model.building import Building, Fixture
from knockproof.physics import surge as sg
from knockproof.results import EventResult, NodeResult, PathPoint, PipeResult

#: Reflected share of an arriving wave (1 - T) at which a junction counts as a strong reflection.
STRONG_REFLECTION = 0.5


def _area(d: float) -> float:
    return math.pi * d * d / 4.0


def _admittance(r: PipeResult) -> float:
    return sg.admittance(_area(r.inside_diameter_m), r.wave_speed_m_per_s)


@dataclass
class _TreeIndex:
    """Lookups built once per screen: parent pipe of each node and the admittance sums at each
    junction, so that each event costs time in proportion to its path, not to the tree."""

    parent: dict[str, tuple[str, str]]  # node -> (upstream node, pipe id)
    pipe_y: dict[str, float]  # pipe id -> admittance A/a
    children_y: dict[str, float]  # node -> sum of admittances of the pipes leaving it


def _index(tree: nx.DiGraph, by_pipe: dict[str, PipeResult]) -> _TreeIndex:
    parent: dict[str, tuple[str, str]] = {}
    pipe_y: dict[str, float] = {}
    children_y: dict[str, float] = {}
    for u, v, pid in tree.edges(data="id"):
        parent[v] = (u, pid)
        y = _admittance(by_pipe[pid])
        pipe_y[pid] = y
        children_y[u] = children_y.get(u, 0.0) + y
    return _TreeIndex(parent, pipe_y, children_y)


def closure_events(
    tree: nx.DiGraph,
    pipes: Sequence[PipeResult],
    nodes: Sequence[NodeResult],
    densities: dict[str, float],
    simultaneous: bool = False,
) -> tuple[EventResult, ...]:
    """Closed-form events for every quick-closing valve (and, optionally, simultaneous groups)."""
    building: Building = tree.graph["building"]
    by_pipe = {p.id: p for p in pipes}
    by_node = {n.id: n for n in nodes}
    index = _index(tree, by_pipe)
    events: list[EventResult] = []
    valves: list[tuple[Fixture, str, str]] = []
    side: str
    for f in building.fixtures:
        if not f.quick_closing:
            continue
        for side in f.sides:
            node = f.node(side)
            assert node is not None
            valves.append((f, side, node))
    singles = []
    for f, side, node in valves:
        ev = _event(index, by_pipe, by_node, densities[side], [(f, node)], side, False)
        singles.append(ev)
        events.append(ev)
    if simultaneous:
        groups: dict[tuple[str, str, str], list[tuple[Fixture, str]]] = {}
        for (f, side, node), ev in zip(valves, singles, strict=True):
            groups.setdefault((side, f.kind, ev.reflection_node), []).append((f, node))
        for (side, _kind, _refl), members in groups.items():
            if len(members) > 1:
                events.append(_event(index, by_pipe, by_node, densities[side], members, side, True))
    return tuple(events)


def _path_edges(index: _TreeIndex, node: str) -> list[tuple[str, str, str]]:
    """(upstream, downstream, pipe id) from ``node`` back to its supply."""
    out = []
    while node in index.parent:
        u, pid = index.parent[node]
        out.append((u, node, pid))
        node = u
    return out


def _event(
    index: _TreeIndex,
    by_pipe: dict[str, PipeResult],
    by_node: dict[str, NodeResult],
    density: float,
    members: Iterable[tuple[Fixture, str]],
    side: str,
    simultaneous: bool,
) -> EventResult:
    members = list(members)
    paths = {node: _path_edges(index, node) for _, node in members}
    # Flow stopped in each pipe: the sum of the closing valves' flows downstream of it.
    stopped: dict[str, float] = {}
    for f, node in members:
        for _, _, pid in paths[node]:
            stopped[pid] = stopped.get(pid, 0.0) + f.flow_m3_per_s
    # The event's own path starts at the closing valve furthest from the supply.
    lead_f, lead_node = max(members, key=lambda m: len(paths[m[1]]))
    path = paths[lead_node]
    if not path:
        raise ValueError(f"fixture {lead_f.id} sits on a supply node; it has no pipe")
    first = by_pipe[path[0][2]]
    v1 = stopped[path[0][2]] / _area(first.inside_diameter_m)
    a1 = first.wave_speed_m_per_s
    closure_time = min(f.closure_time_s for f, _ in members)

    # Walk up: reflection length, travel time, sum L V, transmissions.
    travel = 0.0
    sum_lv = 0.0
    length = 0.0
    reflection_node = path[-1][0]
    transmission_to: dict[str, float] = {lead_node: 1.0}
    velocity_in: dict[str, float] = {lead_node: v1}
    t_cum = 1.0
    reached = False
    distance = {lead_node: 0.0}
    for u, v, pid in path:
        r = by_pipe[pid]
        vel = stopped[pid] / _area(r.inside_diameter_m)
        distance[u] = distance[v] + r.length_m
        sum_lv += r.length_m * vel
        if not reached:
            travel += r.length_m / r.wave_speed_m_per_s
            length += r.length_m
        # Junction at u: the wave arrives along (u, v); T = 2 Y_in / sum Y (Wylie & Streeter).
        y_in = index.pipe_y[pid]
        if u in index.parent:
            total = index.children_y[u] + index.pipe_y[index.parent[u][1]]
            t = 2.0 * y_in / total
        else:
            t = 0.0  # the supply holds its pressure: full negative reflection
        if not reached and (1.0 - t >= STRONG_REFLECTION or u not in index.parent):
            reached = True
            reflection_node = u
        t_cum *= t if u in index.parent else 1.0
        transmission_to[u] = t_cum
        if u in index.parent:
            up = by_pipe[index.parent[u][1]]
            velocity_in[u] = stopped.get(up.id, 0.0) / _area(up.inside_diameter_m)
        else:
            velocity_in[u] = 0.0
    critical = 2.0 * travel
    jouk = sg.joukowsky_surge_pa(density, a1, v1)
    rapid = closure_time <= critical
    if rapid:
        surge_valve = jouk
    else:
        surge_valve = min(jouk, 2.0 * density * sum_lv / closure_time)
    points = []
    for node in [lead_node] + [u for u, _, _ in path]:
        st = by_node[node].static_pressure_pa
        s = surge_valve * transmission_to[node]
        points.append(PathPoint(node, distance[node], velocity_in[node], s, st, st + s))
    nres = by_node[lead_node]
    fixtures = tuple(f.id for f, _ in members)
    kind = lead_f.kind
    ev_id = f"{lead_f.id}:{side}" if not simultaneous else f"group:{reflection_node}:{side}:{kind}"
    return EventResult(
        id=ev_id,
        fixtures=fixtures,
        kind=kind,
        side=side,
        node=lead_node,
        label=lead_f.label or nres.label,
        valve=lead_f.valve,
        closure_time_s=closure_time,
        flow_m3_per_s=sum(f.flow_m3_per_s for f, _ in members),
        velocity_m_per_s=v1,
        wave_speed_m_per_s=a1,
        reflection_length_m=length,
        reflection_node=reflection_node,
        critical_time_s=critical,
        closure="rapid" if rapid else "slow",
        surge_pa=surge_valve,
        static_pressure_pa=nres.static_pressure_pa,
        residual_pressure_pa=nres.residual_pressure_pa,
        peak_pressure_pa=nres.static_pressure_pa + surge_valve,
        path=tuple(points),
        simultaneous=simultaneous,
    )
