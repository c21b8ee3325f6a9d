"""The month-end's roll-forward of the securities' amortized cost, and the realized gains and losses.

Securities only (funds and sweeps carry at their balance and move with cash, not here). Over the
period (start, as_of]:

  beginning amortized cost (last month-end's snapshot)
  + purchases at cost (journal ``buy`` and ``add`` lines' ``book_value``; and holdings whose
    purchase date falls in the period with no journal line, at book price x face / 100, marked)
  - amortized cost of what was sold, matured, called or removed (those journal lines' ``book_value``)
  + accretion of discount - amortization of premium (the effective-interest method's amortization in
    the period: the holdings held now, those that left during it up to the day they left, and the
    face sold or called out of a holding still held, up to that day)
  + changes of face by import (``change`` lines' ``book_value``: the amortized cost arrived (+) or left (-))
  = ending amortized cost (this report's valuation)

The difference between the computed and the valued ending is shown as unexplained, never absorbed.
Then: ending market value = ending amortized cost + unrealized gain + accrued interest, any
difference (a holding with no amortized cost) unexplained. Realized gain of a sale, maturity or
call = clean proceeds (price x face / 100; the journal ``amount`` less it is the accrued interest
received) - the amortized cost of what left (``book_value``). A journal line missing the figures
it needs (an older journal) is listed and counted as unexplained, never guessed. Money in currency.
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import dataclass

import numpy as np

from ladder.analysis.amortized import amortized_cost, original_cost, scheduled_rows
from ladder.analysis.valuation import Valuation
from ladder.book.holdings import Holdings
from ladder.folder.journal import JournalEntry
from ladder.report.accounting import Accounting
from ladder.report.departed import Departed
from ladder.report.history import Snapshot
from ladder.pricing.amortization import amortize
from ladder.report.model import Column, Table

ARRIVALS = ("buy", "add")
EXITS = ("sell", "mature", "call", "remove")
CASH_ACTIONS = ("coupon", "dividend", "deposit", "withdraw")
REALIZED = ("sell", "mature", "call")


@dataclass(frozen=True)
class Purchase:
    """A purchase in the period: from the journal or, with no journal line, from the holdings file."""

    date: dt.date
    holding: str
    face: float
    cost: float
    source: str            # "journal" | "holdings"


@dataclass(frozen=True)
class Realized:
    """A sale, maturity or call of the period: cash ``amount``, clean proceeds, accrued received,
    amortized cost of what left and the realized gain (NaN where the journal line lacks a figure)."""

    date: dt.date
    action: str
    holding: str
    face: float
    amount: float
    proceeds: float
    accrued: float
    book_value: float
    gain: float


@dataclass(frozen=True)
class RollForward:
    """The securities' amortized cost from last month-end to this one (currency; see the module)."""

    beginning: float
    beginning_source: str
    purchases_journal: float
    purchases_holdings: float
    left: dict                 # action -> amortized cost that left (sell, mature, call, remove)
    accretion: float
    amortization: float        # premium amortized (a positive number, subtracted)
    face_changes: float
    ending: float
    market_value: float
    unrealized_gain: float
    accrued: float
    purchases: tuple[Purchase, ...]
    realized: tuple[Realized, ...]
    unexplained_entries: tuple[JournalEntry, ...]

    @property
    def computed_ending(self) -> float:
        return (self.beginning + self.purchases_journal + self.purchases_holdings - sum(self.left.values())
                + self.accretion - self.amortization + self.face_changes)

    @property
    def unexplained(self) -> float:
        return self.ending - self.computed_ending

    @property
    def unexplained_market_value(self) -> float:
        return self.market_value - (self.ending + self.unrealized_gain + self.accrued)

    @property
    def realized_gain(self) -> float:
        return float(sum(r.gain for r in self.realized if math.isfinite(r.gain)))


def _finite(x) -> bool:
    return x is not None and math.isfinite(x)


def unexplained_entries(entries: tuple[JournalEntry, ...]) -> tuple[JournalEntry, ...]:
    """Journal lines of the period missing what the month-end needs: trades and exits without
    ``amount`` or ``book_value`` (a sale, maturity or call also without ``price`` and ``face``),
    cash lines without ``amount``."""
    out = []
    for e in entries:
        if e.action in ARRIVALS + EXITS:
            missing = not (_finite(e.amount) and _finite(e.book_value))
            if e.action in REALIZED:
                missing = missing or not (_finite(e.price) and _finite(e.face))
        elif e.action in CASH_ACTIONS:
            missing = not _finite(e.amount)
        elif e.action == "change":
            missing = not _finite(e.book_value)
        else:
            missing = False
        if missing:
            out.append(e)
    return tuple(out)


