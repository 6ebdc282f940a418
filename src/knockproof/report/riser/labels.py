"""Node labels of the riser diagram: the part of a label worth showing beside its node, a
supply's text, and their placement where no pipe, fixture or other label is in the way."""

from __future__ import annotations

from collections import defaultdict
from typing import Any

from knockproof.model.units import fmt
from knockproof.report.riser.drawing import FixtureMark, TextMark

CHAR_PX = 5.0  #: width of one character of a 9 px label, on average [px]


def _label_parts(label: str, level_name: str) -> list[str]:
    """A label's comma-separated parts, without the level's name at its start."""
    if level_name and label.startswith(level_name):
        label = label[len(level_name) :].lstrip(" ,;:-")
    return [s.strip() for s in label.split(",") if s.strip()]


def _supply_text(supply: Any, unit_system: str) -> str:
    if supply.static_pressure_pa is None:
        return str(supply.kind)
    return f"{supply.kind}, {fmt(supply.static_pressure_pa, 'pressure', unit_system, 0)}"


def _place_labels(
    candidates: list[tuple[float, float, str, str, bool]],
    vsegs: list[tuple[float, float, float]],
    fixtures: list[FixtureMark],
    right_edge: float,
) -> list[TextMark]:
    """Put each label just above its node, to the right (a supply's: below it, to the left), cut
    short with an ellipsis where a pipe, a fixture or another label would be in the way.

    ``candidates`` are (x, y, text, title, left) of the nodes, in pixels.
    """
    bin_px = 12.0
    obstacles: dict[int, list[tuple[float, float, float, float]]] = defaultdict(list)

    def block(x0: float, x1: float, y0: float, y1: float) -> None:
        for k in range(int(y0 // bin_px), int(y1 // bin_px) + 1):
            obstacles[k].append((x0, x1, y0, y1))

    for x, y0, y1 in vsegs:
        block(x - 2.0, x + 2.0, y0, y1)
    for f in fixtures:
        block(f.x - 7.0, f.x + 7.0, f.y + 2.0, f.y + 21.0)
    out: list[TextMark] = []
    for x, y, text, title, left in sorted(candidates, key=lambda c: (c[1], c[0])):
        baseline = y + 17.0 if left else y - 18.0
        top, bottom = baseline - 8.0, baseline + 2.0
        near = [
            o
            for k in range(int(top // bin_px), int(bottom // bin_px) + 1)
            for o in obstacles.get(k, ())
            if o[2] < bottom and o[3] > top
        ]
        if left:  # right-aligned, ending left of the node
            end = x - 7.0
            limit = 4.0
            for lo, hi, _y0, _y1 in near:
                if lo < end:
                    limit = max(limit, hi if hi < end else end)
            room = end - limit
        else:
            start = x + 3.0
            limit = right_edge
            for lo, hi, _y0, _y1 in near:
                if hi > start:
                    limit = min(limit, lo if lo > start else start)
            room = limit - start
        chars = min(int((room - 2.0) / CHAR_PX), 48)
        if chars < 4:
            continue
        short = text if len(text) <= chars else text[: chars - 1].rstrip() + "…"
        width = len(short) * CHAR_PX
        if left:
            out.append(TextMark(end, baseline, short, title, "kp-t kp-tr"))
            block(end - width, end, top, bottom)
        else:
            out.append(TextMark(start, baseline, short, title))
            block(start, start + width, top, bottom)
    return out
