"""The riser diagram: the supply tree drawn as SVG, floors up the page, branches across.

This module only lays the drawing out (positions, shades, texts) as plain data; the template
``templates/riser.svg`` turns it into SVG with every text escaped. It reads the tree, the analysis
and the review; it computes no physics.

Layout (our own; docs/report.md shows it with pictures in words):

* **Levels.** Node elevations are sorted and cut wherever two neighbours are more than
  :data:`LEVEL_GAP_M` apart; each group is one level (a floor), drawn as one horizontal band, the
  highest at the top. A level's name is the label part most of its nodes share ("floor 7").
* **Within a level** the tree is drawn as runs and drops: a node's single same-level child (or its
  only child that has children of its own) continues the run on the same row, to the right; the
  other same-level children drop one row down, side by side, like tees off a header. A pipe that
  changes level (a riser) is drawn straight up or down from its node.
* **Packing.** Every sub-tree is packed against its left neighbours row by row (its outline on
  each row, as in a tidy tree drawing), so nothing overlaps, and each supply's riser stays one
  straight line with every floor's branches beside it.
* **Typical floors fold.** Two levels are *alike* when their pipes (size, material, length,
  rise), fixtures (kind, side, valve), shown and recommended arrestors (class) and labels match
  once every number in the labels is ignored, the pipes entering them match and they have as many
  ways up and down. A run of at least :data:`MIN_FOLD` consecutive alike levels is drawn once --
  the level of the run with the highest peak pressure (the lowest on a tie) -- and the others fold
  into one narrow band above it, noted e.g. "floors 3–12 alike: floor 2 drawn". Pipes through
  folded levels are one line with a break mark, shaded by the highest surge of the pipes they
  stand for.
* **Panels.** When the whole drawing would be wider than :data:`MAX_PANEL_PX`, each supply's tree
  (cold, hot) gets its own panel, with the same bands, so the panels read side by side.
* **Shading.** Each pipe is shaded by the highest surge (pressure rise) any closure event's path
  puts on it (the larger of the surges at its two ends), in fixed steps per unit system.
"""

from __future__ import annotations

import math
import re
from collections import Counter, defaultdict
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

import networkx as nx

from knockproof.model.units import fmt, to_display, unit_label
from knockproof.results import Analysis

LEVEL_GAP_M = 1.8  #: elevations further apart than this [m] are different levels (our choice)
MIN_FOLD = 3  #: alike consecutive levels needed before they fold into one drawn level
SLOT = 16.0  #: px per column
ROW = 30.0  #: px per row
MARGIN_LEFT = 140.0  #: px for the level names
MARGIN_RIGHT = 24.0
MAX_PANEL_PX = 1500.0  #: wider than this, each supply's tree gets its own panel
FIT_MAX_PX = 2200.0  #: panels up to this width scale to the page; wider ones scroll
BAND_TOP = 24.0  #: px above a level's first row (labels)
FOLD_HEIGHT = 42.0  #: px of a band standing for folded levels

#: Surge steps of the shading, in the display unit of pressure (psi for us, kPa for si).
SURGE_STEPS: dict[str, tuple[float, ...]] = {
    "us": (25.0, 50.0, 100.0, 150.0),
    "si": (175.0, 350.0, 700.0, 1000.0),
}

#: Fixture kinds by the symbol drawn for them (kinds not listed take "outlet").
SYMBOL_OF_KIND: dict[str, str] = {
    "lavatory": "basin", "kitchen-sink": "basin", "service-sink": "basin",
    "laundry-tray": "basin", "sensor-faucet": "basin", "drinking-fountain": "basin",
    "bathtub": "tub", "shower": "tub",
    "water-closet-tank": "closet", "water-closet-flush-valve": "closet",
    "urinal-flush-valve": "urinal",
    "clothes-washer": "appliance", "dishwasher": "appliance", "ice-maker": "appliance",
    "hose-bibb": "outlet",
}

SYMBOL_NAMES: dict[str, str] = {
    "basin": "sink, lavatory, tray, fountain",
    "tub": "bathtub, shower",
    "closet": "water closet",
    "urinal": "urinal",
    "appliance": "washer, dishwasher, ice maker (solenoid)",
    "outlet": "hose bibb and other outlets",
}


@dataclass(frozen=True)
class Band:
    """One horizontal band of the drawing: a drawn level, or folded levels."""

    y: float
    height: float
    title: str
    subtitle: str
    folded: bool
    note: str = ""


@dataclass(frozen=True)
class PipeLine:
    """A pipe (or a chain of pipes through folded levels) as a polyline."""

    points: str
    shade: str
    hot: bool
    width: float
    title: str
    folded: bool = False
    break_x: float = 0.0
    break_y: float = 0.0


