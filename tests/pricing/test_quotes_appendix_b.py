"""The street pricer and the quote conventions against 31 CFR Part 356, Appendix B and the
money-market closed forms.

Sources: 31 CFR Part 356, Appendix B ("Formulas and Tables"), sections II (notes and bonds) and VI
(bills), read in the current appendix text (REFERENCES.md section 1); REFERENCES.md 1.3 caution on
the fractional first period (Treasury discounts it with simple interest, the street compounds);
SIFMA Standard Securities Calculation Methods' one-period formula for a bond in its final coupon
period (the same simple-interest form as App. B section II with no full periods left).
The Treasury-exact pricer (ladder/pricing/treasury.py) has its own tests; here it only shows the
documented street-vs-Treasury difference.
"""

from dataclasses import replace

import numpy as np
import pytest

from ladder.book.holdings import make_holdings
from ladder.pricing import treasury
from ladder.pricing.cashflows import cash_flows
from ladder.pricing.quotes import dirty_from_quote, measures_from_dirty
from ladder.pricing.yield_math import final_period

D = np.datetime64


def holding(**terms):
    """One holding (model units) and its cash flows at ``settle``."""
    settle = D(terms.pop("settle"))
    h = make_holdings(id=["H1"], face=[1_000_000.0], **{k: [v] for k, v in terms.items()})
    return h, cash_flows(h, settle)


def quoted(h, kind, value):
    return replace(h, quote_type=np.array([kind], dtype=object), quote=np.array([value]))


# --- notes and bonds (section II) ----------------------------------------------------------------------

def ii_a_bond(quote_type, value):
    # App. B II.A: 8 3/4% bond, issued 15 May 1990 (a coupon date), due 15 May 2020, r = s = 184, n = 59
    h, cf = holding(sector="treasury", maturity="2020-05-15", coupon=0.0875, issue_date="1990-05-15",
                    settle="1990-05-15")
    return quoted(h, quote_type, value), cf


def test_ii_a_regular_first_period_street_equals_treasury():
    # 31 CFR 356 App. B II.A: yield 8.84% -> P = 99.057893 (r = s, so the street and Treasury methods agree)
    h, cf = ii_a_bond("yield", 0.0884)
    dirty = dirty_from_quote(h, cf)
    assert cf.accrued[0] == 0.0
    assert round(float(dirty[0] - cf.accrued[0]), 6) == 99.057893
    assert cf.count[0] == 60


def test_ii_a_price_back_to_yield():
    # 31 CFR 356 App. B II.A read backwards: the published price 99.057893 (6 places) gives 8.84%
    h, cf = ii_a_bond("price", 99.057893)
    m = measures_from_dirty(h, cf, dirty_from_quote(h, cf))
    assert float(m.ytm[0]) == pytest.approx(0.0884, abs=1e-8, rel=0)
    assert float(m.bey[0]) == pytest.approx(0.0884, abs=1e-8, rel=0)     # semiannual already: BEY = ytm


def ii_d_note():
    # App. B II.D: 9 1/2% note, interest from 15 Nov 1985, issued 29 Nov 1985, due 15 Nov 1995;
    # r = 167, s = 181, n = 19; yield 9.54%
    return holding(sector="treasury", maturity="1995-11-15", coupon=0.095, issue_date="1985-11-15",
                   settle="1985-11-29")


def test_ii_d_accrued_matches_published():
    # 31 CFR 356 App. B II.D: A = [(s - r)/s](C/2) = (14/181)(4.75) = 0.367403
    h, cf = ii_d_note()
    assert round(float(cf.accrued[0]), 6) == 0.367403


def test_ii_d_street_compounds_the_fractional_period():
    # REFERENCES 1.3 caution [D][V]: the street method (fractional period compounded, (1 + i/2)^(r/s))
    # gives 99.738573 for II.D, 0.00765 above the published Treasury price 99.730918 (simple interest
    # in the fractional period). Our street pricer must give the former.
    h, cf = ii_d_note()
    dirty = dirty_from_quote(quoted(h, "yield", 0.0954), cf)
    street = float(dirty[0] - cf.accrued[0])
    assert street == pytest.approx(99.738573, abs=5e-7, rel=0)
    terms = treasury.yield_to_price_terms(D("1995-11-15"), D("1985-11-15"), D("1986-05-15"), D("1985-11-29"))
    published = float(treasury.price_from_yield(0.095, 0.0954, terms).price[0])
    assert published == 99.730918                                   # 31 CFR 356 App. B II.D, P
    assert street - published == pytest.approx(0.007655, abs=2e-6, rel=0)


