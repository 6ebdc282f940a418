"""The frozen result types every stage hands on. SI inside; the unit is in each field name.

Pressures are gauge [Pa] unless the name says ``_abs``. These types carry no behaviour beyond
read-only helpers; reports read them and never compute physics.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Literal

Closure = Literal["rapid", "slow"]


def json_number(x: float | None, digits: int = 6) -> float | None:
    """A float as written to JSON: ``digits`` significant figures (stable output, the same input
    giving byte-identical files); None stays None; a non-finite number is refused, never written."""
    if x is None:
        return None
    if not math.isfinite(x):
        raise ValueError("refusing to write a non-finite number to JSON")
    return 0.0 if x == 0 else float(f"{x:.{digits}g}")


@dataclass(frozen=True)
class PipeResult:
    """Steady flow and wave speed of one pipe at design flow.

    Attributes
    ----------
    design_flow_m3_per_s : float
        Demand from the fixture units downstream (IPC Appendix E) [m^3/s].
    velocity_m_per_s : float
        Mean velocity at design flow [m/s].
    wave_speed_m_per_s : float
        Pressure-wave speed (Korteweg with restraint factor) [m/s].
    head_loss_m : float
        Friction loss over length plus fittings allowance at design flow [m of water].
    """

    id: str
    upstream: str
    downstream: str
    side: str
    material: str
    nominal_size: str
    length_m: float
    inside_diameter_m: float
    temperature_c: float
    fixture_units: float
    flush_valve_demand: bool
    design_flow_m3_per_s: float
    velocity_m_per_s: float
    reynolds: float
    friction_factor: float
    head_loss_m: float
    wave_speed_m_per_s: float
    pressure_rating_pa: float
    label: str = ""


@dataclass(frozen=True)
class NodeResult:
    """Pressures at one node: static (no flow) and residual (flowing at design flow), gauge [Pa]."""

    id: str
    side: str
    elevation_m: float
    static_pressure_pa: float
    residual_pressure_pa: float
    label: str = ""


@dataclass(frozen=True)
class PathPoint:
    """The surge at one node on the path from a closing valve back to its supply.

    ``distance_m`` is measured along the pipes from the valve; ``surge_pa`` is the closed-form pressure
    rise reaching the node (transmitted through the junctions passed); ``peak_pressure_pa`` adds the
    node's static pressure.
    """

    node: str
    distance_m: float
    velocity_change_m_per_s: float
    surge_pa: float
    static_pressure_pa: float
    peak_pressure_pa: float


@dataclass(frozen=True)
class EventResult:
    """One quick-closing valve closing (or a group closing together): the closed-form estimate.

    Attributes
    ----------
    id : str
        ``"<fixture>:<side>"`` (or ``"group:<node>:<side>:<kind>"`` for simultaneous closures).
    velocity_m_per_s : float
        Velocity stopped in the pipe that feeds the valve [m/s].
    wave_speed_m_per_s : float
        Wave speed of that pipe [m/s].
    reflection_length_m : float
        Distance from the valve to the first strong reflection [m].
    reflection_node : str
        Where that reflection happens (a supply, or a tee where the area opens up).
    critical_time_s : float
        2 L / a: the round-trip time of the wave over ``reflection_length_m`` [s].
    closure : "rapid" or "slow"
        Rapid when closure_time_s <= critical_time_s.
    surge_pa : float
        Pressure rise at the valve (Joukowsky if rapid, Michaud otherwise) [Pa].
    peak_pressure_pa : float
        Static pressure at the valve plus the surge (gauge) [Pa].
    """

    id: str
    fixtures: tuple[str, ...]
    kind: str
    side: str
    node: str
    label: str
    valve: str
    closure_time_s: float
    flow_m3_per_s: float
    velocity_m_per_s: float
    wave_speed_m_per_s: float
    reflection_length_m: float
    reflection_node: str
    critical_time_s: float
    closure: Closure
    surge_pa: float
    static_pressure_pa: float
    residual_pressure_pa: float
    peak_pressure_pa: float
    path: tuple[PathPoint, ...]
    simultaneous: bool = False
    #: The trade's quick-closing valve (needs an arrestor); False for a valve screened only because
    #: its closure time is at or under the critical time (a fast manual valve).
    quick_closing: bool = True
    simulated_peak_pressure_pa: float | None = None
    simulated_min_pressure_pa: float | None = None
    cavity: bool | None = None
    simulated_peak_with_arrestors_pa: float | None = None
    # -- the closed-form bound over the valve's whole reach (analysis/events.py) ------------------
    #: Closed-form bound at every node the wave reaches within the event's horizon, the path's
    #: nodes included (dead-end branches off the path too): static + bounded surge per node.
    reach: tuple[PathPoint, ...] = ()
    #: The node of ``reach`` (or of ``path``) with the highest bounded peak, and that peak [Pa].
    bound_worst_node: str | None = None
    bound_worst_node_pressure_pa: float | None = None
    # -- the simulation of the event (transient/run.py) -------------------------------------------
    #: Highest simulated pressure anywhere in the simulated network (cavity collapses included),
    #: where and when; the first-cycle (before any collapse) highest anywhere.
    simulated_worst_node: str | None = None
    simulated_worst_node_pressure_pa: float | None = None
    simulated_worst_node_time_s: float | None = None
    simulated_first_cycle_worst_pressure_pa: float | None = None
    #: (node, highest simulated gauge pressure [Pa]) for every node the simulation covered.
    simulated_node_peaks: tuple[tuple[str, float], ...] = ()
    #: True when the simulated network held everything whose inertia and reflections set the peak
    #: (see docs/simulation.md); only then may a rule trust the simulation over the bound.
    simulation_covers_event: bool | None = None
    #: Largest relative change of a pipe's wave speed made by the grid [-] (signed max magnitude).
    wave_speed_adjustment_max: float | None = None
    #: Closure time the simulation used [s] (differs from ``closure_time_s`` below the floor).
    simulated_closure_time_s: float | None = None
    #: With the scheduled arrestors: the highest simulated pressure anywhere, where; per node.
    simulated_worst_node_with_arrestors: str | None = None
    simulated_worst_node_with_arrestors_pa: float | None = None
    simulated_node_peaks_with_arrestors: tuple[tuple[str, float], ...] = ()
    #: True when the scheduled arrestors raise the simulated peak (the gas spring rings with the
    #: column); reports say so.
    arrestor_raises_peak: bool | None = None

    @property
    def fixture(self) -> str:
        return self.fixtures[0] if len(self.fixtures) == 1 else ",".join(self.fixtures)


@dataclass(frozen=True)
class Analysis:
    """Everything the closed-form screen computed for one building."""

    building_name: str
    source: str
    unit_system: str
    density_cold_kg_m3: float
    density_hot_kg_m3: float
    pipes: tuple[PipeResult, ...]
    nodes: tuple[NodeResult, ...]
    events: tuple[EventResult, ...]
    assumptions: tuple[str, ...] = ()
    timings_s: dict[str, float] = field(default_factory=dict)

    def pipe(self, pipe_id: str) -> PipeResult:
        for p in self.pipes:
            if p.id == pipe_id:
                return p
        raise KeyError(pipe_id)

    def node(self, node_id: str) -> NodeResult:
        for n in self.nodes:
            if n.id == node_id:
                return n
        raise KeyError(node_id)


Figure = Literal["simulated", "closed-form", "simulated with arrestors"]


@dataclass(frozen=True)
class GoverningPeak:
    """The peak a verdict on one event uses, where it is, and why that figure.

    Attributes
    ----------
    node : str
        Node where the peak is highest.
    pressure_pa : float
        That peak (gauge) [Pa].
    figure : "simulated", "closed-form" or "simulated with arrestors"
        Which calculation the figure comes from.
    reason : str
        One line saying why this figure governs (shown in every report).
    """

    node: str
    pressure_pa: float
    figure: Figure
    reason: str


def _closed_form_worst(e: EventResult) -> tuple[str, float]:
    if e.bound_worst_node is not None and e.bound_worst_node_pressure_pa is not None:
        return e.bound_worst_node, e.bound_worst_node_pressure_pa
    best = (e.node, e.peak_pressure_pa)
    for p in e.reach or e.path:
        if p.peak_pressure_pa > best[1]:
            best = (p.node, p.peak_pressure_pa)
    return best


def governing_peak(e: EventResult, *, with_arrestors: bool = False) -> GoverningPeak | None:
    """The peak a rule judges for event ``e`` (a selection, no physics).

    Without arrestors: the closed-form bound where no simulation ran; the simulated peak where the
    simulation covered the whole event (``simulation_covers_event``); otherwise the larger of the
    two (a simulation that may have cut away part of the event is never trusted below the bound).
    With arrestors only a simulation knows the peak: None where none ran.
    """
    if with_arrestors:
        if e.simulated_worst_node_with_arrestors_pa is not None:
            node = e.simulated_worst_node_with_arrestors or e.node
            return GoverningPeak(node, e.simulated_worst_node_with_arrestors_pa,
                                 "simulated with arrestors", "simulated with the arrestors in place")
        if e.simulated_peak_with_arrestors_pa is not None:
            return GoverningPeak(e.node, e.simulated_peak_with_arrestors_pa,
                                 "simulated with arrestors",
                                 "simulated with the arrestors in place (at the valve)")
        return None
    cf_node, cf = _closed_form_worst(e)
    if e.simulated_worst_node_pressure_pa is not None:
        sim_node, sim = e.simulated_worst_node or e.node, e.simulated_worst_node_pressure_pa
    elif e.simulated_peak_pressure_pa is not None:
        sim_node, sim = e.node, e.simulated_peak_pressure_pa
    else:
        return GoverningPeak(cf_node, cf, "closed-form", "closed-form bound; no simulation ran")
    if e.simulation_covers_event:
        return GoverningPeak(sim_node, sim, "simulated",
                             "simulated; the simulation covered the whole event")
    if cf >= sim:
        return GoverningPeak(cf_node, cf, "closed-form",
                             "closed-form bound, the larger figure: the simulation did not cover "
                             "the whole event")
    return GoverningPeak(sim_node, sim, "simulated",
                         "simulated, the larger figure: the simulation did not cover the whole "
                         "event")


def node_peaks(e: EventResult, *, with_arrestors: bool = False) -> dict[str, tuple[float, Figure]]:
    """Peak (gauge) [Pa] and its figure at every node the event reaches, chosen node by node as
    :func:`governing_peak` chooses for the worst node. With arrestors: the simulated peaks alone."""
    if with_arrestors:
        sim_w = dict(e.simulated_node_peaks_with_arrestors)
        if not sim_w and e.simulated_peak_with_arrestors_pa is not None:
            sim_w = {e.node: e.simulated_peak_with_arrestors_pa}
        return {n: (p, "simulated with arrestors") for n, p in sim_w.items()}
    closed: dict[str, float] = {}
    for p in (*e.path, *e.reach):
        closed[p.node] = max(p.peak_pressure_pa, closed.get(p.node, -math.inf))
    sim = dict(e.simulated_node_peaks)
    if not sim and e.simulated_peak_pressure_pa is not None:
        sim = {e.node: e.simulated_peak_pressure_pa}
    out: dict[str, tuple[float, Figure]] = {n: (p, "closed-form") for n, p in closed.items()}
    for n, p in sim.items():
        c = closed.get(n)
        if c is None or e.simulation_covers_event or p > c:
            out[n] = (p, "simulated")
    return out
