"""Arrestor rules: required, placement, branch length, size class, gas volume, both sides,
redundant.

The schedule (:mod:`knockproof.rules.schedule`) says what the building needs; the screening
(:mod:`knockproof.rules.screening`) matches the designer's arrestors to it. These rules turn the
screening into findings. Their parameters also shape the schedule (the profile sets them once).
"""

from __future__ import annotations

from collections.abc import Iterator, Mapping
from typing import Any

from knockproof.model.units import fmt, to_display, unit_label
from knockproof.physics.constants import ATM_PA, FT_M, PSI_PA
from knockproof.physics.gas_cushion import ARRESTOR_POLYTROPIC_EXPONENT
from knockproof.rules.context import Context
from knockproof.rules.engine import Finding, new_finding, rule
from knockproof.rules.schedule import ArrestorRecommendation

LIMIT_150_PSI_PA = 150.0 * PSI_PA


def show_volume(value_m3: float, unit_system: str) -> str:
    """A gas volume in the user's unit, three significant figures (volumes span decades)."""
    return f"{to_display(value_m3, 'volume', unit_system):.3g} {unit_label('volume', unit_system)}"


def _where(ctx: Context, r: ArrestorRecommendation, arrestor: str | None = None) -> dict[str, str]:
    w = {"node": r.node, "side": r.side, "fixture": ", ".join(r.protects),
         "event": ", ".join(r.valves), "description": r.description}
    if arrestor is not None:
        w["arrestor"] = arrestor
    return w


def _install(ctx: Context, r: ArrestorRecommendation) -> str:
    gas = "" if r.gas_volume_m3 is None else \
        f", gas volume at least {show_volume(r.gas_volume_m3, ctx.unit_system)}"
    return f"install a class {r.size_class} arrestor ({r.side}) at node {r.node}{gas}"


def _what(r: ArrestorRecommendation) -> str:
    where = {"at-valve": "at the valve", "branch-end": "at the end of its branch",
             "branch-middle": "near the middle of its branch"}[r.position]
    return f"{r.id}, class {r.size_class}, {r.side} side, {where}"


def _checks(ctx: Context, problem: str) -> Iterator[tuple[ArrestorRecommendation, Any]]:
    checks = ctx.screening.checks
    for r in ctx.schedule.arrestors:
        c = checks[r.id]
        if problem in c.problems:
            yield r, c


