"""``ladder import``: a custodian holdings file against the book; ``--apply`` replaces the holdings."""

from __future__ import annotations

from pathlib import Path

from ladder.commands.common import writing
from ladder.folder.book_file import load_book
from ladder.commands.output import console, print_caution, write_csv, write_json
from ladder.report.custodian import compare_holdings, read_custodian_file, replace_holdings

HELP = "compare a custodian holdings file with the book (added, removed, changed face or price); --apply replaces"


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("import", help=HELP, description=HELP)
    parser.add_argument("book", metavar="BOOK", help="the book folder (holds book.toml)")
    parser.add_argument("file", metavar="FILE", type=Path, help="the custodian's holdings file (holdings.csv columns)")
    parser.add_argument("--apply", action="store_true",
                        help="replace the book's holdings with FILE and journal every difference")
    parser.add_argument("--reason", default="", help="why, for the journal")
    parser.add_argument("--format", choices=("table", "json", "csv"), default="table")
    parser.set_defaults(run=run)


def _records(changes) -> list[dict]:
    def num(x):
        return None if x != x else x
    return [{"id": c.id, "change": c.kind, "old_face": num(c.old_face), "new_face": num(c.new_face),
             "old_price": c.old_quote, "new_price": c.new_quote, "old_book_price": num(c.old_book_price),
             "new_book_price": num(c.new_book_price), "other_fields": " ".join(c.other_fields)} for c in changes]


def run(args) -> int:
    if args.apply:               # one writer at a time, from reading the book to writing it
        with writing(args.book, f"ladder import {args.file.name} --apply"):
            return _run(args)
    return _run(args)


def _run(args) -> int:
    book = load_book(args.book)
    new = read_custodian_file(book, args.file)
    changes = compare_holdings(book.holdings, new)
    if args.format == "json":
        write_json({"file": str(args.file), "changes": _records(changes), "applied": bool(args.apply)})
    elif args.format == "csv":
        write_csv(_records(changes))
    else:
        con = console()
        counts = {k: sum(c.kind == k for c in changes) for k in ("added", "removed", "changed")}
        con.print(f"{args.file} against {book.files['holdings'].name}: " + ", ".join(f"{v} {k}" for k, v in counts.items()))
        for c in changes:
            con.print(f"  {c.describe()}", markup=False, highlight=False)
    if args.apply and changes:
        path = replace_holdings(book, new, changes, Path(args.file).name, args.reason)
        if args.format == "table":
            con.print(f"Replaced {path} (previous kept as a version: ladder restore BOOK --list); "
                      f"{len(changes)} journal entries added.")
    elif args.format == "table":
        con.print("Nothing replaced." if not args.apply else "No differences; nothing replaced.")
    if args.format == "table":
        print_caution(con)
    return 0
