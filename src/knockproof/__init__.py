"""knockproof: water-hammer screening for building water-supply piping.

The public API (see docs/api.md): :func:`check` runs the whole job and returns a
:class:`CheckResult` (verdict, exit status, every stage's results, ``to_dict()`` = the JSON of
``knockproof check --format json``); :func:`analyze` runs the closed-form screen alone.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING

from knockproof.pipeline import AdviceRequest, CheckResult, check, load

if TYPE_CHECKING:
    from knockproof.results import Analysis

__version__ = "0.1.0"

__all__ = ["AdviceRequest", "CheckResult", "__version__", "analyze", "check", "load"]


def analyze(path: str | Path, simultaneous: bool = False) -> Analysis:
    """Load a building file and run the closed-form screen alone (no rules, no simulation)."""
    from knockproof.analysis.run import analyze as _analyze

    return _analyze(path, simultaneous=simultaneous)
