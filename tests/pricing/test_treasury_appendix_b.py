"""The US Treasury's formulas against the worked examples of 31 CFR Part 356, Appendix B.

Every pinned figure is a published value of the appendix (section named beside each check),
read in the current appendix text; see /work/shared/REFERENCES.md section 1.
"""

import numpy as np
import pytest
import QuantLib as ql
from hypothesis import given, settings
from hypothesis import strategies as st

from ladder.market.dates import add_months, days_between
from ladder.pricing import money_market, treasury
from ladder.pricing.treasury import YieldToPriceTerms

D = np.datetime64


def days(start, end):
    return float(days_between(D(start), D(end)))


# --- Section I.A: interest ------------------------------------------------------------------------

def test_regular_coupon():
    # 31 CFR 356 App. B I.A.1: $1,000 at 8% pays ($1,000 x .08)/2 = $40
    assert treasury.regular_coupon(0.08) == pytest.approx(40.0, abs=1e-12, rel=0)


# 31 CFR 356 App. B I.A.2, Table 1 (rows as listed in REFERENCES 1.1): the half-year that starts
# on the 1st/15th or on a month end, in a regular and in a leap year.
TABLE_1 = [
    ("1990-01-15", 181), ("1992-01-15", 182), ("1990-01-31", 181), ("1992-01-31", 182),   # Jan-Jul
    ("1990-02-15", 181), ("1992-02-15", 182), ("1990-02-28", 184), ("1992-02-29", 184),   # Feb-Aug
    ("1990-05-15", 184), ("1992-05-15", 184), ("1990-05-31", 183), ("1992-05-31", 183),   # May-Nov
    ("1990-08-15", 184), ("1991-08-15", 184), ("1990-08-31", 181), ("1991-08-31", 182),   # Aug-Feb
    ("1990-11-15", 181), ("1991-11-15", 182), ("1990-11-30", 182), ("1991-11-30", 183),   # Nov-May
]


@pytest.mark.parametrize("start, expected", TABLE_1)
def test_half_year_days_table_1(start, expected):
    # 31 CFR 356 App. B I.A.2, Table 1
    assert treasury.half_year_days(D(start)) == expected


def test_half_year_days_vectorized():
    starts = np.array([s for s, _ in TABLE_1], dtype="datetime64[D]")
    # 31 CFR 356 App. B I.A.2, Table 1 (the same rows as one array)
    np.testing.assert_array_equal(treasury.half_year_days(starts), [n for _, n in TABLE_1])


def test_short_first_coupon_i_a_3():
    # 31 CFR 356 App. B I.A.3: 8 3/8% 2-year note issued 2 Jul 1990, first coupon 31 Dec 1990;
    # the half-year 30 Jun - 31 Dec 1990 has 184 days; 182 days of interest
    assert treasury.half_year_days(D("1990-06-30")) == 184
    assert days("1990-07-02", "1990-12-31") == 182
    assert treasury.daily_interest_decimal(0.08375, 184) == pytest.approx(0.227581522, abs=1e-13, rel=0)
    assert treasury.fractional_interest(0.08375, 182, 184) == pytest.approx(41.419837004, abs=1e-10, rel=0)
    amount = treasury.fractional_interest(0.08375, 182, 184, par=20_000)
    assert amount == pytest.approx(828.39674008, abs=1e-9, rel=0)     # I.A.3: $828.39674008
    assert round(float(amount), 2) == 828.40                     # I.A.3: paid as $828.40


