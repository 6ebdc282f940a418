"""Screening the designer's arrestors (``Building.arrestors``) against the schedule.

Our definitions (docs/rules.md shows this text):

**Matching.** A shown arrestor can answer a recommended one on the same side when it sits in that
recommendation's branch (its tee, or below it on the branch's legs) or within the placement
distance of the recommended node. Pairs are taken nearest first (distance along the pipes to the
recommended node); each shown arrestor answers at most one recommendation and each recommendation
takes one.

**Problems** a recommendation can have:

- `missing`: nothing shown for it;
- `one-side`: nothing shown, but the other side of the same fixtures has its arrestor;
- `branch-second`: nothing shown, but the other arrestor of the same long branch is there;
- `too-far`: shown further from the recommended node than the placement distance;
- `undersized`: shown with a size class below the one required;
- `no-size`: shown with neither size class nor gas volume;
- `gas-short`: shown with a gas volume below the energy method's.

A shown arrestor that answers no recommendation is *redundant*. A quick-closing valve passes when
its recommended arrestor is shown with no problem (problems reported by a rule the profile switches
off, or sets below error, do not fail it).
"""

from __future__ import annotations

import heapq
from dataclasses import dataclass, field

from knockproof.catalog.arrestors import ARRESTOR_SYMBOLS
from knockproof.model.building import Arrestor
from knockproof.rules.context import Context
from knockproof.rules.schedule import ArrestorRecommendation

#: Which rule reports each problem.
PROBLEM_RULE: dict[str, str] = {
    "missing": "arrestor.required",
    "one-side": "arrestor.both-sides",
    "branch-second": "arrestor.branch-length",
    "too-far": "arrestor.placement",
    "undersized": "arrestor.size-class",
    "no-size": "arrestor.size-class",
    "gas-short": "arrestor.gas-volume",
}


@dataclass(frozen=True)
class ArrestorCheck:
    """The screening of one recommended arrestor."""

    recommendation: str
    proposal: str | None
    distance_m: float | None
    problems: tuple[str, ...]

    @property
    def ok(self) -> bool:
        return not self.problems


@dataclass(frozen=True)
class Screening:
    checks: dict[str, ArrestorCheck] = field(hash=False)
    redundant: tuple[Arrestor, ...]
    proposals: dict[str, Arrestor] = field(hash=False)


def _rank(symbol: str) -> int:
    return ARRESTOR_SYMBOLS.index(symbol)


def _near(ctx: Context, node: str, radius_m: float) -> dict[str, float]:
    """Nodes within ``radius_m`` along the pipes of ``node``, with their distances (Dijkstra)."""
    seen: dict[str, float] = {}
    heap = [(0.0, node)]
    while heap:
        d, x = heapq.heappop(heap)
        if x in seen:
            continue
        seen[x] = d
        nbrs = list(ctx.children[x])
        if ctx.parent[x] is not None:
            nbrs.append(ctx.parent[x])  # type: ignore[arg-type]
        for y in nbrs:
            if y in seen:
                continue
            p = ctx.pipe_into[y] if ctx.parent.get(y) == x else ctx.pipe_into[x]
            nd = d + p.length_m
            if nd <= radius_m + 1e-9:
                heapq.heappush(heap, (nd, y))
    return seen


def _in_branch(ctx: Context, rec: ArrestorRecommendation, path: list[str]) -> bool:
    for i, a in enumerate(path):
        if a == rec.branch_start:
            return i == 0 or path[i - 1] in rec.legs
    return False


def screen(ctx: Context) -> Screening:
    """Match ``ctx.building.arrestors`` to ``ctx.schedule`` (module docstring)."""
    sched = ctx.schedule
    max_d = float(ctx.profile.params("arrestor.placement")["max_distance_m"])
    by_start: dict[str, list[ArrestorRecommendation]] = {}
    by_node: dict[str, list[ArrestorRecommendation]] = {}
    for r in sched.arrestors:
        by_start.setdefault(r.branch_start, []).append(r)
        by_node.setdefault(r.node, []).append(r)
    proposals = {a.id: a for a in ctx.building.arrestors}
    pairs: list[tuple[float, str, str]] = []
    for a in ctx.building.arrestors:
        path = ctx.path_up(a.node)
        cands: dict[str, ArrestorRecommendation] = {}
        for x in path:
            for r in by_start.get(x, ()):
                if r.side == a.side and _in_branch(ctx, r, path):
                    cands[r.id] = r
        for x in _near(ctx, a.node, max_d):
            for r in by_node.get(x, ()):
                if r.side == a.side:
                    cands[r.id] = r
        for r in cands.values():
            pairs.append((ctx.distance_m(a.node, r.node), a.id, r.id))
    pairs.sort()
    taken_a: dict[str, tuple[str, float]] = {}
    taken_r: dict[str, tuple[str, float]] = {}
    for d, aid, rid in pairs:
        if aid in taken_a or rid in taken_r:
            continue
        taken_a[aid] = (rid, d)
        taken_r[rid] = (aid, d)
    checks: dict[str, ArrestorCheck] = {}
    for r in sched.arrestors:
        if r.id in taken_r:
            aid, d = taken_r[r.id]
            a = proposals[aid]
            problems = []
            if d > max_d + 1e-9:
                problems.append("too-far")
            if a.size_class is not None:
                if _rank(a.size_class) < _rank(r.size_class):
                    problems.append("undersized")
            elif a.gas_volume_m3 is None:
                problems.append("no-size")
            if a.gas_volume_m3 is not None and r.gas_volume_m3 is not None \
                    and a.gas_volume_m3 < r.gas_volume_m3 * (1 - 1e-9):
                problems.append("gas-short")
            checks[r.id] = ArrestorCheck(r.id, aid, d, tuple(problems))
    # What is missing, and how to say it.
    protected_sides: dict[tuple[str, str], bool] = {}
    for r in sched.arrestors:
        if r.id in checks:
            for f in r.protects:
                protected_sides[(f, r.side)] = True
    for r in sched.arrestors:
        if r.id in checks:
            continue
        other = "hot" if r.side == "cold" else "cold"
        if any(protected_sides.get((f, other)) for f in r.protects):
            problem = "one-side"
        elif r.partner is not None and r.partner in taken_r:
            problem = "branch-second"
        else:
            problem = "missing"
        checks[r.id] = ArrestorCheck(r.id, None, None, (problem,))
    redundant = tuple(a for a in ctx.building.arrestors if a.id not in taken_a)
    return Screening(checks, redundant, proposals)


def protected_valves(ctx: Context) -> set[str]:
    """``"<fixture>:<side>"`` of every valve whose recommended arrestor is shown with no problem."""
    checks = ctx.screening.checks
    return {v for v, rid in ctx.schedule.by_valve.items() if checks[rid].ok}
