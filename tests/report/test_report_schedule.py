"""The site schedule: CSV with one header row and units in it, totals by size; JSON in SI."""

from __future__ import annotations

import csv
import io
import json

from knockproof.report.cautions import CAUTION
from knockproof.report.schedule_csv import (
    counts_by_size,
    csv_header,
    schedule_csv,
    schedule_rows,
    write_schedule_csv,
    write_schedule_json,
)

IN3 = 1.6387064e-5  # m^3 per cubic inch (exact, from 1 in = 25.4 mm)
FT = 0.3048  # m (exact)


def read(path):
    with open(path, newline="", encoding="utf-8") as fh:
        return list(csv.reader(fh))


def test_csv_has_one_header_row_with_units_and_totals_by_size(clinic, tmp_path):
    rows = schedule_rows(clinic.review, clinic.analysis)
    path = tmp_path / "site.csv"
    write_schedule_csv(path, rows, "us")
    table = read(path)
    header = table[0]
    assert header == csv_header("us")
    assert "gas_volume_in3" in header and "distance_from_valve_ft" in header
    assert sum(1 for r in table if r == header) == 1
    assert all(len(r) == len(header) for r in table)
    body = [r for r in table[1:] if r[0] not in ("total", "caution")]
    assert [r[0] for r in body] == [a.id for a in clinic.review.arrestors]
    totals = {r[4]: int(r[-1]) for r in table if r[0] == "total"}
    assert totals.pop("all") == len(clinic.review.arrestors)
    assert totals == dict(clinic.review.counts_by_size)
    assert table[-1] == ["caution", CAUTION] + [""] * (len(header) - 2)


def test_csv_values_are_in_the_building_units(clinic):
    a = clinic.review.arrestors[0]
    rows = schedule_rows(clinic.review, clinic.analysis)
    table = list(csv.reader(io.StringIO(schedule_csv(rows, "us"))))
    first = dict(zip(table[0], table[1], strict=True))
    assert float(first["gas_volume_in3"]) == __import__("pytest").approx(
        a.gas_volume_m3 / IN3, rel=1e-3)
    assert float(first["distance_from_valve_ft"]) == __import__("pytest").approx(
        a.distance_from_valve_m / FT, abs=0.006)
    assert first["fixtures_protected"] == "; ".join(a.protects)
    assert first["size_class"] == a.size_class and first["node"] == a.node


def test_si_building_has_litres_and_metres(laundry, tmp_path):
    path = tmp_path / "site.csv"
    write_schedule_csv(path, schedule_rows(laundry.review, laundry.analysis), "si")
    header = read(path)[0]
    assert "gas_volume_L" in header and "distance_from_valve_m" in header


def test_text_that_a_spreadsheet_would_run_stays_text():
    rows = [{"arrestor": "=1+1", "location": "@SUM(A1)", "node": "-n", "side": "cold",
             "size_class": "A", "gas_volume_m3": None, "distance_from_valve_m": 0.0,
             "fixtures_protected": ["+x", "y"], "placement": "at-valve"}]
    table = list(csv.reader(io.StringIO(schedule_csv(rows, "us"))))
    assert table[1][:3] == ["'=1+1", "'@SUM(A1)", "'-n"]
    assert table[1][5] == ""  # no gas volume: an empty cell
    assert table[1][7] == "'+x; y"


def test_no_review_gives_an_empty_schedule(clinic):
    assert schedule_rows(None, clinic.analysis) == []
    table = list(csv.reader(io.StringIO(schedule_csv([], "si"))))
    assert table[1] == ["total", "", "", "", "all", "", "", "", "", "0"]


def test_json_schedule_has_si_keys_and_counts(clinic, tmp_path):
    rows = schedule_rows(clinic.review, clinic.analysis)
    path = tmp_path / "site.json"
    write_schedule_json(path, rows, clinic.analysis)
    data = json.loads(path.read_text(encoding="utf-8"))
    assert data["caution"] == CAUTION
    assert data["total"] == len(clinic.review.arrestors)
    assert data["counts_by_size"] == counts_by_size(rows) == dict(clinic.review.counts_by_size)
    first = data["arrestors"][0]
    assert {"gas_volume_m3", "distance_from_valve_m", "fixtures_protected", "size_class"} <= \
        set(first)
    assert list(data["counts_by_size"]) == sorted(
        data["counts_by_size"], key=["AA", "A", "B", "C", "D", "E", "F"].index)
