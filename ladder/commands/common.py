"""Arguments shared by the subcommands and the parsing of their values."""

from __future__ import annotations

import argparse
import contextlib
import datetime as dt
from pathlib import Path


def iso_date(text: str) -> dt.date:
    try:
        return dt.date.fromisoformat(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a date; write YYYY-MM-DD") from None


def add_book(parser: argparse.ArgumentParser, formats=("table", "json", "csv")) -> None:
    """BOOK, --at and --format, the arguments every reporting command takes."""
    parser.add_argument("book", metavar="BOOK", help="the book folder (holds book.toml)")
    parser.add_argument("--at", type=iso_date, metavar="YYYY-MM-DD",
                        help="settlement date (default: the book's valuation date)")
    parser.add_argument("--format", choices=formats, default="table", help="output format (default: table)")


def writing(book: str, command: str):
    """The book's lock (``ladder.folder.lock.book_lock``) for a command that changes the book, held
    from loading it to the commit; no lock when there is no such folder (loading it says why)."""
    from ladder.folder.lock import book_lock

    folder = Path(book)
    folder = folder.parent if folder.is_file() else folder
    return book_lock(folder, command) if folder.is_dir() else contextlib.nullcontext()
