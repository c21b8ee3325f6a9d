"""Planted faults: every kind of input file spoiled, and every writing command run where it cannot
write. Each must end in a one-line message naming the file, exit 2 (bad input) or 3 (a file that
cannot be read or written), no traceback, and not one byte changed in the book folder."""

from __future__ import annotations

import csv
import errno
import io
import os
import sqlite3
import tempfile

import pytest
from cli_books import digest, run

from ladder.demo import write_demo
from ladder.folder.lock import LOCK_FILE
from ladder.report.history import HISTORY_FILE, SCHEMA

CASH = "25000000"


@pytest.fixture
def book(tmp_path):
    return write_demo(tmp_path / "book")


def set_cell(path, row: int, column: str, text: str) -> None:
    """Data row ``row`` (1 = the first below the header) of a csv file gets ``text`` in ``column``."""
    rows = list(csv.reader(io.StringIO(path.read_text(encoding="utf-8"))))
    rows[row][rows[0].index(column)] = text
    buffer = io.StringIO()
    csv.writer(buffer, lineterminator="\n").writerows(rows)
    path.write_text(buffer.getvalue(), encoding="utf-8")


def drop_line(path, start: str) -> None:
    path.write_text("".join(line for line in path.read_text(encoding="utf-8").splitlines(keepends=True)
                            if not line.startswith(start)), encoding="utf-8")


def custodian_copy(book, tmp_path):
    """The book's holdings as a custodian file outside the folder, one face changed."""
    path = tmp_path / "custodian.csv"
    path.write_text((book / "holdings.csv").read_text(encoding="utf-8"), encoding="utf-8")
    set_cell(path, 1, "face", "1000000")
    return path


def trades_file(book, tmp_path):
    """A sell of part of the first holding, as ``check --trade`` reads it."""
    rows = list(csv.reader(io.StringIO((book / "holdings.csv").read_text(encoding="utf-8"))))
    path = tmp_path / "trades.csv"
    path.write_text(",".join(rows[0] + ["action"]) + "\n" + ",".join(rows[1] + ["sell"]) + "\n", encoding="utf-8")
    set_cell(path, 1, "face", "1000000")
    return path


def offerings_file(book, tmp_path):
    """One new security on offer (the first holding under a new id), as ``build --offerings`` reads it."""
    rows = list(csv.reader(io.StringIO((book / "holdings.csv").read_text(encoding="utf-8"))))
    path = tmp_path / "offerings.csv"
    row = rows[1] + ["10000000", "1000000", "1000000"]
    row[rows[0].index("id")] = "NEW-OFFER-1"
    path.write_text(",".join(rows[0] + ["available_face", "min_lot", "lot_increment"]) + "\n" + ",".join(row) + "\n",
                    encoding="utf-8")
    return path


def deep_toml(path) -> None:
    path.write_text("x = " + "[" * 600 + "]" * 600 + "\n", encoding="utf-8")


def bad_history(book, text_not_utf8: bool) -> None:
    path = book / HISTORY_FILE
    if not text_not_utf8:
        path.write_bytes(b"this is not a database" * 100)
        return
    with sqlite3.connect(path) as conn:
        for statement in SCHEMA:
            conn.execute(statement)
        conn.execute("INSERT INTO snapshots VALUES ('2026-10-31', '2026-09-30', CAST(X'FFFE41' AS TEXT), 'b', 'p', "
                     "'1', '2026-01-01', 'pass', '0', '{}')")
    conn.close()


