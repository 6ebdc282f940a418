"""The riser diagram's entry points: one plan per building (levels, names, folds, bands,
shading), drawn as one panel, or as one panel per supply when one would be too wide."""

from __future__ import annotations

from collections import defaultdict
from typing import Any

import networkx as nx

from knockproof.report.riser.drawing import MAX_PANEL_PX, RiserDrawing
from knockproof.report.riser.layout import _draw, _Plan
from knockproof.report.riser.levels import (
    assign_levels,
    find_folds,
    level_names,
    level_signatures,
)
from knockproof.report.riser.shading import surge_by_pipe
from knockproof.results import Analysis


def _plan(tree: nx.DiGraph, analysis: Analysis, review: Any, fold: bool) -> _Plan:
    recommended: dict[str, list[Any]] = defaultdict(list)
    for r in getattr(review, "arrestors", None) or ():
        node = getattr(r, "node", None)
        if isinstance(node, str) and node in tree:
            recommended[node].append(r)
    level_of = assign_levels(tree)
    elevation: dict[int, float] = {}
    for n, lv in level_of.items():
        e = float(tree.nodes[n]["elevation_m"])
        elevation[lv] = min(elevation.get(lv, e), e)
    pipe_surge, node_peak = surge_by_pipe(tree, analysis)
    peak_by_level: dict[int, float] = {}
    for n, p in node_peak.items():
        lv = level_of[n]
        peak_by_level[lv] = max(peak_by_level.get(lv, p), p)
    signatures = level_signatures(tree, level_of, recommended)
    for root in _roots(tree):  # a supply's level is always drawn
        lv = level_of[root]
        signatures[lv] = (*signatures[lv], ("supply level", lv))
    folds = find_folds(signatures, peak_by_level) if fold else []
    # Bands from the top of the page down: drawn levels and fold bands.
    fold_of = {lv: f for f in folds for lv in f.levels}
    band_specs: list[tuple[str, Any]] = []  # ("level", level) or ("fold", Fold)
    for lv in sorted(set(level_of.values()), reverse=True):
        f = fold_of.get(lv)
        if f is None:
            band_specs.append(("level", lv))
        elif lv == max(f.levels):
            band_specs.append(("fold", f))
            band_specs.append(("level", f.drawn))
    band_index = {spec[1]: i for i, spec in enumerate(band_specs) if spec[0] == "level"}
    band_of = {n: band_index[lv] for n, lv in level_of.items() if lv in band_index}
    return _Plan(
        recommended,
        level_of,
        level_names(tree, level_of),
        elevation,
        pipe_surge,
        fold_of,
        band_specs,
        band_of,
    )


def _roots(tree: nx.DiGraph) -> list[str]:
    return [r for r in (tree.graph.get("roots") or []) if r in tree] or [
        n for n in tree if tree.in_degree(n) == 0
    ]


def build_risers(
    tree: nx.DiGraph,
    analysis: Analysis,
    review: Any = None,
    fold: bool = True,
    max_width_px: float = MAX_PANEL_PX,
) -> list[RiserDrawing]:
    """The riser diagram as one panel, or one panel per supply when one would be wider than
    ``max_width_px`` (every panel has the same levels and folds, so they read side by side)."""
    plan = _plan(tree, analysis, review, fold)
    roots = _roots(tree)
    whole = _draw(tree, analysis, plan, roots, "")
    if whole.width <= max_width_px or len(roots) == 1:
        return [whole]
    out = []
    for r in roots:
        supply = tree.nodes[r].get("supply")
        side = getattr(supply, "side", tree.nodes[r].get("side", ""))
        kind = getattr(supply, "kind", "supply")
        out.append(_draw(tree, analysis, plan, [r], f"{side} water, from the {kind} at node {r}"))
    return out


def build_riser(
    tree: nx.DiGraph, analysis: Analysis, review: Any = None, fold: bool = True
) -> RiserDrawing:
    """The whole riser diagram as one panel (see the package docstring)."""
    return _draw(tree, analysis, _plan(tree, analysis, review, fold), _roots(tree), "")
