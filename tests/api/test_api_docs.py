"""The worked example in docs/api.md runs as written."""

from __future__ import annotations

import contextlib
import io
import os
import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]


def test_api_doc_example_runs(monkeypatch):
    text = (ROOT / "docs" / "api.md").read_text(encoding="utf-8")
    (code,) = re.findall(r"```python\n(.*?)```", text, re.S)
    monkeypatch.chdir(ROOT)
    out = io.StringIO()
    scope: dict[str, object] = {}
    with contextlib.redirect_stdout(out):
        exec(compile(code, "docs/api.md", "exec"), scope)  # noqa: S102 - our own documentation
    first = out.getvalue().splitlines()[0]
    assert first in ("fail 1", "pass 0")
    assert scope["data"]["verdict"] == scope["result"].verdict  # type: ignore[index,attr-defined]
    assert os.path.exists(ROOT / "fixtures" / "clinic.toml")
