"""The catalogues: pipe materials and sizes, fixture kinds, arrestor size classes.

The data are TOML files in this package; each value carries its source. Everything is SI.
"""

from knockproof.catalog._load import CatalogDataError, CatalogKeyError
from knockproof.catalog.arrestors import (
    ARRESTOR_SYMBOLS,
    ArrestorClass,
    arrestor_class_for_units,
    arrestor_classes,
)
from knockproof.catalog.fixtures import (
    SIDES,
    VALVE_TYPES,
    FixtureKind,
    fixture_kinds,
    get_fixture_kind,
)
from knockproof.catalog.nominal import DN_TO_NOMINAL, NominalSizeError, normalize_nominal
from knockproof.catalog.pipes import (
    FAMILIES,
    Material,
    PipeSize,
    get_material,
    get_size,
    materials,
    sizes,
)

__all__ = [
    "ARRESTOR_SYMBOLS",
    "DN_TO_NOMINAL",
    "FAMILIES",
    "SIDES",
    "VALVE_TYPES",
    "ArrestorClass",
    "CatalogDataError",
    "CatalogKeyError",
    "FixtureKind",
    "Material",
    "NominalSizeError",
    "PipeSize",
    "arrestor_class_for_units",
    "arrestor_classes",
    "fixture_kinds",
    "get_fixture_kind",
    "get_material",
    "get_size",
    "materials",
    "normalize_nominal",
    "sizes",
]
