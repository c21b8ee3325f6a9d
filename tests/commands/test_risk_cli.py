"""``ladder risk`` end to end (a subprocess, as a user runs it) on a copy of the demo book.

Source: issue 17's contract: ``ladder risk BOOK [--paths N] [--seed S] [--months M] [--format
table|json|csv]``; the json holds ``paths``, ``seed``, ``months`` and ``rules`` (rule,
forced_sale_probability, income_12m {mean, p05, p95, at_risk}, realized_loss {mean, p95},
horizon_value {mean, p05, p95}, first_risky_month); bad input exits 2 with a clear message.
"""

import csv
import io
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from ladder import CAUTION
from ladder.demo import write_demo

ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture(scope="module")
def book(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("cli") / "tessaline"
    write_demo(folder)
    return folder


def ladder(*args) -> subprocess.CompletedProcess:
    env = {k: v for k, v in os.environ.items() if k != "COLUMNS"}
    env["COLUMNS"] = "250"
    return subprocess.run([sys.executable, "-m", "ladder.cli", "risk", *map(str, args)], capture_output=True,
                          text=True, cwd=ROOT, timeout=600, env=env)


def test_json(book):
    run = ladder(book, "--paths", "100", "--seed", "3", "--months", "3", "--format", "json")
    assert run.returncode == 0, run.stderr
    doc = json.loads(run.stdout)
    assert (doc["paths"], doc["seed"], doc["months"]) == (100, 3, 3)
    assert {r["rule"] for r in doc["rules"]} == {"match_needs", "longest_rung", "target_tenor", "fund"}
    for r in doc["rules"]:
        assert set(r) >= {"rule", "forced_sale_probability", "income_12m", "realized_loss", "horizon_value",
                          "first_risky_month"}
        assert set(r["income_12m"]) == {"mean", "p05", "p95", "at_risk"}


def test_table_and_csv(book):
    run = ladder(book, "--paths", "100", "--months", "2", "--reinvest", "fund")
    assert run.returncode == 0, run.stderr
    assert "Income at risk" in run.stdout and "fund" in run.stdout and "Shortfall chance" in run.stdout
    assert " ".join(CAUTION.split()[:4]) in " ".join(run.stdout.split())
    run = ladder(book, "--paths", "100", "--months", "2", "--reinvest", "fund", "--format", "csv")
    rows = list(csv.DictReader(io.StringIO(run.stdout)))
    assert [r["rule"] for r in rows] == ["fund"] and "income_12m_at_risk" in rows[0]


@pytest.mark.parametrize("args, message", [
    (("--paths", "99"), "--paths"),
    (("--paths", "1000001"), "--paths"),
    (("--months", "36"), "beyond the cash-needs forecast"),
])
def test_bad_input(book, args, message):
    run = ladder(book, *args)
    assert run.returncode == 2 and message in run.stderr and "Traceback" not in run.stderr
