"""Booking trades into a book: the holdings file and the activity journal change together.

Every change the tool makes to a book (a builder's accepted ladder, a trade ticket) goes through
``book_trades``: the trades are applied, the holdings file is written atomically with a backup, and
one journal line a trade is appended with its date, face, cash amount, price and reason.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass
from pathlib import Path

import numpy as np


from ladder.analysis.valuation import value_book
from ladder.book.book_file import Book
from ladder.book.journal import JournalEntry, save_with_journal
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


