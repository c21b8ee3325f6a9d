"""Arguments shared by the subcommands and the parsing of their values."""

from __future__ import annotations

import argparse
import datetime as dt


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