@rule(
    "arrestor.required",
    "An arrestor at every quick-closing valve, hot and cold sides",
    "error",
    "Model code, from memory: IPC 604.9 and UPC 609.10 require water-hammer arrestors (ASSE 1010) "
    "where quick-closing valves are used.",
    {"only_when_peak_exceeds_limit": False, "limit_pa": LIMIT_150_PSI_PA},
    citation="IPC 2021 §604.9; UPC 2021 §609.10 (from memory); ASSE 1010",
)
def required(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """Every quick-closing valve needs protection, each side apart (the model code's wording).
    With only_when_peak_exceeds_limit, only valves whose closure event peaks above limit_pa
    (simulated peak where a simulation ran, else the closed-form one) do. A recommended arrestor
    with nothing shown for it is a finding (unless the other side or the other arrestor of its
    long branch is shown: arrestor.both-sides and arrestor.branch-length say those)."""
    for r, _c in _checks(ctx, "missing"):
        n = len(r.valves)
        what = "its valve closes" if n == 1 else f"its {n} valves close"
        yield new_finding(
            "arrestor.required", _where(ctx, r),
            f"no arrestor shown for {r.description} ({r.side}); {what} quickly. "
            f"Needed: {_what(r)}.",
            recommendation=_install(ctx, r),
        )


@rule(
    "arrestor.placement",
    "A shown arrestor sits close to where the schedule puts it",
    "error",
    "Common practice: 'as close as possible to the quick-closing valve' (UPC 609.10 wording, from "
    "memory); no code gives a distance, the default is our choice.",
    {"max_distance_m": 6.0 * FT_M},
    citation="common practice (UPC 2021 §609.10 wording, from memory)",
)
def placement(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """Distance along the pipes from the shown arrestor to the node the schedule recommends: at the
    valve for a single valve, between the last two fixtures for a branch, near the middle for the
    first arrestor of a long branch. Over max_distance_m is a finding."""
    u = ctx.unit_system
    for r, c in _checks(ctx, "too-far"):
        yield new_finding(
            "arrestor.placement", _where(ctx, r, c.proposal),
            f"arrestor {c.proposal} is {fmt(c.distance_m, 'length', u)} along the pipes from node "
            f"{r.node}, where {r.description} ({r.side}) needs it; at most "
            f"{fmt(params['max_distance_m'], 'length', u)}.",
            measured=c.distance_m, limit=float(params["max_distance_m"]), unit="m",
            recommendation=f"move arrestor {c.proposal} to node {r.node}",
        )


@rule(
    "arrestor.branch-length",
    "A branch over 20 ft takes two arrestors, one near the middle and one at the end",
    "error",
    "The arrestor standard's placement rule (PDI-WH 201, from memory): branch up to "
    "20 ft, one arrestor at the end between the last two fixtures; longer, two whose ratings "
    "together cover the branch.",
    {"single_arrestor_max_branch_m": 20.0 * FT_M},
    citation="PDI-WH 201 placement rule (from memory)",
)
def branch_length(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """A branch runs from its tee (the node where the valves' pressure waves reflect off a larger
    pipe) to its last fixture. Longer than single_arrestor_max_branch_m, it takes two arrestors
    unless all its fixtures lie within that distance of the end one. A finding when one of the two
    is shown and the other is not."""
    u = ctx.unit_system
    for r, _c in _checks(ctx, "branch-second"):
        other = ctx.screening.checks[r.partner].proposal if r.partner else None
        yield new_finding(
            "arrestor.branch-length", _where(ctx, r),
            f"the branch from node {r.branch_start} is {fmt(r.branch_length_m, 'length', u)} long "
            f"(over {fmt(params['single_arrestor_max_branch_m'], 'length', u)}): it needs two "
            f"arrestors; {other} is shown, the second ({_what(r)}) is not.",
            measured=r.branch_length_m, limit=float(params["single_arrestor_max_branch_m"]),
            unit="m", recommendation=_install(ctx, r),
        )


@rule(
    "arrestor.size-class",
    "Size class by fixture units (AA for a single residential appliance)",
    "error",
    "Size classes and fixture-unit weights of the arrestor standards PDI-WH 201 / ASSE 1010 "
    "(classes C, pmmag.com; ranges and weights from memory); AA for single residential "
    "appliances (ASSE 1010, C); separate hot and cold lines take 3/4 of a fixture's weight (from "
    "memory).",
    {
        "separate_lines_factor": 0.75,
        "aa_for_single_residential_appliance": True,
        "single_appliance_kinds": ["clothes-washer", "dishwasher", "ice-maker"],
    },
    citation="PDI-WH 201; ASSE 1010 (sizes and fixture-unit method)",
)
def size_class(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """The load of an arrestor is the sum of the standard's weights of the valves it protects
    (public or private use), times separate_lines_factor for a fixture with both hot and cold
    supplies; the class is the smallest whose range holds it. A private-use appliance of
    single_appliance_kinds alone takes class AA (at its own valve when
    aa_for_single_residential_appliance). Findings: a shown arrestor of a smaller class, or with
    neither class nor gas volume; a load beyond class F."""
    for r, c in _checks(ctx, "undersized"):
        shown = ctx.screening.proposals[c.proposal].size_class
        yield new_finding(
            "arrestor.size-class", _where(ctx, r, c.proposal),
            f"arrestor {c.proposal} is class {shown}; {r.description} ({r.side}) needs class "
            f"{r.size_class} ({r.fixture_units:g} fixture units).",
            recommendation=f"use a class {r.size_class} arrestor at node {r.node}",
        )
    for r, c in _checks(ctx, "no-size"):
        yield new_finding(
            "arrestor.size-class", _where(ctx, r, c.proposal),
            f"arrestor {c.proposal} shows neither a size class nor a gas volume; "
            f"{r.description} ({r.side}) needs class {r.size_class}.",
            recommendation=f"state class {r.size_class} for arrestor {c.proposal}",
        )
    for r in ctx.schedule.arrestors:
        if r.beyond_largest_class:
            yield new_finding(
                "arrestor.size-class", _where(ctx, r),
                f"{r.fixture_units:g} fixture units on one arrestor exceed class F's range.",
                recommendation="split the branch between more arrestors",
            )


@rule(
    "arrestor.gas-volume",
    "Gas volume by the energy method holds the surge to the limit",
    "error",
    "Energy method (Dawson & Kalinske, J. AWWA 1939, from memory; formula in docs/sources.md): the water "
    "column's kinetic energy compresses the gas from P1 (static, absolute) to P2 (the limit, "
    "absolute); polytropic, n = 1.4 by default (rapid, nearly adiabatic compression).",
    {"polytropic_exponent": ARRESTOR_POLYTROPIC_EXPONENT, "limit_pa": LIMIT_150_PSI_PA,
     "atmospheric_pa": ATM_PA},
    validate=lambda p: [] if 1.0 <= p["polytropic_exponent"] <= 5.0 / 3.0 else
    [("polytropic_exponent", f"must be from 1 (isothermal) to 5/3, found "
      f"{p['polytropic_exponent']:g}")],
)
def gas_volume(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """KE = sum of 1/2 rho L Q^2 / A over the pipes from the valve back to its supply (the whole
    column, conservative), for the largest single valve an arrestor protects;
    V1 = KE / (P1 [(r^((n-1)/n) - 1)/(n-1) - (1 - r^(-1/n))]), r = P2/P1, P1 the static pressure
    at the arrestor and P2 limit_pa, both absolute (plus atmospheric_pa); V1 is the gas volume at
    that static pressure. The simulation takes the same gas: that volume at the static pressure,
    brought to the flowing pressure at its node before the closure, then compressed with the
    default exponent 1.4 (a profile that changes polytropic_exponent changes the sizing only).
    Findings: a shown gas volume below V1; a node where the static pressure already reaches the
    limit (no cushion can hold the surge under it)."""
    u = ctx.unit_system
    for r, c in _checks(ctx, "gas-short"):
        shown = ctx.screening.proposals[c.proposal].gas_volume_m3
        assert shown is not None and r.gas_volume_m3 is not None  # a gas-short pair has both
        yield new_finding(
            "arrestor.gas-volume", _where(ctx, r, c.proposal),
            f"arrestor {c.proposal} holds {show_volume(shown, u)} of gas; the energy method "
            f"needs {show_volume(r.gas_volume_m3, u)} to keep the surge under "
            f"{fmt(params['limit_pa'], 'pressure', u, 0)}.",
            measured=shown, limit=r.gas_volume_m3, unit="m3",
            recommendation=f"use an arrestor with at least "
            f"{show_volume(r.gas_volume_m3, u)} of gas",
        )
    for r in ctx.schedule.arrestors:
        if r.gas_volume_m3 is None:
            yield new_finding(
                "arrestor.gas-volume", _where(ctx, r),
                f"static pressure at node {r.node} is "
                f"{fmt(r.static_pressure_pa, 'pressure', u, 0)}, "
                f"at or above the surge limit {fmt(params['limit_pa'], 'pressure', u, 0)}: no gas "
                "cushion can keep the peak under it.",
                measured=r.static_pressure_pa, limit=float(params["limit_pa"]), unit="Pa",
                recommendation="lower the static pressure (a pressure-reducing valve) first",
            )


@rule(
    "arrestor.both-sides",
    "Hot and cold sides both protected",
    "error",
    "The arrestor standard's practice, from memory: hot and cold are sized separately "
    "and both protected.",
    citation="PDI-WH 201 practice (from memory)",
)
def both_sides(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """A finding where the schedule needs an arrestor on one side of some fixtures, nothing is shown
    there, and the other side of the same fixtures has its arrestor."""
    for r, _c in _checks(ctx, "one-side"):
        other = "cold" if r.side == "hot" else "hot"
        yield new_finding(
            "arrestor.both-sides", _where(ctx, r),
            f"{r.description}: the {other} side has an arrestor, the {r.side} side has none. "
            f"Needed: {_what(r)}.",
            recommendation=_install(ctx, r),
        )


@rule(
    "arrestor.redundant",
    "A shown arrestor that no requirement asks for",
    "info",
    "Screening aid (our own): an arrestor the schedule does not call for is not wrong, but it may "
    "sit where the designer meant another.",
    citation="knockproof screening aid (no code)",
)
def redundant(ctx: Context, params: Mapping[str, Any]) -> Iterator[Finding]:
    """A shown arrestor that answers no recommended one (none on its side within its branch or
    within the placement distance, or all those are answered by nearer arrestors)."""
    for a in ctx.screening.redundant:
        label = ctx.node_description(a.node)
        yield new_finding(
            "arrestor.redundant",
            {"node": a.node, "side": a.side, "arrestor": a.id, "description": label},
            f"arrestor {a.id} ({a.side}, {label}) answers no quick-closing valve's requirement.",
            recommendation="check whether it was meant for another place; otherwise it may go",
        )