def test_long_first_coupon_i_a_4():
    # 31 CFR 356 App. B I.A.4: 7 7/8% 5-year 2-month note issued 3 Dec 1990, first coupon
    # 15 Aug 1991; fractional part 3 Dec 1990 -> 15 Feb 1991 (74 days) of the 184-day half-year
    # 15 Aug 1990 - 15 Feb 1991, plus the regular $39.375
    assert days("1990-12-03", "1991-02-15") == 74
    assert treasury.half_year_days(D("1990-08-15")) == 184
    assert treasury.regular_coupon(0.07875) == pytest.approx(39.375, abs=1e-12, rel=0)
    assert treasury.daily_interest_decimal(0.07875, 184) == pytest.approx(0.213994565, abs=1e-13, rel=0)
    assert treasury.fractional_interest(0.07875, 74, 184) == pytest.approx(15.835597810, abs=1e-10, rel=0)
    assert treasury.long_first_coupon(0.07875, 74, 184) == pytest.approx(55.210597810, abs=1e-10, rel=0)
    amount = treasury.long_first_coupon(0.07875, 74, 184, par=7_000)
    assert amount == pytest.approx(386.474184670, abs=1e-9, rel=0)      # I.A.4
    assert round(float(amount), 2) == 386.47                      # I.A.4: paid as $386.47


def test_daily_decimal_unrounded_option():
    # 31 CFR 356 App. B I.A.2 defines the decimal as (rate/2)/days; Table 2 prints it to 9 places
    exact = treasury.daily_interest_decimal(0.08375, 184, decimals=None)
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    assert exact == pytest.approx(41.875 / 184, rel=1e-12, abs=0)
    assert exact != treasury.daily_interest_decimal(0.08375, 184)


# --- Section I.D: accrued interest ----------------------------------------------------------------

def test_accrued_interest_one_half_year():
    # 31 CFR 356 App. B I.D, example (1): 6 3/4% note issued 15 May 2000, reopened 15 Aug 2000;
    # 92 days of the 184-day half-year: $16.87500 per $1,000, $2,531.25 for $150,000
    assert days("2000-05-15", "2000-08-15") == 92
    assert treasury.half_year_days(D("2000-05-15")) == 184
    assert treasury.daily_interest_decimal(0.0675, 184) == pytest.approx(0.183423913, abs=1e-13, rel=0)
    assert treasury.accrued_interest(0.0675, 92, 184) == pytest.approx(16.87500, abs=1e-12, rel=0)
    assert treasury.accrued_interest(0.0675, 92, 184, par=150_000) == pytest.approx(2531.25, abs=1e-9, rel=0)


def test_accrued_interest_two_half_years():
    # 31 CFR 356 App. B I.D, example (2): 10 3/4% bond issued 2 Jul 1985 (first coupon 15 Feb 1986),
    # reopened 4 Nov 1985: 44 days of a 181-day half-year, then 81 days of a 184-day half-year
    assert days("1985-07-02", "1985-08-15") == 44 and treasury.half_year_days(D("1985-02-15")) == 181
    assert days("1985-08-15", "1985-11-04") == 81 and treasury.half_year_days(D("1985-08-15")) == 184
    assert treasury.fractional_interest(0.1075, 44, 181) == pytest.approx(13.066298344, abs=1e-10, rel=0)
    assert treasury.fractional_interest(0.1075, 81, 184) == pytest.approx(23.661684765, abs=1e-10, rel=0)
    per_1000 = treasury.accrued_interest(0.1075, 81, 184, earlier_days=44, earlier_half_year_days=181)
    assert per_1000 == pytest.approx(36.72798, abs=1e-12, rel=0)              # I.D: $36.72798 per $1,000
    total = treasury.accrued_interest(0.1075, 81, 184, 11_000, 44, 181)
    assert total == pytest.approx(404.00778, abs=1e-10, rel=0)                 # I.D: $404.00778
    assert round(float(total), 2) == 404.01                             # I.D: ($404.01)


def test_accrued_interest_vectorized_and_requires_half_year():
    # 31 CFR 356 App. B I.D, both examples at once
    got = treasury.accrued_interest([0.0675, 0.1075], [92, 81], [184, 184], [150_000, 11_000],
                                    earlier_days=[0, 44], earlier_half_year_days=[181, 181])
    np.testing.assert_allclose(got, [2531.25, 404.00778], atol=1e-10, rtol=0)
    with pytest.raises(ValueError):
        treasury.accrued_interest(0.1075, 81, 184, earlier_days=44)


