"""Money-market conventions: published and derived checks, QuantLib cross-checks, properties.

Sources: 31 CFR Part 356, Appendix B (sections IV and VI); REFERENCES.md section 4 for the derived
checks (marked "derived"); QuantLib as an independent reference for simple interest on day counts.
"""

import numpy as np
import pytest
import QuantLib as ql
from hypothesis import example, given, settings
from hypothesis import strategies as st

from ladder.pricing import money_market as mm

D = np.datetime64
RATE = st.floats(0.0001, 0.15)
DAYS = st.integers(1, 364)
SHORT_DAYS = st.integers(1, 182)
FEW = settings(max_examples=60, deadline=None)


# --- published and derived values ---------------------------------------------------------------

def test_derived_conversions_of_bill_vi_a():
    # Derived (REFERENCES 4.1, [D][V]) on App. B VI.A's bill, d = 7.61%, t = 90, P = 98.0975:
    # MMY = 7.757588%, BEY = 7.865332% = [(100 - P)/P](365/90)
    assert mm.discount_price(0.0761, 90) == pytest.approx(98.0975, abs=1e-12, rel=0)
    assert mm.convert_rate(0.0761, 90, "discount", "money_market") == pytest.approx(0.07757588, abs=5e-9, rel=0)
    assert mm.convert_rate(0.0761, 90, "discount", "bond_equivalent") == pytest.approx(0.07865332, abs=5e-9, rel=0)
    assert mm.money_market_yield(98.0975, 90) == pytest.approx(0.07757588, abs=5e-9, rel=0)
    assert mm.bond_equivalent_yield(98.0975, 90) == pytest.approx(0.07865332, abs=5e-9, rel=0)


def test_frn_index_rate_conversion():
    # 31 CFR 356 App. B IV (FRN index): D = 0.095%, 91 days -> r = D/(1 - (91/360) D) = 0.095022819%
    # (index rate rounded to nine places, in percent)
    got = mm.convert_rate(0.00095, 91, "discount", "money_market")
    assert round(float(got) * 100, 9) == 0.095022819


def test_discount_dv01():
    # Derived (REFERENCES 4.5): DV01 per 100 = 0.01 t/360; a 90-day bill 0.0025 ($25 per $1 million)
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    assert mm.discount_dv01(90) == pytest.approx(0.0025, rel=1e-12, abs=0)
    assert mm.discount_dv01(90) * 1e6 / 100 == pytest.approx(25.0, abs=1e-9, rel=0)


def test_maturity_value_and_accrued_derived():
    # Derived from the simple-interest definition: 5% CD, 1 Jan -> 30 Jun 2025 (180 days) ACT/360
    # pays 100 (1 + 0.05 * 180/360) = 102.5; after 90 days 1.25 has accrued
    assert mm.maturity_value(0.05, D("2025-01-01"), D("2025-06-30")) == pytest.approx(102.5, abs=1e-12, rel=0)
    assert mm.accrued_interest(0.05, D("2025-01-01"), D("2025-04-01")) == pytest.approx(1.25, abs=1e-12, rel=0)
    # ACT/365F: 100 (1 + 0.05 * 180/365)
    assert mm.maturity_value(0.05, D("2025-01-01"), D("2025-06-30"), "ACT/365F") == pytest.approx(
        100 * (1 + 0.05 * 180 / 365), abs=1e-12, rel=0)


def test_money_market_above_bond_equivalent_for_a_year_bill_at_high_rates():
    # The VI.D.2 bill (31 CFR 356 App. B): P = 92.265, 364 days. Its investment rate is 8.237% while
    # its money-market yield (derived) is 8.291%: "MMY < BEY" only holds for t <= 182 days.
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    assert mm.money_market_yield(92.265, 364) == pytest.approx((100 / 92.265 - 1) * 360 / 364, rel=1e-12, abs=0)
    assert mm.money_market_yield(92.265, 364) > mm.bond_equivalent_yield(92.265, 364)


