"""The frozen result types of the mitigation advisor. SI inside; the unit is in each field name.

Pressures are gauge [Pa]. The ``change``, ``practicality`` and ``text`` fields are plain words in
the building's own unit system, ready to print.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

OptionKind = Literal[
    "larger-pipe", "slower-closure", "flexible-pipe", "lower-static", "arrestor", "flow-restrictor"
]
Cost = Literal["low", "medium", "high"]
Bound = Literal["at-least", "at-most"]

#: Cost classes in order, cheapest first (for sorting).
COST_ORDER: tuple[Cost, ...] = ("low", "medium", "high")


@dataclass(frozen=True)
class Threshold:
    """The smallest change of one kind that keeps the event's peak under the limit.

    Attributes
    ----------
    quantity : str
        What was solved for: ``closure_time_s`` [s], ``static_pressure_pa`` [Pa gauge, at the
        valve], ``flow_m3_per_s`` [m^3/s], ``flexible_length_m`` [m], ``nominal_size`` (a catalogue
        size such as ``"3/4"``) or ``gas_volume_m3`` [m^3, at line pressure].
    bound : "at-least" or "at-most"
        Whether the quantity must be at least (closure, length, size, gas) or at most (static
        pressure, flow) ``value``.
    value : float, str or None
        The solved limit in SI (a nominal size for ``nominal_size``); ``None`` when nothing in the
        searched range keeps the peak under the limit.
    searched_from, searched_to : float or str
        The range searched, from the building's present value to the far end of what is plausible
        (``None`` where no range applies).
    method : str
        How it was solved, in plain words (bisection, catalogue sizes in turn, ...).
    relative_precision : float or None
        For a bisection: the solved value lies within this fraction of the true boundary of the
        screen (the boundary lies between ``value`` and ``value * (1 -/+ relative_precision)``).
    text : str
        One sentence, e.g. "a closure of at least 95 ms would keep this under 150 psi".
    """

    quantity: str
    bound: Bound
    value: float | str | None
    searched_from: float | str | None
    searched_to: float | str | None
    method: str
    relative_precision: float | None
    text: str

    @property
    def found(self) -> bool:
        return self.value is not None


@dataclass(frozen=True)
class Option:
    """One way to bring an event's peak down, with its computed effect.

    Attributes
    ----------
    kind : OptionKind
        ``larger-pipe``, ``slower-closure``, ``flexible-pipe``, ``lower-static``, ``arrestor`` or
        ``flow-restrictor``.
    change : str
        The change in plain words and the building's units ("closure 25 ms → 95 ms").
    peak_pressure_pa : float
        The event's peak at the valve with the change made [Pa gauge]: the closed-form screen re-run
        on the changed building (for ``arrestor``, the energy method's peak with the stated gas).
    passes : bool
        The new peak is at or under the limit (and, for new pipe, under its pressure rating).
    cost : "low", "medium" or "high"
        Rough cost class of doing it in an existing, occupied building.
    practicality : str
        What the work involves and what to watch, in plain words.
    threshold : Threshold or None
        The solved smallest change of this kind.
    gas_volume_m3, gas_compression, size_class :
        ``arrestor`` only: gas volume at line pressure [m^3], the compression assumed, and the
        arrestor size class by the fixture-unit method.
    """

    kind: OptionKind
    change: str
    peak_pressure_pa: float
    passes: bool
    cost: Cost
    practicality: str
    threshold: Threshold | None = None
    gas_volume_m3: float | None = None
    gas_compression: str | None = None
    size_class: str | None = None


@dataclass(frozen=True)
class EventAdvice:
    """The options for one closure event, best first.

    Attributes
    ----------
    event : str
        The event id (``"<fixture>:<side>"`` or a group id), as in the check's results.
    peak_pressure_pa, static_pressure_pa, surge_pa : float
        The event as the building stands [Pa gauge].
    limit_pa : float
        The limit the options are judged against [Pa gauge].
    options : tuple[Option, ...]
        Passing options first, then cheapest, then lowest new peak.
    notes : tuple[str, ...]
        What the advisor could not credit or wants checked, in plain words.
    """

    event: str
    fixture: str
    kind: str
    side: str
    node: str
    label: str
    unit_system: str
    peak_pressure_pa: float
    static_pressure_pa: float
    surge_pa: float
    limit_pa: float
    options: tuple[Option, ...]
    notes: tuple[str, ...] = ()

    @property
    def passes(self) -> bool:
        """The event is already at or under the limit as the building stands."""
        return self.peak_pressure_pa <= self.limit_pa
