"""End to end on the example laundry: advise on a failing washer, make the change in the building
file itself, run the check's screen again (``analyze``) and see the washer pass.

The laundry's last washer (W10, cold) peaks at about 169 psi, over the default 150 psi limit. The
advisor's top passing option is an arrestor, which the closed-form screen does not model (it is
checked by the arrestor rules and by simulation), so the file is changed by the best passing
option the screen can see; the lower static pressure is applied as well, as a PRV in the file.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from knockproof.advice import advise
from knockproof.analysis.run import analyze, analyze_tree
from knockproof.model.loader import load_building
from knockproof.network import build_tree

ROOT = Path(__file__).resolve().parents[2]
LAUNDRY = ROOT / "fixtures" / "laundry.toml"
EVENT = "W10:cold"
PSI = 6894.757293168  # Pa (NIST SP 811)
LIMIT = 150 * PSI
SCREEN_SEES = ("slower-closure", "lower-static", "larger-pipe", "flexible-pipe", "flow-restrictor")


@pytest.fixture(scope="module")
def advice():
    tree = build_tree(load_building(LAUNDRY))
    analysis = analyze_tree(tree)
    assert next(e for e in analysis.events if e.id == EVENT).peak_pressure_pa > LIMIT
    (a,) = advise(tree, analysis, event_ids=[EVENT])
    return a


def _peak(path: Path) -> float:
    return next(e for e in analyze(path).events if e.id == EVENT).peak_pressure_pa


def _apply(text: str, option) -> str:
    """Make the option's change in the file text, as a designer would."""
    if option.kind == "slower-closure":
        ms = re.search(r"→ ([\d.]+) ms", option.change).group(1)
        changed, n = re.subn(r'closure_time = "30 ms"', f'closure_time = "{ms} ms"', text)
        assert n == 1  # the washers' template
        return changed
    if option.kind == "lower-static":
        kpa = re.search(r"→ (\d+) kPa", option.change).group(1)
        return text + (
            f'\n[[device]]\nid = "PRV-W10"\nkind = "prv"\nnode = "W10-c"\nsetting = "{kpa} kPa"\n'
        )
    raise AssertionError(f"no file edit written for {option.kind}")


def test_top_passing_option_is_listed_first(advice) -> None:
    assert advice.options[0].passes
    assert advice.options[0].kind == "arrestor"


def test_best_option_the_screen_sees_makes_the_washer_pass(advice, tmp_path: Path) -> None:
    best = next(o for o in advice.options if o.passes and o.kind in SCREEN_SEES)
    path = tmp_path / "laundry.toml"
    path.write_text(_apply(LAUNDRY.read_text(encoding="utf-8"), best), encoding="utf-8")
    peak = _peak(path)
    assert peak <= LIMIT
    assert peak == pytest.approx(best.peak_pressure_pa, rel=1e-9)


def test_a_prv_at_the_solved_setting_makes_the_washer_pass(advice, tmp_path: Path) -> None:
    static = next(o for o in advice.options if o.kind == "lower-static")
    assert static.passes
    path = tmp_path / "laundry-prv.toml"
    path.write_text(_apply(LAUNDRY.read_text(encoding="utf-8"), static), encoding="utf-8")
    peak = _peak(path)
    assert peak <= LIMIT
    assert peak == pytest.approx(static.peak_pressure_pa, rel=1e-9)
