"""Surge rules: the peak pressure of every closure event against a limit, pipe and device ratings.

Which figure a verdict uses (:func:`knockproof.results.governing_peak`, :func:`node_peaks`): the
closed-form bound where no simulation ran; the simulated peak where the simulation covered the whole
event; otherwise the larger of the two. Every node the event reaches is judged (the worst node for the
peak limit, each pipe's two ends for its rating, each rated device's node), with that node's own
static pressure inside its peak. A valve counts as protected when the arrestor the schedule asks for
is shown with no problem: its peaks without arrestors are not held against it; where a simulation
with the arrestors ran, those peaks are checked.
"""

from __future__ import annotations

from collections.abc import Iterator, Mapping
from dataclasses import dataclass
from typing import Any

from knockproof.model.units import fmt
from knockproof.physics.constants import PSI_PA
from knockproof.results import EventResult, Figure, GoverningPeak, governing_peak, node_peaks
from knockproof.rules.context import Context
from knockproof.rules.engine import Finding, new_finding, rule
from knockproof.rules.screening import protected_valves


def _valve_ids(e: EventResult) -> list[str]:
    return [f"{f}:{e.side}" for f in e.fixtures]


@dataclass(frozen=True)
class _Judged:
    """One event as the surge rules judge it."""

    event: EventResult
    worst: GoverningPeak
    nodes: dict[str, tuple[float, Figure]]
    protected: bool


def _events(ctx: Context) -> Iterator[_Judged]:
    """Each event to check with its governing peak and its peaks node by node."""
    safe = protected_valves(ctx)
    for e in ctx.analysis.events:
        protected = all(v in safe for v in _valve_ids(e))
        worst = governing_peak(e, with_arrestors=protected)
        if worst is None:
            continue  # protected, and no simulation with the arrestors ran
        yield _Judged(e, worst, node_peaks(e, with_arrestors=protected), protected)


def _figure_text(figure: str) -> str:
    return {
        "simulated": "simulated",
        "closed-form": "closed-form bound",
        "simulated with arrestors": "simulated with arrestors",
    }.get(figure, figure)


def _event_where(ctx: Context, e: EventResult) -> dict[str, str]:
    desc = (
        ctx.fixture_description(list(e.fixtures))
        if all(f in ctx.fixtures for f in e.fixtures)
        else (e.label or e.node)
    )
    return {
        "event": e.id,
        "node": e.node,
        "fixture": ", ".join(e.fixtures),
        "side": e.side,
        "description": desc,
    }


