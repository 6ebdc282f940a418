"""One panel of the riser diagram: the tree as runs, drops and risers, every sub-tree packed
against its left neighbours row by row, then the bands, pipes, marks and labels in pixels (the
rules are in the package docstring)."""

from __future__ import annotations

import math
from collections import defaultdict
from dataclasses import dataclass, field
from typing import Any

import networkx as nx

from knockproof.model.units import fmt
from knockproof.report.riser.drawing import (
    BAND_TOP,
    FOLD_HEIGHT,
    MARGIN_LEFT,
    MARGIN_RIGHT,
    ROW,
    SLOT,
    SYMBOL_NAMES,
    SYMBOL_OF_KIND,
    ArrestorMark,
    Band,
    FixtureMark,
    PipeLine,
    PointMark,
    RiserDrawing,
    TextMark,
)
from knockproof.report.riser.labels import CHAR_PX, _label_parts, _place_labels, _supply_text
from knockproof.report.riser.levels import Fold, fold_note
from knockproof.report.riser.shading import shade_of, shade_steps
from knockproof.results import Analysis


@dataclass
class _Child:
    node: str
    chain: list[tuple[str, str]]  # edges from the visible parent to this node
    vertical: bool
    role: str = "drop"  # "vertical", "drop" or "run"


@dataclass
class _Block:
    contour: dict[int, list[float]] = field(default_factory=dict)

    def add(self, row: int, lo: float, hi: float) -> None:
        c = self.contour.get(row)
        if c is None:
            self.contour[row] = [lo, hi]
        else:
            c[0] = min(c[0], lo)
            c[1] = max(c[1], hi)

    def merge(self, other: _Block, dx: float) -> None:
        for row, (lo, hi) in other.contour.items():
            self.add(row, lo + dx, hi + dx)


def _visible_children(tree: nx.DiGraph, n: str, band_of: dict[str, int]) -> list[_Child]:
    out: list[_Child] = []
    stack: list[tuple[str, list[tuple[str, str]]]] = [
        (c, [(n, c)]) for c in reversed(list(tree.successors(n)))
    ]
    while stack:
        c, chain = stack.pop()
        if c in band_of:
            out.append(_Child(c, chain, vertical=band_of[c] != band_of[n]))
        else:
            for d in reversed(list(tree.successors(c))):
                stack.append((d, [*chain, (c, d)]))
    return out


@dataclass(frozen=True)
class _Plan:
    """What every panel of one building shares: levels, names, folds, bands, shading."""

    recommended: dict[str, list[Any]]
    level_of: dict[str, int]
    names: dict[int, str]
    elevation: dict[int, float]
    pipe_surge: dict[tuple[str, str], float]
    fold_of: dict[int, Fold]
    band_specs: list[tuple[str, Any]]
    band_of: dict[str, int]


