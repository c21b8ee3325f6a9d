"""The cash-needs forecast of a book: ``cash_needs.csv`` with columns ``date,amount,label``.

``amount`` is in currency units: positive = cash the company needs on that date, negative = cash
coming in. ``date`` is ISO (YYYY-MM-DD); ``label`` is free text (optional). Blank lines are skipped.
Every problem is reported as ``file:row:column`` (row 1 is the header) and the file is refused whole.
"""

from __future__ import annotations

import datetime as dt
import re
from dataclasses import dataclass

import numpy as np

from ladder.book.cells import MAX_FACE, parse_number
from ladder.book.table_file import read_rows
from ladder.errors import Problems

COLUMNS = ("date", "amount", "label")
REQUIRED = ("date", "amount")
_ISO_DATE = re.compile(r"^\d{4}-\d{2}-\d{2}$")


@dataclass(frozen=True, eq=False)
class CashNeeds:
    """The forecast as a struct of arrays, in file order."""

    date: np.ndarray     # datetime64[D]
    amount: np.ndarray   # float64, + needed / - inflow
    label: np.ndarray    # object
    row: np.ndarray      # int64, 1-based row in the file (0 if made in code)

    def __len__(self) -> int:
        return len(self.date)

    @staticmethod
    def empty() -> "CashNeeds":
        return CashNeeds(np.zeros(0, "datetime64[D]"), np.zeros(0), np.zeros(0, object), np.zeros(0, np.int64))

    def by_month(self, start, months: int) -> np.ndarray:
        """Net needs in each of ``months`` calendar months, the first being ``start``'s month; only
        dates on or after ``start`` count. float64 array of length ``months``."""
        start = np.datetime64(start, "D")
        month = (self.date.astype("datetime64[M]").astype(np.int64)
                 - start.astype("datetime64[M]").astype(np.int64))
        keep = (self.date >= start) & (month < months)
        return np.bincount(month[keep], weights=self.amount[keep], minlength=months)[:months]


def read_cash_needs(path) -> CashNeeds:
    """Read ``cash_needs.csv`` at ``path``; raises ``InputError`` listing every problem."""
    name = str(path)
    problems = Problems()
    rows = read_rows(path, COLUMNS, problems, required=REQUIRED)
    dates, amounts, labels, lines = [], [], [], []
    for line, cell in rows:
        (date_col, date_text), (amount_col, amount_text) = cell["date"], cell["amount"]
        date = None
        if not _ISO_DATE.match(date_text):
            problems.add(name, line, date_col, f"date {date_text!r} is not YYYY-MM-DD")
        else:
            try:
                date = dt.date.fromisoformat(date_text)
            except ValueError:
                problems.add(name, line, date_col, f"{date_text!r} is not a calendar date")
        try:
            amount = parse_number(amount_text)
        except ValueError as why:
            amount = None
            problems.add(name, line, amount_col, f"amount {why} (currency units; + needed, - inflow)")
        if amount is not None and abs(amount) > MAX_FACE:
            problems.add(name, line, amount_col, f"amount {amount_text} is out of range; at most {MAX_FACE:,.0f} "
                                                 "either way")
            amount = None
        if date is not None and amount is not None:
            dates.append(date)
            amounts.append(amount)
            labels.append(cell["label"][1])
            lines.append(line)
    problems.raise_if_any()
    return CashNeeds(np.array(dates, dtype="datetime64[D]"), np.array(amounts, dtype=np.float64),
                     np.array(labels, dtype=object), np.array(lines, dtype=np.int64))
