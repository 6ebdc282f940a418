"""What every option needs to know about one event: its cut-down screen, the limit, the units."""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import networkx as nx

from knockproof.advice.screen import EventScreen, Screened, branch_edges
from knockproof.advice.wording import show
from knockproof.model.building import Building, Fixture, Pipe
from knockproof.results import EventResult


@dataclass
class Context:
    """One event being advised on.

    Attributes
    ----------
    screen : EventScreen
        The event's cut-down building and the screen re-run on changes to it.
    event : EventResult
        The event as the building stands.
    limit_pa : float
        The peak-pressure limit [Pa gauge].
    unit_system : str
        ``"us"`` or ``"si"``: the units every ``change`` and note is written in.
    density_kg_m3 : float
        Water density on the event's side [kg/m^3].
    """

    screen: EventScreen
    event: EventResult
    limit_pa: float
    unit_system: str
    density_kg_m3: float

    @property
    def tree(self) -> nx.DiGraph:
        return self.screen.base_tree

    @cached_property
    def lead(self) -> Fixture:
        """The fixture whose valve sits at the event's node (the only one for a single valve)."""
        side = self.event.side
        return next(f for f in self.screen.members if f.node(side) == self.event.node)  # type: ignore[arg-type]

    @cached_property
    def member_nodes(self) -> tuple[str, ...]:
        side = self.event.side
        return tuple(f.node(side) for f in self.screen.members)  # type: ignore[misc,arg-type]

    @cached_property
    def branch(self) -> tuple[Pipe, ...]:
        """The pipes from the lead valve back to the event's reflection node, nearest first."""
        edges = branch_edges(self.tree, self.event.node, self.event.reflection_node)
        return tuple(self.screen.pipes[self.tree.edges[e]["id"]] for e in edges)

    def p(self, value_pa: float) -> str:
        """A pressure in the building's units, to 1 psi or 1 kPa."""
        return show(value_pa, "pressure", self.unit_system)

    @property
    def limit_text(self) -> str:
        return self.p(self.limit_pa)

    def peak(self, building: Building) -> float:
        return self.screen.peak(building)

    def run(self, building: Building) -> Screened:
        return self.screen.screen(building)

    def under_limit(self, peak_pa: float) -> bool:
        return peak_pa <= self.limit_pa
