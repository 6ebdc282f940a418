"""The real command, run as a user would: exit status, stdout and stderr checked apart."""

from __future__ import annotations

import json
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
PSI = 6894.757293168361  # Pa (NIST SP 811)
GPM = 3.785411784e-3 / 60


def test_help_lists_commands(cli):
    r = cli("--help")
    assert r.returncode == 0
    for name in ("check", "estimate", "simulate", "advise", "catalog", "schema", "new"):
        assert name in r.stdout
    assert r.stderr == ""


def test_check_example_text(cli):
    r = cli("check", "--example")
    assert r.returncode in (0, 1)
    assert "Maple Street Family Clinic" in r.stdout
    assert "qualified person" in r.stdout
    assert "Traceback" not in r.stderr


def test_bundled_example_is_the_clinic_fixture():
    bundled = ROOT / "src" / "knockproof" / "examples" / "clinic.toml"
    assert bundled.read_text() == (ROOT / "fixtures" / "clinic.toml").read_text()


def test_check_json_contract(cli):
    r = cli("check", "fixtures/clinic.toml", "--format", "json")
    assert r.returncode in (0, 1), r.stderr
    d = json.loads(r.stdout)
    assert {"id", "velocity_m_per_s", "wave_speed_m_per_s"} <= set(d["pipes"][0])
    assert {"id", "static_pressure_pa"} <= set(d["nodes"][0])
    ev = d["events"][0]
    for key in (
        "fixture",
        "node",
        "closure_time_s",
        "critical_time_s",
        "surge_pa",
        "peak_pressure_pa",
    ):
        assert key in ev
    assert all(e["peak_pressure_pa"] >= e["static_pressure_pa"] for e in d["events"])
    assert "qualified person" in d["caution"]


def test_check_json_is_deterministic(cli):
    a = cli("check", "fixtures/clinic.toml", "--format", "json").stdout
    b = cli("check", "fixtures/clinic.toml", "--format", "json").stdout
    assert a == b


def test_estimate_json_contract_and_values(cli):
    r = cli(
        "estimate",
        "--material",
        "copper-L",
        "--size",
        "3/4",
        "--length",
        "15 m",
        "--flow",
        "5 gpm",
        "--closure",
        "20 ms",
        "--static",
        "60 psi",
        "--format",
        "json",
    )
    assert r.returncode == 0, r.stderr
    d = json.loads(r.stdout)
    for key in (
        "velocity_m_per_s",
        "wave_speed_m_per_s",
        "critical_time_s",
        "closure",
        "surge_pa",
        "peak_pressure_pa",
    ):
        assert key in d
    # velocity = Q / A with B88 3/4 L: ID = 0.875 - 2 x 0.045 in (CHECKS.md)
    area = 3.141592653589793 * ((0.875 - 0.09) * 0.0254) ** 2 / 4
    assert abs(d["velocity_m_per_s"] - 5 * GPM / area) < 1e-4
    assert d["closure"] in ("rapid", "slow")
    assert abs(d["peak_pressure_pa"] - 60 * PSI - d["surge_pa"]) < 5.0


def test_estimate_text_in_us_units(cli):
    r = cli(
        "estimate",
        "--material",
        "pex-sdr9",
        "--size",
        "1/2",
        "--length",
        "40 ft",
        "--flow",
        "2 gpm",
        "--closure",
        "25 ms",
        "--static",
        "60 psi",
    )
    assert r.returncode == 0
    assert "psi" in r.stdout and "ft/s" in r.stdout
    assert "qualified person" in r.stdout


def test_estimate_bad_value_exit_2(cli):
    r = cli(
        "estimate",
        "--material",
        "copper-L",
        "--size",
        "3/4",
        "--length",
        "60 psi",
        "--flow",
        "5 gpm",
        "--closure",
        "20 ms",
        "--static",
        "60 psi",
    )
    assert r.returncode == 2
    assert "--length" in r.stderr and "expected a length" in r.stderr
    assert "Traceback" not in r.stderr
    assert r.stdout == ""


def test_estimate_unknown_material_exit_2(cli):
    r = cli(
        "estimate",
        "--material",
        "unobtainium",
        "--size",
        "3/4",
        "--length",
        "10 m",
        "--flow",
        "5 gpm",
        "--closure",
        "20 ms",
        "--static",
        "60 psi",
    )
    assert r.returncode == 2
    assert "unobtainium" in r.stderr and "copper-L" in r.stderr


def test_check_missing_file_exit_2(cli):
    r = cli("check", "no-such-building.toml")
    assert r.returncode == 2
    assert "no-such-building.toml" in r.stderr and "no such file" in r.stderr
    assert r.stdout == ""


def test_usage_errors_exit_2(cli):
    assert cli("check").returncode == 2
    assert cli("check", "--example", "--format", "xml").returncode == 2
    assert cli("no-such-command").returncode == 2


def test_new_writes_starter_and_refuses_overwrite(cli, tmp_path):
    target = tmp_path / "mine.toml"
    r = cli("new", str(target))
    assert r.returncode == 0 and target.exists()
    first = target.read_text()
    assert cli("check", str(target)).returncode in (0, 1)
    r = cli("new", str(target))
    assert r.returncode == 2 and "already exists" in r.stderr
    assert target.read_text() == first


def test_schema_validates_every_example(cli):
    import tomllib

    import jsonschema

    r = cli("schema")
    assert r.returncode == 0
    schema = json.loads(r.stdout)
    files = sorted((ROOT / "fixtures").glob("*.toml")) + [
        ROOT / "src" / "knockproof" / "examples" / "starter.toml"
    ]
    assert len(files) >= 4
    for f in files:
        jsonschema.validate(tomllib.loads(f.read_text()), schema)


def test_catalog_lists_fixed_keys(cli):
    r = cli("catalog")
    assert r.returncode == 0
    for key in (
        "copper-K",
        "copper-L",
        "copper-M",
        "pex-sdr9",
        "cpvc-sdr11",
        "pvc-sch40",
        "pvc-sch80",
        "steel-sch40",
        "stainless-sch10s",
        "clothes-washer",
        "dishwasher",
        "ice-maker",
        "water-closet-flush-valve",
        "sensor-faucet",
    ):
        assert key in r.stdout
