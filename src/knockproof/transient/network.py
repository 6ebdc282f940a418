"""The network the transient solver works on: plain arrays, SI units, no graph library.

A :class:`TransientNetwork` is what an adapter (from the building tree, or a test) hands to
:func:`knockproof.transient.solver.simulate`. Nodes are numbered ``0 .. n_nodes-1`` and pipes ``0 ..
n_pipes-1``; every per-node or per-pipe quantity is an array indexed that way.

Heads are *piezometric heads in metres of water, gauge based*: ``H = p / (rho g) + z`` with ``p``
the gauge pressure [Pa] and ``z`` the elevation [m]. A fixture outlet open to the atmosphere at
elevation ``z`` therefore has head ``z``.

Node roles (at most one reservoir, any number of valves, at most one arrestor per node):

* **Reservoir** - constant head. Used for the supply (street main, booster, tank) and also for the
  outlet of a pressure-reducing valve held at its setting: during a surge a PRV does not respond
  within the first few wave cycles that matter here, and treating it as a fixed-head node reflects
  the wave at full strength, which is the conservative choice for peak pressure (engineering
  judgement, from memory).
* **Valve** - a fixture valve discharging to atmosphere at the node; see :class:`Valve`.
* **Arrestor** - a gas cushion connected at the node; see :class:`GasCushion`.
* every other node is a **junction** (any number of pipes, common head) or, with one pipe, a **dead
  end** (zero flow).

References: E. B. Wylie and V. L. Streeter, *Fluid Transients in Systems*, Prentice Hall, 1993 (ch.
3 boundary conditions); M. H. Chaudhry, *Applied Hydraulic Transients*, 3rd ed., Springer 2014 (ch.
3-4).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from knockproof.errors import SimulationError
from knockproof.physics.gas_cushion import ARRESTOR_POLYTROPIC_EXPONENT

GRAVITY_M_PER_S2 = 9.80665
"""Standard gravity [m/s^2] (CGPM 1901)."""


@dataclass(frozen=True)
class Reservoir:
    """A constant-head node.

    Attributes
    ----------
    node : int
        Node index.
    head_m : float
        Piezometric head held at the node [m], gauge based.
    """

    node: int
    head_m: float


@dataclass(frozen=True)
class Valve:
    """A valve discharging to atmosphere at a node (a fixture outlet) that closes during the run.

    The discharge follows the orifice relation (Wylie & Streeter 1993, sec. 3.3; Chaudhry 2014,
    sec. 3.5)::

        Q = tau(t) * Q0 * sqrt(dH / dH0)

    where ``dH = H - z`` is the head drop across the valve [m] (outlet at atmospheric pressure at
    the node elevation ``z``), ``Q0`` and ``dH0`` are the initial flow and head drop, and ``tau`` is
    the effective-area ratio ``(Cd A) / (Cd A)_0`` given by the closure law
    (:func:`knockproof.transient.closure.effective_area_ratio`). No flow enters through the valve
    from the atmosphere: when ``dH <= 0`` the valve passes nothing.

    Attributes
    ----------
    node : int
        Node index.
    initial_flow_m3_per_s : float
        ``Q0`` [m^3/s], >= 0. Must equal the flow the pipes deliver to the node in the initial
        state. initial_head_drop_m : float
        ``dH0`` [m], > 0 when ``Q0 > 0``: the node's initial head minus its elevation (checked to 1
        mm). closure_time_s : float
        Time from first movement to full closure [s]; 0 means an instantaneous closure.
    law : str
        A law name of :data:`knockproof.transient.closure.LAW_TABLE`.
    start_time_s : float
        When the valve starts to close [s].
    """

    node: int
    initial_flow_m3_per_s: float
    initial_head_drop_m: float
    closure_time_s: float
    law: str = "linear-area"
    start_time_s: float = 0.0


@dataclass(frozen=True)
class GasCushion:
    """A gas-cushion water-hammer arrestor (or air chamber) connected at a node.

    The gas follows the polytropic law ``p_abs * V^n = constant`` (Wylie & Streeter 1993, sec. 3.5
    air chamber; Chaudhry 2014, sec. 3.7). The connection (throat) has a head loss ``k * Qa * |Qa|``
    [m] for a flow ``Qa`` [m^3/s] into the arrestor. The water level in the chamber is taken at the
    node elevation.

    The gas state given here is any one equilibrium state, e.g. the factory precharge: before the
    run the solver brings the gas isothermally (slow charging, Boyle's law) to the node's initial
    absolute pressure, ``V0 = V_given * p_given / p_line``. When ``gas_pressure_abs_pa`` is the line
    pressure, ``V0`` is ``gas_volume_m3`` itself.

    Attributes
    ----------
    node : int
        Node index.
    gas_volume_m3 : float
        Gas volume at the stated state [m^3], > 0.
    gas_pressure_abs_pa : float
        Absolute gas pressure at that state [Pa], > 0.
    polytropic_exponent : float
        ``n``: 1.0 isothermal, 1.4 adiabatic (air); default
        :data:`~knockproof.physics.gas_cushion.ARRESTOR_POLYTROPIC_EXPONENT` (1.4), the exponent
        the arrestor sizing uses (see that module for the choice).
    throat_loss_s2_per_m5 : float
        ``k`` [s^2/m^5] in the throat loss ``k*Qa*|Qa|`` [m]; default small (1e3: 1 mm of head at
        1 L/s), i.e. a short full-bore connection; a chosen default, not a published value.
    """

    node: int
    gas_volume_m3: float
    gas_pressure_abs_pa: float
    polytropic_exponent: float = ARRESTOR_POLYTROPIC_EXPONENT
    throat_loss_s2_per_m5: float = 1.0e3


@dataclass(frozen=True, eq=False)
class TransientNetwork:
    """A pipe network for the transient solver, as plain arrays in SI units.

    Attributes
    ----------
    node_names : tuple[str, ...]
        One name per node (used in messages and results).
    node_elevation_m : np.ndarray
        Elevation of each node [m].
    pipe_names : tuple[str, ...]
        One name per pipe.
    pipe_upstream, pipe_downstream : np.ndarray
        Integer node index of each pipe's ends; flow is positive from upstream to downstream.
    pipe_length_m, pipe_diameter_m : np.ndarray
        Length [m] and inside diameter [m] of each pipe.
    pipe_wave_speed_m_per_s : np.ndarray
        Pressure-wave speed ``a`` of each pipe [m/s] (before the grid adjusts it).
    pipe_friction_factor : np.ndarray
        Darcy friction factor ``f`` [-], quasi-steady (held constant during the run).
    pipe_initial_flow_m3_per_s : np.ndarray
        Steady flow in each pipe at t = 0 [m^3/s].
    node_initial_head_m : np.ndarray
        Steady piezometric head at t = 0 [m], gauge based. Must be consistent with the flows and
        friction factors: ``H_up - H_down = f L/(2 g D A^2) Q|Q|`` to 1 mm
        (see :func:`steady_heads`, which builds such heads).
    reservoirs, valves, arrestors : tuples of :class:`Reservoir`, :class:`Valve`,
    :class:`GasCushion`
    density_kg_m3 : float
        Water density [kg/m^3].
    vapour_pressure_abs_pa : float
        Absolute vapour pressure of the water [Pa].
    atmospheric_pa : float
        Absolute atmospheric pressure [Pa].
    """

    node_names: tuple[str, ...]
    node_elevation_m: np.ndarray
    pipe_names: tuple[str, ...]
    pipe_upstream: np.ndarray
    pipe_downstream: np.ndarray
    pipe_length_m: np.ndarray
    pipe_diameter_m: np.ndarray
    pipe_wave_speed_m_per_s: np.ndarray
    pipe_friction_factor: np.ndarray
    pipe_initial_flow_m3_per_s: np.ndarray
    node_initial_head_m: np.ndarray
    reservoirs: tuple[Reservoir, ...] = ()
    valves: tuple[Valve, ...] = ()
    arrestors: tuple[GasCushion, ...] = ()
    density_kg_m3: float = 998.2
    vapour_pressure_abs_pa: float = 2339.0
    atmospheric_pa: float = 101325.0

    @property
    def n_nodes(self) -> int:
        return len(self.node_names)

    @property
    def n_pipes(self) -> int:
        return len(self.pipe_names)

    def pipe_area_m2(self) -> np.ndarray:
        """Flow area of each pipe [m^2], ``pi D^2 / 4``."""
        d = np.asarray(self.pipe_diameter_m, dtype=float)
        return np.pi * d * d / 4.0


def friction_head_loss_m(
    length_m: np.ndarray | float,
    diameter_m: np.ndarray | float,
    friction_factor: np.ndarray | float,
    flow_m3_per_s: np.ndarray | float,
) -> np.ndarray:
    """Darcy-Weisbach head loss with sign of the flow, ``f L/(2 g D A^2) Q|Q|`` [m].

    Reference: Wylie & Streeter 1993, eq. 1-4 (Darcy-Weisbach); any fluid mechanics text.
    """
    d = np.asarray(diameter_m, dtype=float)
    area = np.pi * d * d / 4.0
    q = np.asarray(flow_m3_per_s, dtype=float)
    return (
        np.asarray(friction_factor, dtype=float)
        * np.asarray(length_m, dtype=float)
        / (2.0 * GRAVITY_M_PER_S2 * d * area * area)
        * q
        * np.abs(q)
    )


def steady_heads(
    n_nodes: int,
    pipe_upstream: np.ndarray,
    pipe_downstream: np.ndarray,
    pipe_loss_m: np.ndarray,
    fixed_heads: dict[int, float],
    *,
    pipe_names: tuple[str, ...] | None = None,
    tolerance_m: float = 1e-3,
) -> np.ndarray:
    """Node heads [m] that make the given pipe head losses a steady state.

    Walks the network outward from every node of known head (``fixed_heads``, node -> head [m]),
    setting ``H_down = H_up - loss`` along each pipe. Nodes that no known head reaches get NaN.

    Raises
    ------
    SimulationError
        When two paths give a node heads that differ by more than ``tolerance_m`` (a loop whose
        losses do not sum to zero, or two fixed heads the flows cannot join); the message names the
        pipe.
    """
    up = np.asarray(pipe_upstream, dtype=np.int64).tolist()
    down = np.asarray(pipe_downstream, dtype=np.int64).tolist()
    loss = np.asarray(pipe_loss_m, dtype=float).tolist()
    names = pipe_names or tuple(f"#{i}" for i in range(len(up)))
    # plain Python floats (the same additions as numpy's, without its per-scalar overhead: the
    # layout calls this for every simulated event)
    head = [math.nan] * n_nodes
    adjacency: list[list[tuple[int, int, float]]] = [[] for _ in range(n_nodes)]
    for p, (u, d, dh) in enumerate(zip(up, down, loss, strict=True)):
        adjacency[u].append((p, d, -dh))
        adjacency[d].append((p, u, dh))
    stack: list[int] = []
    for node, h in fixed_heads.items():
        head[node] = float(h)
        stack.append(node)
    while stack:
        n = stack.pop()
        for p, other, dh in adjacency[n]:
            h = head[n] + dh
            if head[other] != head[other]:  # NaN: not reached yet
                head[other] = h
                stack.append(other)
            elif abs(head[other] - h) > tolerance_m:
                raise SimulationError(
                    f"pipe {names[p]!r}: the initial flows are not a steady state: heads along two "
                    f"paths differ by {abs(head[other] - h):.4g} m at its ends (expected at most "
                    f"{tolerance_m:g} m)"
                )
    return np.array(head)