def test_half_year_formulas_meet_at_y_over_2():
    # 31 CFR 356 App. B VI.D.2 with t = y/2 (183 days, y = 366) has a = 0: the quadratic reduces to
    # the VI.D.1 formula i = [(100 - P)/P](y/t)
    p = 96.1
    assert mm.bond_equivalent_yield(p, 183, year_days=366) == pytest.approx((100 - p) / p * 366 / 183, rel=1e-13, abs=0)


def test_unknown_measure_and_act_act_are_refused():
    with pytest.raises(ValueError):
        mm.convert_rate(0.05, 90, "discount", "continuous")
    with pytest.raises(ValueError):
        mm.maturity_value(0.05, D("2025-01-01"), D("2025-06-30"), "ACT/ACT")


def test_vectorized_per_row_day_counts():
    codes = np.array(["ACT/360", "ACT/365F", "30/360"], dtype=object)
    issue = np.array(["2025-01-31", "2025-01-31", "2025-01-31"], dtype="datetime64[D]")
    maturity = np.array(["2025-07-31", "2025-07-31", "2025-07-31"], dtype="datetime64[D]")
    # Derived: 181 actual days; 30/360 bond basis counts 31 Jan -> 31 Jul as 180 days
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    np.testing.assert_allclose(mm.maturity_value(0.04, issue, maturity, codes),
                               100 * (1 + 0.04 * np.array([181 / 360, 181 / 365, 180 / 360])), rtol=1e-12, atol=0)


# --- QuantLib as an independent reference ---------------------------------------------------------

QL_DAY_COUNTS = {
    "ACT/360": ql.Actual360(),
    "ACT/365F": ql.Actual365Fixed(),
    "30/360": ql.Thirty360(ql.Thirty360.BondBasis),
    "ACT/ACT-ISDA": ql.ActualActual(ql.ActualActual.ISDA),
}


def _ql_date(d):
    y, m, day = (int(x) for x in str(d).split("-"))
    return ql.Date(day, m, y)


def test_simple_interest_against_quantlib():
    # QuantLib InterestRate(Simple): compound factor 1 + r tau on each day count, 40 seeded CDs
    rng = np.random.default_rng(7)
    issue = D("2024-01-01") + rng.integers(0, 700, 40)
    maturity = issue + rng.integers(7, 400, 40)
    settle = issue + (rng.random(40) * (maturity - issue).astype(int)).astype(int)
    coupon, yld = rng.uniform(0.005, 0.07, 40), rng.uniform(0.005, 0.07, 40)
    for code, dc in QL_DAY_COUNTS.items():
        mv = mm.maturity_value(coupon, issue, maturity, code)
        dirty = mm.dirty_price_from_yield(yld, settle, maturity, mv, code)
        accrued = mm.accrued_interest(coupon, issue, settle, code)
        for k in range(40):
            i, m, s = _ql_date(issue[k]), _ql_date(maturity[k]), _ql_date(settle[k])
            ql_mv = 100 * ql.InterestRate(coupon[k], dc, ql.Simple, ql.Annual).compoundFactor(i, m)
            ql_dirty = ql_mv * ql.InterestRate(yld[k], dc, ql.Simple, ql.Annual).discountFactor(s, m)
            ql_accrued = 100 * (ql.InterestRate(coupon[k], dc, ql.Simple, ql.Annual).compoundFactor(i, s) - 1)
            assert mv[k] == pytest.approx(ql_mv, rel=1e-12, abs=0), code
            assert dirty[k] == pytest.approx(ql_dirty, rel=1e-12, abs=0), code
            assert accrued[k] == pytest.approx(ql_accrued, abs=1e-10, rel=0), code


