"""The HTML report: self-contained, parseable, complete, and safe with hostile names."""

from __future__ import annotations

import re
from html.parser import HTMLParser
from pathlib import Path
from types import SimpleNamespace

from report_support import build

from knockproof.report.cautions import CAUTION
from knockproof.report.html import render_html, summarize_places

VOID = {"area", "base", "br", "col", "embed", "hr", "img", "input", "link", "meta", "source",
        "track", "wbr"}


class Checker(HTMLParser):
    """Collects start tags and attributes, and checks that elements nest and close properly."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.stack: list[str] = []
        self.errors: list[str] = []
        self.tags: list[tuple[str, dict[str, str | None]]] = []
        self.text: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))
        if tag not in VOID:
            self.stack.append(tag)

    def handle_startendtag(self, tag, attrs):
        self.tags.append((tag, dict(attrs)))

    def handle_endtag(self, tag):
        if tag in VOID:
            return
        if not self.stack or self.stack[-1] != tag:
            self.errors.append(f"</{tag}> closes <{self.stack[-1] if self.stack else None}>")
            if tag in self.stack:
                while self.stack and self.stack.pop() != tag:
                    pass
        else:
            self.stack.pop()

    def handle_data(self, data):
        self.text.append(data)


def parse(text: str) -> Checker:
    c = Checker()
    c.feed(text)
    c.close()
    return c


def test_report_parses_and_every_element_closes(clinic_html):
    c = parse(clinic_html)
    assert c.errors == []
    assert c.stack == []
    assert clinic_html.startswith("<!DOCTYPE html>")


def test_report_carries_the_caution_and_the_verdict(clinic, clinic_html):
    assert "".join(parse(clinic_html).text).count(CAUTION) >= 2  # top of the page and the foot
    assert 'id="verdict"' in clinic_html and 'id="sec-verdict"' in clinic_html
    state = clinic.review.verdict
    assert f"kp-verdict-{state}" in clinic_html
    assert {"pass": "Passes", "fail": "Fails"}[state] in clinic_html


def test_report_holds_a_riser_svg_and_plot_svgs(clinic_html):
    c = parse(clinic_html)
    svgs = [a.get("class") or "" for t, a in c.tags if t == "svg"]
    assert any("kp-riser" in s for s in svgs)
    assert sum("kp-plot" in s for s in svgs) >= 2
    # matplotlib's page-wide stylesheet is scoped to the plots
    assert "\n*{stroke-linejoin" not in clinic_html


def test_report_lists_findings_with_rule_ids_and_the_schedule(clinic, clinic_html):
    for f in clinic.review.findings:
        assert f.rule in clinic_html
    assert "sec-schedule" in clinic_html
    for a in clinic.review.arrestors:
        assert a.id in clinic_html
    page_text = "".join(parse(clinic_html).text)
    for text in clinic.analysis.assumptions:
        assert text in page_text
    assert "Joukowsky" in clinic_html and "docs/methods.md" in clinic_html


def test_report_is_self_contained_and_has_no_script(clinic_html):
    c = parse(clinic_html)
    names = {t for t, _a in c.tags}
    assert "script" not in names and "link" not in names and "iframe" not in names
    for _t, attrs in c.tags:
        for key, value in attrs.items():
            assert not key.startswith("on"), key
            if key in ("src", "href") and value is not None:
                assert value.startswith("#"), value  # only links inside the page
    urls = set(re.findall(r"https?://[^\s\"'<>)]+", clinic_html))
    assert urls <= {"http://www.w3.org/2000/svg", "http://www.w3.org/1999/xlink"}, urls
    assert "Content-Security-Policy" in clinic_html


def test_element_ids_are_unique_in_the_page(clinic_html):
    ids = re.findall(r'\sid="([^"]*)"', clinic_html)
    assert len(ids) == len(set(ids))
    for ref in set(re.findall(r'(?:url\(#|href="#)([^)"]+)', clinic_html)):
        assert ref in ids, ref


def test_report_without_review_says_not_evaluated(clinic):
    text = render_html(clinic.tree, clinic.analysis)
    assert "kp-verdict-not-evaluated" in text
    assert "Not evaluated" in text
    assert CAUTION in "".join(parse(text).text)
    assert parse(text).errors == []


def test_report_of_an_si_building_shows_si_units(laundry):
    text = render_html(laundry.tree, laundry.analysis, laundry.review)
    assert " kPa" in text and " psi" not in text
    assert re.search(r"\d m\b", text)
    values = re.sub(r'<span class="kp-rule-title">[^<]*</span>', "", text)  # rule titles: fixed
    assert not re.search(r"\d ft\b", values)


def test_report_plots_the_valve_trace_when_a_simulation_is_given(clinic, clinic_html):
    worst = max(clinic.analysis.events, key=lambda e: e.peak_pressure_pa)
    times = [i * 1e-3 for i in range(200)]
    without = [5e5 + 3e5 * ((i // 20) % 2) for i in range(200)]
    with_arrestors = [5e5 + 5e4 * ((i // 20) % 2) for i in range(200)]
    sims = {worst.id: SimpleNamespace(times_s=times, valve_pressure_pa=without,
                                      valve_pressure_with_arrestors_pa=with_arrestors),
            "no-such-event": None}
    text = render_html(clinic.tree, clinic.analysis, clinic.review, sims)
    assert text.count('class="kp-plot"') == clinic_html.count('class="kp-plot"') + 1
    assert "with the arrestors" in text and "without arrestors" in text
    # a simulation object without the arrays is passed over, not a crash
    broken = {worst.id: SimpleNamespace(times_s=None)}
    assert render_html(clinic.tree, clinic.analysis, clinic.review, broken).count(
        'class="kp-plot"') == clinic_html.count('class="kp-plot"')


def test_report_is_deterministic(clinic, clinic_html):
    assert render_html(clinic.tree, clinic.analysis, clinic.review) == clinic_html


def test_names_from_the_building_are_shown_as_text(hostile_file: Path):
    b = build(hostile_file)
    text = render_html(b.tree, b.analysis, b.review)
    c = parse(text)
    assert c.errors == []
    names = [t for t, _a in c.tags]
    assert "script" not in names and "img" not in names and "b" not in names
    assert names.count("svg") >= 3  # only the report's own drawings
    for _t, attrs in c.tags:
        assert not any(k.startswith("on") for k in attrs), attrs
    page_text = "".join(c.text)
    assert "<script>alert(1)</script>" in page_text
    assert "<script>document.title='PWNED'</script> Test House" in page_text
    assert "<img src=x onerror=\"document.body.appendChild(" in page_text
    assert '=HYPERLINK("http://example.invalid")' in page_text
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in text


def test_alike_places_are_written_with_number_ranges():
    text, more = summarize_places(["floor 3, unit A, kitchen", "floor 4, unit A, kitchen",
                                   "floor 5, unit A, kitchen", "floor 7, unit A, kitchen",
                                   "lobby", "floor 3, unit B, kitchen"])
    assert text == ("floor 3–5, 7, unit A, kitchen; lobby; floor 3, unit B, kitchen")
    assert more == 0
    text, more = summarize_places([f"room {c}" for c in "ABCDEFGHIJ"], limit=3)
    assert text == "room A; room B; room C" and more == 7
