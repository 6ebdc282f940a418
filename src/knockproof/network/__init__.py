"""The supply tree: building it from a Building, and free functions over it."""

from knockproof.network.build import build_tree
from knockproof.network.queries import (
    downstream_fixtures,
    pipe_into,
    pipes,
    quick_closing_valves,
    upstream_path,
)

__all__ = [
    "build_tree",
    "downstream_fixtures",
    "pipe_into",
    "pipes",
    "quick_closing_valves",
    "upstream_path",
]
