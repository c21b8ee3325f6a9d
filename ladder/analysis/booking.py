"""Booking trades into a book: the holdings file and the activity journal change together.

Every trade-like change goes through here: ``book_trades`` for a builder's accepted ladder or a
trade ticket, ``roll_book`` for maturities and calls rolled past, ``save_edits`` for the
workstation's save. Each is one book transaction (``ladder.folder.transaction.commit``): the
holdings file replaced (its previous version kept) and one journal line a change (date, face, cash
amount, price, reason) appended, all or nothing. Callers hold the book's lock
(``ladder.folder.lock.book_lock``) from loading the book to the commit.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, replace
from pathlib import Path


from ladder.folder.book_file import Book
from ladder.folder.journal import JournalEntry, journal_path
from ladder.folder.lock import book_lock
from ladder.folder.save import curve_change, holdings_change
from ladder.folder.transaction import Committed, commit, file_hashes
from ladder.analysis.settlement import Settlement, settle_trades
from ladder.policy.trades import Trades


@dataclass(frozen=True, eq=False)
class Booked:
    """The book after the change, the holdings file written, the journal entries as recorded and the
    version keeping the previous file ("" if none)."""

    book: Book
    path: Path
    entries: tuple[JournalEntry, ...]
    version: str


def trade_entries(book: Book, trades: Trades, reason: str, at: dt.date | None = None) -> list[JournalEntry]:
    """The journal lines of ``trades`` settled through the book's cash account
    (``ladder.analysis.settlement``); ``at`` is the settlement date of trades that give none."""
    return list(settle_trades(_dated(book, trades, at), trades, reason).entries)


def _dated(book: Book, trades: Trades, at: dt.date | None) -> Book:
    return book if at is None or at == book.valuation_date else replace(book, valuation_date=at)


def settled_holdings(book: Book, trades: Trades, reason: str = "", where: str = "") -> Settlement:
    """``trades`` settled on ``book``; raises InputError (naming ``where``, default the trades file) when
    the account cannot pay a buy."""
    settled = settle_trades(book, trades, reason)
    settled.refuse_shortfalls(where or trades.file)
    return settled


def book_trades(book: Book, trades: Trades, reason: str, at: dt.date | None = None, where: str = "") -> Booked:
    """Settle ``trades`` through the cash account, write the holdings file and journal them; returns the
    new book. Refused (InputError, nothing written) when the account cannot pay a buy."""
    settled = settled_holdings(_dated(book, trades, at), trades, reason, where)
    done = commit(book, holdings_change(book, settled.holdings), settled.entries, reason)
    return Booked(book.with_holdings(settled.holdings), book.files["holdings"], done.entries, done.version)


# ---- the workstation's save ------------------------------------------------------------------------
@dataclass(frozen=True, eq=False)
class Pending:
    """Trades booked in the workstation and not yet saved, with the journal's reason for them."""

    trades: Trades
    reason: str


class BookChanged(OSError):
    """The book's files changed on disk since the workstation loaded them: nothing was saved."""

    def __init__(self, files: list[str]):
        super().__init__("changed on disk since the book was loaded: " + ", ".join(files) + "; nothing was saved")
        self.files = files


def watched_files(book: Book) -> list[Path]:
    """The files a save replaces or appends to: holdings, curve and journal."""
    return [Path(book.files["holdings"]), Path(book.files["curve"]), journal_path(book)]


def loaded_state(book: Book) -> dict[str, str]:
    """Hashes of the watched files as they are now (take them when the book is loaded)."""
    return file_hashes(watched_files(book))


def save_edits(book: Book, loaded: dict[str, str], entries, holdings: bool, curve: bool) -> Committed:
    """Save the workstation's edited book: its holdings (with ``entries``, the journal lines of the
    trades booked) and/or its curve, as one transaction under the lock. Refuses with ``BookChanged``
    if any watched file differs from ``loaded`` (its hashes when the book was loaded)."""
    with book_lock(book.folder, "workstation save"):
        now = loaded_state(book)
        changed = [Path(p).name for p in now if now[p] != loaded.get(p)]
        if changed:
            raise BookChanged(changed)
        files = {**(holdings_change(book, book.holdings) if holdings else {}),
                 **(curve_change(book, book.curve) if curve else {})}
        return commit(book, files, entries if holdings else (), "workstation save")


def trade_problems(holdings, trades: Trades) -> list[str]:
    """Why ``trades`` cannot be applied to ``holdings`` as they are now (a buy's id already held, a
    sale of a holding no longer held or of more face than is held); empty if they can."""
    held = dict(zip(holdings.id, holdings.face))
    problems = []
    for action, hid, face in zip(trades.action, trades.holdings.id, trades.holdings.face):
        if action == "buy" and hid in held:
            problems.append(f"buy {hid}: the book already holds {hid}")
        elif action == "sell" and hid not in held:
            problems.append(f"sell {hid}: no longer in the book")
        elif action == "sell" and face > held[hid] + 1e-6:
            problems.append(f"sell {hid}: sells {face:,.2f} face but the book now holds {held[hid]:,.2f}")
    return problems


def reapply(book: Book, pending) -> tuple[Book, list[Pending], list[JournalEntry], list[str]]:
    """``pending`` trades re-checked and re-applied, in order, to a reloaded ``book``: the book after
    those that still apply, them, their journal lines (priced on the reloaded book) and why the
    others were dropped."""
    kept, entries, dropped = [], [], []
    for p in pending:
        problems = trade_problems(book.holdings, p.trades)
        if problems:
            dropped.append(f"{p.reason}: " + "; ".join(problems))
            continue
        settled = settle_trades(book, p.trades, p.reason)
        if settled.shortfalls:
            dropped.append(f"{p.reason}: the cash account cannot pay it")
            continue
        entries += settled.entries
        book = book.with_holdings(settled.holdings)
        kept.append(p)
    return book, kept, entries, dropped
