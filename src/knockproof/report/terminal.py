"""Terminal rendering of the closed-form analysis (rich), in the user's unit system."""

from __future__ import annotations

from rich.console import Console
from rich.markup import escape
from rich.table import Table

from knockproof.model.units import fmt, to_display, unit_label
from knockproof.results import Analysis, EventResult, governing_peak


def _judged_pa(e: EventResult) -> float:
    g = governing_peak(e)
    return e.peak_pressure_pa if g is None else g.pressure_pa


def _judged_text(e: EventResult, u: str) -> str:
    g = governing_peak(e)
    if g is None:
        return "–"
    mark = "S" if g.figure.startswith("simulated") else "C"
    where = "" if g.node == e.node else f" @{g.node}"
    return f"{to_display(g.pressure_pa, 'pressure', u):.0f} {mark}{where}"


def render_events(console: Console, a: Analysis, limit: int = 12) -> None:
    """The worst closure events by peak pressure."""
    u = a.unit_system
    events = sorted(a.events, key=lambda e: (-_judged_pa(e), e.id))
    shown = events if limit <= 0 else events[:limit]
    p_unit = unit_label("pressure", u)
    t = Table(
        title=f"Worst closure events ({len(shown)} of {len(events)}, by peak pressure)",
        title_justify="left",
        show_edge=False,
        pad_edge=False,
    )
    t.add_column("valve", overflow="fold")
    t.add_column("where", overflow="fold", max_width=28)
    t.add_column(f"V {unit_label('velocity', u)}", justify="right")
    t.add_column("close / 2L/a ms", justify="right")
    simulated = any(e.simulated_peak_pressure_pa is not None for e in shown)
    if not simulated:
        t.add_column(f"surge {p_unit}", justify="right")
    t.add_column(f"peak {p_unit}", justify="right")
    if simulated:
        t.add_column(f"sim {p_unit}", justify="right")
        t.add_column(f"w/ arr. {p_unit}", justify="right")
    t.add_column(f"judged {p_unit}", justify="right", overflow="fold")
    for e in shown:
        peak = to_display(e.peak_pressure_pa, "pressure", u)
        peak_text = f"{peak:.0f}"
        t.add_row(
            escape(f"{e.fixture}:{e.side}"),
            escape(e.label or e.node),
            f"{to_display(e.velocity_m_per_s, 'velocity', u):.1f}",
            f"{e.closure_time_s * 1000:.0f} / {e.critical_time_s * 1000:.0f}"
            + (" R" if e.closure == "rapid" else ""),
            *([] if simulated else [f"{to_display(e.surge_pa, 'pressure', u):.0f}"]),
            peak_text,
            *(
                [
                    _sim(e.simulated_peak_pressure_pa, u) + ("*" if e.cavity else ""),
                    _sim(e.simulated_peak_with_arrestors_pa, u),
                ]
                if simulated
                else []
            ),
            escape(_judged_text(e, u)),
        )
    console.print(t)
    console.print(
        "R = rapid closure (closure time at or under 2L/a): full Joukowsky surge; peak = "
        "closed-form estimate at the valve (static + surge); judged = the figure the rules use, "
        "the highest peak anywhere the closure reaches (@node where not at the valve): "
        "C = closed-form bound, S = simulated (where the simulation covered the whole event, or "
        "where it is the larger figure)."
    )
    if simulated:
        console.print(
            "sim = simulated peak (method of characteristics, vapour cavities); "
            "* = a vapour cavity formed (only the first cycle's peak is reliable); "
            "w/ arr. = with the scheduled arrestors in place."
        )


def _sim(value: float | None, u: str) -> str:
    return "–" if value is None else f"{to_display(value, 'pressure', u):.0f}"


def render_pipes(console: Console, a: Analysis, limit: int = 8) -> None:
    """The fastest pipes at design flow, with wave speeds."""
    u = a.unit_system
    pipes = sorted(a.pipes, key=lambda p: (-p.velocity_m_per_s, p.id))[:limit]
    t = Table(
        title=f"Fastest pipes at design flow ({len(pipes)} of {len(a.pipes)})",
        title_justify="left",
        show_edge=False,
        pad_edge=False,
    )
    for col, just in (
        ("pipe", "left"),
        ("material size", "left"),
        ("side", "left"),
        (f"flow {unit_label('flow', u)}", "right"),
        (f"V {unit_label('velocity', u)}", "right"),
        (f"a {unit_label('wave_speed', u)}", "right"),
    ):
        t.add_column(col, justify=just)  # type: ignore[arg-type]
    for p in pipes:
        t.add_row(
            escape(p.id),
            f"{p.material} {p.nominal_size}",
            p.side,
            f"{to_display(p.design_flow_m3_per_s, 'flow', u):.1f}",
            f"{to_display(p.velocity_m_per_s, 'velocity', u):.1f}",
            f"{to_display(p.wave_speed_m_per_s, 'wave_speed', u):.0f}",
        )
    console.print(t)


def render_assumptions(console: Console, a: Analysis) -> None:
    console.print("[bold]Assumptions[/]")
    for line in a.assumptions:
        console.print(f"- {escape(line)}")


def render_headline(console: Console, a: Analysis) -> None:
    u = a.unit_system
    worst = max(a.events, key=lambda e: (_judged_pa(e), e.id), default=None)
    console.print(f"[bold]{escape(a.building_name)}[/]  ({escape(a.source)})")
    line = f"{len(a.pipes)} pipes, {len(a.events)} closure events"
    if worst is not None:
        g = governing_peak(worst)
        assert g is not None
        figure = "closed-form bound" if g.figure == "closed-form" else "simulated"
        at = "" if g.node == worst.node else f" (at node {escape(g.node)})"
        line += (
            f"; highest peak {fmt(g.pressure_pa, 'pressure', u, 0)} ({figure}) when "
            f"{escape(worst.fixture)}:{worst.side} closes{at}"
        )
    console.print(line)


def render_arrestor_checks(console: Console, checks: list, u: str, limit: int = 10) -> None:
    """Arrestor gas volumes checked by simulation (only those that needed more than sized)."""
    if not checks:
        return
    raised = [
        c
        for c in checks
        if c.verified_gas_volume_m3 is None
        or (
            c.energy_method_gas_volume_m3 is not None
            and c.verified_gas_volume_m3 > c.energy_method_gas_volume_m3 * 1.0001
        )
    ]
    console.print(
        f"Arrestor sizing checked by simulation: {len(checks)} arrestors, "
        f"{len(checks) - len(raised)} hold the peak under {fmt(checks[0].limit_pa, 'pressure', u, 0)} "
        f"with their energy-method gas volume, {len(raised)} need more."
    )
    if not raised:
        return
    t = Table(show_edge=False, pad_edge=False)
    for col in ("arrestor", "worst event", "sized", "needed (simulated)", "peak"):
        t.add_column(col)
    for c in raised[:limit]:
        t.add_row(
            escape(c.arrestor_id),
            escape(c.event_id),
            fmt(c.energy_method_gas_volume_m3, "volume", u, 2),
            fmt(c.verified_gas_volume_m3, "volume", u, 2)
            if c.verified_gas_volume_m3
            else "none found",
            fmt(c.simulated_peak_pa, "pressure", u, 0),
        )
    console.print(t)
