"""JSON of a check: SI units in every key name; documented in docs/json-output.md."""

from __future__ import annotations

import json
from typing import Any

from knockproof import __version__
from knockproof.report.cautions import CAUTION
from knockproof.results import Analysis, EventResult, governing_peak
from knockproof.results import json_number as _num


def event_to_json(e: EventResult) -> dict[str, Any]:
    return {
        "id": e.id,
        "fixture": e.fixture,
        "fixtures": list(e.fixtures),
        "kind": e.kind,
        "side": e.side,
        "node": e.node,
        "label": e.label,
        "valve": e.valve,
        "simultaneous": e.simultaneous,
        "flow_m3_per_s": _num(e.flow_m3_per_s),
        "velocity_m_per_s": _num(e.velocity_m_per_s),
        "wave_speed_m_per_s": _num(e.wave_speed_m_per_s),
        "reflection_length_m": _num(e.reflection_length_m),
        "reflection_node": e.reflection_node,
        "closure_time_s": _num(e.closure_time_s),
        "critical_time_s": _num(e.critical_time_s),
        "closure": e.closure,
        "surge_pa": _num(e.surge_pa),
        "static_pressure_pa": _num(e.static_pressure_pa),
        "residual_pressure_pa": _num(e.residual_pressure_pa),
        "peak_pressure_pa": _num(e.peak_pressure_pa),
        "simulated_peak_pressure_pa": _num(e.simulated_peak_pressure_pa),
        "simulated_min_pressure_pa": _num(e.simulated_min_pressure_pa),
        "cavity": e.cavity,
        "simulated_peak_with_arrestors_pa": _num(e.simulated_peak_with_arrestors_pa),
        **_worst_to_json(e),
        "path": [
            {
                "node": p.node,
                "distance_m": _num(p.distance_m),
                "velocity_change_m_per_s": _num(p.velocity_change_m_per_s),
                "surge_pa": _num(p.surge_pa),
                "static_pressure_pa": _num(p.static_pressure_pa),
                "peak_pressure_pa": _num(p.peak_pressure_pa),
            }
            for p in e.path
        ],
        "reach": [
            {
                "node": p.node,
                "distance_m": _num(p.distance_m),
                "surge_pa": _num(p.surge_pa),
                "static_pressure_pa": _num(p.static_pressure_pa),
                "peak_pressure_pa": _num(p.peak_pressure_pa),
            }
            for p in e.reach
        ],
        "simulated_node_peaks_pa": {n: _num(p) for n, p in e.simulated_node_peaks},
        "simulated_node_peaks_with_arrestors_pa": {
            n: _num(p) for n, p in e.simulated_node_peaks_with_arrestors
        },
    }


def _worst_to_json(e: EventResult) -> dict[str, Any]:
    """The worst node by each figure and the one a verdict uses (``worst_node``)."""
    g = governing_peak(e)
    return {
        "worst_node": g.node if g else None,
        "worst_node_pressure_pa": _num(g.pressure_pa) if g else None,
        "worst_node_figure": g.figure if g else None,
        "worst_node_reason": g.reason if g else None,
        "quick_closing": e.quick_closing,
        "bound_worst_node": e.bound_worst_node,
        "bound_worst_node_pressure_pa": _num(e.bound_worst_node_pressure_pa),
        "simulated_worst_node": e.simulated_worst_node,
        "simulated_worst_node_pressure_pa": _num(e.simulated_worst_node_pressure_pa),
        "simulated_worst_node_time_s": _num(e.simulated_worst_node_time_s),
        "simulated_first_cycle_worst_pressure_pa": _num(e.simulated_first_cycle_worst_pressure_pa),
        "simulation_covers_event": e.simulation_covers_event,
        "wave_speed_adjustment_max": _num(e.wave_speed_adjustment_max),
        "simulated_closure_time_s": _num(e.simulated_closure_time_s),
        "simulated_worst_node_with_arrestors": e.simulated_worst_node_with_arrestors,
        "simulated_worst_node_with_arrestors_pa": _num(e.simulated_worst_node_with_arrestors_pa),
        "arrestor_raises_peak": e.arrestor_raises_peak,
    }


def analysis_to_json(a: Analysis) -> dict[str, Any]:
    """The analysis as a JSON-ready dict (deterministic: same input, same output)."""
    return {
        "tool": "knockproof",
        "version": __version__,
        "caution": CAUTION,
        "building": {"name": a.building_name, "source": a.source, "unit_system": a.unit_system},
        "water": {
            "density_cold_kg_per_m3": _num(a.density_cold_kg_m3),
            "density_hot_kg_per_m3": _num(a.density_hot_kg_m3),
        },
        "pipes": [
            {
                "id": p.id,
                "upstream": p.upstream,
                "downstream": p.downstream,
                "side": p.side,
                "material": p.material,
                "nominal_size": p.nominal_size,
                "label": p.label,
                "length_m": _num(p.length_m),
                "inside_diameter_m": _num(p.inside_diameter_m),
                "temperature_c": _num(p.temperature_c),
                "fixture_units": _num(p.fixture_units),
                "design_flow_m3_per_s": _num(p.design_flow_m3_per_s),
                "velocity_m_per_s": _num(p.velocity_m_per_s),
                "friction_factor": _num(p.friction_factor),
                "head_loss_m": _num(p.head_loss_m),
                "wave_speed_m_per_s": _num(p.wave_speed_m_per_s),
                "pressure_rating_pa": _num(p.pressure_rating_pa),
            }
            for p in a.pipes
        ],
        "nodes": [
            {
                "id": n.id,
                "side": n.side,
                "label": n.label,
                "elevation_m": _num(n.elevation_m),
                "static_pressure_pa": _num(n.static_pressure_pa),
                "residual_pressure_pa": _num(n.residual_pressure_pa),
            }
            for n in a.nodes
        ],
        "events": [event_to_json(e) for e in a.events],
        "assumptions": list(a.assumptions),
    }


def dumps(data: dict[str, Any]) -> str:
    return json.dumps(data, indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def arrestor_checks_to_json(checks: list[Any]) -> list[dict[str, Any]]:
    """Simulation-verified arrestor volumes (see transient/run.py ``ArrestorCheck``)."""
    return [
        {
            "arrestor": c.arrestor_id,
            "event": c.event_id,
            "energy_method_gas_volume_m3": _num(c.energy_method_gas_volume_m3),
            "verified_gas_volume_m3": _num(c.verified_gas_volume_m3),
            "simulated_peak_pressure_pa": _num(c.simulated_peak_pa),
            "limit_pa": _num(c.limit_pa),
        }
        for c in checks
    ]