# --- Section II: yield to price ---------------------------------------------------------------

# (section, coupon, yield, maturity, dated date, first coupon, issue/reopening date,
#  published n, r, s, r', s', accrued A, P + A, P) -- 31 CFR 356 App. B II.A-II.G examples.
# r' and s' are the appendix's where it defines them (E, F, G); elsewhere the module's convention
# (r' = r for A-C, r' = s for D, s' = s; see YieldToPriceTerms).
SECTION_II = [
    ("A", 0.0875, 0.0884, "2020-05-15", "1990-05-15", "1990-11-15", "1990-05-15",
     59, 184, 184, 184, 184, 0.0, 99.057893, 99.057893),
    ("B", 0.085, 0.0859, "1992-03-31", "1990-04-02", "1990-09-30", "1990-04-02",
     3, 181, 183, 181, 183, 0.0, 99.838183, 99.838183),
    ("C", 0.085, 0.0853, "1995-05-15", "1990-03-01", "1990-11-15", "1990-03-01",
     10, 75, 181, 75, 181, 0.0, 99.805118, 99.805118),
    ("D", 0.095, 0.0954, "1995-11-15", "1985-11-15", "1986-05-15", "1985-11-29",
     19, 167, 181, 181, 181, 0.367403, 100.098321, 99.730918),
    ("E", 0.1075, 0.1047, "2005-08-15", "1985-07-02", "1986-02-15", "1985-11-04",
     39, 103, 184, 44, 181, 3.672798, 105.887384, 102.214586),
    ("F", 0.105, 0.1053, "1991-05-15", "1983-05-16", "1983-11-15", "1983-08-15",
     15, 92, 184, 183, 184, 2.596467, 102.373541, 99.777074),
    ("G", 0.0975, 0.0979, "1994-12-15", "1988-10-15", "1989-06-15", "1988-11-15",
     12, 30, 183, 61, 183, 0.825820, 100.563865, 99.738045),
]
COLUMNS = list(zip(*SECTION_II))


def _published_terms(rows=SECTION_II) -> YieldToPriceTerms:
    cols = list(zip(*rows))
    return YieldToPriceTerms(np.array(cols[0], dtype=object), np.array(cols[7]),
                             *(np.array(c, float) for c in cols[8:12]))


@pytest.mark.parametrize("row", SECTION_II, ids=[r[0] for r in SECTION_II])
def test_terms_from_dates_match_published(row):
    # 31 CFR 356 App. B II.A-II.G: the case, n, r, s (and r', s' for E-G) of each example
    case, _, _, maturity, dated, first, settle, n, r, s, rp, sp = row[:12]
    t = treasury.yield_to_price_terms(D(maturity), D(dated), D(first), D(settle))
    assert (t.case[0], t.n[0], t.r[0], t.s[0], t.r_prime[0], t.s_prime[0]) == (case, n, r, s, rp, sp)


@pytest.mark.parametrize("row", SECTION_II, ids=[r[0] for r in SECTION_II])
def test_price_from_published_terms(row):
    # 31 CFR 356 App. B section II, the example of case row[0]: A, P + A and P to six places
    coupon, yld, accrued, dirty, price = row[1], row[2], row[12], row[13], row[14]
    got = treasury.price_from_yield(coupon, yld, _published_terms([row]))
    assert got.accrued[0] == pytest.approx(accrued, abs=1e-9, rel=0)
    assert got.dirty[0] == pytest.approx(dirty, abs=1e-9, rel=0)
    assert got.price[0] == pytest.approx(price, abs=1e-9, rel=0)


