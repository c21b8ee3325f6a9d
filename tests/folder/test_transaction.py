"""Book transactions: files keep mode, owner and links; read-only files are refused; versions are
kept, pruned and restored; an xlsx book is written as xlsx; the journal is appended, never rewritten;
a second writer is refused with the holder named."""

from __future__ import annotations

import csv
import datetime as dt
import io
import os
import signal
import stat
import time
from contextlib import redirect_stderr, redirect_stdout

import openpyxl
import pytest

from ladder.cli import main
from ladder.demo import write_demo
from ladder.errors import InputError
from ladder.folder.book_file import load_book
from ladder.folder.journal import JournalEntry, append_journal, journal_path, read_journal
from ladder.folder.lock import book_lock
from ladder.folder.save import curve_change
from ladder.folder.transaction import RECORD, commit
from ladder.folder.versions import list_versions

ROLL_TO = "2026-12-31"


@pytest.fixture()
def folder(tmp_path):
    return write_demo(tmp_path / "book")


def _run(*argv) -> tuple[int, str]:
    out, err = io.StringIO(), io.StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        status = main(list(argv))
    return status, out.getvalue() + err.getvalue()


def test_a_replaced_file_keeps_its_mode_and_owner_and_a_new_file_follows_the_umask(folder):
    holdings = folder / "holdings.csv"
    os.chmod(holdings, 0o640)
    if os.geteuid() == 0:                        # only root may give a file to another user
        os.chown(holdings, 4321, 4322)
    umask = os.umask(0o027)
    try:
        assert _run("roll", str(folder), "--to", ROLL_TO)[0] == 0
    finally:
        os.umask(umask)
    st = os.stat(holdings)
    assert stat.S_IMODE(st.st_mode) == 0o640
    assert stat.S_IMODE(os.stat(journal_path(folder)).st_mode) == 0o640      # 0666 less the umask 027
    kept = os.stat(next((folder / "versions").glob("*/holdings.csv")))
    assert stat.S_IMODE(kept.st_mode) == 0o640                               # the version as private as it was
    if os.geteuid() == 0:
        assert (st.st_uid, st.st_gid) == (4321, 4322) and (kept.st_uid, kept.st_gid) == (4321, 4322)


def test_a_symlinked_file_is_written_through_the_link(folder, tmp_path):
    elsewhere = tmp_path / "shared"
    elsewhere.mkdir()
    (folder / "holdings.csv").rename(elsewhere / "holdings.csv")
    (folder / "holdings.csv").symlink_to(elsewhere / "holdings.csv")
    before = len(load_book(folder).holdings)
    assert _run("roll", str(folder), "--to", ROLL_TO)[0] == 0
    assert (folder / "holdings.csv").is_symlink()
    assert len(load_book(folder).holdings) < before
    assert (elsewhere / "holdings.csv").read_bytes() == (folder / "holdings.csv").read_bytes()
    assert not list(elsewhere.glob(".*"))                                   # no temporary file left beside it


def test_a_read_only_file_is_refused_and_nothing_changes(folder):
    holdings = folder / "holdings.csv"
    original = holdings.read_bytes()
    os.chmod(holdings, 0o444)
    status, text = _run("roll", str(folder), "--to", ROLL_TO)
    assert status == 3 and "read-only" in text and "nothing was changed" in text
    assert holdings.read_bytes() == original and stat.S_IMODE(os.stat(holdings).st_mode) == 0o444
    assert not journal_path(folder).exists() and not (folder / RECORD).exists() and not list_versions(folder)


def test_versions_are_kept_for_each_change_and_pruned_to_the_books_setting(folder):
    (folder / "book.toml").write_text((folder / "book.toml").read_text() + "\n[history]\nkeep = 3\n")
    book = load_book(folder)
    curves = []
    for bp in range(1, 6):
        shifted = type(book.curve)(book.curve.tenors, book.curve.par_yields + bp / 10_000)
        curves.append((folder / "curve.csv").read_bytes())
        commit(book, curve_change(book, shifted), reason=f"curve +{bp} bp")
    versions = list_versions(folder)
    assert len(versions) == 3                                                  # keep = 3
    assert [v.reason for v in versions] == ["curve +3 bp", "curve +4 bp", "curve +5 bp"]
    assert [(v.path(folder) / "curve.csv").read_bytes() for v in versions] == curves[2:]   # the newest three


def test_restore_brings_a_version_back_as_a_journaled_change(folder):
    original = (folder / "holdings.csv").read_bytes()
    assert _run("roll", str(folder), "--to", ROLL_TO)[0] == 0
    rolled = (folder / "holdings.csv").read_bytes()
    (version,) = list_versions(folder)
    status, text = _run("restore", str(folder), "--list")
    assert status == 0 and version.name in text and f"roll to {ROLL_TO}" in text
    assert _run("restore", str(folder), version.name)[0] == 0
    assert (folder / "holdings.csv").read_bytes() == original
    # the roll replaced holdings.csv and book.toml (its valuation date): one restore line each
    restored = [e for e in read_journal(folder) if e.action == "restore"]
    assert {e.reason.split()[0] for e in restored} == {"holdings.csv", "book.toml"}
    assert all(version.name in e.reason for e in restored)
    undo = list_versions(folder)[-1]                     # the restore kept what it replaced: undo it
    assert (undo.path(folder) / "holdings.csv").read_bytes() == rolled
    assert _run("restore", str(folder), undo.name)[0] == 0
    assert (folder / "holdings.csv").read_bytes() == rolled
    status, text = _run("restore", str(folder), "no-such-version")
    assert status == 2 and "there is no version 'no-such-version'" in text


