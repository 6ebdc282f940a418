"""Fuzz run: generated building files (valid trees and mutants) through load, build and analyze.

Run: python benchmarks/fuzz_inputs.py [-n 10000] [--seed 7] [--crashes DIR] [--valid-share 0.3]

Every input is made from ``random.Random(f"{seed}:{index}")``, so a run is reproducible and one case
can be replayed alone with ``--only INDEX``. Each input ends in one of three ways:

- ok: the closed-form screen returns, every number in the results is finite, and the JSON report can
  be written;
- clean error: a ``KnockproofError`` whose message names the file;
- crash: anything else (another exception, a non-finite result, a message without the file name).
  The input and its traceback are saved in the crash folder (printed at the end).

Exit status 0 when nothing crashed, 1 otherwise. The inputs are invented; no real building.
"""

from __future__ import annotations

import argparse
import dataclasses
import json
import math
import random
import sys
import tempfile
import time
import traceback
from collections import Counter
from pathlib import Path
from typing import Any

MATERIAL_SIZES = {
    "copper-K": ["1/2", "3/4", "1", "1-1/4", "1-1/2", "2", "3"],
    "copper-L": ["3/8", "1/2", "3/4", "1", "1-1/4", "1-1/2", "2", "4"],
    "copper-M": ["1/2", "3/4", "1", "1-1/2", "2"],
    "pex-sdr9": ["3/8", "1/2", "5/8", "3/4", "1", "1-1/4", "2"],
    "cpvc-sdr11": ["1/2", "3/4", "1", "1-1/4", "2"],
    "pvc-sch40": ["1/2", "3/4", "1", "1-1/2", "2", "3", "4"],
    "pvc-sch80": ["1/2", "3/4", "1", "2", "3"],
    "steel-sch40": ["1/2", "3/4", "1", "1-1/4", "2", "4", "6"],
    "stainless-sch10s": ["1/2", "3/4", "1", "2", "3"],
    "pe-sdr11": ["1/2", "3/4", "1", "1-1/4", "2"],
    "ppr-sdr6": ["1/2", "3/4", "1", "1-1/4", "2"],
}
#: Fixture kinds (from docs/input-format.md) and the sides each may draw.
FIXTURE_SIDES = {
    "clothes-washer": ("cold", "hot"), "dishwasher": ("hot",), "ice-maker": ("cold",),
    "kitchen-sink": ("cold", "hot"), "lavatory": ("cold", "hot"), "bathtub": ("cold", "hot"),
    "shower": ("cold", "hot"), "water-closet-tank": ("cold",),
    "water-closet-flush-valve": ("cold",), "urinal-flush-valve": ("cold",),
    "service-sink": ("cold", "hot"), "hose-bibb": ("cold",), "sensor-faucet": ("cold", "hot"),
    "laundry-tray": ("cold", "hot"), "drinking-fountain": ("cold",),
}
VALVES = ["solenoid", "self-closing", "lever", "flush-valve", "manual", "sensor"]

# ------------------------------------------------------------------ writing TOML


def toml_value(v: Any) -> str:
    """A TOML literal for a plain Python value (strings via JSON escapes, which TOML shares)."""
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        if math.isnan(v):
            return "nan"
        if math.isinf(v):
            return "inf" if v > 0 else "-inf"
        return repr(v)
    if isinstance(v, str):
        return json.dumps(v)
    if isinstance(v, list):
        return "[" + ", ".join(toml_value(x) for x in v) + "]"
    if isinstance(v, dict):
        return "{ " + ", ".join(f"{k} = {toml_value(x)}" for k, x in v.items()) + " }"
    raise TypeError(type(v))


def to_toml(doc: dict[str, Any]) -> str:
    """Write a building document: tables, then arrays of tables, then templates with their items."""
    out = ["# Invented building written by the knockproof fuzz generator."]
    for table in ("building", "defaults"):
        if table in doc:
            out.append(f"\n[{table}]")
            out += [f"{k} = {toml_value(v)}" for k, v in doc[table].items()]
    for array in ("supply", "pipe", "fixture", "arrestor", "device"):
        for entry in doc.get(array, []):
            out.append(f"\n[[{array}]]")
            out += [f"{k} = {toml_value(v)}" for k, v in entry.items()]
    for t in doc.get("template", []):
        out.append(f'\n[[template]]\nname = {toml_value(t["name"])}')
        for sub in ("pipe", "fixture", "arrestor", "device", "place"):
            for entry in t.get(sub, []):
                out.append(f"\n[[template.{sub}]]")
                out += [f"{k} = {toml_value(v)}" for k, v in entry.items()]
    for entry in doc.get("place", []):
        out.append("\n[[place]]")
        out += [f"{k} = {toml_value(v)}" for k, v in entry.items()]
    return "\n".join(out) + "\n"


