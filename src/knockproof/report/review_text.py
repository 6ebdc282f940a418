"""Terminal rendering of a rule :class:`~knockproof.rules.review.Review` (rich).

Readable at 80 columns and without colour (NO_COLOR): every state is said in words (PASS / FAIL,
error / warning / info); colour only repeats it. Values are shown in the building's unit system.
"""

from __future__ import annotations

from collections import Counter

from rich.console import Console
from rich.markup import escape
from rich.padding import Padding
from rich.table import Table
from rich.text import Text

from knockproof.model.units import fmt
from knockproof.report.cautions import CAUTION
from knockproof.rules.arrestors import show_volume
from knockproof.rules.engine import Finding, registry
from knockproof.rules.review import Review

_STYLE = {"error": "bold red", "warning": "yellow", "info": "cyan"}

#: SI unit of a finding -> kind of quantity for :func:`fmt`.
UNIT_KIND = {"Pa": "pressure", "m/s": "velocity", "m": "length", "m3": "volume"}


def show_quantity(value: float | None, unit: str, unit_system: str) -> str:
    """A finding's measured or limit value in the user's units ("" when there is none)."""
    if value is None:
        return ""
    kind = UNIT_KIND.get(unit)
    if kind is None:
        return f"{value:g} {unit}".strip()
    if kind == "volume":
        return show_volume(value, unit_system)
    return fmt(value, kind, unit_system, 1)


def _finding_line(f: Finding) -> Text:
    text = Text("- ")
    text.append(f.message)
    if f.recommendation:
        text.append(" Recommended: ", style="bold")
        text.append(f.recommendation + ".")
    if f.basis:
        text.append(f" [{f.basis}]", style="dim")
    return text


def render_review(console: Console, review: Review, limit: int = 5) -> None:
    """Print the review: verdict, findings by rule (``limit`` each; 0 for all), schedule, valves."""
    u = review.unit_system
    sev = review.counts_by_severity()
    word = "PASS" if review.verdict == "pass" else "FAIL"
    style = "bold green" if review.verdict == "pass" else "bold red"
    console.print(Text.assemble(("Rule review: ", "bold"), (review.building_name, "bold")))
    console.print(f"profile {escape(review.profile)}; {len(review.rules_applied)} rules applied")
    console.print(Text.assemble(
        (word, style), f"  {sev['error']} errors, {sev['warning']} warnings, {sev['info']} notes "
        f"(exit status {review.exit_status})"))
    console.print()

    rules = registry()
    counts = Counter(f.rule for f in review.findings)
    if counts:
        t = Table(title="Findings by rule", title_justify="left", show_edge=False,
                  pad_edge=False)
        t.add_column("rule", overflow="fold")
        t.add_column("severity")
        t.add_column("count", justify="right")
        for rid in rules:
            if counts.get(rid):
                s = next(f.severity for f in review.findings if f.rule == rid)
                t.add_row(rid, Text(s, style=_STYLE[s]), str(counts[rid]))
        console.print(t)
        console.print()
        for rid in rules:
            found = [f for f in review.findings if f.rule == rid]
            if not found:
                continue
            s = found[0].severity
            console.print(Text.assemble((rid, "bold"), " (", (s, _STYLE[s]), f", {len(found)}): ",
                                        rules[rid].title))
            shown = found if limit <= 0 else found[:limit]
            for f in shown:
                console.print(Padding(_finding_line(f), (0, 0, 0, 2)))
            if len(found) > len(shown):
                console.print(Padding(Text(f"... and {len(found) - len(shown)} more"),
                                      (0, 0, 0, 2)))
        console.print()
    else:
        console.print("No findings.")
        console.print()

    n = len(review.arrestors)
    sizes = ", ".join(f"{k} {v}" for k, v in review.counts_by_size.items()) or "none"
    console.print(Text.assemble(("Arrestor schedule: ", "bold"),
                                f"{n} arrestor{'s' if n != 1 else ''} (by class: {sizes})"))
    if n:
        t = Table(show_edge=False, pad_edge=False)
        t.add_column("id")
        t.add_column("node", overflow="fold", max_width=12)
        t.add_column("side")
        t.add_column("class")
        t.add_column("gas", justify="right")
        t.add_column("protects", overflow="fold", max_width=30)
        shown_a = review.arrestors if limit <= 0 else review.arrestors[: max(limit * 2, 10)]
        for a in shown_a:
            gas = show_volume(a.gas_volume_m3, u) if a.gas_volume_m3 is not None else "-"
            t.add_row(a.id, escape(a.node), a.side, a.size_class, gas, escape(a.description))
        console.print(t)
        if len(review.arrestors) > len(shown_a):
            console.print(f"... and {len(review.arrestors) - len(shown_a)} more in the full "
                          "schedule")
    console.print()
    valves = review.valve_verdicts
    if valves:
        fails = [v for v in valves if v.verdict == "fail"]
        console.print(Text.assemble(
            ("Quick-closing valves: ", "bold"),
            f"{len(valves)}; {len(valves) - len(fails)} pass, {len(fails)} fail"))
        status = Counter(v.status for v in fails)
        if status:
            console.print("  failing for: " + "; ".join(f"{k} {c}" for k, c in
                                                        status.most_common()))
        console.print()
    console.print(Text(CAUTION, style="italic"))
