"""`knockproof check` on bad building files: exit status 2, a clean message on stderr, nothing on
stdout, no traceback. The real command is run at a fixed width with colour off."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

MINIMAL = """\
[building]
name = "Minimal CLI test building (invented scenario)"

[defaults]
material = "copper-L"

[[supply]]
node = "S"
static_pressure = 60

[[pipe]]
id = "P1"
from = "S"
to = "A"
length = 20
size = "3/4"

[[pipe]]
id = "P2"
from = "A"
to = "B"
length = 10
size = "1/2"

[[fixture]]
id = "F1"
kind = "lavatory"
cold = "B"
"""


def write(tmp_path: Path, text: str | bytes) -> Path:
    path = tmp_path / "building.toml"
    if isinstance(text, bytes):
        path.write_bytes(text)
    else:
        path.write_text(text, encoding="utf-8")
    return path


def check(path: Path) -> subprocess.CompletedProcess[str]:
    env = {**os.environ, "NO_COLOR": "1", "COLUMNS": "100"}
    return subprocess.run(
        [sys.executable, "-m", "knockproof", "check", str(path)],
        capture_output=True,
        text=True,
        env=env,
        timeout=120,
    )


CASES = {
    "loop": (
        MINIMAL + '\n[[pipe]]\nid = "P3"\nfrom = "B"\nto = "S"\nlength = 5\nsize = "1/2"\n',
        ["closes a loop", "field 'to'"],
    ),
    "length-in-psi": (
        MINIMAL.replace("length = 10", 'length = "10 psi"'),
        ['pipe "P2"', "field 'length'", "10 psi"],
    ),
    "unknown-node": (
        MINIMAL + '\n[[fixture]]\nid = "F2"\nkind = "lavatory"\ncold = "Q"\n',
        ['fixture "F2"', "field 'cold'", "unknown node 'Q'"],
    ),
    "misspelt-key": (
        MINIMAL.replace('size = "1/2"', 'size = "1/2"\nlenght = 4'),
        ['pipe "P2"', "field 'lenght'"],
    ),
    "toml-syntax": (MINIMAL + '\n[[pipe]]\nid = "P9\n', ["not valid TOML", "line 31"]),
    "not-utf8": (MINIMAL.encode() + b"# caf\xe9\n", ["not UTF-8"]),
    "unknown-template": (
        MINIMAL + '\n[[place]]\ntemplate = "nosuch"\n',
        ["place #1", "field 'template'", "nosuch"],
    ),
}


@pytest.mark.parametrize("case", sorted(CASES))
def test_check_refuses_bad_input(tmp_path: Path, case: str) -> None:
    text, expected = CASES[case]
    path = write(tmp_path, text)
    run = check(path)
    assert run.returncode == 2, run.stderr
    assert run.stdout == ""
    assert "Traceback" not in run.stderr
    # The console may wrap long messages; compare with whitespace folded.
    stderr = " ".join(run.stderr.split())
    assert str(path) in stderr
    for words in expected:
        assert words in stderr, (words, run.stderr)


def test_check_missing_file(tmp_path: Path) -> None:
    path = tmp_path / "nowhere.toml"
    run = check(path)
    assert run.returncode == 2
    assert run.stdout == ""
    assert "Traceback" not in run.stderr
    assert "nowhere.toml" in run.stderr


def test_check_reports_several_problems_together(tmp_path: Path) -> None:
    text = MINIMAL.replace("length = 10", 'length = "10 psi"').replace(
        'size = "3/4"', 'size = "3/4"\nmaterial = "unobtainium"'
    )
    run = check(write(tmp_path, text))
    assert run.returncode == 2
    assert run.stdout == ""
    stderr = " ".join(run.stderr.split())
    assert 'pipe "P1"' in stderr and 'pipe "P2"' in stderr
    assert "unobtainium" in stderr and "10 psi" in stderr
