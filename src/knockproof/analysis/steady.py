"""Steady flow over the tree: design flow, velocity, friction, wave speed, static and residual pressure.

Design flow in each pipe comes from the water-supply fixture units downstream of it (IPC Appendix E,
Table E103.3(3)), flush-valve curve where a flush valve is downstream, never less than the largest
single fixture flow downstream (one fixture open alone must be served) and never more than the sum of
the flows of every fixture downstream (all open at once: no 4 gpm in a branch to one 0.5 gpm
faucet); fixture flows are those at line pressure (:mod:`knockproof.model.line_pressure`).
Continuous loads (fixtures marked ``continuous``) add their flow on top, as the model code adds
continuous demand in gpm.

Pressures: the static pressure at each node starts from the supply's ``static_pressure_pa`` (the
highest it holds); the residual (flowing) pressure starts from its ``minimum_pressure_pa`` (the
lowest, at peak demand) where the file gives one, else from the static pressure, less the friction
loss at design flow.
Cold pipes upstream of a water heater also carry its hot demand; a fixture drawing both sides
through the same pipe counts with its *total* fixture units (Table E103.3(2)), as the model code's
method does.
"""

from __future__ import annotations

from dataclasses import dataclass

import networkx as nx

from knockproof import catalog
from knockproof.model.building import Building, Fixture, Pipe
from knockproof.physics import demand, friction, water
from knockproof.physics import wave_speed as ws
from knockproof.physics.constants import G
from knockproof.results import NodeResult, PipeResult


@dataclass(frozen=True)
class Water:
    """Water properties at one temperature (IAPWS-95 via iapws)."""

    temperature_c: float
    density: float
    bulk_modulus: float
    viscosity: float
    vapour_pressure_abs: float


def water_at(temperature_c: float) -> Water:
    return Water(
        temperature_c,
        water.density(temperature_c),
        water.bulk_modulus(temperature_c),
        water.viscosity(temperature_c),
        water.vapour_pressure(temperature_c),
    )


def pipe_wave_speed(p: Pipe, w: Water) -> float:
    """Wave speed of a pipe with water ``w`` [m/s] (Korteweg with restraint factor)."""
    m = catalog.get_material(p.material)
    return ws.wave_speed(
        w.bulk_modulus,
        w.density,
        m.elastic_modulus_pa(w.temperature_c),
        m.poisson_ratio,
        p.inside_diameter_m,
        p.wall_m,
        p.restraint,
    )


def _demand_units(
    tree: nx.DiGraph, building: Building
) -> tuple[dict[str, float], dict[str, bool], dict[str, float], dict[str, float]]:
    """Per pipe id: fixture units, whether a flush valve is downstream, largest single flow, and
    the continuous flow (fixtures marked ``continuous`` add their flow instead of their units)."""
    units: dict[str, float] = {}
    continuous: dict[str, float] = {}
    flush: dict[str, bool] = {}
    largest: dict[str, float] = {}
    total: dict[str, float] = {}
    heater_feed: dict[str, str] = {}  # hot root -> cold node feeding it
    for s in building.supplies:
        if s.fed_from is not None:
            heater_feed[s.node] = s.fed_from

    path_cache: dict[str, list[str]] = {}

    def path(node: str) -> list[str]:
        if node not in path_cache:
            ids: list[str] = []
            n = node
            while True:
                preds = list(tree.predecessors(n))
                if not preds:
                    break
                ids.append(tree.edges[preds[0], n]["id"])
                n = preds[0]
            path_cache[node] = ids
        return path_cache[node]

    def add(pid: str, u: float, f: Fixture) -> None:
        units[pid] = units.get(pid, 0.0) + u
        flush[pid] = flush.get(pid, False) or f.flush_valve
        largest[pid] = max(largest.get(pid, 0.0), f.flow_m3_per_s)

    for f in building.fixtures:
        if f.continuous:
            touched: set[str] = set()
            for node in (f.cold_node, f.hot_node):
                if node is not None:
                    touched.update(path(node))
                    root = tree.nodes[node]["root"]
                    if root in heater_feed:
                        touched.update(path(heater_feed[root]))
            for pid in touched:
                continuous[pid] = continuous.get(pid, 0.0) + f.flow_m3_per_s
            continue
        cold_path = set(path(f.cold_node)) if f.cold_node is not None else set()
        feed_path: set[str] = set()
        if f.hot_node is not None:
            hot_root = tree.nodes[f.hot_node]["root"]
            for pid in path(f.hot_node):
                add(pid, f.fixture_units_hot, f)
            if hot_root in heater_feed:
                feed_path = set(path(heater_feed[hot_root]))
        hot_path = set(path(f.hot_node)) if f.hot_node is not None else set()
        for pid in cold_path:
            add(pid, f.fixture_units_total if pid in feed_path else f.fixture_units_cold, f)
        for pid in feed_path - cold_path:
            add(pid, f.fixture_units_hot, f)
        for pid in cold_path | hot_path | feed_path:
            total[pid] = total.get(pid, 0.0) + f.flow_m3_per_s
    return units, flush, largest, continuous, total


