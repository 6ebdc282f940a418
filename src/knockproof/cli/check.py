"""`knockproof check`: analyse a building, apply the rules, report. The main job."""

from __future__ import annotations

from pathlib import Path

import typer


def command(
    file: Path | None = typer.Argument(None, help="Building file (TOML).", show_default=False),
    example: bool = typer.Option(False, "--example", help="Check the bundled example building."),
    format: str = typer.Option("text", "--format", "-f", help="text, json or markdown."),
    simultaneous: bool = typer.Option(
        False, "--simultaneous", help="Also close valves of one kind on one branch together."
    ),
    events: int = typer.Option(12, "--events", help="Events shown in the text report (0: all)."),
    summary_only: bool = typer.Option(
        False, "--summary", help="Only load the building and summarise the tree (no physics)."
    ),
    profile: str | None = typer.Option(
        None, "--profile", help="Rule profile: a bundled name (us-default, si-default) or a file."
    ),
    findings: int = typer.Option(
        5, "--findings", help="Findings shown per rule in the text report (0: all)."
    ),
    no_simulation: bool = typer.Option(
        False, "--no-simulation", help="Closed-form screen only: skip the transient simulation."
    ),
    workers: int | None = typer.Option(
        None, "--workers", help="Processes for the simulation (default: up to 2)."
    ),
    advise_options: bool = typer.Option(
        False, "--advise", help="Add the mitigation options for every event over the limit."
    ),
) -> int:
    """Check a building's water-supply tree for water hammer."""
    from knockproof.errors import UsageError

    if format not in ("text", "json", "markdown"):
        raise UsageError(f"--format: expected text, json or markdown, found '{format}'")
    if example == (file is not None):
        raise UsageError("give a building file or --example (one of them)")
    if events < 0:
        raise UsageError("--events: expected 0 or more")
    import knockproof
    from knockproof.cli.output import out, write_text
    from knockproof.cli.progress import progress_bar
    from knockproof.report.cautions import CAUTION

    path = example_path() if example else file
    assert path is not None
    console = out()
    if summary_only:
        from knockproof.report.summary_text import render_summary

        building, summary = knockproof.pipeline.summary(path)
        render_summary(console, summary, building.unit_system)
        console.print(CAUTION)
        return 0
    with progress_bar() as progress:
        result = knockproof.check(
            path,
            profile=profile,
            simulate=not no_simulation,
            advise=advise_options,
            workers=workers,
            progress=progress,
            simultaneous=simultaneous,
        )
    analysis, review, checks, advice = (
        result.analysis, result.review, list(result.arrestor_checks), result.advice
    )
    if format == "json":
        from knockproof.report.json_out import dumps

        write_text(dumps(result.to_dict()))
        return result.exit_status
    if format == "markdown":
        from knockproof.report.markdown import analysis_markdown
        from knockproof.report.review_markdown import review_markdown

        write_text(
            review_markdown(review, findings) + "\n" + analysis_markdown(analysis, header=False)
        )
        return result.exit_status
    from knockproof.report import terminal
    from knockproof.report.review_text import render_review

    terminal.render_headline(console, analysis)
    render_review(console, review, findings)
    terminal.render_events(console, analysis, events)
    terminal.render_arrestor_checks(console, checks, analysis.unit_system)
    if advice is not None:
        from knockproof.report.advice_text import render_advice

        shown = advice[:events] if events > 0 else advice
        render_advice(
            console,
            shown,
            analysis.building_name,
            result.peak_limit_pa,
            analysis.unit_system,
            len(advice) - len(shown),
        )
    terminal.render_pipes(console, analysis)
    terminal.render_assumptions(console, analysis)
    console.print(CAUTION)
    return result.exit_status


def example_path() -> Path:
    from importlib.resources import files

    return Path(str(files("knockproof") / "examples" / "clinic.toml"))
