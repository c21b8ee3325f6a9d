"""``ladder check`` through ``ladder.cli.main`` on a copy of the demo book: exit status 1 on a breach,
and ``--at`` as the settlement date.

Sources: the command's contract (``ladder check --help``: "Exit status 1 on any breach"; ``--at`` is the
settlement date, default the book's valuation date; a holding maturing by then is refused, exit 2); the
demo's policy.toml and holdings.csv for the figures, read here with the csv module.
"""

import csv
import datetime as dt
import json

import pytest

from ladder.demo import write_demo as copy_demo
from ladder.cli import main

AGENCY_TERM = "max_pct = 40                  # board choice; Cal. Gov. Code 53601 sets no percentage for agencies\n" \
              "max_maturity_years = 5"


@pytest.fixture
def book(tmp_path):
    return copy_demo(tmp_path / "tessaline")


def run(capsys, *args) -> tuple[int, str, str]:
    status = main([str(a) for a in args])
    out = capsys.readouterr()
    return status, out.out, out.err


def rules(document: str) -> dict:
    return {r["rule"]: r for r in json.loads(document)["rules"]}


def latest_maturity(book, sector) -> dt.date:
    with open(book / "holdings.csv", newline="", encoding="utf-8") as f:
        return max(dt.date.fromisoformat(r["maturity_date"]) for r in csv.DictReader(f) if r["sector"] == sector)


def test_the_demo_has_a_review_but_no_breach_and_exits_0(book, capsys):
    status, out, _ = run(capsys, "check", book, "--format", "json")
    assert status == 0
    assert json.loads(out)["status"] == "review"
    # the demo's one finding: DEMO-MUN-0504 rated A+ against the municipal AA- floor (policy.toml)
    review = [r for r in rules(out).values() if r["status"] == "review"]
    assert [(r["rule"], r["holdings"], r["actual"], r["limit"]) for r in review] == [
        ("sectors.municipal.min_long_rating", ["DEMO-MUN-0504"], "A+", "AA-")]


def test_a_breach_exits_1_and_names_the_rule_and_holdings_in_both_formats(book, capsys):
    # docs/policy.md: a maximum maturity is a breach in either testing mode; the demo's agency cap is 5 years
    policy = book / "policy.toml"
    text = policy.read_text(encoding="utf-8")
    assert AGENCY_TERM in text
    policy.write_text(text.replace(AGENCY_TERM, AGENCY_TERM.replace("= 5", "= 4")), encoding="utf-8")
    limit = dt.date(2030, 11, 30)                        # four years after the valuation date
    with open(book / "holdings.csv", newline="", encoding="utf-8") as f:
        over = sorted(r["id"] for r in csv.DictReader(f)
                      if r["sector"] == "agency" and dt.date.fromisoformat(r["maturity_date"]) > limit)
    assert over                                          # the demo holds agencies beyond four years

    status, out, _ = run(capsys, "check", book, "--format", "json")
    assert status == 1
    doc = json.loads(out)
    rule = rules(out)["sectors.agency.max_maturity_years"]
    assert doc["status"] == "breach"
    assert [r["rule"] for r in doc["rules"] if r["status"] == "breach"] == ["sectors.agency.max_maturity_years"]
    assert (rule["limit"], sorted(rule["holdings"])) == (4, over)
    assert 4 < rule["actual"] < 5 and rule["headroom"] == pytest.approx(4 - rule["actual"], rel=1e-12, abs=0)

    status, table, _ = run(capsys, "check", book)
    assert status == 1
    assert "Overall: breach" in table


def test_at_moves_the_check_date(book, capsys):
    later = dt.date(2026, 12, 7)             # before the first maturity (DEMO-CP-0701, 2026-12-08)
    status, out, _ = run(capsys, "check", book, "--at", later, "--format", "json")
    assert status == 0
    assert json.loads(out)["as_of"] == "2026-12-07"
    moved = rules(out)
    # days from the check date to the sector's latest maturity, counted from holdings.csv
    for sector in ("commercial_paper", "deposit"):
        days = (latest_maturity(book, sector) - later).days
        assert moved[f"sectors.{sector}.max_maturity_days"]["actual"] == days
    _, base, _ = run(capsys, "check", book, "--format", "json")
    assert json.loads(base)["as_of"] == "2026-11-30"       # book.toml's valuation_date
    for sector in ("commercial_paper", "deposit"):
        rule = f"sectors.{sector}.max_maturity_days"
        assert rules(base)[rule]["actual"] - moved[rule]["actual"] == 7


def test_at_after_a_maturity_is_refused_with_the_holdings_named(book, capsys):
    status, out, err = run(capsys, "check", book, "--at", "2026-12-31")
    assert status == 2 and out == ""
    for holding, maturity in (("DEMO-TSY-0101", "2026-12-17"), ("DEMO-CP-0701", "2026-12-08"),
                              ("DEMO-CP-0702", "2026-12-22"), ("DEMO-CD-0801", "2026-12-15")):
        assert f"holding {holding} matures on {maturity}, on or before the settlement date 2026-12-31" in err
    assert "nothing was computed or written" in err