@rule(
    "surge.peak-limit",
    "Peak pressure of every closure under 150 psi",
    "error",
    "The arrestor standards' basis: arrestors are rated and sized to hold surges to 150 psi "
    "(ASSE 1010 rating 150 psi, C, standards.globalspec.com; PDI-WH 201 basis, from memory).",
    {"limit_pa": 150.0 * PSI_PA},
    citation="ASSE 1010 (150 psi rating); PDI-WH 201 (from memory)",
)
def peak_limit(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """Each closure event's highest peak anywhere it reaches (static + surge at the worst node: the
    closed-form bound, the simulated peak where the simulation covered the whole event, else the
    larger of the two) against limit_pa, for valves without a proper arrestor; for protected valves
    only a simulated peak with the arrestors in place is checked. The finding names the node, and
    which figure was used and why."""
    u = ctx.unit_system
    limit = float(params["limit_pa"])
    for j in _events(ctx):
        e, worst = j.event, j.worst
        peak = worst.pressure_pa
        if peak <= limit * (1 + 1e-9):
            continue
        w = _event_where(ctx, e)
        state = "with its arrestor" if j.protected else "with no proper arrestor shown"
        at = "at the valve" if worst.node == e.node else f"at node {worst.node}"
        static = ctx.nodes[worst.node].static_pressure_pa if worst.node in ctx.nodes else None
        static_text = (
            f" (static {fmt(static, 'pressure', u, 0)} + surge)" if static is not None else ""
        )
        yield new_finding(
            "surge.peak-limit",
            w,
            f"closing {w['description']} ({e.side}) peaks at {fmt(peak, 'pressure', u, 0)} {at} "
            f"{state}{static_text}; limit {fmt(limit, 'pressure', u, 0)}. Figure: "
            f"{worst.reason}.",
            measured=peak,
            limit=limit,
            unit="Pa",
            recommendation="protect the valve with the scheduled arrestor; a slower-closing valve, "
            "lower velocity or lower static pressure also lowers the peak",
            figure=worst.reason,
        )


@rule(
    "surge.pipe-rating",
    "Peak pressure along each closure's path within the pipes' ratings",
    "error",
    "The pipe's pressure rating from the catalogue (the maker's or product standard's rating at "
    "the side's temperature).",
    {"rating_factor": 1.0},
    citation="pipe product standard or maker's rating (catalogue)",
)
def pipe_rating(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """For every closure event, the peak reaching each pipe whose ends the event reaches (the larger
    of the peaks at its two ends, each chosen as for the peak limit) against the pipe's rating times
    rating_factor; with arrestors in place only the simulated peaks count. One finding per pipe, for
    its worst event."""
    u = ctx.unit_system
    factor = float(params["rating_factor"])
    worst: dict[str, tuple[float, EventResult, Figure, bool]] = {}
    for j in _events(ctx):
        for pid, peak, figure in _pipe_peaks(ctx, j.nodes):
            rating = ctx.pipes[pid].pressure_rating_pa * factor
            if peak > rating * (1 + 1e-9) and peak > worst.get(pid, (0.0,))[0]:
                worst[pid] = (peak, j.event, figure, j.protected)
    for pid, (peak, e, figure, _protected) in sorted(worst.items()):
        r = ctx.pipes[pid]
        rating = r.pressure_rating_pa * factor
        label = r.label or ctx.node_label(r.downstream)
        desc = label or f"pipe {pid}"
        said = f", {label}" if label else ""
        yield new_finding(
            "surge.pipe-rating",
            {"pipe": pid, "node": r.downstream, "event": e.id, "side": r.side, "description": desc},
            f"pipe {pid} ({r.nominal_size} in {r.material}{said}) sees "
            f"{fmt(peak, 'pressure', u, 0)} when {e.id} closes ({_figure_text(figure)}); rated "
            f"{fmt(rating, 'pressure', u, 0)}.",
            measured=peak,
            limit=rating,
            unit="Pa",
            recommendation="protect the closing valve with its arrestor, or use pipe rated for "
            "the peak",
            figure=_figure_text(figure),
        )


def _pipe_peaks(
    ctx: Context, nodes: Mapping[str, tuple[float, Figure]]
) -> Iterator[tuple[str, float, Figure]]:
    """(pipe id, peak, figure) for each pipe with an end among ``nodes``: the larger end's peak."""
    seen: dict[str, tuple[float, Figure]] = {}
    for n, (p, fig) in nodes.items():
        ends = [ctx.pipe_into[n].id] if n in ctx.pipe_into else []
        ends += [ctx.pipe_into[c].id for c in ctx.children.get(n, ())]
        for pipe in ends:
            if p > seen.get(pipe, (-1e300,))[0]:
                seen[pipe] = (p, fig)
    for pid, (p, fig) in seen.items():
        yield pid, p, fig


def _device_nodes(ctx: Context, node: str, kind: str) -> list[str]:
    """The nodes whose pressure a device at ``node`` feels: its own, and for a water heater the
    outlets fed from it (the heater's hot connection is the hot side's supply node)."""
    nodes = [node]
    if kind == "water-heater":
        nodes += [
            s.node
            for s in ctx.building.supplies
            if s.kind == "heater-outlet" and s.fed_from == node
        ]
    return nodes


@rule(
    "surge.component-rating",
    "Highest pressure at each device within its rated working pressure",
    "error",
    "The device's own rating as the designer gives it (rating = ... in [[device]], from the maker's "
    "data); a device with no rating is not checked.",
    {"rating_factor": 1.0},
    citation="device maker's rated working pressure",
)
def component_rating(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """For every device with a rating: the highest pressure at its node (for a water heater also
    at the hot outlets it feeds) against the rating times rating_factor. The pressures looked at
    are the static pressure there and the peak there of every closure event that reaches the node
    (chosen as for the peak limit; with arrestors in place only the simulated peaks). One finding
    per device, for its worst case."""
    u = ctx.unit_system
    factor = float(params["rating_factor"])
    rated = [
        (d, d.rating_pa, _device_nodes(ctx, d.node, d.kind))
        for d in ctx.building.devices
        if d.rating_pa is not None
    ]
    # node -> (pressure [Pa], the closure that brings it (None: static), figure)
    at: dict[str, list[tuple[float, EventResult | None, str]]] = {
        n: [(ctx.nodes[n].static_pressure_pa, None, "")]
        for _, _, nodes in rated
        for n in nodes
        if n in ctx.nodes
    }
    if not at:
        return
    for j in _events(ctx):
        for n in at.keys() & j.nodes.keys():
            p, fig = j.nodes[n]
            at[n].append((p, j.event, _figure_text(fig)))
    for d, rating_pa, nodes in rated:
        cases = [c for n in nodes for c in at.get(n, ())]
        if not cases:
            continue
        peak, worst, figure = max(cases, key=lambda c: c[0])
        rating = rating_pa * factor
        if peak <= rating * (1 + 1e-9):
            continue
        what = "at rest (static pressure)" if worst is None else f"when {worst.id} closes ({figure})"
        yield new_finding(
            "surge.component-rating",
            {"device": d.id, "node": d.node, "description": f"{d.kind} {d.id}"}
            | ({} if worst is None else {"event": worst.id}),
            f"{d.kind} {d.id} (node {d.node}) sees {fmt(peak, 'pressure', u, 0)} {what}; rated "
            f"{fmt(rating, 'pressure', u, 0)}.",
            measured=peak,
            limit=rating,
            unit="Pa",
            recommendation="protect the closing valves whose surges reach it with their arrestors, "
            "lower the static pressure (a pressure-reducing valve), or choose a device rated for "
            "the peak"
            if worst is not None
            else "lower the static pressure (a pressure-reducing valve) or "
            "choose a device rated for it",
            figure=figure,
        )


@rule(
    "surge.arrestor-raises-peak",
    "Scheduled arrestors that raise a closure's simulated peak",
    "warning",
    "Physics of a gas cushion on a water column: the gas is a spring and the column a mass, so a "
    "cushion that is soft against a slow or low-velocity closure rings with the column and can "
    "overshoot the bare line's peak (Wylie & Streeter, Fluid Transients in Systems, 1993, on air "
    "chambers; from memory). Our rule: the simulation with and without the arrestors compared.",
    {"min_rise_pa": 0.5 * PSI_PA},
    citation="knockproof screening aid (no code)",
)
def arrestor_raises_peak(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """For every event simulated both bare and with its scheduled arrestors, where the highest
    simulated pressure anywhere with the arrestors exceeds the bare one by more than min_rise_pa:
    say so and why, whatever the limit (the schedule's gas volume is then no protection for this
    closure)."""
    u = ctx.unit_system
    rise_min = float(params["min_rise_pa"])
    for e in ctx.analysis.events:
        bare = e.simulated_worst_node_pressure_pa or e.simulated_peak_pressure_pa
        with_a = e.simulated_worst_node_with_arrestors_pa or e.simulated_peak_with_arrestors_pa
        if bare is None or with_a is None or with_a - bare <= rise_min:
            continue
        w = _event_where(ctx, e)
        node = e.simulated_worst_node_with_arrestors or e.node
        yield new_finding(
            "surge.arrestor-raises-peak",
            w,
            f"with the scheduled arrestors, closing {w['description']} ({e.side}) peaks at "
            f"{fmt(with_a, 'pressure', u, 0)} (node {node}), above "
            f"{fmt(bare, 'pressure', u, 0)} without them: the arrestor's gas spring rings with "
            f"the water column ({e.closure} closure, {fmt(e.closure_time_s, 'time', u, 0)} against "
            f"2L/a {fmt(e.critical_time_s, 'time', u, 1)}).",
            measured=with_a,
            limit=bare,
            unit="Pa",
            recommendation="check the arrestor's size and place against the maker's data for this "
            "closure; a larger gas volume or an arrestor nearer the valve damps the ringing",
            figure="simulated with and without the arrestors",
        )
