"""A new custodian holdings file against the book: what was added, removed or changed, and the
replacement of the book's holdings with it (journaled), only when asked.

Holdings are matched by id. A change is any difference in face, price (the quote and its kind) or
book price, or in any other term (listed by field). Replacing is one book transaction
(``ladder.folder.transaction.commit``): the holdings file replaced in its own format (the previous
file kept as a version) and one journal entry per difference appended, all or nothing.
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import dataclass, fields
from pathlib import Path

import numpy as np

from ladder.folder.book_file import Book
from ladder.book.holdings import Holdings
from ladder.book.holdings_file import read_holdings
from ladder.errors import Problems
from ladder.folder.journal import JournalEntry
from ladder.folder.save import holdings_change
from ladder.folder.transaction import commit

COMPARED = ("face", "quote_type", "quote", "book_price")
IGNORED = ("row",)


@dataclass(frozen=True)
class Change:
    """One holding's difference: ``kind`` added | removed | changed, the old and new face and price
    (clean per 100, or the quoted yield/discount rate as a decimal; NaN if none), and the other terms
    that differ, by field name."""

    id: str
    kind: str
    old_face: float = math.nan
    new_face: float = math.nan
    old_quote: str = ""
    new_quote: str = ""
    old_book_price: float = math.nan
    new_book_price: float = math.nan
    other_fields: tuple[str, ...] = ()

    def describe(self) -> str:
        parts = []
        if self.kind == "changed":
            if not _same(self.old_face, self.new_face):
                parts.append(f"face {self.old_face:,.2f} -> {self.new_face:,.2f}")
            if self.old_quote != self.new_quote:
                parts.append(f"quote {self.old_quote or 'none'} -> {self.new_quote or 'none'}")
            if not _same(self.old_book_price, self.new_book_price):
                parts.append(f"book price {self.old_book_price:g} -> {self.new_book_price:g}")
            if self.other_fields:
                parts.append("also " + ", ".join(self.other_fields))
        elif self.kind == "added":
            parts.append(f"face {self.new_face:,.2f}, quote {self.new_quote or 'none'}")
        else:
            parts.append(f"face {self.old_face:,.2f}")
        return f"{self.kind} {self.id}: " + "; ".join(parts)


def _same(a, b) -> bool:
    if isinstance(a, float) or isinstance(b, float):
        return (math.isnan(a) and math.isnan(b)) or a == b
    return a == b


def _quote(h: Holdings, i: int) -> str:
    if not h.quote_type[i]:
        return ""
    value = h.quote[i] if h.quote_type[i] == "price" else 100 * h.quote[i]
    return f"{h.quote_type[i]} {value:g}" + ("" if h.quote_type[i] == "price" else "%")


def compare_holdings(old: Holdings, new: Holdings) -> tuple[Change, ...]:
    """Every difference between ``old`` (the book) and ``new`` (the custodian's file), in the new
    file's order, then the removed holdings in the book's order."""
    old_at = {hid: i for i, hid in enumerate(old.id)}
    new_at = {hid: i for i, hid in enumerate(new.id)}
    others = [f.name for f in fields(Holdings) if f.name not in COMPARED + IGNORED + ("id",)]
    changes = []
    for j, hid in enumerate(new.id):
        i = old_at.get(hid)
        if i is None:
            changes.append(Change(hid, "added", new_face=float(new.face[j]), new_quote=_quote(new, j),
                                  new_book_price=float(new.book_price[j])))
            continue
        differ = tuple(name for name in others if not _same(_item(getattr(old, name)[i]), _item(getattr(new, name)[j])))
        change = Change(hid, "changed", float(old.face[i]), float(new.face[j]), _quote(old, i), _quote(new, j),
                        float(old.book_price[i]), float(new.book_price[j]), differ)
        if (differ or not _same(change.old_face, change.new_face) or change.old_quote != change.new_quote
                or not _same(change.old_book_price, change.new_book_price)):
            changes.append(change)
    for i, hid in enumerate(old.id):
        if hid not in new_at:
            changes.append(Change(hid, "removed", old_face=float(old.face[i]), old_quote=_quote(old, i),
                                  old_book_price=float(old.book_price[i])))
    return tuple(changes)


def _item(value):
    if isinstance(value, np.datetime64):
        return None if np.isnat(value) else str(value)
    return value.item() if isinstance(value, np.generic) else value


def read_custodian_file(book: Book, path: Path) -> Holdings:
    """The holdings in a custodian file (the holdings.csv/.xlsx columns), checked as the book's are."""
    problems = Problems()
    holdings, _ = read_holdings(Path(path), book.valuation_date, problems)
    problems.raise_if_any()
    return holdings


def _entry(change: Change, date: dt.date, reason: str, source: str) -> JournalEntry:
    action = {"added": "add", "removed": "remove", "changed": "change"}[change.kind]
    face = change.old_face if change.kind == "removed" else change.new_face
    price = change.old_book_price if change.kind == "removed" else change.new_book_price
    why = f"custodian file {source}: {change.describe()}" + (f" ({reason})" if reason else "")
    return JournalEntry(date, action, change.id, face, math.nan, price, why)


def replace_holdings(book: Book, new: Holdings, changes: tuple[Change, ...], source: str, reason: str = "",
                     date: dt.date | None = None) -> Path:
    """Write ``new`` as the book's holdings and journal every change (dated ``date``, default the
    book's valuation date), one transaction; returns the holdings file."""
    date = date or book.valuation_date
    commit(book, holdings_change(book, new), [_entry(c, date, reason, source) for c in changes], f"import {source}")
    return book.files["holdings"]
