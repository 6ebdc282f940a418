"""Running the simulation from the CLI with a progress bar on stderr (only on a terminal)."""

from __future__ import annotations

import sys
from typing import Any


def simulate_with_progress(
    tree: Any, analysis: Any, review: Any, profile: Any, workers: int | None
) -> tuple[Any, list[Any]]:
    """Simulate every event (bare and with the scheduled arrestors) and check arrestor volumes."""
    from knockproof.transient.run import simulate_all, verify_arrestors

    limit = float(profile.params("surge.peak-limit")["limit_pa"])
    arrestors = review.arrestors
    total = len(analysis.events) + sum(1 for _ in arrestors)
    if sys.stderr.isatty():
        from rich.progress import Progress

        from knockproof.cli.output import err

        with Progress(console=err(), transient=True) as bar:
            task = bar.add_task("simulating closure events", total=total)
            analysis, _, _ = simulate_all(
                tree, analysis, arrestors, workers, lambda n: bar.advance(task, n)
            )
            checks = verify_arrestors(tree, analysis, arrestors, limit, workers)
    else:
        analysis, _, _ = simulate_all(tree, analysis, arrestors, workers)
        checks = verify_arrestors(tree, analysis, arrestors, limit, workers)
    return analysis, checks
