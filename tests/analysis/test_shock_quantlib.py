"""Exact shocked values against QuantLib (a test reference only; ``ladder`` never imports it).

1. On a flat par curve, a parallel move of the par yields is a flat move of the semiannual yield,
   and the shocked value of an option-free note is QuantLib's price at the shifted yield.
2. On a sloped curve, under parallel and non-parallel moves, every shocked value is QuantLib's price
   on its own curve bootstrapped from the same moved par instruments, at the same z-spread.
"""

import datetime as dt
import sys
from pathlib import Path

import numpy as np
import pytest

import QuantLib as ql  # a test dependency (pyproject [test]): missing, the tests fail, not skip

from ladder.analysis.shock import shock_book  # noqa: E402
from ladder.book.holdings import Holdings  # noqa: E402
from ladder.pricing.curve import ParCurve, bootstrap  # noqa: E402
from ladder.risk.scenarios import parallel_set, standard_non_parallel  # noqa: E402

from shock_books import UPWARD_PCT, TENORS, book_with, months_after, notes  # noqa: E402

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "pricing"))
from test_curve_quantlib import quantlib_curve  # noqa: E402

# A mid-month curve date whose 6M bill runs 183 days (T = 0.5014 ACT/365F), and the curve's tenors
# every half-year to 10Y, so every coupon date of a note maturing on a 15th in step is a node.
FLAT_DATE = dt.date(2026, 6, 15)
HALF_YEARS = ("6M",) + tuple(f"{m}M" for m in range(12, 121, 6))
SHIFTS_BP = (-300.0, -100.0, -25.0, 25.0, 100.0, 300.0)


@pytest.fixture(autouse=True)
def _restore_evaluation_date():
    saved = ql.Settings.instance().evaluationDate
    yield
    ql.Settings.instance().evaluationDate = saved


def qdate(text) -> "ql.Date":
    d = dt.date.fromisoformat(str(text))
    return ql.Date(d.day, d.month, d.year)


def ql_note(issue, maturity, coupon, day_count):
    schedule = ql.Schedule(qdate(issue), qdate(maturity), ql.Period(ql.Semiannual), ql.NullCalendar(),
                           ql.Unadjusted, ql.Unadjusted, ql.DateGeneration.Backward, False)
    dc = ql.ActualActual(ql.ActualActual.Bond, schedule) if day_count == "ACT/ACT" else \
        ql.Thirty360(ql.Thirty360.BondBasis)
    return ql.FixedRateBond(0, 100.0, schedule, [coupon], dc, ql.Unadjusted), dc


@pytest.mark.parametrize("level_pct", [1.5, 4.5])
def test_a_parallel_par_move_of_a_flat_curve_is_a_flat_semiannual_move(level_pct):
    # Par bonds at y on a half-year grid satisfy DF_k = DF_(k-1) / (1 + y/2) for k >= 3 (subtract
    # consecutive par equations), and DF_2 (1 + y/2)^2 = 1 - (y/2) d, where d is the 6M bill's gap
    # 1/(1 + y T) vs 1/(1 + y/2): so DF_k (1 + y/2)^k is 1 within |y|/2 * 2e-4 for every k >= 2.
    curve = bootstrap(ParCurve(HALF_YEARS, np.full(len(HALF_YEARS), level_pct / 100)), np.datetime64(FLAT_DATE))
    for bp in SHIFTS_BP:
        y = level_pct / 100 + bp / 1e4
        moved = curve.shifted(bp)
        nodes = moved.node_times[1:]
        k = np.arange(1, len(nodes) + 1)
        gap = moved.discount(nodes) * (1 + y / 2) ** k - 1
        t_bill = nodes[0]
        # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
        assert moved.discount(nodes[:1])[0] == pytest.approx(1 / (1 + y * t_bill), rel=1e-12, abs=0)   # a bill
        assert np.abs(gap[1:]).max() <= abs(y) / 2 * 2e-4
        assert np.abs(gap[1:]).max() > 0                               # the bill's stub is felt