def test_price_from_dates_all_cases_at_once():
    # 31 CFR 356 App. B II.A-II.G, from the examples' dates in one vectorized call
    terms = treasury.yield_to_price_terms(*(np.array(COLUMNS[k], dtype="datetime64[D]") for k in (3, 4, 5, 6)))
    got = treasury.price_from_yield(np.array(COLUMNS[1]), np.array(COLUMNS[2]), terms)
    np.testing.assert_allclose(got.price, COLUMNS[14], atol=1e-9, rtol=0)
    np.testing.assert_allclose(got.accrued, COLUMNS[12], atol=1e-9, rtol=0)
    np.testing.assert_allclose(got.dirty, COLUMNS[13], atol=1e-9, rtol=0)


# The published right-hand side F + (C/2)a_n + 100v^n of each section II example (31 CFR 356 App. B
# II.A-II.G). They are sums of terms printed to 8-10 places, hence the 1e-8 tolerance. F and G only
# reproduce with r' in the first term: II.F 5.2214673913 = (183/184)(5.25), II.G 1.549168216.
RIGHT_HAND_SIDES = {"A": 103.4362514884, "B": 104.0793687354, "C": 101.5689391251, "D": 104.5036982843,
                    "E": 108.9903734482, "F": 105.0685242633, "G": 101.3708487520}


@pytest.mark.parametrize("row", SECTION_II, ids=[r[0] for r in SECTION_II])
def test_published_right_hand_sides(row):
    # 31 CFR 356 App. B section II: (P + A)[1 + (r/s)(i/2)] equals the published right-hand side
    got = treasury.price_from_yield(row[1], row[2], _published_terms([row]), decimals=None)
    r, s = row[8], row[9]
    assert got.dirty[0] * (1 + r / s * row[2] / 2) == pytest.approx(RIGHT_HAND_SIDES[row[0]], abs=1e-8, rel=0)


def test_reopening_accrued_parts_ii_e():
    # 31 CFR 356 App. B II.E: A = AI1 + AI2 = 1.306630 + 2.366168 (each published to six places)
    got = treasury.price_from_yield(0.1075, 0.1047, _published_terms(SECTION_II[4:5]), decimals=None)
    assert got.accrued[0] == pytest.approx(1.306630 + 2.366168, abs=1e-6, rel=0)


def test_published_rounding_of_case_f():
    # 31 CFR 356 App. B II.F: P = 102.373541 - 2.596467 = 99.777074, although the unrounded clean
    # price (99.7770734) would round to 99.777073: the appendix rounds P + A and A, then subtracts
    unrounded = treasury.price_from_yield(0.105, 0.1053, _published_terms(SECTION_II[5:6]), decimals=None)
    assert round(float(unrounded.price[0]), 6) == 99.777073
    rounded = treasury.price_from_yield(0.105, 0.1053, _published_terms(SECTION_II[5:6]))
    assert rounded.price[0] == pytest.approx(99.777074, abs=1e-9, rel=0)


def test_zero_yield_uses_a_n_equal_n():
    # 31 CFR 356 App. B II definitions: if i = 0, a_n = n; at zero yield the price is the plain sum
    # of the remaining payments: case A, 59 + 1 coupons of C/2 plus 100
    got = treasury.price_from_yield(0.0875, 0.0, _published_terms(SECTION_II[:1]), decimals=None)
    assert got.price[0] == pytest.approx(100 + 60 * 4.375, abs=1e-9, rel=0)


def _ql_bond(issue, maturity, coupon):
    schedule = ql.Schedule(issue, maturity, ql.Period(ql.Semiannual), ql.NullCalendar(), ql.Unadjusted,
                           ql.Unadjusted, ql.DateGeneration.Backward, False)
    day_count = ql.ActualActual(ql.ActualActual.Bond, schedule)
    return ql.FixedRateBond(0, 100.0, schedule, [coupon], day_count), day_count


