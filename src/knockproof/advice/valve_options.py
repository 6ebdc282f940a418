"""Options at the valve and in the pressure: slower closure, lower static, restrictor, arrestor.

Each function returns one :class:`~knockproof.advice.results.Option` with its smallest passing
change solved by re-running the closed-form screen (bisection), or, for the arrestor, by the
energy method of ``physics.gas_cushion``.
"""

from __future__ import annotations

import math
from dataclasses import replace

from knockproof import catalog
from knockproof.advice.context import Context
from knockproof.advice.results import Cost, Option, Threshold
from knockproof.advice.solve import RELATIVE_PRECISION, boundary
from knockproof.advice.wording import safe_round, show, show_time
from knockproof.model.building import Building, Device, Fixture
from knockproof.physics import gas_cushion
from knockproof.physics.constants import ATM_PA, PSI_PA

#: Slowest closure searched [s], unless the valve already closes in over half of it (then twice
#: its own time). Our choice (K): slower than this is no longer a change a valve makes.
SLOWEST_CLOSURE_S = 2.0

#: Static pressure above which the model codes already ask for a pressure-reducing valve
#: (UPC 608.2, IRC P2903.3.1; CHECKS.md, confirmed).
PRV_REQUIRED_ABOVE_PA = 80.0 * PSI_PA

#: Minimum flowing pressure where the data file lists none for the kind (IPC Table 604.3's 8 psi).
DEFAULT_MINIMUM_FLOWING_PA = 8.0 * PSI_PA

#: Polytropic exponent of the arrestor's gas: compressed within milliseconds, nearly adiabatic;
#: the same as the ``arrestor.gas-volume`` rule's default (us-default profile).
POLYTROPIC_EXPONENT = 1.4

#: A fixture piped with separate hot and cold lines puts this share of its arrestor weight on each
#: side (the arrestor standard's practice, from memory; the ``arrestor.size-class`` default).
SEPARATE_LINES_FACTOR = 0.75

#: Smallest share of its flow a restrictor is searched down to [-].
SMALLEST_FLOW_SHARE = 0.01

_BISECTION = f"bisection, to {RELATIVE_PRECISION:.1%} of the value"

_CLOSURE_WORK: dict[str, tuple[Cost, str]] = {
    "solenoid": (
        "medium",
        "The appliance's own inlet valve closes this fast and cannot be slowed "
        "on site: it takes an appliance, or a valve ahead of it, made to close at least "
        "this slowly (check the maker's data).",
    ),
    "lever": (
        "low",
        "A faucet or valve that cannot be snapped shut (a slow-closing cartridge or a "
        "multi-turn valve) in place of the quick lever.",
    ),
    "manual": (
        "low",
        "A multi-turn valve in place of a quarter-turn one, or closing it slowly; "
        "the second relies on whoever uses it.",
    ),
    "flush-valve": (
        "low",
        "Adjust or service the flush valve so that it seats more gently, or fit a model that does.",
    ),
    "sensor": ("low", "Set the valve to close more slowly, or fit a model that does."),
    "self-closing": ("low", "Fit a self-closing valve that closes more slowly."),
}


