"""Parsing one text cell into a date or a number, reporting a problem at its position if it fails."""

from __future__ import annotations

import datetime as dt
import math

from ladder.errors import Problems


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
            value = float(text.replace(",", "").replace("_", ""))
        except ValueError:
            self.error(row, column, f"{name} {text!r} is not a number")
            return None
        if not math.isfinite(value):
            self.error(row, column, f"{name} {text!r} is not a finite number")
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