# --- the final coupon period (one flow left): simple interest ------------------------------------------

@pytest.mark.parametrize("day_count,maturity,start,settle,coupon,frequency,y", [
    ("ACT/ACT", "2027-05-15", "2026-11-15", "2027-01-20", 0.0425, 2, 0.0390),
    ("30/360", "2027-03-31", "2026-09-30", "2026-12-11", 0.0500, 2, 0.0455),
    ("ACT/ACT", "2027-02-28", "2026-08-31", "2026-08-31", 0.0300, 2, 0.0410),
    ("30/360", "2027-06-15", "2026-06-15", "2027-04-02", 0.0610, 1, 0.0520),
])
def test_final_period_simple_interest_closed_form(day_count, maturity, start, settle, coupon, frequency, y):
    # SIFMA Standard Securities Calculation Methods, one period to redemption (also 31 CFR 356 App. B
    # section II with n = 0): dirty = (100 + C/f) / (1 + (DSR/E)(y/f)), accrued = (A/E)(C/f), with
    # E the days of the period, A the days accrued, DSR = E - A, all on the bond's day count
    # (30/360: 360-day year; ACT/ACT: actual days).
    h, cf = holding(sector="agency", maturity=maturity, coupon=coupon, frequency=frequency, day_count=day_count,
                    issue_date=start, settle=settle)
    assert bool(final_period(cf)[0])
    if day_count == "30/360":
        def days(a, b):
            (y1, m1, d1), (y2, m2, d2) = (map(int, str(a).split("-")), map(int, str(b).split("-")))
            d1 = min(d1, 30)
            d2 = 30 if d2 == 31 and d1 == 30 else d2
            return 360 * (y2 - y1) + 30 * (m2 - m1) + (d2 - d1)
    else:
        def days(a, b):
            return int((D(b) - D(a)).astype(int))
    e, a = days(start, maturity), days(start, settle)
    c = 100 * coupon / frequency
    expected_dirty = (100 + c) / (1 + (e - a) / e * y / frequency)
    dirty = dirty_from_quote(quoted(h, "yield", y), cf)
    assert float(cf.accrued[0]) == pytest.approx(a / e * c, abs=1e-12, rel=0)
    assert float(dirty[0]) == pytest.approx(expected_dirty, rel=1e-13, abs=0)
    m = measures_from_dirty(h, cf, dirty)
    assert float(m.ytm[0]) == pytest.approx(y, abs=1e-12, rel=0)
    t = (e - a) / e / frequency                                   # years to the payment
    assert float(m.macaulay[0]) == pytest.approx(t, rel=1e-12, abs=0)
    assert float(m.modified[0]) == pytest.approx(t / (1 + y / frequency * (e - a) / e), rel=1e-12, abs=0)


# --- bills (section VI) ------------------------------------------------------------------------------------

def bill(settle, maturity, discount_pct):
    h, cf = holding(sector="treasury", kind="discount", maturity=maturity, settle=settle)
    h = quoted(h, "discount", discount_pct / 100)
    return h, cf, dirty_from_quote(h, cf)


def test_vi_a_bill_price_and_investment_rate():
    # 31 CFR 356 App. B VI.A: issued 24 Nov 1989, due 22 Feb 1990, d = 7.610%, r = 90 -> P = 98.097500;
    # investment rate (App. B VI.D.1, y = 365) derived [D][V] in REFERENCES 4.1: 7.865332%
    h, cf, dirty = bill("1989-11-24", "1990-02-22", 7.610)
    assert round(float(dirty[0]), 6) == 98.0975
    m = measures_from_dirty(h, cf, dirty)
    assert float(m.ytm[0]) == pytest.approx(0.07865332, abs=5e-9, rel=0)
    assert float(m.bey[0]) == pytest.approx(0.07865332, abs=5e-9, rel=0)
    assert float(m.ytm[0]) == pytest.approx((100 - 98.0975) / 98.0975 * 365 / 90, rel=1e-13, abs=0)


