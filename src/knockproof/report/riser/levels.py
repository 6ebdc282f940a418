"""Levels of the riser diagram: node elevations cut into levels, the levels' names, their
comparable shapes, and the folding of runs of alike levels (typical floors) into one drawn level."""

from __future__ import annotations

import re
from collections import Counter, defaultdict
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import networkx as nx

from knockproof.model.units import fmt

LEVEL_GAP_M = 1.8  #: elevations further apart than this [m] are different levels (our choice)
MIN_FOLD = 3  #: alike consecutive levels needed before they fold into one drawn level


def assign_levels(tree: nx.DiGraph) -> dict[str, int]:
    """Level index of every node (0 the lowest), cutting sorted elevations at gaps > LEVEL_GAP_M."""
    elevations = sorted({round(float(d["elevation_m"]), 4) for _n, d in tree.nodes(data=True)})
    index: dict[float, int] = {}
    level, previous = 0, None
    for e in elevations:
        if previous is not None and e - previous > LEVEL_GAP_M:
            level += 1
        index[e] = level
        previous = e
    return {n: index[round(float(d["elevation_m"]), 4)] for n, d in tree.nodes(data=True)}


def _first_segment(label: str) -> str:
    return label.split(",")[0].strip()


_NUMBERED = re.compile(r"^\s*([A-Za-z][\w-]*\s+\d+[A-Za-z]?)\b")


def level_names(tree: nx.DiGraph, level_of: dict[str, int]) -> dict[int, str]:
    """A level's name: the first part of its nodes' labels (up to a comma, or a leading "word
    number" such as "level 2") when more than half of its labelled nodes share it."""
    counts: dict[int, tuple[Counter[str], Counter[str]]] = defaultdict(
        lambda: (Counter(), Counter())
    )
    labelled: Counter[int] = Counter()
    for n, lvl in level_of.items():
        label = str(tree.nodes[n].get("label") or "")
        if label:
            labelled[lvl] += 1
            counts[lvl][0][_first_segment(label)] += 1
            m = _NUMBERED.match(label)
            if m:
                counts[lvl][1][m.group(1)] += 1
    names: dict[int, str] = {}
    for lvl, pair in counts.items():
        for c in pair:
            if not c:
                continue
            name, k = c.most_common(1)[0]
            if k * 2 > labelled[lvl] and name:
                names[lvl] = name
                break
    return names


_DIGITS = re.compile(r"\d+")


def _norm(text: str) -> str:
    return _DIGITS.sub("#", text)


def _pipe_sig(pipe: Any) -> tuple[Any, ...]:
    return (
        pipe.nominal_size,
        pipe.material,
        round(pipe.length_m, 3),
        round(pipe.rise_m, 3),
        pipe.side,
        _norm(pipe.label),
    )


def level_signatures(
    tree: nx.DiGraph, level_of: dict[str, int], recommended: dict[str, list[Any]]
) -> dict[int, tuple[Any, ...]]:
    """A comparable shape of each level: what must match for two levels to be drawn as one."""

    def node_sig(n: str) -> tuple[Any, ...]:
        d = tree.nodes[n]
        fixtures = tuple(
            (f.kind, side, f.quick_closing, f.valve, _norm(f.label or ""))
            for f, side in d.get("fixtures", ())
        )
        shown = tuple((a.side, a.size_class) for a in d.get("arrestors", ()))
        recs = tuple(sorted(str(getattr(r, "size_class", "")) for r in recommended.get(n, ())))
        devices = tuple(getattr(x, "kind", "") for x in d.get("devices", ()))
        supply = d.get("supply")
        return (
            _norm(str(d.get("label") or "")),
            fixtures,
            shown,
            recs,
            devices,
            getattr(supply, "kind", None),
        )

    sig: dict[str, tuple[Any, ...]] = {}
    # Children before parents (reverse topological order).
    for n in reversed(list(nx.topological_sort(tree))):
        lvl = level_of[n]
        inside, ports = [], []
        for c in tree.successors(n):
            p = _pipe_sig(tree.edges[n, c]["pipe"])
            if level_of[c] == lvl:
                inside.append((p, sig[c]))
            else:
                ports.append(p[4])  # a level's way up or down: its side, not its size
        sig[n] = (node_sig(n), tuple(inside), tuple(ports))
    out: dict[int, list[tuple[Any, ...]]] = defaultdict(list)
    for n in _dfs_order(tree):
        preds = list(tree.predecessors(n))
        parent = preds[0] if preds else None
        if parent is None or level_of[parent] != level_of[n]:
            entry = _pipe_sig(tree.edges[parent, n]["pipe"]) if parent is not None else None
            out[level_of[n]].append((entry, sig[n]))
    return {lvl: tuple(v) for lvl, v in out.items()}


