"""Private copies of the demo book for the report tests (the real demo files are never touched)."""

from __future__ import annotations


from ladder.demo import write_demo


def copy_demo(target):
    write_demo(target)
    return target


def recorded_month_end(folder):
    """The month-end report of the book in ``folder`` at its valuation date, recorded in its history."""
    from ladder.report.month_end import month_end_report, record_month_end
    from ladder.folder.book_file import load_book

    book = load_book(folder)
    m = month_end_report(book)
    record_month_end(book, m)
    return folder, book, m
