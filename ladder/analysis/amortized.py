"""Amortized cost: the one place every front gets a holding's book value.

``book_value`` everywhere (``ladder value``, ``check``, ``plan``, ``build``, the report and every
workstation view) is the amortized cost by the effective-interest method
(``ladder.pricing.amortization``) on the settlement date; ``cost`` is the original cost, the book
price times face. Funds carry at their balance. A holding without a book price or a purchase date,
or bought after the settlement date, has no amortized cost (NaN). Money in currency units.
"""

from __future__ import annotations

import datetime as dt

import numpy as np

from ladder.book.holdings import Holdings
from ladder.pricing.amortization import Amortization, amortize


def scheduled_rows(h: Holdings, as_of: dt.date) -> np.ndarray:
    """Rows with an amortization schedule at ``as_of``: funds, and holdings with a book price and a
    purchase date on or before ``as_of``."""
    day = np.datetime64(as_of, "D")
    known = (h.kind == "fund") | (np.isfinite(h.book_price) & ~np.isnat(h.purchase_date) & (h.purchase_date <= day))
    return np.flatnonzero(known)


def schedules(h: Holdings, as_of: dt.date) -> tuple[np.ndarray, Amortization | None]:
    """``scheduled_rows`` and their effective-interest schedules (None when there are none)."""
    rows = scheduled_rows(h, as_of)
    return rows, (amortize(h.take(rows)) if len(rows) else None)


def original_cost(h: Holdings) -> np.ndarray:
    """Book price x face / 100 (currency; a fund's balance; NaN without a book price)."""
    return np.where(h.kind == "fund", h.face, h.book_price * h.face / 100.0)


def amortized_cost(h: Holdings, as_of: dt.date) -> np.ndarray:
    """Clean amortized cost (currency) of every holding at ``as_of`` (NaN without a schedule)."""
    out = np.full(len(h), np.nan)
    rows, schedule = schedules(h, as_of)
    if schedule is not None:
        out[rows] = schedule.cost(np.array([np.datetime64(as_of, "D")]))[:, 0] * h.face[rows] / 100.0
    return out
