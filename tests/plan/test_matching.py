"""The match_needs program on a book small enough to solve by hand, and the pull to par of a sale
price against QuantLib.

Book (valuation Thursday 31 Dec 2026, flat continuously compounded zero curve r = 4%, treasury
spread 0, a policy with a 5-year maximum maturity and nothing else, no buffer):
- FUND 3,000,000 at a stated 3.65% on ACT/365F (0.0001 a day);
- A: corporate 4% semiannual (31 Mar / 30 Sep) 1,000,000 due 31 Mar 2027;
- B: corporate 5% semiannual (30 Jun / 31 Dec) 2,000,000 due 30 Jun 2028 (its longest rung is
  12-24M, so the long end bought is a 2Y note).
Cash needs: 2,500,000 on 15 Feb 2027.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
import QuantLib as ql

from ladder.analysis.plan import PlanOptions, plan_book
from ladder.book.holdings import make_holdings
from ladder.plan.prices import later_values
from ladder.plan.rates import RatePath
from ladder.pricing.cashflows import cash_flows
from ladder.pricing.curve import bootstrap
from plan_books import TENORS, flat_par_yields, fund, write_book

A = {"id": "A", "sector": "corporate", "face": 1_000_000, "maturity_date": "2027-03-31", "coupon_pct": 4,
     "issue_date": "2025-03-31", "rating": "AA", "price": 100, "book_price": 100, "purchase_date": "2025-03-31"}
B = {"id": "B", "sector": "corporate", "face": 2_000_000, "maturity_date": "2028-06-30", "coupon_pct": 5,
     "issue_date": "2025-06-30", "rating": "AA", "price": 100, "book_price": 100, "purchase_date": "2025-06-30"}


def test_three_holding_book_buys_the_bill_that_meets_february_and_lengthens_the_rest(tmp_path):
    book = write_book(tmp_path / "m", "2026-12-31", [fund(3_000_000), A, B], [("2027-02-15", 2_500_000, "tax")],
                      reinvest='rule = "match_needs"\nmin_cash_buffer = 0', spreads="treasury = { default = 0 }")
    plan = plan_book(book, options=PlanOptions(months=6), with_income=False)
    pr = plan.projection
    assert list(pr.menu.months) == [1, 3, 6, 9, 12, 24]
    # January: no flows; the fund earns 3,000,000 x 0.0001 x 31 = 9,300, so at 31 Jan C = 3,009,300.
    cash = 3_000_000 * (1 + 0.0001 * 31)
    assert pr.available[0] == pytest.approx(cash, abs=1e-6)
    # The 1M bill bought Sun 31 Jan is repaid Fri 26 Feb (28 Feb is a Sunday and 1 Mar the next month:
    # Modified Following), tau = 26/365; on the flat curve it repays x e^{r tau} (ladder.plan.rates).
    # Only it repays by the end of February. The program first covers February:
    #   C - x_1M - x_2Y + x_1M e^{r tau} - 2,500,000 >= 0,
    # then puts every unit no need claims in the long end (2Y): maximizing x_2Y with x_1M + x_2Y <= C gives
    #   x_1M = 2,500,000 e^{-r tau},  x_2Y = C - x_1M,
    # and nothing else (March brings A's 1,020,000 and later months need nothing). Every period keeps
    # COVER_MARGIN = 1 currency unit to spare, this one too: the unit stays in cash, and February's
    # row is 1 + x_1M e^{r tau} - 2,500,000 >= 1, so x_1M = 2,500,000 e^{-r tau}, x_2Y = C - 1 - x_1M.
    x_1m = 2_500_000 * math.exp(-0.04 * 26 / 365)
    expected = np.zeros(6)
    expected[0], expected[5] = x_1m, cash - 1 - x_1m
    assert np.allclose(pr.bought[:, 0], expected, rtol=0, atol=0.5)   # HiGHS tolerances: under a unit
    # February: the bill repays the need and the unit kept, no sale
    assert pr.closing_cash[1] == pytest.approx(1.0, abs=0.5)
    assert not pr.sale_list and plan.crossings == ()


def test_sale_price_pulls_to_par_as_quantlib_prices_it():
    """A 4.5% 30/360 semiannual note due 15 Nov 2029, priced on 15 Aug 2027 from the flat continuous
    curve r = 4% (spread 0): QuantLib's clean price at that date and that yield (Actual/365F,
    continuous), unadjusted coupon dates (QuantLib 1.3x, BondFunctions.cleanPrice)."""
    today, later, r = np.datetime64("2026-12-31"), np.datetime64("2027-08-16"), 0.04
    curve = bootstrap(_par_curve(r, today), today)
    note = make_holdings(id=["N"], sector=["agency"], face=[1e6], maturity=["2029-11-15"], coupon=[0.045],
                         issue_date=["2024-11-15"], day_count=["30/360"])
    dirty, _ = later_values(cash_flows(note, today), np.zeros(1), RatePath(curve), np.array([later]))
    clean = dirty[0, 0] - cash_flows(note, later).accrued[0]

    qd = lambda d: ql.Date(str(d), "%Y-%m-%d")  # noqa: E731
    schedule = ql.Schedule(qd("2024-11-15"), qd("2029-11-15"), ql.Period(ql.Semiannual), ql.NullCalendar(),
                           ql.Unadjusted, ql.Unadjusted, ql.DateGeneration.Backward, False)
    bond = ql.FixedRateBond(0, 100.0, schedule, [0.045], ql.Thirty360(ql.Thirty360.BondBasis))
    rate = ql.InterestRate(r, ql.Actual365Fixed(), ql.Continuous, ql.NoFrequency)
    expected = ql.BondFunctions.cleanPrice(bond, rate, qd(later))
    assert clean == pytest.approx(expected, rel=0, abs=1e-8)


def _par_curve(r, today):
    from ladder.pricing.curve import ParCurve

    return ParCurve(TENORS, flat_par_yields(r, str(today)))
