"""Finding the smallest change that passes: bisection on a continuous quantity, a scan of sizes.

Each function takes ``passes(x) -> bool``, a re-run of the closed-form screen at the value ``x``.
The screen's peak is monotonic in each quantity solved here by bisection (it never rises as a
closure slows, and falls as the static pressure or the flow falls: docs/methods.md §5 and §8), so
the boundary between failing and passing values is unique and bisection finds it.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from typing import TypeVar

T = TypeVar("T")

#: Bisection stops when the bracket is narrower than this fraction of the passing end.
RELATIVE_PRECISION = 1e-3


def boundary(
    passes: Callable[[float], bool],
    passing: float,
    failing: float,
    *,
    geometric: bool = False,
    relative_precision: float = RELATIVE_PRECISION,
    max_steps: int = 200,
) -> float:
    """Bisect between a passing and a failing value; return the passing end of the last bracket.

    Parameters
    ----------
    passes : callable
        ``passes(x)``: whether the value ``x`` keeps the peak under the limit.
    passing, failing : float
        A value known to pass and one known to fail (either may be the larger).
    geometric : bool
        Halve the bracket on a log scale (for quantities spanning decades, such as closure time;
        both ends must then be positive).
    relative_precision : float
        Stop when ``|passing - failing| <= relative_precision * |passing|``.

    Returns
    -------
    float
        A passing value within ``relative_precision`` of the boundary.
    """
    if not relative_precision > 0.0:
        raise ValueError(f"relative precision must be positive; got {relative_precision!r}")
    if geometric and not (passing > 0.0 and failing > 0.0):
        raise ValueError("geometric bisection needs two positive ends")
    for _ in range(max_steps):
        if abs(passing - failing) <= relative_precision * abs(passing):
            return passing
        mid = math.sqrt(passing * failing) if geometric else 0.5 * (passing + failing)
        if passes(mid):
            passing = mid
        else:
            failing = mid
    return passing


def first_passing(candidates: Sequence[T], passes: Callable[[T], bool]) -> T | None:
    """The first candidate (in the order given: smallest change first) that passes, else None."""
    for c in candidates:
        if passes(c):
            return c
    return None
