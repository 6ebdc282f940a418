"""Shading of the riser diagram's pipes: the highest surge any closure event's path puts on each
pipe, and the fixed steps (per unit system) that turn a surge into a shade."""

from __future__ import annotations

import networkx as nx

from knockproof.model.units import to_display, unit_label
from knockproof.report.riser.drawing import ShadeStep
from knockproof.results import Analysis

#: Surge steps of the shading, in the display unit of pressure (psi for us, kPa for si).
SURGE_STEPS: dict[str, tuple[float, ...]] = {
    "us": (25.0, 50.0, 100.0, 150.0),
    "si": (175.0, 350.0, 700.0, 1000.0),
}


def surge_by_pipe(
    tree: nx.DiGraph, analysis: Analysis
) -> tuple[dict[tuple[str, str], float], dict[str, float]]:
    """Highest surge any event puts on each pipe (edge) [Pa], and highest peak at each node [Pa]."""
    pipe: dict[tuple[str, str], float] = {}
    node_peak: dict[str, float] = {}
    for e in analysis.events:
        points = e.path
        for p in points:
            if p.peak_pressure_pa > node_peak.get(p.node, float("-inf")):
                node_peak[p.node] = p.peak_pressure_pa
        for a, b in zip(points, points[1:], strict=False):
            if tree.has_edge(b.node, a.node):
                key = (b.node, a.node)
            elif tree.has_edge(a.node, b.node):
                key = (a.node, b.node)
            else:
                continue
            s = max(a.surge_pa, b.surge_pa)
            if s > pipe.get(key, float("-inf")):
                pipe[key] = s
    return pipe, node_peak


def shade_steps(unit_system: str) -> tuple[ShadeStep, ...]:
    steps = SURGE_STEPS[unit_system]
    u = unit_label("pressure", unit_system)
    labels = [f"surge under {steps[0]:g} {u}"]
    labels += [f"{a:g}–{b:g} {u}" for a, b in zip(steps, steps[1:], strict=False)]
    labels.append(f"{steps[-1]:g} {u} or more")
    out = [ShadeStep("kp-s0", "no closure event passes")]
    out += [ShadeStep(f"kp-s{i + 1}", text) for i, text in enumerate(labels)]
    return tuple(out)


def shade_of(surge_pa: float | None, unit_system: str) -> str:
    if surge_pa is None:
        return "kp-s0"
    v = to_display(surge_pa, "pressure", unit_system)
    for i, step in enumerate(SURGE_STEPS[unit_system]):
        if v < step:
            return f"kp-s{i + 1}"
    return f"kp-s{len(SURGE_STEPS[unit_system]) + 1}"
