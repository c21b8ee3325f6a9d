"""``ladder plan`` end to end (a subprocess, as a user runs it) on a copy of the demo book.

Source: issue 5's contract: ``ladder plan BOOK [--at DATE] [--months N] [--scenario NAME | --bp X]
[--reinvest RULE] [--format table|json|csv]``, the json document {"as_of", "scenario", "periods":
[{"start", "end", "opening_cash", "coupons", "principal", "needs", "reinvested", "closing_cash",
"shortfall"}], "income_12m", "total_return_12m_pct"}, and bad input refused with clear messages
(exit status 2, every problem on stderr, no traceback).
"""

from ladder.demo import demo_source, write_demo
import csv
import io
import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
DEMO = demo_source()
PERIOD_FIELDS = ("start", "end", "opening_cash", "coupons", "principal", "needs", "reinvested", "closing_cash",
                 "shortfall")


@pytest.fixture(scope="module")
def book(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("cli") / "tessaline"
    write_demo(folder)
    return folder


def ladder(*args) -> subprocess.CompletedProcess:
    env = {k: v for k, v in os.environ.items() if k != "COLUMNS"}
    env["COLUMNS"] = "200"
    return subprocess.run([sys.executable, "-m", "ladder.cli", "plan", *map(str, args)], capture_output=True,
                          text=True, cwd=ROOT, timeout=300, env=env)


def test_json(book):
    run = ladder(book, "--format", "json", "--months", "18", "--bp", "100")
    assert run.returncode == 0, run.stderr
    doc = json.loads(run.stdout)
    assert doc["as_of"] == "2026-11-30" and doc["scenario"] == "+100 bp"
    assert len(doc["periods"]) == 18 and all(set(PERIOD_FIELDS) <= set(p) for p in doc["periods"])
    assert doc["periods"][0]["start"] == "2026-12-01" and doc["periods"][-1]["end"] == "2028-05-31"
    assert doc["income_12m"]["+100 bp"] > doc["income_12m"]["base"]
    assert set(doc["income_12m"]) == set(doc["total_return_12m_pct"])
    for p in doc["periods"]:
        inflow = p["opening_cash"] + p["fund_income"] + p["coupons"] + p["principal"] + p["sales"]
        assert inflow - p["needs"] - p["reinvested"] == pytest.approx(p["closing_cash"], abs=0.05, rel=0)


def test_table_shows_the_plan_meets_september(book):
    run = ladder(book)
    assert run.returncode == 0, run.stderr
    assert "(match_needs)" in run.stdout
    assert "No shortfall: cash and maturities meet every need without a sale." in run.stdout
    assert "DEMO-AGY-0322 on 2027-09-10" in run.stdout
    assert "Traceback" not in run.stderr


def test_an_old_rule_shows_its_shortfall_sales_and_policy_crossings(book):
    run = ladder(book, "--reinvest", "longest_rung", "--bp", "100")
    assert run.returncode == 0, run.stderr
    assert "First shortfall: 2027-10-01 to 2027-10-31" in run.stdout and "Realized gain" in run.stdout
    assert "crosses" in run.stdout and "portfolio.max_wam_days" in run.stdout


def test_csv_and_rules(book):
    run = ladder(book, "--format", "csv", "--reinvest", "target_tenor", "--tenor", "6M", "--period", "quarter")
    assert run.returncode == 0, run.stderr
    rows = list(csv.DictReader(io.StringIO(run.stdout)))
    assert len(rows) == 9 and set(PERIOD_FIELDS) <= set(rows[0])
    assert float(rows[0]["reinvested"]) > 0
    fund = ladder(book, "--format", "json", "--reinvest", "fund", "--scenario", "recession-rally", "--months", "12")
    doc = json.loads(fund.stdout)
    assert doc["scenario"] == "recession-rally" and doc["first_shortfall"] is None
    assert all(p["reinvested"] == 0 for p in doc["periods"])


@pytest.mark.parametrize("args, messages", [
    (("--months", "0"), ["--months:0:0: the horizon must be 1 to 120 months, not 0"]),
    (("--months", "-3", "--scenario", "sideways"), ["--months:0:0:", "--scenario:0:0: unknown scenario 'sideways'"]),
    (("--reinvest", "target_tenor", "--tenor", "7Y"), ["--tenor:0:0: reinvestment tenor 7Y is beyond the policy's "
                                                       "maximum maturity"]),
    (("--bp", "5000"), ["--bp:0:0: 5000 bp is beyond +/-1000 bp"]),
    (("--buffer", "1e12"), ["--buffer:0:0: the minimum cash buffer 1,000,000,000,000 is more than the whole book"]),
    (("--sector", "fund"), ["--sector:0:0: 'fund' is not a sector to buy"]),
])
def test_bad_input(book, args, messages):
    run = ladder(book, *args)
    assert run.returncode == 2
    for message in messages:
        assert message in run.stderr
    assert "refused" in run.stderr and "Traceback" not in run.stderr and run.stdout == ""


def test_an_unknown_reinvestment_rule_is_an_option_error(book):
    run = ladder(book, "--reinvest", "shortest_rung")
    assert run.returncode == 2 and "invalid choice: 'shortest_rung'" in run.stderr and run.stdout == ""


def test_needs_before_the_valuation_date_are_filed_as_past(book, tmp_path):
    # issue 14: a rolled book keeps its past cash-needs rows; they are past, not an error
    folder = tmp_path / "early"
    shutil.copytree(book, folder)
    with (folder / "cash_needs.csv").open("a", encoding="utf-8") as f:
        f.write("2026-11-02,1000000,late invoice\n")
    run = ladder(folder)
    assert run.returncode == 0, run.stderr