def steady_flow(tree: nx.DiGraph) -> tuple[tuple[PipeResult, ...], tuple[NodeResult, ...]]:
    """Design flow, velocity, friction loss and wave speed of every pipe; pressures at every node."""
    building: Building = tree.graph["building"]
    waters = {side: water_at(building.temperature_c(side)) for side in ("cold", "hot")}
    units, flush, largest, continuous, total = _demand_units(tree, building)
    pipe_results: dict[str, PipeResult] = {}
    for u, v, p in tree.edges(data="pipe"):
        side = tree.nodes[v]["side"]
        w = waters[side]
        m = catalog.get_material(p.material)
        fu = units.get(p.id, 0.0)
        fv = flush.get(p.id, False)
        q = (
            min(
                max(demand.design_flow_m3_per_s(fu, fv), largest.get(p.id, 0.0)),
                total.get(p.id, 0.0),
            )
            if fu > 0
            else (largest.get(p.id, 0.0))
        ) + continuous.get(p.id, 0.0)
        area = 3.141592653589793 * p.inside_diameter_m**2 / 4
        vel = q / area
        re = friction.reynolds(vel, p.inside_diameter_m, w.density, w.viscosity)
        f = friction.friction_factor(re, m.roughness_m / p.inside_diameter_m)
        hl = friction.head_loss_m(
            q,
            p.length_m + p.fittings_length_m,
            p.inside_diameter_m,
            m.roughness_m,
            w.density,
            w.viscosity,
        )
        size = catalog.get_size(p.material, p.nominal_size)
        rating = size.pressure_rating_pa
        if side == "hot" and size.pressure_rating_hot_pa is not None:
            rating = size.pressure_rating_hot_pa
        pipe_results[p.id] = PipeResult(
            id=p.id,
            upstream=u,
            downstream=v,
            side=side,
            material=p.material,
            nominal_size=p.nominal_size,
            length_m=p.length_m,
            inside_diameter_m=p.inside_diameter_m,
            temperature_c=w.temperature_c,
            fixture_units=fu,
            flush_valve_demand=fv,
            design_flow_m3_per_s=q,
            velocity_m_per_s=vel,
            reynolds=re,
            friction_factor=f,
            head_loss_m=hl,
            wave_speed_m_per_s=pipe_wave_speed(p, w),
            pressure_rating_pa=rating,
            label=p.label,
        )
    nodes = _pressures(tree, building, pipe_results, waters)
    order = {p.id: i for i, p in enumerate(building.pipes)}
    pipes = tuple(sorted(pipe_results.values(), key=lambda r: order[r.id]))
    return pipes, nodes


def _pressures(
    tree: nx.DiGraph, building: Building, pipes: dict[str, PipeResult], waters: dict[str, Water]
) -> tuple[NodeResult, ...]:
    static: dict[str, float] = {}
    residual: dict[str, float] = {}
    prv = {d.node: d.setting_pa for d in building.devices if d.kind == "prv" and d.setting_pa}
    # Cold roots first, then hot roots fed from cold nodes.
    roots = sorted(building.supplies, key=lambda s: s.fed_from is not None)
    for s in roots:
        rho_g = waters[s.side].density * G
        if s.fed_from is not None and s.static_pressure_pa is None:
            dz = s.elevation_m - tree.nodes[s.fed_from]["elevation_m"]
            static[s.node] = static[s.fed_from] - rho_g * dz
            residual[s.node] = residual[s.fed_from] - rho_g * dz
        else:
            static[s.node] = s.static_pressure_pa or 0.0
            residual[s.node] = (
                s.minimum_pressure_pa if s.minimum_pressure_pa is not None else static[s.node]
            )
        if s.node in prv:
            static[s.node] = min(static[s.node], prv[s.node])
            residual[s.node] = min(residual[s.node], prv[s.node])
        for u, v in nx.bfs_edges(tree, s.node):
            p = tree.edges[u, v]["pipe"]
            r = pipes[p.id]
            static[v] = static[u] - rho_g * p.rise_m
            residual[v] = residual[u] - rho_g * (p.rise_m + r.head_loss_m)
            if v in prv:
                static[v] = min(static[v], prv[v])
                residual[v] = min(residual[v], prv[v])
    out = []
    for n, data in tree.nodes(data=True):
        out.append(
            NodeResult(
                n, data["side"], data["elevation_m"], static[n], residual[n], data.get("label", "")
            )
        )
    return tuple(out)


def pressure_assumptions(building: Building) -> tuple[str, ...]:
    """What the analysis assumed about the supplies' two pressures, one line per case, for the
    report's assumptions."""
    one = [s.node for s in building.supplies
           if s.static_pressure_pa is not None and s.minimum_pressure_pa is None]
    two = [s.node for s in building.supplies if s.minimum_pressure_pa is not None]
    out: list[str] = []
    if two:
        out.append(
            "Supplies " + ", ".join(two) + " give a static pressure (surge, static-limit and rating "
            "checks) and a minimum pressure at peak demand (flowing-pressure checks)."
        )
    if one:
        out.append(
            "Supplies " + ", ".join(one) + " give one pressure: it is taken as both the static "
            "pressure and the pressure at peak demand (give minimum_pressure to check flowing "
            "pressures at the lowest the supply holds)."
        )
    out.append(
        "Each fixture's closing flow is its rated flow scaled to the static pressure at its node "
        "as an orifice (Q ~ sqrt(p)), or held by a flow regulator, unless the file gives the flow."
    )
    return tuple(out)
