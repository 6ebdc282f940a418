"""`knockproof advise`, run as a user would: exit status, stdout and stderr checked apart, at 80
columns with colour off.

Until the command is wired into the main app, the tests run the same command function through a
two-command typer app built the way ``cli/app.py`` builds its own (and the same error handling).
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from functools import cache
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
PSI = 6894.757293168  # Pa (NIST SP 811)

_WRAPPER = """
import sys, typer
from knockproof.cli import advise_cmd
from knockproof.cli.state import run_app
app = typer.Typer(add_completion=False, pretty_exceptions_enable=False, rich_markup_mode=None)
app.command("advise")(advise_cmd.command)
app.command("version")(lambda: None)
sys.exit(run_app(app))
"""


def _env() -> dict[str, str]:
    return {**os.environ, "NO_COLOR": "1", "COLUMNS": "80", "TERM": "dumb"}


@cache
def _wired() -> bool:
    r = subprocess.run(
        [sys.executable, "-m", "knockproof", "--help"],
        capture_output=True,
        text=True,
        env=_env(),
        cwd=ROOT,
        timeout=120,
    )
    return " advise " in r.stdout


def advise_cli(*args: str) -> subprocess.CompletedProcess[str]:
    head = ["-m", "knockproof"] if _wired() else ["-c", _WRAPPER]
    return subprocess.run(
        [sys.executable, *head, "advise", *args],
        capture_output=True,
        text=True,
        env=_env(),
        cwd=ROOT,
        timeout=300,
    )


def test_text_report_at_80_columns() -> None:
    r = advise_cli("fixtures/laundry.toml", "--event", "W10:cold")
    assert r.returncode == 1, r.stderr  # the event is over 150 psi as the building stands
    assert r.stderr == ""
    lines = r.stdout.splitlines()
    assert all(len(x) <= 80 and x == x.rstrip() for x in lines)
    text = r.stdout
    assert "W10:cold" in text and "kPa" in text
    for kind in ("arrestor", "slower-closure", "lower-static", "larger-pipe"):
        assert kind in text
    assert "Solved: a closure of at least" in text
    assert "qualified person" in text and "must meet local code" in text
    assert "\x1b[" not in text  # NO_COLOR


def test_json_contract_and_exit_status() -> None:
    r = advise_cli("fixtures/laundry.toml", "--format", "json", "--limit", "150 psi")
    assert r.returncode == 1, r.stderr
    assert r.stderr == ""
    d = json.loads(r.stdout)
    assert d["limit_pa"] == pytest.approx(150 * PSI, rel=1e-5)  # JSON keeps 6 figures
    assert d["events"], "the laundry's end washers exceed 150 psi"
    for e in d["events"]:
        assert e["peak_pressure_pa"] > 150 * PSI
        assert e["options"]
        for o in e["options"]:
            for key in (
                "kind",
                "change",
                "peak_pressure_pa",
                "passes",
                "cost",
                "practicality",
                "threshold",
            ):
                assert key in o
    assert "qualified person" in d["caution"] and "local code" in d["caution"]


def test_a_limit_nothing_exceeds_exits_0() -> None:
    r = advise_cli("fixtures/laundry.toml", "--limit", "300 psi")
    assert r.returncode == 0, r.stderr
    assert "nothing to advise" in r.stdout


def test_bare_limit_takes_the_buildings_units() -> None:
    r = advise_cli("fixtures/laundry.toml", "--limit", "1200", "--format", "json")  # kPa (SI)
    assert r.returncode == 0, r.stderr
    assert json.loads(r.stdout)["limit_pa"] == pytest.approx(1.2e6)


@pytest.mark.parametrize(
    ("args", "message"),
    [
        (("--limit", "150 ft"), "--limit: expected a pressure"),
        (("--limit", "-5 psi"), "--limit: must be more than zero"),
        (("--event", "W99:cold"), "no event 'W99:cold'"),
        (("--format", "html"), "--format: expected text or json"),
    ],
)
def test_usage_errors_exit_2_with_a_message(args: tuple[str, ...], message: str) -> None:
    r = advise_cli("fixtures/laundry.toml", *args)
    assert r.returncode == 2
    assert message in r.stderr
    assert "Traceback" not in r.stderr
    assert r.stdout == ""
