"""Booking trades into a book: the holdings file and the activity journal change together.

Every change the tool makes to a book goes through here: ``book_trades`` for a builder's accepted
ladder or a trade ticket, ``roll_book`` for maturities and calls rolled past. Each writes the
holdings file atomically with a backup and appends one journal line a change (date, face, cash
amount, price, reason); if the journal cannot be written the previous holdings are put back.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass
from pathlib import Path

import numpy as np


from ladder.analysis.valuation import value_book
from ladder.folder.book_file import Book
from ladder.folder.journal import JournalEntry, save_with_journal
from ladder.errors import Problems
from ladder.pricing.cashflows import cash_flows
from ladder.policy.trades import Trades, apply_trades


@dataclass(frozen=True, eq=False)
class Booked:
    book: Book
    path: Path
    entries: tuple[JournalEntry, ...]


def trade_entries(book: Book, trades: Trades, reason: str, at: dt.date | None = None) -> list[JournalEntry]:
    """One journal entry a trade, priced at the trade's own valuation (clean price per 100; cash amount
    paid (-) for a buy or received (+) for a sale, dirty)."""
    date = at or book.valuation_date
    buys = trades.action == "buy"
    values = value_book(book.with_holdings(trades.holdings.take(buys)), date) if buys.any() else None
    # A sale is priced as the book's own holding is valued today.
    sold = np.isin(book.holdings.id, trades.holdings.id[~buys])
    held = value_book(book.with_holdings(book.holdings.take(sold)), date) if sold.any() else None
    index = {hid: i for i, hid in enumerate(held.holdings.id)} if held else {}
    bought = np.cumsum(buys) - 1
    entries = []
    for i, hid in enumerate(trades.holdings.id):
        face = float(trades.holdings.face[i])
        if buys[i]:
            clean, dirty, sign = values.clean[bought[i]], values.dirty[bought[i]], -1.0
        else:
            j = index[hid]
            clean, dirty, sign = held.clean[j], held.dirty[j], 1.0
        entries.append(JournalEntry(date, str(trades.action[i]), str(hid), face,
                                    float(sign * dirty * face / 100.0), float(clean), reason))
    return entries


def book_trades(book: Book, trades: Trades, reason: str, at: dt.date | None = None) -> Booked:
    """Apply ``trades`` to the book's holdings file and journal them; returns the new book."""
    entries = trade_entries(book, trades, reason, at)
    holdings = apply_trades(book.holdings, trades)
    path = save_with_journal(book, holdings, entries)
    return Booked(book.with_holdings(holdings), path, tuple(entries))




def roll_book(book: Book, to: dt.date, called: tuple[str, ...] = ()) -> Booked:
    """Take off the book every holding that matured on or before ``to`` and each ``called`` one,
    journaling each ("mature" at its final payment, "call" at its call price plus accrued interest
    on ``to``); funds never mature. Raises InputError for a called id that is not a callable holding."""
    h = book.holdings
    problems = Problems()
    if to < book.valuation_date:
        problems.add("--to", 0, 0, f"{to} is before the book's valuation date {book.valuation_date}")
    held = dict(zip(h.id, range(len(h))))
    for hid in called:
        if hid not in held or not h.callable[held[hid]]:
            problems.add("--called", 0, 0, f"{hid} is not a callable holding of the book")
    problems.raise_if_any()
    matured = (h.maturity <= np.datetime64(to)) & (h.kind != "fund")
    is_called = np.isin(h.id, list(called)) & ~matured
    entries = []
    if matured.any():
        sub = h.take(matured)
        flows = cash_flows(sub, book.valuation_date)
        last = flows.mask.sum(axis=1) - 1
        final = flows.amount[np.arange(len(sub)), last] * sub.face / 100.0
        entries += [JournalEntry(dt.date.fromisoformat(str(sub.maturity[i])), "mature", str(sub.id[i]),
                                 float(sub.face[i]), float(final[i]), 100.0, "matured")
                    for i in range(len(sub))]
    if is_called.any():
        sub = h.take(is_called)
        accrued = cash_flows(sub, np.datetime64(to)).accrued
        entries += [JournalEntry(to, "call", str(sub.id[i]), float(sub.face[i]),
                                 float((sub.call_price[i] + accrued[i]) * sub.face[i] / 100.0),
                                 float(sub.call_price[i]), "called by the issuer")
                    for i in range(len(sub))]
    remaining = h.take(~(matured | is_called))
    path = save_with_journal(book, remaining, entries)
    return Booked(book.with_holdings(remaining), path, tuple(entries))
