"""The date of every holding's price, and the stale ones.

A quoted holding's price date is its ``price_date`` (holdings file), or the book's valuation date
when none is given; a holding priced from the curve is priced as of the curve's date (the valuation
date); a fund carries at its balance. A quote is stale when it is more than ``STALE_DAYS`` calendar
days older than the valuation date (common practice: a month-end valuation uses quotes of the
month-end or the last business days before it; five calendar days cover a long weekend).
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

import numpy as np

from ladder.analysis.valuation import Valuation

STALE_DAYS = 5


@dataclass(frozen=True, eq=False)
class PriceDates:
    """Per holding (n,): the price date (NaT for funds), its age in days and whether it is stale;
    ``oldest``/``newest`` over the quoted and curve-priced holdings (None if there are none)."""

    valuation_date: dt.date
    date: np.ndarray
    age_days: np.ndarray
    stale: np.ndarray
    oldest: dt.date | None
    newest: dt.date | None


def price_dates(v: Valuation, valuation_date: dt.date) -> PriceDates:
    h = v.holdings
    day = np.datetime64(valuation_date, "D")
    fund = h.kind == "fund"
    quoted = (v.priced_from == "quote") & ~fund
    date = np.where(fund, np.datetime64("NaT"), np.where(quoted & ~np.isnat(h.price_date), h.price_date, day))
    age = np.where(fund, 0, (day - np.where(fund, day, date)).astype(np.int64))
    stale = ~fund & (age > STALE_DAYS)
    priced = date[~fund]
    return PriceDates(valuation_date, date.astype("datetime64[D]"), age, stale,
                      priced.min().astype(dt.date) if len(priced) else None,
                      priced.max().astype(dt.date) if len(priced) else None)
