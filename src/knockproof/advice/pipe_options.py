"""Options in the piping: a larger pipe on the branch, or flexible (PEX) pipe next to the valve.

Both change the pipes between the closing valve and its reflection node (the tee where the wave
meets a larger pipe, or the supply) and re-run the closed-form screen on the changed building.
Sizes come from the catalogue, so both are solved by trying the candidates in turn, smallest
change first.

A flexible tail is credited only in whole pipes, up to a junction that relieves the wave. The
screen takes a rapid closure's surge from the pipe at the valve alone (docs/methods.md §8). Where
a short PEX tail meets the same size of metal pipe, the metal carries the wave less easily (its
admittance A/a is smaller), so the junction sends the wave back up the PEX (transmission above 1)
and the pressure at the valve builds towards the metal pipe's Joukowsky rise within a few round
trips of the tail. The screen would credit any tail, however short, with the full effect of PEX.
So the advisor counts a PEX run only where its upper end is the supply or a junction whose
transmission into the rest is at most 1 (the wave leaves it weaker); docs/advisor.md shows the
simulation that led to this rule.
"""

from __future__ import annotations

import math
from dataclasses import replace
from fractions import Fraction

from knockproof import catalog
from knockproof.advice.context import Context
from knockproof.advice.results import Cost, Option, Threshold
from knockproof.advice.screen import Screened, branch_edges
from knockproof.advice.wording import nominal_inches, pipe_list, show, size_change
from knockproof.model.building import Pipe
from knockproof.physics import surge

#: Flexible pipe put in next to the valve.
FLEXIBLE_MATERIAL = "pex-sdr9"

#: Largest branch size tried where the branch runs back to the supply (no main to stay under).
#: Our choice (K): a fixture branch larger than 2 in is not a plausible change.
LARGEST_BRANCH_FROM_SUPPLY = Fraction(2)


def _resized(p: Pipe, material: str, nominal: str) -> Pipe:
    s = catalog.get_size(material, nominal)
    return replace(
        p,
        material=material,
        nominal_size=s.nominal,
        inside_diameter_m=s.inside_diameter_m,
        outside_diameter_m=s.outside_diameter_m,
        wall_m=s.wall_m,
    )


def _size_at_least(material: str, target: Fraction) -> str | None:
    for s in catalog.sizes(material):
        if nominal_inches(s.nominal) >= target:
            return s.nominal
    return None


def _within_rating(screened: Screened, pipe_ids: list[str]) -> bool:
    peak = screened.event.peak_pressure_pa
    return all(peak <= screened.analysis.pipe(i).pressure_rating_pa for i in pipe_ids)


def _length(pipes: list[Pipe]) -> float:
    return math.fsum(p.length_m for p in pipes)


