"""The plan of the demo book (demo_portfolios/tessaline, invented data): its tight September 2027,
the shortfall and the sales, and the income-at-risk table.

The demo's README works the month out: September 2027 needs 47.3 million net (senior notes 40.0,
estimated tax 6.5, dividend 3.0, payroll 5.8, less 8.0 of receipts) against 3.0 million of principal
due that month plus 5.0 million if DEMO-AGY-0322 is called on its one call date, 10 September 2027.
"""

from __future__ import annotations

from ladder.demo import demo_source, write_demo

import json

import numpy as np
import pytest

from ladder.analysis.plan import PlanOptions, plan_book, plan_document
from ladder.folder.book_file import load_book
from ladder.risk.scenarios import DEFAULT_PARALLEL_BP
from plan_books import POLICY

DEMO = demo_source()


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    folder = tmp_path_factory.mktemp("demo") / "tessaline"
    write_demo(folder)
    if not (folder / "policy.toml").exists():        # the demo's own policy, once written, is used as is
        (folder / "policy.toml").write_text(POLICY, encoding="utf-8")
    return load_book(folder)


@pytest.fixture(scope="module")
def plan(demo):
    return plan_book(demo)


def test_september_2027_is_the_tight_month(plan):
    pr = plan.projection
    sep = int(np.flatnonzero(pr.periods.start == np.datetime64("2027-09-01"))[0])
    assert pr.needs[sep] == pytest.approx(40.0e6 + 6.5e6 + 3.0e6 + 5.8e6 - 8.0e6, rel=1e-12, abs=0)
    assert pr.called[sep] == pytest.approx(5.0e6, rel=1e-12, abs=0)
    assert any(c.id == "DEMO-AGY-0322" and str(c.date) == "2027-09-10" for c in plan.calls)
    assert pr.tightest == sep
    # the default rule (longest rung, 10 million buffer) keeps 10 million in cash: September is short by
    # 47.3 - 10 - 8.0 - its coupons and fund income, the plan's first shortfall
    assert plan.first_shortfall == sep
    assert pr.opening_cash[sep] == pytest.approx(10e6, rel=1e-12, abs=0)
    gap = 47.3e6 - 10e6 - pr.principal[sep] - pr.coupons[sep] - pr.fund_income[sep]
    assert pr.shortfall[sep] == pytest.approx(gap, rel=1e-12, abs=0)
    sales = [s for s in pr.sale_list if s.period == sep]
    assert sum(s.proceeds for s in sales) >= pr.shortfall[sep]
    maturity = [plan.holdings.maturity[s.row] for s in sales]
    assert maturity == sorted(maturity)                 # shortest first
    held_after = pr.periods.end[sep]
    shortest = plan.holdings.maturity[plan.holdings.maturity > held_after].min()
    assert maturity[0] == shortest


def test_the_fund_rule_meets_september_without_a_sale(demo):
    pr = plan_book(demo, options=PlanOptions(rule="fund"), with_income=False).projection
    assert pr.first_shortfall is None
    assert str(pr.periods.start[pr.tightest]) == "2027-09-01"


def test_cash_is_conserved(plan):
    pr = plan.projection
    assert np.allclose(pr.opening_cash + pr.fund_income + pr.coupons + pr.principal + pr.sales - pr.needs
                       - pr.reinvested, pr.closing_cash, atol=1e-6, rtol=0)


def test_income_at_risk(plan):
    names = [x.scenario for x in plan.income_at_risk]
    assert names[0] == "base"
    parallel = {f"{bp:+g} bp": bp for bp in DEFAULT_PARALLEL_BP if bp}
    assert set(parallel) <= set(names) and {"bear-flattener", "recession-rally", "inflation-scare"} <= set(names)
    by_name = {x.scenario: x for x in plan.income_at_risk}
    ordered = [by_name["base"] if bp == 0 else by_name[f"{bp:+g} bp"] for bp in DEFAULT_PARALLEL_BP]
    income = [x.income for x in ordered]
    total = [x.horizon.return_pct for x in ordered]
    # the ladder reinvests and its funds float: income rises with rates, total return falls (duration)
    assert all(np.diff(income) > 0) and all(np.diff(total) < 0)
    for x in plan.income_at_risk:
        assert x.horizon.gain == pytest.approx(x.income + x.horizon.price_change, rel=1e-12, abs=0)


def test_json_document(plan):
    doc = json.loads(json.dumps(plan_document(plan), allow_nan=False))
    assert doc["as_of"] == "2026-11-30" and doc["scenario"] == "base"
    assert len(doc["periods"]) == 24
    assert {"start", "end", "opening_cash", "coupons", "principal", "needs", "reinvested", "closing_cash",
            "shortfall"} <= set(doc["periods"][0])
    assert doc["first_shortfall"]["start"] == "2027-09-01"
    assert doc["sales_needed"] and all(s["period_end"] == "2027-09-30" for s in doc["sales_needed"])
    assert doc["income_12m"]["base"] > 0 and set(doc["income_12m"]) == set(doc["total_return_12m_pct"])


def test_weekly_and_quarterly(demo):
    monthly = plan_book(demo, options=PlanOptions(rule="fund"), with_income=False).projection
    quarterly = plan_book(demo, options=PlanOptions(rule="fund", period="quarter"), with_income=False).projection
    weekly = plan_book(demo, options=PlanOptions(rule="fund", period="week"), with_income=False).projection
    assert len(quarterly.periods) == 9 and len(weekly.periods) == 105
    for other in (quarterly, weekly):
        assert other.needs.sum() == pytest.approx(monthly.needs.sum(), rel=1e-12, abs=0)
        assert other.principal.sum() == pytest.approx(monthly.principal.sum(), rel=1e-12, abs=0)
        assert other.coupons.sum() == pytest.approx(monthly.coupons.sum(), rel=1e-12, abs=0)
