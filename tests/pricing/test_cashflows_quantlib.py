"""Coupon schedules, cash flows, accrued interest, price <-> yield, durations and convexity of random
fixed-rate bonds against QuantLib as an independent reference.

QuantLib set-up (the street convention, unadjusted schedule): ql.Schedule generated backward from
maturity (forward from an off-grid first coupon date, with an odd last period), end-of-month rule when
the anchor date is a month end, no business-day adjustment; ql.FixedRateBond with the same day count;
yields ql.Compounded at the coupon frequency on the bond's day count (QuantLib measures time period by
period from settlement, the first step being the coupon period less the accrued part, as we do).
Day counts: 30/360 = Thirty360(BondBasis), 30E/360 = Thirty360(European), ACT/360, ACT/365F,
ACT/ACT-ISDA = ActualActual(ISDA), ACT/ACT (ICMA) = ActualActual(ISMA, schedule).

Known QuantLib limitation, worked around here: in QuantLib 1.44 ActualActual(ISMA, schedule) misreads
forward-generated schedules with a short last period (e.g. annual 6 May 2006 -> 11 May 2040, first
coupon 13 May 2007: it gives 2.4966 instead of 5.0 for the regular coupon 13 May 2038 -> 13 May 2039 of
a 5% bond). For those bonds the ICMA fraction is taken on each coupon's reference period instead
(ActualActual(ISMA) without a schedule), which is Rule 251's quasi-coupon period.

Settlement dates lie anywhere from the accrual start to the day before the penultimate coupon date
(at least two flows left: in the final period we use the money-market convention, QuantLib does not).
Tolerances: 1e-8 relative on prices, 1e-6 relative on durations and convexity (issue 2's contract).
"""

import datetime as dt
from collections import Counter

import numpy as np
import pytest
import QuantLib as ql

from ladder.book.holdings import make_holdings
from ladder.market.dates import add_months, is_month_end
from ladder.market.schedule import future_periods
from ladder.pricing.cashflows import cash_flows
from ladder.pricing.quotes import dirty_from_quote, measures_from_dirty
from ladder.pricing.yield_math import dirty_from_yield, measures_at_yield, yield_from_dirty

N_BONDS = 240
DAY_COUNTS = ["30/360", "30E/360", "ACT/360", "ACT/365F", "ACT/ACT", "ACT/ACT-ISDA"]
FREQUENCY = {1: ql.Annual, 2: ql.Semiannual, 4: ql.Quarterly, 12: ql.Monthly}
CASES = ["no_issue_date", "regular", "short_first", "long_first", "odd_last"]
PRICE_RTOL, DURATION_RTOL = 1e-8, 1e-6


def qd(d) -> ql.Date:
    d = dt.date.fromisoformat(str(d))
    return ql.Date(d.day, d.month, d.year)


def npd(d: ql.Date) -> np.datetime64:
    return np.datetime64(dt.date(d.year(), d.month(), d.dayOfMonth()), "D")


def _random_bond(rng, i):
    """Terms of bond i: day count cycles so that each has 40 bonds; the rest is random."""
    dc = DAY_COUNTS[i % len(DAY_COUNTS)]
    f = int(rng.choice([1, 2, 4, 12]))
    step = 12 // f
    year, month = int(rng.integers(2027, 2056)), int(rng.integers(1, 13))
    if rng.random() < 0.3:       # end-of-month maturity (February ends included)
        maturity = (np.datetime64(f"{year}-{month:02d}", "M") + 1).astype("datetime64[D]") - 1
    else:
        maturity = np.datetime64(f"{year}-{month:02d}-{int(rng.integers(1, 29)):02d}")
    eom = bool(is_month_end(maturity))
    periods = int(rng.integers(3, 36 if f < 12 else 90))
    grid = lambda j: add_months(maturity, -j * step, eom)   # noqa: E731  backward grid from maturity
    case = CASES[int(rng.integers(len(CASES)))]
    issue = first = None
    if case == "regular":
        issue = grid(periods)
    elif case == "short_first":
        issue = grid(periods) + int(rng.integers(1, 25))
    elif case == "long_first":
        issue = grid(periods + 1) + int(rng.integers(1, 25))
        first = grid(periods)
    elif case == "odd_last":
        issue = grid(periods) - int(rng.integers(1, 10))
        first = add_months(issue, step) + int(rng.integers(5, 15))   # off the backward grid
    coupon = 0.0 if rng.random() < 0.05 else round(float(rng.uniform(0.001, 0.10)), 5)
    return dict(dc=dc, f=f, maturity=maturity, issue=issue, first=first, case=case, periods=periods,
                coupon=coupon, y=float(rng.uniform(0.002, 0.11)), eom=eom, grid=grid)


