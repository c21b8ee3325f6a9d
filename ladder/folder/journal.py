"""The activity journal of a book: every change made through the tool, appended, never edited.

``journal.jsonl`` in the book folder holds one JSON object a line (date, action, holding id, face,
amount, price, reason, recorded, book value). Lines are only ever added, by a book transaction
(``ladder.folder.transaction.commit``) together with the files they explain: the new lines are
appended after the previous bytes, never rewriting them. Money in currency units, prices clean per
100 face.
"""

from __future__ import annotations

import datetime as dt
import json
import math
from dataclasses import asdict, dataclass
from pathlib import Path

from ladder.errors import Problems

JOURNAL_FILE = "journal.jsonl"
ACTIONS = ("buy", "sell", "mature", "call", "coupon", "dividend", "deposit", "withdraw", "add", "remove", "change",
           "note", "restore")


@dataclass(frozen=True)
class JournalEntry:
    """One change: ``date`` it took effect (settlement), ``action`` (one of ACTIONS), the holding it
    touched, ``face`` (currency units, NaN if none), ``amount`` (cash into (+) or out of (-) the book's
    cash account, currency units, NaN if none), ``price`` (clean per 100, NaN if none), ``reason`` in words,
    when it was ``recorded``, and ``book_value`` (amortized cost of what left or arrived on ``date``,
    currency units: for a sale, maturity or call the realized gain is ``amount`` less accrued less
    ``book_value``; NaN if none)."""

    date: dt.date
    action: str
    holding: str = ""
    face: float = math.nan
    amount: float = math.nan
    price: float = math.nan
    reason: str = ""
    recorded: str = ""
    book_value: float = math.nan

    def to_json(self) -> dict:
        out = asdict(self)
        out["date"] = self.date.isoformat()
        for key in ("face", "amount", "price", "book_value"):
            out[key] = None if not math.isfinite(out[key]) else out[key]
        return out


def journal_path(book_or_folder) -> Path:
    folder = getattr(book_or_folder, "folder", book_or_folder)
    return Path(folder) / JOURNAL_FILE


def _number(value) -> float:
    return math.nan if value is None else float(value)


def read_journal(book_or_folder) -> tuple[JournalEntry, ...]:
    """Every entry of the book's journal in file order (empty if there is none yet)."""
    path = journal_path(book_or_folder)
    if not path.exists():
        return ()
    problems, entries = Problems(), []
    for line_no, line in enumerate(path.read_text(encoding="utf-8").splitlines(), start=1):
        if not line.strip():
            continue
        try:
            data = json.loads(line)
            entries.append(JournalEntry(dt.date.fromisoformat(data["date"]), str(data["action"]),
                                        str(data.get("holding", "")), _number(data.get("face")),
                                        _number(data.get("amount")), _number(data.get("price")),
                                        str(data.get("reason", "")), str(data.get("recorded", "")),
                                        _number(data.get("book_value"))))
        except (ValueError, KeyError, TypeError) as error:
            problems.add(str(path), line_no, 1, f"not a journal entry: {error}")
    problems.raise_if_any()
    return tuple(entries)


def _validate(entries, label: str) -> None:
    problems = Problems()
    for i, e in enumerate(entries, start=1):
        if e.action not in ACTIONS:
            problems.add(label, 0, 0, f"new entry {i}: action {e.action!r} is not one of {', '.join(ACTIONS)}")
        if not isinstance(e.date, dt.date):
            problems.add(label, 0, 0, f"new entry {i}: date {e.date!r} is not a date")
    problems.raise_if_any()


def journal_lines(entries) -> tuple[tuple[JournalEntry, ...], bytes]:
    """``entries`` checked (InputError) and as recorded (the UTC time of recording filled in where it
    was empty), and their lines as the journal's bytes."""
    entries = tuple(entries)
    _validate(entries, JOURNAL_FILE)
    now = dt.datetime.now(dt.timezone.utc).isoformat(timespec="seconds")
    recorded = tuple(e if e.recorded else JournalEntry(**{**asdict(e), "recorded": now}) for e in entries)
    text = "".join(json.dumps(e.to_json(), allow_nan=False) + "\n" for e in recorded)
    return recorded, text.encode("utf-8")


def append_journal(book_or_folder, entries, reason: str = "journal entries") -> tuple[JournalEntry, ...]:
    """Append ``entries`` (JournalEntry) to the book's journal (a transaction with no file replaced);
    returns them as recorded. The previous lines are left untouched."""
    from ladder.folder.transaction import commit   # the transaction writes journal lines made here

    return commit(book_or_folder, {}, entries, reason).entries


def entries_between(entries, start: dt.date | None, end: dt.date) -> tuple[JournalEntry, ...]:
    """The entries dated in (start, end] (every one up to ``end`` when ``start`` is None), in file order."""
    return tuple(e for e in entries if (start is None or e.date > start) and e.date <= end)
