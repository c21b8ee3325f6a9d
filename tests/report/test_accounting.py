"""The report's accounting figures: effective-interest amortized cost, income, and where cost ends."""

from __future__ import annotations

import datetime as dt

import numpy as np
import pytest

from ladder.analysis.valuation import value_book
from ladder.folder.book_file import load_book
from ladder.book.holdings import make_holdings
from ladder.demo import demo_source
from ladder.report.accounting import accounting_figures, interest_by_period

FACE = 100_000.0


@pytest.fixture(scope="module")
def demo():
    return load_book(demo_source())


def _book(demo, **terms):
    base = dict(id=["T1"], sector=["supranational"], issuer=["Invented Bank"], face=[FACE], rating=["AAA"],
                frequency=[2], day_count=["30/360"])
    base.update(terms)
    return demo.with_holdings(make_holdings(**base))


# Worked example (effective-interest amortization table of a premium bond, in the layout of
# intermediate-accounting texts; figures computed by hand from the annuity formula, from memory of the
# layout, not copied from a text): face 100,000, 10% annual coupon, 5 years, bought to yield 8%:
#   price = 10,000 a(5, 8%) + 100,000 v^5 = 107,985.42
#   year  interest (8%)   amortization   carrying amount
#     1    8,638.83        1,361.17       106,624.25
#     2    8,529.94        1,470.06       105,154.19
#     3    8,412.34        1,587.66       103,566.53
#     4    8,285.32        1,714.68       101,851.85
#     5    8,148.15        1,851.85       100,000.00
CARRYING = (107_985.42, 106_624.25, 105_154.19, 103_566.53, 101_851.85)
INTEREST = (8_638.83, 8_529.94, 8_412.34, 8_285.32, 8_148.15)


def test_premium_bond_matches_the_worked_example(demo):
    book = _book(demo, coupon=[0.10], frequency=[1], maturity=["2031-11-30"], issue_date=["2026-11-30"],
                 purchase_date=["2026-11-30"], book_price=[107.985420])
    for year in range(5):
        at = dt.date(2026 + year, 11, 30)
        if year == 0:
            at = dt.date(2026, 11, 30)
        a = accounting_figures(value_book(book, at), dt.date(2026 + year - 1, 11, 30))
        assert a.amortized_cost[0] == pytest.approx(CARRYING[year], abs=0.01, rel=0)
        if year:
            # the year's income is the carrying amount a year earlier times the effective yield
            assert a.interest_earned[0] == pytest.approx(INTEREST[year - 1], abs=0.01, rel=0)
            assert a.coupon_income[0] == pytest.approx(10_000.0, abs=1e-6, rel=0)
            assert a.amortization[0] == pytest.approx(INTEREST[year - 1] - 10_000.0, abs=0.01, rel=0)
    assert a.book_yield[0] == pytest.approx(0.08, abs=1e-9, rel=0)
    # the last year's income, through the report's income-by-period function
    last = interest_by_period(value_book(book, dt.date(2030, 11, 30)),
                              np.array(["2030-11-30", "2031-11-30"], dtype="datetime64[D]"))
    assert last[0, 0] == pytest.approx(INTEREST[4], abs=0.01, rel=0)


@pytest.mark.parametrize("price", [96.25, 103.5])
def test_amortized_cost_reaches_par_at_maturity(demo, price):
    """Common practice: a discount accretes and a premium amortizes to par by maturity; over the
    life, income = coupons + (100 - purchase price) per 100."""
    book = _book(demo, coupon=[0.04], maturity=["2027-12-15"], issue_date=["2025-12-15"],
                 purchase_date=["2025-12-15"], book_price=[price])
    near = accounting_figures(value_book(book, dt.date(2027, 12, 14)), dt.date(2027, 11, 30))
    assert near.amortized_cost[0] / FACE * 100 == pytest.approx(100.0, abs=abs(100 - price) / 150, rel=0)
    whole = interest_by_period(value_book(book), np.array(["2025-12-14", "2027-12-15"], dtype="datetime64[D]"))
    assert whole[0, 0] == pytest.approx(FACE * (0.04 * 2 + (100 - price) / 100), rel=1e-9, abs=0)


def test_callable_premium_amortizes_to_the_first_call_then_resets(demo):
    """ASU 2017-08 (from memory): a premium on a callable amortizes to the earliest call date at the
    call price; if the bond is not called, cost carries on from the call price to maturity."""
    book = _book(demo, sector=["agency"], issuer=["Invented Agency"], rating=["AA+"], coupon=[0.06],
                 maturity=["2030-06-15"], issue_date=["2025-06-15"], purchase_date=["2025-06-15"],
                 book_price=[104.0], first_call=["2027-06-15"], call_frequency=[0], call_price=[100.0])
    at_call = accounting_figures(value_book(book, dt.date(2027, 6, 15)), dt.date(2027, 5, 31))
    assert at_call.amortized_cost[0] == pytest.approx(FACE, abs=1e-6, rel=0)
    assert at_call.workout[0] == np.datetime64("2027-06-15")
    after = accounting_figures(value_book(book, dt.date(2028, 6, 15)), dt.date(2028, 5, 31))
    assert after.amortized_cost[0] == pytest.approx(FACE, abs=1e-6, rel=0)
    # before the call the premium runs off faster than it would to maturity
    mid = accounting_figures(value_book(book, dt.date(2026, 12, 15)), dt.date(2026, 11, 30))
    assert 100 < mid.amortized_cost[0] / FACE * 100 < 101.5   # amortized to maturity instead: 102.90


def test_demo_unrealized_gain_is_clean_value_less_amortized_cost(demo):
    v = value_book(demo)
    a = accounting_figures(v, dt.date(2026, 10, 31))
    clean = v.clean * v.holdings.face / 100
    ok = np.isfinite(a.amortized_cost)
    assert ok.all()
    # Money on holdings of up to ~1e8: a millionth of a unit is far above round-off (~1e-8) and far below
    # a cent. A relative bound would not do: a gain is a small difference of two large amounts.
    np.testing.assert_allclose(a.unrealized_gain, clean - a.amortized_cost, rtol=0, atol=1e-6)
    np.testing.assert_allclose(a.interest_earned, a.coupon_income + a.amortization, rtol=0, atol=1e-6)
    # a month of income on a 331m book yielding about 4%: between 0.25% and 0.45% of face
    assert 0.0025 < a.total("interest_earned") / v.totals.face < 0.0045
