"""Laws of the projection (hypothesis): every currency unit is accounted for, in every period, whatever
the needs, rule, buffer, scenario and period length."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from ladder.analysis.plan import PlanOptions, plan_book
from ladder.book.cash_needs import CashNeeds
from plan_books import fund, write_book

HOLDINGS = [
    fund(2_000_000),
    {"id": "BILL", "sector": "treasury", "kind": "discount", "face": 1_500_000, "maturity_date": "2027-02-25",
     "discount_rate_pct": 3.8, "book_price": 98.9, "purchase_date": "2026-08-27"},
    {"id": "N27", "sector": "treasury", "face": 2_000_000, "maturity_date": "2027-08-15", "coupon_pct": 4.25,
     "issue_date": "2024-08-15", "price": 100.2, "book_price": 99.1, "purchase_date": "2024-09-03"},
    {"id": "AG", "sector": "agency", "face": 1_000_000, "maturity_date": "2029-06-12", "coupon_pct": 4.6,
     "issue_date": "2025-06-12", "price": 100.4, "book_price": 100.9, "purchase_date": "2025-06-12",
     "first_call_date": "2027-06-12", "call_frequency": 4, "call_price": 100},
    {"id": "CD", "sector": "cd", "face": 1_000_000, "maturity_date": "2027-05-03", "coupon_pct": 3.9,
     "issue_date": "2026-11-02", "yield_pct": 3.95, "book_price": 100, "purchase_date": "2026-11-02"},
]


@pytest.fixture(scope="module")
def book(tmp_path_factory):
    return write_book(tmp_path_factory.mktemp("prop") / "b", "2026-12-31", HOLDINGS,
                      reinvest='rule = "longest_rung"\nmin_cash_buffer = 250000',
                      spreads='treasury = { default = 0 }\nagency = { default = 12 }')


needs = st.lists(st.tuples(st.integers(1, 540), st.floats(-2e6, 4e6, allow_nan=False)), max_size=12)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(needs=needs, rule=st.sampled_from(["match_needs", "longest_rung", "target_tenor", "fund"]),
       tenor=st.sampled_from(["1M", "3M", "1Y", "2Y"]), buffer=st.sampled_from([0.0, 100_000.0, 3e6]),
       bp=st.sampled_from([-200.0, 0.0, 150.0]), period=st.sampled_from(["month", "week", "quarter"]),
       rates=st.sampled_from(["stay", "forward"]))
def test_every_unit_is_accounted_for(book, needs, rule, tenor, buffer, bp, period, rates):
    dates = np.datetime64("2026-12-31") + np.array([d for d, _ in needs], dtype=np.int64)
    cash_needs = CashNeeds(dates.astype("datetime64[D]"), np.array([a for _, a in needs], dtype=float),
                           np.array(["x"] * len(needs), dtype=object), np.arange(len(needs), dtype=np.int64) + 2)
    plan = plan_book(replace(book, cash_needs=cash_needs), bp=bp, with_income=False,
                     options=PlanOptions(months=18, period=period, rule=rule, buffer=buffer, rates=rates,
                                         tenor=tenor if rule == "target_tenor" else None))
    pr = plan.projection
    inflow = pr.fund_income + pr.coupons + pr.principal + pr.sales
    assert np.allclose(pr.opening_cash + inflow - pr.needs - pr.reinvested, pr.closing_cash, rtol=0, atol=1e-6)
    assert np.allclose(pr.closing_cash[:-1], pr.opening_cash[1:], rtol=0, atol=0)
    assert pr.opening_cash[0] == 2_000_000
    horizon = pr.periods.end[-1]
    assert pr.needs.sum() == pytest.approx(sum(a for d, a in zip(dates, cash_needs.amount) if d <= horizon),
                                           rel=1e-12, abs=0)
    assert (pr.reinvested >= 0).all() and (pr.shortfall >= 0).all() and (pr.sales >= 0).all()
    # sales happen only to cover a shortfall, cover it (or everything is sold), and never exceed what is held
    assert ((pr.sales > 0) <= (pr.shortfall > 0)).all()
    assert (pr.sales + 1e-6 >= pr.shortfall - pr.unfunded).all()
    assert (pr.face_left >= -1e-9).all() and (pr.lot_path >= -1e-6).all()
    row = {hid: i for i, hid in enumerate(plan.holdings.id)}
    sold = np.zeros(len(plan.holdings))
    np.add.at(sold, [row[s.id] for s in pr.sale_list if s.id in row], [s.face for s in pr.sale_list if s.id in row])
    assert np.allclose(sold + pr.face_left, plan.holdings.face, rtol=1e-12, atol=0)
    # a CD is held to maturity (not negotiable unless the holdings file says so)
    assert "CD" not in {s.id for s in pr.sale_list}
    # a shortfall's sales restore the cash kept, as far as there is anything to sell
    short = pr.shortfall > 0
    assert (pr.closing_cash[short] + 1e-6 >= np.minimum(pr.floor[short], pr.available[short] + pr.sales[short])).all()
    # what is above the cash kept is bought by the single-tenor rules; nothing is bought below the buffer
    if rule == "fund":
        assert not pr.reinvested.any()
    elif rule == "match_needs":
        bought = pr.reinvested > 0
        assert (pr.closing_cash[bought] >= buffer - 1e-6).all()
    else:
        assert np.allclose(np.minimum(pr.closing_cash, pr.floor), np.minimum(pr.available + pr.sales, pr.floor),
                           atol=1e-6, rtol=0)
        assert (pr.closing_cash <= pr.floor + 1e-6).all()