# ------------------------------------------------------------------ valid buildings


def _length(rng: random.Random, units: str) -> tuple[Any, Any]:
    """A pipe length and a rise no larger than it, written in one of several ways."""
    feet = rng.uniform(0.5, 120.0)
    rise_ft = feet * rng.uniform(-0.95, 0.95) if rng.random() < 0.5 else 0.0
    style = rng.randrange(4)
    if style == 0:  # bare numbers in the unit system
        f = 1.0 if units == "us" else 0.3048
        return round(feet * f, 3), round(rise_ft * f, 3)
    if style == 1:
        return f"{feet:.2f} ft", f"{rise_ft:.2f} ft"
    if style == 2:
        return f"{feet * 0.3048:.3f} m", f"{rise_ft * 0.3048:.3f} m"
    return f"{feet * 12:.1f} in", f"{rise_ft * 12:.1f} in"


def _pressure(rng: random.Random, units: str) -> Any:
    psi = rng.uniform(25.0, 140.0)
    style = rng.randrange(3)
    if style == 0:
        return round(psi, 1) if units == "us" else round(psi * 6.894757, 1)
    if style == 1:
        return f"{psi * 0.06894757:.2f} bar"
    return f"{psi:.1f} psi"


def _tree(rng: random.Random, prefix: str, root: str, count: int, units: str,
          materials: list[str]) -> tuple[list[dict[str, Any]], list[str]]:
    pipes: list[dict[str, Any]] = []
    nodes = [root]
    for i in range(1, count + 1):
        parent = rng.choice(nodes)
        child = f"{prefix.lower()}{i}"
        material = rng.choice(materials)
        length, rise = _length(rng, units)
        p: dict[str, Any] = {"id": f"{prefix}{i}"}
        if rng.random() < 0.15:  # written against the flow: the loader turns it round
            p.update({"from": child, "to": parent})
            rise = -rise if isinstance(rise, float) else _negate(rise)
        else:
            p.update({"from": parent, "to": child})
        p.update({"length": length, "size": rng.choice(MATERIAL_SIZES[material]),
                  "material": material})
        if rise not in (0.0, "0.00 ft", "0.000 m", "0.0 in"):
            p["rise"] = rise
        if rng.random() < 0.2:
            p["fittings"] = rng.choice(["0%", "10%", "40%", "3 ft", "1.5 m"])
        if rng.random() < 0.2:
            p["restraint"] = rng.choice(["anchored", "upstream", "joints"])
        if rng.random() < 0.2:
            p["label"] = f"run {i}"
        pipes.append(p)
        nodes.append(child)
    return pipes, nodes


def _negate(text: str) -> str:
    return text[1:] if text.startswith("-") else "-" + text


