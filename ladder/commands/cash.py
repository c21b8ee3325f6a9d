"""``ladder cash``: money moved between the portfolio's cash account and the company's operating
accounts, journaled."""

from __future__ import annotations

from ladder.commands.common import iso_date, writing
from ladder.commands.output import console, fmt, print_caution, term, write_json

HELP = "deposit into or withdraw from the book's cash account (journaled)"


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("cash", help=HELP, description=HELP + ".")
    parser.add_argument("book", metavar="BOOK", help="the book folder (holds book.toml)")
    move = parser.add_mutually_exclusive_group(required=True)
    move.add_argument("--withdraw", metavar="AMOUNT", help="currency units taken out to the company")
    move.add_argument("--deposit", metavar="AMOUNT", help="currency units paid in by the company")
    parser.add_argument("--date", type=iso_date, metavar="YYYY-MM-DD", help="default: the valuation date")
    parser.add_argument("--memo", default="", help="words for the journal")
    parser.add_argument("--allow-overdraft", action="store_true", help="allow a withdrawal larger than the balance")
    parser.add_argument("--format", choices=("table", "json"), default="table")
    parser.set_defaults(run=run)


def _amount(args) -> float:
    from ladder.book.cells import parse_number
    from ladder.errors import InputError, Problem

    option, text = ("--withdraw", args.withdraw) if args.withdraw is not None else ("--deposit", args.deposit)
    try:
        value = parse_number(text)
    except ValueError as why:
        raise InputError([Problem(option, 0, 0, f"{why}; write currency units, e.g. 2500000")]) from None
    if value <= 0:
        raise InputError([Problem(option, 0, 0, f"{text} must be a positive amount")])
    return -value if option == "--withdraw" else value


def run(args) -> int:
    from ladder.analysis.time_moves import transfer
    from ladder.folder.book_file import load_book

    amount = _amount(args)
    with writing(args.book, "ladder cash"):
        moved = transfer(load_book(args.book), amount, args.date, args.memo, args.allow_overdraft)
    if args.format == "json":
        write_json({"cash_before": moved.cash_before, "cash_after": moved.cash_after,
                    "entries": [e.to_json() for e in moved.entries]})
        return 0
    con = console()
    e = moved.entries[0]
    con.print(f"{e.date}  {e.action} {fmt(abs(e.amount), 2)}  {term(e.reason)}; {term(moved.book.cash_account)}: "
              f"{fmt(moved.cash_before, 2)} -> {fmt(moved.cash_after, 2)}.")
    print_caution(con)
    return 0
