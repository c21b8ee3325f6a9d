"""The cash account's statement: its balance and every journal line that moved it.

Every journal ``amount`` is cash into (+) or out of (-) the book's cash account
(``ladder.analysis.settlement``), so the account's balance is its opening balance plus every amount,
and the balance after each line is today's balance less the amounts of the lines after it (lines in
date order, the journal's own order within a date). Lines not yet saved (the workstation's pending
trades) come after the saved ones of their date and are marked. Money in currency units.
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import dataclass

import numpy as np

from ladder.analysis.settlement import cash_balance
from ladder.folder.book_file import Book
from ladder.folder.journal import JournalEntry, read_journal

# The journal's actions that move cash, by kind of activity (for the statement's filter).
ACTIVITY = {"buy": "trades", "sell": "trades", "mature": "maturities", "call": "calls", "coupon": "coupons",
            "dividend": "coupons", "deposit": "transfers", "withdraw": "transfers"}


@dataclass(frozen=True, eq=False)
class CashActivity:
    """``entries`` (date order) with ``balance_after`` (n,) and ``unsaved`` (n,) bool beside them;
    ``balance`` today's balance of ``account`` (NaN when the book names none)."""

    account: str
    balance: float
    entries: tuple[JournalEntry, ...]
    balance_after: np.ndarray
    unsaved: np.ndarray

    @property
    def opening(self) -> float:
        """The balance before the first line."""
        return self.balance - float(sum(e.amount for e in self.entries))

    def rows(self, actions=None, start: dt.date | None = None, end: dt.date | None = None) -> np.ndarray:
        """Positions of the lines of the journal ``actions`` (keys of ACTIVITY; None: every one) dated
        in [start, end] (either open)."""
        keep = [(actions is None or e.action in actions) and (start is None or e.date >= start)
                and (end is None or e.date <= end) for e in self.entries]
        return np.flatnonzero(np.array(keep, dtype=bool))

    def totals(self, rows) -> tuple[float, float]:
        """Money in and money out (negative) over the lines at ``rows``."""
        amounts = np.array([self.entries[i].amount for i in rows], dtype=np.float64)
        return float(amounts[amounts > 0].sum()), float(amounts[amounts < 0].sum())


def _moves_cash(e: JournalEntry) -> bool:
    return e.action in ACTIVITY and math.isfinite(e.amount) and e.amount != 0


def cash_activity(book: Book, pending=()) -> CashActivity:
    """The statement of ``book``'s cash account from its journal, with ``pending`` (JournalEntry, not
    yet saved) after; ``book`` is the book as it stands (its holdings include the pending trades)."""
    saved = [e for e in read_journal(book) if _moves_cash(e)]
    unsaved = [e for e in pending if _moves_cash(e)]
    lines = sorted(enumerate(saved + unsaved), key=lambda pair: (pair[1].date, pair[0]))
    entries = tuple(e for _, e in lines)
    amounts = np.array([e.amount for e in entries], dtype=np.float64)
    balance = cash_balance(book)
    later = np.concatenate([np.cumsum(amounts[::-1])[::-1][1:], [0.0]]) if len(amounts) else amounts
    return CashActivity(book.cash_account, balance, entries, balance - later,
                        np.array([i >= len(saved) for i, _ in lines], dtype=bool))