def slower_closure(ctx: Context) -> Option:
    """The shortest closure time that keeps the peak under the limit (bisection on a log scale)."""
    u, t0 = ctx.unit_system, ctx.event.closure_time_s
    far = max(SLOWEST_CLOSURE_S, 2.0 * t0)

    def building(t: float) -> Building:
        return ctx.screen.changed(
            fixtures=lambda f: replace(f, closure_time_s=max(f.closure_time_s, t))
        )

    cost, work = _CLOSURE_WORK.get(ctx.lead.valve, ("low", "A slower-closing valve."))
    method = f"{_BISECTION} (log scale)"
    far_peak = ctx.peak(building(far))
    if not ctx.under_limit(far_peak):
        text = (
            f"no closure up to {show_time(far)} keeps this under {ctx.limit_text}"
            + _static_reason(ctx)
        )
        return Option(
            "slower-closure",
            f"closure {show_time(t0)} → {show_time(far)} (not enough)",
            far_peak,
            False,
            cost,
            work,
            Threshold("closure_time_s", "at-least", None, t0, far, method, None, text),
        )
    start = max(t0, 1e-4)
    t_star = boundary(lambda t: ctx.under_limit(ctx.peak(building(t))), far, start, geometric=True)
    t_show = min(safe_round(t_star, "time", u, "up"), far)
    peak = ctx.peak(building(t_show))
    text = f"a closure of at least {show_time(t_show)} would keep this under {ctx.limit_text}"
    return Option(
        "slower-closure",
        f"closure {show_time(t0)} → {show_time(t_show)}",
        peak,
        ctx.under_limit(peak),
        cost,
        work,
        Threshold("closure_time_s", "at-least", t_star, t0, far, method, RELATIVE_PRECISION, text),
    )


def _static_reason(ctx: Context) -> str:
    static = ctx.event.static_pressure_pa
    if static >= ctx.limit_pa:
        return f": the static pressure alone ({ctx.p(static)}) is at or over the limit"
    return ""


def minimum_flowing_pa(kind: str) -> tuple[float, str]:
    """Minimum flowing pressure of a fixture kind [Pa gauge] and its source (IPC Table 604.3)."""
    from knockproof.rules.pressure import minimum_pressures

    return minimum_pressures().get(
        kind, (DEFAULT_MINIMUM_FLOWING_PA, "IPC Table 604.3's general 8 psi")
    )


def lower_static(ctx: Context) -> Option:
    """The highest static pressure at the valve that keeps the peak under the limit.

    Modelled as a pressure-reducing valve at the valve's node (the screen caps the static and the
    flowing pressure there at its setting); searched from the present static pressure down to the
    fixture's minimum flowing pressure (IPC Table 604.3).
    """
    u, ev = ctx.unit_system, ctx.event
    s0 = ev.static_pressure_pa
    low, _src = minimum_flowing_pa(ev.kind)

    def building(s: float) -> Building:
        return ctx.screen.changed(
            devices=[
                Device(id=f"advisor-prv-{i}", kind="prv", node=n, setting_pa=s)
                for i, n in enumerate(ctx.member_nodes)
            ]
        )

    cost: Cost = "medium"
    work = (
        "A pressure-reducing valve on this branch, or a lower pressure zone for this part of "
        "the building. It does not stop the surge; it lowers the pressure the surge starts "
        "from."
    )
    if s0 > PRV_REQUIRED_ABOVE_PA:
        work += (
            f" The model codes already ask for one where static pressure exceeds "
            f"{ctx.p(PRV_REQUIRED_ABOVE_PA)} (UPC 608.2, IRC P2903.3.1)."
        )
    method = _BISECTION
    if s0 <= low:
        text = (
            f"the static pressure at the valve ({ctx.p(s0)}) is already at the least the "
            f"fixture needs ({ctx.p(low)} flowing)"
        )
        return Option(
            "lower-static",
            f"static {ctx.p(s0)} (no room to lower it)",
            ev.peak_pressure_pa,
            False,
            cost,
            work,
            Threshold("static_pressure_pa", "at-most", None, s0, low, method, None, text),
        )
    low_peak = ctx.peak(building(low))
    if not ctx.under_limit(low_peak):
        text = (
            f"no static pressure down to {ctx.p(low)} (the least the fixture needs flowing, "
            f"IPC Table 604.3) keeps this under {ctx.limit_text}: the surge alone is "
            f"{ctx.p(ev.surge_pa)}"
        )
        return Option(
            "lower-static",
            f"static {ctx.p(s0)} → {ctx.p(low)} (not enough)",
            low_peak,
            False,
            cost,
            work,
            Threshold("static_pressure_pa", "at-most", None, s0, low, method, None, text),
        )
    s_star = boundary(lambda s: ctx.under_limit(ctx.peak(building(s))), low, s0)
    s_show = max(safe_round(s_star, "pressure", u, "down"), low)
    peak = ctx.peak(building(s_show))
    flowing = min(ev.residual_pressure_pa, s_show)
    work += f" The fixture would then have about {ctx.p(flowing)} flowing (it needs {ctx.p(low)})."
    text = (
        f"a static pressure of at most {ctx.p(s_show)} at the valve would keep this under "
        f"{ctx.limit_text}"
    )
    return Option(
        "lower-static",
        f"static {ctx.p(s0)} → {ctx.p(s_show)} at the valve",
        peak,
        ctx.under_limit(peak),
        cost,
        work,
        Threshold(
            "static_pressure_pa", "at-most", s_star, s0, low, method, RELATIVE_PRECISION, text
        ),
    )


