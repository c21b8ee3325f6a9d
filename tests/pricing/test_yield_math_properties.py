"""Facts of the trade as property tests (hypothesis) over random bonds, day counts and settlement
dates: all marked common practice (textbook rules: e.g. K. Bigel, Fixed Income Mathematics 9.34
"Properties of Convexity", Touro Pressbooks; REFERENCES.md section 6).
"""

import calendar
import datetime as dt

import numpy as np
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from ladder.book.holdings import make_holdings
from ladder.market.dates import add_months
from ladder.pricing.cashflows import cash_flows
from ladder.pricing.yield_math import dirty_from_yield, measures_at_yield

FEW = settings(max_examples=50, deadline=None)
DAY_COUNTS = st.sampled_from(["30/360", "30E/360", "ACT/360", "ACT/365F", "ACT/ACT", "ACT/ACT-ISDA"])
FREQUENCIES = st.sampled_from([1, 2, 4, 12])
SETTLE = st.dates(dt.date(2026, 1, 1), dt.date(2030, 12, 31))
# Yields up to 10% and maturities up to 30 years: beyond that the maturity rule has real exceptions
# (deep-discount bonds, whose duration and convexity peak at a finite maturity).
YIELD = st.floats(0.003, 0.10)
COUPON = st.floats(0.0, 0.12)


def bond_set(settle: dt.date, maturities, coupons, frequency: int, day_count: str, kind="fixed"):
    n = len(maturities)
    h = make_holdings(id=[f"P{i}" for i in range(n)], sector=["corporate"] * n, kind=[kind] * n, face=[1e6] * n,
                      maturity=[str(m) for m in maturities], coupon=list(coupons), frequency=[frequency] * n,
                      day_count=[day_count] * n)
    return h, cash_flows(h, np.datetime64(settle))


def later(settle: dt.date, days: int) -> np.datetime64:
    return np.datetime64(settle) + days


def months_after(date: dt.date, months: int) -> dt.date:
    """Calendar months after ``date``, the day clipped to the month (written out here, independent of
    ladder.market.dates)."""
    m = date.month - 1 + months
    y, m = date.year + m // 12, m % 12 + 1
    return dt.date(y, m, min(date.day, calendar.monthrange(y, m)[1]))


@FEW
@given(settle=SETTLE, periods=st.integers(1, 60), offset=st.integers(0, 400), frequency=FREQUENCIES,
       y=YIELD)
def test_zero_coupon_macaulay_duration_is_time_to_maturity(settle, periods, offset, frequency, y):
    # common practice: a zero-coupon bond's Macaulay duration equals its time to maturity. Time in the
    # yield measure (ACT/ACT ICMA, periods of the bond's frequency): whole periods from the quasi-coupon
    # date after settlement plus the fraction of the current quasi-period still to run.
    step = 12 // frequency
    maturity = months_after(settle, periods * step) + dt.timedelta(days=offset % 28)
    quasi = [months_after(maturity, -j * step) for j in range(periods + 40)]
    nxt = max(j for j, q in enumerate(quasi) if q > settle)      # index of the first quasi-date after settle
    nxt_date, prev_date = quasi[nxt], quasi[nxt + 1]
    assume(maturity.day <= 27)                                  # keep clear of the end-of-month rule here
    expected = (nxt + (nxt_date - settle).days / (nxt_date - prev_date).days) / frequency
    h, cf = bond_set(settle, [maturity], [0.0], frequency, "ACT/ACT", kind="zero")
    m = measures_at_yield(cf, np.array([y]), h.frequency)
    assert abs(float(m.macaulay[0]) - expected) < 1e-12


@FEW
@given(years=st.integers(1, 30), frequency=FREQUENCIES, y=YIELD)
def test_zero_coupon_macaulay_on_a_quasi_coupon_date_is_whole_years(years, frequency, y):
    # common practice: a 10-year zero has a 10-year Macaulay duration
    settle = dt.date(2026, 5, 15)
    h, cf = bond_set(settle, [months_after(settle, 12 * years)], [0.0], frequency, "ACT/ACT", kind="zero")
    assert abs(float(measures_at_yield(cf, np.array([y]), h.frequency).macaulay[0]) - years) < 1e-12


