"""Gas cushion (air chamber, arrestor) sizing by the energy method.

The kinetic energy of the water column stopped by a valve is absorbed by compressing a gas volume
from the line pressure P1 to a peak P2 (absolute pressures, ratio r = P2/P1), less the work the
line pressure does while the column moves in:

    KE = W_gas - P1 (V1 - V2)

Isothermal gas (slow compression, n = 1):  KE = P1 V1 [ln r - 1 + 1/r]
Polytropic gas (P V**n constant):          KE = P1 V1 [(r**((n-1)/n) - 1)/(n - 1) - (1 - r**(-1/n))]

The method treats the water column as rigid, which undersizes the cushion slightly (more so at
larger r); a transient simulation should check a cushion sized this way.

**One gas model for sizing and simulation.** The arrestor schedule sizes the gas with
:data:`ARRESTOR_POLYTROPIC_EXPONENT` and the transient solver compresses the same gas with the same
exponent (``knockproof.transient``: ``GasCushion``, ``CushionSpec``), so that a volume the energy
method gives, simulated, lands on its design pressure (``tests/transient/test_transient_gas_cushion
.py``). The exponent is 1.4, adiabatic air or nitrogen [3]: a quick-closing valve compresses an
arrestor's charge in milliseconds to tens of milliseconds, too fast for heat to leave a small gas
volume through its walls, and 1.4 is also the safe side both ways - for a given volume it gives the
higher peak, and for a given peak the larger volume (the bracket below is smaller for larger n at
a given r). Air chambers on long pipelines, whose gas swings for seconds, are often modelled nearer
1.2 [3]; that is not the case of a fixture's arrestor.

**Which state the volume is.** A volume from this module is the gas volume at ``P1``, the pressure
the sizing states (the schedule: the static pressure at the arrestor, absolute). Before a closure
the line flows and the pressure at the arrestor is the lower flowing pressure; the gas, given
minutes, has taken it at the room's temperature (Boyle, ``V_f = V1 P1 / P_f``), and the surge then
compresses it polytropically from there. The transient solver does exactly that. The energy
balance from the flowing state absorbs more than the sizing assumed (the cushion is larger to
first order in ``(P1 - P_f)/P1``, the supply's extra work is second order), so a volume sized at
the static pressure is on the safe side of one sized at the flowing pressure.

References
----------
.. [1] F. M. Dawson and A. A. Kalinske, "Methods of calculating water-hammer pressures",
   J. AWWA 31 (1939) 1835-1864 (energy method for air chambers); from memory.
.. [2] Any thermodynamics text for the work of isothermal and polytropic compression of an ideal
   gas, W = P1 V1 ln r and W = (P2 V2 - P1 V1)/(n - 1).
.. [3] E. B. Wylie and V. L. Streeter, *Fluid Transients in Systems*, Prentice Hall, 1993, sec.
   3.5 (air chamber: polytropic gas, n = 1 for slow, 1.4 for rapid compression, 1.2 a usual
   average for pipeline air chambers); from memory.
"""

from __future__ import annotations

import math

#: The polytropic exponent of an arrestor's gas, in sizing and in simulation alike [-]: adiabatic
#: air or nitrogen (ratio of specific heats 1.40 at room temperature), see the module notes [3].
ARRESTOR_POLYTROPIC_EXPONENT: float = 1.4

#: Largest polytropic exponent accepted (monatomic gas, adiabatic) [-].
MAX_POLYTROPIC_EXPONENT: float = 5.0 / 3.0


def _positive(name: str, value: float, unit: str) -> None:
    if not (value > 0.0 and math.isfinite(value)):
        raise ValueError(f"{name} must be positive; got {value!r} {unit}")


def _check_exponent(n: float) -> None:
    if not (1.0 <= n <= MAX_POLYTROPIC_EXPONENT):
        raise ValueError(
            f"polytropic exponent must be between 1 (isothermal) and "
            f"{MAX_POLYTROPIC_EXPONENT:.3f}; got {n!r}"
        )


def _energy_per_p1v1(r: float, n: float) -> float:
    """Energy absorbed per unit P1*V1 when compressing to r = P2/P1 (the bracket above)."""
    if n == 1.0:
        # ln r - 1 + 1/r, written to keep precision near r = 1.
        return math.log(r) - (r - 1.0) / r
    m = (n - 1.0) / n
    return math.expm1(m * math.log(r)) / (n - 1.0) + math.expm1(-math.log(r) / n)


def kinetic_energy_j(density: float, area_m2: float, length_m: float, velocity: float) -> float:
    """Kinetic energy of a water column.

    KE = 1/2 rho A L V**2   [1]

    Parameters
    ----------
    density : float
        Density rho [kg/m3].
    area_m2 : float
        Inside cross-section area A [m2].
    length_m : float
        Length L of the moving column [m], >= 0.
    velocity : float
        Velocity V [m/s].

    Returns
    -------
    float
        Kinetic energy [J].
    """
    _positive("density", density, "kg/m3")
    _positive("area", area_m2, "m2")
    if not (length_m >= 0.0 and math.isfinite(length_m)):
        raise ValueError(f"length must be zero or positive; got {length_m!r} m")
    return 0.5 * density * area_m2 * length_m * velocity * velocity


