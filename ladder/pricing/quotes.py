"""From a holding's quote to its dirty price, and from a dirty price to its yield and yield measures,
by kind. Everything per 100 face, rates decimal, vectorized over holdings.

Yield bases (each holding's ``ytm`` is on its own basis; ``bey`` puts all on one):
- ``fixed`` / ``zero``: street yield compounded at the coupon frequency (``yield_math``);
- ``discount``: bond-equivalent yield (the Treasury investment rate, 31 CFR 356 App. B VI.D, on a
  365-day year, or 366 when the year after the settlement date contains 29 February, VI.D.1);
- ``at_maturity``: simple yield on the holding's day count (the money-market yield for ACT/360);
- ``fund``: the stated yield; price always 100 per 100 (1.00 a share), no rate sensitivity.
``bey``: semiannual bond-equivalent yield, for portfolio totals: 2((1 + y/f)^(f/2) - 1) for coupon
bonds, and App. B VI.D's investment-rate formulas on the dirty price and payoff for single payments.
"""

from __future__ import annotations

from dataclasses import dataclass, fields, replace

import numpy as np

from ladder.book.holdings import QUOTE_DISCOUNT, QUOTE_PRICE, QUOTE_YIELD, Holdings
from ladder.market.dates import days_between
from ladder.market.daycount import year_fraction_by_row
from ladder.pricing import money_market as mm
from ladder.pricing.cashflows import CashFlows
from ladder.pricing.treasury import year_basis
from ladder.pricing.yield_math import dirty_from_yield, measures_at_yield, yield_from_dirty



@dataclass(frozen=True, eq=False)
class Measures:
    """Yield and yield-based risk of each holding at its dirty price (durations in years)."""

    ytm: np.ndarray
    bey: np.ndarray
    macaulay: np.ndarray
    modified: np.ndarray
    convexity: np.ndarray


def _kinds(h: Holdings):
    coupon = np.isin(h.kind, ("fixed", "zero"))
    return coupon, h.kind == "discount", h.kind == "at_maturity", h.kind == "fund"


def _days(cf: CashFlows, h: Holdings) -> np.ndarray:
    return days_between(cf.settle, h.maturity)


def _simple_term(cf: CashFlows, h: Holdings) -> np.ndarray:
    """Year fraction settlement -> maturity on each holding's day count (single-payment basis)."""
    codes = np.where(h.day_count == "ACT/ACT", "ACT/365F", h.day_count)
    return year_fraction_by_row(codes, cf.settle, h.maturity, cf.settle, h.maturity, np.ones(len(h)))


def dirty_from_quote(h: Holdings, cf: CashFlows) -> np.ndarray:
    """Dirty price per 100 from each holding's quote; NaN where there is no quote (curve-priced)."""
    coupon, discount, at_maturity, fund = _kinds(h)
    q, kind = h.quote, h.quote_type
    days = _days(cf, h)
    year_days = year_basis(cf.settle)
    payoff = cf.amount.sum(axis=1)
    dirty = np.full(len(h), np.nan)
    dirty = np.where(kind == QUOTE_PRICE, q + cf.accrued, dirty)
    with np.errstate(invalid="ignore", divide="ignore"):
        dirty = np.where((kind == QUOTE_YIELD) & coupon, dirty_from_yield(cf, np.nan_to_num(q), h.frequency), dirty)
        dirty = np.where((kind == QUOTE_YIELD) & discount,
                         mm.price_from_bond_equivalent_yield(q, days, payoff, year_days), dirty)
        dirty = np.where((kind == QUOTE_YIELD) & at_maturity,
                         payoff / (1.0 + q * _simple_term(cf, h)), dirty)
        dirty = np.where((kind == QUOTE_DISCOUNT) & discount, mm.discount_price(q, days), dirty)
    return np.where(fund, 100.0, dirty)


def measures_from_dirty(h: Holdings, cf: CashFlows, dirty) -> Measures:
    """Yield (on each holding's own basis), bond-equivalent yield and yield measures at ``dirty``."""
    coupon, discount, at_maturity, fund = _kinds(h)
    dirty = np.asarray(dirty, dtype=np.float64)
    n = len(h)
    f = np.where(h.frequency > 0, h.frequency, 2).astype(np.float64)
    ytm = np.full(n, np.nan)
    macaulay, modified, convexity = np.zeros(n), np.zeros(n), np.zeros(n)
    if coupon.any():
        y = yield_from_dirty(cf_rows(cf, coupon), dirty[coupon], f[coupon])
        m = measures_at_yield(cf_rows(cf, coupon), y, f[coupon])
        ytm[coupon], macaulay[coupon], modified[coupon], convexity[coupon] = y, m.macaulay, m.modified, m.convexity
    single = discount | at_maturity
    payoff = cf.amount.sum(axis=1)
    days = _days(cf, h)
    year_days = year_basis(cf.settle)
    tau = np.where(discount, days / year_days, _simple_term(cf, h))
    with np.errstate(invalid="ignore", divide="ignore"):
        simple_yield = (payoff / dirty - 1.0) / tau
        bill_bey = mm.bond_equivalent_yield(dirty, days, payoff, year_days)
        risk = mm.single_payment_risk(simple_yield, tau, payoff)
        ytm = np.where(discount, bill_bey, np.where(at_maturity, simple_yield, ytm))
        macaulay = np.where(single, risk.macaulay_duration, macaulay)
        modified = np.where(single, risk.modified_duration, modified)
        convexity = np.where(single, risk.convexity, convexity)
        bey = np.where(coupon, 2.0 * ((1.0 + ytm / f) ** (f / 2.0) - 1.0), bill_bey)
    ytm = np.where(fund, h.quote, ytm)
    bey = np.where(fund, h.quote, bey)
    return Measures(ytm, bey, macaulay, modified, convexity)


def cf_rows(cf: CashFlows, rows) -> CashFlows:
    """The cash flows of the holdings selected by ``rows``."""
    return replace(cf, **{f.name: getattr(cf, f.name)[rows] for f in fields(cf)})
