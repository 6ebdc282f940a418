"""Pipe materials and pipe sizes, read from ``materials.toml`` and ``pipe_sizes.toml``.

All values are SI: metres, pascals, degrees Celsius. Every material and every size row carries the
source of its numbers in ``source``.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache
from typing import Any

from knockproof.catalog._load import (
    INCH_M,
    PSI_PA,
    CatalogDataError,
    CatalogKeyError,
    field,
    read_data,
    unknown_key,
)
from knockproof.catalog.nominal import normalize_nominal

MATERIALS_FILE = "materials.toml"
SIZES_FILE = "pipe_sizes.toml"

#: Material families known to the catalogue.
FAMILIES: tuple[str, ...] = ("copper", "pex", "cpvc", "pvc", "steel", "stainless", "pe", "ppr")


@dataclass(frozen=True)
class Material:
    """A pipe material.

    Attributes
    ----------
    key : str
        Catalogue key, e.g. ``"copper-L"``.
    name : str
        Plain name with its standard.
    family : str
        One of :data:`FAMILIES`.
    poisson_ratio : float
        Poisson's ratio [-].
    roughness_m : float
        Absolute roughness [m].
    max_temperature_c : float
        Highest service temperature [°C].
    source : str
        Where the numbers come from ("from memory" / "common practice" where that is the truth).
    modulus_table : tuple[tuple[float, float], ...]
        Short-term elastic modulus points ``(temperature [°C], modulus [Pa])``, temperatures rising;
        one point for metals. Read it through :meth:`elastic_modulus_pa`.
    """

    key: str
    name: str
    family: str
    poisson_ratio: float
    roughness_m: float
    max_temperature_c: float
    source: str
    modulus_table: tuple[tuple[float, float], ...] = ()

    def __post_init__(self) -> None:
        temps = [t for t, _ in self.modulus_table]
        if any(b <= a for a, b in zip(temps, temps[1:], strict=False)):
            raise ValueError(f"material {self.key!r}: modulus temperatures must rise")
        if any(e <= 0 for _, e in self.modulus_table):
            raise ValueError(f"material {self.key!r}: moduli must be positive")

    def elastic_modulus_pa(self, temperature_c: float) -> float:
        """Short-term elastic modulus [Pa] at ``temperature_c`` [°C].

        Linear interpolation between the points of :attr:`modulus_table`; below the first point
        or above the last the end value is held (no extrapolation).
        """
        table = self.modulus_table
        if not table:
            raise ValueError(f"material {self.key!r} has no elastic modulus table")
        if temperature_c <= table[0][0]:
            return table[0][1]
        for (t0, e0), (t1, e1) in zip(table, table[1:], strict=False):
            if temperature_c <= t1:
                return e0 + (e1 - e0) * (temperature_c - t0) / (t1 - t0)
        return table[-1][1]


@dataclass(frozen=True)
class PipeSize:
    """One nominal size of one material.

    Attributes
    ----------
    material : str
        Material key.
    nominal : str
        Canonical nominal size (see :func:`normalize_nominal`).
    outside_diameter_m, wall_m, inside_diameter_m : float
        Outside diameter, wall thickness (the standard's nominal or minimum wall, as its source
        gives it) and inside diameter = OD - 2 * wall [m].
    pressure_rating_pa : float
        Gauge working pressure rating at about 23 °C (73 °F) [Pa].
    pressure_rating_hot_pa : float | None
        Gauge rating at 82 °C (180 °F) [Pa] where published, else ``None``.
    source : str
        Where the numbers come from.
    """

    material: str
    nominal: str
    outside_diameter_m: float
    wall_m: float
    inside_diameter_m: float
    pressure_rating_pa: float
    pressure_rating_hot_pa: float | None
    source: str


@cache
def _materials() -> dict[str, Material]:
    data = read_data(MATERIALS_FILE)
    out: dict[str, Material] = {}
    for key, row in data.items():
        where = f"material {key!r}"

        def get(name: str, row: dict[str, Any] = row, where: str = where) -> Any:
            return field(row, name, MATERIALS_FILE, where)

        family = get("family")
        if family not in FAMILIES:
            raise CatalogDataError(f"{MATERIALS_FILE}: {where}: unknown family {family!r}")
        out[key] = Material(
            key=key,
            name=get("name"),
            family=family,
            poisson_ratio=float(get("poisson_ratio")),
            roughness_m=float(get("roughness_m")),
            max_temperature_c=float(get("max_temperature_c")),
            source=get("source"),
            modulus_table=tuple((float(t), float(e)) for t, e in get("modulus")),
        )
    return out


def _length_m(row: dict[str, Any], name: str, where: str) -> float:
    if f"{name}_in" in row:
        return float(row[f"{name}_in"]) * INCH_M
    if f"{name}_mm" in row:
        return float(row[f"{name}_mm"]) / 1000.0
    raise CatalogDataError(f"{SIZES_FILE}: {where}: missing {name}_in or {name}_mm")


@cache
def _sizes() -> dict[str, dict[str, PipeSize]]:
    data = read_data(SIZES_FILE)
    known = _materials()
    out: dict[str, dict[str, PipeSize]] = {}
    for material, table in data.items():
        if material not in known:
            raise CatalogDataError(f"{SIZES_FILE}: sizes for unknown material {material!r}")
        rows: dict[str, PipeSize] = {}
        for row in field(table, "rows", SIZES_FILE, material):
            where = f"{material} {row.get('nominal')!r}"
            nominal = field(row, "nominal", SIZES_FILE, where)
            if normalize_nominal(nominal) != nominal:
                raise CatalogDataError(f"{SIZES_FILE}: {where}: nominal not in canonical form")
            od = _length_m(row, "outside_diameter", where)
            wall = _length_m(row, "wall", where)
            hot = row.get("pressure_rating_hot_psi")
            rows[nominal] = PipeSize(
                material=material,
                nominal=nominal,
                outside_diameter_m=od,
                wall_m=wall,
                inside_diameter_m=od - 2.0 * wall,
                pressure_rating_pa=float(field(row, "pressure_rating_psi", SIZES_FILE, where))
                * PSI_PA,
                pressure_rating_hot_pa=None if hot is None else float(hot) * PSI_PA,
                source=field(row, "source", SIZES_FILE, where),
            )
        out[material] = rows
    return out


def get_material(key: str) -> Material:
    """Return the material ``key``; :class:`CatalogKeyError` (a ``KeyError``) lists known keys."""
    table = _materials()
    if key not in table:
        raise unknown_key("pipe material", key, table)
    return table[key]


def materials() -> list[Material]:
    """All materials, in data-file order."""
    return list(_materials().values())


def sizes(material_key: str) -> list[PipeSize]:
    """All sizes of ``material_key``, smallest first; unknown material: :class:`CatalogKeyError`."""
    get_material(material_key)
    return list(_sizes().get(material_key, {}).values())


def get_size(material_key: str, nominal: str | int | float) -> PipeSize:
    """Return the size ``nominal`` (normalised first) of material ``material_key``.

    Raises
    ------
    CatalogKeyError
        (a ``KeyError``) unknown material (lists materials) or size not made in that material
        (lists the sizes that are).
    NominalSizeError
        (a ``ValueError``) ``nominal`` cannot be read as a size.
    """
    get_material(material_key)
    canonical = normalize_nominal(nominal)
    table = _sizes().get(material_key, {})
    if canonical not in table:
        raise CatalogKeyError(
            f"no size {canonical!r} in {material_key}; sizes available: {', '.join(table)}"
        )
    return table[canonical]
