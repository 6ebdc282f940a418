"""Reading the catalogue data files shipped in this package, and the errors the catalogue raises.

The data live in TOML files next to this module (``materials.toml``, ``pipe_sizes.toml``,
``fixtures.toml``, ``arrestors.toml``). Each is read once per process and cached.
"""

from __future__ import annotations

import tomllib
from collections.abc import Iterable
from functools import cache
from importlib.resources import files
from typing import Any

from knockproof.errors import KnockproofError

#: One inch [m] (exact).
INCH_M = 0.0254
#: One pound-force per square inch [Pa] (from the exact definitions of lbf and inch).
PSI_PA = 4.4482216152605 / INCH_M**2
#: One US gallon per minute [m³/s] (US gallon = 231 in³ exactly).
GPM_M3_PER_S = 231 * INCH_M**3 / 60


class CatalogKeyError(KnockproofError, KeyError):
    """A name asked of the catalogue is not in it; the message lists the names that are.

    It is a ``KeyError`` (the catalogue behaves like a mapping) and a ``KnockproofError`` (a name in
    a building file is user input: the command line reports it cleanly, exit status 2).
    """

    def __str__(self) -> str:  # KeyError would quote the message
        return str(self.args[0]) if self.args else ""


class CatalogDataError(ValueError):
    """A shipped data file is malformed: a packaging bug, not a user error."""


def unknown_key(what: str, key: object, known: Iterable[str]) -> CatalogKeyError:
    """Build the error for an unknown ``key``, naming every known one."""
    return CatalogKeyError(f"unknown {what} {key!r}; known: {', '.join(known)}")


@cache
def read_data(filename: str) -> dict[str, Any]:
    """Parse the packaged TOML file ``filename`` (cached; callers must not mutate the result)."""
    text = files("knockproof.catalog").joinpath(filename).read_text(encoding="utf-8")
    return tomllib.loads(text)


def field(row: dict[str, Any], name: str, filename: str, where: str) -> Any:
    """Return ``row[name]`` or raise :class:`CatalogDataError` naming the file and the row."""
    try:
        return row[name]
    except KeyError:
        raise CatalogDataError(f"{filename}: {where}: missing field {name!r}") from None
