"""The holdings detail and the activity tables of the month-end report."""

from __future__ import annotations

import datetime as dt
import math

import numpy as np

from ladder.analysis.price_dates import PriceDates
from ladder.analysis.valuation import Valuation
from ladder.pricing.amortization import CallSchedule
from ladder.report.accounting import Accounting
from ladder.folder.journal import JournalEntry
from ladder.report.model import Column, Table

HOLDING_COLUMNS = (
    Column("id", "Identifier"), Column("issuer", "Issuer"), Column("sector", "Sector"),
    Column("coupon", "Coupon", "pct"), Column("maturity", "Maturity", "date"), Column("next_call", "Next call", "date"),
    Column("face", "Face", "money"), Column("amortized_cost", "Amortized cost", "money"),
    Column("market_value", "Market value", "money"), Column("unrealized_gain", "Unrealized gain/loss", "money"),
    Column("book_yield", "Book yield", "pct"), Column("market_yield", "Yield to worst", "pct"),
    Column("rating", "Ratings"), Column("share", "Share of portfolio", "pct"),
    Column("price_date", "Price date", "date"), Column("stale", "Stale price"),
)


def _date(value) -> dt.date | None:
    return None if np.isnat(value) else value.astype(object)


def _number(value) -> float | None:
    value = float(value)
    return value if math.isfinite(value) else None


def next_calls(v: Valuation, source: str) -> np.ndarray:
    """Each holding's first call date after the settlement date (NaT: none)."""
    h = v.holdings
    out = np.full(len(h), np.datetime64("NaT"), dtype="datetime64[D]")
    rows = np.flatnonzero(h.callable)
    if len(rows):
        calls = CallSchedule.of(h.take(rows), source)
        later = calls.mask & (calls.dates > np.datetime64(v.as_of, "D"))
        first = np.argmax(later, axis=1)
        out[rows] = np.where(later.any(axis=1), calls.dates[np.arange(len(rows)), first], np.datetime64("NaT"))
    return out


def _weighted(values, weights) -> float | None:
    ok = np.isfinite(values) & np.isfinite(weights)
    return _number((values[ok] * weights[ok]).sum() / weights[ok].sum()) if weights[ok].sum() else None


def ratings_text(h, i: int) -> str:
    return " / ".join(r for r in (h.rating[i], h.short_rating[i]) if r) or "not rated"


def holdings_table(v: Valuation, a: Accounting, source: str, prices: PriceDates) -> Table:
    """One row a holding (columns HOLDING_COLUMNS) and a total row; share on market value; each
    price's date and a stale flag (``ladder.analysis.price_dates``)."""
    h = v.holdings
    total_mv = float(v.market_value.sum())
    calls = next_calls(v, source)
    market_yield = v.yield_to_worst
    rows = []
    for i in range(len(h)):
        coupon = float(h.coupon[i]) if h.kind[i] in ("fixed", "at_maturity") else None
        rows.append((h.id[i], h.issuer[i], h.sector[i], coupon, _date(h.maturity[i]), _date(calls[i]),
                     float(h.face[i]), _number(a.amortized_cost[i]), float(v.market_value[i]),
                     _number(a.unrealized_gain[i]), _number(a.book_yield[i]), _number(market_yield[i]),
                     ratings_text(h, i), float(v.market_value[i]) / total_mv, _date(prices.date[i]),
                     f"stale: {int(prices.age_days[i])} days old" if prices.stale[i] else ""))
    total = ("Total", f"{len(h)} holdings", None, None, None, None, float(h.face.sum()),
             _number(np.nansum(a.amortized_cost)), total_mv, _number(np.nansum(a.unrealized_gain)),
             _weighted(a.book_yield, a.amortized_cost), _number(v.totals.yield_to_worst), None, 1.0, prices.oldest,
             f"{int(prices.stale.sum())} stale")
    return Table("Holdings", HOLDING_COLUMNS, tuple(rows), total)


ACTIVITY_COLUMNS = (
    Column("date", "Date", "date"), Column("action", "Action"), Column("holding", "Holding"),
    Column("face", "Face", "money"), Column("amount", "Cash amount", "money"), Column("price", "Price", "price"),
    Column("reason", "Reason"), Column("recorded", "Recorded (UTC)"),
    Column("book_value", "Book value (amortized cost)", "money"), Column("source", "Source"),
)
FROM_HOLDINGS = "taken from the holdings: purchase date in the period, no journal line"


def activity_table(entries: tuple[JournalEntry, ...], purchases=(), unexplained=()) -> Table:
    """The journal's entries of the period, in the order they were recorded (those in ``unexplained``
    marked), then ``purchases`` (``ladder.report.roll_forward.Purchase``) taken from the holdings."""
    short = {id(e) for e in unexplained}
    rows = tuple((e.date, e.action, e.holding, _number(e.face), _number(e.amount), _number(e.price), e.reason,
                  e.recorded, _number(e.book_value),
                  "journal (unexplained: lacks amount or book value)" if id(e) in short else "journal")
                 for e in entries)
    rows += tuple((p.date, "buy", p.holding, p.face, None, None, FROM_HOLDINGS, "", _number(p.cost), "holdings")
                  for p in purchases if p.source == "holdings")
    amounts = [r[4] for r in rows if r[4] is not None]
    total = ("Total", f"{len(rows)} entries", None, None, float(sum(amounts)) if amounts else None, None,
             f"{len(short)} unexplained", None, None, None)
    return Table("Activity recorded in the journal", ACTIVITY_COLUMNS, rows, total)
