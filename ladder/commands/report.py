"""``ladder report``: the month-end report (html, xlsx or md), recorded in the book's history."""

from __future__ import annotations

from pathlib import Path

from ladder.report.month_end import month_end_report, past_report, record_month_end
from ladder.folder.book_file import load_book
from ladder.commands.common import add_book
from ladder.commands.output import console, print_caution
from ladder.errors import InputError, Problem
from ladder.report.files import FORMATS, write_report
from ladder.report.history import history_path, load_snapshot
from ladder.folder.journal import journal_path

HELP = ("the month-end report: holdings at amortized cost, summary against last month, activity, allocation "
        "against limits, ladder, rate shocks, income, compliance certificate")


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("report", help=HELP, description=HELP)
    add_book(parser, formats=FORMATS + ("all",))
    parser.set_defaults(format="html", run=run)
    parser.add_argument("--out", type=Path, metavar="DIR", help="folder for the report files (default: BOOK/reports)")
    parser.add_argument("--reproduce", action="store_true",
                        help="write the report recorded in the history for --at exactly as it was (computes nothing)")
    parser.add_argument("--no-record", action="store_true", help="do not record this month-end in the history")


def _past(args, folder: Path):
    if args.at is None:
        raise InputError([Problem("--reproduce", 0, 0, "needs --at DATE: the month-end to write again")])
    snapshot = load_snapshot(folder, args.at)
    if snapshot is None:
        raise InputError([Problem(str(history_path(folder)), 0, 0, f"no month-end recorded for {args.at}")])
    return past_report(folder, args.at), snapshot


def _refuse_out(out: Path) -> None:
    """--out must be a folder (or not exist yet): checked before anything is computed or recorded."""
    if out.exists() and not out.is_dir():
        raise InputError([Problem(str(out), 0, 0, "--out names a file; name a folder for the report files")])


def run(args) -> int:
    folder = Path(args.book)
    out = args.out or folder / "reports"
    _refuse_out(out)
    con = console()
    m = None
    if args.reproduce:
        report, snapshot = _past(args, folder)
        con.print(f"Recorded {snapshot.recorded}; inputs: "
                  + ", ".join(f"{name} {sha[:12]}" for name, sha in snapshot.inputs.values()))
    else:
        book = load_book(folder)
        with con.status("Valuing, testing the policy, shocking rates and planning cash for the month-end..."):
            m = month_end_report(book, args.at)
        report = m.report
        rows = report.section("activity").tables[0].column("source")
        journaled = sum(s != "holdings" for s in rows)
        r = m.roll_forward
        con.print(f"Activity: {journaled} entr{'y' if journaled == 1 else 'ies'} from {journal_path(book).name}"
                  f" ({len(r.unexplained_entries)} unexplained), {len(rows) - journaled} purchase(s) taken from "
                  "the holdings")
        tied = abs(r.unexplained) < 0.005 and abs(r.unexplained_market_value) < 0.005
        con.print("Roll-forward from the last month-end: " + ("ties to the cent." if tied else
                  f"does NOT tie: unexplained {r.unexplained:,.2f} of amortized cost, "
                  f"{r.unexplained_market_value:,.2f} of market value (shown in the report)."))
    for fmt in (FORMATS if args.format == "all" else (args.format,)):
        for path in write_report(report, out, fmt, folder.resolve().name):
            con.print(f"Wrote {path}")
    if m is not None and not args.no_record:     # only once every file of the report is written
        con.print(f"Recorded the month-end {report.as_of} in {record_month_end(book, m)}")
    print_caution(con)
    return 0
