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


def _september(pr) -> int:
    return int(np.flatnonzero(pr.periods.start == np.datetime64("2027-09-01"))[0])


def test_september_2027_is_met_by_maturities_the_plan_placed(plan):
    pr = plan.projection
    sep = _september(pr)
    assert pr.needs[sep] == pytest.approx(40.0e6 + 6.5e6 + 3.0e6 + 5.8e6 - 8.0e6, rel=1e-12, abs=0)
    assert pr.called[sep] == pytest.approx(5.0e6, rel=1e-12, abs=0)
    assert any(c.id == "DEMO-AGY-0322" and str(c.date) == "2027-09-10" for c in plan.calls)
    assert plan.reinvestment.rule == "match_needs"
    # the book's own principal that month is 3.0 million due plus the 5.0 million call; the rest of
    # what arrives in September was bought by the plan to mature by then
    bought_for_sep = (pr.menu.maturity > pr.periods.boundaries[sep]) & (pr.menu.maturity <= pr.periods.end[sep])
    assert (pr.bought * bought_for_sep).sum() > 20e6
    assert plan.first_shortfall is None and not pr.sale_list
    assert plan.coverage.status[sep] == "covered"
    assert plan.crossings == ()


@pytest.mark.parametrize("bp", [100.0, -100.0])
def test_match_needs_sells_nothing_and_keeps_the_policy_under_100bp(demo, bp):
    plan = plan_book(demo, bp=bp, with_income=False)
    assert not plan.projection.sale_list and plan.crossings == ()


@pytest.mark.parametrize("bp", [200.0, -200.0, 300.0, -300.0])
def test_match_needs_sells_no_more_than_the_best_old_rule(demo, bp):
    def sold(rule):
        return plan_book(demo, bp=bp, options=PlanOptions(rule=rule), with_income=False).projection.sales.sum()
    assert sold("match_needs") <= min(sold(rule) for rule in ("longest_rung", "target_tenor", "fund"))


def test_sales_restore_the_cash_kept_and_skip_bank_deposits(demo):
    """The old longest_rung rule under +100 bp runs short in September 2027 and sells."""
    plan = plan_book(demo, bp=100.0, options=PlanOptions(rule="longest_rung"), with_income=False)
    pr = plan.projection
    first = plan.first_shortfall
    assert first is not None and pr.sale_list
    assert pr.closing_cash[first] >= pr.floor[first] - 1e-6            # back to the cash kept, not to zero
    held = {hid: i for i, hid in enumerate(plan.holdings.id)}
    for sale in pr.sale_list:
        if sale.id in held:
            assert plan.holdings.sector[held[sale.id]] not in ("cd", "deposit")
    # ranked by realized loss per unit of cash raised (the last sale of a period may be partial)
    in_first = [s for s in pr.sale_list if s.period == first]
    loss_per_cash = [-s.realized_gain / s.proceeds for s in in_first]
    assert loss_per_cash == sorted(loss_per_cash)


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
    assert doc["first_shortfall"] is None and doc["sales_needed"] == [] and doc["all_sales"] == []
    assert doc["policy_crossings"] == [] and doc["reinvestment"]["rule"] == "match_needs"
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