def test_shocked_notes_on_a_flat_curve_are_quantlib_prices_at_the_shifted_yield():
    # QuantLib reference: Bond.dirtyPrice at the yield, compounded semiannually on the
    # note's ACT/ACT (Bond) periods. Notes issued on coupon dates of the curve's grid, valued on a
    # coupon date. Tolerance: coupon x DF_1 gap (<= 1.1e-4 relative at 7.5%) + 100 x (y/2) x that gap,
    # under 1e-3 per 100 (see the flat-curve test above).
    months = [12, 24, 36, 60, 84, 120]
    coupons = [0.5, 2.0, 4.5, 4.5, 6.0, 3.25]
    maturities = months_after(FLAT_DATE, months)
    issues = months_after(dt.date(2021, 6, 15), [0] * len(months))
    level = 4.5
    book = book_with(notes(maturities, coupons, issue_dates=issues), [level] * len(HALF_YEARS), HALF_YEARS,
                     valuation_date=FLAT_DATE)
    result = shock_book(book, scenarios=parallel_set(book.curve, SHIFTS_BP))
    ours = result.revaluation.value / (book.holdings.face / 100)       # dirty per 100
    ql.Settings.instance().evaluationDate = qdate(FLAT_DATE)
    for j, (issue, maturity, coupon) in enumerate(zip(issues, maturities, coupons)):
        bond, dc = ql_note(issue, maturity, coupon / 100, "ACT/ACT")
        for s, bp in enumerate(SHIFTS_BP):
            y = level / 100 + bp / 1e4
            theirs = bond.dirtyPrice(y, dc, ql.Compounded, ql.Semiannual, qdate(FLAT_DATE))
            assert ours[s, j] == pytest.approx(theirs, abs=1e-3, rel=0), (maturity, bp)


def test_shocked_values_are_quantlib_prices_on_the_moved_curves():
    # QuantLib reference: PiecewiseConvexMonotoneForward bootstrapped from the moved par instruments
    # (tests/pricing/test_curve_quantlib.py builds them independently of ladder's schedules), priced
    # with BondFunctions.dirtyPrice at the holding's z-spread (continuous, ACT/365F from settlement).
    date = dt.date(2026, 3, 16)
    maturities = months_after(dt.date(2026, 9, 15), [0, 9, 20, 33, 51, 70, 110])
    issues = months_after(dt.date(2023, 3, 15), [0, 3, 0, 3, 0, 3, 0])
    coupons = [3.0, 4.25, 1.75, 5.0, 3.875, 4.5, 4.0]
    treasuries = notes(maturities, coupons, issue_dates=issues)
    agencies = notes(maturities, coupons, sector="agency", issue_dates=issues, prefix="A")
    holdings = Holdings.concat([treasuries, agencies])
    book = book_with(holdings, UPWARD_PCT, valuation_date=date)
    scenarios = parallel_set(book.curve, SHIFTS_BP) + standard_non_parallel(book.curve)
    result = shock_book(book, scenarios=scenarios)
    ours = result.revaluation.value / (holdings.face / 100)
    spreads = result.valuation.spread
    # Demo table, agency AA: 11 bp at 2Y and 16 bp at 5Y, linear in tenor years between (hand
    # arithmetic on the table; the spread-table interpolation itself: tests/pricing/test_spread_curves.py).
    years = (np.array(maturities, dtype="datetime64[D]") - np.datetime64(date)).astype(float) / 365.0
    table = np.interp(years, [0.25, 1, 2, 5, 10], [6, 9, 11, 16, 22])
    assert spreads[len(maturities):] == pytest.approx(table / 1e4, rel=0, abs=1e-12)
    for s, scenario in enumerate(scenarios):
        curve, ref = quantlib_curve(date, TENORS, np.array(UPWARD_PCT) / 100 + scenario.shift_bp_by_tenor / 1e4,
                                    "monotone_convex")
        for j in range(len(holdings)):
            i = j % len(maturities)
            bond, _ = ql_note(issues[i], maturities[i], coupons[i] / 100, holdings.day_count[j])
            theirs = ql.BondFunctions.dirtyPrice(bond, curve, float(spreads[j]), ql.Actual365Fixed(),
                                                 ql.Continuous, ql.Annual, ref)
            assert ours[s, j] == pytest.approx(theirs, abs=1e-9, rel=0), (scenario.name, holdings.id[j])
