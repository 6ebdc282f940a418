"""Surge rules: the peak pressure of every closure event against a limit, pipe and device ratings.

A valve counts as protected when the arrestor the schedule asks for is shown with no problem. A
protected valve's closed-form peak (computed without arrestors) is not held against it; where a
simulation with the arrestors ran (``simulated_peak_with_arrestors_pa``) that peak is checked.
"""

from __future__ import annotations

from collections.abc import Iterator, Mapping
from typing import Any

from knockproof.model.units import fmt
from knockproof.physics.constants import PSI_PA
from knockproof.results import EventResult
from knockproof.rules.context import Context
from knockproof.rules.engine import Finding, new_finding, rule
from knockproof.rules.schedule import event_peak_pa
from knockproof.rules.screening import protected_valves


def _valve_ids(e: EventResult) -> list[str]:
    return [f"{f}:{e.side}" for f in e.fixtures]


def _events(ctx: Context) -> Iterator[tuple[EventResult, float, bool]]:
    """(event, peak at the valve [Pa], protected) for the events to check."""
    safe = protected_valves(ctx)
    for e in ctx.analysis.events:
        protected = all(v in safe for v in _valve_ids(e))
        if protected:
            if e.simulated_peak_with_arrestors_pa is None:
                continue
            yield e, e.simulated_peak_with_arrestors_pa, True
        else:
            yield e, event_peak_pa(e), False


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
)
def peak_limit(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """Each closure event's peak at the valve (static + surge; the simulated peak where a simulation
    ran) against limit_pa, for valves without a proper arrestor; for protected valves only a
    simulated peak with the arrestors in place is checked."""
    u = ctx.unit_system
    limit = float(params["limit_pa"])
    for e, peak, protected in _events(ctx):
        if peak <= limit * (1 + 1e-9):
            continue
        w = _event_where(ctx, e)
        state = "with its arrestor (simulated)" if protected else "with no proper arrestor shown"
        yield new_finding(
            "surge.peak-limit",
            w,
            f"closing {w['description']} ({e.side}) peaks at {fmt(peak, 'pressure', u, 0)} "
            f"{state}; limit {fmt(limit, 'pressure', u, 0)} (static "
            f"{fmt(e.static_pressure_pa, 'pressure', u, 0)} + surge).",
            measured=peak,
            limit=limit,
            unit="Pa",
            recommendation="protect the valve with the scheduled arrestor; a slower-closing valve, "
            "lower velocity or lower static pressure also lowers the peak",
        )


@rule(
    "surge.pipe-rating",
    "Peak pressure along each closure's path within the pipes' ratings",
    "error",
    "The pipe's pressure rating from the catalogue (the maker's or product standard's rating at "
    "the side's temperature).",
    {"rating_factor": 1.0},
)
def pipe_rating(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """For every unprotected closure event, the peak reaching each pipe on its path back to the
    supply (the larger of the peaks at its two ends; at the valve the simulated peak where one ran)
    against the pipe's rating times rating_factor. One finding per pipe, for its worst event."""
    u = ctx.unit_system
    factor = float(params["rating_factor"])
    worst: dict[str, tuple[float, EventResult]] = {}
    for e, peak_valve, protected in _events(ctx):
        pts = e.path
        # With arrestors in place only the valve's simulated peak is known: check its pipe alone.
        last = 1 if protected else len(pts) - 1
        for k in range(min(last, len(pts) - 1)):
            pipe = ctx.pipe_into.get(pts[k].node)
            if pipe is None:
                continue
            lower = peak_valve if k == 0 else pts[k].peak_pressure_pa
            peak = lower if protected else max(lower, pts[k + 1].peak_pressure_pa)
            rating = ctx.pipes[pipe.id].pressure_rating_pa * factor
            if peak > rating * (1 + 1e-9) and peak > worst.get(pipe.id, (0.0, e))[0]:
                worst[pipe.id] = (peak, e)
    for pid, (peak, e) in worst.items():
        r = ctx.pipes[pid]
        rating = r.pressure_rating_pa * factor
        label = r.label or ctx.node_label(r.downstream)
        desc = label or f"pipe {pid}"
        said = f", {label}" if label else ""
        yield new_finding(
            "surge.pipe-rating",
            {"pipe": pid, "node": r.downstream, "event": e.id, "side": r.side, "description": desc},
            f"pipe {pid} ({r.nominal_size} in {r.material}{said}) sees "
            f"{fmt(peak, 'pressure', u, 0)} when {e.id} closes; rated "
            f"{fmt(rating, 'pressure', u, 0)}.",
            measured=peak,
            limit=rating,
            unit="Pa",
            recommendation="protect the closing valve with its arrestor, or use pipe rated for "
            "the peak",
        )


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
)
def component_rating(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """For every device with a rating: the highest pressure at its node (for a water heater also
    at the hot outlets it feeds) against the rating times rating_factor. The pressures looked at
    are the static pressure there and the closed-form peak of every unprotected closure whose path
    back to its supply passes the node (the simulated peak where the node is the valve's own); a
    protected closure counts only with its simulated peak, at its valve. One finding per device,
    for its worst case."""
    u = ctx.unit_system
    factor = float(params["rating_factor"])
    rated = [
        (d, d.rating_pa, _device_nodes(ctx, d.node, d.kind))
        for d in ctx.building.devices
        if d.rating_pa is not None
    ]
    # node -> (pressure [Pa], the closure that brings it, None for static pressure)
    at: dict[str, list[tuple[float, EventResult | None]]] = {
        n: [(ctx.nodes[n].static_pressure_pa, None)]
        for _, _, nodes in rated
        for n in nodes
        if n in ctx.nodes
    }
    if not at:
        return
    for e, peak_valve, protected in _events(ctx):
        for k, pt in enumerate(e.path):
            if pt.node in at and (k == 0 or not protected):
                at[pt.node].append((peak_valve if k == 0 else pt.peak_pressure_pa, e))
    for d, rating_pa, nodes in rated:
        cases = [c for n in nodes for c in at.get(n, ())]
        if not cases:
            continue
        peak, worst = max(cases, key=lambda c: c[0])
        rating = rating_pa * factor
        if peak <= rating * (1 + 1e-9):
            continue
        what = "at rest (static pressure)" if worst is None else f"when {worst.id} closes"
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
        )