def _check_pressures(p1_abs_pa: float, p2_abs_pa: float) -> None:
    _positive("initial absolute pressure", p1_abs_pa, "Pa")
    if not (p2_abs_pa > p1_abs_pa and math.isfinite(p2_abs_pa)):
        raise ValueError(
            f"peak pressure must exceed the initial pressure {p1_abs_pa!r} Pa (both absolute); "
            f"got {p2_abs_pa!r} Pa"
        )


def gas_volume_isothermal_m3(kinetic_energy_j: float, p1_abs_pa: float, p2_abs_pa: float) -> float:
    """Gas volume at line pressure that holds the surge to P2, isothermal compression.

    V1 = KE / (P1 [ln r - 1 + 1/r]),  r = P2/P1   [1], [2]

    Parameters
    ----------
    kinetic_energy_j : float
        Kinetic energy to absorb KE [J], >= 0.
    p1_abs_pa : float
        Initial (line) pressure P1 [Pa], absolute.
    p2_abs_pa : float
        Allowed peak pressure P2 [Pa], absolute, > P1.

    Returns
    -------
    float
        Gas volume V1 at P1 [m3].
    """
    return gas_volume_polytropic_m3(kinetic_energy_j, p1_abs_pa, p2_abs_pa, 1.0)


def gas_volume_polytropic_m3(
    kinetic_energy_j: float, p1_abs_pa: float, p2_abs_pa: float, n: float
) -> float:
    """Gas volume at line pressure that holds the surge to P2, polytropic compression.

    V1 = KE / (P1 [(r**((n-1)/n) - 1)/(n - 1) - (1 - r**(-1/n))]),  r = P2/P1   [1], [2]

    n = 1 gives the isothermal formula (its limit); n = 1.4 is adiabatic air.

    Parameters
    ----------
    kinetic_energy_j : float
        Kinetic energy to absorb KE [J], >= 0.
    p1_abs_pa : float
        Initial (line) pressure P1 [Pa], absolute.
    p2_abs_pa : float
        Allowed peak pressure P2 [Pa], absolute, > P1.
    n : float
        Polytropic exponent [-], 1 to 5/3.

    Returns
    -------
    float
        Gas volume V1 at P1 [m3].
    """
    if not (kinetic_energy_j >= 0.0 and math.isfinite(kinetic_energy_j)):
        raise ValueError(f"kinetic energy must be zero or positive; got {kinetic_energy_j!r} J")
    _check_pressures(p1_abs_pa, p2_abs_pa)
    _check_exponent(n)
    return kinetic_energy_j / (p1_abs_pa * _energy_per_p1v1(p2_abs_pa / p1_abs_pa, n))


def cushion_peak_pressure_abs_pa(
    kinetic_energy_j: float, gas_volume_m3: float, p1_abs_pa: float, n: float = 1.0
) -> float:
    """Peak pressure reached when a gas cushion absorbs a water column's kinetic energy.

    Solves KE = P1 V1 phi(r) for r = P2/P1, phi the bracket of
    :func:`gas_volume_polytropic_m3` (increasing from phi(1) = 0), by bracketing and bisection
    to a relative width of 1e-13 in r; returns P2 = r P1 [1].

    Parameters
    ----------
    kinetic_energy_j : float
        Kinetic energy to absorb KE [J], >= 0.
    gas_volume_m3 : float
        Gas volume at the initial pressure V1 [m3], > 0.
    p1_abs_pa : float
        Initial (line) pressure P1 [Pa], absolute.
    n : float
        Polytropic exponent [-], 1 (isothermal) to 5/3.

    Returns
    -------
    float
        Peak pressure P2 [Pa], absolute (= P1 when KE = 0).
    """
    if not (kinetic_energy_j >= 0.0 and math.isfinite(kinetic_energy_j)):
        raise ValueError(f"kinetic energy must be zero or positive; got {kinetic_energy_j!r} J")
    _positive("gas volume", gas_volume_m3, "m3")
    _positive("initial absolute pressure", p1_abs_pa, "Pa")
    _check_exponent(n)
    target = kinetic_energy_j / (p1_abs_pa * gas_volume_m3)
    if target == 0.0:
        return p1_abs_pa
    lo, hi = 1.0, 2.0
    while _energy_per_p1v1(hi, n) < target:
        lo, hi = hi, hi * 2.0
        if hi > 1e300:
            raise ValueError("the gas cushion is far too small: no finite peak pressure found")
    while hi - lo > 1e-13 * hi:
        mid = 0.5 * (lo + hi)
        if _energy_per_p1v1(mid, n) < target:
            lo = mid
        else:
            hi = mid
    return 0.5 * (lo + hi) * p1_abs_pa
