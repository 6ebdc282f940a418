"""Free functions over the supply tree (graph first), as later stages need them."""

from __future__ import annotations

from collections.abc import Iterator

import networkx as nx

from knockproof.model.building import Fixture, Pipe


def upstream_path(tree: nx.DiGraph, node: str) -> list[Pipe]:
    """Pipes from ``node`` back to its supply, nearest first."""
    out: list[Pipe] = []
    while True:
        preds = list(tree.predecessors(node))
        if not preds:
            return out
        u = preds[0]
        out.append(tree.edges[u, node]["pipe"])
        node = u


def pipes(tree: nx.DiGraph) -> Iterator[Pipe]:
    """Every pipe of the tree, in breadth-first order from the roots."""
    for u, v in tree.edges:
        yield tree.edges[u, v]["pipe"]


def downstream_fixtures(tree: nx.DiGraph, node: str) -> list[tuple[Fixture, str]]:
    """(fixture, side) pairs drawing at ``node`` or anywhere downstream of it."""
    out: list[tuple[Fixture, str]] = list(tree.nodes[node]["fixtures"])
    for v in nx.descendants(tree, node):
        out.extend(tree.nodes[v]["fixtures"])
    return out


def pipe_into(tree: nx.DiGraph, node: str) -> Pipe | None:
    """The pipe that feeds ``node`` (None at a root)."""
    preds = list(tree.predecessors(node))
    return tree.edges[preds[0], node]["pipe"] if preds else None


def quick_closing_valves(tree: nx.DiGraph) -> list[tuple[Fixture, str, str]]:
    """(fixture, side, node) for every quick-closing valve in the tree, in node order."""
    out = []
    for node, data in tree.nodes(data=True):
        for f, side in data["fixtures"]:
            if f.quick_closing:
                out.append((f, side, node))
    return out
