"""`knockproof check`: analyse a building, apply the rules, report. The main job."""

from __future__ import annotations

from pathlib import Path

import typer


def command(
    file: Path | None = typer.Argument(None, help="Building file (TOML).", show_default=False),
    example: bool = typer.Option(False, "--example", help="Check the bundled example building."),
    format: str = typer.Option("text", "--format", "-f", help="text, json or markdown."),
) -> int:
    """Check a building's water-supply tree for water hammer."""
    from knockproof.errors import UsageError

    if format not in ("text", "json", "markdown"):
        raise UsageError(f"--format: expected text, json or markdown, found '{format}'")
    if example == (file is not None):
        raise UsageError("give a building file or --example (one of them)")
    from knockproof.analysis.summary import summarize
    from knockproof.cli.output import out
    from knockproof.model.loader import load_building
    from knockproof.network import build_tree
    from knockproof.report.cautions import CAUTION
    from knockproof.report.summary_text import render_summary

    path = example_path() if example else file
    assert path is not None
    building = load_building(path)
    tree = build_tree(building)
    summary = summarize(tree)
    console = out()
    render_summary(console, summary, building.unit_system)
    console.print(CAUTION)
    return 0


def example_path() -> Path:
    from importlib.resources import files

    return Path(str(files("knockproof") / "examples" / "clinic.toml"))
