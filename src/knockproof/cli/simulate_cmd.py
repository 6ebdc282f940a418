"""`knockproof simulate`: one closure event in detail, with a plot."""

from __future__ import annotations

from pathlib import Path

import typer


def command(
    file: Path = typer.Argument(..., help="Building file (TOML)."),
    event: str | None = typer.Option(
        None, "--event", help="Event id, e.g. 'W3:cold' (fixture:side). Default: the worst."
    ),
    plot: Path | None = typer.Option(None, "--plot", help="Write a plot (.png or .svg)."),
    format: str = typer.Option("text", "--format", "-f", help="text or json."),
    profile: str | None = typer.Option(None, "--profile", help="Rule profile (for arrestors)."),
) -> int:
    """Simulate one closure event: pressure at the valve with and without arrestors."""
    from knockproof.errors import UsageError

    if format not in ("text", "json"):
        raise UsageError(f"--format: expected text or json, found '{format}'")
    if plot is not None:
        if plot.suffix.lower() not in (".png", ".svg"):
            raise UsageError(f"--plot: expected a .png or .svg file name, found '{plot}'")
        if plot.resolve() == file.resolve():
            raise UsageError("--plot: refusing to write over the input file")
    from knockproof.analysis.run import analyze_tree
    from knockproof.model.loader import load_building
    from knockproof.network import build_tree
    from knockproof.rules import review as run_review
    from knockproof.rules.review import resolve_profile
    from knockproof.transient.events import simulate_event
    from knockproof.transient.run import cushions_for

    building = load_building(file)
    tree = build_tree(building)
    analysis = analyze_tree(tree)
    if not analysis.events:
        raise UsageError(f"{file}: the building has no quick-closing valve to simulate")
    if event is None:
        chosen = max(analysis.events, key=lambda e: (e.peak_pressure_pa, e.id))
    else:
        matches = [e for e in analysis.events if e.id == event]
        if not matches:
            sample = ", ".join(e.id for e in analysis.events[:8])
            raise UsageError(f"--event: no event '{event}' in {file}; events look like: {sample}")
        chosen = matches[0]
    prof = resolve_profile(profile, building.source, building.profile)
    review = run_review(tree, analysis, prof)
    cushions = cushions_for(chosen, review.arrestors)
    bare = simulate_event(tree, analysis, chosen)
    protected = simulate_event(tree, analysis, chosen, cushions) if cushions else None
    if plot is not None:
        from knockproof.report.event_plot import plot_event

        tmp = plot.with_name(f".{plot.name}.tmp{plot.suffix}")
        plot_event(tmp, chosen, bare, protected, building.unit_system)
        tmp.replace(plot)
    from knockproof.report.simulate_out import render_simulation, simulation_json

    if format == "json":
        from knockproof.cli.output import write_text

        write_text(simulation_json(chosen, bare, protected))
    else:
        from knockproof.cli.output import out

        render_simulation(out(), chosen, bare, protected, building.unit_system, plot)
    return 0
