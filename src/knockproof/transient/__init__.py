"""Transient (water-hammer) simulation: method of characteristics on a network of plain arrays.

Importing this package is cheap: numba is loaded only when :func:`simulate` runs.

Public API: :class:`TransientNetwork`, :class:`Reservoir`, :class:`Valve`, :class:`GasCushion`
(network.py); :func:`choose_grid`, :class:`Grid` (grid.py); :func:`simulate`,
:func:`default_duration_s`, :class:`TransientResult` (solver.py); :func:`effective_area_ratio`
(closure.py).
"""

from knockproof.transient.closure import effective_area_ratio
from knockproof.transient.grid import Grid, choose_grid
from knockproof.transient.network import (
    GasCushion,
    Reservoir,
    TransientNetwork,
    Valve,
    friction_head_loss_m,
    steady_heads,
)
from knockproof.transient.solver import TransientResult, default_duration_s, simulate

__all__ = [
    "GasCushion",
    "Grid",
    "Reservoir",
    "TransientNetwork",
    "TransientResult",
    "Valve",
    "choose_grid",
    "default_duration_s",
    "effective_area_ratio",
    "friction_head_loss_m",
    "simulate",
    "steady_heads",
]
