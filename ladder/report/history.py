"""The history of a book: one dated snapshot a month-end in ``history.sqlite`` in the book folder.

A snapshot keeps the report's summary figures (values, yields, durations, income), every holding's
figures, every rule's compliance status, the SHA-256 checksum and the bytes of every input file, the
policy's name and version, and the whole report document, so the report of any past month-end can
be written again exactly as it was (``ladder report BOOK --at DATE --reproduce``).

Writes are one SQLite transaction (``BEGIN IMMEDIATE`` ... ``COMMIT``): a failure midway rolls back
and leaves the database as it was. Recording a month-end that is already there replaces it.
"""

from __future__ import annotations

import datetime as dt
import hashlib
import json
import sqlite3
from contextlib import closing, contextmanager
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ladder.errors import FileFault

HISTORY_FILE = "history.sqlite"

SCHEMA = (
    """CREATE TABLE IF NOT EXISTS snapshots (
        as_of TEXT PRIMARY KEY, period_start TEXT NOT NULL, recorded TEXT NOT NULL, book_name TEXT NOT NULL,
        policy_name TEXT NOT NULL, policy_version TEXT NOT NULL, policy_adopted TEXT NOT NULL,
        compliance TEXT NOT NULL, program_version TEXT NOT NULL, document TEXT NOT NULL)""",
    """CREATE TABLE IF NOT EXISTS figures (
        as_of TEXT NOT NULL, name TEXT NOT NULL, value REAL, PRIMARY KEY (as_of, name))""",
    """CREATE TABLE IF NOT EXISTS holdings (
        as_of TEXT NOT NULL, id TEXT NOT NULL, figures TEXT NOT NULL, PRIMARY KEY (as_of, id))""",
    """CREATE TABLE IF NOT EXISTS rules (
        as_of TEXT NOT NULL, rule TEXT NOT NULL, status TEXT NOT NULL, limit_value TEXT, actual TEXT,
        PRIMARY KEY (as_of, rule))""",
    """CREATE TABLE IF NOT EXISTS inputs (
        as_of TEXT NOT NULL, role TEXT NOT NULL, file_name TEXT NOT NULL, sha256 TEXT NOT NULL,
        PRIMARY KEY (as_of, role))""",
    "CREATE TABLE IF NOT EXISTS contents (sha256 TEXT PRIMARY KEY, content BLOB NOT NULL)",
)
TABLES = ("snapshots", "figures", "holdings", "rules", "inputs")


@dataclass(frozen=True)
class InputFile:
    role: str          # "holdings", "curve", "policy", "cash_needs", "scenarios", "book", "journal"
    name: str          # file name in the book folder
    sha256: str
    content: bytes


@dataclass(frozen=True)
class Snapshot:
    """One month-end. ``figures``: summary figures by name (money in currency, rates decimal);
    ``holdings``: id -> figures by name; ``rules``: rule id -> (status, limit, actual) as text;
    ``inputs``: role -> (file name, sha256); ``document``: the report as JSON-ready data."""

    as_of: dt.date
    period_start: dt.date
    recorded: str
    book_name: str
    policy_name: str
    policy_version: str
    policy_adopted: dt.date
    compliance: str
    program_version: str
    figures: dict
    holdings: dict
    rules: dict
    inputs: dict
    document: dict


def history_path(book_or_folder) -> Path:
    return Path(getattr(book_or_folder, "folder", book_or_folder)) / HISTORY_FILE


def input_file(role: str, path: Path) -> InputFile:
    content = Path(path).read_bytes()
    return InputFile(role, Path(path).name, hashlib.sha256(content).hexdigest(), content)


@contextmanager
def _connect(path: Path):
    """The open database at ``path``, closed after the block; a damaged or unwritable database (or
    one whose text is not UTF-8) becomes a ``FileFault`` naming the file and what to do."""
    try:
        with closing(sqlite3.connect(path, isolation_level=None)) as conn:
            conn.execute("PRAGMA journal_mode=DELETE")
            yield conn
    except (sqlite3.DatabaseError, UnicodeDecodeError, json.JSONDecodeError) as exc:
        raise FileFault(path, f"the history database cannot be used ({exc}); make the folder writable, or if "
                              "the file is damaged move it aside (a new history starts) or put back a copy") from None