@FEW
@given(settle=SETTLE, first=st.integers(200, 3000), extra=st.integers(1, 40), frequency=FREQUENCIES,
       coupon=COUPON, y=YIELD, day_count=DAY_COUNTS)
def test_longer_maturity_higher_convexity(settle, first, extra, frequency, coupon, y, day_count):
    # common practice: at equal coupon and yield, the longer bond has the higher convexity
    short = later(settle, first)
    long_ = add_months(short, extra * (12 // frequency), True)
    assume(long_ <= np.datetime64(settle) + 30 * 365)
    h, cf = bond_set(settle, [short, long_], [coupon] * 2, frequency, day_count)
    cx = measures_at_yield(cf, np.full(2, y), h.frequency).convexity
    assert cx[1] > cx[0]


@FEW
@given(settle=SETTLE, days=st.integers(40, 30 * 365), frequency=FREQUENCIES, low=COUPON, gap=st.floats(0.001, 0.05),
       y=YIELD, day_count=DAY_COUNTS)
def test_lower_coupon_higher_convexity(settle, days, frequency, low, gap, y, day_count):
    # common practice: at equal maturity and yield, the lower coupon has the higher convexity
    maturity = later(settle, days)
    h, cf = bond_set(settle, [maturity] * 2, [low, low + gap], frequency, day_count)
    assume(cf.count[0] >= 2)                   # one flow left: both are one payment, equal convexity per unit
    cx = measures_at_yield(cf, np.full(2, y), h.frequency).convexity
    assert cx[0] > cx[1]


@FEW
@given(settle=SETTLE, days=st.integers(40, 30 * 365), frequency=FREQUENCIES, coupon=COUPON, y=YIELD,
       gap=st.floats(0.0005, 0.05), day_count=DAY_COUNTS)
def test_lower_yield_higher_convexity(settle, days, frequency, coupon, y, gap, day_count):
    # common practice: at equal terms, the lower yield gives the higher convexity
    h, cf = bond_set(settle, [later(settle, days)], [coupon], frequency, day_count)
    m = [measures_at_yield(cf, np.array([r]), h.frequency).convexity[0] for r in (y, y + gap)]
    assert m[0] > m[1]


@FEW
@given(settle=SETTLE, days=st.integers(2, 40 * 365), frequency=FREQUENCIES, coupon=COUPON,
       y=st.floats(-0.005, 0.15), gap=st.floats(1e-4, 0.05), day_count=DAY_COUNTS)
def test_price_falls_as_yield_rises(settle, days, frequency, coupon, y, gap, day_count):
    # common practice: an option-free bond's price falls as its yield rises (final periods included).
    # At least 2 days to maturity: on 30/360 the single day from a 30th to a 31st counts 0 days, and a
    # flow 0 periods away has no rate sensitivity.
    h, cf = bond_set(settle, [later(settle, days)], [coupon], frequency, day_count)
    p = [dirty_from_yield(cf, np.array([r]), h.frequency)[0] for r in (y, y + gap)]
    assert p[1] < p[0]


@FEW
@given(settle=SETTLE, days=st.integers(365, 30 * 365), frequency=FREQUENCIES, coupon=COUPON,
       y=st.floats(0.005, 0.12), shift_bp=st.integers(100, 300), up=st.booleans(), day_count=DAY_COUNTS)
def test_duration_plus_convexity_beats_duration_alone(settle, days, frequency, coupon, y, shift_bp, up, day_count):
    # common practice: for an option-free bond and a shift of 100 bp or more, the duration + convexity
    # estimate of the new price is closer to the exact reprice than the duration-only estimate
    dy = shift_bp / 1e4 * (1 if up else -1)
    assume(y + dy > 0.001)
    h, cf = bond_set(settle, [later(settle, days)], [coupon], frequency, day_count)
    m = measures_at_yield(cf, np.array([y]), h.frequency)
    p, mod, cx = float(m.dirty[0]), float(m.modified[0]), float(m.convexity[0])
    exact = float(dirty_from_yield(cf, np.array([y + dy]), h.frequency)[0])
    duration_only = p * (1 - mod * dy)
    with_convexity = duration_only + p * 0.5 * cx * dy * dy
    assert abs(exact - with_convexity) < abs(exact - duration_only)
