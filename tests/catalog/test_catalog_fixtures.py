"""Fixture kinds against IPC Table 604.3 (flows), Table E103.3(2) (WSFU) and the arrestor weights.

C = confirmed in the published page named, M = from memory.
"""

from __future__ import annotations

import pytest

from knockproof.catalog import VALVE_TYPES, CatalogKeyError, fixture_kinds, get_fixture_kind
from knockproof.errors import KnockproofError

GPM = 6.30901964e-5  # m³/s per US gal/min, NIST SP 811

CONTRACT_KEYS = [
    "clothes-washer", "dishwasher", "ice-maker", "kitchen-sink", "lavatory", "bathtub", "shower",
    "water-closet-tank", "water-closet-flush-valve", "urinal-flush-valve", "service-sink",
    "hose-bibb", "sensor-faucet", "laundry-tray", "drinking-fountain",
]  # fmt: skip


def test_contract_keys_exist() -> None:
    keys = [k.key for k in fixture_kinds()]
    assert len(keys) == len(set(keys))
    for key in CONTRACT_KEYS:
        assert key in keys


PSI = 6894.757293168361  # Pa per psi, NIST SP 811

# IPC Table 604.3, required capacity (gpm, psi) (C, up.codes/s/design-of-building-water-distribution-system).
IPC_604_3 = {
    "bathtub": (4.0, 20),  # balanced-pressure / thermostatic valve
    "shower": (2.5, 8),
    "lavatory": (0.8, 8),  # private lavatory
    "sensor-faucet": (0.4, 8),  # public lavatory
    "kitchen-sink": (1.75, 8),  # sink, residential
    "service-sink": (3.0, 8),
    "dishwasher": (2.75, 8),  # residential dishwasher
    "laundry-tray": (4.0, 8),
    "hose-bibb": (5.0, 8),
    "drinking-fountain": (0.75, 8),
    "urinal-flush-valve": (12.0, 25),  # urinal valve
    "water-closet-flush-valve": (25.0, 35),  # siphonic flushometer (blowout: 25 @ 45)
    "water-closet-tank": (3.0, 20),  # close-coupled tank
}


@pytest.mark.parametrize("key,row", list(IPC_604_3.items()))
def test_minimum_capacity_from_ipc_604_3(key: str, row: tuple[float, float]) -> None:
    kind = get_fixture_kind(key)
    assert kind.minimum_flow_m3_per_s == pytest.approx(row[0] * GPM, rel=1e-6)
    assert kind.minimum_pressure_pa == pytest.approx(row[1] * PSI, rel=1e-6)


# Maximum flows of IPC Table 604.4 (gpm at psi): kitchen sink faucet 2.2 @ 60 (C, a jurisdiction's
# reprint of the table, dcrules.elaws.us/dcmr/12-f604); public lavatory 0.5 @ 60 (C,
# up.codes/s/public-lavatory-faucets); private lavatory 2.2 @ 60 and shower head 2.5 @ 80 from
# memory (IPC 604.4 / IRC P2903.2).
IPC_604_4 = {
    "kitchen-sink": (2.2, 60, "private"),
    "lavatory": (2.2, 60, "private"),
    "shower": (2.5, 80, "private"),
}
IPC_604_4_PUBLIC = {"lavatory": (0.5, 60), "sensor-faucet": (0.5, 60)}


@pytest.mark.parametrize("key,row", list(IPC_604_4.items()))
def test_rated_flow_is_the_code_maximum(key: str, row: tuple[float, float, str]) -> None:
    kind = get_fixture_kind(key)
    assert kind.flow_at(row[1] * PSI, "private") == pytest.approx(row[0] * GPM, rel=1e-6)


@pytest.mark.parametrize("key,row", list(IPC_604_4_PUBLIC.items()))
def test_public_lavatory_maximum(key: str, row: tuple[float, float]) -> None:
    kind = get_fixture_kind(key)
    assert kind.flow_at(row[1] * PSI, "public") == pytest.approx(row[0] * GPM, rel=1e-6)


