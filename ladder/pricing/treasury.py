"""The US Treasury's own formulas: 31 CFR Part 356, Appendix B ("Formulas and Tables").

These are the published reference formulas, kept apart from the street-convention bond pricer
(``ladder.pricing.yield_math``). They differ from it in one place on purpose: Appendix B discounts
the fractional first period with simple interest, 1 + (r/s)(i/2), where the street method compounds,
(1 + i/2)^(r/s); the two agree only when r = s.

- Section I: interest on notes and bonds (regular and odd first coupons, daily interest decimal)
  and I.D accrued interest.
- Section II: yield to price for fixed-coupon (non-indexed) notes and bonds, cases A to G.
- Section VI: bills (discount rate to price, purchase and discount amounts, investment rate).
  Price to discount rate (VI.C) is ``ladder.pricing.money_market.discount_rate``.

Rates and yields are decimals (0.0875 for 8 3/4%); prices per 100 par; interest amounts in
currency units for ``par`` (default $1,000, the appendix's unit); days are actual calendar days.
"Normal rounding" is rounding half away from zero.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.market.dates import add_months, days_between, to_days
from ladder.market.schedule import make_grid
from ladder.pricing import money_market

PAR_UNIT = 1000.0
DAILY_DECIMAL_PLACES = 9      # Table 2 and the section I examples carry the daily decimal to 9 places
ACCRUED_PLACES = 5            # I.D.4
PRICE_PLACES = 6              # II definitions, VI.A note


def _f(x) -> np.ndarray:
    return np.asarray(x, dtype=np.float64)


def round_normal(x, decimals: int | None) -> np.ndarray:
    """``x`` rounded half away from zero to ``decimals`` places; ``None`` leaves it unrounded."""
    x = _f(x)
    if decimals is None:
        return x
    scale = 10.0 ** decimals
    return np.sign(x) * np.floor(np.abs(x) * scale + 0.5) / scale


# --- Section I: interest --------------------------------------------------------------------------

def regular_coupon(rate, par=PAR_UNIT) -> np.ndarray:
    """Regular half-year interest payment: par * rate / 2, whatever the days in the half-year (I.A.1)."""
    return _f(par) * _f(rate) / 2.0


def half_year_days(start) -> np.ndarray:
    """Days in the half-year beginning on ``start`` (I.A.2, Table 1): 181, 182, 183 or 184.

    The half-year ends six calendar months later; a half-year that begins on a month end ends on a
    month end (Table 1's "last days of the months" columns, e.g. 28 Feb -> 31 Aug is 184 days).
    """
    return days_between(start, add_months(start, 6, True))


def daily_interest_decimal(rate, half_year_days, decimals: int | None = DAILY_DECIMAL_PLACES) -> np.ndarray:
    """One day's interest per $1,000 par: (1000 * rate / 2) / days in the half-year (I.A.2).

    Rounded to 9 places as in Table 2 and the I.A and I.D examples (``decimals=None``: unrounded).
    """
    return round_normal(regular_coupon(rate) / _f(half_year_days), decimals)


def fractional_interest(rate, days, half_year_days, par=PAR_UNIT) -> np.ndarray:
    """Interest for ``days`` of a half-year of ``half_year_days`` days: daily decimal * days * par/1000.

    This is a short first coupon (I.A.3: accrual days count from the day after the issue date
    through the first interest date) and the fractional part of a long first coupon (I.A.4).
    """
    return daily_interest_decimal(rate, half_year_days) * _f(days) * _f(par) / PAR_UNIT


def long_first_coupon(rate, days, half_year_days, par=PAR_UNIT) -> np.ndarray:
    """First coupon of a long first period (I.A.4): a regular coupon plus the fractional part.

    ``days`` are the days from the issue date to the start of the regular half-year and
    ``half_year_days`` the days of the full half-year that fractional part falls in.
    """
    return regular_coupon(rate, par) + fractional_interest(rate, days, half_year_days, par)


def accrued_interest(rate, days, half_year_days, par=PAR_UNIT,
                     earlier_days=0.0, earlier_half_year_days=None) -> np.ndarray:
    """Accrued interest payable at issue or reopening (I.D), in currency units for ``par``.

    ``days`` accrued in a half-year of ``half_year_days`` days; when a reopened long first period
    spreads the accrual over two half-years (I.D.3), ``earlier_days`` of the earlier half-year of
    ``earlier_half_year_days`` days. Each part is daily decimal * days; the total per $1,000 is
    rounded to five places, then multiplied by par/1000 and rounded to five places again (I.D.4).
    """
    later = fractional_interest(rate, days, half_year_days)
    earlier_days = _f(earlier_days)
    if earlier_half_year_days is None:
        if np.any(earlier_days != 0):
            raise ValueError("earlier_days needs earlier_half_year_days, the days of that half-year")
        earlier = 0.0
    else:
        earlier = np.where(earlier_days > 0, fractional_interest(rate, earlier_days, earlier_half_year_days), 0.0)
    per_unit = round_normal(later + earlier, ACCRUED_PLACES)
    return round_normal(per_unit * _f(par) / PAR_UNIT, ACCRUED_PLACES)


# --- Section II: yield to price for fixed-coupon notes and bonds ----------------------------------

@dataclass(frozen=True, eq=False)
class YieldToPriceTerms:
    """The quantities of App. B section II for each security (arrays of one length).

    case: "A" regular first period; "B" short first period; "C" long first period (new issue in
      its fractional part); "D" reopening (or new issue accruing from the previous coupon date)
      in a regular period; "E" reopening in the regular part of a long first period; "F" reopening
      in a short first period; "G" reopening in the fractional part of a long first period.
    n: full semiannual periods after the next coupon-frequency date to maturity (the appendix's n:
      one less than the periods remaining when the issue date is a coupon-frequency date).
    r: days from the issue (or reopening) date to the next coupon-frequency date.
    s: days of the full half-year ending on that date.
    r_prime: for E the days of the initial short period (the appendix's r'); otherwise the days
      from the start of accrual to the next coupon-frequency date, which is r for A to C, s for D
      and the appendix's r' for F and G.
    s_prime: for E the days of the half-year ending where the regular part begins (the appendix's
      s'); s otherwise.
    """

    case: np.ndarray
    n: np.ndarray
    r: np.ndarray
    s: np.ndarray
    r_prime: np.ndarray
    s_prime: np.ndarray


@dataclass(frozen=True, eq=False)
class TreasuryPrice:
    """Per 100 par: clean ``price`` P, ``accrued`` interest A and ``dirty`` = P + A."""

    price: np.ndarray
    accrued: np.ndarray
    dirty: np.ndarray


def yield_to_price_terms(maturity, dated_date, first_coupon, settle) -> YieldToPriceTerms:
    """Case and r, s, n, r', s' of App. B section II from dates (``datetime64[D]``, broadcast).

    ``settle`` is the issue date, or the reopening date; ``dated_date`` the date interest accrues
    from (the original issue date, or the preceding coupon date for case D(2)); ``first_coupon``
    the first interest payment date, which must be a coupon-frequency date (as every Treasury's
    is). Coupon-frequency dates run semiannually back from maturity, on month ends for a month-end
    maturity. Expects dated_date <= settle < maturity.
    """
    maturity, dated, first, settle = (np.atleast_1d(a) for a in np.broadcast_arrays(
        to_days(maturity), to_days(dated_date), to_days(first_coupon), to_days(settle)))
    grid = make_grid(maturity, np.full(maturity.shape, 2), np.full(maturity.shape, np.datetime64("NaT", "D")))
    j = grid.index(settle)
    before, start_of_period, nxt = grid.date(j - 1), grid.date(j), grid.date(j + 1)
    r = days_between(settle, nxt)
    s = days_between(start_of_period, nxt)
    before_first = settle < first
    deferred = before_first & (first > nxt)
    two_half_years = before_first & ~deferred & (dated < start_of_period)
    accrual_start = np.where(before_first, dated, start_of_period)
    new_issue = accrual_start == settle
    case = np.select(
        [deferred & new_issue, deferred, two_half_years, new_issue & (r == s), new_issue,
         accrual_start == start_of_period],
        ["C", "G", "E", "A", "B", "D"], "F").astype(object)
    r_prime = np.where(two_half_years, days_between(dated, start_of_period), days_between(accrual_start, nxt))
    s_prime = np.where(two_half_years, days_between(before, start_of_period), s)
    return YieldToPriceTerms(case, -(j + 1), r, s, r_prime, s_prime)


def price_from_yield(coupon_rate, yield_, terms: YieldToPriceTerms,
                     decimals: int | None = PRICE_PLACES) -> TreasuryPrice:
    """Price and accrued interest per 100 par from a semiannual yield, App. B section II cases A-G.

    With C = 100 * coupon_rate, i = yield_, v = 1/(1 + i/2), a_n = (1 - v^n)/(i/2) (a_n = n when
    i = 0), every case is (P + A)[1 + (r/s)(i/2)] = X + (C/2) a_n + 100 v^n, X the first payment term:
      A, B (II.A, II.B):  X = (r/s)(C/2),               A = 0
      C    (II.C):        X = [(r/s)(C/2)] v,           A = 0
      D    (II.D):        X = C/2,                      A = [(s - r)/s](C/2)
      E    (II.E):        X = (r'/s')(C/2) + C/2,       A = (r'/s')(C/2) + [(s - r)/s](C/2)
      F    (II.F):        X = (r'/s)(C/2),              A = [(r' - r)/s](C/2)
      G    (II.G):        X = [(r'/s)(C/2)] v,          A = [(r' - r)/s](C/2)
    which ``terms.r_prime`` folds into X = (r'/s)(C/2) [times v for C, G], A = [(r' - r)/s](C/2)
    outside E. In F and G the first payment uses r' (the whole short coupon), not r as one published copy
    of the formulas prints it: only r' reproduces the published intermediate values (II.F
    5.2214673913 = (183/184)(5.25); II.G 1.549168216 = (61/183)(4.875) v).
    Rounding (``decimals``, default 6): as in the appendix's examples, A and P + A are each rounded
    to six places and P is their difference (II.F: unrounded P = 99.7770734, published 99.777074).
    """
    c = 100.0 * _f(coupon_rate) / 2.0
    i = _f(yield_)
    case = np.asarray(terms.case, dtype=object)
    n, r, s, rp, sp = (_f(x) for x in (terms.n, terms.r, terms.s, terms.r_prime, terms.s_prime))
    half_i = i / 2.0
    v = 1.0 / (1.0 + half_i)
    vn = v ** n
    annuity = np.where(i == 0, n, (1.0 - vn) / np.where(i == 0, 1.0, half_i))
    is_e = case == "E"
    deferred = (case == "C") | (case == "G")
    first = np.where(is_e, rp / sp + 1.0, rp / s) * c * np.where(deferred, v, 1.0)
    accrued = np.where(is_e, rp / sp + (s - r) / s, (rp - r) / s) * c
    dirty = (first + c * annuity + 100.0 * vn) / (1.0 + r / s * half_i)
    accrued, dirty = round_normal(accrued, decimals), round_normal(dirty, decimals)
    return TreasuryPrice(round_normal(dirty - accrued, decimals), accrued, dirty)


# --- Section VI: bills ----------------------------------------------------------------------------

@dataclass(frozen=True, eq=False)
class BillAmounts:
    """Currency amounts for a par amount of bills (VI.B)."""

    purchase_price: np.ndarray
    discount_amount: np.ndarray


def bill_price(discount_rate, days, decimals: int | None = PRICE_PLACES) -> np.ndarray:
    """Price per 100 from a discount rate, P = 100(1 - d r/360), rounded to six places (VI.A)."""
    return round_normal(money_market.discount_price(discount_rate, days), decimals)


def bill_amounts(par, price) -> BillAmounts:
    """Purchase price (par/100 * P) and discount amount (par - purchase price) of bills (VI.B)."""
    purchase = _f(par) / 100.0 * _f(price)
    return BillAmounts(purchase, _f(par) - purchase)


def year_basis(issue_date) -> np.ndarray:
    """y of VI.D.1: 366 if the year following the issue date contains 29 February, else 365.

    Counted as the days to the same date a year later (29 Feb moves to 28 Feb): issue 28 Feb 2019
    gives 365, issue 1 Mar 2019 gives 366 (the examples in VI.D.1).
    """
    return days_between(issue_date, add_months(issue_date, 12))


def bill_investment_rate(price, issue_date, maturity) -> np.ndarray:
    """Investment rate (coupon-equivalent yield) of a bill bought at ``price`` per 100 (VI.D).

    r = days from ``issue_date`` to ``maturity``, y = ``year_basis(issue_date)``; not more than a
    half-year (182 days) uses VI.D.1, i = [(100 - P)/P](y/r); longer uses the VI.D.2 quadratic
    (``money_market.bond_equivalent_yield``).
    """
    return money_market.bond_equivalent_yield(price, days_between(issue_date, maturity),
                                              year_days=year_basis(issue_date))
