"""Re-running the closed-form screen for one closure event on a changed building.

An event's closed-form peak depends only on (docs/methods.md §8): the pipes on the path from the
closing valve back to its supply, the pipes meeting that path at its junctions (their admittance
A/a sets how much of the wave each junction passes on), the static pressure along the path (supply
pressure, rises, pressure-reducing valves, and for the hot side the cold path to the heater), and
the closing valve's flow and closure time. Flows elsewhere in the building change only the
residual pressure, which the peak does not use.

So the advisor cuts the building down to exactly that: the event's path, the first pipe of every
other branch leaving it, the cold path that feeds a heater, and the event's own fixtures. It then
runs the same screen (:func:`knockproof.analysis.run.analyze_tree`) on the cut-down building, with
each candidate change applied. On the tower this takes a few milliseconds instead of a whole-
building run, and the test suite checks that the cut-down screen gives every event's peak unchanged.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass, replace

import networkx as nx

from knockproof.analysis.run import analyze_tree
from knockproof.model.building import Building, Device, Fixture, Pipe
from knockproof.network import build_tree
from knockproof.results import Analysis, EventResult


def path_to_root(tree: nx.DiGraph, node: str) -> list[tuple[str, str]]:
    """Edges (upstream, downstream) from ``node`` back to its supply, nearest first."""
    out: list[tuple[str, str]] = []
    while True:
        preds = list(tree.predecessors(node))
        if not preds:
            return out
        out.append((preds[0], node))
        node = preds[0]


def branch_edges(tree: nx.DiGraph, node: str, reflection_node: str) -> list[tuple[str, str]]:
    """Edges from ``node`` back to ``reflection_node`` (the event's branch), nearest first.

    If ``reflection_node`` is not on the path, the whole path to the supply is returned.
    """
    out = []
    for e in path_to_root(tree, node):
        out.append(e)
        if e[0] == reflection_node:
            break
    return out


@dataclass(frozen=True)
class Screened:
    """The screen of one changed building: the event's result and the whole (cut-down) analysis."""

    event: EventResult
    analysis: Analysis


class EventScreen:
    """The cut-down building of one event, and the screen re-run on changes to it.

    Parameters
    ----------
    tree : networkx.DiGraph
        The whole building's tree (``network.build_tree``).
    event : EventResult
        The event to re-screen (a single valve, or a group closing together).
    """

    def __init__(self, tree: nx.DiGraph, event: EventResult) -> None:
        self.tree = tree
        self.event = event
        self.building: Building = tree.graph["building"]
        self.side = event.side
        fixtures = {f.id: f for f in self.building.fixtures}
        self.members: tuple[Fixture, ...] = tuple(fixtures[f] for f in event.fixtures)
        self.base = self._cut_down()
        self.base_tree = build_tree(self.base)
        #: The cut-down building's pipes, by id, oriented from the supply.
        self.pipes: dict[str, Pipe] = {
            d["id"]: d["pipe"] for _, _, d in self.base_tree.edges(data=True)
        }

    # ------------------------------------------------------------------ the cut-down building
    def _cut_down(self) -> Building:
        tree, b = self.tree, self.building
        edges: dict[str, Pipe] = {}
        path_nodes: set[str] = set()
        for f in self.members:
            node = f.node(self.side)  # type: ignore[arg-type]
            assert node is not None
            path_nodes.add(node)
            for u, v in path_to_root(tree, node):
                edges[tree.edges[u, v]["id"]] = tree.edges[u, v]["pipe"]
                path_nodes.update((u, v))
        # Every other pipe leaving a path node: its admittance shapes the junction.
        for n in list(path_nodes):
            for w in tree.successors(n):
                edges.setdefault(tree.edges[n, w]["id"], tree.edges[n, w]["pipe"])
        # A heater outlet takes its static pressure from the cold node that feeds it.
        roots = {tree.nodes[n]["root"] for n in path_nodes}
        supplies = {s.node: s for s in b.supplies}
        todo = list(roots)
        while todo:
            s = supplies[todo.pop()]
            if s.fed_from is not None:
                for u, v in path_to_root(tree, s.fed_from):
                    edges.setdefault(tree.edges[u, v]["id"], tree.edges[u, v]["pipe"])
                feed_root = tree.nodes[s.fed_from]["root"]
                if feed_root not in roots:
                    roots.add(feed_root)
                    todo.append(feed_root)
        nodes = {n for p in edges.values() for n in (p.upstream, p.downstream)} | roots
        order = {p.id: i for i, p in enumerate(b.pipes)}
        members = tuple(
            replace(
                f,
                cold_node=f.cold_node if self.side == "cold" else None,
                hot_node=f.hot_node if self.side == "hot" else None,
                quick_closing=True,
            )
            for f in self.members
        )
        return replace(
            b,
            supplies=tuple(s for s in b.supplies if s.node in roots),
            pipes=tuple(sorted(edges.values(), key=lambda p: order[p.id])),
            fixtures=members,
            arrestors=(),
            devices=tuple(d for d in b.devices if d.node in nodes),
        )

    # ------------------------------------------------------------------ changes
    def changed(
        self,
        pipes: Mapping[str, Pipe] | None = None,
        fixtures: Callable[[Fixture], Fixture] | None = None,
        devices: Iterable[Device] = (),
    ) -> Building:
        """The cut-down building with pipes replaced (by id), each of the event's fixtures passed
        through ``fixtures``, and ``devices`` added."""
        b = replace(self.base, pipes=tuple(self.pipes[p.id] for p in self.base.pipes))
        if pipes:
            b = replace(b, pipes=tuple(pipes.get(p.id, p) for p in b.pipes))
        if fixtures is not None:
            b = replace(b, fixtures=tuple(fixtures(f) for f in b.fixtures))
        if devices:
            b = replace(b, devices=b.devices + tuple(devices))
        return b

    def _tree(self, b: Building) -> nx.DiGraph:
        """The tree of a changed cut-down building: the base tree with pipes swapped in.

        Changes never alter the topology (a pipe keeps its ends, fixtures keep their nodes), so
        the tree checked once for the base building holds; only edge data and the building change.
        """
        tree = self.base_tree.copy()
        tree.graph["building"] = b
        for p in b.pipes:
            if p is not self.pipes[p.id]:
                tree.edges[p.upstream, p.downstream]["pipe"] = p
        return tree

    def screen(self, building: Building | None = None) -> Screened:
        """Run the screen on ``building`` (default: the unchanged cut-down one); find the event."""
        b = self.base if building is None else building
        tree = self.base_tree if building is None else self._tree(b)
        group = self.event.simultaneous
        analysis = analyze_tree(tree, simultaneous=group)
        if not group:
            ev = next(e for e in analysis.events if e.id == self.event.id)
            return Screened(ev, analysis)
        same = [
            e
            for e in analysis.events
            if e.simultaneous and set(e.fixtures) == set(self.event.fixtures)
        ]
        if same:
            return Screened(same[0], analysis)
        # The change split the group (its valves now reflect at different tees): take the worst.
        return Screened(max(analysis.events, key=lambda e: e.peak_pressure_pa), analysis)

    def peak(self, building: Building | None = None) -> float:
        """Peak pressure at the valve [Pa gauge] of the event on ``building``."""
        return self.screen(building).event.peak_pressure_pa
