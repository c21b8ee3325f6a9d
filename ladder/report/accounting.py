"""Accounting figures of every holding at a month-end, by the effective-interest method.

Amortized cost and unrealized gain are the valuation's (``ladder.analysis.amortized``, so the report
and ``ladder value`` cannot disagree); book yield and the period's interest earned come from
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
from ladder.analysis.amortized import schedules


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


def interest_by_period(valuation: Valuation, boundaries) -> np.ndarray:
    """Interest earned (coupon accrual plus amortization), currency, by holding and period
    (b[p-1], b[p]] of ``boundaries`` (P+1,) datetime64[D]: (n, P); 0 without a schedule. Holdings
    earn until they mature; nothing is reinvested."""
    h = valuation.holdings
    boundaries = np.asarray(boundaries, dtype="datetime64[D]")
    out = np.zeros((len(h), len(boundaries) - 1))
    rows, schedule = schedules(h, valuation.as_of)
    if schedule is not None:
        out[rows] = schedule.earned(boundaries).total * (h.face[rows, None] / 100.0)
    return out


def accounting_figures(valuation: Valuation, period_start: dt.date) -> Accounting:
    """The accounting figures of ``valuation``'s holdings at its date, income over (period_start, as_of]."""
    h = valuation.holdings
    n = len(h)
    as_of = np.datetime64(valuation.as_of, "D")
    cost_yield = np.full(n, np.nan)
    workout = np.full(n, np.datetime64("NaT"), dtype="datetime64[D]")
    coupon, amort = np.zeros(n), np.zeros(n)
    rows, schedule = schedules(h, valuation.as_of)
    if schedule is not None:
        cost_yield[rows], workout[rows] = schedule.book_yield, schedule.workout
        earned = schedule.earned(np.array([np.datetime64(period_start, "D"), as_of]))
        coupon[rows], amort[rows] = earned.coupon[:, 0], earned.amortization[:, 0]
    face = h.face / 100.0
    return Accounting(
        as_of=valuation.as_of, period_start=period_start, amortized_price=valuation.book_value / face,
        amortized_cost=valuation.book_value, accrued=valuation.accrued * face, book_yield=cost_yield, workout=workout,
        unrealized_gain=valuation.unrealized_gain, coupon_income=coupon * face, amortization=amort * face,
        interest_earned=(coupon + amort) * face)
