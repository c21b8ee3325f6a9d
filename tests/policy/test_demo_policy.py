"""The demo book against its policy: at least one `near`, the downgrade since purchase under review,
and no breach (the promise of the demo README and of issue 4)."""

from __future__ import annotations

import pytest

from ladder.analysis.valuation import value_book
from ladder.folder.book_file import load_book
from ladder.demo import demo_source
from ladder.policy.checker import check
from ladder.policy.measures import PositionMeasures, cash_by_month


@pytest.fixture(scope="module")
def result():
    book = load_book(demo_source())
    v = value_book(book)
    months = book.policy.portfolio.cash_needs_horizon_months
    m = PositionMeasures(v.holdings, v.as_of, v.market_value, v.book_value, v.effective_duration,
                         v.days_to_maturity, cash_by_month(v.pricer.cash_flows, v.holdings.face, v.as_of, months))
    return check(book.policy, m, book.cash_needs)


def test_demo_has_no_breach_and_at_least_one_near(result):
    counts = result.counts()
    assert counts["breach"] == 0
    assert counts["near"] >= 1
    assert result.status == "review"


def test_demo_near_is_weekly_liquidity(result):
    r = result.rule("portfolio.liquidity[0].min_pct")
    # funds 30m + sweep 6m available within 7 days, about 10.8% of ~334m market value, floor 10%
    assert r.status == "near" and 10.0 < r.actual < 11.0


def test_demo_downgraded_municipal_is_under_review(result):
    r = result.rule("sectors.municipal.min_long_rating")
    assert (r.status, r.holdings, r.actual, r.limit) == ("review", ("DEMO-MUN-0504",), "A+", "AA-")
    assert r.cure_by is not None and (r.cure_by - result.as_of).days == 30
