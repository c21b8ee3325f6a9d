"""Private copies of the demo book for the report tests (the real demo files are never touched)."""

from __future__ import annotations

import shutil

from ladder.demo import DEMO_BOOK
from demo_copy import untracked


def copy_demo(target):
    shutil.copytree(DEMO_BOOK, target, ignore=untracked)   # tracked files only (demo_copy.py)
    return target


def recorded_month_end(folder):
    """The month-end report of the book in ``folder`` at its valuation date, recorded in its history."""
    from ladder.analysis.report import month_end_report, record_month_end
    from ladder.book.book_file import load_book

    book = load_book(folder)
    m = month_end_report(book)
    record_month_end(book, m)
    return folder, book, m
