"""A summary of the tree: what a reader checks first (supplies, floors, pipes, fixtures, valves)."""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass

import networkx as nx


@dataclass(frozen=True)
class TreeSummary:
    """Counts describing a loaded building (no physics).

    Attributes
    ----------
    supplies : tuple of (node, kind, side, static pressure [Pa] or None)
    levels : int
        Distinct node elevations rounded to 0.5 m that carry fixtures (a proxy for floors).
    pipes_by_material_size : tuple of (material, nominal size, count, total length [m])
    fixtures_by_kind : tuple of (kind, count)
    quick_closing_valves : int
        Quick-closing valves (one per fixture side).
    """

    name: str
    nodes: int
    pipes: int
    total_pipe_length_m: float
    supplies: tuple[tuple[str, str, str, float | None], ...]
    levels: int
    pipes_by_material_size: tuple[tuple[str, str, int, float], ...]
    fixtures_by_kind: tuple[tuple[str, int], ...]
    fixtures: int
    quick_closing_valves: int
    arrestors_proposed: int
    devices: tuple[tuple[str, str, str], ...]


def _size_key(nominal: str) -> float:
    whole, _, frac = nominal.partition("-")
    if "/" in whole:
        a, b = whole.split("/")
        return int(a) / int(b)
    value = float(whole)
    if frac:
        a, b = frac.split("/")
        value += int(a) / int(b)
    return value


def summarize(tree: nx.DiGraph) -> TreeSummary:
    b = tree.graph["building"]
    groups: dict[tuple[str, str], list[float]] = {}
    for _, _, p in tree.edges(data="pipe"):
        groups.setdefault((p.material, p.nominal_size), []).append(p.length_m)
    by = tuple(
        (m, s, len(v), sum(v))
        for (m, s), v in sorted(groups.items(), key=lambda kv: (kv[0][0], _size_key(kv[0][1])))
    )
    kinds = Counter(f.kind for f in b.fixtures)
    levels = {
        round(tree.nodes[n]["elevation_m"] * 2) / 2 for n in tree if tree.nodes[n]["fixtures"]
    }
    quick = sum(1 for f in b.fixtures if f.quick_closing for _ in f.sides)
    return TreeSummary(
        name=b.name,
        nodes=tree.number_of_nodes(),
        pipes=tree.number_of_edges(),
        total_pipe_length_m=sum(p.length_m for p in b.pipes),
        supplies=tuple((s.node, s.kind, s.side, s.static_pressure_pa) for s in b.supplies),
        levels=len(levels),
        pipes_by_material_size=by,
        fixtures_by_kind=tuple(sorted(kinds.items())),
        fixtures=len(b.fixtures),
        quick_closing_valves=quick,
        arrestors_proposed=len(b.arrestors),
        devices=tuple((d.id, d.kind, d.node) for d in b.devices),
    )
