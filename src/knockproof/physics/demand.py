"""Design (peak) flow from water-supply fixture units, after Hunter's curves.

The table itself is data: ``knockproof/catalog/demand_table.toml`` (model code Appendix E,
Table E103.3(3) [1]; each value carries a source marker, "C" confirmed or "M" from memory). This
module only reads it (once, cached) and interpolates.

References
----------
.. [1] International Plumbing Code, Appendix E, Table E103.3(3), "Table for estimating demand"
   (model code; rows marked in the data file).
.. [2] R. B. Hunter, *Methods of Estimating Loads in Plumbing Systems*, NBS Building Materials
   and Structures Report BMS65, 1940 (the probabilistic basis of the table; from memory).
"""

from __future__ import annotations

import math
import tomllib
from bisect import bisect_right
from functools import lru_cache
from importlib import resources

from knockproof.physics.constants import GPM_M3_S

_DATA_PACKAGE = "knockproof.catalog"
_DATA_FILE = "demand_table.toml"

Curve = tuple[tuple[float, ...], tuple[float, ...]]


@lru_cache(maxsize=1)
def _curves() -> dict[str, Curve]:
    """Read the table: {"flush_tank": (wsfu, gpm), "flush_valve": (wsfu, gpm)}, sorted by wsfu."""
    text = resources.files(_DATA_PACKAGE).joinpath(_DATA_FILE).read_text(encoding="utf-8")
    rows = tomllib.loads(text)["row"]
    curves: dict[str, Curve] = {}
    for name in ("flush_tank", "flush_valve"):
        points = sorted(
            (float(r["wsfu"]), float(r[f"{name}_gpm"])) for r in rows if f"{name}_gpm" in r
        )
        units = tuple(p[0] for p in points)
        flows = tuple(p[1] for p in points)
        if len(units) < 2 or any(b <= a for a, b in zip(units, units[1:], strict=False)):
            raise ValueError(f"{_DATA_FILE}: curve {name} needs two or more distinct rows")
        curves[name] = (units, flows)
    return curves


def _interpolate(curve: Curve, fixture_units: float) -> float:
    units, flows = curve
    if fixture_units <= units[0]:
        return flows[0] * fixture_units / units[0]
    i = bisect_right(units, fixture_units) - 1
    i = min(i, len(units) - 2)  # above the top row: continue along the last segment
    x0, x1, y0, y1 = units[i], units[i + 1], flows[i], flows[i + 1]
    return y0 + (y1 - y0) * (fixture_units - x0) / (x1 - x0)


def design_flow_m3_per_s(fixture_units: float, flush_valve: bool) -> float:
    """Design flow for a load in water-supply fixture units (WSFU), Hunter's curves [1], [2].

    Q(u) is interpolated linearly in Table E103.3(3) [1]:

    - u = 0: Q = 0.
    - 0 < u < u_first (1 WSFU flush tank, 5 WSFU flush valve): Q = Q_first * u / u_first,
      proportional to the first row's flow per unit (a straight line through the origin: the
      table has no rows there; knockproof's choice, continuous and increasing).
    - between two rows: linear interpolation.
    - above the top row (1000 WSFU): continue along the curve's own last segment; for the
      flush-valve curve, never below the flush-tank curve (the two curves meet at the top row,
      and a flush-valve system never demands less than a flush-tank one in the table). Beyond
      the table the figure is an extrapolation: knockproof's choice.

    Parameters
    ----------
    fixture_units : float
        Load [WSFU], >= 0.
    flush_valve : bool
        True for a system served predominantly by flush valves (flushometers), False for flush
        tanks.

    Returns
    -------
    float
        Design flow [m3/s].

    Raises
    ------
    ValueError
        Negative or non-finite load.
    """
    if not (fixture_units >= 0.0 and math.isfinite(fixture_units)):
        raise ValueError(f"fixture units must be zero or positive; got {fixture_units!r}")
    if fixture_units == 0.0:
        return 0.0
    curves = _curves()
    gpm = _interpolate(curves["flush_tank"], fixture_units)
    if flush_valve:
        valve_gpm = _interpolate(curves["flush_valve"], fixture_units)
        if fixture_units > curves["flush_valve"][0][-1]:
            valve_gpm = max(valve_gpm, gpm)
        gpm = valve_gpm
    return gpm * GPM_M3_S
