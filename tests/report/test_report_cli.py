"""`knockproof report` run as a user would: exit status, stdout and stderr apart, files written."""

from __future__ import annotations

import csv
import shutil

from report_support import FIXTURES, HOSTILE_BUILDING, run_report

PASSING = """
[building]
name = "Quiet cottage"
units = "us"

[defaults]
material = "copper-L"

[[supply]]
node = "svc"
kind = "street"
static_pressure = "55 psi"

[[pipe]]
id = "P1"
from = "svc"
to = "wc"
length = 25
size = "3/4"

[[fixture]]
id = "WC"
kind = "water-closet-tank"
cold = "wc"
"""


def test_failing_building_writes_report_and_schedule_and_exits_1(tmp_path):
    out, sched = tmp_path / "clinic.html", tmp_path / "site.csv"
    r = run_report(str(FIXTURES / "clinic.toml"), "-o", str(out), "--schedule", str(sched))
    assert r.returncode == 1, r.stderr
    assert r.stderr == ""
    assert f"Wrote {out}" in r.stdout and "Verdict: fail." in r.stdout
    assert "qualified person" in r.stdout
    text = out.read_text(encoding="utf-8")
    assert "kp-riser" in text and "kp-verdict-fail" in text
    rows = list(csv.reader(sched.open(newline="", encoding="utf-8")))
    assert rows[0][0] == "arrestor"
    assert not list(tmp_path.glob(".*.tmp"))  # no temporary file left behind


def test_passing_building_exits_0(tmp_path):
    src = tmp_path / "cottage.toml"
    src.write_text(PASSING, encoding="utf-8")
    r = run_report(str(src), "-o", str(tmp_path / "r.html"), "--schedule",
                   str(tmp_path / "s.json"))
    assert r.returncode == 0, r.stdout + r.stderr
    assert "Verdict: pass." in r.stdout
    assert (tmp_path / "r.html").exists() and (tmp_path / "s.json").exists()


def test_example_runs(tmp_path):
    r = run_report("--example", "-o", str(tmp_path / "e.html"))
    assert r.returncode == 1, r.stderr
    assert "Maple Street" in (tmp_path / "e.html").read_text(encoding="utf-8")


def test_refuses_to_overwrite_the_building_file(tmp_path):
    src = tmp_path / "b.html"  # a building file with an unusual name
    shutil.copy(FIXTURES / "clinic.toml", src)
    before = src.read_bytes()
    r = run_report(str(src), "-o", str(src))
    assert r.returncode == 2
    assert "is the building file itself" in r.stderr
    assert "Traceback" not in r.stderr and r.stdout == ""
    assert src.read_bytes() == before
    csv_named = tmp_path / "b.csv"  # a building file named like a schedule
    shutil.copy(FIXTURES / "clinic.toml", csv_named)
    r = run_report(str(csv_named), "-o", str(tmp_path / "x.html"), "--schedule", str(csv_named))
    assert r.returncode == 2 and "is the building file itself" in r.stderr
    assert not (tmp_path / "x.html").exists()


def test_refuses_a_schedule_that_is_the_report_through_a_link(tmp_path):
    report = tmp_path / "r.html"
    report.write_text("old", encoding="utf-8")
    (tmp_path / "s.csv").symlink_to(report)
    r = run_report(str(FIXTURES / "clinic.toml"), "-o", str(report), "--schedule",
                   str(tmp_path / "s.csv"))
    assert r.returncode == 2 and "would overwrite the HTML report" in r.stderr
    assert report.read_text(encoding="utf-8") == "old"


def test_usage_errors_exit_2_with_a_message(tmp_path):
    src = str(FIXTURES / "clinic.toml")
    cases = [
        ((src,), "-o/--output: give the HTML file"),
        ((src, "-o", str(tmp_path / "r.pdf")), "expected a name ending in .html"),
        ((src, "-o", str(tmp_path / "r.html"), "--schedule", str(tmp_path / "s.xlsx")),
         "expected a name ending in .csv or .json"),
        (("-o", str(tmp_path / "r.html")), "give a building file or --example"),
        ((src, "-o", str(tmp_path / "nowhere" / "r.html")), "does not exist"),
    ]
    for args, message in cases:
        r = run_report(*args)
        assert r.returncode == 2, (args, r.stdout, r.stderr)
        assert message in r.stderr, (args, r.stderr)
        assert "Traceback" not in r.stderr
    assert not (tmp_path / "r.html").exists()


def test_bad_building_file_exits_2_and_writes_nothing(tmp_path):
    src = tmp_path / "bad.toml"
    src.write_text("[building]\nname = 'x'\n[[pipe]]\nid = 1\n", encoding="utf-8")
    r = run_report(str(src), "-o", str(tmp_path / "r.html"))
    assert r.returncode == 2
    assert "bad.toml" in r.stderr and "Traceback" not in r.stderr
    assert not (tmp_path / "r.html").exists()


def test_hostile_names_do_not_break_the_command(tmp_path):
    src = tmp_path / "h.toml"
    src.write_text(HOSTILE_BUILDING, encoding="utf-8")
    r = run_report(str(src), "-o", str(tmp_path / "h.html"), "--schedule", str(tmp_path / "h.csv"))
    assert r.returncode in (0, 1), r.stderr
    assert "<script>" not in (tmp_path / "h.html").read_text(encoding="utf-8")