def _dfs_order(tree: nx.DiGraph) -> list[str]:
    order: list[str] = []
    for root in tree.graph.get("roots") or [n for n in tree if tree.in_degree(n) == 0]:
        order.extend(nx.dfs_preorder_nodes(tree, root))
    return order


@dataclass(frozen=True)
class Fold:
    """A run of alike levels: ``drawn`` stands for all of ``levels``."""

    levels: tuple[int, ...]
    drawn: int


def find_folds(
    signatures: dict[int, tuple[Any, ...]], peak_by_level: dict[int, float], min_run: int = MIN_FOLD
) -> list[Fold]:
    """Runs of at least ``min_run`` consecutive alike levels; each drawn once (the worst one)."""
    levels = sorted(signatures)
    folds: list[Fold] = []
    i = 0
    while i < len(levels):
        j = i
        while (
            j + 1 < len(levels)
            and levels[j + 1] == levels[j] + 1
            and signatures[levels[j + 1]] == signatures[levels[i]]
        ):
            j += 1
        run = tuple(levels[i : j + 1])
        if len(run) >= min_run:
            drawn = max(run, key=lambda lv: (peak_by_level.get(lv, 0.0), -lv))
            folds.append(Fold(run, drawn))
        i = j + 1
    return folds


def _ranges(numbers: Sequence[int]) -> list[tuple[int, int]]:
    out: list[tuple[int, int]] = []
    for k in sorted(numbers):
        if out and k == out[-1][1] + 1:
            out[-1] = (out[-1][0], k)
        else:
            out.append((k, k))
    return out


_NAMED = re.compile(r"^(?P<word>.*?\S)\s+(?P<num>\d+)$")


def fold_note(
    fold: Fold, names: dict[int, str], elevation: dict[int, float], unit_system: str
) -> tuple[str, str, str]:
    """(title, note, span) of a fold, e.g. ("floors 3–12", "floors 3–12 alike: floor 2 drawn",
    "floors 2–12")."""
    hidden = [lv for lv in fold.levels if lv != fold.drawn]
    drawn_name = names.get(fold.drawn, "")
    matches = [_NAMED.match(names.get(lv, "")) for lv in fold.levels]
    if all(matches) and len({m.group("word") for m in matches if m}) == 1:
        word = matches[0].group("word") if matches[0] else ""
        num = {lv: int(m.group("num")) for lv, m in zip(fold.levels, matches, strict=True) if m}

        def spell(levels: Sequence[int]) -> str:
            parts = [f"{num[a]}" if a == b else f"{num[a]}–{num[b]}" for a, b in _ranges(levels)]
            many = len(levels) > 1 and not word.endswith("s")
            return f"{word}{'s' if many else ''} {', '.join(parts)}"

        title = spell(hidden)
        return title, f"{title} alike: {drawn_name} drawn", spell(fold.levels)
    lows = [fmt(elevation[a], "length", unit_system, 0) for a, _b in _ranges(hidden)]
    title = f"{len(hidden)} levels alike"
    where = drawn_name or f"the level at el. {fmt(elevation[fold.drawn], 'length', unit_system, 0)}"
    return (
        title,
        f"{len(hidden)} levels (from el. {', '.join(lows)}) alike: {where} drawn",
        f"{len(fold.levels)} alike levels",
    )
