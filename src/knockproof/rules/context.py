"""What every rule reads: the building, its tree, the analysis, the profile, and quick look-ups.

The context is built once per review. Tree look-ups (parent, distance from the supply, distance
between two nodes along the pipes) are precomputed as plain dicts so rules stay fast on a tower.
The arrestor schedule and the screening of the designer's arrestors are computed here, once, from
the profile's parameters, because several rules read them.
"""

from __future__ import annotations

from functools import cached_property
from typing import TYPE_CHECKING

import networkx as nx

from knockproof.model.building import Building, Device, Fixture, Pipe
from knockproof.results import Analysis, EventResult, NodeResult, PipeResult
from knockproof.rules.profiles import Profile

if TYPE_CHECKING:
    from knockproof.rules.schedule import Schedule
    from knockproof.rules.screening import Screening


class Context:
    """Read-only view of one building for the rules.

    Attributes
    ----------
    building, tree, analysis, profile
        As given.
    parent : dict[str, str | None]
        Node -> the node upstream of it (None at a supply).
    pipe_into : dict[str, Pipe]
        Node -> the pipe that feeds it (absent at a supply).
    from_root_m : dict[str, float]
        Node -> distance along the pipes from its supply [m].
    pipes, nodes : dict[str, PipeResult], dict[str, NodeResult]
    events : dict[str, EventResult]
        Single-valve closure events by ``"<fixture>:<side>"``.
    """

    def __init__(self, tree: nx.DiGraph, analysis: Analysis, profile: Profile):
        self.tree = tree
        self.building: Building = tree.graph["building"]
        self.analysis = analysis
        self.profile = profile
        self.unit_system = self.building.unit_system
        self.parent: dict[str, str | None] = {}
        self.pipe_into: dict[str, Pipe] = {}
        self.from_root_m: dict[str, float] = {}
        self.children: dict[str, list[str]] = {}
        for root in tree.graph["roots"]:
            self.parent[root] = None
            self.from_root_m[root] = 0.0
            for u, v in nx.bfs_edges(tree, root):
                p: Pipe = tree.edges[u, v]["pipe"]
                self.parent[v] = u
                self.pipe_into[v] = p
                self.from_root_m[v] = self.from_root_m[u] + p.length_m
        for n in tree.nodes:
            self.children[n] = list(tree.successors(n))
        self.depth: dict[str, int] = {n: tree.nodes[n]["depth"] for n in tree.nodes}
        self.pipes: dict[str, PipeResult] = {p.id: p for p in analysis.pipes}
        self.nodes: dict[str, NodeResult] = {n.id: n for n in analysis.nodes}
        self.events: dict[str, EventResult] = {e.id: e for e in analysis.events
                                               if not e.simultaneous}
        self.fixtures: dict[str, Fixture] = {f.id: f for f in self.building.fixtures}
        self.supplies = {s.node: s for s in self.building.supplies}
        self.devices_at: dict[str, list[Device]] = {}
        for d in self.building.devices:
            self.devices_at.setdefault(d.node, []).append(d)

    # ------------------------------------------------------------------ tree look-ups
    def root(self, node: str) -> str:
        return str(self.tree.nodes[node]["root"])

    def lca(self, a: str, b: str) -> str | None:
        """The lowest common ancestor of two nodes (None if they are in different trees)."""
        if self.root(a) != self.root(b):
            return None
        da, db = self.depth[a], self.depth[b]
        while da > db:
            a = self.parent[a]  # type: ignore[assignment]
            da -= 1
        while db > da:
            b = self.parent[b]  # type: ignore[assignment]
            db -= 1
        while a != b:
            a = self.parent[a]  # type: ignore[assignment]
            b = self.parent[b]  # type: ignore[assignment]
        return a

    def distance_m(self, a: str, b: str) -> float:
        """Distance along the pipes between two nodes of one tree [m] (inf across trees)."""
        c = self.lca(a, b)
        if c is None:
            return float("inf")
        return self.from_root_m[a] + self.from_root_m[b] - 2.0 * self.from_root_m[c]

    def is_ancestor(self, a: str, b: str) -> bool:
        """True when ``a`` is ``b`` or upstream of it."""
        if self.depth[a] > self.depth[b]:
            return False
        while self.depth[b] > self.depth[a]:
            b = self.parent[b]  # type: ignore[assignment]
        return a == b

    def path_up(self, node: str) -> list[str]:
        """Nodes from ``node`` up to its supply, ``node`` first."""
        out = [node]
        while (p := self.parent[out[-1]]) is not None:
            out.append(p)
        return out

    def upstream_through_heaters(self, node: str) -> list[str]:
        """Nodes from ``node`` up to the street; a heater outlet continues at its ``fed_from``."""
        out: list[str] = []
        seen: set[str] = set()
        cur: str | None = node
        while cur is not None and cur not in seen:
            path = self.path_up(cur)
            out.extend(path)
            seen.update(path)
            supply = self.supplies.get(path[-1])
            cur = supply.fed_from if supply is not None else None
        return out

    # ------------------------------------------------------------------ labels
    def node_label(self, node: str) -> str:
        return str(self.tree.nodes[node].get("label") or "")

    def fixture_description(self, fixture_ids: list[str] | tuple[str, ...]) -> str:
        """A description of fixtures from their labels: ``"floor 2, unit A: kitchen, lavatory"``.

        Labels are split at commas. Parts that all labels share at the front are said once before a
        colon; parts all share at the end are said once after the varying ones
        (``"washer at: bank position 1, bank position 2"``). Long lists keep their ends.
        """
        labels = [self.fixtures[f].label or f for f in fixture_ids]
        unique = list(dict.fromkeys(labels))
        if len(unique) == 1:
            return unique[0]
        parts = [[x.strip() for x in lab.split(",")] for lab in unique]
        shortest = min(len(p) for p in parts)
        head = 0
        while head < shortest - 1 and all(p[head] == parts[0][head] for p in parts):
            head += 1
        tail = 0
        while tail < shortest - 1 - head and all(p[-1 - tail] == parts[0][-1 - tail]
                                                for p in parts):
            tail += 1
        middle = [", ".join(p[head:len(p) - tail]) for p in parts]
        if len(middle) > 4:
            middle = [middle[0], middle[1], "...", middle[-1]]
        listed = ", ".join(middle)
        prefix = ", ".join(parts[0][:head])
        suffix = ", ".join(parts[0][len(parts[0]) - tail:]) if tail else ""
        if suffix:
            listed = f"{suffix} at: {listed}"
        return f"{prefix}: {listed}" if prefix else listed

    def node_description(self, node: str) -> str:
        label = self.node_label(node)
        return f"{label} (node {node})" if label else f"node {node}"

    # ------------------------------------------------------------------ shared results
    @cached_property
    def schedule(self) -> Schedule:
        from knockproof.rules.schedule import build_schedule

        return build_schedule(self)

    @cached_property
    def screening(self) -> Screening:
        from knockproof.rules.screening import screen

        return screen(self)
