"""Output of `knockproof simulate`: a terminal summary or JSON (SI keys)."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

from rich.console import Console
from rich.markup import escape

from knockproof.model.units import fmt
from knockproof.report.cautions import CAUTION
from knockproof.report.json_out import _num


def simulation_json(event: Any, bare: Any, protected: Any | None) -> str:
    def run(s: Any) -> dict[str, Any]:
        return {
            "peak_pressure_pa": _num(s.peak_pressure_pa),
            "first_peak_pressure_pa": _num(s.first_peak_pressure_pa),
            "collapse_peak_pressure_pa": _num(s.collapse_peak_pressure_pa),
            "min_pressure_pa": _num(s.min_pressure_pa),
            "cavity": s.cavity,
            "duration_s": _num(s.duration_s),
            "time_step_s": _num(s.time_step_s),
            "zone_pipes": s.zone_pipes,
            "largest_wave_speed_adjustment": _num(s.largest_wave_speed_adjustment),
            "arrestors": [{"node": n, "gas_volume_m3": _num(v)} for n, v in s.arrestors],
            "path_peak_pressure_pa": {k: _num(v) for k, v in s.path_peak_pressure_pa.items()},
        }

    data = {
        "event": event.id,
        "fixture": event.fixture,
        "side": event.side,
        "node": event.node,
        "closure_time_s": _num(event.closure_time_s),
        "critical_time_s": _num(event.critical_time_s),
        "static_pressure_pa": _num(event.static_pressure_pa),
        "estimated_peak_pressure_pa": _num(event.peak_pressure_pa),
        "simulated": run(bare),
        "simulated_with_arrestors": run(protected) if protected is not None else None,
        "caution": CAUTION,
    }
    return json.dumps(data, indent=2, allow_nan=False) + "\n"


def render_simulation(
    console: Console, event: Any, bare: Any, protected: Any | None, u: str, plot: Path | None
) -> None:
    console.print(
        f"[bold]{escape(event.fixture)} ({event.side})[/] at node {escape(event.node)}"
        + (f" — {escape(event.label)}" if event.label else "")
    )
    console.print(
        f"  closes in {event.closure_time_s * 1000:.0f} ms; 2L/a = "
        f"{event.critical_time_s * 1000:.1f} ms ({event.closure}); static "
        f"{fmt(event.static_pressure_pa, 'pressure', u, 0)}"
    )
    console.print(f"  closed-form peak       {fmt(event.peak_pressure_pa, 'pressure', u, 0)}")
    console.print(
        f"  simulated peak         {fmt(bare.peak_pressure_pa, 'pressure', u, 0)}"
        f"  (first cycle {fmt(bare.first_peak_pressure_pa, 'pressure', u, 0)})"
    )
    if bare.cavity:
        console.print(
            f"  vapour cavity: yes; lowest pressure {fmt(bare.min_pressure_pa, 'pressure', u, 1)}"
            + (
                f"; collapse peak {fmt(bare.collapse_peak_pressure_pa, 'pressure', u, 0)}"
                " (grid-dependent: the first cycle's peak is the reliable figure)"
                if bare.collapse_peak_pressure_pa is not None
                else ""
            )
        )
    else:
        console.print(
            f"  vapour cavity: no; lowest pressure on the path "
            f"{fmt(bare.min_pressure_pa, 'pressure', u, 0)}"
        )
    if protected is not None:
        where = ", ".join(f"{n} ({fmt(v, 'volume', u, 2)})" for n, v in protected.arrestors)
        console.print(
            f"  with arrestors at {escape(where)}: peak "
            f"{fmt(protected.peak_pressure_pa, 'pressure', u, 0)}"
        )
    else:
        console.print("  no arrestor is scheduled for this valve")
    console.print(
        f"  simulated {bare.duration_s * 1000:.0f} ms at a {bare.time_step_s * 1e6:.0f} µs "
        f"step over {bare.zone_pipes} pipes near the valve; largest wave-speed "
        f"adjustment {bare.largest_wave_speed_adjustment:.1%}"
    )
    if plot is not None:
        console.print(f"  plot written to {escape(str(plot))}")
    console.print(CAUTION)
