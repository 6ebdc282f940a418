"""The mitigation advisor: for each closure event over the limit, the options ranked by effect.

``advise(tree, analysis)`` takes the building's tree and its closed-form screen (``check``'s
analysis) and returns, for every event whose peak exceeds the limit, the smallest change of each
kind that would bring it under: a larger pipe on the branch, a slower closure, flexible pipe next
to the valve, a lower static pressure, an arrestor, a flow restrictor. Each option's new peak comes
from re-running the same screen on the changed building (the arrestor's from the energy method).
"""

from __future__ import annotations

import math
from collections.abc import Iterable

import networkx as nx

from knockproof.advice import pipe_options, valve_options
from knockproof.advice.context import Context
from knockproof.advice.results import COST_ORDER, EventAdvice, Option
from knockproof.advice.screen import EventScreen
from knockproof.physics.constants import PSI_PA
from knockproof.results import Analysis, EventResult

#: The default limit: the arrestor standards' 150 psi gauge [Pa].
DEFAULT_LIMIT_PA = 150.0 * PSI_PA

#: Said in every output of the advisor, beside the general caution.
ADVICE_CAUTION = (
    "Changing pipe size or material, valves or pressure zones is a design decision for a qualified "
    "person, and the change must meet local code. Each option's peak is a closed-form screening "
    "estimate for one valve closing; confirm the chosen change by simulation."
)


def rank_key(o: Option) -> tuple[int, int, float]:
    """Passing options first, then cheapest, then lowest new peak."""
    return (0 if o.passes else 1, COST_ORDER.index(o.cost), o.peak_pressure_pa)


def advise(
    tree: nx.DiGraph,
    analysis: Analysis,
    event_ids: Iterable[str] | None = None,
    limit_pa: float = DEFAULT_LIMIT_PA,
    include_passing: bool = False,
    most: int | None = None,
) -> tuple[EventAdvice, ...]:
    """Options for the events over the limit (or the events asked for), worst event first.

    Parameters
    ----------
    tree : networkx.DiGraph
        The building's tree (``network.build_tree``).
    analysis : Analysis
        The closed-form screen of that tree (``analysis.run.analyze_tree``).
    event_ids : iterable of str, optional
        Advise on these events (ids as in ``analysis.events``), whether or not they pass.
    limit_pa : float
        Peak-pressure limit [Pa gauge]; default 150 psi, the arrestor standards' basis.
    include_passing : bool
        Also list events already under the limit (they get no options: nothing needs to change).
    most : int, optional
        Advise on at most this many events, the worst first (the text report's ``--events``).

    Returns
    -------
    tuple of EventAdvice
        Worst peak first.

    Raises
    ------
    knockproof.errors.UsageError
        An unknown event id, or a limit that is not a positive pressure.
    """
    from knockproof.errors import UsageError

    if not (math.isfinite(limit_pa) and limit_pa > 0.0):
        raise UsageError(f"the limit must be a positive gauge pressure; found {limit_pa!r} Pa")
    by_id = {e.id: e for e in analysis.events}
    if event_ids is not None:
        wanted = list(dict.fromkeys(event_ids))
        unknown = [i for i in wanted if i not in by_id]
        if unknown:
            sample = ", ".join(list(by_id)[:4])
            raise UsageError(
                f"no event '{unknown[0]}' in {analysis.source or 'this building'}; event ids look "
                f"like '<fixture>:<side>' ({len(by_id)} events, e.g. {sample})"
            )
        chosen = [by_id[i] for i in wanted]
    else:
        chosen = [e for e in analysis.events if include_passing or e.peak_pressure_pa > limit_pa]
    chosen.sort(key=lambda e: (-e.peak_pressure_pa, e.id))
    if most is not None and most > 0:
        chosen = chosen[:most]
    return tuple(advise_event(tree, analysis, e, limit_pa) for e in chosen)


def events_over(analysis: Analysis, limit_pa: float) -> int:
    """How many of the analysis' events peak above ``limit_pa`` [Pa gauge]."""
    return sum(1 for e in analysis.events if e.peak_pressure_pa > limit_pa)


def advise_event(
    tree: nx.DiGraph, analysis: Analysis, event: EventResult, limit_pa: float = DEFAULT_LIMIT_PA
) -> EventAdvice:
    """The ranked options for one event (none if it is already at or under the limit)."""
    density = analysis.density_hot_kg_m3 if event.side == "hot" else analysis.density_cold_kg_m3
    notes: list[str] = []
    options: list[Option] = []
    amplifying = _amplifying_junction(event)
    if amplifying is not None:
        notes.append(
            f"At {amplifying} the wave passes into a pipe that carries it less easily and grows: "
            "the closed-form screen takes the peak from the pipe at the valve and may understate "
            "it here. Check this event by simulation."
        )
    if event.peak_pressure_pa > limit_pa:
        ctx = Context(EventScreen(tree, event), event, limit_pa, analysis.unit_system, density)
        for make in (
            valve_options.slower_closure,
            valve_options.lower_static,
            valve_options.flow_restrictor,
            valve_options.arrestor,
        ):
            options.append(make(ctx))
        larger = pipe_options.larger_pipe(ctx)
        if larger is not None:
            options.append(larger)
        flexible, note = pipe_options.flexible_pipe(ctx)
        if flexible is not None:
            options.append(flexible)
        if note:
            notes.append(note)
        options.sort(key=rank_key)
    return EventAdvice(
        event=event.id,
        fixture=event.fixture,
        kind=event.kind,
        side=event.side,
        node=event.node,
        label=event.label,
        unit_system=analysis.unit_system,
        peak_pressure_pa=event.peak_pressure_pa,
        static_pressure_pa=event.static_pressure_pa,
        surge_pa=event.surge_pa,
        limit_pa=limit_pa,
        options=tuple(options),
        notes=tuple(notes),
    )


def _amplifying_junction(event: EventResult) -> str | None:
    """The first node before the reflection node where the screen's surge grows, if any."""
    prev = None
    for point in event.path:
        if prev is not None and point.surge_pa > prev * (1.0 + 1e-9):
            return point.node
        if point.node == event.reflection_node:
            return None
        prev = point.surge_pa
    return None
