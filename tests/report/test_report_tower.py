"""The tower (24 floors x 10 units, ~3300 pipes): the report stays small and legible."""

from __future__ import annotations

import re
import time

import pytest

from knockproof.report.html import render_html


@pytest.fixture(scope="module")
def tower_html(tower):
    t0 = time.perf_counter()
    text = render_html(tower.tree, tower.analysis, tower.review)
    return text, time.perf_counter() - t0


def test_tower_report_is_under_5_mb(tower_html):
    text, seconds = tower_html
    assert len(text.encode("utf-8")) < 5_000_000
    assert seconds < 60


def test_tower_report_folds_floors_and_groups_alike_rows(tower, tower_html):
    text, _s = tower_html
    assert "floors 3–12 alike: floor 2 drawn" in text
    assert "floors 14–23 alike: floor 13 drawn" in text
    assert len(re.findall(r'<svg[^>]*class="kp-riser', text)) == 2  # a cold and a hot panel
    # 1612 arrestors in the schedule, but far fewer table rows: alike ones share a row
    rows = text.split('<table class="kp-table kp-schedule">')[1].split("</table>")[0].count("<tr>")
    assert rows < 120
    assert f"{len(tower.review.arrestors)}</td>" in text
