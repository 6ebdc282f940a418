"""Simulating every closure event of a building, in parallel, and verifying arrestor sizing.

``simulate_all`` runs each event twice where an arrestor is scheduled for it: bare, and with the
scheduled arrestors' gas cushions in place. ``verify_arrestors`` finds, for each scheduled arrestor,
the smallest gas volume whose simulated peak on the worst event it protects stays under the limit
(doubling, then bisection; ``VOLUME_TOLERANCE`` relative). Events are independent, so they run in a
pool of worker processes (two on the reference machine); each worker loads the compiled kernel from
numba's cache once.
"""

from __future__ import annotations

import math
import os
from collections.abc import Callable, Sequence
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass, replace

import networkx as nx

from knockproof.results import Analysis, EventResult
from knockproof.transient.events import EventSimulation, simulate_event

VOLUME_TOLERANCE = 0.05
MAX_DOUBLINGS = 8

RAISE_TOLERANCE = 1e-3
"""A with-arrestor peak above the bare one by more than this share of it counts as raised (below
it, the difference is the size of the grid's and the Newton solver's rounding, not physics)."""

RAISES_PEAK_REASON = (
    "the arrestor's gas spring and the water column ring together: in a slow or low-velocity "
    "closure the column is decelerated gently without it, while with it the column keeps moving "
    "into the gas and overshoots, so the cushion's oscillation can rise above the bare line's peak"
)
"""Why an arrestor can raise a simulated peak, for reports (our own wording of the air-chamber
oscillation of Wylie & Streeter, Fluid Transients in Systems, 1993, sec. 3.5)."""


def arrestor_raises_peak(
    bare_worst_pa: float | None, with_arrestors_worst_pa: float | None
) -> bool | None:
    """Whether the scheduled arrestors raise an event's simulated peak: the worst pressure with
    them above the bare worst by more than :data:`RAISE_TOLERANCE` of it (gauge [Pa]; compare like
    with like: both at the valve, or both the worst node of the zone). None when either is
    missing (no arrestor simulated)."""
    if bare_worst_pa is None or with_arrestors_worst_pa is None:
        return None
    return bool(with_arrestors_worst_pa > bare_worst_pa + RAISE_TOLERANCE * abs(bare_worst_pa))

_STATE: dict[str, object] = {}


@dataclass(frozen=True)
class ArrestorCheck:
    """Simulation-verified gas volume of one scheduled arrestor.

    ``verified_gas_volume_m3`` is the smallest volume (within ``VOLUME_TOLERANCE``) whose simulated
    peak on ``event_id`` stays under ``limit_pa``; None when no volume up to the search cap does.
    ``simulated_peak_pa`` is the peak with that volume (or with the largest tried).
    ``bare_peak_pa`` is the same event's simulated peak without the arrestor, and ``raises_peak``
    says that the volume reported raises the peak above it (:func:`arrestor_raises_peak`; why:
    :data:`RAISES_PEAK_REASON`) - a volume is never given without saying so.
    """

    arrestor_id: str
    event_id: str
    energy_method_gas_volume_m3: float | None
    verified_gas_volume_m3: float | None
    simulated_peak_pa: float | None
    limit_pa: float
    bare_peak_pa: float | None = None
    raises_peak: bool = False


def _init(tree: nx.DiGraph, analysis: Analysis) -> None:
    _STATE["tree"] = tree
    _STATE["analysis"] = analysis
    _STATE["events"] = {e.id: e for e in analysis.events}


def _run(job: tuple[str, tuple[tuple[str, float], ...]]) -> EventSimulation:
    event_id, cushions = job
    tree = _STATE["tree"]
    analysis = _STATE["analysis"]
    event = _STATE["events"][event_id]  # type: ignore[index]
    return simulate_event(tree, analysis, event, cushions, record=False)  # type: ignore[arg-type]


def _workers(requested: int | None) -> int:
    if requested is not None:
        return max(1, requested)
    return max(1, min(2, os.cpu_count() or 1))


