"""The computational grid: one global time step, reaches per pipe, wave-speed adjustment, lumping.

The method of characteristics with a fixed grid needs the Courant condition ``a dt = dx`` in every
pipe (Wylie & Streeter, *Fluid Transients in Systems*, 1993, sec. 3.1 and 3.6: "adjusting the wave
speed"; Chaudhry, *Applied Hydraulic Transients*, 2014, sec. 3.6). With one time step for the whole
network, pipe ``i`` gets ``N_i = max(1, round(L_i / (a_i dt)))`` reaches and its wave speed is
adjusted to ``a_i' = L_i / (N_i dt)``; the adjustment ``a_i'/a_i - 1`` is reported and bounded.

Rules chosen here (document of record):

* **Time step.** Unless the caller gives one, the target time step is the ``percentile``-th
  percentile (default 10) of the pipes' travel times ``L/a``, not the single shortest pipe: a
  building has many 0.3 m stubs, and resolving each of them would make the step tiny for no gain in
  the peaks.
* **Lumping.** A pipe whose travel time is less than ``lump_ratio`` (default 0.5) times the *target*
  step - i.e. shorter than half a reach - is lumped: its two end nodes become one node with a common
  head, and its water column (inertia, storage and friction) is left out. The decision is taken
  once, at the target step, so refining the step below does not bring lumped pipes back.
  ``tests/transient/test_transient_grid.py`` checks on a stub at the valve that lumping changes the
  valve's first peak by less than 2 %.
* **Refinement.** If at the target step some unlumped pipe would need a wave-speed adjustment beyond
  ``max_wave_speed_adjustment``, the step is reduced along a fine geometric ladder (0.1 % rungs)
  until every unlumped pipe fits, down to ``target / max_refinement``; failing that,
  :class:`~knockproof.errors.SimulationError` names the pipe that does not fit.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from knockproof.errors import SimulationError


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
        Relative adjustment ``a'/a - 1`` per pipe [-] (0 for a lumped pipe).
    lumped : np.ndarray
        True where the pipe is lumped into its end nodes.
    largest_wave_speed_adjustment : float
        ``max |adjustment|`` [-].
    """

    time_step_s: float
    target_time_step_s: float
    reaches: np.ndarray
    wave_speed_m_per_s: np.ndarray
    adjustment: np.ndarray
    lumped: np.ndarray
    largest_wave_speed_adjustment: float


def _worst_adjustment(travel: np.ndarray, dt: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """For each candidate step, the largest |a'/a - 1| over pipes and the pipe that has it."""
    x = travel[None, :] / dt[:, None]
    n = np.maximum(1.0, np.rint(x))
    adj = np.abs(x / n - 1.0)
    return adj.max(axis=1), adj.argmax(axis=1)


def choose_grid(
    lengths: Sequence[float] | np.ndarray,
    wave_speeds: Sequence[float] | np.ndarray,
    time_step_s: float | None = None,
    *,
    percentile: float = 10.0,
    lump_ratio: float = 0.5,
    max_wave_speed_adjustment: float = 0.10,
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
        Largest allowed ``|a'/a - 1|`` [-].
    max_refinement : float
        The step may be refined down to ``target / max_refinement``.
    names : sequence of str, optional
        Pipe names for messages.

    Raises
    ------
    SimulationError
        When no step down to the refinement bound keeps every unlumped pipe within the adjustment
        limit (names the pipe), or when every pipe would be lumped.
    """
    length = np.asarray(lengths, dtype=float)
    speed = np.asarray(wave_speeds, dtype=float)
    label = list(names) if names is not None else [f"#{i}" for i in range(len(length))]
    if len(length) == 0:
        raise SimulationError("the network has no pipes")
    travel = length / speed
    if time_step_s is None:
        target = float(np.percentile(travel, percentile))
    else:
        target = float(time_step_s)
    if not (np.isfinite(target) and target > 0.0):
        raise SimulationError(f"time step must be a positive number of seconds; found {target!r}")
    lumped = travel < lump_ratio * target
    if lumped.all():
        raise SimulationError(
            f"time step {target:.4g} s is too large: every pipe is shorter than {lump_ratio:g} of "
            "a "
            "reach and would be lumped"
        )
    kept = np.flatnonzero(~lumped)
    unique_travel, inverse = np.unique(travel[kept], return_inverse=True)
    rung = 1.001
    count = int(np.ceil(np.log(max_refinement) / np.log(rung))) + 1
    ladder = target / rung ** np.arange(count)
    chosen = None
    for start in range(0, count, 256):
        block = ladder[start : start + 256]
        worst, _ = _worst_adjustment(unique_travel, block)
        fits = np.flatnonzero(worst <= max_wave_speed_adjustment + 1e-12)
        if fits.size:
            chosen = float(block[fits[0]])
            break
    if chosen is None:
        finest = ladder[-1:]
        _, which = _worst_adjustment(unique_travel, finest)
        pipe = int(kept[np.flatnonzero(inverse == which[0])[0]])
        x = travel[pipe] / finest[0]
        need = abs(x / max(1.0, round(x)) - 1.0)
        raise SimulationError(
            f"pipe {label[pipe]!r} (L = {length[pipe]:.4g} m, a = {speed[pipe]:.4g} m/s) does not "
            "fit "
            f"the grid: at every time step from {target:.4g} s down to {finest[0]:.4g} s some pipe "
            f"needs a wave-speed adjustment above {max_wave_speed_adjustment:.0%} (this one "
            f"{need:.0%} at the finest step); allow a larger adjustment, a larger refinement, or "
            "give "
            "a time step"
        )
    x = travel / chosen
    reaches = np.where(lumped, 0, np.maximum(1, np.rint(x))).astype(np.int64)
    adjusted = np.where(lumped, speed, length / (np.maximum(reaches, 1) * chosen))
    adjustment = np.where(lumped, 0.0, adjusted / speed - 1.0)
    return Grid(
        time_step_s=chosen,
        target_time_step_s=target,
        reaches=reaches,
        wave_speed_m_per_s=adjusted,
        adjustment=adjustment,
        lumped=lumped,
        largest_wave_speed_adjustment=float(np.abs(adjustment).max()),
    )