def valid_building(rng: random.Random, max_pipes: int = 60) -> dict[str, Any]:
    """A random, valid building: a cold tree, maybe a hot tree, fixtures, arrestors, a template."""
    units = rng.choice(["us", "si"])
    doc: dict[str, Any] = {"building": {"name": f"Fuzz house {rng.randrange(10**6)} (invented)",
                                        "units": units}}
    if rng.random() < 0.3:
        doc["building"]["cold_water_temperature"] = rng.choice(["40 degF", "10 degC", "25 degC"])
    if rng.random() < 0.3:
        doc["building"]["hot_water_temperature"] = rng.choice(["120 degF", "60 degC", "82 degC"])
    materials = rng.sample(sorted(MATERIAL_SIZES), rng.randint(1, 4))
    doc["defaults"] = {"material": materials[0]}
    if rng.random() < 0.3:
        doc["defaults"]["fittings"] = rng.choice(["25%", "0%", "50%"])
    cold_pipes, cold_nodes = _tree(rng, "C", "street", rng.randint(1, max_pipes), units, materials)
    supplies: list[dict[str, Any]] = [{"node": "street", "static_pressure": _pressure(rng, units)}]
    if rng.random() < 0.3:
        supplies[0]["elevation"] = rng.choice([0, "3 m", "-10 ft", 12.5])
    pipes = cold_pipes
    hot_nodes: list[str] = []
    devices: list[dict[str, Any]] = []
    if rng.random() < 0.6:
        fed_from = rng.choice(cold_nodes)
        supplies.append({"node": "heater", "kind": "heater-outlet", "side": "hot",
                         "fed_from": fed_from})
        hot_pipes, hot_nodes = _tree(rng, "H", "heater", rng.randint(1, max(1, max_pipes // 2)),
                                     units, materials)
        pipes = pipes + hot_pipes
        devices.append({"id": "WH", "kind": "water-heater", "node": fed_from})
    doc["supply"] = supplies
    doc["pipe"] = pipes
    cold_outlets, hot_outlets = cold_nodes[1:], hot_nodes[1:]
    fixtures = []
    for i in range(rng.randint(0, 2 * len(pipes))):
        kind = rng.choice(sorted(FIXTURE_SIDES))
        sides = [s for s in FIXTURE_SIDES[kind] if (cold_outlets if s == "cold" else hot_outlets)]
        if not sides:
            continue
        f: dict[str, Any] = {"id": f"F{i}", "kind": kind}
        if len(sides) == 1 and rng.random() < 0.5:
            f["node"] = rng.choice(cold_outlets if sides[0] == "cold" else hot_outlets)
        else:
            for s in rng.sample(sides, rng.randint(1, len(sides))):
                f[s] = rng.choice(cold_outlets if s == "cold" else hot_outlets)
        if rng.random() < 0.2:
            f["closure_time"] = rng.choice(["20 ms", 0.05, "0.5 s", 2])
        if rng.random() < 0.2:
            f["flow"] = rng.choice(["2 gpm", "0.15 L/s", 4.5 if units == "us" else 0.3])
        if rng.random() < 0.1:
            f["valve"] = rng.choice(VALVES)
        if rng.random() < 0.2:
            f["use"] = rng.choice(["private", "public"])
        fixtures.append(f)
    doc["fixture"] = fixtures
    arrestors = []
    for node in rng.sample(cold_outlets + hot_outlets, min(3, len(cold_outlets + hot_outlets))):
        if rng.random() < 0.5:
            a: dict[str, Any] = {"node": node, "size": rng.choice(["AA", "A", "B", "C", "F"])}
            if rng.random() < 0.3:
                a["gas_volume"] = rng.choice(["10 in3", "0.2 L"])
            arrestors.append(a)
    doc["arrestor"] = arrestors
    if rng.random() < 0.2:
        devices.append({"id": "PRV", "kind": "prv", "node": rng.choice(cold_nodes),
                        "setting": _pressure(rng, units)})
    doc["device"] = devices
    if rng.random() < 0.3:  # a typical unit written once and placed a few times
        n = rng.randint(1, 6)
        root = rng.choice(cold_nodes)
        doc["template"] = [{"name": "unit", "pipe": [
            {"id": "U{n}", "from": root, "to": "u{n}", "length": "{run} ft", "size": "3/4",
             "material": materials[0], "label": "feed"},
            {"id": "U{n}b", "from": "u{n}", "to": "u{n}b", "length": 6, "size": "1/2",
             "material": materials[-1]},
        ], "fixture": [{"id": "W{n}", "kind": "clothes-washer", "cold": "u{n}b",
                        "label": "washer"}]}]
        doc["place"] = [{"template": "unit", "for": {"n": f"1..{n}"},
                         "with": {"run": str(rng.randint(5, 60))}, "label": "unit {n}"}]
    return doc


# ------------------------------------------------------------------ mutations

_REPLACEMENTS = [
    "-1", "0", "-0.0", "nan", "inf", "-inf", "1e308", "1e-320", "5e-324", '"abc"', '"nan ft"',
    '"-inf psi"', '"inf"', "1" + "0" * 30, '"1/0 ft"', '"3 km"', '"18 psi"', '"10 gpm"', '"0 ft"',
    '"-5 m"', '"1e400 ft"', "true", "[]", "{}", '""', '"  "', '"10000 psi"', '"1e-9 s"',
    '"999 degC"', '"3/4 in"', '"DN999"', '"0.3"', '"1-1/4"', "1.3", '"5/0"', '"{n+1}"', '"{zz}"',
    '"1..0"', '"Z..A"', '"1..99999"', '"' + "x" * 250 + '"', '"é€"', '"\\u0000"',
    "1" + "0" * 400, '"1' + "0" * 400 + '/3 ft"', '"street"', '"heater"',
]
_KEYS = ["id", "from", "to", "length", "size", "material", "rise", "side", "fittings",
         "restraint", "label", "kind", "cold", "hot", "node", "flow", "closure_time", "valve",
         "use", "static_pressure", "elevation", "fed_from", "gas_volume", "setting", "volume",
         "template", "for", "with", "name", "units", "lenght", "colde"]
_HEADERS = ["[[pipe]]", "[[fixture]]", "[[supply]]", "[[arrestor]]", "[[device]]", "[[template]]",
            "[[place]]", "[[template.pipe]]", "[[template.place]]", "[building]", "[defaults]",
            "[[pipes]]", "[pipe]"]


def mutate(rng: random.Random, text: str) -> bytes:
    """One to three random edits of a building file's text (may break its syntax on purpose)."""
    lines = text.split("\n")
    for _ in range(rng.randint(1, 3)):
        op = rng.randrange(12)
        i = rng.randrange(len(lines))
        line = lines[i]
        key, eq, value = line.partition(" = ")
        if op == 0:
            del lines[i]
        elif op == 1:
            lines.insert(i, line)
        elif op == 2 and eq:  # a value replaced by something hostile
            lines[i] = f"{key} = {rng.choice(_REPLACEMENTS)}"
        elif op == 3 and eq:  # a value replaced by another line's value (ids, nodes collide)
            others = [x.partition(" = ")[2] for x in lines if " = " in x]
            lines[i] = f"{key} = {rng.choice(others)}"
        elif op == 4 and eq:  # a key swapped for another
            lines[i] = f"{rng.choice(_KEYS)} = {value}"
        elif op == 5:
            j = rng.randrange(len(lines))
            lines[i], lines[j] = lines[j], lines[i]
        elif op == 6 and line.startswith("["):
            lines[i] = rng.choice(_HEADERS)
        elif op == 7 and eq:  # a number scaled absurdly or negated
            try:
                number = float(value)
            except ValueError:
                continue
            lines[i] = f"{key} = {toml_value(number * rng.choice([-1.0, 0.0, 1e6, 1e-9, 1e300]))}"
        elif op == 8:
            lines.insert(i, f"{rng.choice(_KEYS)} = {rng.choice(_REPLACEMENTS)}")
        elif op == 9 and eq:  # a digit changed inside a value
            chars = list(value)
            digits = [k for k, c in enumerate(chars) if c.isdigit()]
            if digits:
                chars[rng.choice(digits)] = rng.choice("0123456789.-e")
                lines[i] = f"{key} = {''.join(chars)}"
        elif op == 10:  # cut the file short
            lines = lines[: i + 1]
            lines[-1] = lines[-1][: rng.randrange(len(lines[-1]) + 1)]
        elif op == 11:  # a copy of a whole item: a duplicate id, or a loop
            starts = [k for k in range(i + 1) if lines[k].startswith("[")]
            if starts:
                block = []
                for x in lines[starts[-1] + 1 :]:
                    if x.startswith("["):
                        break
                    block.append(x)
                lines += ["", lines[starts[-1]], *block]
    data = "\n".join(lines).encode("utf-8")
    if rng.random() < 0.02:  # a byte that is not UTF-8
        k = rng.randrange(len(data) + 1)
        data = data[:k] + bytes([rng.choice([0x80, 0xC3, 0xFF, 0xFE])]) + data[k:]
    return data


def make_input(seed: int, index: int, valid_share: float) -> tuple[str, bytes]:
    """The input number ``index`` of a run: ("valid", text) or ("mutant", bytes)."""
    rng = random.Random(f"{seed}:{index}")
    text = to_toml(valid_building(rng))
    if rng.random() < valid_share:
        return "valid", text.encode("utf-8")
    return "mutant", mutate(rng, text)


# ------------------------------------------------------------------ checking one input


def non_finite(obj: Any, where: str = "analysis") -> list[str]:
    """Paths of every float in a result (dataclasses, tuples, dicts) that is NaN or infinite."""
    bad: list[str] = []
    if isinstance(obj, float):
        if not math.isfinite(obj):
            bad.append(where)
    elif dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        for f in dataclasses.fields(obj):
            bad += non_finite(getattr(obj, f.name), f"{where}.{f.name}")
    elif isinstance(obj, (list, tuple)):
        for i, x in enumerate(obj):
            bad += non_finite(x, f"{where}[{i}]")
    elif isinstance(obj, dict):
        for k, x in obj.items():
            bad += non_finite(x, f"{where}[{k!r}]")
    return bad


def check_one(path: Path) -> tuple[str, str]:
    """Run one file through load -> build -> analyze. Returns (outcome, detail)."""
    from knockproof.analysis.run import analyze_tree
    from knockproof.errors import KnockproofError
    from knockproof.model.loader import load_building
    from knockproof.network import build_tree
    from knockproof.report.json_out import analysis_to_json, dumps

    try:
        building = load_building(path)
        tree = build_tree(building)
        analysis = analyze_tree(tree)
    except KnockproofError as e:
        if str(path) not in str(e):
            return "crash", f"error message does not name the file:\n{e}"
        return "clean error", ""
    except Exception:  # noqa: BLE001 - a crash is what this run looks for
        return "crash", traceback.format_exc()
    bad = non_finite(analysis)
    if bad:
        return "crash", "non-finite results: " + ", ".join(bad[:10])
    try:
        dumps(analysis_to_json(analysis))
    except Exception:  # noqa: BLE001
        return "crash", traceback.format_exc()
    return "ok", ""


def signature(detail: str) -> str:
    """A short name for a crash: the exception line and the innermost knockproof frame."""
    lines = [x for x in detail.strip().splitlines() if x.strip()]
    frames = [x.strip() for x in lines if x.strip().startswith("File ") and "knockproof" in x]
    where = frames[-1].split("knockproof/")[-1] if frames else ""
    return f"{lines[-1][:120] if lines else '?'}  [{where}]"


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("-n", type=int, default=10_000, help="number of inputs (default 10000)")
    ap.add_argument("--seed", type=int, default=7)
    ap.add_argument("--valid-share", type=float, default=0.3,
                    help="share of inputs left valid (default 0.3); the rest are mutated")
    ap.add_argument("--crashes", type=Path, default=None,
                    help="folder for crashing inputs and tracebacks (default: a new temp folder)")
    ap.add_argument("--only", type=int, default=None, help="run the one input of this index")
    args = ap.parse_args(argv)

    crash_dir = args.crashes or Path(tempfile.mkdtemp(prefix="knockproof-fuzz-"))
    crash_dir.mkdir(parents=True, exist_ok=True)
    work = Path(tempfile.mkdtemp(prefix="knockproof-fuzz-inputs-"))
    indices = [args.only] if args.only is not None else range(args.n)
    counts: Counter[str] = Counter()
    by_kind: Counter[tuple[str, str]] = Counter()
    signatures: Counter[str] = Counter()
    slowest = (0.0, -1)
    t_start = time.perf_counter()
    for index in indices:
        kind, data = make_input(args.seed, index, args.valid_share)
        path = work / f"case-{index:06d}.toml"
        path.write_bytes(data)
        t0 = time.perf_counter()
        outcome, detail = check_one(path)
        slowest = max(slowest, (time.perf_counter() - t0, index))
        counts[outcome] += 1
        by_kind[(kind, outcome)] += 1
        if outcome == "crash":
            signatures[signature(detail)] += 1
            (crash_dir / path.name).write_bytes(data)
            (crash_dir / f"case-{index:06d}.txt").write_text(detail, encoding="utf-8")
        path.unlink()
    elapsed = time.perf_counter() - t_start
    total = sum(counts.values())
    print(f"knockproof fuzz: {total} inputs, seed {args.seed}, {elapsed:.1f} s "
          f"({1000 * elapsed / max(total, 1):.1f} ms per input; slowest #{slowest[1]} "
          f"{slowest[0]:.2f} s)")
    for outcome in ("ok", "clean error", "crash"):
        split = ", ".join(f"{k} {by_kind[(k, outcome)]}" for k in ("valid", "mutant"))
        print(f"  {outcome:<12}{counts[outcome]:>7}   ({split})")
    if signatures:
        print(f"crashes saved in {crash_dir} (input .toml and traceback .txt per case):")
        for sig, n in signatures.most_common():
            print(f"  {n:>6}  {sig}")
    else:
        print(f"no crashes (crash folder {crash_dir} is empty)")
    return 1 if counts["crash"] else 0


if __name__ == "__main__":
    sys.exit(main())