@dataclass(frozen=True)
class FixtureMark:
    x: float
    y: float
    symbol: str
    side: str
    quick: bool
    title: str


@dataclass(frozen=True)
class ArrestorMark:
    x: float
    y: float
    recommended: bool
    size_class: str
    title: str


@dataclass(frozen=True)
class PointMark:
    """A supply, a device or a tee dot."""

    x: float
    y: float
    kind: str
    title: str


@dataclass(frozen=True)
class TextMark:
    x: float
    y: float
    text: str
    title: str
    cls: str = "kp-t"


@dataclass(frozen=True)
class ShadeStep:
    shade: str
    label: str


@dataclass(frozen=True)
class RiserDrawing:
    """Everything the template needs to draw the riser diagram."""

    width: float
    height: float
    bands: tuple[Band, ...]
    pipes: tuple[PipeLine, ...]
    fixtures: tuple[FixtureMark, ...]
    arrestors: tuple[ArrestorMark, ...]
    points: tuple[PointMark, ...]
    texts: tuple[TextMark, ...]
    steps: tuple[ShadeStep, ...]
    fold_notes: tuple[str, ...]
    symbols_used: tuple[str, ...]
    drawn_nodes: int
    total_nodes: int
    caption: str = ""
    note_x: float = MARGIN_LEFT + 1.5 * SLOT + 6.0

    @property
    def fits(self) -> bool:
        """Narrow enough to be scaled to the page's width (else it scrolls at its own size)."""
        return self.width <= FIT_MAX_PX


# ----------------------------------------------------------------------------- levels and names

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
    counts: dict[int, tuple[Counter[str], Counter[str]]] = defaultdict(lambda: (Counter(),
                                                                                  Counter()))
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


def _label_parts(label: str, level_name: str) -> list[str]:
    """A label's comma-separated parts, without the level's name at its start."""
    if level_name and label.startswith(level_name):
        label = label[len(level_name):].lstrip(" ,;:-")
    return [s.strip() for s in label.split(",") if s.strip()]


_DIGITS = re.compile(r"\d+")


def _norm(text: str) -> str:
    return _DIGITS.sub("#", text)


def _pipe_sig(pipe: Any) -> tuple[Any, ...]:
    return (pipe.nominal_size, pipe.material, round(pipe.length_m, 3), round(pipe.rise_m, 3),
            pipe.side, _norm(pipe.label))


def level_signatures(tree: nx.DiGraph, level_of: dict[str, int],
                     recommended: dict[str, list[Any]]) -> dict[int, tuple[Any, ...]]:
    """A comparable shape of each level: what must match for two levels to be drawn as one."""

    def node_sig(n: str) -> tuple[Any, ...]:
        d = tree.nodes[n]
        fixtures = tuple((f.kind, side, f.quick_closing, f.valve, _norm(f.label or ""))
                         for f, side in d.get("fixtures", ()))
        shown = tuple((a.side, a.size_class) for a in d.get("arrestors", ()))
        recs = tuple(sorted(str(getattr(r, "size_class", "")) for r in recommended.get(n, ())))
        devices = tuple(getattr(x, "kind", "") for x in d.get("devices", ()))
        supply = d.get("supply")
        return (_norm(str(d.get("label") or "")), fixtures, shown, recs, devices,
                getattr(supply, "kind", None))

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


def find_folds(signatures: dict[int, tuple[Any, ...]], peak_by_level: dict[int, float],
               min_run: int = MIN_FOLD) -> list[Fold]:
    """Runs of at least ``min_run`` consecutive alike levels; each drawn once (the worst one)."""
    levels = sorted(signatures)
    folds: list[Fold] = []
    i = 0
    while i < len(levels):
        j = i
        while (j + 1 < len(levels) and levels[j + 1] == levels[j] + 1
               and signatures[levels[j + 1]] == signatures[levels[i]]):
            j += 1
        run = tuple(levels[i:j + 1])
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


def fold_note(fold: Fold, names: dict[int, str], elevation: dict[int, float],
              unit_system: str) -> tuple[str, str, str]:
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
    return (title, f"{len(hidden)} levels (from el. {', '.join(lows)}) alike: {where} drawn",
            f"{len(fold.levels)} alike levels")


# ----------------------------------------------------------------------------- surge per pipe