# (name, plant(book, tmp_path) -> extra argv or None, the command, exit status, the file the message names)
INPUT_FAULTS = [
    ("book.toml nested 600 deep", lambda b, t: deep_toml(b / "book.toml"), ["value"], 2, "book.toml"),
    ("book.toml files = 5", lambda b, t: (drop_line(b / "book.toml", "[files]"),
                                          (b / "book.toml").write_text("files = 5\n" + (b / "book.toml").read_text())),
     ["value"], 2, "book.toml"),
    ("book.toml not UTF-8", lambda b, t: (b / "book.toml").write_bytes(b"\xff\xfename = 1\n"), ["value"], 2, "book.toml"),
    ("holdings decimal comma", lambda b, t: set_cell(b / "holdings.csv", 1, "face", "5,5"), ["value"], 2,
     "holdings.csv"),
    ("holdings misplaced separator", lambda b, t: set_cell(b / "holdings.csv", 1, "face", "10,000,00"), ["check"], 2,
     "holdings.csv"),
    ("holdings face 1e308", lambda b, t: set_cell(b / "holdings.csv", 1, "face", "1e308"), ["plan"], 2, "holdings.csv"),
    ("holdings.xlsx damaged", lambda b, t: ((b / "holdings.xlsx").write_bytes(b"PK\x03\x04 not a workbook"),
                                            (b / "book.toml").write_text((b / "book.toml").read_text().replace(
                                                '"holdings.csv"', '"holdings.xlsx"'))), ["value"], 2, "holdings.xlsx"),
    ("holdings csv and xlsx, neither named", lambda b, t: ((b / "holdings.xlsx").write_bytes(b"PK"),
                                                           drop_line(b / "book.toml", "holdings =")),
     ["shock"], 2, "book.toml"),
    ("curve not UTF-8", lambda b, t: (b / "curve.csv").write_bytes(b"tenor,par_yield_pct\n3M,4\xff\n"), ["value"], 2,
     "curve.csv"),
    ("curve decimal comma", lambda b, t: set_cell(b / "curve.csv", 1, "par_yield_pct", "4,25"), ["shock"], 2,
     "curve.csv"),
    ("policy nested 600 deep", lambda b, t: deep_toml(b / "policy.toml"), ["check"], 2, "policy.toml"),
    ("cash needs misplaced separator", lambda b, t: set_cell(b / "cash_needs.csv", 1, "amount", "1,00,000"), ["plan"],
     2, "cash_needs.csv"),
    ("cash needs out of range", lambda b, t: set_cell(b / "cash_needs.csv", 1, "amount", "20000000000000"), ["plan"], 2,
     "cash_needs.csv"),
    ("scenarios decimal comma", lambda b, t: set_cell(b / "scenarios.csv", 1, "shift_bp", "5,0"), ["shock"], 2,
     "scenarios.csv"),
    ("trades decimal comma", lambda b, t: (set_cell(p := trades_file(b, t), 1, "face", "1,0"), ["--trade", p])[1],
     ["check"], 2, "trades.csv"),
    ("offerings misplaced separator",
     lambda b, t: (set_cell(p := offerings_file(b, t), 1, "available_face", "10,000,00"), ["--offerings", p])[1],
     ["build", "--cash", CASH], 2, "offerings.csv"),
    ("custodian face 1e308", lambda b, t: (set_cell(p := custodian_copy(b, t), 2, "face", "1e308"), [p, "--apply"])[1],
     ["import"], 2, "custodian.csv"),
    ("custodian xlsx damaged", lambda b, t: ((p := t / "custodian.xlsx").write_bytes(b"garbage"), [p, "--apply"])[1],
     ["import"], 2, "custodian.xlsx"),
    ("build --out names a folder", lambda b, t: ["--out", t], ["build", "--cash", CASH], 2, lambda b, t: str(t)),
    ("report --out names a file", lambda b, t: ((t / "r.txt").write_text("x"), ["--out", t / "r.txt"])[1], ["report"],
     2, "r.txt"),
    ("history not a database", lambda b, t: bad_history(b, False), ["report"], 3, HISTORY_FILE),
    ("history text not UTF-8", lambda b, t: bad_history(b, True), ["report"], 3, HISTORY_FILE),
]


def _argv(command: list[str], book, extras) -> list:
    return [command[0], book, *command[1:], *(extras or [])]


@pytest.mark.parametrize("name, plant, command, status, named", INPUT_FAULTS, ids=[f[0] for f in INPUT_FAULTS])
def test_a_spoiled_input_is_one_message_and_nothing_changes(book, tmp_path, capsys, name, plant, command, status,
                                                             named):
    extras = plant(book, tmp_path)
    extras = extras if isinstance(extras, list) else None
    before = digest(book)
    code, out, err = run(capsys, *_argv(command, book, extras))
    assert code == status, err
    named = named(book, tmp_path) if callable(named) else named
    first = err.splitlines()[0]
    assert named in first and "Traceback" not in err
    assert all(not line.startswith((" ", "File ")) for line in err.splitlines())
    assert digest(book) == before


_OPEN = os.open


def _denied(path, flags, *args, **kwargs):
    """``os.open`` in a folder the user may not write in (we may run as root, so chmod would not stop
    us): creating a file fails as the operating system says, naming it; the writers' lock file
    (already there in a folder a writer used before) and reading are allowed."""
    if flags & os.O_CREAT and os.path.basename(path) != LOCK_FILE:
        raise PermissionError(errno.EACCES, "Permission denied", os.fspath(path))
    return _OPEN(path, flags, *args, **kwargs)


def _full_disk(fd):
    raise OSError(errno.ENOSPC, "No space left on device")


WRITERS = [
    ("import --apply", lambda b, t: ["import", b, custodian_copy(b, t), "--apply", "--yes"]),
    ("build --apply", lambda b, t: ["build", b, "--cash", CASH, "--apply", "--yes"]),
    ("build --out", lambda b, t: ["build", b, "--cash", CASH, "--out", b / "proposed.csv"]),
    ("report", lambda b, t: ["report", b, "--format", "md"]),
    ("roll", lambda b, t: ["roll", b, "--to", "2027-03-31"]),
]


@pytest.mark.parametrize("fault, patch", [("read-only folder", ("os.open", _denied)),
                                          ("full disk", ("os.fsync", _full_disk))], ids=["read-only", "full-disk"])
@pytest.mark.parametrize("name, argv", WRITERS, ids=[w[0] for w in WRITERS])
def test_a_write_that_fails_is_one_message_exit_3_and_nothing_changes(book, tmp_path, capsys, monkeypatch, fault,
                                                                      patch, name, argv):
    args = argv(book, tmp_path)
    before = digest(book)
    target, replacement = patch
    module, attribute = target.split(".")
    monkeypatch.setattr({"tempfile": tempfile, "os": os}[module], attribute, replacement)
    code, out, err = run(capsys, *args)
    assert code == 3, err
    lines = err.splitlines()
    assert len(lines) == 1 and "Traceback" not in err
    assert str(book) in lines[0]
    assert ("no space left" if fault == "full disk" else "permission denied") in lines[0]
    assert digest(book) == before


def test_report_records_nothing_when_its_files_cannot_be_written(book, capsys, monkeypatch):
    monkeypatch.setattr(os, "fsync", _full_disk)
    code, _, err = run(capsys, "report", book)
    assert code == 3 and not (book / HISTORY_FILE).exists(), err
