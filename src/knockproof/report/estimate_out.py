"""Output of `knockproof estimate`: text in the user's units, or JSON with SI key names."""

from __future__ import annotations

import json

from rich.console import Console

from knockproof.analysis.single_run import RunEstimate
from knockproof.model.units import fmt
from knockproof.report.cautions import CAUTION
from knockproof.report.json_out import _num


def estimate_json(r: RunEstimate) -> str:
    data = {
        "material": r.material,
        "nominal_size": r.nominal_size,
        "inside_diameter_m": _num(r.inside_diameter_m),
        "length_m": _num(r.length_m),
        "flow_m3_per_s": _num(r.flow_m3_per_s),
        "closure_time_s": _num(r.closure_time_s),
        "static_pressure_pa": _num(r.static_pressure_pa),
        "temperature_c": _num(r.temperature_c),
        "restraint": r.restraint,
        "velocity_m_per_s": _num(r.velocity_m_per_s),
        "wave_speed_m_per_s": _num(r.wave_speed_m_per_s),
        "critical_time_s": _num(r.critical_time_s),
        "closure": r.closure,
        "joukowsky_surge_pa": _num(r.joukowsky_surge_pa),
        "surge_pa": _num(r.surge_pa),
        "peak_pressure_pa": _num(r.peak_pressure_pa),
        "caution": CAUTION,
    }
    return json.dumps(data, indent=2, allow_nan=False) + "\n"


def render_estimate(console: Console, r: RunEstimate, u: str) -> None:
    console.print(
        f"{fmt(r.length_m, 'length', u, 1)} of {r.material} {r.nominal_size}, "
        f"{fmt(r.flow_m3_per_s, 'flow', u, 2)} stopped in {r.closure_time_s * 1000:.0f} ms, "
        f"static {fmt(r.static_pressure_pa, 'pressure', u, 0)}"
    )
    rows = [
        ("velocity", fmt(r.velocity_m_per_s, "velocity", u, 2)),
        ("wave speed", fmt(r.wave_speed_m_per_s, "wave_speed", u, 0)),
        ("critical time 2L/a", f"{r.critical_time_s * 1000:.1f} ms"),
        (
            "closure",
            f"{r.closure} ({'at or under' if r.closure == 'rapid' else 'longer than'} 2L/a)",
        ),
        (
            "surge",
            fmt(r.surge_pa, "pressure", u, 0)
            + (
                ""
                if r.closure == "rapid"
                else f"  (Joukowsky limit {fmt(r.joukowsky_surge_pa, 'pressure', u, 0)})"
            ),
        ),
        ("peak pressure", fmt(r.peak_pressure_pa, "pressure", u, 0)),
    ]
    width = max(len(k) for k, _ in rows)
    for k, v in rows:
        console.print(f"  {k:<{width}}  {v}")
    console.print(CAUTION)