def _quantlib_bond(b):
    tenor = ql.Period(FREQUENCY[b["f"]])
    effective = qd(b["issue"] if b["issue"] is not None else b["grid"](b["periods"]))
    cal = ql.NullCalendar()
    if b["case"] == "odd_last":
        schedule = ql.Schedule(effective, qd(b["maturity"]), tenor, cal, ql.Unadjusted, ql.Unadjusted,
                               ql.DateGeneration.Forward, bool(is_month_end(b["first"])), qd(b["first"]))
    elif b["first"] is not None:
        schedule = ql.Schedule(effective, qd(b["maturity"]), tenor, cal, ql.Unadjusted, ql.Unadjusted,
                               ql.DateGeneration.Backward, b["eom"], qd(b["first"]))
    else:
        schedule = ql.Schedule(effective, qd(b["maturity"]), tenor, cal, ql.Unadjusted, ql.Unadjusted,
                               ql.DateGeneration.Backward, b["eom"])
    icma = (ql.ActualActual(ql.ActualActual.ISMA) if b["case"] == "odd_last"
            else ql.ActualActual(ql.ActualActual.ISMA, schedule))
    dc = {"30/360": ql.Thirty360(ql.Thirty360.BondBasis), "30E/360": ql.Thirty360(ql.Thirty360.European),
          "ACT/360": ql.Actual360(), "ACT/365F": ql.Actual365Fixed(), "ACT/ACT": icma,
          "ACT/ACT-ISDA": ql.ActualActual(ql.ActualActual.ISDA)}[b["dc"]]
    return schedule, dc, ql.FixedRateBond(0, 100.0, schedule, [b["coupon"]], dc, ql.Unadjusted, 100.0, effective)


def _settlement(rng, dates):
    """A settlement date from the accrual start to the day before the penultimate coupon date."""
    lo, hi = dates[0], dates[-2] - 1
    u = rng.random()
    if u < 0.1:
        return lo                                          # on the issue (accrual start) date
    if u < 0.2 and len(dates) > 3:
        return dates[int(rng.integers(1, len(dates) - 2))]  # on a coupon date
    return lo + int(rng.integers(0, int((hi - lo).astype(int)) + 1))


