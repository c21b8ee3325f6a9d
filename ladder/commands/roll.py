"""``ladder roll``: move the book to a later date, crediting coupons, maturities, calls and fund
dividends to the cash account (journaled), taking off what matured or was called."""

from __future__ import annotations

import sys

from ladder.commands.common import iso_date, writing
from ladder.commands.output import console, fmt, print_caution, term, write_json
from ladder.errors import InputError, Problem

HELP = ("move the book to a later date: coupons, maturities, calls and fund dividends paid into the cash "
        "account, matured and called holdings taken off, the valuation date moved (journaled)")


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("roll", help=HELP, description=HELP + ". Update the curve to the new date yourself.")
    parser.add_argument("book", metavar="BOOK", help="the book folder (holds book.toml)")
    parser.add_argument("--to", type=iso_date, required=True, metavar="YYYY-MM-DD",
                        help="the new valuation date (not before the current one)")
    parser.add_argument("--called", action="append", default=[], metavar="ID[:DATE]",
                        help="a holding the issuer called, on DATE (default --to; on its call schedule); repeatable")
    parser.add_argument("--yes", action="store_true", help="do not ask (for scripts)")
    parser.add_argument("--format", choices=("table", "json"), default="table")
    parser.set_defaults(run=run)


def run(args) -> int:
    from ladder.analysis.time_moves import parse_called, roll_book
    from ladder.folder.book_file import load_book

    with writing(args.book, f"ladder roll --to {args.to}"):
        book = load_book(args.book)
        called = parse_called([c for value in args.called for c in value.split(",") if c.strip()], book, args.to)
        if not args.yes and sys.stdin.isatty():
            answer = input(f"Move {book.folder} from {book.valuation_date} to {args.to}? [y/N] ")
            if answer.strip().lower() not in ("y", "yes"):
                raise InputError([Problem("--yes", 0, 0, "not confirmed; nothing was written")])
        moved = roll_book(book, args.to, called)
    if args.format == "json":
        write_json({"to": args.to.isoformat(), "cash_before": moved.cash_before, "cash_after": moved.cash_after,
                    "entries": [e.to_json() for e in moved.entries]})
        return 0
    con = console()
    for e in moved.entries:
        con.print(f"{e.date}  {e.action:<8} {term(e.holding):<18} face {fmt(e.face, 0) if e.face == e.face else '':>14}"
                  f"  cash {fmt(e.amount, 2):>16}")
    con.print(f"{len(moved.entries)} journal line(s); valuation date now {args.to}; cash account "
              f"{term(moved.book.cash_account or '(none)')}: {fmt(moved.cash_before, 2)} -> {fmt(moved.cash_after, 2)}.")
    print_caution(con)
    return 0