def test_single_payment_risk_against_quantlib():
    # QuantLib BondFunctions modified duration and convexity of a zero-coupon bond paying the CD's
    # maturity value, with a simple ACT/360 yield; 20 seeded cases
    rng = np.random.default_rng(11)
    for _ in range(20):
        issue = ql.Date(2, 1, 2025)
        maturity = issue + int(rng.integers(10, 360))
        settle = issue + int(rng.integers(0, maturity - issue))
        payoff, yld = float(rng.uniform(100, 106)), float(rng.uniform(0.001, 0.08))
        bond = ql.ZeroCouponBond(0, ql.NullCalendar(), 100.0, maturity, ql.Unadjusted, payoff, issue)
        rate = ql.InterestRate(yld, ql.Actual360(), ql.Simple, ql.Annual)
        tau = (maturity - settle) / 360
        risk = mm.single_payment_risk(yld, tau, payoff)
        assert risk.modified_duration == pytest.approx(
            ql.BondFunctions.duration(bond, rate, ql.Duration.Modified, settle), rel=1e-10, abs=0)
        assert risk.convexity == pytest.approx(ql.BondFunctions.convexity(bond, rate, settle), rel=1e-10, abs=0)
        assert mm.price_from_money_market_yield(yld, maturity - settle, payoff) == pytest.approx(
            bond.dirtyPrice(yld, ql.Actual360(), ql.Simple, ql.Annual, settle), rel=1e-12, abs=0)


# --- identities and properties ------------------------------------------------------------------

@FEW
@given(d=RATE, t=DAYS)
def test_closed_forms(d, t):
    # 31 CFR 356 App. B IV and VI.D.1 / REFERENCES 4.1: MMY = 360d/(360 - dt); BEY (t <= 182) = 365d/(360 - dt)
    # The conversion goes through the price: 100 - price = d t / 3.6 keeps only ~log10(360 / (d t)) fewer
    # digits, up to 6.5 at d = 0.01%, one day, so a relative 1e-9 (measured worst near 1e-11 here).
    assert mm.convert_rate(d, t, "discount", "money_market") == pytest.approx(360 * d / (360 - d * t),
                                                                               rel=1e-9, abs=0)
    if t <= 182:
        assert mm.convert_rate(d, t, "discount", "bond_equivalent") == pytest.approx(365 * d / (360 - d * t),
                                                                                      rel=1e-9, abs=0)


@FEW
@given(rate=RATE, t=DAYS, source=st.sampled_from(mm.MEASURES), target=st.sampled_from(mm.MEASURES),
       year_days=st.sampled_from([365, 366]))
def test_round_trips(rate, t, source, target, year_days):
    # Identity: converting there and back returns the rate; price -> rate -> price likewise.
    # Relative 1e-9: each leg goes through a price within d t / 3.6 of 100, which at 0.01% for one day
    # leaves ~9.5 significant digits of the rate (measured 4e-10).
    there = mm.convert_rate(rate, t, source, target, year_days)
    assert mm.convert_rate(there, t, target, source, year_days) == pytest.approx(rate, rel=1e-9, abs=0)


@FEW
@given(price=st.floats(85, 99.999), t=DAYS, payoff=st.floats(100, 108), year_days=st.sampled_from([365, 366]))
def test_price_yield_inverses(price, t, payoff, year_days):
    # Identity: each price -> yield function inverts its yield -> price function
    bey = mm.bond_equivalent_yield(price, t, payoff, year_days)
    assert mm.price_from_bond_equivalent_yield(bey, t, payoff, year_days) == pytest.approx(price, rel=1e-12, abs=0)
    mmy = mm.money_market_yield(price, t, payoff)
    assert mm.price_from_money_market_yield(mmy, t, payoff) == pytest.approx(price, rel=1e-12, abs=0)
    assert mm.discount_price(mm.discount_rate(price, t), t) == pytest.approx(price, rel=1e-12, abs=0)


@FEW
@given(y=RATE, dy=st.floats(1e-5, 0.01), t=DAYS)
def test_price_falls_as_discount_rate_rises(y, dy, t):
    # Common practice: a higher rate means a lower price, on every measure
    for price in (mm.discount_price, mm.price_from_money_market_yield, mm.price_from_bond_equivalent_yield):
        assert price(y + dy, t) < price(y, t)


@FEW
@given(d=RATE, t=SHORT_DAYS)
def test_discount_below_money_market_below_bond_equivalent(d, t):
    # Common practice: for the same bill (t <= 182 days) discount rate < MMY < BEY
    mmy = mm.convert_rate(d, t, "discount", "money_market")
    bey = mm.convert_rate(d, t, "discount", "bond_equivalent")
    assert d < mmy < bey


