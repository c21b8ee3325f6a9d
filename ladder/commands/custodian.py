"""``ladder import``: a custodian holdings file against the book; ``--apply`` replaces the holdings.

An ``--apply`` that would take off every holding, or more than ``--max-removed`` percent of them
(by count; default 20), asks first on a terminal and is refused without one unless ``--yes`` is
given: a header-only or truncated custodian file must not empty the book by accident.
"""

from __future__ import annotations

import sys
from pathlib import Path

from ladder.commands.common import writing
from ladder.folder.book_file import load_book
from ladder.commands.output import console, print_caution, term, write_csv, write_json
from ladder.errors import InputError, Problem, naming
from ladder.report.custodian import compare_holdings, read_custodian_file, replace_holdings

HELP = "compare a custodian holdings file with the book (added, removed, changed face or price); --apply replaces"
MAX_REMOVED_PCT = 20.0


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("import", help=HELP, description=HELP)
    parser.add_argument("book", metavar="BOOK", help="the book folder (holds book.toml)")
    parser.add_argument("file", metavar="FILE", type=Path, help="the custodian's holdings file (holdings.csv columns)")
    parser.add_argument("--apply", action="store_true",
                        help="replace the book's holdings with FILE and journal every difference")
    parser.add_argument("--yes", action="store_true",
                        help="with --apply: do not ask before removing many holdings (for scripts)")
    parser.add_argument("--max-removed", type=float, default=MAX_REMOVED_PCT, metavar="PCT",
                        help=f"with --apply: ask first when more than PCT%% of the holdings would be removed "
                             f"(default {MAX_REMOVED_PCT:g}); removing every holding always asks")
    parser.add_argument("--reason", default="", help="why, for the journal")
    parser.add_argument("--format", choices=("table", "json", "csv"), default="table")
    parser.set_defaults(run=run)


def _records(changes) -> list[dict]:
    def num(x):
        return None if x != x else x
    return [{"id": c.id, "change": c.kind, "old_face": num(c.old_face), "new_face": num(c.new_face),
             "old_price": c.old_quote, "new_price": c.new_quote, "old_book_price": num(c.old_book_price),
             "new_book_price": num(c.new_book_price), "other_fields": " ".join(c.other_fields)} for c in changes]


def _sweeping(book, changes, max_pct: float) -> str:
    """Why applying ``changes`` needs a confirmation ("" when it does not)."""
    held = len(book.holdings)
    removed = sum(c.kind == "removed" for c in changes)
    if held and removed == held:
        return f"it would remove every holding ({held}) of the book"
    if held and 100.0 * removed / held > max_pct:
        return f"it would remove {removed} of the book's {held} holdings (more than {max_pct:g}%)"
    return ""


def _refuse_unasked(args, why: str) -> None:
    """A sweeping replacement with no terminal to ask on and no --yes: InputError, before any output."""
    if why and not args.yes and not sys.stdin.isatty():
        raise InputError([Problem(str(args.file), 0, 0, f"not applied: {why}; check the file, and add --yes "
                                                        "to apply it from a script")])


def _confirmed(args, why: str, target) -> bool:
    """True when the replacement may go ahead: not sweeping, --yes, or the user said yes."""
    if not why or args.yes:
        return True
    answer = input(f"Replace the holdings in {target}? {why[0].upper() + why[1:]}. [y/N] ")
    return answer.strip().lower() in ("y", "yes")


def run(args) -> int:
    if args.apply:               # one writer at a time, from reading the book to writing it
        with writing(args.book, f"ladder import {args.file.name} --apply"):
            return _run(args)
    return _run(args)


def _run(args) -> int:
    book = load_book(args.book)
    new = read_custodian_file(book, args.file)
    changes = compare_holdings(book.holdings, new)
    why = _sweeping(book, changes, args.max_removed) if args.apply else ""
    _refuse_unasked(args, why)
    if args.format == "json":
        write_json({"file": str(args.file), "changes": _records(changes), "applied": bool(args.apply)})
    elif args.format == "csv":
        write_csv(_records(changes))
    else:
        con = console()
        counts = {k: sum(c.kind == k for c in changes) for k in ("added", "removed", "changed")}
        con.print(f"{term(args.file)} against {term(book.files['holdings'].name)}: " + ", ".join(f"{v} {k}" for k, v in counts.items()))
        for c in changes:
            con.print(f"  {c.describe()}", markup=False, highlight=False)
    if args.apply and changes and not _confirmed(args, why, book.files["holdings"]):
        print("Not applied.", file=sys.stderr)
    elif args.apply and changes:
        with naming(book.files["holdings"]):
            path = replace_holdings(book, new, changes, Path(args.file).name, args.reason)
        if args.format == "table":
            con.print(f"Replaced {path} (previous kept as a version: ladder restore BOOK --list); "
                      f"{len(changes)} journal entries added.")
    elif args.format == "table":
        con.print("Nothing replaced." if not args.apply else "No differences; nothing replaced.")
    if args.format == "table":
        print_caution(con)
    return 0