def surge_by_pipe(tree: nx.DiGraph, analysis: Analysis) -> tuple[dict[tuple[str, str], float],
                                                                 dict[str, float]]:
    """Highest surge any event puts on each pipe (edge) [Pa], and highest peak at each node [Pa]."""
    pipe: dict[tuple[str, str], float] = {}
    node_peak: dict[str, float] = {}
    for e in analysis.events:
        points = e.path
        for p in points:
            if p.peak_pressure_pa > node_peak.get(p.node, float("-inf")):
                node_peak[p.node] = p.peak_pressure_pa
        for a, b in zip(points, points[1:], strict=False):
            if tree.has_edge(b.node, a.node):
                key = (b.node, a.node)
            elif tree.has_edge(a.node, b.node):
                key = (a.node, b.node)
            else:
                continue
            s = max(a.surge_pa, b.surge_pa)
            if s > pipe.get(key, float("-inf")):
                pipe[key] = s
    return pipe, node_peak


def shade_steps(unit_system: str) -> tuple[ShadeStep, ...]:
    steps = SURGE_STEPS[unit_system]
    u = unit_label("pressure", unit_system)
    labels = [f"surge under {steps[0]:g} {u}"]
    labels += [f"{a:g}–{b:g} {u}" for a, b in zip(steps, steps[1:], strict=False)]
    labels.append(f"{steps[-1]:g} {u} or more")
    out = [ShadeStep("kp-s0", "no closure event passes")]
    out += [ShadeStep(f"kp-s{i + 1}", text) for i, text in enumerate(labels)]
    return tuple(out)


def shade_of(surge_pa: float | None, unit_system: str) -> str:
    if surge_pa is None:
        return "kp-s0"
    v = to_display(surge_pa, "pressure", unit_system)
    for i, step in enumerate(SURGE_STEPS[unit_system]):
        if v < step:
            return f"kp-s{i + 1}"
    return f"kp-s{len(SURGE_STEPS[unit_system]) + 1}"


# ----------------------------------------------------------------------------- layout

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
        (c, [(n, c)]) for c in reversed(list(tree.successors(n)))]
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
    return _Plan(recommended, level_of, level_names(tree, level_of), elevation, pipe_surge,
                 fold_of, band_specs, band_of)


def _roots(tree: nx.DiGraph) -> list[str]:
    return [r for r in (tree.graph.get("roots") or []) if r in tree] or \
        [n for n in tree if tree.in_degree(n) == 0]


def build_risers(tree: nx.DiGraph, analysis: Analysis, review: Any = None, fold: bool = True,
                 max_width_px: float = MAX_PANEL_PX) -> list[RiserDrawing]:
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


def build_riser(tree: nx.DiGraph, analysis: Analysis, review: Any = None,
                fold: bool = True) -> RiserDrawing:
    """The whole riser diagram as one panel (see the module docstring)."""
    return _draw(tree, analysis, _plan(tree, analysis, review, fold), _roots(tree), "")


def _draw(tree: nx.DiGraph, analysis: Analysis, plan: _Plan, roots: list[str],
          caption: str) -> RiserDrawing:
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
            bands.append(Band(band_y[b], h, title, "folded", True,
                              f"alike: {drawn_name} drawn below"))
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
            surge_text = "no closure event passes" if surge is None else \
                f"highest surge {fmt(surge, 'pressure', u)}"
            folded = len(chain) > 1
            if folded:
                title = (f"{len(chain)} pipes through folded levels, {chain[0][0]} to "
                         f"{chain[-1][1]}; {surge_text}")
                mid_b = next((i for i in range(band_of[n] - 1, band_of[c.node], -1)
                              if band_specs[i][0] == "fold"), None) if band_of[c.node] < \
                    band_of[n] else next((i for i in range(band_of[n] + 1, band_of[c.node])
                                          if band_specs[i][0] == "fold"), None)
                by = band_y[mid_b] + FOLD_HEIGHT / 2 if mid_b is not None else (y0 + y1) / 2
            else:
                by = 0.0
                title = (f"pipe {last_pipe.id}: {last_pipe.nominal_size} {last_pipe.material}, "
                         f"{fmt(last_pipe.length_m, 'length', u)}; {surge_text}")
            pipes.append(PipeLine(
                pts, shade_of(surge, u), last_pipe.side == "hot",
                round(1.0 + min(2.6, last_pipe.inside_diameter_m * 40.0), 2), title,
                folded, x1, by,
            ))
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
            fixtures.append(FixtureMark(
                cx + i * SLOT, cy, sym, side, bool(f.quick_closing),
                f"{f.label or f.id} ({f.kind}, {side}; {f.valve} valve, {quick}; fixture {f.id}, "
                f"node {n})"))
        for a in d.get("arrestors") or ():
            gas = "" if a.gas_volume_m3 is None else \
                f", gas {fmt(a.gas_volume_m3, 'volume', u, 2)}"
            arrestors.append(ArrestorMark(
                cx - 5.0, cy, False, str(a.size_class or "?"),
                f"shown arrestor {a.id}: class {a.size_class or 'not stated'}, {a.side}{gas}, "
                f"node {n}"))
        for r in recommended.get(n, ()):
            gas_v = getattr(r, "gas_volume_m3", None)
            gas = "" if gas_v is None else f", gas at least {fmt(gas_v, 'volume', u, 2)}"
            arrestors.append(ArrestorMark(
                cx + 5.0, cy, True, str(getattr(r, "size_class", "")),
                f"recommended {getattr(r, 'id', '')}: class {getattr(r, 'size_class', '')}, "
                f"{getattr(r, 'side', '')}{gas}; {getattr(r, 'description', '')}"))
        supply = d.get("supply")
        if supply is not None:
            fed = f", fed from {supply.fed_from}" if supply.fed_from else ""
            points.append(PointMark(cx, cy, f"supply-{supply.side}",
                                    f"supply {n}: {_supply_text(supply, u)} ({supply.side}){fed}"))
            candidates.append((cx, cy, _supply_text(supply, u), f"supply {n}{fed}", True))
        for dev in d.get("devices") or ():
            points.append(PointMark(cx, cy, "device", f"{dev.kind} {dev.id} at node {n}"))
        label = str(d.get("label") or "")
        lv_name = names.get(level_of[n], "")
        parts = _label_parts(label, lv_name)
        preds = list(tree.predecessors(n))
        parent_parts = _label_parts(str(tree.nodes[preds[0]].get("label") or ""), lv_name) \
            if preds else []
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
        width=round(width, 1), height=round(height, 1), bands=tuple(bands), pipes=tuple(pipes),
        fixtures=tuple(fixtures), arrestors=tuple(arrestors), points=tuple(points),
        texts=tuple(texts), steps=shade_steps(u), fold_notes=tuple(fold_notes),
        symbols_used=tuple(s for s in SYMBOL_NAMES if s in used), drawn_nodes=len(order),
        total_nodes=sum(1 for r in roots for _n in nx.dfs_preorder_nodes(tree, r)),
        caption=caption,
    )