def test_orifice_scaling() -> None:
    # Orifice, Q = Cd*A*sqrt(2*dp/rho): a quarter of the pressure passes half the flow. A kitchen
    # faucet at its 60 psi rating passes 2.2 gpm, at 15 psi 1.1 gpm; a tub filler rated at the
    # code's 4 gpm @ 20 psi passes 4*sqrt(3) = 6.93 gpm at 60 psi.
    sink = get_fixture_kind("kitchen-sink")
    assert sink.flow_at(15 * PSI) == pytest.approx(1.1 * GPM, rel=1e-6)
    assert get_fixture_kind("bathtub").flow_at(60 * PSI) == pytest.approx(
        4 * 3**0.5 * GPM, rel=1e-6)
    assert sink.flow_at(0.0) == 0.0


def test_regulated_flow_is_held_above_its_rating() -> None:
    # A flow-control washer holds the flow (from memory): the same at 40 and 80 psi.
    washer = get_fixture_kind("clothes-washer")
    assert washer.flow_at(80 * PSI) == pytest.approx(washer.flow_at(40 * PSI), rel=1e-12)
    assert washer.flow_at(5 * PSI) < washer.flow_at(40 * PSI)


def test_closure_time_ranges() -> None:
    # From memory: a single-lever faucet can be flicked shut in ~0.05 s, much faster than the
    # typical 0.1-0.3 s; every range runs fastest <= typical.
    for k in fixture_kinds():
        assert 0 < k.closure_time_fastest_s <= k.closure_time_s
    assert get_fixture_kind("kitchen-sink").closure_time_fastest_s <= 0.05


def test_flows_not_in_604_3_are_plausible() -> None:
    # from memory: ice maker ~0.25 gpm; washer inlet 2-5 gpm.
    assert get_fixture_kind("ice-maker").flow_at(60 * PSI) == pytest.approx(0.25 * GPM, rel=1e-6)
    assert 2 * GPM <= get_fixture_kind("clothes-washer").flow_at(60 * PSI) <= 5 * GPM


# IPC Table E103.3(2), (cold, hot, total). C: online.flipbuilder.com/mewf/tjyt/.../page163.html
E103_PRIVATE_C = {
    "bathtub": (1, 1, 1.4),
    "dishwasher": (0, 1.4, 1.4),
    "kitchen-sink": (1, 1, 1.4),
    "laundry-tray": (1, 1, 1.4),
    "lavatory": (0.5, 0.5, 0.7),
}
E103_PUBLIC_C = {
    "bathtub": (3, 3, 4),
    "kitchen-sink": (3, 3, 4),  # hotel/restaurant
    "lavatory": (1.5, 1.5, 2),
    "service-sink": (2.25, 2.25, 3),
    "drinking-fountain": (0.25, 0, 0.25),
}
# IPC Table E103.3(2) rows not confirmed: from memory (M).
E103_PRIVATE_M = {
    "clothes-washer": (1, 1, 1.4),
    "shower": (1, 1, 1.4),
    "water-closet-tank": (2.2, 0, 2.2),
    "water-closet-flush-valve": (6, 0, 6),
}
E103_PUBLIC_M = {
    "clothes-washer": (2.25, 2.25, 3),
    "shower": (3, 3, 4),
    "water-closet-tank": (5, 0, 5),
    "water-closet-flush-valve": (10, 0, 10),
    "urinal-flush-valve": (5, 0, 5),  # 3/4 in flush valve
}


@pytest.mark.parametrize("key,wsfu", list({**E103_PRIVATE_C, **E103_PRIVATE_M}.items()))
def test_wsfu_private(key: str, wsfu: tuple[float, float, float]) -> None:
    assert get_fixture_kind(key).wsfu_private == pytest.approx(wsfu)


@pytest.mark.parametrize("key,wsfu", list({**E103_PUBLIC_C, **E103_PUBLIC_M}.items()))
def test_wsfu_public(key: str, wsfu: tuple[float, float, float]) -> None:
    assert get_fixture_kind(key).wsfu_public == pytest.approx(wsfu)