def realized_gains(entries: tuple[JournalEntry, ...]) -> tuple[Realized, ...]:
    out = []
    for e in entries:
        if e.action not in REALIZED:
            continue
        proceeds = e.price * e.face / 100.0
        out.append(Realized(e.date, e.action, e.holding, e.face, e.amount, proceeds, e.amount - proceeds,
                            e.book_value, proceeds - e.book_value))
    return tuple(out)


def holdings_purchases(h: Holdings, start: dt.date, as_of: dt.date, entries) -> tuple[Purchase, ...]:
    """Securities whose purchase date falls in (start, as_of] and that have no ``buy`` or ``add``
    journal line in the period: taken from the holdings file at book price x face / 100."""
    journaled = {e.holding for e in entries if e.action in ARRIVALS}
    cost = original_cost(h)
    out = []
    for i in np.flatnonzero((h.kind != "fund") & ~np.isnat(h.purchase_date)
                            & (h.purchase_date > np.datetime64(start, "D"))
                            & (h.purchase_date <= np.datetime64(as_of, "D"))):
        if h.id[i] not in journaled:
            out.append(Purchase(h.purchase_date[i].astype(dt.date), str(h.id[i]), float(h.face[i]), float(cost[i]),
                                "holdings"))
    return tuple(out)


def _beginning(h: Holdings, start: dt.date, previous: Snapshot | None, before: Holdings | None) -> tuple[float, str]:
    """The securities' amortized cost at the period start: last month-end's snapshot, or (no
    snapshot) the holdings as they stand valued at the start."""
    if previous is not None:
        funds = set() if before is None else set(before.id[before.kind == "fund"])
        total = sum(f.get("amortized_cost") or 0.0 for hid, f in previous.holdings.items() if hid not in funds)
        return float(total), f"the month-end of {previous.as_of.isoformat()} in the history"
    securities = h.take(h.kind != "fund")
    return (float(np.nansum(amortized_cost(securities, start))),
            f"no earlier month-end is recorded: the holdings as they stand now, at amortized cost on "
            f"{start.isoformat()} (what left the book in the period is not in it)")


def _partial_exits(h: Holdings, start: dt.date, entries) -> np.ndarray:
    """Accretion (+) or amortization (-) from the period start to the day it left of the face of a
    holding still held that was partly sold or called in the period (currency, one a line): the
    holding's own schedule, as the part left with it, on the face that left."""
    at = {hid: i for i, hid in enumerate(h.id)}
    lines = [e for e in entries if e.action in EXITS and e.holding in at and _finite(e.face)
             and h.kind[at[e.holding]] != "fund"]
    rows = np.array([at[e.holding] for e in lines], dtype=np.int64)
    known = np.isin(rows, scheduled_rows(h, start))
    out = np.zeros(len(lines))
    if known.any():
        sub = h.take(rows[known])
        schedule = amortize(sub)
        begin = np.datetime64(start, "D")
        for k, (row, e) in enumerate(zip(np.flatnonzero(known), np.array(lines, dtype=object)[known])):
            earned = schedule.earned(np.array([begin, np.datetime64(e.date, "D")]))
            out[row] = earned.amortization[k, 0] * e.face / 100.0
    return out


def roll_forward(v: Valuation, a: Accounting, start: dt.date, previous: Snapshot | None, before: Holdings | None,
                 departed: Departed, entries: tuple[JournalEntry, ...]) -> RollForward:
    """The roll-forward of (start, v.as_of] (see the module docstring)."""
    h = v.holdings
    sec = h.kind != "fund"
    beginning, source = _beginning(h, start, previous, before)
    journal_buys = tuple(Purchase(e.date, e.holding, e.face, e.book_value, "journal")
                         for e in entries if e.action in ARRIVALS)
    from_holdings = holdings_purchases(h, start, v.as_of, entries)
    left = {action: float(sum(e.book_value for e in entries if e.action == action and _finite(e.book_value)))
            for action in EXITS}
    amort = np.concatenate([a.amortization[sec], departed.amortization, _partial_exits(h, start, entries)])
    face_changes = float(sum(e.book_value for e in entries if e.action == "change" and _finite(e.book_value)))
    mv = float(v.market_value[sec].sum())
    return RollForward(
        beginning=beginning, beginning_source=source,
        purchases_journal=float(sum(p.cost for p in journal_buys if _finite(p.cost))),
        purchases_holdings=float(sum(p.cost for p in from_holdings)), left=left,
        accretion=float(amort[amort > 0].sum()), amortization=float(-amort[amort < 0].sum()),
        face_changes=face_changes, ending=float(np.nansum(a.amortized_cost[sec])), market_value=mv,
        unrealized_gain=float(np.nansum(a.unrealized_gain[sec])), accrued=float(a.accrued[sec].sum()),
        purchases=journal_buys + from_holdings, realized=realized_gains(entries),
        unexplained_entries=unexplained_entries(entries))


