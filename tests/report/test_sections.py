"""The report's sections agree with the façades they come from (valuation, check, shock, plan)."""

from __future__ import annotations

import datetime as dt

import numpy as np
import pytest

from ladder.analysis.plan import plan_book
from ladder.report.allocation import RUNGS


def test_every_section_of_the_month_end_report_is_there(first_month):
    _, _, m = first_month
    assert [s.key for s in m.report.sections] == ["summary", "holdings", "activity", "allocation", "maturities",
                                                  "shock", "income", "certificate"]
    assert len(m.report.cautions) == 5


def test_sector_and_issuer_shares_are_the_checkers(first_month):
    _, book, m = first_month
    sectors = m.report.section("allocation").tables[0]
    for row in sectors.rows:
        rule = f"sectors.{row[0]}.max_pct"
        if row[4] is not None:
            assert row[3] * 100 == pytest.approx(m.check.rule(rule).actual, rel=1e-12, abs=0)
            assert row[5] == pytest.approx(row[4] - row[3], rel=1e-12, abs=0)
    assert sum(sectors.column("share")) == pytest.approx(1.0, rel=1e-12, abs=0)
    issuers = m.report.section("allocation").tables[1]
    agency = issuers.row("Federal Homestead Credit Bank")
    # the largest agency issuer is the one the agency issuer rule reports
    assert agency[9] == "sectors.agency.issuer_max_pct"
    assert agency[6] * 100 == pytest.approx(m.check.rule("sectors.agency.issuer_max_pct").actual, rel=1e-12, abs=0)
    ratings = m.report.section("allocation").tables[2]
    assert sum(ratings.column("count")) == len(book.holdings)
    assert ratings.row("A+")[5] == "review"                          # DEMO-MUN-0504, downgraded since purchase


def test_maturity_distribution_adds_up(first_month):
    _, book, m = first_month
    table = m.report.section("maturities").tables[0]
    assert table.column("rung") == list(RUNGS)
    assert sum(table.column("count")) == len(book.holdings)
    assert sum(table.column("market_value")) == pytest.approx(m.valuation.totals.market_value, rel=1e-12, abs=0)
    assert sum(table.column("needs")) == pytest.approx(book.cash_needs.amount.sum(), rel=1e-12, abs=0)
    assert table.rows[-1][8] == pytest.approx(sum(table.column("principal")) - book.cash_needs.amount.sum(),
                                              rel=1e-12, abs=0)


def test_shock_table_against_the_valuation_and_the_cash_plan(first_month):
    _, book, m = first_month
    table = m.report.section("shock").tables[0]
    assert table.column("shift_bp") == [-300, -200, -100, -50, -25, 0, 25, 50, 100, 200, 300]
    base = table.row(0.0)
    assert base[1] == pytest.approx(m.valuation.totals.market_value, rel=1e-12, abs=0)
    assert base[4] == pytest.approx(m.accounting.total("unrealized_gain"), rel=1e-9, abs=0)
    values = table.column("value")
    assert all(a > b for a, b in zip(values, values[1:]))           # value falls as rates rise
    plan = {s.scenario: s.income for s in plan_book(book).income_at_risk}
    assert base[5] == plan["base"] and table.row(100.0)[5] == plan["+100 bp"]
    assert "Hull-White" in " ".join(m.report.section("shock").notes)


def test_income_projection_first_month_agrees_with_the_cash_plan(first_month):
    """Before anything is reinvested (the plan reinvests at each period's end) the two incomes of the
    first month are the same effective-interest figures."""
    _, _, m = first_month
    first = m.report.section("income").tables[0].rows[0]
    assert first[0] == "2026-12" and first[1] == pytest.approx(first[2], rel=1e-12, abs=0)


def test_certificate_names_the_policy_the_exceptions_and_the_liquidity(first_month):
    _, book, m = first_month
    cert = m.report.section("certificate")
    notes = " ".join(cert.notes)
    assert "version 2026.2" in notes and "adopted 2026-06-24" in notes
    rules, exceptions, liquidity, findings = cert.tables
    assert len(rules.rows) == len(m.check.rules)
    assert {r[0] for r in exceptions.rows} == {r.rule for r in m.check.rules if r.status != "pass"}
    mun = exceptions.row("sectors.municipal.min_long_rating")
    assert "DEMO-MUN-0504" in mun[3] and "downgraded" in mun[3] and "cure by 2026-12-30" in mun[3]
    # the demo policy's cash-needs horizon is 12 months; the statement covers all of it, so it reaches
    # the 2027-09 debt repayment the cash plan and the checker's rule read from the same coverage
    assert len(liquidity.rows) == 12 and "12 months" in notes
    assert {r[4] for r in liquidity.rows} == {"covered"}
    assert findings.row("sectors.municipal.min_long_rating")[3:6] == (dt.date(2026, 11, 30), dt.date(2026, 12, 30), 0)
    funds = m.valuation.market_value[book.holdings.kind == "fund"].sum()
    first = liquidity.rows[0]
    assert first[3] == pytest.approx(funds + first[1] - first[2], rel=1e-12, abs=0)
    assert "SHA-256" in notes and cert.signatures and all("signature" in s for s in cert.signatures)
    assert np.all([r[6] for r in rules.rows])                        # every rule has its timing
