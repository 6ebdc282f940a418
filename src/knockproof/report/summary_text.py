"""Terminal rendering of a :class:`~knockproof.analysis.summary.TreeSummary`."""

from __future__ import annotations

from rich.console import Console
from rich.table import Table

from knockproof.analysis.summary import TreeSummary
from knockproof.model.units import fmt


def render_summary(console: Console, s: TreeSummary, units: str) -> None:
    console.print(f"[bold]{s.name}[/]")
    console.print(
        f"{s.nodes} nodes, {s.pipes} pipes ({fmt(s.total_pipe_length_m, 'length', units, 0)}), "
        f"{s.fixtures} fixtures on {s.levels} levels, {s.quick_closing_valves} quick-closing "
        f"valves, {s.arrestors_proposed} proposed arrestors"
    )
    t = Table(title="Supplies", title_justify="left", show_edge=False)
    for col in ("node", "kind", "side", "static pressure"):
        t.add_column(col)
    for node, kind, side, p in s.supplies:
        t.add_row(
            node, kind, side, fmt(p, "pressure", units, 0) if p is not None else "from cold side"
        )
    console.print(t)
    t = Table(title="Pipes by material and size", title_justify="left", show_edge=False)
    for col, just in (
        ("material", "left"),
        ("size", "right"),
        ("pipes", "right"),
        ("length", "right"),
    ):
        t.add_column(col, justify=just)  # type: ignore[arg-type]
    for m, size, n, length in s.pipes_by_material_size:
        t.add_row(m, size, str(n), fmt(length, "length", units, 0))
    console.print(t)
    t = Table(title="Fixtures", title_justify="left", show_edge=False)
    t.add_column("kind")
    t.add_column("count", justify="right")
    for kind, n in s.fixtures_by_kind:
        t.add_row(kind, str(n))
    console.print(t)
