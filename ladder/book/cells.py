"""Parsing one text cell into a date or a number, reporting a problem at its position if it fails.

``parse_number`` is the one number reader of every input file (holdings, trades, offerings, cash
needs, curve, scenarios): a plain number (``10000000``, ``-1.5``, ``1e6``) or one whose thousands are
grouped by commas in their proper places (``10,000,000``, ``1,234.56``). Any other comma (``5,5``,
``10,000,00``) is refused rather than guessed at: a decimal comma and a misplaced separator look alike.
"""

from __future__ import annotations

import datetime as dt
import math
import re

from ladder.errors import Problems

_PLAIN = re.compile(r"[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?")
_GROUPED = re.compile(r"[+-]?\d{1,3}(,\d{3})+(\.\d*)?")
MAX_FACE = 1e13          # currency units: a face or amount above ten trillion is a typing error
RATE_RANGE_PCT = (-5.0, 30.0)   # percent: a quoted yield or rate outside this is a typing error


def parse_number(text: str) -> float:
    """The finite number written in ``text``; ``ValueError`` saying why if it is not one."""
    text = text.strip()
    if _PLAIN.fullmatch(text):
        value = float(text)
    elif _GROUPED.fullmatch(text):
        value = float(text.replace(",", ""))
    elif "," in text and _PLAIN.fullmatch(text.replace(",", "")):
        raise ValueError(f"{text!r} has a comma out of place; group thousands as 10,000,000 "
                         "(a comma is never a decimal point), or write no commas")
    else:
        raise ValueError(f"{text!r} is not a number")
    if not math.isfinite(value):
        raise ValueError(f"{text!r} is not a finite number")
    return value


class CellReader:
    """Parses cells of one file, adding each failure to ``problems`` as ``file:row:column``."""

    def __init__(self, path: str, problems: Problems):
        self.path, self.problems = path, problems

    def error(self, row: int, column: int, message: str) -> None:
        self.problems.add(self.path, row, column, message)

    def date(self, text: str, row: int, column: int, name: str) -> dt.date | None:
        """An ISO date, or None if empty or invalid (invalid is reported)."""
        if not text:
            return None
        try:
            return dt.date.fromisoformat(text)
        except ValueError:
            self.error(row, column, f"{name} {text!r} is not a date; write YYYY-MM-DD, e.g. 2027-03-15")
            return None

    def number(self, text: str, row: int, column: int, name: str, low: float | None = None,
               high: float | None = None, what: str = "") -> float | None:
        """A finite number within [low, high], or None if empty or invalid (invalid is reported)."""
        if not text:
            return None
        try:
            value = parse_number(text)
        except ValueError as why:
            self.error(row, column, f"{name} {why}")
            return None
        if (low is not None and value < low) or (high is not None and value > high):
            self.error(row, column, f"{name} {text} is out of range; {what or f'expected {low} to {high}'}")
            return None
        return value

    def choice(self, text: str, row: int, column: int, name: str, allowed) -> str | None:
        """``text`` if it is one of ``allowed`` (case-insensitive), else None with a suggestion."""
        import difflib

        if not text:
            return None
        for option in allowed:
            if text.casefold() == str(option).casefold():
                return str(option)
        close = difflib.get_close_matches(text, [str(a) for a in allowed], n=1, cutoff=0.6)
        hint = f" (did you mean {close[0]!r}?)" if close else ""
        self.error(row, column, f"unknown {name} {text!r}{hint}; known: {', '.join(map(str, allowed))}")
        return None
