"""What the rule checker needs to know about each holding on the check date.

The caller (the façade) values the book and fills a ``PositionMeasures``; the checker reads only this
and the holdings' own fields (sector, issuer, ratings, call terms, kind).

Cash-needs coverage is counted by calendar month from the day after the check date: month 0 is the
month of ``as_of + 1 day`` (so a month-end valuation starts with the next month), month m the m-th
month after it. ``month_index`` and ``cash_by_month`` implement that bucketing;
``ladder.book.cash_needs.CashNeeds.by_month`` uses the same one.
"""

from __future__ import annotations

from dataclasses import dataclass, fields, replace

import numpy as np

from ladder.book.holdings import Holdings
from ladder.pricing.cashflows import CashFlows


def coverage_start(as_of) -> np.datetime64:
    """First day counted for cash-needs coverage: the day after the check date."""
    return np.datetime64(as_of, "D") + 1


def month_index(dates, start) -> np.ndarray:
    """Calendar months from ``start``'s month to each date's month (int64; garbage where NaT)."""
    months = np.asarray(dates, dtype="datetime64[D]").astype("datetime64[M]").astype(np.int64)
    return months - np.datetime64(start, "D").astype("datetime64[M]").astype(np.int64)


def cash_by_month(cf: CashFlows, face, as_of, months: int) -> np.ndarray:
    """Principal plus coupons received by each holding in each coverage month, currency units.

    ``cf`` is the cash-flow matrix (amounts per 100 face, paid on ``cf.pay_dates``), ``face`` the
    holdings' face; flows paid on or after ``coverage_start(as_of)`` fall in month ``month_index``;
    flows past ``months`` are left out. Returns (n, months).
    """
    start = coverage_start(as_of)
    n, k = cf.mask.shape
    month = month_index(cf.pay_dates, start)
    keep = cf.mask & (cf.pay_dates >= start) & (month < months)
    cash = cf.amount * (np.asarray(face, dtype=np.float64)[:, None] / 100.0)
    rows = np.broadcast_to(np.arange(n)[:, None], (n, k))
    flat = rows[keep] * months + month[keep]
    return np.bincount(flat, weights=cash[keep], minlength=n * months).reshape(n, months)


def days_to_maturity(holdings: Holdings, as_of) -> np.ndarray:
    """Calendar days from ``as_of`` to each final maturity (int64); 1 for a fund with no maturity date."""
    as_of = np.datetime64(as_of, "D")
    days = (holdings.maturity - as_of).astype("timedelta64[D]").astype(np.int64)
    return np.where(np.isnat(holdings.maturity), 1, days)


@dataclass(frozen=True, eq=False)
class PositionMeasures:
    """One row per holding, aligned with ``holdings``; money in currency units.

    market_value: dirty value (clean price + accrued) x face / 100; funds at their balance.
    book_value: amortized cost (or book price x face / 100).
    effective_duration: years (0 for funds and deposits with no rate sensitivity).
    days_to_maturity: calendar days from ``as_of`` to final maturity (funds: 1; see ``days_to_maturity``).
    cash_by_month: (n, M) principal and coupons received in coverage month m (see module docstring);
      M must reach the policy's ``cash_needs_horizon_months``. Fund rows are ignored there: a fund
      counts with its market value from month 0.
    holdings_file: names the holdings file in problems about a holding's data.
    family: each holding's issuer family (``ladder.book.families``); default its own issuer.
    """

    holdings: Holdings
    as_of: np.datetime64
    market_value: np.ndarray
    book_value: np.ndarray
    effective_duration: np.ndarray
    days_to_maturity: np.ndarray
    cash_by_month: np.ndarray
    holdings_file: str = "holdings.csv"
    family: np.ndarray | None = None

    def __post_init__(self) -> None:
        n = len(self.holdings)
        family = self.holdings.issuer if self.family is None else self.family
        object.__setattr__(self, "family", np.asarray(family, dtype=object))
        object.__setattr__(self, "as_of", np.datetime64(self.as_of, "D"))
        for name in ("market_value", "book_value", "effective_duration", "days_to_maturity"):
            value = np.asarray(getattr(self, name), dtype=np.float64)
            if value.shape != (n,):
                raise ValueError(f"{name} has shape {value.shape}, expected ({n},)")
            object.__setattr__(self, name, value)
        cash = np.asarray(self.cash_by_month, dtype=np.float64)
        if cash.ndim != 2 or cash.shape[0] != n:
            raise ValueError(f"cash_by_month has shape {cash.shape}, expected ({n}, months)")
        object.__setattr__(self, "cash_by_month", cash)

    def __len__(self) -> int:
        return len(self.holdings)

    @property
    def months(self) -> int:
        return self.cash_by_month.shape[1]

    def basis_values(self, basis: str) -> np.ndarray:
        """The value of each holding on a percentage basis: market, book or face."""
        if basis == "face":
            return np.asarray(self.holdings.face, dtype=np.float64)
        return {"market": self.market_value, "book": self.book_value}[basis]

    def take(self, index) -> "PositionMeasures":
        """The rows at ``index`` (boolean mask or positions)."""
        return replace(self, holdings=self.holdings.take(index),
                       **{f: getattr(self, f)[index] for f in _ROW_FIELDS})

    @staticmethod
    def concat(parts: "list[PositionMeasures]") -> "PositionMeasures":
        """Rows of ``parts`` in order; all must share the check date and month count."""
        first = parts[0]
        if any(p.as_of != first.as_of or p.months != first.months for p in parts):
            raise ValueError("measures to join must share as_of and the number of coverage months")
        return replace(first, holdings=Holdings.concat([p.holdings for p in parts]),
                       **{f: np.concatenate([getattr(p, f) for p in parts]) for f in _ROW_FIELDS})

    def with_rows_of(self, other: "PositionMeasures", ids) -> "PositionMeasures":
        """These measures with the rows of ``ids`` replaced by ``other``'s rows of those ids
        (dropped where ``other`` has none): the book as it would be without the trades on ``ids``."""
        ids = np.asarray(list(ids), dtype=object)
        return PositionMeasures.concat([self.take(~np.isin(self.holdings.id, ids)),
                                        other.take(np.isin(other.holdings.id, ids))])


_ROW_FIELDS = tuple(f.name for f in fields(PositionMeasures)
                    if f.name not in ("holdings", "as_of", "holdings_file"))