def test_simple_fractional_period_differs_from_compounding():
    # QuantLib (compounded street method) as independent reference. When r = s (II.A) the two
    # methods coincide: QuantLib reproduces the published 99.057893.
    bond, dc = _ql_bond(ql.Date(15, 5, 1990), ql.Date(15, 5, 2020), 0.0875)
    ql_a = bond.cleanPrice(0.0884, dc, ql.Compounded, ql.Semiannual, ql.Date(15, 5, 1990))
    assert ql_a == pytest.approx(99.057893, abs=5e-7, rel=0)
    # With r < s (II.D) compounding gives 99.738573 (REFERENCES 1.3, derived), 0.00765 above the
    # Treasury's simple-interest 99.730918: the module must follow the appendix, not the street.
    bond, dc = _ql_bond(ql.Date(15, 11, 1985), ql.Date(15, 11, 1995), 0.095)
    ql_d = bond.cleanPrice(0.0954, dc, ql.Compounded, ql.Semiannual, ql.Date(29, 11, 1985))
    ours = treasury.price_from_yield(0.095, 0.0954, _published_terms(SECTION_II[3:4])).price[0]
    assert ql_d == pytest.approx(99.738573, abs=5e-7, rel=0)
    assert ql_d - ours == pytest.approx(0.007655, abs=2e-6, rel=0)


@settings(max_examples=60, deadline=None)
@given(coupon=st.integers(1, 64).map(lambda k: k / 800), periods=st.integers(1, 60))
def test_at_par_on_a_coupon_date(coupon, periods):
    # Common practice: a bond issued on a coupon date and priced at its coupon rate is at par
    maturity = np.datetime64("2040-05-15")
    issue = add_months(maturity, -6 * periods)
    terms = treasury.yield_to_price_terms(maturity, issue, add_months(issue, 6), issue)
    assert terms.case[0] == "A"
    assert terms.n[0] == periods - 1                  # App. B II definitions: one less than remaining
    assert treasury.price_from_yield(coupon, coupon, terms, decimals=None).price[0] == pytest.approx(100.0,
                                                                                                     abs=1e-9, rel=0)


@settings(max_examples=60, deadline=None)
@given(shift=st.floats(1e-4, 0.02), row=st.sampled_from(SECTION_II))
def test_price_falls_as_yield_rises(shift, row):
    # Common practice: for every case, price falls as yield rises
    terms = _published_terms([row])
    low = treasury.price_from_yield(row[1], row[2], terms, decimals=None)
    high = treasury.price_from_yield(row[1], row[2] + shift, terms, decimals=None)
    assert high.dirty[0] < low.dirty[0]
    assert high.accrued[0] == low.accrued[0]


def test_settlement_after_the_first_coupon_is_a_regular_period():
    # Derived from App. B II.D: after the first coupon, accrual runs from the previous coupon date
    # (II.A's bond settled 10 Jan 1991: 56 days accrued of the 181-day half-year 15 Nov - 15 May)
    t = treasury.yield_to_price_terms(D("2020-05-15"), D("1990-05-15"), D("1990-11-15"), D("1991-01-10"))
    assert (t.case[0], t.n[0], t.r[0], t.s[0], t.r_prime[0]) == ("D", 58, 125, 181, 181)
    got = treasury.price_from_yield(0.0875, 0.0884, t, decimals=None)
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    assert got.accrued[0] == pytest.approx(56 / 181 * 4.375, rel=1e-12, abs=0)
    # and on a coupon date it is case A with nothing accrued
    on_coupon = treasury.yield_to_price_terms(D("2020-05-15"), D("1990-05-15"), D("1990-11-15"), D("1991-05-15"))
    assert (on_coupon.case[0], on_coupon.n[0], on_coupon.r[0]) == ("A", 57, 184)


# --- Section VI: bills --------------------------------------------------------------------------

def test_bill_price_vi_a():
    # 31 CFR 356 App. B VI.A: issued 24 Nov 1989, due 22 Feb 1990 (90 days), 7.610% -> 98.097500
    assert days("1989-11-24", "1990-02-22") == 90
    assert treasury.bill_price(0.0761, 90) == pytest.approx(98.097500, abs=1e-12, rel=0)


