"""The closed-form screen of a whole building, as one call: ``analyze(path)``."""

from __future__ import annotations

import time
from pathlib import Path

import networkx as nx

from knockproof.analysis.events import STRONG_REFLECTION, closure_events
from knockproof.analysis.steady import pressure_assumptions, steady_flow, water_at
from knockproof.model.loader import load_building
from knockproof.network import build_tree
from knockproof.results import Analysis

ASSUMPTIONS = (
    "Design flow from water-supply fixture units (IPC Appendix E, Tables E103.3(2) and (3)), flush-"
    "valve curve where a flush valve is downstream, never less than the largest single fixture flow.",
    "Each closing valve stops its fixture's flow at line pressure; the rest of the demand flows on.",
    "Wave speed by Korteweg's formula with the pipe's restraint factor; water density and adiabatic "
    "bulk modulus from IAPWS-97 (within 0.4 % of IAPWS-95) at the side's temperature.",
    f"A junction reflecting {STRONG_REFLECTION:.0%} or more of an arriving wave (or the supply) bounds "
    "the reflection length used for the critical time 2L/a.",
    "Rapid closure (closure time <= 2L/a): Joukowsky; slower: Michaud's estimate with the inertia of "
    "the whole path to the supply, never above Joukowsky.",
    "Peak pressure = static pressure at the node + surge (conservative: the flowing pressure is lower).",
)


def analyze_tree(tree: nx.DiGraph, simultaneous: bool = False) -> Analysis:
    """Steady flow, wave speeds and closed-form closure events for a built tree."""
    b = tree.graph["building"]
    t0 = time.perf_counter()
    pipes, nodes = steady_flow(tree)
    t1 = time.perf_counter()
    densities = {side: water_at(b.temperature_c(side)).density for side in ("cold", "hot")}
    events = closure_events(tree, pipes, nodes, densities, simultaneous=simultaneous)
    t2 = time.perf_counter()
    return Analysis(
        building_name=b.name,
        source=b.source,
        unit_system=b.unit_system,
        density_cold_kg_m3=densities["cold"],
        density_hot_kg_m3=densities["hot"],
        pipes=pipes,
        nodes=nodes,
        events=events,
        assumptions=ASSUMPTIONS + pressure_assumptions(b),
        timings_s={"steady_flow": t1 - t0, "events": t2 - t1},
    )


def analyze(path: str | Path, simultaneous: bool = False) -> Analysis:
    """Load a building file and run the closed-form screen (the notebook entry point).

    >>> from knockproof import analyze                      # doctest: +SKIP
    >>> result = analyze("fixtures/clinic.toml")            # doctest: +SKIP
    >>> max(e.peak_pressure_pa for e in result.events)      # doctest: +SKIP
    """
    t0 = time.perf_counter()
    building = load_building(path)
    tree = build_tree(building)
    t1 = time.perf_counter()
    result = analyze_tree(tree, simultaneous=simultaneous)
    result.timings_s["load_and_build"] = t1 - t0
    return result