def test_vi_d_1_cash_management_bill():
    # 31 CFR 356 App. B VI.D.1: 1 Jun -> 21 Jun 1990, 7.930% discount -> P = 99.559444, r = 20, y = 365;
    # i = .080756 is printed after rounding (100 - P)/P to .004425; from the published P = 99.559444 the
    # unrounded rate is .08075725 (REFERENCES 1.4)
    h, cf, dirty = bill("1990-06-01", "1990-06-21", 7.930)
    assert round(float(dirty[0]), 6) == 99.559444
    ytm = float(measures_from_dirty(h, cf, np.array([99.559444])).ytm[0])
    assert ytm == pytest.approx(0.08075725, abs=5e-9, rel=0)
    assert round(round((100 - 99.559444) / 99.559444, 6) * 365 / 20, 6) == 0.080756   # the appendix's rounding


def test_vi_d_2_bill_longer_than_half_a_year():
    # 31 CFR 356 App. B VI.D.2: 52-week bill 7 Jun 1990 -> 6 Jun 1991, P = 92.265000 (7.65% discount),
    # r = 364, y = 365: the quadratic gives i = .082373244
    h, cf, dirty = bill("1990-06-07", "1991-06-06", 7.65)
    assert round(float(dirty[0]), 6) == 92.265
    assert float(measures_from_dirty(h, cf, dirty).ytm[0]) == pytest.approx(0.082373244, abs=5e-10, rel=0)


def test_bill_investment_rate_uses_366_when_the_next_year_has_29_february():
    # 31 CFR 356 App. B VI.D.1: y = 366 when the year following the issue (here: settlement) date contains
    # 29 February (the appendix's example: issue 1 Mar 2019 -> y = 366). A 91-day bill settled 1 Mar 2019
    # at 2.40% discount: P = 100(1 - .024 x 91/360), i = [(100 - P)/P](366/91) (derived from the formula).
    h, cf, dirty = bill("2019-03-01", "2019-05-31", 2.40)
    price = 100 * (1 - 0.024 * 91 / 360)
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    assert float(dirty[0]) == pytest.approx(price, rel=1e-12, abs=0)
    assert float(measures_from_dirty(h, cf, dirty).ytm[0]) == pytest.approx((100 - price) / price * 366 / 91,
                                                                            rel=1e-12, abs=0)


def test_bill_quoted_by_investment_rate_round_trips():
    # App. B VI.D read both ways: a yield quote on a discount holding is its investment rate
    h, cf, dirty = bill("1990-06-07", "1991-06-06", 7.65)
    back = dirty_from_quote(quoted(h, "yield", 0.082373244), cf)
    assert float(back[0]) == pytest.approx(92.265, abs=1e-6, rel=0)


# --- interest-at-maturity (CD) and fund -------------------------------------------------------------------

def test_cd_simple_interest_on_act_360():
    # common practice for CDs (and REFERENCES 4.1's money-market yield): 5% CD 1 Jan -> 30 Jun 2025
    # (180 days, ACT/360) pays 102.5; at 1 Apr 2025 (90 days left) at a 4% money-market yield the
    # dirty price is 102.5 / (1 + .04 x 90/360), accrued 100 x .05 x 90/360 = 1.25
    h, cf = holding(sector="cd", maturity="2025-06-30", coupon=0.05, issue_date="2025-01-01", settle="2025-04-01")
    assert float(cf.amount.sum()) == pytest.approx(102.5, abs=1e-12, rel=0)
    assert float(cf.accrued[0]) == pytest.approx(1.25, abs=1e-12, rel=0)
    dirty = dirty_from_quote(quoted(h, "yield", 0.04), cf)
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    assert float(dirty[0]) == pytest.approx(102.5 / 1.01, rel=1e-12, abs=0)
    m = measures_from_dirty(h, cf, dirty)
    assert float(m.ytm[0]) == pytest.approx(0.04, abs=1e-13, rel=0)
    assert float(m.modified[0]) == pytest.approx(0.25 / 1.01, rel=1e-12, abs=0)     # tau / (1 + y tau)


def test_fund_prices_at_par_with_stated_yield():
    # issue 2 contract: a fund's price is 1.00 a share (100 per 100) and yield_pct is its stated yield;
    # no rate sensitivity
    h, cf = holding(sector="fund", maturity="2026-12-01", settle="2026-11-30")
    h = quoted(h, "yield", 0.0412)
    dirty = dirty_from_quote(h, cf)
    m = measures_from_dirty(h, cf, dirty)
    assert float(dirty[0]) == 100.0
    assert (float(m.ytm[0]), float(m.bey[0]), float(m.modified[0]), float(m.convexity[0])) == (0.0412, 0.0412, 0.0, 0.0)
