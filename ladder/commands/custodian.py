"""``ladder import``: a custodian holdings file reconciled with the book; ``--apply`` brings the book
in line with it.

The breaks (at the custodian only, in the book only, face or price beyond the tolerances of
``ladder.report.custodian``) are listed with their money effect. ``--apply`` asks for confirmation on
a terminal and is refused without one unless ``--yes`` is given. Columns the file lacks keep the
book's values; holdings missing at the custodian stay (breaks to investigate) unless
``--remove-missing``. A removal of every holding, or of more than ``--max-removed`` percent of them
(by count; default 20), is refused without a terminal unless ``--yes`` is given, and named when asking:
a header-only or truncated custodian file must not empty the book by accident. Nor may it remove the
cash account: ``--remove-missing`` with a file that lacks it is refused.
"""

from __future__ import annotations

import sys
from pathlib import Path

from ladder.commands.common import writing
from ladder.folder.book_file import load_book
from ladder.commands.output import console, print_caution, term, write_csv, write_json
from ladder.errors import InputError, Problem, naming
from ladder.report.custodian import (FACE_TOLERANCE, PRICE_TOLERANCE, apply_reconciliation, read_custodian_file,
                                     reconcile)

HELP = ("reconcile a custodian holdings file with the book: breaks (custodian only, book only, face, price) and "
        "their money effect; --apply brings the book in line")
MAX_REMOVED_PCT = 20.0


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("import", help=HELP, description=HELP)
    parser.add_argument("book", metavar="BOOK", help="the book folder (holds book.toml)")
    parser.add_argument("file", metavar="FILE", type=Path, help="the custodian's holdings file (holdings.csv columns)")
    parser.add_argument("--apply", action="store_true",
                        help="bring the book's holdings in line with FILE and journal every difference (asks first)")
    parser.add_argument("--yes", action="store_true", help="with --apply: do not ask (for scripts)")
    parser.add_argument("--remove-missing", action="store_true",
                        help="with --apply: remove holdings missing at the custodian (default: keep them as breaks)")
    parser.add_argument("--max-removed", type=float, default=MAX_REMOVED_PCT, metavar="PCT",
                        help=f"with --apply: ask first when more than PCT%% of the holdings would be removed "
                             f"(default {MAX_REMOVED_PCT:g}); removing every holding always asks")
    parser.add_argument("--reason", default="", help="why, for the journal")
    parser.add_argument("--format", choices=("table", "json", "csv"), default="table")
    parser.set_defaults(run=run)


def _records(changes) -> list[dict]:
    def num(x):
        return None if x != x else x
    return [{"id": c.id, "change": c.kind, "breaks": " ".join(c.breaks), "money_effect": round(c.money_effect, 2),
             "old_face": num(c.old_face), "new_face": num(c.new_face),
             "old_price": c.old_quote, "new_price": c.new_quote, "old_clean_price": num(c.old_clean),
             "new_clean_price": num(c.new_clean), "old_book_price": num(c.old_book_price),
             "new_book_price": num(c.new_book_price), "other_fields": " ".join(c.other_fields)} for c in changes]


def _sweeping(book, changes, max_pct: float, remove_missing: bool) -> str:
    """Why applying ``changes`` would remove many holdings ("" when it would not)."""
    held = len(book.holdings)
    removed = sum(c.kind == "removed" for c in changes) if remove_missing else 0
    if held and removed == held:
        return f"it would remove every holding ({held}) of the book"
    if held and 100.0 * removed / held > max_pct:
        return f"it would remove {removed} of the book's {held} holdings (more than {max_pct:g}%)"
    return ""


def _refuse_unasked(args, why: str) -> None:
    """--apply with no terminal to ask on and no --yes: InputError, before any output (a sweeping
    removal named)."""
    if args.apply and not args.yes and not sys.stdin.isatty():
        if why:
            raise InputError([Problem(str(args.file), 0, 0, f"not applied: {why}; check the file, and add --yes "
                                                            "to apply it from a script")])
        raise InputError([Problem("--apply", 0, 0, "--apply asks for confirmation on a terminal; add --yes to apply "
                                                   "from a script")])


def _confirmed(args, why: str, target) -> bool:
    """True when the change may go ahead: --yes, or the user said yes."""
    if args.yes:
        return True
    warning = f" {why[0].upper() + why[1:]}." if why else ""
    answer = input(f"Apply to the holdings in {target}? The old file is kept as a version.{warning} [y/N] ")
    return answer.strip().lower() in ("y", "yes")


def run(args) -> int:
    if args.apply:               # one writer at a time, from reading the book to writing it
        with writing(args.book, f"ladder import {args.file.name} --apply"):
            return _run(args)
    return _run(args)


def _run(args) -> int:
    book = load_book(args.book)
    custodian = read_custodian_file(book, args.file)
    changes, merged = reconcile(book, custodian, args.remove_missing)
    why = _sweeping(book, changes, args.max_removed, args.remove_missing) if args.apply else ""
    _refuse_unasked(args, why)
    account = book.cash_account
    if args.apply and args.remove_missing and account and account in book.holdings.id \
            and account not in custodian.holdings.id:
        raise InputError([Problem(str(args.file), 0, 0, f"not applied: the cash account {account!r} ([cash].account "
                                  "in book.toml) is not in this file, and --remove-missing would remove the account "
                                  "that settles the book; add its row to the file, or leave out --remove-missing")])
    breaks = [c for c in changes if c.breaks]
    if args.format == "json":
        write_json({"file": str(args.file), "face_tolerance": FACE_TOLERANCE, "price_tolerance": PRICE_TOLERANCE,
                    "breaks": len(breaks), "money_effect": round(sum(c.money_effect for c in breaks), 2),
                    "changes": _records(changes), "applied": bool(args.apply)})
    elif args.format == "csv":
        write_csv(_records(changes))
    else:
        con = console()
        counts = {k: sum(c.kind == k for c in changes) for k in ("added", "removed", "changed")}
        con.print(f"{term(args.file)} against {term(book.files['holdings'].name)}: "
                  + ", ".join(f"{v} {k}" for k, v in counts.items())
                  + f"; {len(breaks)} break(s), money effect {sum(c.money_effect for c in breaks):+,.2f}")
        con.print(f"Breaks: at the custodian only, in the book only, face differing by more than {FACE_TOLERANCE:g}, "
                  f"clean price by more than {PRICE_TOLERANCE:g} per 100; money effect = change in market value "
                  "if the custodian's figures are taken.", markup=False, highlight=False)
        for c in changes:
            con.print(f"  {c.describe()}", markup=False, highlight=False)
        if any(c.kind == "removed" for c in changes) and not args.remove_missing:
            con.print("Holdings in the book only are kept (breaks to investigate); --remove-missing removes them.")
    applied = args.apply and any(c.kind != "removed" or args.remove_missing for c in changes)
    if applied and not _confirmed(args, why, book.files["holdings"]):
        print("Not applied.", file=sys.stderr)
    elif applied:
        with naming(book.files["holdings"]):
            path, lines = apply_reconciliation(book, merged, changes, Path(args.file).name, args.reason,
                                               args.remove_missing)
        if args.format == "table":
            con.print(f"Updated {path} (previous kept as a version: ladder restore BOOK --list); "
                      f"{lines} journal entries added.")
    elif args.format == "table":
        con.print("Nothing changed." if not args.apply else "Nothing to apply; nothing changed.")
    if args.format == "table":
        print_caution(con)
    return 0
