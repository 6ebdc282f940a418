"""Closed-form surge estimates: Joukowsky, Michaud, critical time, junction transmission.

Sign convention: ``velocity_change`` is the REDUCTION of velocity, V_before - V_after [m/s];
stopping a flow gives a positive velocity change and a positive pressure rise.

References
----------
.. [1] N. Joukowsky, "Über den hydraulischen Stoss in Wasserleitungsröhren", Mém. Acad. Imp.
   Sci. St.-Pétersbourg 9 (1900); in E. B. Wylie and V. L. Streeter, *Fluid Transients in
   Systems*, Prentice Hall, 1993, section 1 (dp = rho a dV, dH = a dV / g).
.. [2] E. B. Wylie and V. L. Streeter, *Fluid Transients in Systems*, 1993, section 1 (critical
   time 2L/a; Michaud's slow-closure estimate dH = 2 L V0 / (g t_c)); from memory.
.. [3] PDI-WH 201 / ASSE 1010 (water-hammer arrestor standards): a closure is "quick" when it
   takes 2L/a or less; as quoted in pmengineer.com/articles/95688 (see design/CHECKS.md).
.. [4] E. B. Wylie and V. L. Streeter, 1993, section 2 (transmission and reflection of a wave at a
   junction of pipes); from memory.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from knockproof.physics.constants import G


def _positive(name: str, value: float, unit: str) -> None:
    if not (value > 0.0 and math.isfinite(value)):
        raise ValueError(f"{name} must be positive; got {value!r} {unit}")


def joukowsky_surge_pa(density: float, wave_speed: float, velocity_change: float) -> float:
    """Pressure rise from an instantaneous velocity change (Joukowsky).

    dp = rho a dV   [1]

    Valid for a change faster than the critical time 2L/a, before any reflection returns,
    without cavitation, and with friction negligible.

    Parameters
    ----------
    density : float
        Liquid density rho [kg/m3].
    wave_speed : float
        Pressure-wave speed a [m/s].
    velocity_change : float
        Reduction of velocity dV [m/s] (negative for a velocity increase: a pressure drop).

    Returns
    -------
    float
        Pressure rise dp [Pa].
    """
    _positive("density", density, "kg/m3")
    _positive("wave speed", wave_speed, "m/s")
    return density * wave_speed * velocity_change


def joukowsky_head_m(wave_speed: float, velocity_change: float, g: float = G) -> float:
    """Head rise from an instantaneous velocity change (Joukowsky).

    dH = a dV / g   [1]

    Parameters
    ----------
    wave_speed : float
        Pressure-wave speed a [m/s].
    velocity_change : float
        Reduction of velocity dV [m/s].
    g : float
        Acceleration of gravity [m/s2].

    Returns
    -------
    float
        Head rise dH [m of the flowing liquid].
    """
    _positive("wave speed", wave_speed, "m/s")
    _positive("gravity", g, "m/s2")
    return wave_speed * velocity_change / g


def critical_time_s(length_m: float, wave_speed: float) -> float:
    """Critical time: the round trip of a wave over the pipe length.

    t_cr = 2 L / a   [2]

    Parameters
    ----------
    length_m : float
        Length L from the valve to the nearest reflecting boundary [m], >= 0.
    wave_speed : float
        Pressure-wave speed a [m/s].

    Returns
    -------
    float
        Critical time [s].
    """
    if not (length_m >= 0.0 and math.isfinite(length_m)):
        raise ValueError(f"length must be zero or positive; got {length_m!r} m")
    _positive("wave speed", wave_speed, "m/s")
    return 2.0 * length_m / wave_speed


def is_rapid_closure(closure_time_s: float, critical_time_s: float) -> bool:
    """Whether a closure is rapid ("quick"): it takes no longer than the critical time.

    rapid  <=>  t_c <= 2 L / a   [3]

    Parameters
    ----------
    closure_time_s : float
        Closure time t_c [s], >= 0.
    critical_time_s : float
        Critical time 2L/a [s], >= 0.

    Returns
    -------
    bool
        True when the closure is rapid (the full Joukowsky rise develops).
    """
    if not closure_time_s >= 0.0:
        raise ValueError(f"closure time must be zero or positive; got {closure_time_s!r} s")
    if not critical_time_s >= 0.0:
        raise ValueError(f"critical time must be zero or positive; got {critical_time_s!r} s")
    return closure_time_s <= critical_time_s


def slow_closure_surge_pa(
    density: float, length_m: float, velocity_change: float, closure_time_s: float
) -> float:
    """Pressure rise from a slow closure (Michaud).

    dH = 2 L V0 / (g t_c), i.e. dp = rho g dH = 2 rho L V0 / t_c   [2] (from memory)

    Valid for t_c > 2L/a. The estimate is conservative for a valve whose area closes linearly
    (the exact peak is lower); it takes no account of the valve's characteristic.

    Parameters
    ----------
    density : float
        Liquid density rho [kg/m3].
    length_m : float
        Length L of the pipe from the valve to the reflecting boundary [m], >= 0.
    velocity_change : float
        Velocity stopped V0 [m/s].
    closure_time_s : float
        Closure time t_c [s], > 0.

    Returns
    -------
    float
        Pressure rise [Pa].
    """
    _positive("density", density, "kg/m3")
    if not (length_m >= 0.0 and math.isfinite(length_m)):
        raise ValueError(f"length must be zero or positive; got {length_m!r} m")
    _positive("closure time", closure_time_s, "s")
    return 2.0 * density * length_m * velocity_change / closure_time_s


def closure_surge_pa(
    density: float,
    wave_speed: float,
    length_m: float,
    velocity_change: float,
    closure_time_s: float,
) -> float:
    """Screening estimate of the pressure rise when a valve stops a flow.

    dp = rho a V0            if t_c <= 2 L / a (rapid: Joukowsky [1])
    dp = 2 rho L V0 / t_c    if t_c >  2 L / a (slow: Michaud [2])

    At t_c = 2L/a both give rho a V0, and for t_c > 2L/a Michaud is below Joukowsky, so the
    estimate is continuous in t_c and never increases with closure time.

    Parameters
    ----------
    density : float
        Liquid density rho [kg/m3].
    wave_speed : float
        Pressure-wave speed a [m/s].
    length_m : float
        Length L from the valve to the nearest reflecting boundary [m], >= 0.
    velocity_change : float
        Velocity stopped V0 [m/s], >= 0.
    closure_time_s : float
        Closure time t_c [s], >= 0 (0 = instantaneous).

    Returns
    -------
    float
        Pressure rise [Pa], >= 0.

    Raises
    ------
    ValueError
        Negative velocity change, closure time or length; non-positive density or wave speed.
    """
    if not (velocity_change >= 0.0 and math.isfinite(velocity_change)):
        raise ValueError(
            f"velocity change must be zero or positive (the speed of the flow stopped); "
            f"got {velocity_change!r} m/s"
        )
    if not (closure_time_s >= 0.0 and math.isfinite(closure_time_s)):
        raise ValueError(f"closure time must be zero or positive; got {closure_time_s!r} s")
    t_cr = critical_time_s(length_m, wave_speed)
    if is_rapid_closure(closure_time_s, t_cr):
        return joukowsky_surge_pa(density, wave_speed, velocity_change)
    return slow_closure_surge_pa(density, length_m, velocity_change, closure_time_s)


def admittance(area_m2: float, wave_speed: float) -> float:
    """Acoustic admittance of a pipe, as used for junctions.

    Y = A / a   [4]

    Parameters
    ----------
    area_m2 : float
        Inside cross-section area A [m2].
    wave_speed : float
        Pressure-wave speed a [m/s].

    Returns
    -------
    float
        Admittance Y [m s]. (The physical admittance g A / a differs by the constant g, which
        cancels in every ratio used here.)
    """
    _positive("area", area_m2, "m2")
    _positive("wave speed", wave_speed, "m/s")
    return area_m2 / wave_speed


def junction_transmission(admittances: Sequence[float], incoming: int) -> float:
    """Fraction of a pressure step transmitted through a junction into each other pipe.

    s = 2 Y_in / sum_i Y_i,   Y_i = A_i / a_i   [4]

    A step dp arriving along pipe ``incoming`` leaves the junction as a step s dp into every
    pipe (into the other pipes as transmitted waves; back along ``incoming`` as the incident
    step plus the reflected step r dp, r = s - 1). Valid for a junction of negligible volume
    and no loss, with the pipes full of liquid.

    Parameters
    ----------
    admittances : sequence of float
        Admittances Y_i = A_i / a_i of all pipes meeting at the junction [m s], each > 0.
    incoming : int
        Index in ``admittances`` of the pipe the wave arrives along.

    Returns
    -------
    float
        Transmission coefficient s [-], between 0 and 2.
    """
    ys = [float(y) for y in admittances]
    if not ys:
        raise ValueError("a junction needs at least one pipe; got no admittances")
    for i, y in enumerate(ys):
        if not (y > 0.0 and math.isfinite(y)):
            raise ValueError(f"admittance {i} must be positive; got {y!r}")
    if not 0 <= incoming < len(ys):
        raise ValueError(
            f"incoming must index one of the {len(ys)} pipes (0 to {len(ys) - 1}); got {incoming!r}"
        )
    return 2.0 * ys[incoming] / math.fsum(ys)


def junction_reflection(admittances: Sequence[float], incoming: int) -> float:
    """Fraction of a pressure step reflected back along the pipe it arrived on.

    r = s - 1 = (Y_in - sum_{i != in} Y_i) / sum_i Y_i   [4]

    A dead end (one pipe) gives r = +1; a pipe meeting a large reservoir-like volume of other
    pipes gives r -> -1.

    Parameters
    ----------
    admittances : sequence of float
        Admittances Y_i = A_i / a_i of all pipes at the junction [m s], each > 0.
    incoming : int
        Index of the pipe the wave arrives along.

    Returns
    -------
    float
        Reflection coefficient r [-], between -1 and +1.
    """
    return junction_transmission(admittances, incoming) - 1.0