@FEW
@given(coupon=RATE, term=st.integers(1, 730), code=st.sampled_from(list(QL_DAY_COUNTS)))
def test_cd_at_its_coupon_on_issue_costs_par(coupon, term, code):
    # Common practice: a CD bought on its issue date at a yield equal to its coupon costs 100
    issue = D("2025-03-14")
    mv = mm.maturity_value(coupon, issue, issue + term, code)
    assert mm.dirty_price_from_yield(coupon, issue, issue + term, mv, code) == pytest.approx(100.0, rel=1e-13, abs=0)
    # relative 1e-9: the yield comes from payoff - 100, which for a small coupon over a few days keeps only
    # ~9.5 of the price's 16 digits
    assert mm.yield_from_dirty_price(100.0, issue, issue + term, mv, code) == pytest.approx(coupon, rel=1e-9, abs=0)
    # accrued interest at maturity is the whole interest
    assert mm.accrued_interest(coupon, issue, issue + term, code) == pytest.approx(mv - 100.0, abs=1e-10, rel=0)


@FEW
@given(y=RATE, t=DAYS, payoff=st.floats(100, 108))
def test_single_payment_risk_matches_finite_differences(y, t, payoff):
    # Derived: modified = -(1/P) dP/dy, convexity = (1/P) d2P/dy2, DV01 = P(y - 0.5bp) - P(y + 0.5bp)
    tau = t / 360
    risk = mm.single_payment_risk(y, tau, payoff)
    h = 1e-4

    def price(rate):
        return mm.price_from_money_market_yield(rate, t, payoff)
    p = price(y)
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    assert risk.macaulay_duration == pytest.approx(tau, rel=1e-12, abs=0)
    assert risk.modified_duration == pytest.approx(-(price(y + h) - price(y - h)) / (2 * h) / p, rel=1e-6, abs=0)
    wide = 1e-3 / tau   # a step of 1e-3 in y*tau keeps both rounding and truncation below 1e-5
    assert risk.convexity == pytest.approx((price(y + wide) - 2 * p + price(y - wide)) / wide**2 / p, rel=1e-5, abs=0)
    assert risk.dv01 == pytest.approx(price(y - h / 2) - price(y + h / 2), rel=1e-7, abs=0)
    # Common practice: modified < Macaulay at a positive yield; convexity of a single payment > 0
    assert risk.modified_duration < risk.macaulay_duration and risk.convexity > 0


@FEW
@given(d=RATE, t=DAYS)
def test_discount_dv01_is_the_price_change(d, t):
    # Derived (REFERENCES 4.5): on the discount basis price is linear in d
    change = mm.discount_price(d - 0.00005, t) - mm.discount_price(d + 0.00005, t)
    assert mm.discount_dv01(t) == pytest.approx(change, rel=1e-8, abs=0)


@FEW
@given(coupon=RATE, t=SHORT_DAYS)
def test_bond_equivalent_yield_of_a_cd_at_issue(coupon, t):
    # Derived: a CD bought at par on issue (ACT/360) has BEY = coupon * 365/360 for t <= 182 days
    issue = D("2025-06-02")
    mv = mm.maturity_value(coupon, issue, issue + t)
    # relative 1e-9: the yield comes from payoff - 100 (digits lost to cancellation, as above)
    assert mm.bond_equivalent_yield(100.0, t, mv) == pytest.approx(coupon * 365 / 360, rel=1e-9, abs=0)


@FEW
@given(price=st.floats(88, 99.99), t=DAYS, year_days=st.sampled_from([365, 366]))
@example(price=97.5, t=182, year_days=365)
@example(price=97.5, t=183, year_days=365)
def test_bond_equivalent_yield_solves_the_published_equation(price, t, year_days):
    # 31 CFR 356 App. B VI.D: up to 182 days i = [(100 - P)/P](y/t) (VI.D.1); beyond,
    # P[1 + (t - y/2)(i/y)](1 + i/2) = 100 (VI.D.2)
    i = mm.bond_equivalent_yield(price, t, year_days=year_days)
    if t <= 182:
        assert i == pytest.approx((100 - price) / price * year_days / t, rel=1e-12, abs=0)
    else:
        assert price * (1 + (t - year_days / 2) * i / year_days) * (1 + i / 2) == pytest.approx(100.0, rel=1e-12, abs=0)