def _xlsx_book(folder):
    """The book's holdings moved into a workbook (cells as text, as a custodian's export may be) that
    book.toml names; holdings.csv stays beside it."""
    workbook = openpyxl.Workbook()
    with (folder / "holdings.csv").open(newline="") as handle:
        for row in csv.reader(handle):
            workbook.active.append(row)
    workbook.save(folder / "holdings.xlsx")
    toml = (folder / "book.toml").read_text()
    assert 'holdings = "holdings.csv"' in toml
    (folder / "book.toml").write_text(toml.replace('holdings = "holdings.csv"', 'holdings = "holdings.xlsx"'))


def test_an_xlsx_book_is_written_as_xlsx_and_a_second_roll_has_nothing_to_do(folder, tmp_path):
    csv_twin = write_demo(tmp_path / "twin")
    _xlsx_book(folder)
    csv_before = (folder / "holdings.csv").read_bytes()
    assert _run("roll", str(folder), "--to", ROLL_TO)[0] == 0
    assert _run("roll", str(csv_twin), "--to", ROLL_TO)[0] == 0
    assert (folder / "holdings.csv").read_bytes() == csv_before                # the file the book does not read
    sheet = openpyxl.load_workbook(folder / "holdings.xlsx").worksheets[0]
    assert [c.value for c in next(sheet.iter_rows())][:3] == ["id", "sector", "issuer"]
    rolled, twin = load_book(folder).holdings, load_book(csv_twin).holdings
    assert list(rolled.id) == list(twin.id) and (rolled.face == twin.face).all()
    assert (rolled.maturity == twin.maturity).all() and (rolled.coupon == twin.coupon).all()
    journaled = len(read_journal(folder))
    assert journaled > 0 and journaled == len(read_journal(csv_twin))
    assert _run("roll", str(folder), "--to", ROLL_TO)[0] == 0                   # nothing left to roll
    assert len(read_journal(folder)) == journaled


def test_a_workbook_with_other_sheets_is_refused_before_anything_changes(folder):
    _xlsx_book(folder)
    workbook = openpyxl.load_workbook(folder / "holdings.xlsx")
    workbook.create_sheet("notes")
    workbook.save(folder / "holdings.xlsx")
    before = (folder / "holdings.xlsx").read_bytes()
    status, text = _run("roll", str(folder), "--to", ROLL_TO)
    assert status == 2 and "would lose the others" in text
    assert (folder / "holdings.xlsx").read_bytes() == before and not journal_path(folder).exists()


def test_appending_to_the_journal_leaves_its_earlier_bytes_where_they_are(folder):
    append_journal(folder, [JournalEntry(dt.date(2026, 11, 3), "note", reason="first")])
    path = journal_path(folder)
    first, inode = path.read_bytes(), os.stat(path).st_ino
    append_journal(folder, [JournalEntry(dt.date(2026, 11, 4), "note", reason="second")])
    assert os.stat(path).st_ino == inode                    # the same file, appended to, not a rewritten copy
    assert path.read_bytes().startswith(first) and [e.reason for e in read_journal(folder)] == ["first", "second"]
    assert not list_versions(folder)                         # a journal line alone replaces no file


def test_a_second_writer_waits_then_is_refused_naming_the_holder(folder, monkeypatch):
    ready_read, ready_write = os.pipe()
    pid = os.fork()
    if pid == 0:                                             # the holder: takes the lock and keeps it
        try:
            with book_lock(folder, "ladder import statement.csv --apply"):
                os.write(ready_write, b"1")
                time.sleep(60)
        finally:
            os._exit(0)
    try:
        assert os.read(ready_read, 1) == b"1"
        monkeypatch.setenv("LADDER_LOCK_WAIT", "0.3")
        original = (folder / "holdings.csv").read_bytes()
        status, text = _run("roll", str(folder), "--to", ROLL_TO)
        assert status == 3
        assert "ladder import statement.csv --apply" in text and f"process {pid}" in text
        assert "nothing was changed" in text and (folder / "holdings.csv").read_bytes() == original
    finally:
        os.kill(pid, signal.SIGKILL)
        os.waitpid(pid, 0)
    assert _run("roll", str(folder), "--to", ROLL_TO)[0] == 0          # the lock died with its holder


@pytest.mark.parametrize("value", ["0", "2.5", '"all"'])
def test_a_bad_history_setting_is_refused_with_its_line(folder, value):
    (folder / "book.toml").write_text((folder / "book.toml").read_text() + f"\n[history]\nkeep = {value}\n")
    with pytest.raises(InputError, match=r"history\.keep: must be a whole number of versions from 1 to 10000"):
        load_book(folder)
