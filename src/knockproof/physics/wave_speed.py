"""Speed of a pressure wave in a liquid-filled elastic pipe (Korteweg with restraint factor).

References
----------
.. [1] E. B. Wylie and V. L. Streeter, *Fluid Transients in Systems*, Prentice Hall, 1993,
   section 2 (wave speed in thin- and thick-walled elastic conduits). Formulas quoted from
   memory; see docs/methods.md.
"""

from __future__ import annotations

import math

#: Ways a pipe can be held against axial movement, and the thin-wall restraint factor of each.
RESTRAINTS: tuple[str, ...] = ("anchored", "upstream", "joints")


def _thin_wall_factor(poisson_ratio: float, restraint: str) -> float:
    if restraint == "anchored":
        return 1.0 - poisson_ratio * poisson_ratio
    if restraint == "upstream":
        return 1.0 - poisson_ratio / 2.0
    if restraint == "joints":
        return 1.0
    raise ValueError(f"restraint must be one of {', '.join(RESTRAINTS)}; got {restraint!r}")


def restraint_factor(
    poisson_ratio: float,
    restraint: str,
    inside_diameter_m: float,
    wall_m: float,
    *,
    thin_wall: bool = False,
) -> float:
    """Restraint factor c1 of the Korteweg wave-speed formula.

    Thin-walled pipe [1]::

        anchored against axial movement throughout   c = 1 - nu**2
        anchored at the upstream end only            c = 1 - nu/2
        expansion joints throughout                  c = 1

    Thick-walled pipe [1]::

        c1 = (2 e / D) (1 + nu) + D c / (D + e)

    with c the thin-wall value. The thick-wall expression tends to the thin-wall one as
    D/e grows (the difference is about (2 + 2 nu - c)/(D/e), e.g. 6 to 8 % at D/e = 25), so it
    is used for every D/e by default: a switch between the two at a fixed D/e (the usual
    "D/e < 25 is thick") would make the wave speed jump upward as a pipe's diameter grows past
    the switch. Pass ``thin_wall=True`` to get the classical thin-wall value, e.g. to compare
    with tables computed that way.

    Parameters
    ----------
    poisson_ratio : float
        Poisson's ratio of the wall material [-], 0 to 0.5.
    restraint : str
        "anchored" (no axial movement anywhere), "upstream" (anchored at the upstream end only)
        or "joints" (expansion joints throughout: no axial stress).
    inside_diameter_m : float
        Inside diameter D [m], > 0.
    wall_m : float
        Wall thickness e [m], > 0.
    thin_wall : bool
        If true, return the thin-wall value c whatever D/e is.

    Returns
    -------
    float
        Restraint factor c1 [-].

    Raises
    ------
    ValueError
        Unknown restraint, Poisson's ratio outside 0 to 0.5, or a non-positive dimension.
    """
    if not (0.0 <= poisson_ratio <= 0.5):
        raise ValueError(f"Poisson's ratio must be between 0 and 0.5; got {poisson_ratio!r}")
    c = _thin_wall_factor(poisson_ratio, restraint)
    if not (inside_diameter_m > 0.0 and math.isfinite(inside_diameter_m)):
        raise ValueError(f"inside diameter must be positive; got {inside_diameter_m!r} m")
    if not (wall_m > 0.0 and math.isfinite(wall_m)):
        raise ValueError(f"wall thickness must be positive; got {wall_m!r} m")
    if thin_wall:
        return c
    d, e = inside_diameter_m, wall_m
    return 2.0 * e / d * (1.0 + poisson_ratio) + d * c / (d + e)


def wave_speed(
    bulk_modulus_pa: float,
    density_kg_m3: float,
    elastic_modulus_pa: float,
    poisson_ratio: float,
    inside_diameter_m: float,
    wall_m: float,
    restraint: str = "anchored",
    *,
    thin_wall: bool = False,
) -> float:
    """Pressure-wave speed in a liquid-filled elastic pipe (Korteweg formula).

    a = sqrt( (K / rho) / (1 + (K / E) (D / e) c1) )   [1]

    with c1 from :func:`restraint_factor`. Valid for a linear-elastic wall, a liquid without free
    gas, and waves much longer than the diameter. Plastics are viscoelastic: use the short-term
    modulus at the water temperature.

    Parameters
    ----------
    bulk_modulus_pa : float
        Bulk modulus of the liquid K [Pa] (adiabatic for water: see ``water.bulk_modulus``).
    density_kg_m3 : float
        Liquid density rho [kg/m3].
    elastic_modulus_pa : float
        Young's modulus of the wall E [Pa]; ``math.inf`` gives a rigid pipe (a = sqrt(K/rho)).
    poisson_ratio : float
        Poisson's ratio of the wall nu [-], 0 to 0.5.
    inside_diameter_m : float
        Inside diameter D [m].
    wall_m : float
        Wall thickness e [m].
    restraint : str
        "anchored", "upstream" or "joints" (see :func:`restraint_factor`).
    thin_wall : bool
        Use the thin-wall restraint factor whatever D/e is.

    Returns
    -------
    float
        Wave speed a [m/s].

    Raises
    ------
    ValueError
        A non-positive modulus or density, or a bad argument to :func:`restraint_factor`.
    """
    if not (bulk_modulus_pa > 0.0 and math.isfinite(bulk_modulus_pa)):
        raise ValueError(f"bulk modulus must be positive; got {bulk_modulus_pa!r} Pa")
    if not (density_kg_m3 > 0.0 and math.isfinite(density_kg_m3)):
        raise ValueError(f"density must be positive; got {density_kg_m3!r} kg/m3")
    if not elastic_modulus_pa > 0.0:
        raise ValueError(f"elastic modulus must be positive; got {elastic_modulus_pa!r} Pa")
    c1 = restraint_factor(poisson_ratio, restraint, inside_diameter_m, wall_m, thin_wall=thin_wall)
    stiffness_ratio = bulk_modulus_pa / elastic_modulus_pa * (inside_diameter_m / wall_m) * c1
    return math.sqrt(bulk_modulus_pa / density_kg_m3 / (1.0 + stiffness_ratio))
