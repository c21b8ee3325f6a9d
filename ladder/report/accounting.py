"""Accounting figures of every holding at a month-end, by the effective-interest method.

Amortized cost, book yield and the period's interest earned come from
``ladder.pricing.amortization`` (the effective-interest method; a premium on a callable amortized to
its earliest call date at the call price, and the schedule reset on that date if it is not called).
Unrealized gain or loss is the clean market value less the amortized cost. Money in currency units,
prices per 100 face, yields decimal. A holding without a book price or purchase date has no
amortized cost (NaN) and earns nothing in these figures; funds carry at their balance.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

import numpy as np

from ladder.analysis.valuation import Valuation
from ladder.pricing.amortization import Amortization, amortize


@dataclass(frozen=True, eq=False)
class Accounting:
    """Per holding (n,), aligned with ``valuation.holdings``; the period is (period_start, as_of]."""

    as_of: dt.date
    period_start: dt.date
    amortized_price: np.ndarray      # clean per 100
    amortized_cost: np.ndarray       # currency
    accrued: np.ndarray              # currency, accrued interest at as_of
    book_yield: np.ndarray           # decimal, effective yield at purchase
    workout: np.ndarray              # datetime64[D]: the date the current premium/discount amortizes to
    unrealized_gain: np.ndarray      # currency: clean market value - amortized cost
    coupon_income: np.ndarray        # currency, coupon accrual in the period
    amortization: np.ndarray         # currency, accretion (+) or premium amortization (-) in the period
    interest_earned: np.ndarray      # currency, coupon_income + amortization

    def total(self, name: str) -> float:
        return float(np.nansum(getattr(self, name)))


def schedules(valuation: Valuation) -> tuple[np.ndarray, Amortization | None]:
    """The rows that have an amortization schedule (funds, and holdings with a book price and a
    purchase date on or before the settlement date) and their schedules."""
    h = valuation.holdings
    as_of = np.datetime64(valuation.as_of, "D")
    known = (h.kind == "fund") | (np.isfinite(h.book_price) & ~np.isnat(h.purchase_date) & (h.purchase_date <= as_of))
    rows = np.flatnonzero(known)
    return rows, (amortize(h.take(rows)) if len(rows) else None)


def interest_by_period(valuation: Valuation, boundaries) -> np.ndarray:
    """Interest earned (coupon accrual plus amortization), currency, by holding and period
    (b[p-1], b[p]] of ``boundaries`` (P+1,) datetime64[D]: (n, P); 0 without a schedule. Holdings
    earn until they mature; nothing is reinvested."""
    h = valuation.holdings
    boundaries = np.asarray(boundaries, dtype="datetime64[D]")
    out = np.zeros((len(h), len(boundaries) - 1))
    rows, schedule = schedules(valuation)
    if schedule is not None:
        out[rows] = schedule.earned(boundaries).total * (h.face[rows, None] / 100.0)
    return out


def accounting_figures(valuation: Valuation, period_start: dt.date) -> Accounting:
    """The accounting figures of ``valuation``'s holdings at its date, income over (period_start, as_of]."""
    h = valuation.holdings
    n = len(h)
    as_of = np.datetime64(valuation.as_of, "D")
    price, cost_yield = np.full(n, np.nan), np.full(n, np.nan)
    workout = np.full(n, np.datetime64("NaT"), dtype="datetime64[D]")
    coupon, amort = np.zeros(n), np.zeros(n)
    rows, schedule = schedules(valuation)
    if schedule is not None:
        price[rows] = schedule.cost(np.array([as_of]))[:, 0]
        cost_yield[rows], workout[rows] = schedule.book_yield, schedule.workout
        earned = schedule.earned(np.array([np.datetime64(period_start, "D"), as_of]))
        coupon[rows], amort[rows] = earned.coupon[:, 0], earned.amortization[:, 0]
    face = h.face / 100.0
    cost = price * face
    clean_value = valuation.clean * face
    return Accounting(
        as_of=valuation.as_of, period_start=period_start, amortized_price=price, amortized_cost=cost,
        accrued=valuation.accrued * face, book_yield=cost_yield, workout=workout,
        unrealized_gain=clean_value - cost, coupon_income=coupon * face, amortization=amort * face,
        interest_earned=(coupon + amort) * face)
