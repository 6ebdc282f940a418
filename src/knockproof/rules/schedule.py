"""The arrestor schedule: which arrestors the building needs, where, of what class and gas volume.

Our definitions (docs/rules.md shows this text):

**Valve that needs an arrestor.** Every quick-closing valve, hot and cold side apart (model code:
IPC 604.9 / UPC 609.10, from memory: an arrestor where quick-closing valves are used). A profile
may instead ask for one only where the valve's closure event peaks above a limit
(`arrestor.required`).

**Branch.** The trade measures a branch "from the tee on the main or riser to the last fixture".
We find that tee from the physics: the closure event's *reflection node* is where the valve's
pressure wave meets the larger pipe (or the supply) and reflects. A valve's *leg* is the pipe
leaving its reflection node towards the valve and everything below it. A branch is one leg with
the valves on it, grown in two ways: a leg that lies inside another valve's leg belongs to that
branch (nested tees); and a tee whose only other way on (with valves further down) leads, with no
other tee in between, to the next valve's tee is a point along one run -- a header with fixtures
teed off it -- so the two are one branch. Legs that leave one tee side by side (a floor header
feeding ten apartments) stay separate branches.

**Branch length.** Along the pipes from the branch start (its tee) to the last fixture, i.e. the
furthest valve.

**Placement** (the arrestor standard's rule, from memory). Branch up to 20 ft: one
arrestor for the branch total, at the end of the branch between the last two fixtures (the node
where their supplies part), or at the valve when the branch has one. Longer branch: two, whose
fixture-unit ratings together cover the branch: the fixtures whose take-off from the run lies in
the first half of the branch go to one placed near the middle (where the last of them leaves the
run; at its valve if it is alone), the rest to one at the end. When every fixture of a long branch
lies within 20 ft of the end arrestor (fixtures bunched at the end of a long feed), a second one
would sit in the same place, so one serves the branch. A single residential appliance (clothes
washer, dishwasher, ice maker in private use) gets its own class AA arrestor at its valve
(ASSE 1010's AA class).

**Size class.** By the standard's fixture-unit weights (catalogue, public or private use); a
fixture piped with separate hot and cold lines puts 3/4 of its weight on each side (from
memory). The smallest class whose range holds the load.

**Gas volume.** Energy method (Dawson & Kalinske 1939, from memory): the kinetic energy
1/2 rho L Q^2 / A of the valve's flow Q in every pipe from the valve back to the supply
(conservative: the whole column stops) is absorbed by gas compressed polytropically (n = 1.4 by
default: the compression takes milliseconds, so it is nearly adiabatic, and it gives a larger
volume than isothermal; n = 1 gives isothermal) from P1 = the static pressure at the arrestor to
P2 = the surge limit, both absolute. The largest single valve of those it protects sets the volume
(one valve closing at a time). The energy method treats the column as rigid and undersizes a
little; a transient simulation should confirm the class.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Literal

from knockproof.catalog import arrestor_class_for_units, get_fixture_kind
from knockproof.catalog.arrestors import ARRESTOR_SYMBOLS
from knockproof.model.building import Fixture
from knockproof.physics import gas_cushion
from knockproof.results import EventResult, governing_peak
from knockproof.rules.context import Context

Position = Literal["at-valve", "branch-end", "branch-middle"]

#: Rule ids every arrestor recommendation answers to.
_BASE_RULES = ("arrestor.required", "arrestor.placement", "arrestor.size-class",
               "arrestor.gas-volume")


@dataclass(frozen=True)
class Valve:
    """A quick-closing valve: one side of one fixture."""

    fixture: Fixture
    side: str
    node: str
    event: EventResult | None
    fixture_units: float

    @property
    def id(self) -> str:
        return f"{self.fixture.id}:{self.side}"


@dataclass(frozen=True)
class Branch:
    """A branch as defined in the module docstring; ``valves`` ordered along its run."""

    start: str
    side: str
    legs: frozenset[str]
    valves: tuple[Valve, ...]
    length_m: float


@dataclass(frozen=True)
class ArrestorRecommendation:
    """One arrestor the building needs (a row of the installation schedule).

    Attributes
    ----------
    id : str
        ``"AR-1"``, ``"AR-2"``, ... in schedule order.
    node, side : str
        Where it goes.
    size_class : str
        ``"AA"`` ... ``"F"``.
    gas_volume_m3 : float or None
        Gas volume at line pressure by the energy method [m^3]; None when the static pressure
        at the node already reaches the limit (no cushion can hold the surge under it).
    protects : tuple[str, ...]
        Fixture ids whose valves (on ``side``) it protects.
    distance_from_valve_m : float
        Along the pipes to the nearest valve it protects [m].
    description : str
        From the building file's labels, e.g. ``"floor 2, unit A: kitchen, lavatory"``.
    rules : tuple[str, ...]
        Ids of the rules that ask for it.
    position : "at-valve", "branch-end" or "branch-middle"
    fixture_units : float
        The fixture-unit load it is sized for [-].
    valves : tuple[str, ...]
        ``"<fixture>:<side>"`` of the valves it protects.
    branch_start : str
        The tee its branch leaves from.
    branch_length_m : float
        Its branch's length [m].
    partner : str or None
        The other arrestor of a long branch.
    kinetic_energy_j : float
        Largest kinetic energy of one protected valve's column [J].
    static_pressure_pa : float
        Static pressure at ``node`` (gauge) [Pa].
    beyond_largest_class : bool
        The load exceeds class F's range: the branch should be split between more arrestors.
    """

    id: str
    node: str
    side: str
    size_class: str
    gas_volume_m3: float | None
    protects: tuple[str, ...]
    distance_from_valve_m: float
    description: str
    rules: tuple[str, ...]
    position: Position
    fixture_units: float
    valves: tuple[str, ...]
    branch_start: str
    branch_length_m: float
    partner: str | None
    kinetic_energy_j: float
    static_pressure_pa: float
    beyond_largest_class: bool = False
    legs: frozenset[str] = field(default=frozenset(), repr=False)


@dataclass(frozen=True)
class Schedule:
    """The whole schedule, and which valves it covers."""

    arrestors: tuple[ArrestorRecommendation, ...]
    branches: tuple[Branch, ...]
    by_valve: dict[str, str] = field(hash=False)
    required: tuple[Valve, ...]
    not_required: tuple[Valve, ...]

    def counts_by_size(self) -> dict[str, int]:
        counts = {s: 0 for s in ARRESTOR_SYMBOLS}
        for a in self.arrestors:
            counts[a.size_class] += 1
        return {k: v for k, v in counts.items() if v}

    def get(self, rec_id: str) -> ArrestorRecommendation:
        for a in self.arrestors:
            if a.id == rec_id:
                return a
        raise KeyError(rec_id)


def event_peak_pa(e: EventResult) -> float:
    """The event's governing peak (gauge) [Pa] (:func:`knockproof.results.governing_peak`)."""
    g = governing_peak(e)
    return e.peak_pressure_pa if g is None else g.pressure_pa


