"""The computational grid: one global time step, reaches per pipe, wave-speed adjustment, lumping.

The method of characteristics with a fixed grid needs the Courant condition ``a dt = dx`` in every
pipe (Wylie & Streeter, *Fluid Transients in Systems*, 1993, sec. 3.1 and 3.6: "adjusting the wave
speed"; Chaudhry, *Applied Hydraulic Transients*, 2014, sec. 3.6). With one time step for the whole
network, pipe ``i`` gets a whole number ``N_i`` of reaches and its wave speed is adjusted to
``a_i' = L_i / (N_i dt)``; the adjustment ``a_i'/a_i - 1`` is reported and bounded.

Rules chosen here (document of record):

* **Never much slower.** A rapid-closure surge is ``rho a dV`` (Joukowsky), so a wave speed lowered
  by the grid lowers every such peak by the same fraction: the unsafe side for a screen. Each kept
  pipe gets ``N_i = floor(x_i / (1 - max_wave_speed_lowering))`` reaches, ``x_i = L_i/(a_i dt)``,
  the most reaches whose adjusted wave speed is at most ``max_wave_speed_lowering`` (default 1 %)
  below the true one. The adjustment is then >= -1 % and any larger error is upward (the safe
  side), bounded by ``max_wave_speed_adjustment`` (default +10 %).
* **Small adjustments first.** The step is looked for along a fine geometric ladder below the
  target (0.1 % rungs). First down to ``target / tight_refinement`` (default 1.5) for a step at
  which every kept pipe is within ``-tight_lowering .. +tight_adjustment`` (defaults -0.2 % and
  +1 %; the reaches then rounded with the -0.2 % limit) - a single pipe of two reaches or more
  always has one (its travel time in steps passes a whole number as the step shrinks by 1.5) and
  a small zone nearly always, so its surges carry the pipes' true wave speeds to 1 %; failing
  that, down to ``target / max_refinement`` (default 16) for a step at which every kept pipe is
  within ``max_wave_speed_adjustment``. The first (largest) step found is taken. Failing both,
  :class:`~knockproof.errors.SimulationError` names the pipe that does not fit.
* **Time step.** Unless the caller gives one, the target time step is the ``percentile``-th
  percentile (default 10) of the pipes' travel times ``L/a``, not the single shortest pipe: a
  building has many 0.3 m stubs, and resolving each of them would make the step tiny for no gain in
  the peaks.
* **Lumping.** A pipe whose travel time is less than ``lump_ratio`` (default 0.5) times the *target*
  step - i.e. shorter than half a reach - is lumped: its two end nodes become one node with a common
  head, and its water column (inertia, storage and friction) is left out. The decision is taken
  once, at the target step, so refining the step below does not bring lumped pipes back.
  ``tests/transient/test_transient_grid.py`` checks on a stub at the valve that lumping changes the
  valve's first peak by less than 2 %. Chains of short pipes in series are first merged into longer
  pipes (:mod:`knockproof.transient.series`), so that lumping never drops a long column made of
  short pieces. Were every pipe to be lumped at the target step, the target is reduced to the
  longest pipe's travel time instead (a network of short pipes gets a fine step; nothing aborts).
* **Reported adjustment.** ``largest_wave_speed_adjustment`` is the *signed* adjustment of the
  largest magnitude (positive: the grid's wave speed is higher than the true one).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from knockproof.errors import SimulationError

RUNG = 1.001
"""Ratio of two neighbouring steps on the refinement ladder (0.1 %)."""


@dataclass(frozen=True, eq=False)
class Grid:
    """The grid chosen for a network.

    Attributes
    ----------
    time_step_s : float
        The global time step [s].
    target_time_step_s : float
        The step asked for (or taken from the percentile) before refinement [s].
    reaches : np.ndarray
        Reaches per pipe (int); 0 for a lumped pipe.
    wave_speed_m_per_s : np.ndarray
        Adjusted wave speed per pipe [m/s] (the input value for a lumped pipe).
    adjustment : np.ndarray
        Relative adjustment ``a'/a - 1`` per pipe [-] (0 for a lumped pipe); never below
        ``-max_wave_speed_lowering``.
    lumped : np.ndarray
        True where the pipe is lumped into its end nodes.
    largest_wave_speed_adjustment : float
        The adjustment of largest magnitude, with its sign [-] (``adjustment[argmax |adjustment|]``).
    """

    time_step_s: float
    target_time_step_s: float
    reaches: np.ndarray
    wave_speed_m_per_s: np.ndarray
    adjustment: np.ndarray
    lumped: np.ndarray
    largest_wave_speed_adjustment: float


def reaches_for(x: np.ndarray, max_lowering: float) -> np.ndarray:
    """Reaches for ``x = L/(a dt)`` travel steps: the most whose wave speed ``x/N`` times the true
    one is at least ``1 - max_lowering`` (0 where even one reach would lower it more)."""
    # the small relative allowance keeps a pipe of exactly N reaches at N under rounding
    return np.floor(x * (1.0 + 1e-12) / (1.0 - max_lowering)).astype(np.int64)


def _worst_adjustment(
    travel: np.ndarray, dt: np.ndarray, max_lowering: float
) -> tuple[np.ndarray, np.ndarray]:
    """For each candidate step, the largest upward adjustment ``a'/a - 1`` over pipes (inf where
    some pipe cannot take a single reach) and the pipe that has it."""
    x = travel[None, :] / dt[:, None]
    n = reaches_for(x, max_lowering)
    with np.errstate(divide="ignore"):
        adj = np.where(n > 0, x / np.maximum(n, 1) - 1.0, np.inf)
    return adj.max(axis=1), adj.argmax(axis=1)


def _first_fit(
    travel: np.ndarray, ladder: np.ndarray, limit: float, max_lowering: float
) -> float | None:
    for start in range(0, len(ladder), 256):
        block = ladder[start : start + 256]
        worst, _ = _worst_adjustment(travel, block, max_lowering)
        fits = np.flatnonzero(worst <= limit + 1e-12)
        if fits.size:
            return float(block[fits[0]])
    return None


def choose_grid(
    lengths: Sequence[float] | np.ndarray,
    wave_speeds: Sequence[float] | np.ndarray,
    time_step_s: float | None = None,
    *,
    percentile: float = 10.0,
    lump_ratio: float = 0.5,
    max_wave_speed_adjustment: float = 0.10,
    max_wave_speed_lowering: float = 0.01,
    tight_adjustment: float = 0.01,
    tight_lowering: float = 0.002,
    tight_refinement: float = 1.5,
    max_refinement: float = 16.0,
    names: Sequence[str] | None = None,
) -> Grid:
    """Choose one time step and the reaches of every pipe (see the module docstring for the rules).

    Parameters
    ----------
    lengths : array of float
        Pipe lengths [m], > 0.
    wave_speeds : array of float
        Pipe wave speeds [m/s], > 0.
    time_step_s : float, optional
        Target time step [s]; default: the ``percentile``-th percentile of ``L/a``.
    percentile : float
        Percentile [%] of travel times that sets the default target step.
    lump_ratio : float
        A pipe with ``L/a < lump_ratio * target step`` is lumped; 0 lumps nothing.
    max_wave_speed_adjustment : float
        Largest allowed upward adjustment ``a'/a - 1`` [-].
    max_wave_speed_lowering : float
        Largest allowed downward adjustment ``1 - a'/a`` [-] (default 1 %).
    tight_adjustment, tight_lowering, tight_refinement : float
        First look, down to ``target / tight_refinement``, for a step at which every adjustment
        lies within ``-tight_lowering .. +tight_adjustment`` [-].
    max_refinement : float
        The step may be refined down to ``target / max_refinement``.
    names : sequence of str, optional
        Pipe names for messages.

    Raises
    ------
    SimulationError
        When no step down to the refinement bound keeps every unlumped pipe within the adjustment
        limits (names the pipe).
    """
    length = np.asarray(lengths, dtype=float)
    speed = np.asarray(wave_speeds, dtype=float)
    label = list(names) if names is not None else [f"#{i}" for i in range(len(length))]
    if len(length) == 0:
        raise SimulationError("the network has no pipes")
    if not (0.0 <= max_wave_speed_lowering < 1.0):
        raise SimulationError(
            f"max_wave_speed_lowering must be in [0, 1); found {max_wave_speed_lowering!r}"
        )
    travel = length / speed
    if time_step_s is None:
        target = float(np.percentile(travel, percentile))
    else:
        target = float(time_step_s)
    if not (np.isfinite(target) and target > 0.0):
        raise SimulationError(f"time step must be a positive number of seconds; found {target!r}")
    lumped = travel < lump_ratio * target
    if lumped.all():
        # every pipe shorter than half a reach: a fine step instead of an empty network
        target = float(travel.max())
        lumped = travel < lump_ratio * target
    kept = np.flatnonzero(~lumped)
    unique_travel, inverse = np.unique(travel[kept], return_inverse=True)
    count = int(np.ceil(np.log(max_refinement) / np.log(RUNG))) + 1
    ladder = target / RUNG ** np.arange(count)
    tight_count = min(count, int(np.ceil(np.log(tight_refinement) / np.log(RUNG))) + 1)
    chosen = _first_fit(
        unique_travel,
        ladder[:tight_count],
        min(tight_adjustment, max_wave_speed_adjustment),
        min(tight_lowering, max_wave_speed_lowering),
    )
    lowering = min(tight_lowering, max_wave_speed_lowering)
    if chosen is None:
        lowering = max_wave_speed_lowering
        chosen = _first_fit(
            unique_travel, ladder, max_wave_speed_adjustment, max_wave_speed_lowering
        )
    if chosen is None:
        finest = ladder[-1:]
        _, which = _worst_adjustment(unique_travel, finest, max_wave_speed_lowering)
        pipe = int(kept[np.flatnonzero(inverse == which[0])[0]])
        x = travel[pipe] / finest[0]
        n = int(reaches_for(np.array([x]), max_wave_speed_lowering)[0])
        need = (
            f"{x / n - 1.0:+.0%} at the finest step"
            if n > 0
            else f"a step of at most {travel[pipe] * (1 - max_wave_speed_lowering):.4g} s"
        )
        raise SimulationError(
            f"pipe {label[pipe]!r} (L = {length[pipe]:.4g} m, a = {speed[pipe]:.4g} m/s) does not "
            f"fit the grid: at every time step from {target:.4g} s down to {finest[0]:.4g} s some "
            f"pipe needs a wave-speed adjustment outside -{max_wave_speed_lowering:.0%} .. "
            f"+{max_wave_speed_adjustment:.0%} (this one {need}); allow a larger adjustment, a "
            "larger refinement, or give a time step"
        )
    x = travel / chosen
    reaches = np.where(lumped, 0, reaches_for(x, lowering)).astype(np.int64)
    adjusted = np.where(lumped, speed, length / (np.maximum(reaches, 1) * chosen))
    adjustment = np.where(lumped, 0.0, adjusted / speed - 1.0)
    return Grid(
        time_step_s=chosen,
        target_time_step_s=target,
        reaches=reaches,
        wave_speed_m_per_s=adjusted,
        adjustment=adjustment,
        lumped=lumped,
        largest_wave_speed_adjustment=float(adjustment[int(np.argmax(np.abs(adjustment)))]),
    )
