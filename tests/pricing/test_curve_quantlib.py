"""The bootstrapped curve against QuantLib's piecewise curves built from the same par instruments.

Reference: QuantLib 1.3x (test reference only; ``ladder`` never imports it). The instruments are
built with QuantLib's own date logic from the tenors, independently of ``ladder``'s schedules:
- bills: ``DepositRateHelper`` (simple rate, ACT/365F, no fixing days, end-of-month rule);
- par bonds: ``FixedRateBondHelper`` at a clean price of 100, semiannual schedule generated backward
  from the maturity (end-of-month rule, unadjusted), ACT/ACT (Bond) so each coupon is half the rate.
"""

import datetime

import numpy as np
import pytest

import QuantLib as ql  # a test dependency (pyproject [test]): missing, the tests fail, not skip

from ladder.pricing.curve import ParCurve, bootstrap  # noqa: E402

TENORS = ("1M", "3M", "6M", "1Y", "2Y", "3Y", "5Y", "7Y", "10Y", "20Y", "30Y")
CURVES_PCT = {
    "upward": [3.72, 3.75, 3.77, 3.74, 3.71, 3.76, 3.89, 4.02, 4.16, 4.40, 4.36],
    "inverted": [5.55, 5.50, 5.38, 5.05, 4.62, 4.38, 4.15, 4.10, 4.05, 4.35, 4.22],
    "near_zero_short": [0.05, 0.06, 0.08, 0.15, 0.45, 0.80, 1.25, 1.60, 1.80, 2.20, 2.30],
}
# Month end, mid-month, a 31st whose half-year steps land on 28 Feb, and a leap day.
DATES = [datetime.date(2026, 11, 30), datetime.date(2025, 3, 14), datetime.date(2025, 8, 31),
         datetime.date(2024, 2, 29)]


@pytest.fixture(autouse=True)
def _restore_evaluation_date():
    saved = ql.Settings.instance().evaluationDate
    yield
    ql.Settings.instance().evaluationDate = saved


def quantlib_curve(date, tenors, yields, method):
    ref = ql.Date(date.day, date.month, date.year)
    ql.Settings.instance().evaluationDate = ref
    calendar = ql.NullCalendar()
    helpers = []
    for tenor, y in zip(tenors, yields):
        period = ql.Period(tenor)
        months = period.length() * (12 if period.units() == ql.Years else 1)
        if months <= 6:
            helpers.append(ql.DepositRateHelper(ql.QuoteHandle(ql.SimpleQuote(y)), ql.Period(months, ql.Months),
                                                0, calendar, ql.Unadjusted, True, ql.Actual365Fixed()))
        else:
            maturity = calendar.advance(ref, ql.Period(months, ql.Months), ql.Unadjusted, True)
            schedule = ql.Schedule(ref, maturity, ql.Period(6, ql.Months), calendar, ql.Unadjusted,
                                   ql.Unadjusted, ql.DateGeneration.Backward, True)
            helpers.append(ql.FixedRateBondHelper(
                ql.QuoteHandle(ql.SimpleQuote(100.0)), 0, 100.0, schedule, [y],
                ql.ActualActual(ql.ActualActual.Bond, schedule), ql.Unadjusted))
    bootstrap_ = ql.IterativeBootstrap(1e-14)
    if method == "log_linear":
        curve = ql.PiecewiseLogLinearDiscount(ref, helpers, ql.Actual365Fixed(), bootstrap_)
    else:
        # quadraticity 0, monotonicity 1, no forcePositive: "the basic Hagan/West method" (QuantLib docs).
        curve = ql.PiecewiseConvexMonotoneForward(ref, helpers, ql.Actual365Fixed(), bootstrap_,
                                                  ql.ConvexMonotone(0.0, 1.0, False))
    return curve, ref


@pytest.mark.parametrize("date", DATES, ids=str)
@pytest.mark.parametrize("name", CURVES_PCT)
@pytest.mark.parametrize("method,tolerance", [("log_linear", 1e-13), ("monotone_convex", 1e-12)])
def test_discount_factors_match_quantlib(name, date, method, tolerance):
    yields = np.array(CURVES_PCT[name]) / 100
    ours = bootstrap(ParCurve(TENORS, yields), np.datetime64(date), method)
    theirs, ref = quantlib_curve(date, TENORS, yields, method)
    # Same nodes (QuantLib's pillar dates are the maturities) ...
    assert [d.ISO() for d in theirs.dates()[1:]] == [str(d) for d in ours.instruments.maturity_dates]
    # ... and the same discount factors every third day up to the last node, and for ten years past
    # it, where both hold the last discrete forward flat.
    theirs.enableExtrapolation()
    days = np.arange(0, theirs.maxDate() - ref + 1 + 3650, 3)
    expected = np.array([theirs.discount(ref + int(k)) for k in days])
    np.testing.assert_allclose(ours.discount(days / 365.0), expected, rtol=0, atol=tolerance)


def quantlib_forward(curve):
    """QuantLib's instantaneous forward of a bootstrapped convex-monotone curve: its interpolation
    rebuilt on the curve's own node times and discrete forwards (``data()``), evaluated exactly."""
    interpolation = ql.ConvexMonotoneInterpolation(list(curve.times()), list(curve.data()), 0.0, 1.0, False)
    return lambda t: np.array([interpolation(float(x), True) for x in np.ravel(t)])


@pytest.mark.parametrize("name", CURVES_PCT)
def test_monotone_convex_forwards_match_quantlib(name):
    date = DATES[0]
    yields = np.array(CURVES_PCT[name]) / 100
    ours = bootstrap(ParCurve(TENORS, yields), np.datetime64(date))
    theirs, _ = quantlib_curve(date, TENORS, yields, "monotone_convex")
    t = np.linspace(0.0, theirs.times()[-1], 3001)
    np.testing.assert_allclose(ours.instantaneous_forward(t), quantlib_forward(theirs)(t), rtol=0, atol=1e-12)


def test_positivity_amendment_where_the_basic_method_goes_negative():
    # Three bills with a low 1M-3M forward between high ones. Bills fix the node discount factors
    # directly, so both curves share them; between the nodes QuantLib's basic Hagan-West forward
    # dips below zero, while ours, with Hagan and West's positivity bound, stays at or above zero.
    date = DATES[0]
    tenors, yields = ("1M", "3M", "6M"), np.array([5.0, 1.8, 3.4]) / 100
    ours = bootstrap(ParCurve(tenors, yields), np.datetime64(date))
    theirs, _ = quantlib_curve(date, tenors, yields, "monotone_convex")
    nodes = np.array(theirs.times())
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    np.testing.assert_allclose(ours.discount(nodes), [theirs.discount(float(x)) for x in nodes], rtol=1e-12, atol=0)
    t = np.linspace(0.0, nodes[-1], 2001)
    assert quantlib_forward(theirs)(t).min() < 0
    assert ours.instantaneous_forward(t).min() >= 0
