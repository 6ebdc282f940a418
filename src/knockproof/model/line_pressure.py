"""Static pressure at every node before the tree is built, and each fixture's closing flow from it.

The flow a valve stops is what its fixture passes at the pressure it sees, not the code's minimum
required capacity. The loader needs it before the network exists (every later stage reads
``Fixture.flow_m3_per_s``), so this module walks the pipes itself, the same way
:func:`knockproof.network.build_tree` and :mod:`knockproof.analysis.steady` do: from each supply
outwards, a pipe written against the flow has its rise turned round, pressure falls by ρ·g per metre
of rise (hydrostatics), and a pressure-reducing valve caps the static pressure at its node at its
setting. A heater outlet fed from a cold node starts from that node's pressure less the height
between them. Malformed trees (loops, unknown nodes) are left to the network builder to report.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import replace

from knockproof.model.building import Device, Fixture, Pipe, Supply
from knockproof.physics.constants import G


def static_pressures(
    supplies: Iterable[Supply],
    pipes: Iterable[Pipe],
    devices: Iterable[Device],
    densities: Mapping[str, float],
) -> dict[str, float]:
    """Gauge static pressure at every node reachable from a supply [Pa], by side density [kg/m³].

    ``supply.static_pressure_pa`` is the highest pressure the supply holds (no flow anywhere).
    """
    adj: dict[str, list[tuple[str, float]]] = {}
    for p in pipes:
        adj.setdefault(p.upstream, []).append((p.downstream, p.rise_m))
        adj.setdefault(p.downstream, []).append((p.upstream, -p.rise_m))
    prv = {d.node: d.setting_pa for d in devices if d.kind == "prv" and d.setting_pa}
    static: dict[str, float] = {}
    elevation: dict[str, float] = {}
    # Cold roots first: a heater outlet takes its pressure from a cold node.
    for s in sorted(supplies, key=lambda s: s.fed_from is not None):
        if s.node in static:
            continue
        rho_g = densities[s.side] * G
        if s.static_pressure_pa is not None:
            start = s.static_pressure_pa
        elif s.fed_from is not None and s.fed_from in static:
            start = static[s.fed_from] - rho_g * (s.elevation_m - elevation[s.fed_from])
        else:
            continue
        if s.node in prv:
            start = min(start, prv[s.node])  # type: ignore[type-var]
        static[s.node] = start
        elevation[s.node] = s.elevation_m
        stack = [s.node]
        while stack:
            u = stack.pop()
            for v, rise in adj.get(u, ()):
                if v in static:
                    continue
                elevation[v] = elevation[u] + rise
                pv = static[u] - rho_g * rise
                if v in prv:
                    pv = min(pv, prv[v])  # type: ignore[type-var]
                static[v] = pv
                stack.append(v)
    return static


def with_line_flows(fixtures: Iterable[Fixture], static: Mapping[str, float]) -> list[Fixture]:
    """Each fixture with its closing flow at line pressure (see :func:`closing_flow`)."""
    return [closing_flow(f, static) for f in fixtures]


def closing_flow(f: Fixture, static: Mapping[str, float]) -> Fixture:
    """The fixture with ``flow_m3_per_s`` set to the flow it passes at its node's static pressure.

    The pressure taken is the highest static pressure of its sides' nodes (the flow is put through
    one side, the conservative case), and never less than the kind's minimum flowing pressure (IPC
    Table 604.3): a node below it fails the pressure check on its own, and a closing flow of zero
    would hide the surge. A flow given in the file without ``flow_pressure`` is used as given; with
    it, the flow is scaled as an orifice, Q = Q_f·√(p/p_f).
    """
    from knockproof import catalog

    if f.flow_source == "file":
        return f
    kind = catalog.get_fixture_kind(f.kind)
    pressures = [static[n] for n in (f.cold_node, f.hot_node) if n is not None and n in static]
    line = max(pressures) if pressures else kind.rated_pressure_pa
    used = max(line, kind.minimum_pressure_pa)
    if f.flow_source == "file-rated" and f.rated_pressure_pa:
        flow = f.rated_flow_m3_per_s * (used / f.rated_pressure_pa) ** 0.5
    else:
        flow = kind.flow_at(used, f.use)
    return replace(f, flow_m3_per_s=flow, flow_pressure_pa=used)