@pytest.fixture(scope="module")
def book():
    """The random bonds, our holdings and cash flows, and QuantLib's figures for each bond."""
    rng = np.random.default_rng(20261130)
    bonds = [_random_bond(rng, i) for i in range(N_BONDS)]
    for b in bonds:
        schedule, dc, bond = _quantlib_bond(b)
        dates = [npd(d) for d in schedule]
        s = _settlement(rng, dates)
        ql.Settings.instance().evaluationDate = qd(s)
        rate = ql.InterestRate(b["y"], dc, ql.Compounded, FREQUENCY[b["f"]])
        coupons = [ql.as_coupon(c) for c in bond.cashflows() if ql.as_coupon(c) is not None]
        future = [c for c in coupons if npd(c.date()) > s]
        clean = ql.BondFunctions.cleanPrice(bond, rate, qd(s))
        b.update(settle=s, schedule=dates, ql=dict(
            clean=clean, accrued=ql.BondFunctions.accruedAmount(bond, qd(s)),
            macaulay=ql.BondFunctions.duration(bond, rate, ql.Duration.Macaulay, qd(s)),
            modified=ql.BondFunctions.duration(bond, rate, ql.Duration.Modified, qd(s)),
            convexity=ql.BondFunctions.convexity(bond, rate, qd(s)),
            pay=[npd(c.date()) for c in future], starts=[npd(c.accrualStartDate()) for c in future],
            amounts=[c.amount() for c in future], bond=bond, dc=dc))
    h = make_holdings(
        id=[f"Q{i:03d}" for i in range(N_BONDS)], sector=["agency"] * N_BONDS, face=[1e6] * N_BONDS,
        maturity=[str(b["maturity"]) for b in bonds], coupon=[b["coupon"] for b in bonds],
        frequency=[b["f"] for b in bonds], day_count=[b["dc"] for b in bonds],
        issue_date=[None if b["issue"] is None else str(b["issue"]) for b in bonds],
        first_coupon=[None if b["first"] is None else str(b["first"]) for b in bonds])
    settle = np.array([b["settle"] for b in bonds], dtype="datetime64[D]")
    return bonds, h, settle, cash_flows(h, settle)


def _ql(bonds, key):
    return np.array([b["ql"][key] for b in bonds])


def test_the_sample_covers_every_convention(book):
    bonds, _, _, cf = book
    assert len(bonds) >= 200
    assert min(Counter(b["dc"] for b in bonds).values()) >= 30
    assert min(Counter(b["f"] for b in bonds).values()) >= 30
    assert min(Counter(b["case"] for b in bonds).values()) >= 25
    assert sum(b["eom"] for b in bonds) >= 40
    assert (cf.count >= 2).all() and (cf.accrued == 0).sum() >= 10 and (cf.accrued > 0).sum() >= 150


def test_coupon_dates_match_quantlib_schedule(book):
    # ql.Schedule (Backward / Forward with first date, EOM rule, unadjusted): the future coupon dates
    # and each period's accrual start (issue date for an odd first period)
    bonds, h, settle, cf = book
    p = future_periods(h.maturity, h.frequency, h.issue_date, h.first_coupon, settle)
    for i, b in enumerate(bonds):
        assert list(cf.dates[i][cf.mask[i]]) == b["ql"]["pay"], (i, b["case"], b["maturity"])
        assert list(p.start[i][p.mask[i]]) == b["ql"]["starts"], (i, b["case"], b["maturity"])


def test_coupon_amounts_match_quantlib(book):
    # ql.FixedRateBond coupon amounts: 100 x rate x day-count fraction of each accrual period
    bonds, _, _, cf = book
    for i, b in enumerate(bonds):
        ours = cf.coupon[i][cf.mask[i]]
        np.testing.assert_allclose(ours, b["ql"]["amounts"], rtol=0, atol=1e-10, err_msg=f"bond {i} {b['case']}")
        assert cf.principal[i][cf.mask[i]][-1] == 100.0


def test_accrued_matches_quantlib(book):
    # ql.BondFunctions.accruedAmount at the settlement date
    bonds, _, _, cf = book
    np.testing.assert_allclose(cf.accrued, _ql(bonds, "accrued"), rtol=0, atol=1e-10)


def test_price_from_yield_matches_quantlib(book):
    # ql.BondFunctions.cleanPrice(bond, InterestRate(y, dc, Compounded, f), settle); dirty = clean + accrued
    bonds, h, _, cf = book
    y = np.array([b["y"] for b in bonds])
    dirty = dirty_from_yield(cf, y, h.frequency)
    np.testing.assert_allclose(dirty - cf.accrued, _ql(bonds, "clean"), rtol=PRICE_RTOL, atol=0)
    np.testing.assert_allclose(dirty, _ql(bonds, "clean") + _ql(bonds, "accrued"), rtol=PRICE_RTOL, atol=0)


