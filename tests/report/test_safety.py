"""A killed write leaves the previous history database, journal and holdings file intact."""

from __future__ import annotations

import datetime as dt
import sqlite3

import pytest

import ladder.folder.transaction as transaction
import ladder.report.custodian as custodian
from ladder.folder.book_file import load_book
from ladder.errors import InputError
from ladder.book.holdings_file import COLUMNS
from ladder.report import history
from ladder.report.history import Snapshot, input_file, load_snapshot, record_snapshot, snapshot_dates
from ladder.folder.journal import JournalEntry, append_journal, journal_path, read_journal


def _snapshot(as_of: dt.date, value: float, holdings: dict | None = None) -> Snapshot:
    return Snapshot(as_of, as_of - dt.timedelta(days=30), "2026-12-01T00:00:00+00:00", "book", "policy", "1",
                    dt.date(2026, 1, 1), "pass", "0", {"market_value": value, "count": 2.0},
                    holdings or {"A": {"face": 1.0}}, {"rule": ("pass", "5", "1")}, {"holdings": ("h.csv", "ab")},
                    {"title": "t"})


def _dump(path) -> list:
    with sqlite3.connect(path) as conn:
        return [conn.execute(f"SELECT * FROM {t} ORDER BY 1, 2").fetchall() for t in history.TABLES + ("contents",)]


def test_history_write_failing_midway_rolls_back(demo_copy):
    files = (input_file("holdings", demo_copy / "holdings.csv"),)
    record_snapshot(demo_copy, _snapshot(dt.date(2026, 10, 31), 1.0), files)
    before = _dump(history.history_path(demo_copy))
    # the same month-end again and a new one, each failing after the snapshot row and its figures are
    # written (an object JSON cannot hold, in the holdings' figures): nothing of either may remain
    for day in (dt.date(2026, 10, 31), dt.date(2026, 11, 30)):
        with pytest.raises(TypeError):
            record_snapshot(demo_copy, _snapshot(day, 2.0, {"A": {"face": 1.0}, "B": {"face": object()}}), files)
    assert _dump(history.history_path(demo_copy)) == before
    assert snapshot_dates(demo_copy) == [dt.date(2026, 10, 31)]
    assert load_snapshot(demo_copy, dt.date(2026, 10, 31)).figures["market_value"] == 1.0
    with sqlite3.connect(history.history_path(demo_copy)) as conn:
        assert conn.execute("PRAGMA integrity_check").fetchone() == ("ok",)


def test_history_keeps_input_bytes_and_replaces_a_month(demo_copy):
    files = (input_file("holdings", demo_copy / "holdings.csv"),)
    record_snapshot(demo_copy, _snapshot(dt.date(2026, 11, 30), 1.0), files)
    record_snapshot(demo_copy, _snapshot(dt.date(2026, 11, 30), 3.0), files)
    s = load_snapshot(demo_copy, dt.date(2026, 11, 30))
    assert s.figures["market_value"] == 3.0 and snapshot_dates(demo_copy) == [dt.date(2026, 11, 30)]
    assert history.input_content(demo_copy, files[0].sha256) == (demo_copy / "holdings.csv").read_bytes()
    assert history.previous_snapshot(demo_copy, dt.date(2026, 11, 30)) is None
    assert history.previous_snapshot(demo_copy, dt.date(2026, 12, 31)).as_of == dt.date(2026, 11, 30)


def test_import_failing_before_its_commit_point_keeps_holdings_and_journal(demo_copy, monkeypatch):
    book = load_book(demo_copy)
    original = (demo_copy / "holdings.csv").read_bytes()
    new = custodian.CustodianFile(demo_copy / "custodian.csv", book.holdings.take(slice(1, None)),
                                  frozenset(COLUMNS))
    changes, merged = custodian.reconcile(book, new, remove_missing=True)
    real_write = transaction._write

    def fail(path, data, mode=0o666):
        if path.name.startswith(transaction.MANIFEST):
            raise OSError("disk full (simulated)")
        real_write(path, data, mode)
    monkeypatch.setattr(transaction, "_write", fail)
    with pytest.raises(OSError):
        custodian.apply_reconciliation(book, merged, changes, "custodian.csv", remove_missing=True)
    assert (demo_copy / "holdings.csv").read_bytes() == original
    assert not journal_path(demo_copy).exists()
    assert not (demo_copy / transaction.RECORD).exists() and not (demo_copy / "versions").exists()


def test_journal_is_append_only(demo_copy):
    first = append_journal(demo_copy, [JournalEntry(dt.date(2026, 11, 3), "buy", "X1", 1e6, -995_000.0, 99.5, "ladder fill")])
    text = journal_path(demo_copy).read_text(encoding="utf-8")
    append_journal(demo_copy, [JournalEntry(dt.date(2026, 11, 20), "sell", "X1", 1e6, 996_000.0, 99.6, "raise cash")])
    after = journal_path(demo_copy).read_text(encoding="utf-8")
    assert after.startswith(text) and after.count("\n") == 2
    entries = read_journal(demo_copy)
    assert entries[0] == first[0] and first[0].recorded
    assert [e.action for e in entries] == ["buy", "sell"] and entries[1].amount == 996_000.0
    assert JournalEntry(dt.date(2026, 11, 1), "note").to_json()["face"] is None      # JSON has no NaN
    with pytest.raises(InputError, match="not one of"):
        append_journal(demo_copy, [JournalEntry(dt.date(2026, 11, 21), "edit", "X1")])
    assert journal_path(demo_copy).read_text(encoding="utf-8") == after


KILLED_WRITER = """
import datetime as dt, os, sys
sys.path.insert(0, {tests!r})
from ladder.report import history
from test_safety import _snapshot

def dies_midway(conn, snapshot, files):
    key = snapshot.as_of.isoformat()
    conn.execute("DELETE FROM figures WHERE as_of = '2026-10-31'")
    conn.execute("INSERT INTO snapshots VALUES (?,?,?,?,?,?,?,?,?,?)",
                 (key, key, "x", "b", "p", "1", key, "pass", "0", "{{}}"))
    os._exit(9)                                   # the process is killed: no rollback, no commit

history._write = dies_midway
history.record_snapshot({folder!r}, _snapshot(dt.date(2026, 11, 30), 2.0), ())
"""


def test_history_survives_a_process_killed_inside_the_transaction(demo_copy):
    """SQLite's rollback journal (https://www.sqlite.org/atomiccommit.html): a hot journal left by a
    killed writer is rolled back by the next connection."""
    import subprocess
    import sys
    from pathlib import Path

    record_snapshot(demo_copy, _snapshot(dt.date(2026, 10, 31), 1.0), ())
    before = _dump(history.history_path(demo_copy))
    script = KILLED_WRITER.format(tests=str(Path(__file__).parent), folder=str(demo_copy))
    run = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True, timeout=120)
    assert run.returncode == 9, run.stderr
    assert _dump(history.history_path(demo_copy)) == before
    assert snapshot_dates(demo_copy) == [dt.date(2026, 10, 31)]
