"""Pipe friction: Reynolds number, Darcy friction factor, Darcy-Weisbach head loss.

References
----------
.. [1] C. F. Colebrook, "Turbulent flow in pipes, with particular reference to the transition
   region between the smooth and rough pipe laws", J. Inst. Civil Eng. 11 (1939) 133-156.
.. [2] F. M. White, *Fluid Mechanics*, 7th ed., McGraw-Hill, 2011, sections 6.4 (laminar pipe
   flow, f = 64/Re) and 6.6-6.7 (Colebrook, Darcy-Weisbach h_f = f (L/D) V**2/(2 g)).
.. [3] P. K. Swamee and A. K. Jain, "Explicit equations for pipe-flow problems", J. Hydraulics
   Div. ASCE 102 (1976) 657-664 (starting value of the Colebrook iteration).
"""

from __future__ import annotations

import math

from knockproof.physics.constants import G

#: Reynolds number below which flow is laminar [-].
LAMINAR_LIMIT: float = 2000.0
#: Reynolds number above which the Colebrook equation applies [-].
TURBULENT_LIMIT: float = 4000.0

_LN10 = math.log(10.0)


def reynolds(velocity_m_per_s: float, diameter_m: float, density: float, viscosity: float) -> float:
    """Reynolds number of pipe flow.

    Re = rho |V| D / mu   [2]

    Parameters
    ----------
    velocity_m_per_s : float
        Mean velocity V [m/s]; its sign (flow direction) is ignored.
    diameter_m : float
        Inside diameter D [m], > 0.
    density : float
        Density rho [kg/m3], > 0.
    viscosity : float
        Dynamic viscosity mu [Pa s], > 0.

    Returns
    -------
    float
        Reynolds number [-], >= 0.
    """
    if not diameter_m > 0.0:
        raise ValueError(f"diameter must be positive; got {diameter_m!r} m")
    if not density > 0.0:
        raise ValueError(f"density must be positive; got {density!r} kg/m3")
    if not viscosity > 0.0:
        raise ValueError(f"viscosity must be positive; got {viscosity!r} Pa s")
    return density * abs(velocity_m_per_s) * diameter_m / viscosity


def _colebrook(reynolds: float, relative_roughness: float) -> tuple[float, float]:
    """Colebrook friction factor and its derivative df/dRe, by Newton's method on x = 1/sqrt(f).

    Solves g(x) = x + 2 log10(eps/3.7 + 2.51 x / Re) = 0.
    """
    a = relative_roughness / 3.7
    b = 2.51 / reynolds
    # Swamee-Jain [3] start: within a few per cent of the root over the turbulent range.
    x = -2.0 * math.log10(a + 5.74 / reynolds**0.9)
    for _ in range(50):
        s = a + b * x
        g = x + 2.0 * math.log10(s)
        dg = 1.0 + 2.0 * b / (_LN10 * s)
        step = g / dg
        x -= step
        if abs(step) <= 1e-14 * x:
            break
    s = a + b * x
    dg_dx = 1.0 + 2.0 * b / (_LN10 * s)
    dg_dre = -2.0 * b * x / (_LN10 * s * reynolds)
    dx_dre = -dg_dre / dg_dx
    f = 1.0 / (x * x)
    return f, -2.0 * dx_dre / x**3


