"""Benchmark: appending one journal line costs the same whatever the journal's length.

Run as a script (not collected by pytest): ``python tests/bench/bench_journal.py``. Appends one line
(``append_journal``: a whole book transaction with no file replaced, fsyncs included) to the journal
of a demo copy holding 100 lines and to one holding 100,000 lines (about 20 MB), and prints the
median times and their ratio, measured in the same run. A journal rewritten on every append would
make the ratio grow with the length (about 1,000 here); an append keeps it near 1.
"""

from __future__ import annotations

import datetime as dt
import statistics
import sys
import tempfile
import time
from pathlib import Path

from ladder.demo import write_demo
from ladder.folder.journal import JournalEntry, append_journal, journal_lines, journal_path

RUNS = 15
LINE = JournalEntry(dt.date(2026, 11, 30), "note", "DEMO-TSY-0101", reason="benchmark line")


def book_with(lines: int, root: Path) -> Path:
    folder = write_demo(root / f"book-{lines}")
    journal_path(folder).write_bytes(journal_lines([LINE])[1] * lines)
    return folder


def median_append(folder: Path) -> float:
    times = []
    for _ in range(RUNS):
        started = time.perf_counter()
        append_journal(folder, [LINE])
        times.append(time.perf_counter() - started)
    return statistics.median(times)


def main() -> int:
    with tempfile.TemporaryDirectory() as tmp:
        short, long = book_with(100, Path(tmp)), book_with(100_000, Path(tmp))
        median_append(short)                                   # warm up imports and caches
        t_short, t_long = median_append(short), median_append(long)
        size = journal_path(long).stat().st_size / 1e6
    print(f"append one line, journal of 100 lines:     {t_short * 1e3:8.2f} ms (reference)")
    print(f"append one line, journal of 100,000 lines: {t_long * 1e3:8.2f} ms ({size:.0f} MB)")
    print(f"ratio: {t_long / t_short:.2f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
