"""Time moves a book: coupons, maturities, calls and fund dividends paid into the cash account, and
transfers between the portfolio and the company's operating accounts.

``roll_book`` takes the book from its valuation date to a later one: every coupon (by accrual date),
maturity, call and fund dividend in (valuation date, to] is one journal line whose ``amount`` is
credited to the cash account (``[cash] account``; a book without one journals the amounts only).
Matured and called holdings leave the book; funds stay (their next-day ``maturity_date`` moves to the
day after ``to``); book.toml's ``valuation_date`` becomes ``to``. ``transfer`` records a deposit or
withdrawal. Each is one book transaction: the files and the journal lines together.
Money in currency units, every amount rounded to the cent (cash moves in cents); a fund's dividend
is its yield x balance x days / 365 (ACT/365F, the fund day count of
``ladder.book.holdings.SECTOR_DEFAULTS``); ``book_value`` of a maturity is the face (the amortized
cost reaches par), of a call the amortized cost on the call date, of income 0.
"""

from __future__ import annotations

import datetime as dt
import math
import re
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np

from ladder.errors import Problems
from ladder.folder.book_file import BOOK_FILE, Book
from ladder.folder.journal import JournalEntry
from ladder.folder.save import holdings_change
from ladder.folder.transaction import commit
from ladder.pricing.amortization import FUND_YEAR_DAYS, amortize
from ladder.pricing.callable import call_dates
from ladder.pricing.cashflows import cash_flows

_VALUATION_LINE = re.compile(r"^(valuation_date\s*=\s*)\d{4}-\d{2}-\d{2}", re.MULTILINE)


@dataclass(frozen=True, eq=False)
class Moved:
    """The book after the change, the journal lines as recorded, the version keeping the replaced
    files ("" if none) and the cash account's balance before and after (NaN without one)."""

    book: Book
    entries: tuple[JournalEntry, ...]
    version: str
    cash_before: float
    cash_after: float


def parse_called(values, book: Book, to: dt.date) -> dict[str, dt.date]:
    """``--called ID[:DATE]`` values as {id: call date} (default ``to``); InputError naming ``--called``
    for an id that is not callable or a date before the first call, off the call schedule, or outside
    (valuation date, to]."""
    h, problems, out = book.holdings, Problems(), {}
    held = {hid: i for i, hid in enumerate(h.id)}
    for value in values:
        hid, _, text = value.partition(":")
        hid = hid.strip()
        try:
            date = dt.date.fromisoformat(text.strip()) if text.strip() else to
        except ValueError:
            problems.add("--called", 0, 0, f"{value}: {text!r} is not a date written YYYY-MM-DD")
            continue
        i = held.get(hid)
        if i is None or not h.callable[i]:
            problems.add("--called", 0, 0, f"{hid} is not a callable holding of the book")
            continue
        first = h.first_call[i].astype(dt.date)
        dates, mask = call_dates(h.id[i:i + 1], h.first_call[i:i + 1], h.call_frequency[i:i + 1], h.maturity[i:i + 1])
        schedule = [d.astype(dt.date) for d in dates[0][mask[0]]]
        if date < first:
            problems.add("--called", 0, 0, f"{hid}: called {date} is before its first call date {first}")
        elif date not in schedule:
            shown = ", ".join(str(d) for d in schedule[:6]) + (" ..." if len(schedule) > 6 else "")
            problems.add("--called", 0, 0, f"{hid}: {date} is not on its call schedule ({shown})")
        elif not book.valuation_date < date <= to:
            problems.add("--called", 0, 0, f"{hid}: the call date {date} is not after the valuation date "
                                           f"{book.valuation_date} and on or before {to}")
        else:
            out[hid] = date
    problems.raise_if_any()
    return out