def test_bill_prices_of_the_vi_d_examples():
    # 31 CFR 356 App. B VI.D.1: 7.930% for 20 days -> 99.559444; VI.D.2: 7.65% for 364 days -> 92.265000
    np.testing.assert_allclose(treasury.bill_price([0.0793, 0.0765], [20, 364]), [99.559444, 92.265000],
                               atol=1e-12, rtol=0)


def test_bill_amounts_vi_b():
    # 31 CFR 356 App. B VI.B: $10,000 at 98.098000 -> purchase price $9,809.80, discount $190.20
    got = treasury.bill_amounts(10_000, 98.098)
    assert got.purchase_price == pytest.approx(9809.80, abs=1e-9, rel=0)
    assert got.discount_amount == pytest.approx(190.20, abs=1e-9, rel=0)


def test_discount_rate_from_price_vi_c():
    # 31 CFR 356 App. B VI.C: 26-week bill 30 Dec 1982 -> 30 Jun 1983 (182 days), P = 95.934567:
    # d = .080415158 -> 8.042%
    assert days("1982-12-30", "1983-06-30") == 182
    d = money_market.discount_rate(95.934567, 182)
    assert d == pytest.approx(0.080415158, abs=5e-10, rel=0)
    assert round(float(d) * 100, 3) == 8.042


def test_year_basis_vi_d_1():
    # 31 CFR 356 App. B VI.D.1: issue 28 Feb 2019 -> y = 365; issue 1 Mar 2019 -> y = 366
    got = treasury.year_basis(np.array(["2019-02-28", "2019-03-01", "1990-06-01"], dtype="datetime64[D]"))
    np.testing.assert_array_equal(got, [365, 366, 365])


def test_investment_rate_half_year_or_less_vi_d_1():
    # 31 CFR 356 App. B VI.D.1: cash-management bill 1 Jun -> 21 Jun 1990, P = 99.559444, r = 20,
    # y = 365: i = .080756 -> 8.076% (the text rounds (100-P)/P to .004425 first; unrounded the
    # same formula gives .08075725, REFERENCES 1.4)
    i = treasury.bill_investment_rate(99.559444, D("1990-06-01"), D("1990-06-21"))
    assert i == pytest.approx(0.08075725, abs=5e-9, rel=0)
    assert round(float(i) * 100, 3) == 8.076


def test_investment_rate_in_a_366_day_year():
    # 31 CFR 356 App. B VI.D.1 with y = 366 (issue 1 Mar 2019, 91 days), derived from the formula
    issue = np.array(["2019-03-01", "2019-02-28"], dtype="datetime64[D]")
    i = treasury.bill_investment_rate(np.array([98.8, 98.8]), issue, issue + 91)
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    np.testing.assert_allclose(i, [(100 - 98.8) / 98.8 * 366 / 91, (100 - 98.8) / 98.8 * 365 / 91], rtol=1e-12, atol=0)


def test_investment_rate_more_than_half_year_vi_d_2():
    # 31 CFR 356 App. B VI.D.2: 52-week bill 7 Jun 1990 -> 6 Jun 1991, P = 92.265000, r = 364,
    # y = 365: a = .248630137, b = .997260274, c = -.083834607, i = .082373244 -> 8.237%
    i = treasury.bill_investment_rate(92.265, D("1990-06-07"), D("1991-06-06"))
    assert i == pytest.approx(0.082373244, abs=5e-10, rel=0)
    assert round(float(i) * 100, 3) == 8.237
    # the quadratic's own terms, from the quantities (App. B VI.D.2)
    assert money_market.bond_equivalent_yield(92.265, 364, year_days=365) == pytest.approx(0.082373244,
                                                                                           abs=5e-10, rel=0)
