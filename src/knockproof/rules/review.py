"""The one entry: ``review(tree, analysis, profile=None) -> Review``.

Runs every rule the profile switches on over one building, and screens the designer's arrestors
against the schedule. The building fails when any finding is an error.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Literal

import networkx as nx

from knockproof.results import Analysis
from knockproof.rules.context import Context
from knockproof.rules.engine import SEVERITIES, Finding, registry
from knockproof.rules.profiles import Profile, bundled_profile, bundled_profiles, load_profile
from knockproof.rules.schedule import ArrestorRecommendation
from knockproof.rules.screening import PROBLEM_RULE

Verdict = Literal["pass", "fail"]


@dataclass(frozen=True)
class ValveVerdict:
    """The verdict on one quick-closing valve (one side of one fixture).

    ``status`` is ``"protected"``, ``"not required"`` (the profile asks for arrestors only above a
    peak and this valve stays under it), or the screening problems joined by ", " (``"missing"``,
    ``"one-side"``, ``"branch-second"``, ``"too-far"``, ``"undersized"``, ``"no-size"``,
    ``"gas-short"``). ``arrestor`` is the shown arrestor answering its recommendation, if any.
    """

    valve: str
    fixture: str
    side: str
    node: str
    verdict: Verdict
    status: str
    arrestor: str | None
    recommendation: str | None
    description: str


@dataclass(frozen=True)
class Review:
    """Everything the rule engine found for one building.

    Attributes
    ----------
    verdict : "pass" or "fail"
        Fail when any finding's severity is ``"error"``.
    findings : tuple[Finding, ...]
        In rule order (the registry's), each rule's in the order it found them.
    arrestors : tuple[ArrestorRecommendation, ...]
        The installation schedule.
    counts_by_size : dict[str, int]
        Scheduled arrestors by size class (classes with none left out), AA first.
    valve_verdicts : tuple[ValveVerdict, ...]
        One per quick-closing valve, in building-file order.
    profile : str
        Name of the profile applied.
    exit_status : int
        0 pass, 1 fail (for scripts).
    """

    building_name: str
    source: str
    unit_system: str
    profile: str
    verdict: Verdict
    findings: tuple[Finding, ...]
    arrestors: tuple[ArrestorRecommendation, ...]
    counts_by_size: dict[str, int] = field(hash=False)
    valve_verdicts: tuple[ValveVerdict, ...]
    exit_status: int
    rules_applied: tuple[str, ...] = ()
    timings_s: dict[str, float] = field(default_factory=dict, hash=False)

    def counts_by_severity(self) -> dict[str, int]:
        out: dict[str, int] = {s: 0 for s in SEVERITIES}
        for f in self.findings:
            out[f.severity] += 1
        return out

    def by_rule(self, rule_id: str) -> list[Finding]:
        return [f for f in self.findings if f.rule == rule_id]


def resolve_profile(profile: Profile | str | Path | None, building_source: str,
                    building_profile: str) -> Profile:
    """The profile to apply: as given, by name or path, or the building's own."""
    if isinstance(profile, Profile):
        return profile
    name = str(profile) if profile is not None else building_profile
    if name in bundled_profiles():
        return bundled_profile(name)
    return load_profile(name, relative_to=building_source)


def review(tree: nx.DiGraph, analysis: Analysis, profile: Profile | str | Path | None = None
           ) -> Review:
    """Apply the rules to one analysed building.

    Parameters
    ----------
    tree : networkx.DiGraph
        From :func:`knockproof.network.build_tree`.
    analysis : Analysis
        From :func:`knockproof.analysis.run.analyze_tree` on the same tree.
    profile : Profile, str, Path or None
        A loaded profile, a bundled profile's name, a profile file's path; None takes the
        building's ``profile`` (a relative path is looked for next to the building file first).

    Raises
    ------
    InputError
        The profile cannot be found or has a problem.
    """
    t0 = time.perf_counter()
    building = tree.graph["building"]
    prof = resolve_profile(profile, building.source, building.profile)
    ctx = Context(tree, analysis, prof)
    findings: list[Finding] = []
    applied = []
    for rule_id, r in registry().items():
        if not prof.enabled(rule_id):
            continue
        applied.append(rule_id)
        severity = prof.severity(rule_id)
        basis = prof.basis(rule_id)
        for f in r.check(ctx, prof.params(rule_id)):
            if f.severity != severity or f.basis != basis:
                f = replace(f, severity=severity, basis=basis)
            findings.append(f)
    verdicts = _valve_verdicts(ctx)
    verdict: Verdict = "fail" if any(f.severity == "error" for f in findings) else "pass"
    return Review(
        building_name=building.name, source=building.source, unit_system=building.unit_system,
        profile=prof.name, verdict=verdict, findings=tuple(findings),
        arrestors=ctx.schedule.arrestors, counts_by_size=ctx.schedule.counts_by_size(),
        valve_verdicts=verdicts, exit_status=0 if verdict == "pass" else 1,
        rules_applied=tuple(applied), timings_s={"review": time.perf_counter() - t0},
    )


def _valve_verdicts(ctx: Context) -> tuple[ValveVerdict, ...]:
    sched, checks, prof = ctx.schedule, ctx.screening.checks, ctx.profile
    out: list[tuple[int, ValveVerdict]] = []
    order = {f.id: i for i, f in enumerate(ctx.building.fixtures)}
    for v in sched.required:
        rid = sched.by_valve[v.id]
        c = checks[rid]
        failing = [p for p in c.problems
                   if prof.enabled(PROBLEM_RULE[p]) and prof.severity(PROBLEM_RULE[p]) == "error"]
        out.append((order[v.fixture.id], ValveVerdict(
            valve=v.id, fixture=v.fixture.id, side=v.side, node=v.node,
            verdict="fail" if failing else "pass",
            status=", ".join(c.problems) if c.problems else "protected",
            arrestor=c.proposal, recommendation=rid,
            description=ctx.fixture_description([v.fixture.id]),
        )))
    for v in sched.not_required:
        out.append((order[v.fixture.id], ValveVerdict(
            valve=v.id, fixture=v.fixture.id, side=v.side, node=v.node, verdict="pass",
            status="not required", arrestor=None, recommendation=None,
            description=ctx.fixture_description([v.fixture.id]),
        )))
    out.sort(key=lambda t: (t[0], t[1].side == "hot"))
    return tuple(v for _i, v in out)
