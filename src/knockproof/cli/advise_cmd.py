"""`knockproof advise`: options that bring each closure surge under the limit, ranked by effect.

Exit status: 0 when every event advised on is at or under the limit as the building stands, 1 when
any is over it (the building fails), 2 bad input or usage.
"""

from __future__ import annotations

from pathlib import Path

import typer


def command(
    file: Path = typer.Argument(..., help="Building file (TOML).", show_default=False),
    event: list[str] | None = typer.Option(
        None, "--event", "-e", help="Advise on this event, e.g. W3:cold (repeat for more)."
    ),
    limit: str = typer.Option(
        "150 psi", "--limit", help="Peak-pressure limit, gauge: '150 psi', '1000 kPa'."
    ),
    all_events: bool = typer.Option(
        False, "--all", help="Also list events already under the limit."
    ),
    format: str = typer.Option("text", "--format", "-f", help="text or json."),
    events: int = typer.Option(
        12, "--events", help="Events shown in the text report, worst first (0: all)."
    ),
) -> int:
    """Options (larger pipe, slower closure, flexible pipe, lower static pressure, arrestor, flow
    restrictor) that bring each closure surge under the limit, ranked by computed effect."""
    from knockproof.errors import UsageError

    if format not in ("text", "json"):
        raise UsageError(f"--format: expected text or json, found '{format}'")
    if events < 0:
        raise UsageError("--events: expected 0 or more")
    import knockproof
    from knockproof.model.units import QuantityError, parse_quantity

    building = knockproof.load(file)
    try:
        limit_pa = parse_quantity(_number_or_text(limit), "pressure", building.unit_system)
    except QuantityError as e:
        raise UsageError(f"--limit: {e}") from None
    if not limit_pa > 0:
        raise UsageError(f"--limit: must be more than zero, found '{limit}'")
    text = format == "text"
    most = events if (text and not event) else None
    request = knockproof.AdviceRequest(
        events=tuple(event) if event else None,
        limit_pa=limit_pa,
        include_passing=all_events,
        most=most,
    )
    result = knockproof.check(building, simulate=False, advise=request)
    advice = result.advice or ()
    failing = any(a.peak_pressure_pa > limit_pa for a in advice)
    if not text:
        from knockproof.cli.output import write_text
        from knockproof.report.json_out import dumps

        write_text(dumps(result.advice_document()))
        return 1 if failing else 0
    from knockproof.cli.output import out
    from knockproof.report.advice_text import render_advice

    total = len(result.analysis.events) if all_events else result.events_over(limit_pa)
    not_shown = 0 if event else max(0, total - len(advice))
    render_advice(out(), advice, building.name, limit_pa, building.unit_system, not_shown)
    return 1 if failing else 0


def _number_or_text(raw: str) -> str | float:
    try:
        return float(raw)
    except ValueError:
        return raw