def flow_restrictor(ctx: Context) -> Option:
    """The highest flow through the valve that keeps the peak under the limit.

    Searched down to 1 % of the present flow; the option passes only if that flow is no less than
    the flow the catalogue lists for the fixture kind (IPC Table 604.3 where the table lists it).
    """
    u, lead = ctx.unit_system, ctx.lead
    q0 = lead.flow_m3_per_s
    kind = catalog.get_fixture_kind(lead.kind)
    q_min = min(kind.flow_m3_per_s, q0)

    def building(share: float) -> Building:
        return ctx.screen.changed(
            fixtures=lambda f: replace(f, flow_m3_per_s=f.flow_m3_per_s * share)
        )

    cost: Cost = "low"
    work = (
        "A flow-limiting insert at the fixture's supply connection. The fixture must still get "
        f"the flow it needs: the catalogue lists {show(kind.flow_m3_per_s, 'flow', u)} for "
        f"this kind ({kind.name}; IPC Table 604.3 where the table lists it)."
    )
    method = _BISECTION
    show_q = show(q0, "flow", u)
    floor_peak = ctx.peak(building(SMALLEST_FLOW_SHARE))
    if not ctx.under_limit(floor_peak):
        text = f"no flow restriction keeps this under {ctx.limit_text}" + _static_reason(ctx)
        return Option(
            "flow-restrictor",
            f"flow {show_q} (no restriction is enough)",
            ctx.event.peak_pressure_pa,
            False,
            cost,
            work,
            Threshold("flow_m3_per_s", "at-most", None, q0, q_min, method, None, text),
        )
    share = boundary(lambda k: ctx.under_limit(ctx.peak(building(k))), SMALLEST_FLOW_SHARE, 1.0)
    q_star = share * q0
    q_show = safe_round(q_star, "flow", u, "down")
    if q_show < q_min:
        # The flow that would pass starves the fixture: report the least it may have.
        text = (
            f"it would take a flow of at most {show(q_show, 'flow', u)}, less than the "
            f"{show(kind.flow_m3_per_s, 'flow', u)} the fixture needs"
        )
        if q_min >= q0:
            change = f"flow {show_q} (no room to restrict: the fixture needs it all)"
            peak = ctx.event.peak_pressure_pa
        else:
            change = f"flow {show_q} → {show(q_min, 'flow', u)}, the least it needs (not enough)"
            peak = ctx.peak(building(q_min / q0))
        return Option(
            "flow-restrictor",
            change,
            peak,
            False,
            cost,
            work,
            Threshold("flow_m3_per_s", "at-most", None, q0, q_min, method, None, text),
        )
    peak = ctx.peak(building(q_show / q0))
    text = (
        f"a flow of at most {show(q_show, 'flow', u)} through the valve would keep this under "
        f"{ctx.limit_text}"
    )
    return Option(
        "flow-restrictor",
        f"flow {show_q} → {show(q_show, 'flow', u)} at the fixture",
        peak,
        ctx.under_limit(peak),
        cost,
        work,
        Threshold("flow_m3_per_s", "at-most", q_star, q0, q_min, method, RELATIVE_PRECISION, text),
    )


