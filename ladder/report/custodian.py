"""A custodian holdings file reconciled with the book: the breaks and their money effect, and the
book brought in line with the file (journaled) only when asked.

Holdings are matched by id. A **break** is a holding at the custodian only, in the book only, or held
in both with a face differing by more than ``FACE_TOLERANCE`` or a clean price differing by more than
``PRICE_TOLERANCE`` per 100. Its **money effect** is the change in market value (clean plus accrued)
if the custodian's figures were taken: + the market value of a holding at the custodian only,
- that of a holding in the book only, the difference for a face or price break. Differences in
other terms (ratings, dates, coupon, book price ...) are listed by field.

Merging: a column the custodian file lacks keeps the book's values (a file without rating columns
leaves the ratings as they are); a holding missing at the custodian stays in the book, listed as a
break, unless removal is asked for. Applying is one book transaction
(``ladder.folder.transaction.commit``): the holdings file replaced in its own format (the previous
file kept as a version) and one journal line per difference, all or nothing. No cash moves in an
import, so every line's ``amount`` is 0; its ``book_value`` is the amortized cost that arrived (add),
left (remove) or, for a change, the amortized cost after less before (+ arrived, - left).
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import dataclass, fields, replace
from pathlib import Path

import numpy as np

from ladder.analysis.valuation import value_book
from ladder.book.holdings import Holdings
from ladder.book.holdings_file import read_holdings
from ladder.book.table_file import read_table
from ladder.errors import Problems
from ladder.folder.book_file import Book
from ladder.folder.journal import JournalEntry
from ladder.folder.save import holdings_change
from ladder.folder.transaction import commit

# A face is a count of currency: it should agree to the cent. Prices: vendors' clean prices of the
# same note commonly differ by a few cents per 100 (common practice); a difference beyond 0.05 per
# 100 face (5 cents, half a basis point of a one-year note's yield) is a break.
FACE_TOLERANCE = 0.01
PRICE_TOLERANCE = 0.05
COMPARED = ("face", "quote_type", "quote", "book_price")
IGNORED = ("row",)
# The holdings-file columns each field comes from (a field whose columns are all absent keeps the book's).
SOURCE_COLUMNS = {
    "id": ("id",), "sector": ("sector",), "issuer": ("issuer",), "kind": ("kind",), "face": ("face",),
    "maturity": ("maturity_date",), "coupon": ("coupon_pct",), "frequency": ("frequency",),
    "day_count": ("day_count",), "issue_date": ("issue_date",), "first_coupon": ("first_coupon_date",),
    "rating": ("rating",), "short_rating": ("short_rating",), "rating_at_purchase": ("rating_at_purchase",),
    "quote_type": ("price", "yield_pct", "discount_rate_pct"), "quote": ("price", "yield_pct", "discount_rate_pct"),
    "book_price": ("book_price",), "purchase_date": ("purchase_date",), "first_call": ("first_call_date",),
    "call_frequency": ("first_call_date", "call_frequency"), "call_price": ("call_price",),
    "price_date": ("price_date",),
}


@dataclass(frozen=True)
class Change:
    """One holding's difference: ``kind`` added (at the custodian only) | removed (in the book only)
    | changed, the old and new face and price (clean per 100, or the quoted yield/discount rate as a
    decimal; NaN if none), the other terms that differ by field name, the breaks it makes
    (``custodian_only``, ``book_only``, ``face``, ``price``), the money effect (currency), and the
    amortized cost before and after (currency, NaN if none)."""

    id: str
    kind: str
    old_face: float = math.nan
    new_face: float = math.nan
    old_quote: str = ""
    new_quote: str = ""
    old_book_price: float = math.nan
    new_book_price: float = math.nan
    other_fields: tuple[str, ...] = ()
    breaks: tuple[str, ...] = ()
    money_effect: float = 0.0
    old_clean: float = math.nan
    new_clean: float = math.nan
    old_book_value: float = math.nan
    new_book_value: float = math.nan

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
            parts.append(f"at the custodian only: face {self.new_face:,.2f}, quote {self.new_quote or 'none'}")
        else:
            parts.append(f"in the book only: face {self.old_face:,.2f}")
        head = f"{self.kind} {self.id}: " + "; ".join(parts)
        if self.breaks:
            head += f" [break: {', '.join(self.breaks)}; money effect {self.money_effect:+,.2f}]"
        return head


def _same(a, b) -> bool:
    if isinstance(a, float) or isinstance(b, float):
        return (math.isnan(a) and math.isnan(b)) or a == b
    return a == b


def _quote(h: Holdings, i: int) -> str:
    if not h.quote_type[i]:
        return ""
    value = h.quote[i] if h.quote_type[i] == "price" else 100 * h.quote[i]
    return f"{h.quote_type[i]} {value:g}" + ("" if h.quote_type[i] == "price" else "%")


def _item(value):
    if isinstance(value, np.datetime64):
        return None if np.isnat(value) else str(value)
    return value.item() if isinstance(value, np.generic) else value


@dataclass(frozen=True, eq=False)
class CustodianFile:
    """The holdings of a custodian file and the columns it has."""

    path: Path
    holdings: Holdings
    columns: frozenset[str]


def read_custodian_file(book: Book, path: Path) -> CustodianFile:
    """The holdings in a custodian file (the holdings.csv/.xlsx columns), checked as the book's are
    (a duplicate id is a ``file:row:column`` problem): InputError on any problem."""
    problems = Problems()
    holdings, _ = read_holdings(Path(path), book.valuation_date, problems)
    problems.raise_if_any()
    table = read_table(Path(path), Problems())
    return CustodianFile(Path(path), holdings, frozenset(table.column) if table is not None else frozenset())


def merged_holdings(book: Holdings, custodian: CustodianFile, remove_missing: bool = False) -> Holdings:
    """The book brought in line with the custodian: held in both -> the custodian's row with the
    book's values for every field whose columns the file lacks; at the custodian only -> added at the
    end; in the book only -> kept unless ``remove_missing``. The book's order is kept."""
    new = custodian.holdings
    at = {hid: j for j, hid in enumerate(new.id)}
    missing = [name for name, cols in SOURCE_COLUMNS.items() if not any(c in custodian.columns for c in cols)]
    both = np.array([i for i, hid in enumerate(book.id) if hid in at], dtype=np.int64)
    in_file = np.array([at[book.id[i]] for i in both], dtype=np.int64)
    taken = new.take(in_file)
    if missing and len(both):
        taken = replace(taken, **{name: getattr(book, name)[both] for name in missing})
    kept = np.isin(book.id, new.id)
    order = np.flatnonzero(kept | (not remove_missing))
    slot = np.full(len(book), -1, dtype=np.int64)
    slot[both] = len(book) + np.arange(len(both))
    index = np.where(slot[order] >= 0, slot[order], order)
    added = np.flatnonzero(~np.isin(new.id, book.id))
    return Holdings.concat([Holdings.concat([book, taken]).take(index), new.take(added)])


