"""The one pipeline every command runs: load, build, screen, review, simulate, review again, advise.

``check(source)`` returns a :class:`CheckResult` holding every stage's result; the commands only
render it, and ``CheckResult.to_dict()`` is exactly the JSON that ``knockproof check --format json``
writes. Python users get the verdict with one call::

    import knockproof
    result = knockproof.check("fixtures/clinic.toml", simulate=False)
    result.verdict, result.exit_status        # ("fail", 1)

``source`` is a path to a building file, the file's TOML text, or the same data as a dict.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import TYPE_CHECKING, Any

from knockproof.errors import UsageError

if TYPE_CHECKING:
    import networkx as nx

    from knockproof.model.building import Building
    from knockproof.results import Analysis, EventResult
    from knockproof.rules.profiles import Profile
    from knockproof.rules.review import Review

#: Called as the simulation goes: (runs just finished, runs in all).
Progress = Callable[[int, int], None]

if TYPE_CHECKING:
    #: A building file's path, its TOML text, its data as a dict, or a Building already loaded.
    Source = str | Path | Mapping[str, Any] | Building


@dataclass(frozen=True)
class AdviceRequest:
    """What to advise on: the events asked for (default: those over the limit), the limit
    [Pa gauge] (default: the profile's peak limit), passing events too, at most ``most`` events."""

    events: tuple[str, ...] | None = None
    limit_pa: float | None = None
    include_passing: bool = False
    most: int | None = None


@dataclass(frozen=True, eq=False)
class CheckResult:
    """Everything one check found. Frozen; the commands render it.

    Attributes
    ----------
    building : Building
        The building as loaded (SI).
    tree : networkx.DiGraph
        Its supply tree.
    analysis : Analysis
        The closed-form screen, with the simulated fields filled where ``simulated``.
    review : Review
        The rules' verdict, findings and arrestor schedule (on the simulated results where
        ``simulated``).
    profile : Profile
        The rule profile applied.
    simulated : bool
        Whether the transient simulation ran.
    arrestor_checks : tuple
        Simulation-verified gas volumes of the scheduled arrestors (empty without simulation).
    advice : tuple or None
        Mitigation options per event where advice was asked for.
    advice_limit_pa : float or None
        The limit the advice worked to.
    """

    building: Building
    tree: nx.DiGraph = field(repr=False)
    analysis: Analysis = field(repr=False)
    review: Review = field(repr=False)
    profile: Profile = field(repr=False)
    simulated: bool = False
    arrestor_checks: tuple[Any, ...] = ()
    advice: tuple[Any, ...] | None = None
    advice_limit_pa: float | None = None

    @property
    def verdict(self) -> str:
        """``"pass"`` or ``"fail"``."""
        return str(self.review.verdict)

    @property
    def exit_status(self) -> int:
        """0 the building passes, 1 it fails a check (the command-line exit status)."""
        return int(self.review.exit_status)

    @property
    def peak_limit_pa(self) -> float:
        """The profile's peak-pressure limit [Pa gauge]."""
        return float(self.profile.params("surge.peak-limit")["limit_pa"])

    def to_dict(self) -> dict[str, Any]:
        """The result as JSON-ready data: exactly what ``check --format json`` writes."""
        from knockproof.report.json_out import analysis_to_json, arrestor_checks_to_json
        from knockproof.rules import review_to_json

        data = analysis_to_json(self.analysis)
        data.update(review_to_json(self.review))
        data["simulation"] = {
            "run": self.simulated,
            "arrestor_checks": arrestor_checks_to_json(list(self.arrestor_checks)),
        }
        if self.advice is not None:
            from knockproof.advice import advice_to_json

            by_event = {a["event"]: a["options"] for a in advice_to_json(self.advice)}
            for e in data["events"]:
                e["options"] = by_event.get(e["id"], [])
        return data

    def advice_document(self) -> dict[str, Any]:
        """The advice alone, as ``knockproof advise --format json`` writes it."""
        from knockproof.advice import advice_document

        limit = self.advice_limit_pa if self.advice_limit_pa is not None else self.peak_limit_pa
        return advice_document(self.advice or (), self.building.name, self.building.source, limit)

    def events_over(self, limit_pa: float) -> int:
        """How many events' closed-form peak exceeds ``limit_pa``."""
        from knockproof.advice import events_over

        return int(events_over(self.analysis, limit_pa))

    def traces(self, events: Sequence[EventResult]) -> dict[str, Any]:
        """Pressure histories at the valves of ``events``, bare and with the scheduled arrestors
        (a new simulation of each; for plots)."""
        from knockproof.transient.run import traces_for

        return traces_for(self.tree, self.analysis, events, self.review.arrestors)


def load(source: Source, name: str | None = None) -> Building:
    """The building from a path, a building file's TOML text, or its data as a dict."""
    from knockproof.model.building import Building as _Building
    from knockproof.model.loader import load_building, load_building_data, load_building_text

    if isinstance(source, _Building):
        return source
    if isinstance(source, Mapping):
        return load_building_data(dict(source), name or "<dict>")
    if isinstance(source, Path):
        return load_building(source)
    if isinstance(source, str):
        if "\n" in source or ("=" in source and not Path(source).exists()):
            return load_building_text(source, name or "<text>")
        return load_building(source)
    raise UsageError(f"expected a path, TOML text or a dict of building data; found {type(source)}")


def check(
    source: Source,
    *,
    profile: Profile | str | Path | None = None,
    simulate: bool = True,
    advise: bool | AdviceRequest = False,
    uncertainty: bool = False,
    workers: int | None = None,
    progress: Progress | None = None,
    simultaneous: bool = False,
    name: str | None = None,
) -> CheckResult:
    """Screen one building: the whole job of ``knockproof check``.

    Parameters
    ----------
    source : path, str or dict
        A building file's path, its TOML text, or the same data as a dict.
    profile : Profile, str or Path, optional
        A rule profile (a bundled name, a file, or a loaded profile); default: the building's own.
    simulate : bool
        Run the transient simulation of every event (bare and with the scheduled arrestors) and
        check the arrestors' gas volumes; the rules then judge the simulated results.
    advise : bool or AdviceRequest
        Add the mitigation options (for the events over the limit, or as requested).
    uncertainty : bool
        Reserved for uncertainty bands, which this version does not compute: True is refused.
    workers : int, optional
        Processes for the simulation (default: the machine's cores, at most 2).
    progress : callable, optional
        ``progress(done, total)`` as simulation runs finish.
    simultaneous : bool
        Also close valves of one kind on one branch together.
    name : str, optional
        Stands for the file in messages when ``source`` is text or a dict.

    Raises
    ------
    InputError
        The building file has problems (every one listed, located).
    UsageError
        An option is wrong.
    """
    from knockproof.analysis.run import analyze_tree
    from knockproof.network import build_tree
    from knockproof.rules import review as run_review
    from knockproof.rules.review import resolve_profile

    if uncertainty:
        raise UsageError("uncertainty bands are not available in this version")
    building = load(source, name)
    tree = build_tree(building)
    prof = resolve_profile(profile, building.source, building.profile)
    analysis = analyze_tree(tree, simultaneous=simultaneous)
    review = run_review(tree, analysis, prof)
    checks: tuple[Any, ...] = ()
    simulated = False
    if simulate and analysis.events:
        analysis, checks = _simulate(tree, analysis, review, prof, workers, progress)
        review = run_review(tree, analysis, prof)
        simulated = True
    advice = None
    advice_limit = None
    if advise:
        from knockproof.advice import advise as run_advice

        req = advise if isinstance(advise, AdviceRequest) else AdviceRequest()
        advice_limit = (
            req.limit_pa
            if req.limit_pa is not None
            else float(prof.params("surge.peak-limit")["limit_pa"])
        )
        advice = run_advice(
            tree,
            analysis,
            event_ids=list(req.events) if req.events else None,
            limit_pa=advice_limit,
            include_passing=req.include_passing,
            most=req.most,
        )
    return CheckResult(
        building, tree, analysis, review, prof, simulated, checks, advice, advice_limit
    )


def _simulate(
    tree: nx.DiGraph,
    analysis: Analysis,
    review: Review,
    profile: Profile,
    workers: int | None,
    progress: Progress | None,
) -> tuple[Analysis, tuple[Any, ...]]:
    from knockproof.transient.run import simulate_all, verify_arrestors

    limit = float(profile.params("surge.peak-limit")["limit_pa"])
    arrestors = review.arrestors
    total = len(analysis.events) + sum(1 for _ in arrestors)
    advance = None if progress is None else (lambda n: progress(n, total))
    analysis, _, _ = simulate_all(tree, analysis, arrestors, workers, advance)
    checks = verify_arrestors(tree, analysis, arrestors, limit, workers)
    return analysis, tuple(checks)


def summary(source: Source, name: str | None = None) -> tuple[Building, Any]:
    """Load a building and summarise its tree (no physics): ``check --summary``."""
    from knockproof.analysis.summary import summarize
    from knockproof.network import build_tree

    building = load(source, name)
    return building, summarize(build_tree(building))