def _draw(
    tree: nx.DiGraph, analysis: Analysis, plan: _Plan, roots: list[str], caption: str
) -> RiserDrawing:
    u = analysis.unit_system
    recommended, level_of, names = plan.recommended, plan.level_of, plan.names
    elevation, pipe_surge, fold_of = plan.elevation, plan.pipe_surge, plan.fold_of
    band_specs, band_of = plan.band_specs, plan.band_of

    # Children, roles and sub-rows.
    kids: dict[str, list[_Child]] = {}
    subrow: dict[str, int] = {}
    order: list[str] = []
    stack = list(reversed(roots))
    for r in roots:
        subrow[r] = 0
    while stack:
        n = stack.pop()
        order.append(n)
        children = _visible_children(tree, n, band_of)
        flat = [c for c in children if not c.vertical]
        run: _Child | None = None
        if len(flat) == 1:
            run = flat[0]
        elif flat:
            branching = [c for c in flat if tree.out_degree(c.node) > 0]
            if len(branching) == 1:
                run = branching[0]
        for c in children:
            if c.vertical:
                c.role, subrow[c.node] = "vertical", 0
            elif c is run:
                c.role, subrow[c.node] = "run", subrow[n]
            else:
                c.role, subrow[c.node] = "drop", subrow[n] + 1
        verticals = [c for c in children if c.role == "vertical"]
        drops = [c for c in children if c.role == "drop"]
        kids[n] = verticals + drops + ([run] if run is not None else [])
        stack.extend(reversed([c.node for c in kids[n]]))

    def fixture_count(n: str) -> int:
        return len(tree.nodes[n].get("fixtures") or ())

    # Rows: a node's fixture symbols hang inside its own row.
    rows_in_band: dict[int, int] = defaultdict(int)
    for n, b in band_of.items():
        if n in subrow:
            rows_in_band[b] = max(rows_in_band[b], subrow[n] + 1)
    row_index: dict[tuple[int, int], int] = {}
    band_rows: list[int] = []
    for b, spec in enumerate(band_specs):
        k = 1 if spec[0] == "fold" else max(rows_in_band.get(b, 1), 1)
        band_rows.append(k)
        for s in range(k):
            row_index[(b, s)] = len(row_index)

    def row_of(n: str) -> int:
        return row_index[(band_of[n], subrow[n])]

    # Pack sub-trees, children first.
    offset: dict[str, float] = {}
    blocks: dict[str, _Block] = {}
    for n in reversed(order):
        blk = _Block()
        r0 = row_of(n)
        blk.add(r0, 0.0, 0.0)
        nfix = fixture_count(n)
        if nfix > 1:
            blk.add(r0, 0.0, float(nfix - 1))
        last = -1.0
        first_vertical = True
        for c in kids[n]:
            cb = blocks.pop(c.node)
            rc = row_of(c.node)
            if c.role == "vertical":
                lo, hi = sorted((r0, rc))
                for row in range(lo + 1, hi):
                    cb.add(row, 0.0, 0.0)
                lb = 0.0 if first_vertical else last + 1
                first_vertical = False
            elif c.role == "drop":
                lb = max(last + 1, float(nfix))
            else:
                lb = max(last + 1, 1.0, float(nfix))
            sep = 1.0 if (tree.out_degree(c.node) == 0 or c.role == "vertical") else 2.0
            d = lb
            for row, (lo_c, _hi_c) in cb.contour.items():
                a = blk.contour.get(row)
                if a is not None:
                    d = max(d, a[1] - lo_c + (sep if row != r0 else 1.0))
            offset[c.node] = d
            if c.role != "run":
                blk.add(r0, 0.0, d)
            blk.merge(cb, d)
            last = d
        blocks[n] = blk

    # Trees side by side.
    x: dict[str, float] = {}
    whole = _Block()
    for i, r in enumerate(roots):
        cb = blocks.pop(r)
        supply = tree.nodes[r].get("supply")
        if i and supply is not None:
            ext = float(math.ceil((len(_supply_text(supply, u)) * CHAR_PX + 14.0) / SLOT))
            cb.add(row_of(r), -ext, 0.0)
            cb.add(row_of(r) + 1, -ext, 0.0)
        d = 0.0
        for row, (lo_c, _hi) in cb.contour.items():
            a = whole.contour.get(row)
            if a is not None:
                d = max(d, a[1] - lo_c + 3.0)
        whole.merge(cb, d)
        x[r] = d
    for n in order:
        for c in kids[n]:
            x[c.node] = x[n] + offset[c.node]

    # Geometry.
    band_y: list[float] = []
    y = 0.0
    for b, spec in enumerate(band_specs):
        band_y.append(y)
        y += FOLD_HEIGHT if spec[0] == "fold" else BAND_TOP + band_rows[b] * ROW
    height = y + 8.0
    max_x = max(x.values(), default=0.0)
    for lo_hi in whole.contour.values():
        max_x = max(max_x, lo_hi[1])
    width = MARGIN_LEFT + (max_x + 1) * SLOT + MARGIN_RIGHT

    def px(n: str) -> float:
        return MARGIN_LEFT + SLOT / 2 + x[n] * SLOT

    def py(n: str) -> float:
        b = band_of[n]
        if band_specs[b][0] == "fold":  # pragma: no cover - nodes never sit in a fold band
            return band_y[b] + FOLD_HEIGHT / 2
        return band_y[b] + BAND_TOP + subrow[n] * ROW + ROW / 3

    bands: list[Band] = []
    fold_notes: list[str] = []
    for b, spec in enumerate(band_specs):
        h = FOLD_HEIGHT if spec[0] == "fold" else BAND_TOP + band_rows[b] * ROW
        if spec[0] == "fold":
            f = spec[1]
            assert isinstance(f, Fold)
            title, note, _span = fold_note(f, names, elevation, u)
            fold_notes.append(note)
            drawn_name = names.get(f.drawn) or "the level"
            bands.append(
                Band(band_y[b], h, title, "folded", True, f"alike: {drawn_name} drawn below")
            )
        else:
            lv = spec[1]
            assert isinstance(lv, int)
            el = f"el. {fmt(elevation[lv], 'length', u, 1)}"
            title = names.get(lv) or el
            sub = el if names.get(lv) else ""
            f = fold_of.get(lv)
            stands = f"drawn for {fold_note(f, names, elevation, u)[2]}" if f is not None else ""
            bands.append(Band(band_y[b], h, title, sub, False, stands))

    # Pipes.
    pipes: list[PipeLine] = []
    points: list[PointMark] = []
    vsegs: list[tuple[float, float, float]] = []
    for n in order:
        for c in reversed(kids[n]):
            chain = c.chain
            surges = [pipe_surge[e] for e in chain if e in pipe_surge]
            surge = max(surges) if surges else None
            last_pipe = tree.edges[chain[-1]]["pipe"]
            x0, y0, x1, y1 = px(n), py(n), px(c.node), py(c.node)
            if x0 == x1 or y0 == y1:
                pts = f"{x0:.1f},{y0:.1f} {x1:.1f},{y1:.1f}"
            else:
                pts = f"{x0:.1f},{y0:.1f} {x1:.1f},{y0:.1f} {x1:.1f},{y1:.1f}"
            if y0 != y1:
                vsegs.append((x1, min(y0, y1), max(y0, y1)))
            surge_text = (
                "no closure event passes"
                if surge is None
                else f"highest surge {fmt(surge, 'pressure', u)}"
            )
            folded = len(chain) > 1
            if folded:
                title = (
                    f"{len(chain)} pipes through folded levels, {chain[0][0]} to "
                    f"{chain[-1][1]}; {surge_text}"
                )
                mid_b = (
                    next(
                        (
                            i
                            for i in range(band_of[n] - 1, band_of[c.node], -1)
                            if band_specs[i][0] == "fold"
                        ),
                        None,
                    )
                    if band_of[c.node] < band_of[n]
                    else next(
                        (
                            i
                            for i in range(band_of[n] + 1, band_of[c.node])
                            if band_specs[i][0] == "fold"
                        ),
                        None,
                    )
                )
                by = band_y[mid_b] + FOLD_HEIGHT / 2 if mid_b is not None else (y0 + y1) / 2
            else:
                by = 0.0
                title = (
                    f"pipe {last_pipe.id}: {last_pipe.nominal_size} {last_pipe.material}, "
                    f"{fmt(last_pipe.length_m, 'length', u)}; {surge_text}"
                )
            pipes.append(
                PipeLine(
                    pts,
                    shade_of(surge, u),
                    last_pipe.side == "hot",
                    round(1.0 + min(2.6, last_pipe.inside_diameter_m * 40.0), 2),
                    title,
                    folded,
                    x1,
                    by,
                )
            )
        if sum(1 for c in kids[n] if c.role != "run") >= 2:
            points.append(PointMark(px(n), py(n), "tee", f"node {n}"))

    # Fixtures, arrestors, supplies, devices, labels.
    fixtures: list[FixtureMark] = []
    arrestors: list[ArrestorMark] = []
    texts: list[TextMark] = []
    used: set[str] = set()
    shown_label: dict[str, str] = {}
    candidates: list[tuple[float, float, str, str, bool]] = []
    for n in order:
        d = tree.nodes[n]
        cx, cy = px(n), py(n)
        for i, (f, side) in enumerate(d.get("fixtures") or ()):
            sym = SYMBOL_OF_KIND.get(f.kind, "outlet")
            used.add(sym)
            quick = "quick-closing" if f.quick_closing else "not quick-closing"
            fixtures.append(
                FixtureMark(
                    cx + i * SLOT,
                    cy,
                    sym,
                    side,
                    bool(f.quick_closing),
                    f"{f.label or f.id} ({f.kind}, {side}; {f.valve} valve, {quick}; fixture {f.id}, "
                    f"node {n})",
                )
            )
        for a in d.get("arrestors") or ():
            gas = "" if a.gas_volume_m3 is None else f", gas {fmt(a.gas_volume_m3, 'volume', u, 2)}"
            arrestors.append(
                ArrestorMark(
                    cx - 5.0,
                    cy,
                    False,
                    str(a.size_class or "?"),
                    f"shown arrestor {a.id}: class {a.size_class or 'not stated'}, {a.side}{gas}, "
                    f"node {n}",
                )
            )
        for r in recommended.get(n, ()):
            gas_v = getattr(r, "gas_volume_m3", None)
            gas = "" if gas_v is None else f", gas at least {fmt(gas_v, 'volume', u, 2)}"
            arrestors.append(
                ArrestorMark(
                    cx + 5.0,
                    cy,
                    True,
                    str(getattr(r, "size_class", "")),
                    f"recommended {getattr(r, 'id', '')}: class {getattr(r, 'size_class', '')}, "
                    f"{getattr(r, 'side', '')}{gas}; {getattr(r, 'description', '')}",
                )
            )
        supply = d.get("supply")
        if supply is not None:
            fed = f", fed from {supply.fed_from}" if supply.fed_from else ""
            points.append(
                PointMark(
                    cx,
                    cy,
                    f"supply-{supply.side}",
                    f"supply {n}: {_supply_text(supply, u)} ({supply.side}){fed}",
                )
            )
            candidates.append((cx, cy, _supply_text(supply, u), f"supply {n}{fed}", True))
        for dev in d.get("devices") or ():
            points.append(PointMark(cx, cy, "device", f"{dev.kind} {dev.id} at node {n}"))
        label = str(d.get("label") or "")
        lv_name = names.get(level_of[n], "")
        parts = _label_parts(label, lv_name)
        preds = list(tree.predecessors(n))
        parent_parts = (
            _label_parts(str(tree.nodes[preds[0]].get("label") or ""), lv_name) if preds else []
        )
        k = 0
        while k < len(parts) and k < len(parent_parts) and parts[k] == parent_parts[k]:
            k += 1
        text = parts[k] if k < len(parts) else ""
        shown_label[n] = text
        parent_text = shown_label.get(preds[0], None) if preds else None
        if text and text != parent_text and supply is None:
            candidates.append((cx, cy, text, label, False))
    texts.extend(_place_labels(candidates, vsegs, fixtures, width - MARGIN_RIGHT / 2))
    return RiserDrawing(
        width=round(width, 1),
        height=round(height, 1),
        bands=tuple(bands),
        pipes=tuple(pipes),
        fixtures=tuple(fixtures),
        arrestors=tuple(arrestors),
        points=tuple(points),
        texts=tuple(texts),
        steps=shade_steps(u),
        fold_notes=tuple(fold_notes),
        symbols_used=tuple(s for s in SYMBOL_NAMES if s in used),
        drawn_nodes=len(order),
        total_nodes=sum(1 for r in roots for _n in nx.dfs_preorder_nodes(tree, r)),
        caption=caption,
    )