def _ensure_schema(conn: sqlite3.Connection) -> None:
    for statement in SCHEMA:
        conn.execute(statement)


def _write(conn: sqlite3.Connection, s: Snapshot, files: tuple[InputFile, ...]) -> None:
    key = s.as_of.isoformat()
    for table in TABLES:
        conn.execute(f"DELETE FROM {table} WHERE as_of = ?", (key,))
    conn.execute("INSERT INTO snapshots VALUES (?,?,?,?,?,?,?,?,?,?)",
                 (key, s.period_start.isoformat(), s.recorded, s.book_name, s.policy_name, s.policy_version,
                  s.policy_adopted.isoformat(), s.compliance, s.program_version,
                  json.dumps(s.document, allow_nan=False)))
    conn.executemany("INSERT INTO figures VALUES (?,?,?)", [(key, k, v) for k, v in s.figures.items()])
    conn.executemany("INSERT INTO holdings VALUES (?,?,?)",
                     [(key, hid, json.dumps(f, allow_nan=False)) for hid, f in s.holdings.items()])
    conn.executemany("INSERT INTO rules VALUES (?,?,?,?,?)",
                     [(key, rule, *values) for rule, values in s.rules.items()])
    for f in files:
        conn.execute("INSERT OR IGNORE INTO contents VALUES (?,?)", (f.sha256, f.content))
        conn.execute("INSERT INTO inputs VALUES (?,?,?,?)", (key, f.role, f.name, f.sha256))


def record_snapshot(book_or_folder, snapshot: Snapshot, files: tuple[InputFile, ...]) -> Path:
    """Store ``snapshot`` and its input files in one transaction (replacing one of the same date)."""
    path = history_path(book_or_folder)
    with _connect(path) as conn:
        conn.execute("BEGIN IMMEDIATE")
        try:
            _ensure_schema(conn)
            _write(conn, snapshot, tuple(files))
            conn.execute("COMMIT")
        except BaseException:
            conn.execute("ROLLBACK")
            raise
    return path


def _read(conn: sqlite3.Connection, key: str) -> Snapshot:
    row = conn.execute("SELECT * FROM snapshots WHERE as_of = ?", (key,)).fetchone()
    figures = dict(conn.execute("SELECT name, value FROM figures WHERE as_of = ?", (key,)).fetchall())
    holdings = {hid: json.loads(f) for hid, f in
                conn.execute("SELECT id, figures FROM holdings WHERE as_of = ?", (key,)).fetchall()}
    rules = {r: (s, lim, act) for r, s, lim, act in
             conn.execute("SELECT rule, status, limit_value, actual FROM rules WHERE as_of = ?", (key,)).fetchall()}
    inputs = {role: (name, sha) for role, name, sha in
              conn.execute("SELECT role, file_name, sha256 FROM inputs WHERE as_of = ?", (key,)).fetchall()}
    d = dt.date.fromisoformat
    return Snapshot(d(row[0]), d(row[1]), row[2], row[3], row[4], row[5], d(row[6]), row[7], row[8],
                    {k: (float("nan") if v is None else v) for k, v in figures.items()}, holdings, rules, inputs,
                    json.loads(row[9]))


@contextmanager
def _reading(book_or_folder, table: str):
    """A connection to the book's history database, or None when there is none yet or it has no ``table``."""
    path = history_path(book_or_folder)
    if not path.exists():
        yield None
        return
    with _connect(path) as conn:
        yield conn if conn.execute("SELECT name FROM sqlite_master WHERE name = ?", (table,)).fetchone() else None