def _kinetic_energy_j(ctx: Context) -> float:
    """Kinetic energy of the water the closing valves stop, from the valves back to the supply [J].

    Each pipe's column moves at the stopped flow over its area; the whole column back to the supply
    is counted (conservative), as the arrestor schedule of ``check`` does.
    """
    tree = ctx.tree
    stopped: dict[str, float] = {}
    for f in ctx.screen.members:
        node = f.node(ctx.event.side)  # type: ignore[arg-type]
        while True:
            preds = list(tree.predecessors(node))
            if not preds:
                break
            pid = tree.edges[preds[0], node]["id"]
            stopped[pid] = stopped.get(pid, 0.0) + f.flow_m3_per_s
            node = preds[0]
    total = 0.0
    for pid, q in stopped.items():
        p = ctx.screen.pipes[pid]
        area = math.pi * p.inside_diameter_m**2 / 4.0
        total += gas_cushion.kinetic_energy_j(ctx.density_kg_m3, area, p.length_m, q / area)
    return total


def _size_class(members: tuple[Fixture, ...]) -> str | None:
    """Arrestor size class by the fixture-unit method (catalogue weights), or None."""
    units = 0.0
    for f in members:
        kind = catalog.get_fixture_kind(f.kind)
        weight = kind.arrestor_units_public if f.use == "public" else kind.arrestor_units_private
        both = f.cold_node is not None and f.hot_node is not None
        units += weight * (SEPARATE_LINES_FACTOR if both else 1.0)
    if units <= 0:
        return None
    try:
        return catalog.arrestor_class_for_units(units)
    except ValueError:
        return None


def arrestor(ctx: Context) -> Option:
    """An arrestor at the valve: the gas volume that holds the peak to the limit (energy method)."""
    u, ev = ctx.unit_system, ctx.event
    n = POLYTROPIC_EXPONENT
    ke = _kinetic_energy_j(ctx)
    p1 = ev.static_pressure_pa + ATM_PA
    p2 = ctx.limit_pa + ATM_PA
    compression = f"polytropic, n = {n:g} (squeezed within milliseconds: nearly adiabatic)"
    method = (
        f"energy method (Dawson & Kalinske): the stopped column's kinetic energy compresses "
        f"the gas from the static pressure to the limit, {compression}"
    )
    size = _size_class(tuple(f for f in ctx.screen.building.fixtures if f.id in ev.fixtures))
    named = f"arrestor size {size}" if size else "arrestor"
    work = (
        "An arrestor to ASSE 1010 at the valve (in the valve box or behind an access panel); "
        "no re-piping. Size class by the fixture-unit method; choose one whose gas volume "
        "(maker's data) is at least the volume stated. The energy method treats the water "
        "column as rigid and undersizes a little: confirm it by simulation."
    )
    if p1 >= p2:
        text = (
            f"no arrestor can keep this under {ctx.limit_text}: the static pressure alone "
            f"({ctx.p(ev.static_pressure_pa)}) is at or over it"
        )
        return Option(
            "arrestor",
            f"{named} at the valve (not enough)",
            ev.peak_pressure_pa,
            False,
            "low",
            work,
            Threshold("gas_volume_m3", "at-least", None, None, None, method, None, text),
            gas_compression=compression,
            size_class=size,
        )
    volume = gas_cushion.gas_volume_polytropic_m3(ke, p1, p2, n)
    shown = safe_round(volume, "volume", u, "up")
    peak = gas_cushion.cushion_peak_pressure_abs_pa(ke, shown, p1, n) - ATM_PA
    text = (
        f"an arrestor with at least {show(shown, 'volume', u)} of gas at line pressure would "
        f"keep this under {ctx.limit_text}"
    )
    return Option(
        "arrestor",
        f"{named} at the valve, at least {show(shown, 'volume', u)} of gas",
        peak,
        ctx.under_limit(peak),
        "low",
        work,
        Threshold("gas_volume_m3", "at-least", volume, None, None, method, None, text),
        gas_volume_m3=shown,
        gas_compression=compression,
        size_class=size,
    )