def fixture_units(f: Fixture, side: str, separate_lines_factor: float) -> float:
    """Arrestor-sizing weight of one side of a fixture (the standard's table, from memory)."""
    kind = get_fixture_kind(f.kind)
    w = kind.arrestor_units_public if f.use == "public" else kind.arrestor_units_private
    if f.cold_node is not None and f.hot_node is not None:
        w *= separate_lines_factor
    return w


def class_for(units: float) -> tuple[str, bool]:
    """Size class for a load, and whether it exceeds the largest class."""
    try:
        return arrestor_class_for_units(max(units, 1e-9)), False
    except ValueError:
        return ARRESTOR_SYMBOLS[-1], True


class _UnionFind:
    def __init__(self) -> None:
        self.up: dict[tuple[str, str], tuple[str, str]] = {}

    def add(self, k: tuple[str, str]) -> None:
        self.up.setdefault(k, k)

    def find(self, k: tuple[str, str]) -> tuple[str, str]:
        while self.up[k] != k:
            self.up[k] = self.up[self.up[k]]
            k = self.up[k]
        return k

    def union(self, a: tuple[str, str], b: tuple[str, str]) -> None:
        ra, rb = self.find(a), self.find(b)
        if ra != rb:
            self.up[rb] = ra


def _leg_of(ctx: Context, node: str, start: str) -> str:
    x = node
    while ctx.parent[x] != start:
        x = ctx.parent[x]  # type: ignore[assignment]
    return x


def _reflection(ctx: Context, v: Valve) -> str:
    r = v.event.reflection_node if v.event is not None else None
    if r is None or r == v.node or not ctx.is_ancestor(r, v.node):
        r = ctx.parent[v.node] or v.node
    return r


