"""`knockproof report`: write the HTML submittal report, and the site schedule (CSV or JSON)."""

from __future__ import annotations

import os
from pathlib import Path

import typer


def command(
    file: Path | None = typer.Argument(None, help="Building file (TOML).", show_default=False),
    output: Path | None = typer.Option(
        None, "--output", "-o", help="HTML report to write (NAME.html).", show_default=False
    ),
    schedule: Path | None = typer.Option(
        None,
        "--schedule",
        help="Also write the site schedule: NAME.csv or NAME.json.",
        show_default=False,
    ),
    example: bool = typer.Option(
        False, "--example", help="Report on the bundled example building."
    ),
    no_simulation: bool = typer.Option(
        False, "--no-simulation", help="Closed-form screen only: no simulated peaks or traces."
    ),
    profile: str | None = typer.Option(None, "--profile", help="Rule profile (name or file)."),
    workers: int | None = typer.Option(None, "--workers", help="Processes for the simulation."),
) -> int:
    """Write a self-contained HTML report (verdict, findings, riser diagram, plots, schedule)."""
    from knockproof.errors import UsageError

    if example == (file is not None):
        raise UsageError("give a building file or --example (one of them)")
    if output is None:
        raise UsageError("-o/--output: give the HTML file to write, e.g. -o report.html")
    if output.suffix.lower() not in (".html", ".htm"):
        raise UsageError(f"-o/--output: expected a name ending in .html, found '{output}'")
    if schedule is not None and schedule.suffix.lower() not in (".csv", ".json"):
        raise UsageError(f"--schedule: expected a name ending in .csv or .json, found '{schedule}'")
    from knockproof.cli.check import example_path

    path = example_path() if example else file
    assert path is not None
    _check_target(output, "-o/--output", path)
    if schedule is not None:
        _check_target(schedule, "--schedule", path)
        if _same(schedule, output):
            raise UsageError(
                "--schedule: the schedule would overwrite the HTML report; give it another name"
            )

    import knockproof
    from knockproof.cli.output import out
    from knockproof.cli.progress import progress_bar
    from knockproof.report.cautions import CAUTION
    from knockproof.report.files import write_atomic
    from knockproof.report.html import plotted_events, render_html

    with progress_bar() as progress:
        result = knockproof.check(
            path, profile=profile, simulate=not no_simulation, workers=workers, progress=progress
        )
    tree, analysis, review = result.tree, result.analysis, result.review
    simulations = result.traces(plotted_events(analysis)) if result.simulated else None
    html = render_html(tree, analysis, review, simulations)
    write_atomic(output, html)
    console = out()
    console.print(
        f"Wrote {output} ({len(html.encode('utf-8')) / 1e3:,.0f} kB).",
        markup=False,
        highlight=False,
    )
    if schedule is not None:
        from knockproof.report.schedule_csv import (
            schedule_rows,
            write_schedule_csv,
            write_schedule_json,
        )

        rows = schedule_rows(review, analysis)
        if schedule.suffix.lower() == ".json":
            write_schedule_json(schedule, rows, analysis)
        else:
            write_schedule_csv(schedule, rows, analysis.unit_system)
        console.print(f"Wrote {schedule} ({len(rows)} arrestors).", markup=False, highlight=False)
    console.print(f"Verdict: {result.verdict}.", markup=False, highlight=False)
    console.print(CAUTION, markup=False, highlight=False)
    return result.exit_status


def _same(a: Path, b: Path) -> bool:
    try:
        if a.exists() and b.exists():
            return os.path.samefile(a, b)
    except OSError:
        pass
    return a.resolve() == b.resolve()


def _check_target(target: Path, option: str, building_file: Path) -> None:
    from knockproof.errors import UsageError

    if _same(target, Path(building_file)):
        raise UsageError(f"{option}: '{target}' is the building file itself; give another name")
    if target.exists() and target.is_dir():
        raise UsageError(f"{option}: '{target}' is a directory; give a file name")
    parent = target.parent if str(target.parent) else Path(".")
    if not parent.is_dir():
        raise UsageError(f"{option}: the directory '{parent}' does not exist")
