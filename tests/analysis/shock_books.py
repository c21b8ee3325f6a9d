"""Books for the shock tests: the demo book, or its settings with other holdings, curve or date.

``book_with`` keeps the demo's spreads and model and replaces what a test needs; ``notes`` makes
option-free holdings priced from the curve (no quotes), so a test controls every price;
``option_free`` draws a small mixed set of them (hypothesis).
"""

from __future__ import annotations

from ladder.demo import demo_source

import datetime as dt
from dataclasses import replace
from functools import lru_cache

import numpy as np
from hypothesis import strategies as st

from ladder.folder.book_file import Book, load_book
from ladder.book.holdings import Holdings, make_holdings
from ladder.pricing.curve import ParCurve

DEMO = demo_source()
TENORS = ("1M", "3M", "6M", "1Y", "2Y", "3Y", "5Y", "7Y", "10Y", "20Y", "30Y")
UPWARD_PCT = (3.60, 3.70, 3.80, 3.90, 4.00, 4.10, 4.25, 4.40, 4.55, 4.80, 4.90)   # smooth, rising
START = dt.date(2026, 12, 15)                   # first maturity month of generated holdings


@lru_cache(maxsize=1)
def demo_book() -> Book:
    return load_book(DEMO)


def book_with(holdings: Holdings | None = None, par_yields_pct=None, tenors=TENORS, valuation_date=None,
              scenarios=()) -> Book:
    """The demo book with other holdings, par curve (percent), valuation date or scenarios."""
    book = demo_book()
    curve = book.curve if par_yields_pct is None else ParCurve(tuple(tenors), np.asarray(par_yields_pct) / 100)
    return replace(book, holdings=book.holdings if holdings is None else holdings, curve=curve,
                   valuation_date=valuation_date or book.valuation_date, scenarios=tuple(scenarios))


def notes(maturities, coupons_pct, sector: str = "treasury", kind: str = "fixed", issue_dates=None,
          face: float = 1_000_000.0, prefix: str = "T") -> Holdings:
    """Option-free holdings with no quote (priced from the curve plus the demo's spread table)."""
    n = len(maturities)
    return make_holdings(
        id=[f"{prefix}{i:03d}" for i in range(n)], sector=[sector] * n, kind=[kind] * n, face=[face] * n,
        maturity=[str(m) for m in maturities], coupon=np.asarray(coupons_pct, dtype=float) / 100,
        issue_date=None if issue_dates is None else [str(d) for d in issue_dates],
        rating=["AA+"] * n, short_rating=["A-1+"] * n, row=np.arange(2, n + 2))


def months_after(date: dt.date, months) -> list[str]:
    """``date`` plus each number of months (the day kept; days 1-28 only)."""
    out = []
    for m in months:
        total = date.month - 1 + int(m)
        out.append(dt.date(date.year + total // 12, total % 12 + 1, date.day).isoformat())
    return out


@st.composite
def option_free(draw):
    """2 to 6 notes (13 months to 10 years), two discount notes and two CDs, priced from the curve."""
    count = draw(st.integers(2, 6))
    months = draw(st.lists(st.integers(13, 120), min_size=count, max_size=count))
    coupons = draw(st.lists(st.floats(0.0, 7.0), min_size=count, max_size=count))
    bills = draw(st.lists(st.integers(0, 11), min_size=2, max_size=2))
    cds = draw(st.lists(st.integers(0, 20), min_size=2, max_size=2))
    return Holdings.concat([
        notes(months_after(START, months), coupons, prefix="N"),
        notes(months_after(START, bills), [0.0, 0.0], sector="commercial_paper", kind="discount", prefix="B"),
        notes(months_after(START, cds), [3.8, 4.1], sector="cd", kind="at_maturity",
              issue_dates=["2026-06-15"] * 2, prefix="C")])