def branches(ctx: Context, members: list[Valve]) -> list[Branch]:
    """Group valves into branches (module docstring)."""
    keys: dict[tuple[str, str], list[Valve]] = {}
    for v in members:
        r = _reflection(ctx, v)
        leg = v.node if r == v.node else _leg_of(ctx, v.node, r)
        keys.setdefault((r, leg), []).append(v)
    uf = _UnionFind()
    starts: dict[str, list[tuple[str, str]]] = {}
    for k in keys:
        uf.add(k)
        starts.setdefault(k[0], []).append(k)
    # Nested legs: a tee inside another valve's leg joins that branch.
    for k in keys:
        x = k[0]
        while (p := ctx.parent[x]) is not None:
            if (p, x) in keys:
                uf.union((p, x), k)
            x = p
    # Runs: a tee whose one other way on leads straight to the next tee.
    below: set[str] = set()
    valve_nodes = {v.node for v in members}
    for v in members:
        up: str | None = v.node
        while up is not None and up not in below:
            below.add(up)
            up = ctx.parent[up]
    for r, ks in starts.items():
        legs = {k[1] for k in ks}
        on = [w for w in ctx.children[r] if w not in legs and w in below]
        if len(on) != 1:
            continue
        x = on[0]
        while True:
            if x in starts:
                for k in ks[1:]:
                    uf.union(ks[0], k)
                for k in starts[x]:
                    uf.union(ks[0], k)
                break
            if x in valve_nodes:
                break
            nxt = [w for w in ctx.children[x] if w in below]
            if len(nxt) != 1:
                break
            x = nxt[0]
    groups: dict[tuple[str, str], list[tuple[str, str]]] = {}
    for k in keys:
        groups.setdefault(uf.find(k), []).append(k)
    out = []
    for ks in groups.values():
        start = min((k[0] for k in ks), key=lambda n: (ctx.depth[n], n))
        vs = [v for k in ks for v in keys[k]]
        out.append(_make_branch(ctx, start, vs))
    return out


def _make_branch(ctx: Context, start: str, vs: list[Valve]) -> Branch:
    d0 = ctx.from_root_m[start]
    last = max(vs, key=lambda v: (ctx.from_root_m[v.node], v.id))
    takeoff = {v.id: ctx.lca(v.node, last.node) or start for v in vs}
    ordered = sorted(vs, key=lambda v: (ctx.from_root_m[takeoff[v.id]], ctx.from_root_m[v.node],
                                        v.id))
    legs = frozenset(v.node if v.node == start else _leg_of(ctx, v.node, start) for v in vs)
    return Branch(start, last.side, legs, tuple(ordered), ctx.from_root_m[last.node] - d0)


def _spot(ctx: Context, group: list[Valve]) -> str:
    """The end of a group of valves: between its last two (where their supplies part)."""
    if len(group) == 1:
        return group[0].node
    return ctx.lca(group[-2].node, group[-1].node) or group[-1].node


def _layout(
    ctx: Context, b: Branch, max_single_m: float
) -> list[tuple[Position, list[Valve], str]]:
    vs = list(b.valves)
    if len(vs) == 1:
        return [("at-valve", vs, vs[0].node)]
    end = _spot(ctx, vs)
    if b.length_m <= max_single_m or all(ctx.distance_m(end, v.node) <= max_single_m for v in vs):
        return [("branch-end", vs, end)]
    last = vs[-1]
    d0 = ctx.from_root_m[b.start]
    middle = b.length_m / 2.0
    k = sum(1 for v in vs
            if ctx.from_root_m[ctx.lca(v.node, last.node) or b.start] - d0 <= middle + 1e-9)
    k = min(max(k, 1), len(vs) - 1)
    first, second = vs[:k], vs[k:]
    t = ctx.lca(first[-1].node, last.node) or b.start
    mid = first[0].node if len(first) == 1 else t if t != b.start else _spot(ctx, first)
    end = _spot(ctx, second)
    if mid == end:
        return [("branch-end", vs, end)]
    pos_first: Position = "at-valve" if mid == first[0].node else "branch-middle"
    pos_second: Position = "at-valve" if len(second) == 1 else "branch-end"
    return [(pos_first, first, mid), (pos_second, second, end)]


