"""Shared, once-per-session builds of the example buildings for the report tests."""

from __future__ import annotations

import os
import subprocess
import sys
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pytest

ROOT = Path(__file__).resolve().parents[2]
FIXTURES = ROOT / "fixtures"


@dataclass
class Built:
    tree: Any
    analysis: Any
    review: Any


def build(path: Path) -> Built:
    from knockproof.analysis.run import analyze_tree
    from knockproof.model.loader import load_building
    from knockproof.network import build_tree
    from knockproof.rules import review

    tree = build_tree(load_building(path))
    analysis = analyze_tree(tree)
    return Built(tree, analysis, review(tree, analysis))


@pytest.fixture(scope="session")
def clinic() -> Built:
    return build(FIXTURES / "clinic.toml")


@pytest.fixture(scope="session")
def laundry() -> Built:
    return build(FIXTURES / "laundry.toml")


@pytest.fixture(scope="session")
def tower() -> Built:
    return build(FIXTURES / "tower.toml")


@pytest.fixture(scope="session")
def clinic_html(clinic: Built) -> str:
    from knockproof.report.html import render_html

    return render_html(clinic.tree, clinic.analysis, clinic.review)


# A building whose names try to run code in the report. The payloads either set the page title or
# add a <kp-xss> element, so that a browser can tell whether any of them ran.
HOSTILE_BUILDING = r'''
[building]
name = "<script>document.title='PWNED'</script> Test House"
units = "us"

[defaults]
material = "copper-L"

[[supply]]
node = "svc"
kind = "street"
static_pressure = "70 psi"

[[supply]]
node = "heater-out"
kind = "heater-outlet"
side = "hot"
fed_from = "heater-in"

[[pipe]]
id = "P1"
from = "svc"
to = "main"
length = 30
size = "3/4"
label = "<img src=x onerror=alert(1)>"

[[pipe]]
id = "P2"
from = "main"
to = "<b>n</b>"
length = 12
size = "1/2"

[[pipe]]
id = "P3"
from = "main"
to = "heater-in"
length = 5
size = "3/4"

[[pipe]]
id = "H1"
from = "heater-out"
to = "hn"
length = 20
size = "1/2"
label = "<svg onload=\"document.title='PWNED'\">"

[[fixture]]
id = "<script>alert(1)</script>"
kind = "clothes-washer"
cold = "<b>n</b>"
hot = "hn"
label = "<img src=x onerror=\"document.body.appendChild(document.createElement('kp-xss'))\">"

[[arrestor]]
id = "=HYPERLINK(\"http://example.invalid\")"
node = "main"
size = "A"
'''


@pytest.fixture
def hostile_file(tmp_path: Path) -> Path:
    p = tmp_path / "hostile.toml"
    p.write_text(HOSTILE_BUILDING, encoding="utf-8")
    return p


# The report command, wired into a small app of its own (the lead wires it into cli/app.py).
_APP = """
import sys, typer
from knockproof.cli.report_cmd import command
from knockproof.cli.state import run_app
app = typer.Typer(add_completion=False, pretty_exceptions_enable=False)
@app.callback()
def _root() -> None:
    pass
app.command("report")(command)
sys.exit(run_app(app))
"""


def run_report(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess[str]:
    env = {**os.environ, "NO_COLOR": "1", "COLUMNS": "100", "TERM": "dumb"}
    return subprocess.run([sys.executable, "-c", _APP, "report", *args], capture_output=True,
                          text=True, env=env, cwd=cwd or ROOT, timeout=300)
