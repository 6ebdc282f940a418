"""Valve closure laws: the effective-area ratio ``tau(t)`` of a closing valve.

``tau = (Cd A)/(Cd A)_0`` falls from 1 to 0 during the closure. With ``s = (t - t_start)/t_c`` the
fraction of the closure time elapsed (clipped to 0..1), every law here is one of two power families:

* ``tau = (1 - s)^m`` - *slow at the end* for ``m > 1`` (most of the area goes early; the last part
  of the stroke, which makes the surge, is gentle);
* ``tau = 1 - s^m`` - *fast at the end* for ``m > 1`` (area barely changes at first, then goes
  quickly).

Named laws (the shapes are engineering judgement from memory, not measured curves; the closure time
is the figure that matters and is always the caller's):

==================  ============  =================================================================
law                 shape         used for
==================  ============  =================================================================
``instant``         step          a closure taken as instantaneous at ``t_start`` (``t_c`` unused)
``linear-area``     (1-s)^1       generic: effective area linear in time
``solenoid``        (1-s)^1       appliance solenoid valve: roughly linear in area (from memory)
``lever``           (1-s)^1       single-lever faucet flicked shut: roughly linear (from memory)
``quadratic``       (1-s)^2       slow at the end
``self-closing``    (1-s)^2       self-closing (metering) faucet: slow at the end (from memory)
``flush-valve``     (1-s)^2       flushometer: controlled, slow at the end (from memory)
``quarter-turn``    1-s^2         ball or plug valve turned by hand: most area goes at the end
==================  ============  =================================================================

Reference for the form ``tau(t)`` and the power family ``(1 - t/t_c)^Em``: Wylie & Streeter, *Fluid
Transients in Systems*, 1993, sec. 3.3 (valve closure); Chaudhry, *Applied Hydraulic Transients*,
2014, sec. 3.5.
"""

from __future__ import annotations

import numpy as np

# law name -> (family code, exponent). Family 0: instant; 1: (1-s)^m; 2: 1 - s^m.
LAW_TABLE: dict[str, tuple[int, float]] = {
    "instant": (0, 1.0),
    "linear-area": (1, 1.0),
    "solenoid": (1, 1.0),
    "lever": (1, 1.0),
    "quadratic": (1, 2.0),
    "self-closing": (1, 2.0),
    "flush-valve": (1, 2.0),
    "quarter-turn": (2, 2.0),
}


def law_code(law: str, closure_time_s: float) -> tuple[int, float]:
    """Family code and exponent for a named law; a zero closure time makes any law instantaneous.

    Raises
    ------
    ValueError
        For an unknown law name (the message lists the known ones).
    """
    if law not in LAW_TABLE:
        raise ValueError(f"unknown closure law {law!r}; expected one of {', '.join(LAW_TABLE)}")
    family, exponent = LAW_TABLE[law]
    if closure_time_s <= 0.0:
        family = 0
    return family, exponent


def effective_area_ratio(
    law: str, time_s: np.ndarray | float, closure_time_s: float, start_time_s: float = 0.0
) -> np.ndarray:
    """Effective-area ratio ``tau`` [-] of a valve closing by ``law`` at times ``time_s`` [s].

    ``tau = 1`` before ``start_time_s`` and ``0`` from ``start_time_s + closure_time_s`` on; an
    ``instant`` law (or a zero closure time) drops to 0 at ``start_time_s`` itself.
    """
    family, exponent = law_code(law, closure_time_s)
    t = np.asarray(time_s, dtype=float)
    if family == 0:
        return np.where(t >= start_time_s, 0.0, 1.0)
    s = np.clip((t - start_time_s) / closure_time_s, 0.0, 1.0)
    if family == 1:
        return (1.0 - s) ** exponent
    return 1.0 - s**exponent
