"""Money-market conventions for single-payment instruments, vectorized over numpy arrays.

Instruments: discount instruments (bills, commercial paper, discount notes) quoted by a discount
rate, and interest-at-maturity instruments (CDs, term deposits) paying coupon and principal at
maturity with simple interest on their day count.

Measures, for a price P per 100 face paying ``payoff`` F (100 for a discount instrument) in t days:
- discount rate d (ACT/360 discount basis): P = 100 (1 - d t / 360);
- money-market yield m (CD-equivalent, simple ACT/360): P = F / (1 + m t / 360);
- bond-equivalent yield i (semiannual basis, the US Treasury "investment rate"): for t up to a half
  year P = F / (1 + i t / y), beyond it P = F / ([1 + (t - y/2) i / y] (1 + i/2)), y = 365 or 366.
Sources: 31 CFR Part 356, Appendix B, section VI (bills) and section IV (the discount rate to
money-market yield conversion of the FRN index); Federal Reserve Board, Commercial Paper release,
technical Q&A (CP rates are discount yields on a 360-day year).

Rates are decimals, prices per 100 face, days are actual calendar days (float64 arrays broadcast).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.market.daycount import year_fraction, year_fraction_by_row

DISCOUNT_BASIS = 360.0
MONEY_MARKET_BASIS = 360.0
HALF_YEAR_MAX_DAYS = 182  # 26 weeks; see bond_equivalent_yield for why this equals "t <= y/2"
MEASURES = ("discount", "money_market", "bond_equivalent")


def _f(x) -> np.ndarray:
    return np.asarray(x, dtype=np.float64)


# --- discount basis (ACT/360) -------------------------------------------------------------------

def discount_price(discount_rate, days) -> np.ndarray:
    """Price per 100 face from a discount rate: P = 100 (1 - d t / 360). App. B VI.A; ACT/360."""
    return 100.0 * (1.0 - _f(discount_rate) * _f(days) / DISCOUNT_BASIS)


def discount_rate(price, days) -> np.ndarray:
    """Discount rate from a price per 100 face: d = (100 - P)/100 * 360/t. App. B VI.C; ACT/360."""
    return (100.0 - _f(price)) / 100.0 * DISCOUNT_BASIS / _f(days)


def discount_dv01(days) -> np.ndarray:
    """Price gained per 100 face for a 1 bp fall in the discount rate: 0.01 t / 360 (ACT/360).

    On the discount basis dP/dd = -100 t / 360 exactly (the price is linear in d), so the DV01
    does not depend on the rate. A 90-day bill: 0.0025 per 100 ($25 per $1 million).
    """
    return 100.0 * _f(days) / DISCOUNT_BASIS * 1e-4


# --- money-market yield (simple interest, ACT/360) ----------------------------------------------

def money_market_yield(price, days, payoff=100.0) -> np.ndarray:
    """Money-market (CD-equivalent) yield: m = (F/P - 1) * 360/t, simple interest on ACT/360.

    ``price`` is the dirty price per 100 face and ``payoff`` the amount paid at maturity per 100
    face (100 for a discount instrument, the maturity value for a CD).
    """
    return (_f(payoff) / _f(price) - 1.0) * MONEY_MARKET_BASIS / _f(days)


def price_from_money_market_yield(money_market_yield, days, payoff=100.0) -> np.ndarray:
    """Dirty price per 100 face from a money-market yield: P = F / (1 + m t / 360) (ACT/360)."""
    return _f(payoff) / (1.0 + _f(money_market_yield) * _f(days) / MONEY_MARKET_BASIS)


# --- bond-equivalent yield (Treasury investment rate, semiannual basis) -------------------------

def bond_equivalent_yield(price, days, payoff=100.0, year_days=365) -> np.ndarray:
    """Semiannual bond-equivalent yield of a single payment ``payoff`` in ``days`` bought at ``price``.

    31 CFR 356 App. B VI.D (investment rate), applied to the price per 100 of payoff p = 100 P/F:
    - t <= 182 days (VI.D.1): i = [(100 - p)/p] (y/t);
    - t > 182 days (VI.D.2): p [1 + (t - y/2)(i/y)] (1 + i/2) = 100, the quadratic
      a i^2 + b i + c = 0 with a = t/(2y) - 1/4, b = t/y, c = (p - 100)/p, solved here in the
      equivalent cancellation-free form i = -2c / (b + sqrt(b^2 - 4ac)).
    ``year_days`` y is 365, or 366 when the year after the issue date contains 29 February
    (``ladder.pricing.treasury.year_basis``). For whole days the 182-day switch equals "t <= y/2":
    the only whole t in (182, y/2] is 183 with y = 366, where a = 0 and both formulas agree.
    Use the dirty price for a CD; any payoff works, so this also puts every single-payment holding
    on the bond-equivalent basis for portfolio yield totals.
    """
    p = 100.0 * _f(price) / _f(payoff)
    t, y = _f(days), _f(year_days)
    c = (p - 100.0) / p
    within_half_year = (100.0 - p) / p * y / t
    a = t / (2.0 * y) - 0.25
    b = t / y
    beyond_half_year = -2.0 * c / (b + np.sqrt(np.maximum(b * b - 4.0 * a * c, 0.0)))
    return np.where(t <= HALF_YEAR_MAX_DAYS, within_half_year, beyond_half_year)


def price_from_bond_equivalent_yield(bond_equivalent_yield, days, payoff=100.0, year_days=365) -> np.ndarray:
    """Dirty price per 100 face from a bond-equivalent yield: the inverse of ``bond_equivalent_yield``.

    t <= 182 days: P = F / (1 + i t/y); t > 182 days: P = F / ([1 + (t - y/2) i/y] (1 + i/2))
    (31 CFR 356 App. B VI.D.1 and VI.D.2 solved for P).
    """
    i, t, y = _f(bond_equivalent_yield), _f(days), _f(year_days)
    growth = np.where(t <= HALF_YEAR_MAX_DAYS, 1.0 + i * t / y, (1.0 + (t - y / 2.0) * i / y) * (1.0 + i / 2.0))
    return _f(payoff) / growth


# --- conversions ----------------------------------------------------------------------------------

def _price(measure: str, rate, days, year_days) -> np.ndarray:
    if measure == "discount":
        return discount_price(rate, days)
    if measure == "money_market":
        return price_from_money_market_yield(rate, days)
    if measure == "bond_equivalent":
        return price_from_bond_equivalent_yield(rate, days, year_days=year_days)
    raise ValueError(f"unknown rate measure {measure!r}; known: {', '.join(MEASURES)}")


def _rate(measure: str, price, days, year_days) -> np.ndarray:
    if measure == "discount":
        return discount_rate(price, days)
    if measure == "money_market":
        return money_market_yield(price, days)
    if measure == "bond_equivalent":
        return bond_equivalent_yield(price, days, year_days=year_days)
    raise ValueError(f"unknown rate measure {measure!r}; known: {', '.join(MEASURES)}")


def convert_rate(rate, days, source: str, target: str, year_days=365) -> np.ndarray:
    """A discount instrument's rate in ``source`` measure restated in ``target`` measure.

    Measures: ``"discount"`` (ACT/360 discount basis), ``"money_market"`` (simple ACT/360) and
    ``"bond_equivalent"`` (semiannual investment rate, ``year_days`` 365 or 366). The conversion goes
    through the price per 100 face, so it equals the closed forms, e.g. m = 360 d / (360 - d t)
    (App. B IV, the FRN index rate) and, for t <= 182 days, i = y d / (360 - d t) (App. B VI.D.1).
    """
    return _rate(target, _price(source, rate, days, year_days), days, year_days)


# --- interest at maturity (CDs, term deposits) --------------------------------------------------

def _accrual_fraction(day_count, start, end) -> np.ndarray:
    """Year fraction of a simple-interest accrual from ``start`` to ``end`` on ``day_count``.

    ``day_count`` is one code or one code per row. ICMA ``ACT/ACT`` is period-based and has no
    meaning for an instrument without coupon periods; use ``ACT/ACT-ISDA``.
    """
    codes = np.unique(np.asarray(day_count, dtype=object))
    if "ACT/ACT" in codes:
        raise ValueError("ACT/ACT (ICMA) needs coupon periods; interest at maturity accrues on "
                         "ACT/360, ACT/365F, 30/360, 30E/360 or ACT/ACT-ISDA")
    if isinstance(day_count, str):
        return year_fraction(day_count, start, end)
    return year_fraction_by_row(day_count, start, end, start, end, 1)


def maturity_value(coupon_rate, issue_date, maturity, day_count="ACT/360") -> np.ndarray:
    """Amount paid at maturity per 100 face: 100 (1 + c * tau(issue, maturity)), simple interest.

    ``tau`` is the year fraction on the instrument's ``day_count`` (one code, or one per row).
    """
    return 100.0 * (1.0 + _f(coupon_rate) * _accrual_fraction(day_count, issue_date, maturity))


def accrued_interest(coupon_rate, issue_date, settle, day_count="ACT/360") -> np.ndarray:
    """Interest accrued per 100 face from issue to ``settle``: 100 c tau(issue, settle) on ``day_count``."""
    return 100.0 * _f(coupon_rate) * _accrual_fraction(day_count, issue_date, settle)


def dirty_price_from_yield(yield_, settle, maturity, payoff, day_count="ACT/360") -> np.ndarray:
    """Dirty price per 100 face of a single ``payoff`` at ``maturity``: F / (1 + y tau(settle, maturity)).

    ``yield_`` is the simple yield on the instrument's ``day_count`` (ACT/360 gives the money-market
    yield). Clean price = dirty price - ``accrued_interest`` (common practice for CDs).
    """
    return _f(payoff) / (1.0 + _f(yield_) * _accrual_fraction(day_count, settle, maturity))


def yield_from_dirty_price(dirty_price, settle, maturity, payoff, day_count="ACT/360") -> np.ndarray:
    """Simple yield on ``day_count`` from a dirty price: (F/P - 1) / tau(settle, maturity)."""
    return (_f(payoff) / _f(dirty_price) - 1.0) / _accrual_fraction(day_count, settle, maturity)


# --- yield-measure risk of a single payment ------------------------------------------------------

@dataclass(frozen=True, eq=False)
class SinglePaymentRisk:
    """Yield measures of a single payment on its own simple basis (arrays, per 100 face)."""

    macaulay_duration: np.ndarray  # years on the instrument's basis (= tau)
    modified_duration: np.ndarray  # years: -(1/P) dP/dy
    convexity: np.ndarray          # years^2: (1/P) d2P/dy2
    dv01: np.ndarray               # price gained per 100 face for a 1 bp fall in y


def single_payment_risk(yield_, tau, payoff=100.0) -> SinglePaymentRisk:
    """Duration, convexity and DV01 of a payment F at time ``tau``, priced P = F / (1 + y tau).

    ``tau`` is the time to payment in years on the instrument's own day count (t/360 for a
    money-market instrument on ACT/360) and ``yield_`` the simple yield on that same basis (the
    money-market yield for bills and CP, the quoted yield for CDs). Then
    Macaulay = tau, modified = tau / (1 + y tau), convexity = 2 tau^2 / (1 + y tau)^2 and
    DV01 = P * modified * 1e-4. For a discount instrument's DV01 on the discount basis use
    ``discount_dv01``.
    """
    y, t = _f(yield_), _f(tau)
    growth = 1.0 + y * t
    modified = t / growth
    return SinglePaymentRisk(
        macaulay_duration=t * np.ones_like(growth),
        modified_duration=modified,
        convexity=2.0 * modified * modified,
        dv01=_f(payoff) / growth * modified * 1e-4,
    )