CHAR_PX = 5.0  #: width of one character of a 9 px label, on average [px]


def _supply_text(supply: Any, unit_system: str) -> str:
    if supply.static_pressure_pa is None:
        return str(supply.kind)
    return f"{supply.kind}, {fmt(supply.static_pressure_pa, 'pressure', unit_system, 0)}"


def _place_labels(candidates: list[tuple[float, float, str, str, bool]],
                  vsegs: list[tuple[float, float, float]], fixtures: list[FixtureMark],
                  right_edge: float) -> list[TextMark]:
    """Put each label just above its node, to the right (a supply's: below it, to the left), cut
    short with an ellipsis where a pipe, a fixture or another label would be in the way.

    ``candidates`` are (x, y, text, title, left) of the nodes, in pixels.
    """
    bin_px = 12.0
    obstacles: dict[int, list[tuple[float, float, float, float]]] = defaultdict(list)

    def block(x0: float, x1: float, y0: float, y1: float) -> None:
        for k in range(int(y0 // bin_px), int(y1 // bin_px) + 1):
            obstacles[k].append((x0, x1, y0, y1))

    for x, y0, y1 in vsegs:
        block(x - 2.0, x + 2.0, y0, y1)
    for f in fixtures:
        block(f.x - 7.0, f.x + 7.0, f.y + 2.0, f.y + 21.0)
    out: list[TextMark] = []
    for x, y, text, title, left in sorted(candidates, key=lambda c: (c[1], c[0])):
        baseline = y + 17.0 if left else y - 18.0
        top, bottom = baseline - 8.0, baseline + 2.0
        near = [o for k in range(int(top // bin_px), int(bottom // bin_px) + 1)
                for o in obstacles.get(k, ()) if o[2] < bottom and o[3] > top]
        if left:  # right-aligned, ending left of the node
            end = x - 7.0
            limit = 4.0
            for lo, hi, _y0, _y1 in near:
                if lo < end:
                    limit = max(limit, hi if hi < end else end)
            room = end - limit
        else:
            start = x + 3.0
            limit = right_edge
            for lo, hi, _y0, _y1 in near:
                if hi > start:
                    limit = min(limit, lo if lo > start else start)
            room = limit - start
        chars = min(int((room - 2.0) / CHAR_PX), 48)
        if chars < 4:
            continue
        short = text if len(text) <= chars else text[:chars - 1].rstrip() + "…"
        width = len(short) * CHAR_PX
        if left:
            out.append(TextMark(end, baseline, short, title, "kp-t kp-tr"))
            block(end - width, end, top, bottom)
        else:
            out.append(TextMark(start, baseline, short, title))
            block(start, start + width, top, bottom)
    return out
