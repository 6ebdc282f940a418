"""Building the water-supply tree as a networkx DiGraph, and checking that it is a proper tree.

Each connected part of the piping must hold exactly one supply point (its root), contain no loop, and
every pipe is oriented away from its root (flow direction). A pipe written from downstream to upstream
is turned round (its rise changes sign); this is not an error, because the supply fixes the direction.

Graph contract (what later stages read):
- ``tree.graph["building"]``: the :class:`~knockproof.model.building.Building`;
  ``tree.graph["roots"]``: supply nodes, in file order.
- node attributes: ``elevation_m``, ``side``, ``root``, ``supply`` (Supply or None), ``fixtures``
  (list of (Fixture, side) drawing at the node), ``arrestors`` (list), ``devices`` (list),
  ``label`` (str), ``depth`` (pipes from the root).
- edge attributes (upstream -> downstream): ``pipe`` (the oriented Pipe), ``id`` (pipe id).
"""

from __future__ import annotations

from dataclasses import replace

import networkx as nx

from knockproof.errors import InputError, Problem
from knockproof.model.building import Building


def build_tree(building: Building) -> nx.DiGraph:
    """Build and check the tree; raise :class:`InputError` listing every topology problem."""
    file = building.source
    problems: list[Problem] = []
    und = nx.Graph()
    for p in building.pipes:
        if und.has_edge(p.upstream, p.downstream):
            other = und.edges[p.upstream, p.downstream]["pipe"]
            problems.append(
                Problem(
                    file,
                    f'pipe "{p.id}"',
                    "to",
                    f"runs between the same nodes "
                    f"as pipe \"{other.id}\" ('{p.upstream}' and '{p.downstream}'): "
                    "two pipes in parallel make a loop",
                    p.line,
                )
            )
            continue
        und.add_edge(p.upstream, p.downstream, pipe=p)
    supplies = {s.node: s for s in building.supplies}
    for s in building.supplies:
        if s.node not in und:
            problems.append(
                Problem(
                    file,
                    f'supply "{s.node}"',
                    "node",
                    "no pipe starts or ends at this node",
                    s.line,
                )
            )
    # Loops.
    for comp in nx.connected_components(und):
        sub = und.subgraph(comp)
        if sub.number_of_edges() >= sub.number_of_nodes():
            try:
                cycle = nx.find_cycle(sub)
            except nx.NetworkXNoCycle:  # pragma: no cover - edges >= nodes implies a cycle
                continue
            ids = [sub.edges[u, v]["pipe"].id for u, v in cycle]
            first = sub.edges[cycle[0][0], cycle[0][1]]["pipe"]
            problems.append(
                Problem(
                    file,
                    f'pipe "{first.id}"',
                    "to",
                    "closes a loop through pipes "
                    + ", ".join(ids)
                    + "; a supply tree must have no loops",
                    first.line,
                )
            )
        roots = [s.node for s in building.supplies if s.node in comp]
        if not roots:
            sample = sorted(comp)[:5]
            pipe = next(iter(sub.edges(data="pipe")))[2]
            more = f" and {len(comp) - 5} more" if len(comp) > 5 else ""
            problems.append(
                Problem(
                    file,
                    f'pipe "{pipe.id}"',
                    "from",
                    "is in a part of the piping not connected to any supply (nodes "
                    + ", ".join(sample)
                    + more
                    + ")",
                    pipe.line,
                )
            )
        elif len(roots) > 1:
            s2 = supplies[roots[1]]
            problems.append(
                Problem(
                    file,
                    f'supply "{s2.node}"',
                    "node",
                    f'is connected to supply "{roots[0]}" through the piping; each '
                    "connected tree takes one supply",
                    s2.line,
                )
            )
    for s in building.supplies:
        if s.fed_from is not None and s.fed_from not in und:
            problems.append(
                Problem(
                    file, f'supply "{s.node}"', "fed_from", f"unknown node '{s.fed_from}'", s.line
                )
            )
        elif s.fed_from is not None and s.fed_from in supplies:
            pass
    if problems:
        raise InputError(problems)

    tree = nx.DiGraph(building=building, roots=[s.node for s in building.supplies])
    for s in building.supplies:
        tree.add_node(
            s.node,
            elevation_m=s.elevation_m,
            side=s.side,
            root=s.node,
            supply=s,
            fixtures=[],
            arrestors=[],
            devices=[],
            label=building.node_labels.get(s.node, ""),
            depth=0,
        )
        for u, v in nx.bfs_edges(und, s.node):
            p = und.edges[u, v]["pipe"]
            if p.upstream != u:
                p = replace(p, upstream=u, downstream=v, rise_m=-p.rise_m)
            tree.add_node(
                v,
                elevation_m=tree.nodes[u]["elevation_m"] + p.rise_m,
                side=s.side,
                root=s.node,
                supply=None,
                fixtures=[],
                arrestors=[],
                devices=[],
                label=building.node_labels.get(v, p.label) or tree.nodes[u]["label"],
                depth=tree.nodes[u]["depth"] + 1,
            )
            tree.add_edge(u, v, pipe=p, id=p.id)
    for s in building.supplies:
        if s.fed_from is not None and tree.nodes[s.fed_from]["side"] != "cold":
            problems.append(
                Problem(
                    file,
                    f'supply "{s.node}"',
                    "fed_from",
                    f"node '{s.fed_from}' is not on the cold side",
                    s.line,
                )
            )
    for f in building.fixtures:
        for side in f.sides:
            node = f.node(side)
            if node not in tree:
                problems.append(
                    Problem(file, f'fixture "{f.id}"', side, f"unknown node '{node}'", f.line)
                )
            elif node in supplies:
                problems.append(
                    Problem(
                        file,
                        f'fixture "{f.id}"',
                        side,
                        f"node '{node}' is a supply point; a fixture draws through "
                        "at least one pipe from it",
                        f.line,
                    )
                )
            else:
                tree.nodes[node]["fixtures"].append((f, side))
    for a in building.arrestors:
        if a.node not in tree:
            problems.append(
                Problem(file, f'arrestor "{a.id}"', "node", f"unknown node '{a.node}'", a.line)
            )
        else:
            tree.nodes[a.node]["arrestors"].append(a)
    for d in building.devices:
        if d.node not in tree:
            problems.append(
                Problem(file, f'device "{d.id}"', "node", f"unknown node '{d.node}'", d.line)
            )
        else:
            tree.nodes[d.node]["devices"].append(d)
    if problems:
        raise InputError(problems)
    return tree