def roll_entries(book: Book, to: dt.date, called: dict[str, dt.date]) -> tuple[list[JournalEntry], np.ndarray]:
    """The journal lines of the roll to ``to`` (date order) and the mask of holdings that leave."""
    h, start = book.holdings, np.datetime64(book.valuation_date)
    end = np.datetime64(to)
    fund = h.kind == "fund"
    call_on = np.array([np.datetime64(called.get(hid, "NaT"), "D") for hid in h.id], dtype="datetime64[D]")
    matured = ~fund & (h.maturity <= end) & (np.isnat(call_on) | (h.maturity <= call_on))
    is_called = ~np.isnat(call_on) & ~matured
    last = np.where(is_called, call_on, np.minimum(h.maturity, end))
    entries = []
    rows = np.flatnonzero(~fund)
    if len(rows):
        cf = cash_flows(h.take(rows), start)
        due = cf.mask & (cf.dates > start) & (cf.dates <= last[rows][:, None]) & (cf.coupon > 0)
        for r, k in zip(*np.nonzero(due)):
            i = rows[r]
            money = round(float(cf.coupon[r, k] * h.face[i] / 100.0), 2)
            entries.append(JournalEntry(cf.dates[r, k].astype(dt.date), "coupon", str(h.id[i]), float(h.face[i]),
                                        money, math.nan, "interest paid", book_value=0.0))
    for i in np.flatnonzero(matured):
        entries.append(JournalEntry(h.maturity[i].astype(dt.date), "mature", str(h.id[i]), float(h.face[i]),
                                    float(h.face[i]), 100.0, "matured", book_value=float(h.face[i])))
    if is_called.any():
        rows = np.flatnonzero(is_called)
        sub = h.take(rows)
        accrued = cash_flows(sub, call_on[rows]).accrued
        cost = np.where(np.isnan(sub.book_price), sub.call_price, np.nan)
        known = ~np.isnan(sub.book_price) & ~np.isnat(sub.purchase_date)
        if known.any():
            am = amortize(sub.take(known))
            cost[known] = [am.cost(np.array([d]))[j, 0] for j, d in enumerate(call_on[rows][known])]
        cost = np.where(np.isnan(cost), sub.call_price, cost)
        for j, i in enumerate(rows):
            entries.append(JournalEntry(call_on[i].astype(dt.date), "call", str(h.id[i]), float(h.face[i]),
                                        round(float((h.call_price[i] + accrued[j]) * h.face[i] / 100.0), 2),
                                        float(h.call_price[i]), "called by the issuer",
                                        book_value=round(float(cost[j] * h.face[i] / 100.0), 2)))
    days = float((end - start).astype(np.int64))
    for i in np.flatnonzero(fund & (days > 0)):
        money = round(float(h.face[i] * np.nan_to_num(h.quote[i]) * days / FUND_YEAR_DAYS), 2)
        if money:
            entries.append(JournalEntry(to, "dividend", str(h.id[i]), math.nan, money, math.nan,
                                        f"fund income {book.valuation_date} to {to}", book_value=0.0))
    entries.sort(key=lambda e: e.date)
    return entries, matured | is_called


def roll_book(book: Book, to: dt.date, called: dict[str, dt.date] | None = None) -> Moved:
    """Move ``book`` to ``to`` (module docstring); InputError for a date before the valuation date."""
    if to < book.valuation_date:
        problems = Problems()
        problems.add("--to", 0, 0, f"{to} is before the book's valuation date {book.valuation_date}")
        problems.raise_if_any()
    entries, leaving = roll_entries(book, to, called or {})
    h = book.holdings.take(~leaving)
    fund = h.kind == "fund"
    h = replace(h, maturity=np.where(fund, np.maximum(h.maturity, np.datetime64(to) + 1), h.maturity))
    h = _credited(book, h, sum(e.amount for e in entries))
    path = Path(book.folder) / BOOK_FILE
    text = path.read_text(encoding="utf-8-sig")
    moved = _VALUATION_LINE.sub(lambda m: m.group(1) + to.isoformat(), text, count=1)
    files = {**holdings_change(book, h), path: moved.encode("utf-8")}
    done = commit(book, files, entries, f"roll to {to}")
    after = replace(book, valuation_date=to, holdings=h)
    return Moved(after, done.entries, done.version, _balance(book, book.holdings), _balance(book, h))


def transfer(book: Book, amount: float, date: dt.date | None = None, memo: str = "",
             allow_overdraft: bool = False) -> Moved:
    """Deposit (``amount`` > 0) into or withdraw (< 0) from the cash account, journaled; InputError
    when the book has no cash account, the date is before the valuation date, or a withdrawal is
    larger than the balance without ``allow_overdraft``."""
    problems = Problems()
    date = date or book.valuation_date
    amount = round(amount, 2)
    option = "--deposit" if amount > 0 else "--withdraw"
    if not book.cash_account:
        problems.add(str(Path(book.folder) / BOOK_FILE), 0, 0, "the book names no cash account; add "
                     '[cash] account = "<fund holding id>" (docs/formats.md)')
    if not (math.isfinite(amount) and amount != 0):
        problems.add(option, 0, 0, "the amount must be a number other than 0 (currency units)")
    if date < book.valuation_date:
        problems.add("--date", 0, 0, f"{date} is before the book's valuation date {book.valuation_date}")
    problems.raise_if_any()
    balance = _balance(book, book.holdings)
    if amount < 0 and -amount > balance + 0.005 and not allow_overdraft:
        problems.add(option, 0, 0, f"withdrawing {-amount:,.2f} from {book.cash_account}, which holds "
                                   f"{balance:,.2f}; add --allow-overdraft to overdraw it; nothing was written")
        problems.raise_if_any()
    entry = JournalEntry(date, "deposit" if amount > 0 else "withdraw", book.cash_account, abs(amount), amount, 100.0,
                         memo or ("deposit from the company" if amount > 0 else "withdrawal to the company"),
                         book_value=abs(amount))
    h = _credited(book, book.holdings, amount)
    done = commit(book, holdings_change(book, h), [entry], f"cash {option[2:]} {abs(amount):,.2f}")
    return Moved(book.with_holdings(h), done.entries, done.version, balance, _balance(book, h))


def _balance(book: Book, holdings) -> float:
    hit = holdings.id == book.cash_account
    return float(holdings.face[hit].sum()) if book.cash_account and hit.any() else math.nan


def _credited(book: Book, holdings, amount: float):
    """``holdings`` with ``amount`` added to the cash account's balance (unchanged without one)."""
    if not book.cash_account:
        return holdings
    return replace(holdings, face=np.where(holdings.id == book.cash_account, holdings.face + amount, holdings.face))