def larger_pipe(ctx: Context) -> Option | None:
    """The smallest catalogue size on the branch (valve to reflection node) that passes.

    Every branch pipe smaller than the candidate size is raised to it (to the nearest size its own
    material is made in at or above it). Candidates run from the next size above the pipe at the
    valve up to the size of the main the branch tees into (2 in where it runs back to the supply).
    """
    tree, ev, u = ctx.tree, ctx.event, ctx.unit_system
    edges: list[tuple[str, str]] = []
    for node in (ev.node, *[n for n in ctx.member_nodes if n != ev.node]):
        for e in branch_edges(tree, node, ev.reflection_node):
            if e not in edges:
                edges.append(e)
    pipes = [ctx.screen.pipes[tree.edges[e]["id"]] for e in edges]
    first = pipes[0]
    now = nominal_inches(first.nominal_size)
    preds = list(tree.predecessors(ev.reflection_node))
    cap = (
        nominal_inches(tree.edges[preds[0], ev.reflection_node]["pipe"].nominal_size)
        if preds
        else LARGEST_BRANCH_FROM_SUPPLY
    )
    larger = [s.nominal for s in catalog.sizes(first.material) if nominal_inches(s.nominal) > now]
    if not larger:
        return None
    candidates = [s for s in larger if nominal_inches(s) <= cap] or larger[:1]
    cost: Cost = "high"
    where = "the tee on the main" if preds else "the supply"
    method = "catalogue sizes in turn, smallest first"

    def attempt(size: str) -> tuple[Screened, list[Pipe], list[Pipe]]:
        target = nominal_inches(size)
        old, new = [], []
        for p in pipes:
            if nominal_inches(p.nominal_size) < target:
                to = _size_at_least(p.material, target)
                if to is not None and to != p.nominal_size:
                    old.append(p)
                    new.append(_resized(p, p.material, to))
        screened = ctx.run(ctx.screen.changed(pipes={p.id: p for p in new}))
        return screened, old, new

    last = None
    for size in candidates:
        screened, old, new = attempt(size)
        last = (size, screened, old, new)
        ok = ctx.under_limit(screened.event.peak_pressure_pa) and _within_rating(
            screened, [p.id for p in new]
        )
        if ok:
            break
    assert last is not None
    size, screened, old, new = last
    peak = screened.event.peak_pressure_pa
    passes = ctx.under_limit(peak) and _within_rating(screened, [p.id for p in new])
    ids = [p.id for p in old]
    change = (
        f"{size_change([p.nominal_size for p in old], size, u)} on {pipe_list(ids)} "
        f"({show(_length(old), 'length', u)})" + ("" if passes else " (not enough)")
    )
    work = (
        f"Re-pipe {show(_length(old), 'length', u)} of the branch from the valve back to "
        f"{where} ({ev.reflection_node}): in an existing building that means opening walls or "
        "ceilings. A larger pipe slows the water, so the surge falls, and it also lowers the "
        "friction loss."
    )
    if passes:
        text = (
            f"{size_change([p.nominal_size for p in old], size, u)} pipe on the branch would "
            f"keep this under {ctx.limit_text}"
        )
        value: str | None = size
    else:
        text = f"no size up to {candidates[-1]} in on the branch keeps this under {ctx.limit_text}"
        value = None
        if ctx.under_limit(peak):
            text += " within the new pipe's pressure rating"
    return Option(
        "larger-pipe",
        change,
        peak,
        passes,
        cost,
        work,
        Threshold(
            "nominal_size",
            "at-least",
            value,
            first.nominal_size,
            candidates[-1],
            method,
            None,
            text,
        ),
    )


def _relieves(screened: Screened, ctx: Context, node: str, incoming: str) -> bool:
    """Whether a wave arriving at ``node`` along pipe ``incoming`` leaves it no stronger.

    True at a supply; else the junction's transmission 2 Y_in / sum(Y) (Y = A/a, from the
    re-run's pipe results) is at most 1.
    """
    tree = ctx.tree
    preds = list(tree.predecessors(node))
    if not preds:
        return True
    results = screened.analysis

    def y(pid: str) -> float:
        r = results.pipe(pid)
        return surge.admittance(math.pi * r.inside_diameter_m**2 / 4.0, r.wave_speed_m_per_s)

    others = [tree.edges[node, w]["id"] for w in tree.successors(node)]
    others = [i for i in others if i != incoming] + [tree.edges[preds[0], node]["id"]]
    t = surge.junction_transmission([y(incoming), *[y(i) for i in others]], 0)
    return t <= 1.0 + 1e-12


