"""The call terms of callable holdings in the form the callable model reads (``callable.CallableBonds``)
plus the street-convention inputs for yields to call and to worst.

Call dates come from ``first_call_date`` every 12 / ``call_frequency`` months (``callable.call_dates``);
a call dated on the settlement date itself is past (only later calls count). The accrued interest at
each call date and the coupon periods from settlement to it come from the cash-flow matrix at that
date, so they follow the bond's own day count exactly as the coupons do.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.book.holdings import Holdings
from ladder.market.dates import days_between
from ladder.pricing.callable import CallableBonds, call_dates
from ladder.pricing.cashflows import CashFlows, cash_flows


@dataclass(frozen=True, eq=False)
class CallTerms:
    """Calls of n callable holdings, (n, m) matrices aligned with ``bonds``."""

    bonds: CallableBonds
    dates: np.ndarray       # datetime64[D]
    periods: np.ndarray     # coupon periods from settlement (street yield measure)
    prices: np.ndarray      # clean call price per 100
    accrued: np.ndarray     # accrued interest per 100 at the call date
    mask: np.ndarray


def call_terms(h: Holdings, cf: CashFlows, source: str = "holdings.csv") -> CallTerms:
    """Call terms of the (callable) holdings ``h`` whose cash flows at settlement are ``cf``."""
    dates, mask = call_dates(h.id, h.first_call, h.call_frequency, h.maturity,
                             after=(cf.settle + 1)[:, None], rows=h.row, source=source)
    bond, slot = np.nonzero(mask)
    at_call = cash_flows(h.take(bond), dates[bond, slot])
    accrued = np.zeros(mask.shape)
    accrued[bond, slot] = at_call.accrued
    # periods(settle -> call) = periods(settle -> next coupon) - periods(call -> next coupon)
    next_coupon = at_call.dates[:, 0]
    match = cf.dates[bond] == next_coupon[:, None]
    periods = np.zeros(mask.shape)
    periods[bond, slot] = cf.periods[bond, match.argmax(axis=1)] - at_call.periods[:, 0]
    prices = np.where(mask, h.call_price[:, None], 0.0)
    years = np.where(mask, days_between(cf.settle[:, None], dates) / 365.0, 0.0)
    bonds = CallableBonds(h.id, cf.years, np.where(cf.mask, cf.amount, 0.0), cf.mask, years, prices,
                          accrued, mask, rows=h.row, source=source)
    return CallTerms(bonds, dates, periods, prices, accrued, mask)
