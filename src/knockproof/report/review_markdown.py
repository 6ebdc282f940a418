"""Markdown of a rule :class:`~knockproof.rules.review.Review`, for pasting into documents."""

from __future__ import annotations

from collections import Counter

from knockproof.model.units import fmt
from knockproof.report.cautions import CAUTION
from knockproof.report.review_text import show_quantity
from knockproof.rules.arrestors import show_volume
from knockproof.rules.engine import registry
from knockproof.rules.review import Review


def _cell(text: str) -> str:
    return text.replace("|", "\\|").replace("\n", " ")


def review_markdown(review: Review, limit: int = 0) -> str:
    """The review as markdown; ``limit`` findings per rule and schedule rows (0: all)."""
    u = review.unit_system
    sev = review.counts_by_severity()
    word = "PASS" if review.verdict == "pass" else "FAIL"
    lines = [
        f"# Rule review: {_cell(review.building_name)}",
        "",
        f"> {CAUTION}",
        "",
        f"**{word}** with profile `{review.profile}`: {sev['error']} errors, "
        f"{sev['warning']} warnings, {sev['info']} notes (exit status {review.exit_status}).",
        "",
    ]
    rules = registry()
    counts = Counter(f.rule for f in review.findings)
    lines += ["## Findings", ""]
    if not counts:
        lines += ["No findings.", ""]
    else:
        lines += ["| rule | severity | count | what it checks |", "|---|---|---:|---|"]
        for rid in rules:
            if counts.get(rid):
                s = next(f.severity for f in review.findings if f.rule == rid)
                lines.append(f"| `{rid}` | {s} | {counts[rid]} | {_cell(rules[rid].title)} |")
        lines.append("")
        for rid in rules:
            found = [f for f in review.findings if f.rule == rid]
            if not found:
                continue
            lines += [f"### {rid} ({found[0].severity})", "",
                      "| where | finding | measured | limit | recommendation | basis |",
                      "|---|---|---:|---:|---|---|"]
            shown = found if limit <= 0 else found[:limit]
            for f in shown:
                lines.append(
                    f"| {_cell(f.description)} | {_cell(f.message)} | "
                    f"{show_quantity(f.measured, f.unit, u)} | {show_quantity(f.limit, f.unit, u)} "
                    f"| {_cell(f.recommendation)} | {_cell(f.basis)} |"
                )
            if len(found) > len(shown):
                lines.append(f"| ... and {len(found) - len(shown)} more | | | | | |")
            lines.append("")
    sizes = ", ".join(f"{k}: {v}" for k, v in review.counts_by_size.items()) or "none"
    lines += ["## Arrestor schedule", "", f"{len(review.arrestors)} arrestors; by size class: "
              f"{sizes}.", ""]
    if review.arrestors:
        lines += ["| id | node | side | class | gas volume | protects | from valve | position |",
                  "|---|---|---|---|---:|---|---:|---|"]
        shown_a = review.arrestors if limit <= 0 else review.arrestors[:limit]
        for a in shown_a:
            gas = show_volume(a.gas_volume_m3, u) if a.gas_volume_m3 is not None else "–"
            lines.append(
                f"| {a.id} | {_cell(a.node)} | {a.side} | {a.size_class} | {gas} | "
                f"{_cell(a.description)} | {fmt(a.distance_from_valve_m, 'length', u)} | "
                f"{a.position} |"
            )
        if len(review.arrestors) > len(shown_a):
            lines.append(f"| ... and {len(review.arrestors) - len(shown_a)} more | | | | | | | |")
        lines.append("")
    valves = review.valve_verdicts
    fails = [v for v in valves if v.verdict == "fail"]
    lines += ["## Quick-closing valves", "",
              f"{len(valves)} valves: {len(valves) - len(fails)} pass, {len(fails)} fail.", ""]
    if valves:
        lines += ["| valve | where | verdict | status | arrestor shown |",
                  "|---|---|---|---|---|"]
        shown_v = valves if limit <= 0 else valves[:limit]
        for v in shown_v:
            lines.append(f"| {_cell(v.valve)} | {_cell(v.description)} | {v.verdict} | "
                         f"{v.status} | {v.arrestor or '–'} |")
        if len(valves) > len(shown_v):
            lines.append(f"| ... and {len(valves) - len(shown_v)} more | | | | |")
        lines.append("")
    return "\n".join(lines)