def run_jobs(
    tree: nx.DiGraph,
    analysis: Analysis,
    jobs: Sequence[tuple[str, tuple[tuple[str, float], ...]]],
    workers: int | None = None,
    progress: Callable[[int], None] | None = None,
) -> list[EventSimulation]:
    """Run (event id, cushions) jobs; results in job order."""
    n = _workers(workers)
    if n == 1 or len(jobs) < 8:
        _init(tree, analysis)
        out = []
        for job in jobs:
            out.append(_run(job))
            if progress:
                progress(1)
        return out
    results: list[EventSimulation] = []
    chunk = max(1, min(32, len(jobs) // (n * 8) or 1))
    with ProcessPoolExecutor(max_workers=n, initializer=_init, initargs=(tree, analysis)) as pool:
        for r in pool.map(_run, jobs, chunksize=chunk):
            results.append(r)
            if progress:
                progress(1)
    return results


def cushions_for(event: EventResult, arrestors: Sequence[object]) -> tuple[tuple[str, float], ...]:
    """Scheduled arrestors (node, gas volume) that protect this event's valves on its side."""
    out = []
    for a in arrestors:
        if getattr(a, "side", None) != event.side:
            continue
        protects = set(getattr(a, "protects", ()) or ())
        vol = getattr(a, "gas_volume_m3", None)
        if vol and protects & set(event.fixtures):
            out.append((a.node, float(vol)))  # type: ignore[attr-defined]
    return tuple(out)


def simulate_all(
    tree: nx.DiGraph,
    analysis: Analysis,
    arrestors: Sequence[object] = (),
    workers: int | None = None,
    progress: Callable[[int], None] | None = None,
) -> tuple[Analysis, dict[str, EventSimulation], dict[str, EventSimulation]]:
    """Simulate every event bare and (where scheduled) with arrestors; return the analysis with the
    simulated fields filled, and the bare and with-arrestor simulations by event id."""
    jobs: list[tuple[str, tuple[tuple[str, float], ...]]] = [(e.id, ()) for e in analysis.events]
    with_jobs = []
    for e in analysis.events:
        c = cushions_for(e, arrestors)
        if c:
            with_jobs.append((e.id, c))
    results = run_jobs(tree, analysis, jobs + with_jobs, workers, progress)
    bare = {j[0]: r for j, r in zip(jobs, results[: len(jobs)], strict=True)}
    protected = {j[0]: r for j, r in zip(with_jobs, results[len(jobs) :], strict=True)}
    events = []
    for e in analysis.events:
        b = bare[e.id]
        p = protected.get(e.id)
        events.append(
            replace(
                e,
                simulated_peak_pressure_pa=b.peak_pressure_pa,
                simulated_min_pressure_pa=b.min_pressure_pa,
                cavity=b.cavity,
                simulated_peak_with_arrestors_pa=p.peak_pressure_pa if p else None,
                arrestor_raises_peak=arrestor_raises_peak(
                    b.peak_pressure_pa, p.peak_pressure_pa if p else None
                ),
            )
        )
    return replace(analysis, events=tuple(events)), bare, protected


def verify_arrestors(
    tree: nx.DiGraph,
    analysis: Analysis,
    arrestors: Sequence[object],
    limit_pa: float,
    workers: int | None = None,
) -> list[ArrestorCheck]:
    """Check each scheduled arrestor's gas volume on the worst event it protects.

    Uses the with-arrestor peaks already in ``analysis`` (from :func:`simulate_all`): where that
    peak is under the limit, the energy-method volume is verified as it stands; otherwise the volume
    is doubled until the simulated peak passes, then bisected (``VOLUME_TOLERANCE``).
    """
    checks = []
    _init(tree, analysis)
    for a in arrestors:
        events = [e for e in analysis.events if cushions_for(e, [a])]
        if not events:
            continue
        worst = max(
            events, key=lambda e: (e.simulated_peak_with_arrestors_pa or e.peak_pressure_pa, e.id)
        )
        vol = getattr(a, "gas_volume_m3", None)
        with_peak = worst.simulated_peak_with_arrestors_pa
        bare = worst.simulated_peak_pressure_pa
        if vol and with_peak is not None and with_peak <= limit_pa:
            checks.append(_check(a, worst, vol, vol, with_peak, limit_pa, bare))
            continue
        checks.append(_bisect(tree, analysis, a, worst, float(vol or 1e-5), limit_pa))
    return checks


def _check(arrestor, event, energy, verified, peak, limit_pa, bare) -> ArrestorCheck:
    return ArrestorCheck(
        arrestor.id, event.id, energy, verified, peak, limit_pa, bare,
        bool(verified is not None and arrestor_raises_peak(bare, peak)),
    )  # fmt: skip


def _bisect(tree, analysis, arrestor, event, start, limit_pa) -> ArrestorCheck:
    def peak(vol: float) -> float:
        return simulate_event(
            tree, analysis, event, [(arrestor.node, vol)], record=False
        ).peak_pressure_pa

    energy = getattr(arrestor, "gas_volume_m3", None)
    bare = event.simulated_peak_pressure_pa
    if bare is None:
        bare = simulate_event(tree, analysis, event, (), record=False).peak_pressure_pa
    lo, hi = 0.0, start
    p_hi = peak(hi)
    doublings = 0
    while p_hi > limit_pa and doublings < MAX_DOUBLINGS:
        lo, hi = hi, hi * 2.0
        p_hi = peak(hi)
        doublings += 1
    if p_hi > limit_pa:
        return _check(arrestor, event, energy, None, p_hi, limit_pa, bare)
    if lo == 0.0:
        lo = hi / 16.0
        p_lo = peak(lo)
        if p_lo <= limit_pa:
            return _check(arrestor, event, energy, lo, p_lo, limit_pa, bare)
    while (hi - lo) / hi > VOLUME_TOLERANCE:
        mid = math.sqrt(lo * hi)
        p = peak(mid)
        if p <= limit_pa:
            hi, p_hi = mid, p
        else:
            lo = mid
    return _check(arrestor, event, energy, hi, p_hi, limit_pa, bare)


@dataclass(frozen=True)
class Traces:
    """Pressure at the valve against time, bare and with the scheduled arrestors (gauge [Pa])."""

    times_s: object
    valve_pressure_pa: object
    valve_pressure_with_arrestors_pa: object | None


def traces_for(
    tree: nx.DiGraph,
    analysis: Analysis,
    events: Sequence[EventResult],
    arrestors: Sequence[object] = (),
) -> dict[str, Traces]:
    """Re-run a few events keeping their pressure histories (for plots)."""
    import numpy as np

    out = {}
    for e in events:
        bare = simulate_event(tree, analysis, e)
        cushions = cushions_for(e, arrestors)
        with_p = None
        if cushions:
            prot = simulate_event(tree, analysis, e, cushions)
            with_p = np.interp(bare.times_s, prot.times_s, prot.valve_pressure_pa)
        out[e.id] = Traces(bare.times_s, bare.valve_pressure_pa, with_p)
    return out