def flexible_pipe(ctx: Context) -> tuple[Option | None, str | None]:
    """The shortest run of PEX (whole pipes, from the valve back) that passes, and a note.

    Each pipe of the branch is replaced, nearest the valve first, by ``pex-sdr9`` of the same
    nominal size; a run is credited only where its upper end relieves the wave (see the module
    docstring). Returns ``(None, note)`` when the option does not apply.
    """
    tree, ev, u = ctx.tree, ctx.event, ctx.unit_system
    edges = branch_edges(tree, ev.node, ev.reflection_node)
    pipes = [ctx.screen.pipes[tree.edges[e]["id"]] for e in edges]
    flexible = catalog.get_material(FLEXIBLE_MATERIAL)
    if catalog.get_material(pipes[0].material).family == flexible.family:
        return (
            None,
            "The pipe at the valve is already PEX; the flexible-pipe option does not apply.",
        )
    made = {s.nominal for s in catalog.sizes(FLEXIBLE_MATERIAL)}
    cost: Cost = "medium"
    method = (
        "whole pipes from the valve back, shortest run first; a run is credited only where "
        "its upper end relieves the wave"
    )
    new: list[Pipe] = []
    tried: list[tuple[float, Screened, list[Pipe], str, bool]] = []
    for (up, _down), p in zip(edges, pipes, strict=True):
        if catalog.get_material(p.material).family == flexible.family:
            new.append(p)
        elif p.nominal_size in made:
            new.append(_resized(p, FLEXIBLE_MATERIAL, p.nominal_size))
        else:
            break
        screened = ctx.run(ctx.screen.changed(pipes={q.id: q for q in new}))
        credited = _relieves(screened, ctx, up, p.id)
        tried.append((_length(new), screened, list(new), up, credited))
        if (
            credited
            and ctx.under_limit(screened.event.peak_pressure_pa)
            and _within_rating(screened, [q.id for q in new])
        ):
            break
    if not tried:
        return None, (
            f"PEX is not made in {pipes[0].nominal_size} in: the flexible-pipe option "
            "does not apply."
        )
    credited_runs = [t for t in tried if t[4]]
    length, screened, run, top, _ok = credited_runs[-1] if credited_runs else tried[-1]
    # A run that is not credited is given no effect: the peak stays as the building stands.
    peak = screened.event.peak_pressure_pa if credited_runs else ev.peak_pressure_pa
    rating = min(screened.analysis.pipe(q.id).pressure_rating_pa for q in run)
    in_rating = peak <= rating
    passes = bool(credited_runs) and ctx.under_limit(peak) and in_rating
    ids = [q.id for q in run]
    v_old = ev.velocity_m_per_s
    v_new = screened.event.velocity_m_per_s
    work = (
        f"Replace the pipe next to the valve with PEX tubing (ASTM F876/F877, SDR 9) of the "
        f"same nominal size: its wall gives, so the surge is lower, but its bore is smaller "
        f"(velocity {v_new / v_old - 1.0:+.0%}). It is rated {ctx.p(rating)} on this side; "
        "it needs access to the run, and support and protection as the code requires."
    )
    change = (
        f"last {show(length, 'length', u)} in PEX, {pipe_list(ids)} from the valve back "
        f"to {top}"
        + ("" if passes else " (not credited)" if not credited_runs else " (not enough)")
    )
    note = None
    if passes:
        text = (
            f"PEX over at least the last {show(length, 'length', u)} (back to {top}) would "
            f"keep this under {ctx.limit_text}"
        )
        value: float | None = length
    else:
        value = None
        if not credited_runs:
            text = (
                "no run of PEX on this branch is credited: where it would meet the rest of "
                "the branch, the junction sends the wave back up the PEX and the pressure "
                "builds"
            )
            note = (
                "A PEX tail on this branch is not credited: where it meets the metal pipe "
                "the junction strengthens the wave, which the closed-form screen does not "
                "capture. Check it by simulation if it is wanted."
            )
        elif not in_rating:
            text = (
                f"PEX back to {top} would peak at {ctx.p(peak)}, over its pressure rating "
                f"({ctx.p(rating)})"
            )
        else:
            text = (
                f"PEX on the whole branch back to {top} still peaks at {ctx.p(peak)}, over "
                f"{ctx.limit_text}"
            )
    return (
        Option(
            "flexible-pipe",
            change,
            peak,
            passes,
            cost,
            work,
            Threshold(
                "flexible_length_m", "at-least", value, 0.0, _length(pipes), method, None, text
            ),
        ),
        note,
    )
