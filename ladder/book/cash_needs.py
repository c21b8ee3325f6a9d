"""The cash-needs forecast of a book: ``cash_needs.csv`` with columns ``date,amount,label`` and,
optionally, ``low,high`` or ``stdev``.

``amount`` is in currency units: positive = cash the company needs on that date, negative = cash
coming in. ``date`` is ISO (YYYY-MM-DD); ``label`` is free text (optional). Blank lines are skipped.
Uncertainty (used by ``ladder risk``; blank or absent: the amount is certain): ``low`` and ``high``
are the ends of a 90 % range around the amount (low <= amount <= high; either may be left blank for
no uncertainty on that side), or ``stdev`` is a standard deviation (>= 0), currency units; a row
gives a range or a standard deviation, not both. ``spread`` turns either into the standard
deviation below and above the amount (a range end is 1.645 standard deviations away).
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

COLUMNS = ("date", "amount", "label", "low", "high", "stdev")
Z_90 = 1.6448536269514722        # the standard normal's 95th percentile: a 90 % range is +/- this
REQUIRED = ("date", "amount")
_ISO_DATE = re.compile(r"^\d{4}-\d{2}-\d{2}$")


@dataclass(frozen=True, eq=False)
class CashNeeds:
    """The forecast as a struct of arrays, in file order."""

    date: np.ndarray     # datetime64[D]
    amount: np.ndarray   # float64, + needed / - inflow
    label: np.ndarray    # object
    row: np.ndarray      # int64, 1-based row in the file (0 if made in code)
    low: np.ndarray | None = None     # float64, NaN where not given (None: no column)
    high: np.ndarray | None = None
    stdev: np.ndarray | None = None

    def spread(self) -> tuple[np.ndarray, np.ndarray]:
        """(standard deviation below, above) the amount of each row, currency units (0: certain)."""
        n = len(self.date)
        column = lambda a: np.full(n, np.nan) if a is None else a  # noqa: E731
        low, high, sd = column(self.low), column(self.high), column(self.stdev)
        below = np.where(np.isfinite(sd), sd, np.where(np.isfinite(low), (self.amount - low) / Z_90, 0.0))
        above = np.where(np.isfinite(sd), sd, np.where(np.isfinite(high), (high - self.amount) / Z_90, 0.0))
        return below, above

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
    dates, amounts, labels, lines, extra = [], [], [], [], []
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
        spread = _spread(name, line, cell, amount, problems)
        if date is not None and amount is not None:
            extra.append(spread)
            dates.append(date)
            amounts.append(amount)
            labels.append(cell["label"][1])
            lines.append(line)
    problems.raise_if_any()
    low, high, sd = (np.array([e[i] for e in extra], dtype=np.float64) for i in range(3))
    return CashNeeds(np.array(dates, dtype="datetime64[D]"), np.array(amounts, dtype=np.float64),
                     np.array(labels, dtype=object), np.array(lines, dtype=np.int64), low, high, sd)


def _spread(name: str, line: int, cell: dict, amount: float | None, problems: Problems) -> tuple[float, ...]:
    """(low, high, stdev) of one row, NaN where blank; every problem added."""
    got = {}
    for key in ("low", "high", "stdev"):
        col, text = cell[key]
        got[key] = float("nan")
        if not text.strip():
            continue
        try:
            got[key] = parse_number(text)
        except ValueError as why:
            problems.add(name, line, col, f"{key} {why} (currency units)")
            continue
        if abs(got[key]) > MAX_FACE:
            problems.add(name, line, col, f"{key} {text} is out of range; at most {MAX_FACE:,.0f} either way")
            got[key] = float("nan")
    low, high, sd = got["low"], got["high"], got["stdev"]
    if np.isfinite(sd) and (np.isfinite(low) or np.isfinite(high)):
        problems.add(name, line, cell["stdev"][0], "give a low/high range or a stdev, not both")
    if sd < 0:
        problems.add(name, line, cell["stdev"][0], f"stdev {sd:g} is negative; a standard deviation is 0 or more")
    if amount is not None and low > amount:
        problems.add(name, line, cell["low"][0], f"low {low:,.2f} is above the amount {amount:,.2f}")
    if amount is not None and high < amount:
        problems.add(name, line, cell["high"][0], f"high {high:,.2f} is below the amount {amount:,.2f}")
    return low, high, sd