ROLL_COLUMNS = (Column("line", "Securities at amortized cost"), Column("amount", "Amount", "money"))


def _cent(x: float) -> float:
    """A difference to the cent (round-off below it is not a difference; -0.0 shown as 0)."""
    return round(x, 2) + 0.0


def roll_forward_table(r: RollForward) -> Table:
    rows = (
        ("Beginning amortized cost", r.beginning),
        ("+ Purchases at cost (journal)", r.purchases_journal),
        ("+ Purchases at cost (taken from the holdings: no journal line)", r.purchases_holdings),
        ("- Amortized cost of what was sold", 0.0 - r.left["sell"]),
        ("- Amortized cost of what matured", 0.0 - r.left["mature"]),
        ("- Amortized cost of what was called", 0.0 - r.left["call"]),
        ("- Amortized cost of what was removed by import", 0.0 - r.left["remove"]),
        ("+ Accretion of discount", r.accretion),
        ("- Amortization of premium", 0.0 - r.amortization),
        ("+/- Face changed by import (amortized cost)", r.face_changes),
        ("= Ending amortized cost, computed", r.computed_ending),
        ("Ending amortized cost, valued", r.ending),
        ("Unexplained (valued less computed)", _cent(r.unexplained)),
        ("Ending amortized cost", r.ending),
        ("+ Unrealized gain or loss", r.unrealized_gain),
        ("+ Accrued interest", r.accrued),
        ("= Ending market value, computed", r.ending + r.unrealized_gain + r.accrued),
        ("Ending market value, valued", r.market_value),
        ("Unexplained (valued less computed)", _cent(r.unexplained_market_value)),
    )
    return Table("Roll-forward from the last month-end", ROLL_COLUMNS, rows)


REALIZED_COLUMNS = (Column("date", "Date", "date"), Column("action", "How"), Column("holding", "Holding"),
                    Column("face", "Face", "money"), Column("amount", "Cash received", "money"),
                    Column("accrued", "of which accrued interest", "money"),
                    Column("proceeds", "Clean proceeds", "money"), Column("book_value", "Amortized cost", "money"),
                    Column("gain", "Realized gain or loss", "money"))


def _cell(x):
    return float(x) if _finite(x) else None


def realized_table(r: RollForward) -> Table:
    rows = tuple((x.date, x.action, x.holding, _cell(x.face), _cell(x.amount), _cell(x.accrued), _cell(x.proceeds),
                  _cell(x.book_value), _cell(x.gain)) for x in r.realized)
    total = ("Total", f"{len(rows)} lines", None, None,
             *(_cell(float(sum(getattr(x, k) for x in r.realized if _finite(getattr(x, k)))))
               for k in ("amount", "accrued", "proceeds", "book_value", "gain")))
    return Table("Realized gains and losses", REALIZED_COLUMNS, rows, total)


def roll_forward_notes(r: RollForward) -> tuple[str, ...]:
    notes = [f"Beginning: {r.beginning_source}. Securities only; funds and sweeps carry at their balance.",
             "Realized gain = clean proceeds (price x face / 100) less the amortized cost of what left; the cash "
             "received less the clean proceeds is accrued interest."]
    marked = [p for p in r.purchases if p.source == "holdings"]
    if marked:
        notes.append(f"{len(marked)} purchase(s) taken from the holdings file (purchase date in the period, no journal "
                     "line): " + ", ".join(f"{p.holding} on {p.date.isoformat()}" for p in marked) + ".")
    if r.unexplained_entries:
        notes.append(f"{len(r.unexplained_entries)} journal line(s) lack the cash amount or book value the month-end "
                     "needs (recorded before these were kept); they are listed in the activity and their effect is "
                     "in the unexplained line: " + ", ".join(f"{e.date.isoformat()} {e.action} {e.holding}".strip()
                                                             for e in r.unexplained_entries) + ".")
    if abs(r.unexplained) >= 0.005 or abs(r.unexplained_market_value) >= 0.005:
        notes.append("The roll-forward does NOT tie: the unexplained amounts are shown, not absorbed; reconcile them "
                     "with the custodian's statement.")
    else:
        notes.append("The roll-forward ties to the cent.")
    return tuple(notes)
