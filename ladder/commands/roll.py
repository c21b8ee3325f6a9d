"""``ladder roll``: take matured (and called) holdings off the book, journaling each."""

from __future__ import annotations


from ladder.commands.common import iso_date, writing
from ladder.commands.output import console, fmt, print_caution, term, write_json

HELP = "take holdings that matured by a date, and those the issuer called, off the book (journaled)"


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("roll", help=HELP, description=HELP + ". Update book.toml's valuation_date "
                                   "and the curve to the new date yourself.")
    parser.add_argument("book", metavar="BOOK", help="the book folder (holds book.toml)")
    parser.add_argument("--to", type=iso_date, required=True, metavar="YYYY-MM-DD",
                        help="holdings maturing on or before this date are taken off")
    parser.add_argument("--called", default="", metavar="ID[,ID...]", help="holdings the issuer has called")
    parser.add_argument("--format", choices=("table", "json"), default="table")
    parser.set_defaults(run=run)


def run(args) -> int:
    from ladder.analysis.booking import roll_book
    from ladder.folder.book_file import load_book

    called = tuple(c.strip() for c in args.called.split(",") if c.strip())
    with writing(args.book, f"ladder roll --to {args.to}"):
        booked = roll_book(load_book(args.book), args.to, called)
    if args.format == "json":
        write_json({"to": args.to.isoformat(), "file": str(booked.path),
                    "entries": [e.to_json() for e in booked.entries]})
        return 0
    con = console()
    for e in booked.entries:
        con.print(f"{e.date}  {e.action:<7} {term(e.holding):<18} face {fmt(e.face, 0):>14}  cash {fmt(e.amount, 2):>16}")
    if booked.entries:
        con.print(f"{len(booked.entries)} holding(s) taken off; {booked.path} written (previous kept as version "
                  f"{booked.version}) and the journal appended.")
    else:
        con.print(f"No holding matured or was called by {args.to}; nothing was written.")
    print_caution(con)
    return 0
