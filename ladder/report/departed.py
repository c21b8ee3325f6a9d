"""Interest earned in the period by holdings that left the book during it (matured, called, sold).

Their terms come from last month's snapshot (the holdings file recorded with it, read back from the
history); the date each left is its journal entry of the period (``mature``, ``call``, ``sell``,
``remove``), else its maturity if that falls in the period, else the report date (it left without
a record: counted to the end of the period, and named as such). Income is the effective-interest
method's interest earned from the period start to that date, each part that left on its own date
and face (a partial sale before the rest matured earns to the sale); a called holding is redeemed on its
call date at the call price (``amortize(..., redeemed_on=)``).
"""

from __future__ import annotations

import datetime as dt
import tempfile
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ladder.book.holdings import Holdings
from ladder.book.holdings_file import read_holdings
from ladder.errors import Problems
from ladder.pricing.amortization import amortize
from ladder.report import history
from ladder.report.history import Snapshot
from ladder.folder.journal import JournalEntry
from ladder.report.model import Column, Table

EXIT_ACTIONS = ("mature", "call", "sell", "remove")


@dataclass(frozen=True, eq=False)
class Departed:
    """Per departed holding (m,): id, the date and way it left, coupon accrual and amortization
    earned in the period up to then (currency)."""

    id: np.ndarray
    exit_date: np.ndarray
    how: tuple[str, ...]
    coupon_income: np.ndarray
    amortization: np.ndarray

    @property
    def interest_earned(self) -> np.ndarray:
        return self.coupon_income + self.amortization


NONE = Departed(np.array([], dtype=object), np.array([], dtype="datetime64[D]"), (), np.zeros(0), np.zeros(0))


def previous_holdings(book_or_folder, previous: Snapshot) -> Holdings | None:
    """The holdings recorded with ``previous`` (None if that file cannot be read back)."""
    name, sha = previous.inputs.get("holdings", ("", ""))
    if not sha:
        return None
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / name
        path.write_bytes(history.input_content(book_or_folder, sha))
        holdings, _ = read_holdings(path, previous.as_of, Problems())
    return holdings


def _exits(h: Holdings, start: dt.date, as_of: dt.date, entries: tuple[JournalEntry, ...]):
    recorded = {e.holding: e for e in entries if e.action in EXIT_ACTIONS and e.date <= as_of}   # the last exit
    dates, how = [], []
    for i, hid in enumerate(h.id):
        maturity = h.maturity[i].astype(dt.date)
        if hid in recorded:
            dates.append(recorded[hid].date)
            how.append(recorded[hid].action)
        elif h.kind[i] != "fund" and start < maturity <= as_of:
            dates.append(maturity)
            how.append("mature (no journal entry)")
        else:
            dates.append(as_of)
            how.append("left the book without a journal entry; counted to the period end")
    return np.array(dates, dtype="datetime64[D]"), tuple(how)


def departed_income(before: Holdings | None, current_ids, start: dt.date, as_of: dt.date,
                    entries: tuple[JournalEntry, ...]) -> Departed:
    """Income of the holdings in ``before`` that are not in ``current_ids``, over (start, exit]."""
    if before is None:
        return NONE
    gone = before.take(~np.isin(before.id, np.asarray(list(current_ids), dtype=object)))
    known = (gone.kind == "fund") | (np.isfinite(gone.book_price) & ~np.isnat(gone.purchase_date))
    gone = gone.take(known)
    if not len(gone):
        return NONE
    exit_date, how = _exits(gone, start, as_of, entries)
    called = np.where(np.array([w == "call" for w in how]), exit_date, np.datetime64("NaT"))
    schedule = amortize(gone, redeemed_on=called)
    rows, dates, faces = _pieces(gone, exit_date, entries)
    coupon, amort = np.zeros(len(gone)), np.zeros(len(gone))
    begin = np.datetime64(start, "D")
    for end in np.unique(dates):
        at = dates == end
        earned = schedule.earned(np.array([begin, max(end, begin)]))
        np.add.at(coupon, rows[at], earned.coupon[rows[at], 0] * faces[at] / 100.0)
        np.add.at(amort, rows[at], earned.amortization[rows[at], 0] * faces[at] / 100.0)
    return Departed(gone.id, exit_date, how, coupon, amort)


def _pieces(gone: Holdings, exit_date: np.ndarray, entries: tuple[JournalEntry, ...]):
    """The parts in which each departed holding left: (row, date, face) of each exit line of the
    period (a partial sale earns up to its own date, on its own face), and what no line accounts for
    on the holding's exit date."""
    at = {hid: i for i, hid in enumerate(gone.id)}
    lines = [(at[e.holding], e.date, e.face) for e in entries
             if e.action in EXIT_ACTIONS and e.holding in at and np.isfinite(e.face)]
    rest = gone.face.astype(np.float64).copy()
    for row, _, face in lines:
        rest[row] -= face
    left = np.flatnonzero(rest > 0.005)          # half a cent of face: every face is written to the cent
    rows = np.array([r for r, _, _ in lines] + list(left), dtype=np.int64)
    dates = np.array([np.datetime64(d, "D") for _, d, _ in lines] + list(exit_date[left]), dtype="datetime64[D]")
    faces = np.array([f for _, _, f in lines] + list(rest[left]), dtype=np.float64)
    return rows, dates, faces


DEPARTED_COLUMNS = (Column("id", "Holding"), Column("exit", "Left the book", "date"), Column("how", "How"),
                    Column("coupon", "Coupon interest accrued", "money"),
                    Column("amortization", "Amortization / accretion", "money"),
                    Column("earned", "Interest earned in the period", "money"))


def departed_table(d: Departed) -> Table:
    rows = tuple((str(d.id[i]), d.exit_date[i].astype(dt.date), d.how[i], float(d.coupon_income[i]),
                  float(d.amortization[i]), float(d.interest_earned[i])) for i in range(len(d.id)))
    total = ("Total", None, f"{len(rows)} holdings", float(d.coupon_income.sum()), float(d.amortization.sum()),
             float(d.interest_earned.sum()))
    return Table("Income of holdings that left the book in the period", DEPARTED_COLUMNS, rows, total)
