"""The library's one pipeline: ``knockproof.check`` from a path, text or dict, and the CLI's JSON.

The expected values here are the project's own outputs compared with each other (the same building
through different doors must give the same result); the physics is checked elsewhere.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
import tomllib
from pathlib import Path

import pytest

import knockproof
from knockproof.errors import InputError, UsageError

ROOT = Path(__file__).resolve().parents[2]
CLINIC = ROOT / "fixtures" / "clinic.toml"


@pytest.fixture
def clinic(tmp_path: Path) -> Path:
    p = tmp_path / "clinic.toml"
    shutil.copy(CLINIC, p)
    return p


def test_path_text_and_dict_give_the_same_result(clinic: Path):
    text = clinic.read_text(encoding="utf-8")
    by_path = knockproof.check(clinic, simulate=False).to_dict()
    by_text = knockproof.check(text, simulate=False, name=str(clinic)).to_dict()
    by_dict = knockproof.check(tomllib.loads(text), simulate=False, name=str(clinic)).to_dict()
    assert by_path == by_text == by_dict
    assert by_path["verdict"] in ("pass", "fail")


def test_result_carries_the_verdict_and_exit_status(clinic: Path):
    r = knockproof.check(clinic, simulate=False)
    assert (r.verdict, r.exit_status) == (r.review.verdict, r.review.exit_status)
    assert r.exit_status == (1 if r.verdict == "fail" else 0)
    assert not r.simulated and r.arrestor_checks == ()
    assert r.to_dict()["simulation"]["run"] is False


@pytest.mark.parametrize("simulate", [False, True])
def test_cli_json_is_the_library_result_serialised(clinic: Path, simulate: bool):
    args = [sys.executable, "-m", "knockproof", "check", str(clinic), "--format", "json"]
    if not simulate:
        args.append("--no-simulation")
    env = {**os.environ, "NO_COLOR": "1", "COLUMNS": "100", "TERM": "dumb"}
    run = subprocess.run(args, capture_output=True, text=True, env=env, check=False, timeout=300)
    assert run.returncode in (0, 1), run.stderr
    lib = knockproof.check(clinic, simulate=simulate)
    assert json.loads(run.stdout) == json.loads(json.dumps(lib.to_dict()))
    assert run.returncode == lib.exit_status


def test_bad_text_names_the_given_name():
    with pytest.raises(InputError, match="my-building"):
        knockproof.check("[building]\nname = 3\n", simulate=False, name="my-building")


def test_a_dict_that_is_not_a_table_is_refused():
    with pytest.raises((InputError, UsageError)):
        knockproof.check(42, simulate=False)  # type: ignore[arg-type]


def test_uncertainty_is_refused_honestly(clinic: Path):
    with pytest.raises(UsageError, match="not available"):
        knockproof.check(clinic, uncertainty=True)


def test_public_api_is_listed():
    assert {"check", "CheckResult", "analyze", "load", "AdviceRequest"} <= set(knockproof.__all__)