def test_yield_from_quantlib_price(book):
    # our yield solved from QuantLib's dirty price recovers the yield QuantLib priced at
    bonds, h, _, cf = book
    y = yield_from_dirty(cf, _ql(bonds, "clean") + _ql(bonds, "accrued"), h.frequency)
    np.testing.assert_allclose(y, [b["y"] for b in bonds], rtol=0, atol=1e-10)


def test_quantlib_yield_from_our_price(book):
    # ql.BondFunctions.bondYield on our clean price recovers our yield
    bonds, h, _, cf = book
    y = np.array([b["y"] for b in bonds])
    clean = dirty_from_yield(cf, y, h.frequency) - cf.accrued
    for i, b in enumerate(bonds):
        ql.Settings.instance().evaluationDate = qd(b["settle"])
        got = ql.BondFunctions.bondYield(b["ql"]["bond"], ql.BondPrice(float(clean[i]), ql.BondPrice.Clean),
                                         b["ql"]["dc"], ql.Compounded, FREQUENCY[b["f"]], qd(b["settle"]),
                                         1e-13, 200, 0.05)
        assert got == pytest.approx(y[i], abs=1e-10, rel=0), (i, b["case"], b["dc"])


def test_durations_and_convexity_match_quantlib(book):
    # ql.BondFunctions.duration (Macaulay, Modified) and convexity at the same InterestRate
    bonds, h, _, cf = book
    m = measures_at_yield(cf, np.array([b["y"] for b in bonds]), h.frequency)
    np.testing.assert_allclose(m.macaulay, _ql(bonds, "macaulay"), rtol=DURATION_RTOL, atol=0)
    np.testing.assert_allclose(m.modified, _ql(bonds, "modified"), rtol=DURATION_RTOL, atol=0)
    np.testing.assert_allclose(m.convexity, _ql(bonds, "convexity"), rtol=DURATION_RTOL, atol=0)


def test_quoted_clean_price_through_quotes_module(book):
    # the holdings' own path: a clean price quote -> dirty -> ytm and risk, against QuantLib's figures
    bonds, h, _, cf = book
    from dataclasses import replace

    quoted = replace(h, quote_type=np.full(len(h), "price", dtype=object), quote=_ql(bonds, "clean"))
    dirty = dirty_from_quote(quoted, cf)
    m = measures_from_dirty(quoted, cf, dirty)
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    np.testing.assert_allclose(dirty, _ql(bonds, "clean") + _ql(bonds, "accrued"), rtol=1e-12, atol=0)
    np.testing.assert_allclose(m.ytm, [b["y"] for b in bonds], rtol=0, atol=1e-10)
    np.testing.assert_allclose(m.modified, _ql(bonds, "modified"), rtol=DURATION_RTOL, atol=0)
    np.testing.assert_allclose(m.convexity, _ql(bonds, "convexity"), rtol=DURATION_RTOL, atol=0)


def test_payment_dates_roll_like_quantlib_government_bond_calendar(book):
    # QuantLib UnitedStates(GovernmentBond) with Following, for flows from 2002 to 2033 where that
    # calendar and the SIFMA calendar agree (tests/market/test_calendar_sifma.py); yields stay on the
    # unadjusted dates
    _, _, _, cf = book
    cal = ql.UnitedStates(ql.UnitedStates.GovernmentBond)
    window = cf.mask & (cf.dates <= np.datetime64("2033-12-31")) & (cf.dates >= np.datetime64("2002-01-01"))
    assert window.sum() > 1000
    expected = [npd(cal.adjust(qd(d), ql.Following)) for d in cf.dates[window]]
    np.testing.assert_array_equal(cf.pay_dates[window], np.array(expected, dtype="datetime64[D]"))
    assert (cf.pay_dates[window] != cf.dates[window]).sum() > 100      # the roll did something
