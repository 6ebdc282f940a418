"""Markdown of a check: the same content as the terminal report, for pasting into documents."""

from __future__ import annotations

from knockproof.model.units import to_display, unit_label
from knockproof.report.cautions import CAUTION
from knockproof.results import Analysis, EventResult, governing_peak


def _judged(e: EventResult) -> tuple[float, str]:
    g = governing_peak(e)
    if g is None:
        return e.peak_pressure_pa, ""
    figure = "bound" if g.figure == "closed-form" else "simulated"
    return g.pressure_pa, figure + ("" if g.node == e.node else f" at {g.node}")


def _cell(text: str) -> str:
    return text.replace("|", "\\|").replace("\n", " ")


def analysis_markdown(
    a: Analysis, extra_sections: list[str] | None = None, header: bool = True
) -> str:
    """Markdown of the analysis; ``header=False`` leaves out the title and the caution (when it
    follows a section that already carries them)."""
    u = a.unit_system
    pu = unit_label("pressure", u)
    lines = (
        [f"# Water-hammer check: {_cell(a.building_name)}", "", f"> {CAUTION}", ""]
        if header
        else []
    )
    lines += extra_sections or []
    sim = any(e.simulated_peak_pressure_pa is not None for e in a.events)
    lines += [
        "## Closure events",
        "",
        f"| valve | where | velocity {unit_label('velocity', u)} | closure ms | 2L/a ms "
        f"| closure | surge {pu} | peak {pu} |"
        + (f" simulated {pu} | cavity | with arrestors {pu} |" if sim else "")
        + f" judged {pu} | figure |",
        "|---|---|---:|---:|---:|---|---:|---:|" + ("---:|---|---:|" if sim else "") + "---:|---|",
    ]

    def p(x: float | None) -> str:
        return "" if x is None else f"{to_display(x, 'pressure', u):.0f}"

    for e in sorted(a.events, key=lambda e: (-_judged(e)[0], e.id)):
        judged, figure = _judged(e)
        lines.append(
            f"| {_cell(e.fixture)}:{e.side} | {_cell(e.label or e.node)} | "
            f"{to_display(e.velocity_m_per_s, 'velocity', u):.1f} | {e.closure_time_s * 1000:.0f} | "
            f"{e.critical_time_s * 1000:.1f} | {e.closure} | "
            f"{to_display(e.surge_pa, 'pressure', u):.0f} | "
            f"{to_display(e.peak_pressure_pa, 'pressure', u):.0f} |"
            + (
                f" {p(e.simulated_peak_pressure_pa)} | {'yes' if e.cavity else 'no'} | "
                f"{p(e.simulated_peak_with_arrestors_pa)} |"
                if sim
                else ""
            )
            + f" {p(judged)} | {_cell(figure)} |"
        )
    lines += [
        "",
        "Peak: the closed-form estimate at the valve. Judged: the figure the rules use, the highest "
        "peak anywhere the closure reaches: the closed-form bound, or the simulated peak where the "
        "simulation covered the whole event or is the larger.",
    ]
    lines += ["", "## Assumptions", ""] + [f"- {x}" for x in a.assumptions] + [""]
    return "\n".join(lines)
