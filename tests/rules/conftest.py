"""Fixtures for the rule tests: write a building to tmp_path, analyse it and review it."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest
from rules_buildings import Checked

from knockproof.analysis.run import analyze_tree
from knockproof.model.loader import load_building
from knockproof.network import build_tree
from knockproof.rules import review


@pytest.fixture
def check(tmp_path: Path):
    """check(text, profile=None, name="b.toml") -> Checked: load, build, analyse and review."""

    def _check(text: str, profile: Any = None, name: str = "b.toml") -> Checked:
        p = tmp_path / name
        p.write_text(text, encoding="utf-8")
        b = load_building(p)
        tree = build_tree(b)
        a = analyze_tree(tree)
        return Checked(review(tree, a, profile), tree, a, b, p)

    return _check


@pytest.fixture
def write(tmp_path: Path):
    def _write(text: str, name: str) -> Path:
        p = tmp_path / name
        p.write_text(text, encoding="utf-8")
        return p

    return _write
