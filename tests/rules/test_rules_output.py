"""What the rule engine hands on: JSON, docs/rules.md, the terminal and markdown renderings."""

from __future__ import annotations

import json
import re
from pathlib import Path

from rich.console import Console
from rules_buildings import arrestor, flat

from knockproof.report.review_markdown import review_markdown
from knockproof.report.review_text import render_review
from knockproof.rules import review_to_json
from knockproof.rules.docs import rules_markdown

ROOT = Path(__file__).resolve().parents[2]

FINDING_KEYS = {"rule", "severity", "where", "message", "measured", "limit", "unit",
                "recommendation"}
ARRESTOR_KEYS = {"node", "side", "size_class", "gas_volume_m3", "protects"}


def test_json_contract(check):
    c = check(flat(static="90 psi", arrestors=arrestor("K", "AA")))
    data = review_to_json(c.review)
    assert json.loads(json.dumps(data)) == data
    assert data["verdict"] == "fail" and data["exit_status"] == 1
    assert data["findings"] and data["arrestors"]
    for f in data["findings"]:
        assert FINDING_KEYS <= set(f)
        assert isinstance(f["where"], dict) and "description" in f["where"]
    for a in data["arrestors"]:
        assert ARRESTOR_KEYS <= set(a)
        assert isinstance(a["protects"], list)
    static = [f for f in data["findings"] if f["rule"] == "pressure.static-limit"]
    assert static[0]["unit"] == "Pa"
    assert static[0]["limit"] == 551581.0  # 80 psi in Pa, six significant figures
    for key in data["arrestors"][0]:
        if key in ("gas_volume_m3", "distance_from_valve_m", "branch_length_m",
                   "kinetic_energy_j", "static_pressure_pa"):
            assert re.search(r"_(m3|m|j|pa)$", key)


def test_docs_rules_md_is_current():
    page = (ROOT / "docs" / "rules.md").read_text(encoding="utf-8")
    assert page == rules_markdown(), (
        "docs/rules.md is stale: run `python -m knockproof.rules.docs > docs/rules.md`")


def _text(review, width=80) -> str:
    console = Console(width=width, no_color=True, record=True, force_terminal=False)
    render_review(console, review, limit=3)
    return console.export_text()


def test_terminal_report_at_80_columns_without_colour(check):
    c = check(flat(static="90 psi", arrestors=arrestor("K", "AA")))
    text = _text(c.review)
    assert "\x1b[" not in text
    assert max(len(line) for line in text.splitlines()) <= 80
    assert text.splitlines()[2].startswith("FAIL")
    for words in ("pressure.static-limit (error", "arrestor.size-class (error",
                  "Arrestor schedule: 4 arrestors", "qualified person"):
        assert words in text


def test_terminal_report_of_a_pass(check):
    rights = arrestor("K", "A") + arrestor("HK", "A") + arrestor("W", "AA") + arrestor("HW", "AA")
    text = _text(check(flat(arrestors=rights)).review)
    assert text.splitlines()[2].startswith("PASS")
    assert "No findings." in text
    assert "4 pass, 0 fail" in text


def test_markdown_report(check):
    c = check(flat(static="90 psi"))
    md = review_markdown(c.review)
    assert md.startswith("# Rule review: test building (invented)")
    assert "**FAIL** with profile `us-default`" in md
    assert "### pressure.static-limit (error)" in md
    assert "| AR-1 | K | cold | A |" in md
    assert "90.0 psi | 80.0 psi |" in md