def _query(book_or_folder, sql: str, args=()) -> list[Snapshot]:
    with _reading(book_or_folder, "snapshots") as conn:
        return [] if conn is None else [_read(conn, key) for (key,) in conn.execute(sql, args).fetchall()]


def snapshot_dates(book_or_folder) -> list[dt.date]:
    return [s.as_of for s in _query(book_or_folder, "SELECT as_of FROM snapshots ORDER BY as_of")]


def load_snapshot(book_or_folder, as_of: dt.date) -> Snapshot | None:
    found = _query(book_or_folder, "SELECT as_of FROM snapshots WHERE as_of = ?", (as_of.isoformat(),))
    return found[0] if found else None


def previous_snapshot(book_or_folder, before: dt.date) -> Snapshot | None:
    """The latest snapshot dated before ``before``, or None."""
    found = _query(book_or_folder, "SELECT as_of FROM snapshots WHERE as_of < ? ORDER BY as_of DESC LIMIT 1",
                   (before.isoformat(),))
    return found[0] if found else None


def year_snapshots(book_or_folder, before: dt.date) -> list[Snapshot]:
    """The snapshots of ``before``'s calendar year dated before it, oldest first."""
    return _query(book_or_folder, "SELECT as_of FROM snapshots WHERE as_of >= ? AND as_of < ? ORDER BY as_of",
                  (dt.date(before.year, 1, 1).isoformat(), before.isoformat()))


def input_content(book_or_folder, sha256: str) -> bytes:
    """The bytes of an input file recorded with a snapshot."""
    with _connect(history_path(book_or_folder)) as conn:
        row = conn.execute("SELECT content FROM contents WHERE sha256 = ?", (sha256,)).fetchone()
    if row is None:
        raise KeyError(sha256)
    return bytes(row[0])


def rule_statuses(book_or_folder, before: dt.date) -> list[tuple[dt.date, dict[str, str]]]:
    """Every recorded month-end before ``before``, newest first, with each rule's status then."""
    with _reading(book_or_folder, "rules") as conn:
        if conn is None:
            return []
        out: dict[str, dict[str, str]] = {}
        for key, rule, status in conn.execute("SELECT as_of, rule, status FROM rules WHERE as_of < ? "
                                              "ORDER BY as_of DESC", (before.isoformat(),)).fetchall():
            out.setdefault(key, {})[rule] = status
        dates = [key for (key,) in conn.execute("SELECT as_of FROM snapshots WHERE as_of < ? ORDER BY as_of DESC",
                                                (before.isoformat(),)).fetchall()]
    return [(dt.date.fromisoformat(key), out.get(key, {})) for key in dates]


@dataclass(frozen=True, eq=False)
class MonthEnds:
    """Every recorded month-end, oldest first: ``as_of`` dates and, aligned, the summary figures the
    report recorded (``market_value`` with accrued, ``market_yield`` yield to worst and ``book_yield``
    decimal, ``effective_duration`` years, ``interest_earned`` the month's income, currency), the
    compliance status and the number of rules in breach then."""

    as_of: tuple[dt.date, ...]
    market_value: np.ndarray
    market_yield: np.ndarray
    book_yield: np.ndarray
    effective_duration: np.ndarray
    interest_earned: np.ndarray
    compliance: tuple[str, ...]
    breaches: np.ndarray


def month_ends(book_or_folder) -> MonthEnds:
    """The history's month-ends (``MonthEnds``); empty when ``ladder report`` has recorded none."""
    snaps = _query(book_or_folder, "SELECT as_of FROM snapshots ORDER BY as_of")

    def figure(name: str) -> np.ndarray:
        return np.array([s.figures.get(name, np.nan) for s in snaps], dtype=np.float64)

    return MonthEnds(tuple(s.as_of for s in snaps), figure("market_value"), figure("market_yield"),
                     figure("book_yield"), figure("effective_duration"), figure("interest_earned"),
                     tuple(s.compliance for s in snaps),
                     np.array([sum(r[0] == "breach" for r in s.rules.values()) for s in snaps], dtype=np.int64))