def _values(book: Book, h: Holdings):
    """Clean price per 100, market value and amortized cost of ``h`` valued in ``book``, by id."""
    if not len(h):
        return {}
    v = value_book(replace(book, holdings=h))
    return {hid: (float(v.clean[i]), float(v.market_value[i]), float(v.book_value[i])) for i, hid in enumerate(h.id)}


def reconcile(book: Book, custodian: CustodianFile, remove_missing: bool = False) -> tuple[tuple[Change, ...], Holdings]:
    """Every difference between the book and the custodian file (breaks first marked), in the
    merged holdings' order, and the merged holdings (``merged_holdings``)."""
    old = book.holdings
    merged = merged_holdings(old, custodian, remove_missing)
    before, after = _values(book, old), _values(book, merged)
    # a holding in the book only is valued as it stands (after removal it has no value in ``merged``)
    new_at = {hid: j for j, hid in enumerate(merged.id)}
    old_at = {hid: i for i, hid in enumerate(old.id)}
    at_custodian = set(custodian.holdings.id)
    others = [f.name for f in fields(Holdings) if f.name not in COMPARED + IGNORED + ("id",)]
    nan3 = (math.nan, 0.0, math.nan)
    changes = []
    for hid in list(merged.id) + [h for h in old.id if h not in new_at]:
        i, j = old_at.get(hid), new_at.get(hid)
        oc, omv, obv = before.get(hid, nan3) if i is not None else nan3
        nc, nmv, nbv = after.get(hid, nan3) if j is not None else nan3
        if i is None:
            changes.append(Change(hid, "added", new_face=float(merged.face[j]), new_quote=_quote(merged, j),
                                  new_book_price=float(merged.book_price[j]), breaks=("custodian_only",),
                                  money_effect=nmv, new_clean=nc, new_book_value=nbv))
            continue
        if hid not in at_custodian:
            changes.append(Change(hid, "removed", old_face=float(old.face[i]), old_quote=_quote(old, i),
                                  old_book_price=float(old.book_price[i]), breaks=("book_only",),
                                  money_effect=-omv, old_clean=oc, old_book_value=obv))
            continue
        differ = tuple(name for name in others if not _same(_item(getattr(old, name)[i]), _item(getattr(merged, name)[j])))
        breaks = tuple(b for b, hit in (("face", abs(float(merged.face[j]) - float(old.face[i])) > FACE_TOLERANCE),
                                        ("price", abs(nc - oc) > PRICE_TOLERANCE)) if hit)
        change = Change(hid, "changed", float(old.face[i]), float(merged.face[j]), _quote(old, i), _quote(merged, j),
                        float(old.book_price[i]), float(merged.book_price[j]), differ, breaks,
                        nmv - omv if breaks else 0.0, oc, nc, obv, nbv)
        if (differ or not _same(change.old_face, change.new_face) or change.old_quote != change.new_quote
                or not _same(change.old_book_price, change.new_book_price)):
            changes.append(change)
    return tuple(changes), merged