def test_sensor_faucet_takes_lavatory_wsfu() -> None:
    lav = get_fixture_kind("lavatory")
    sensor = get_fixture_kind("sensor-faucet")
    assert (sensor.wsfu_private, sensor.wsfu_public) == (lav.wsfu_private, lav.wsfu_public)


# Arrestor sizing weights, (public, private), from memory (M).
ARRESTOR_UNITS_M = {
    "water-closet-flush-valve": (10, 6),
    "water-closet-tank": (5, 3),
    "urinal-flush-valve": (5, 5),  # stall urinal flush valve 5 (public only in the table)
    "lavatory": (2, 1),
    "bathtub": (4, 2),
    "shower": (4, 2),
    "service-sink": (3, 3),
    "kitchen-sink": (4, 2),
    "laundry-tray": (3, 3),
}


@pytest.mark.parametrize("key,units", list(ARRESTOR_UNITS_M.items()))
def test_arrestor_units(key: str, units: tuple[float, float]) -> None:
    kind = get_fixture_kind(key)
    assert (kind.arrestor_units_public, kind.arrestor_units_private) == pytest.approx(units)


def test_every_kind_is_consistent_and_sourced() -> None:
    for kind in fixture_kinds():
        assert kind.source.strip() and kind.closure_basis.strip() and kind.name.strip()
        assert kind.valve in VALVE_TYPES
        assert kind.sides and set(kind.sides) <= {"cold", "hot"}
        assert kind.rated_flow_m3_per_s > 0 and kind.closure_time_s > 0
        assert kind.rated_basis.strip()
        for cold, hot, total in (kind.wsfu_private, kind.wsfu_public):
            # E103.3(2): total is not the sum (it is about 3/4 of it), but no side exceeds it.
            assert max(cold, hot) <= total <= cold + hot + 1e-9
            assert (cold > 0) == ("cold" in kind.sides), kind.key
            assert (hot > 0) == ("hot" in kind.sides), kind.key
        assert kind.arrestor_units_public >= kind.arrestor_units_private > 0
        assert kind.flush_valve == (kind.valve == "flush-valve")


def test_valve_kinds_and_closure_basis() -> None:
    # Closing times, from memory: solenoids 10-50 ms; single lever 0.1-0.3 s;
    # flushometer controlled closure 1-5 s.
    for key in ("clothes-washer", "dishwasher", "ice-maker", "sensor-faucet"):
        kind = get_fixture_kind(key)
        assert kind.valve == "solenoid" and kind.quick_closing
        assert 0.010 <= kind.closure_time_s <= 0.050
        assert "from memory" in kind.closure_basis
    for key in ("kitchen-sink", "lavatory"):
        kind = get_fixture_kind(key)
        assert kind.valve == "lever" and kind.quick_closing
        assert 0.1 <= kind.closure_time_s <= 0.3
    for key in ("water-closet-flush-valve", "urinal-flush-valve"):
        kind = get_fixture_kind(key)
        assert kind.flush_valve and kind.quick_closing
        assert 1.0 <= kind.closure_time_s <= 5.0
    assert not get_fixture_kind("water-closet-tank").quick_closing
    assert get_fixture_kind("hose-bibb").valve == "manual"
    assert get_fixture_kind("drinking-fountain").valve == "self-closing"
    assert get_fixture_kind("dishwasher").sides == ("hot",)
    assert get_fixture_kind("ice-maker").sides == ("cold",)
    assert get_fixture_kind("clothes-washer").sides == ("cold", "hot")


def test_unknown_fixture_kind_names_known_kinds() -> None:
    with pytest.raises(KeyError, match=r"unknown fixture kind 'bidet'; known: clothes-washer, "):
        get_fixture_kind("bidet")
    with pytest.raises(CatalogKeyError) as info:
        get_fixture_kind("sink")
    assert isinstance(info.value, KnockproofError)
    assert "kitchen-sink" in str(info.value) and "drinking-fountain" in str(info.value)