def build_schedule(ctx: Context) -> Schedule:
    """The arrestor schedule of the context's building under its profile."""
    prof = ctx.profile
    req = prof.params("arrestor.required")
    size = prof.params("arrestor.size-class")
    gas = prof.params("arrestor.gas-volume")
    blen = prof.params("arrestor.branch-length")
    factor = float(size["separate_lines_factor"])
    appliances = set(size["single_appliance_kinds"])
    required: list[Valve] = []
    not_required: list[Valve] = []
    for f in ctx.building.fixtures:
        if not f.quick_closing:
            continue
        for side in f.sides:
            node = f.node(side)
            assert node is not None
            ev = ctx.events.get(f"{f.id}:{side}")
            v = Valve(f, side, node, ev, fixture_units(f, side, factor))
            if req["only_when_peak_exceeds_limit"] and ev is not None \
                    and event_peak_pa(ev) <= req["limit_pa"]:
                not_required.append(v)
            else:
                required.append(v)
    own = [v for v in required if size["aa_for_single_residential_appliance"]
           and v.fixture.use == "private" and v.fixture.kind in appliances]
    own_ids = {v.id for v in own}
    grouped = [v for v in required if v.id not in own_ids]
    plan: list[tuple[Branch, Position, list[Valve], str, bool]] = []
    all_branches: list[Branch] = []
    for v in own:
        r = _reflection(ctx, v)
        b = _make_branch(ctx, r, [v])
        all_branches.append(b)
        plan.append((b, "at-valve", [v], v.node, True))
    for b in branches(ctx, grouped):
        all_branches.append(b)
        for pos, group, node in _layout(ctx, b, float(blen["single_arrestor_max_branch_m"])):
            plan.append((b, pos, group, node, False))
    order = {f.id: i for i, f in enumerate(ctx.building.fixtures)}
    plan.sort(key=lambda p: (min(order[v.fixture.id] for v in p[2]), p[2][0].side == "hot",
                             ctx.from_root_m[p[3]]))
    ke_cache: dict[str, float] = {}
    recs: list[ArrestorRecommendation] = []
    by_valve: dict[str, str] = {}
    for i, (b, pos, group, node, appliance) in enumerate(plan):
        rec_id = f"AR-{i + 1}"
        units = sum(v.fixture_units for v in group)
        single_appliance = len(group) == 1 and group[0].fixture.use == "private" \
            and group[0].fixture.kind in appliances
        if appliance or single_appliance:
            cls, beyond = "AA", False
        else:
            cls, beyond = class_for(units)
        ke = max(_kinetic_energy(ctx, v, ke_cache) for v in group)
        static = ctx.nodes[node].static_pressure_pa
        volume = gas_volume(ke, static, gas)
        protects = tuple(dict.fromkeys(v.fixture.id for v in group))
        rules = _BASE_RULES + (() if pos == "at-valve" and len(b.valves) == 1
                               else ("arrestor.branch-length",))
        recs.append(ArrestorRecommendation(
            id=rec_id, node=node, side=group[0].side, size_class=cls, gas_volume_m3=volume,
            protects=protects,
            distance_from_valve_m=min(ctx.distance_m(node, v.node) for v in group),
            description=ctx.fixture_description(protects), rules=rules, position=pos,
            fixture_units=units, valves=tuple(v.id for v in group), branch_start=b.start,
            branch_length_m=b.length_m, partner=None, kinetic_energy_j=ke,
            static_pressure_pa=static, beyond_largest_class=beyond, legs=b.legs,
        ))
        for v in group:
            by_valve[v.id] = rec_id
    # Partners: the two arrestors of one long branch name each other.
    by_branch: dict[int, list[int]] = {}
    for i, (b, *_rest) in enumerate(plan):
        by_branch.setdefault(id(b), []).append(i)
    for idx in by_branch.values():
        if len(idx) == 2:
            a, c = idx
            recs[a] = _with_partner(recs[a], recs[c].id)
            recs[c] = _with_partner(recs[c], recs[a].id)
    return Schedule(tuple(recs), tuple(all_branches), by_valve, tuple(required),
                    tuple(not_required))


def _with_partner(r: ArrestorRecommendation, partner: str) -> ArrestorRecommendation:
    return replace(r, partner=partner)


def _kinetic_energy(ctx: Context, v: Valve, cache: dict[str, float]) -> float:
    """1/2 rho L Q^2 / A summed over the pipes from the valve back to its supply [J].

    Each pipe's column moves at Q/A, so its kinetic energy is 1/2 rho A L (Q/A)^2 = 1/2 rho Q^2 L/A;
    the sum of L/A from the supply to each node is kept in ``cache`` (one walk per node).
    """
    rho = ctx.analysis.density_hot_kg_m3 if v.side == "hot" else ctx.analysis.density_cold_kg_m3
    q = v.fixture.flow_m3_per_s
    return 0.5 * rho * q * q * _length_over_area(ctx, v.node, cache)


def _length_over_area(ctx: Context, node: str, cache: dict[str, float]) -> float:
    todo = []
    x: str | None = node
    while x is not None and x not in cache:
        todo.append(x)
        x = ctx.parent[x]
    base = cache.get(x, 0.0) if x is not None else 0.0
    for y in reversed(todo):
        p = ctx.pipe_into.get(y)
        if p is not None:
            base += p.length_m / (math.pi * p.inside_diameter_m ** 2 / 4.0)
        cache[y] = base
    return cache[node]


def gas_volume(ke_j: float, static_pa: float, params: dict[str, float]) -> float | None:
    """Gas volume [m^3] at line pressure holding the surge to the limit; None if it cannot."""
    atm = float(params["atmospheric_pa"])
    p1 = static_pa + atm
    p2 = float(params["limit_pa"]) + atm
    if p1 <= 0 or p2 <= p1:
        return None
    return gas_cushion.gas_volume_polytropic_m3(ke_j, p1, p2, float(params["polytropic_exponent"]))