def compare_holdings(book: Book, custodian: CustodianFile) -> tuple[Change, ...]:
    """The differences of ``reconcile`` (nothing removed)."""
    return reconcile(book, custodian)[0]


def _entry(change: Change, date: dt.date, reason: str, source: str, remove_missing: bool) -> JournalEntry | None:
    if change.kind == "removed" and not remove_missing:
        return None                            # kept in the book: a break to investigate, not a change
    action = {"added": "add", "removed": "remove", "changed": "change"}[change.kind]
    face = change.old_face if change.kind == "removed" else change.new_face
    price = change.old_clean if change.kind == "removed" else change.new_clean
    book_value = {"added": change.new_book_value, "removed": change.old_book_value,
                  "changed": change.new_book_value - change.old_book_value}[change.kind]
    why = f"custodian file {source}: {change.describe()}" + (f" ({reason})" if reason else "")
    return JournalEntry(date, action, change.id, face, 0.0, price, why, book_value=book_value)


def apply_reconciliation(book: Book, merged: Holdings, changes: tuple[Change, ...], source: str, reason: str = "",
                         remove_missing: bool = False, date: dt.date | None = None) -> tuple[Path, int]:
    """Write ``merged`` as the book's holdings and journal every change applied (dated ``date``,
    default the book's valuation date), one transaction; returns the holdings file and the number of
    journal lines."""
    date = date or book.valuation_date
    entries = [e for e in (_entry(c, date, reason, source, remove_missing) for c in changes) if e is not None]
    commit(book, holdings_change(book, merged), entries, f"import {source}")
    return book.files["holdings"], len(entries)
