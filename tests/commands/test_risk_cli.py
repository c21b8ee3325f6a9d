"""``ladder risk`` end to end (in-process, through ``ladder.cli.main``) on a copy of the demo book.

Source: issue 17's contract: ``ladder risk BOOK [--paths N] [--seed S] [--months M] [--format
table|json|csv]``; the json holds ``paths``, ``seed``, ``months`` and ``rules`` (rule,
forced_sale_probability, income_12m {mean, p05, p95, at_risk}, realized_loss {mean, p95},
horizon_value {mean, p05, p95}, first_risky_month); bad input exits 2 with a clear message.
"""

import csv
import io
import json
from pathlib import Path

import pytest
from cli_books import run

from ladder import CAUTION
from ladder.demo import write_demo


@pytest.fixture(scope="module")
def book(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("cli") / "tessaline"
    write_demo(folder)
    return folder


def test_json(book, capsys):
    code, out, err = run(capsys, "risk", book, "--paths", "100", "--seed", "3", "--months", "3", "--format", "json")
    assert code == 0, err
    doc = json.loads(out)
    assert (doc["paths"], doc["seed"], doc["months"]) == (100, 3, 3)
    assert {r["rule"] for r in doc["rules"]} == {"match_needs", "longest_rung", "target_tenor", "fund"}
    for r in doc["rules"]:
        assert set(r) >= {"rule", "forced_sale_probability", "income_12m", "realized_loss", "horizon_value",
                          "first_risky_month"}
        assert set(r["income_12m"]) == {"mean", "p05", "p95", "at_risk"}


def test_table_and_csv(book, capsys):
    code, out, err = run(capsys, "risk", book, "--paths", "100", "--months", "2", "--reinvest", "fund")
    assert code == 0, err
    assert "Income at risk" in out and "fund" in out and "Shortfall chance" in out
    assert " ".join(CAUTION.split()[:4]) in " ".join(out.split())
    code, out, err = run(capsys, "risk", book, "--paths", "100", "--months", "2", "--reinvest", "fund", "--format", "csv")
    rows = list(csv.DictReader(io.StringIO(out)))
    assert [r["rule"] for r in rows] == ["fund"] and "income_12m_at_risk" in rows[0]


@pytest.mark.parametrize("args, message", [
    (("--paths", "99"), "--paths"),
    (("--paths", "1000001"), "--paths"),
    (("--months", "36"), "beyond the cash-needs forecast"),
])
def test_bad_input(book, capsys, args, message):
    code, out, err = run(capsys, "risk", book, *args)
    assert code == 2 and message in err and "Traceback" not in err