def friction_factor(reynolds: float, relative_roughness: float) -> float:
    """Darcy friction factor for full-pipe flow.

    - Re = 0: f = 0 (no flow, no loss).
    - 0 < Re <= 2000, laminar: f = 64/Re [2].
    - Re >= 4000, turbulent, Colebrook [1]:
      1/sqrt(f) = -2 log10( (eps/D)/3.7 + 2.51 / (Re sqrt(f)) ),
      solved by Newton's method on 1/sqrt(f) to a relative change of 1e-14.
    - 2000 < Re < 4000, transitional: a cubic Hermite polynomial in Re that matches value and
      slope of the laminar law at Re = 2000 and of Colebrook at Re = 4000 (so f and df/dRe are
      continuous everywhere above Re = 0). Real transitional flow is intermittent; the bridge
      only keeps head loss smooth for solvers. This bridge is knockproof's own choice.

    Parameters
    ----------
    reynolds : float
        Reynolds number [-], >= 0.
    relative_roughness : float
        Roughness height over inside diameter eps/D [-], 0 to 0.05.

    Returns
    -------
    float
        Darcy friction factor f [-].

    Raises
    ------
    ValueError
        Negative Reynolds number or relative roughness outside 0 to 0.05.
    """
    if not (reynolds >= 0.0 and math.isfinite(reynolds)):
        raise ValueError(f"Reynolds number must be zero or positive; got {reynolds!r}")
    if not (0.0 <= relative_roughness <= 0.05):
        raise ValueError(
            f"relative roughness must be between 0 and 0.05; got {relative_roughness!r}"
        )
    if reynolds == 0.0:
        return 0.0
    if reynolds <= LAMINAR_LIMIT:
        return 64.0 / reynolds
    if reynolds >= TURBULENT_LIMIT:
        return _colebrook(reynolds, relative_roughness)[0]
    # Cubic Hermite bridge across 2000 < Re < 4000.
    re0, re1 = LAMINAR_LIMIT, TURBULENT_LIMIT
    h = re1 - re0
    f0, d0 = 64.0 / re0, -64.0 / re0**2
    f1, d1 = _colebrook(re1, relative_roughness)
    t = (reynolds - re0) / h
    h00 = (1.0 + 2.0 * t) * (1.0 - t) ** 2
    h10 = t * (1.0 - t) ** 2
    h01 = t * t * (3.0 - 2.0 * t)
    h11 = t * t * (t - 1.0)
    return h00 * f0 + h10 * h * d0 + h01 * f1 + h11 * h * d1


def head_loss_m(
    flow_m3_per_s: float,
    length_m: float,
    diameter_m: float,
    roughness_m: float,
    density: float,
    viscosity: float,
    g: float = G,
) -> float:
    """Friction head loss along a straight pipe (Darcy-Weisbach), signed with the flow.

    h_f = f (L / D) V |V| / (2 g),  V = Q / (pi D**2 / 4),  f = friction_factor(Re, eps/D)   [2]

    For Re <= 2000 this is evaluated in the equivalent Hagen-Poiseuille form
    h_f = 32 mu L V / (rho g D**2) [2], which stays finite as the flow tends to zero.

    Parameters
    ----------
    flow_m3_per_s : float
        Volume flow Q [m3/s]; negative for flow against the pipe's direction.
    length_m : float
        Pipe length L [m], >= 0.
    diameter_m : float
        Inside diameter D [m], > 0.
    roughness_m : float
        Absolute roughness eps [m], >= 0 (drawn copper about 1.5e-6, from memory).
    density : float
        Density rho [kg/m3].
    viscosity : float
        Dynamic viscosity mu [Pa s].
    g : float
        Acceleration of gravity [m/s2].

    Returns
    -------
    float
        Head loss [m of the flowing liquid], same sign as the flow.
    """
    if not length_m >= 0.0:
        raise ValueError(f"length must be zero or positive; got {length_m!r} m")
    if not roughness_m >= 0.0:
        raise ValueError(f"roughness must be zero or positive; got {roughness_m!r} m")
    if not g > 0.0:
        raise ValueError(f"gravity must be positive; got {g!r} m/s2")
    if not diameter_m > 0.0:
        raise ValueError(f"diameter must be positive; got {diameter_m!r} m")
    velocity = flow_m3_per_s / (math.pi * diameter_m * diameter_m / 4.0)
    re = reynolds(velocity, diameter_m, density, viscosity)
    if re <= LAMINAR_LIMIT:
        # f = 64/Re written out (Hagen-Poiseuille): no division by a vanishing Re.
        return 32.0 * viscosity * length_m * velocity / (density * g * diameter_m * diameter_m)
    f = friction_factor(re, roughness_m / diameter_m)
    return f * length_m / diameter_m * velocity * abs(velocity) / (2.0 * g)
