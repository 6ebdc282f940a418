"""Small invented buildings for the rule tests, written as TOML (a helper module, not a test)."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import Any

import networkx as nx

from knockproof.model.building import Building
from knockproof.results import Analysis
from knockproof.rules import Review

HEAD = """
[building]
name = "test building (invented)"
units = "{units}"
cold_water_temperature = "68 degF"
hot_water_temperature = "140 degF"
{extra}

[defaults]
material = "copper-L"
use = "{use}"
fittings = "0%"
"""

# A small flat: a street supply, a kitchen sink and a clothes washer on cold and hot, the hot side
# from a heater fed off the cold main. Sizes keep velocities under the limits.
FLAT = """
[[supply]]
node = "S"
kind = "street"
static_pressure = "{static}"
elevation = 0

[[supply]]
node = "HS"
kind = "heater-outlet"
side = "hot"
fed_from = "WH"
elevation = 0

[[device]]
id = "HEATER"
kind = "water-heater"
node = "WH"

[[pipe]]
id = "P0"
from = "S"
to = "WH"
length = 5
size = "3/4"

[[pipe]]
id = "P1"
from = "S"
to = "T"
length = 20
size = "1"

[[pipe]]
id = "P2"
from = "T"
to = "K"
length = 10
size = "1/2"

[[pipe]]
id = "P3"
from = "T"
to = "W"
length = 8
size = "1/2"

[[pipe]]
id = "H1"
from = "HS"
to = "HT"
length = 20
size = "3/4"

[[pipe]]
id = "H2"
from = "HT"
to = "HK"
length = 10
size = "1/2"

[[pipe]]
id = "H3"
from = "HT"
to = "HW"
length = 8
size = "1/2"

[[fixture]]
id = "SINK"
kind = "kitchen-sink"
cold = "K"
hot = "HK"
label = "flat 1, kitchen"

[[fixture]]
id = "WASHER"
kind = "clothes-washer"
cold = "W"
hot = "HW"
flow = "3 gpm"
label = "flat 1, washer"
"""


@dataclass
class Checked:
    review: Review
    tree: nx.DiGraph
    analysis: Analysis
    building: Building
    path: Path

    def rule(self, rule_id: str) -> list[Any]:
        return self.review.by_rule(rule_id)

    def arrestors_for(self, fixture: str, side: str) -> list[Any]:
        return [a for a in self.review.arrestors if fixture in a.protects and a.side == side]


def head(units: str = "us", use: str = "private", extra: str = "") -> str:
    return HEAD.format(units=units, use=use, extra=extra)


def flat(static: str = "60 psi", arrestors: str = "", extra: str = "", use: str = "private") -> str:
    return head(use=use, extra=extra) + FLAT.format(static=static) + arrestors


def arrestor(node: str, size: str | None = None, gas: str | None = None, ident: str = "") -> str:
    lines = ["", "[[arrestor]]"]
    if ident:
        lines.append(f'id = "{ident}"')
    lines.append(f'node = "{node}"')
    if size is not None:
        lines.append(f'size = "{size}"')
    if gas is not None:
        lines.append(f'gas_volume = "{gas}"')
    return "\n".join(lines) + "\n"


