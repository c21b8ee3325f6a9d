"""Proposed trades for the what-if check: a trades file and the book they would leave.

A trades file (CSV or .xlsx) has the holdings columns (docs/formats.md) plus ``action`` = ``buy`` |
``sell``, one trade per row, read with the holdings reader so every column is checked the same way.
- ``buy``: the row is the new security (a new lot): its ``id`` must not be in the book.
- ``sell``: ``id`` names a holding in the book; ``face`` is the par amount sold (at most the face
  held; all of it removes the holding). ``sector``, ``issuer`` and ``maturity_date`` must match the
  holding (they guard against selling the wrong line); other columns are not used.
"""

from __future__ import annotations

import datetime as dt
import difflib
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np

from ladder.book.holdings import Holdings
from ladder.book.holdings_file import read_holdings
from ladder.book.table_file import read_table
from ladder.errors import Problems

ACTIONS = ("buy", "sell")
NEW_MONEY = "new_money"     # funded_from: cash from outside the portfolio (a buy) or paid out to it (a sale)
OPTIONAL = ("settle_date", "funded_from")
_MATCHED = (("sector", "sector"), ("issuer", "issuer"), ("maturity", "maturity_date"))
_FACE_TOLERANCE = 1e-6   # currency units: a sell within this of the face held sells all of it


@dataclass(frozen=True, eq=False)
class Trades:
    """Proposed trades in file order: ``holdings`` row i is trade i (for a sell, the face sold)."""

    holdings: Holdings
    action: np.ndarray   # object, "buy" | "sell"
    file: str
    settle_date: np.ndarray | None = None   # datetime64[D], NaT = the valuation date; None = all on it
    funded_from: np.ndarray | None = None   # object: "" = the cash account, NEW_MONEY, or a fund id

    def __len__(self) -> int:
        return len(self.action)

    def label(self, i: int) -> str:
        return f"{self.action[i]} {self.holdings.id[i]} ({self.file} row {int(self.holdings.row[i])})"


def read_trades(path, book: Holdings, valuation_date: dt.date) -> Trades:
    """The trades in ``path`` against the book's ``book`` holdings; raises ``InputError`` with every problem."""
    path = Path(path)
    label = str(path)
    problems = Problems()
    trades, extras = read_holdings(path, valuation_date, problems, label, extra_columns=("action",) + OPTIONAL)
    table = read_table(path, Problems(), label)   # for column positions; its problems are already reported
    if table is not None and "action" not in table.column:
        problems.add(label, 1, 0, "required column 'action' is missing (buy or sell)")
    if trades is None or table is None or problems:
        problems.raise_if_any()
    col = table.column
    actions = np.array([a.strip().lower() for a in extras["action"]], dtype=object)
    held = {hid: i for i, hid in enumerate(book.id)}
    for i, (hid, action, row) in enumerate(zip(trades.id, actions, trades.row)):
        row = int(row)
        if action not in ACTIONS:
            close = difflib.get_close_matches(action, ACTIONS, n=1, cutoff=0.5)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
            problems.add(label, row, col["action"], f"action {extras['action'][i]!r} is not buy or sell{hint}")
        elif action == "buy" and hid in held:
            problems.add(label, row, col["id"], f"{hid} is already in the book; a buy is a new lot with a new id")
        elif action == "sell" and hid not in held:
            problems.add(label, row, col["id"], f"{hid} is not in the book, so it cannot be sold")
        elif action == "sell":
            j = held[hid]
            for field, column in _MATCHED:
                if getattr(trades, field)[i] != getattr(book, field)[j]:
                    problems.add(label, row, col.get(column, 0), f"{column} {getattr(trades, field)[i]} does not "
                                 f"match the holding {hid} ({getattr(book, field)[j]})")
            if trades.face[i] > book.face[j] + _FACE_TOLERANCE:
                problems.add(label, row, col["face"], f"sells {trades.face[i]:,.2f} face but the book holds "
                             f"{book.face[j]:,.2f} of {hid}")
    settle = _settle_dates(extras["settle_date"], trades.row, col.get("settle_date", 0), valuation_date, label, problems)
    funded = np.array([f.strip() for f in extras["funded_from"]], dtype=object)
    funds = set(book.id[book.kind == "fund"])
    for i, source in enumerate(funded):
        if source and source != NEW_MONEY and (source not in funds or source == trades.id[i]):
            problems.add(label, int(trades.row[i]), col.get("funded_from", 0), f"funded_from {source!r} is not "
                         f"{NEW_MONEY}, empty (the cash account) or another fund holding of the book")
    problems.raise_if_any()
    return Trades(trades, actions, label, settle, funded)


def _settle_dates(texts, rows, column: int, valuation_date: dt.date, label: str, problems: Problems) -> np.ndarray:
    """The ``settle_date`` column: NaT where empty; a date before ``valuation_date`` is a problem."""
    out = np.full(len(texts), np.datetime64("NaT"), dtype="datetime64[D]")
    for i, text in enumerate(texts):
        if not text.strip():
            continue
        try:
            date = dt.date.fromisoformat(text.strip())
        except ValueError:
            problems.add(label, int(rows[i]), column, f"settle_date {text!r} is not a date written YYYY-MM-DD")
            continue
        if date < valuation_date:
            problems.add(label, int(rows[i]), column, f"settle_date {date} is before the valuation date "
                                                      f"{valuation_date}; a trade settles on or after it")
        out[i] = np.datetime64(date)
    return out


def apply_trades(holdings: Holdings, trades: Trades) -> Holdings:
    """The holdings after ``trades``: sells reduce face (a full sale removes the row), buys are appended."""
    sells = trades.action == "sell"
    ids, inverse = np.unique(trades.holdings.id[sells].astype(str), return_inverse=True)
    amounts = np.bincount(inverse.reshape(-1), weights=trades.holdings.face[sells], minlength=len(ids))
    book_ids = holdings.id.astype(str)
    hit = np.isin(book_ids, ids)
    sold_face = np.zeros(len(holdings))
    sold_face[hit] = amounts[np.searchsorted(ids, book_ids[hit])]
    remaining = holdings.face - sold_face
    kept = replace(holdings, face=remaining).take((remaining > _FACE_TOLERANCE) | ~hit)
    return Holdings.concat([kept, trades.holdings.take(trades.action == "buy")])
