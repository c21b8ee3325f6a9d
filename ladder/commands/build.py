"""``ladder build``: design a policy-compliant ladder for cash to invest, and explain it.

Exit status 0 when a ladder is built (and written or applied if asked), 1 when no ladder satisfies
the policy, the cash needs and the rungs (the smallest relaxation is printed), 2 on bad input.
"""

from __future__ import annotations

import csv
import io
import sys
from pathlib import Path

from ladder.analysis.build import GENERIC_NOTE, BuildResult, apply_build, build_ladder, save_build, trade_records
from ladder.folder.book_file import load_book
from ladder.book.holdings_file import COLUMNS
from ladder.folder.save import write_atomic
from ladder.build.program import RUNG_BAND
from ladder.commands.common import add_book, writing
from ladder.commands.output import console, fmt, print_caution, term, write_json
from ladder.errors import Problems, naming
from ladder.neutralize import safe_cell

HELP = "design a policy-compliant ladder for cash to invest, at the best yield the policy allows"
STEP_WORDS = {"pct": "1 percentage point", "years": "0.1 years", "days": "30 days",
              "currency": "1,000,000 less need", "buys_pct": "1 point of the buys",
              "face": "1,000,000 more face"}
UNIT_WORDS = {"pct": "percentage points", "years": "years", "days": "days", "currency": "", "buys_pct": "points of the buys"}


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("build", help=HELP, description=HELP + ". Exit status 1 when no ladder fits.")
    add_book(parser, formats=("table", "json"))
    parser.add_argument("--cash", required=True, metavar="AMOUNT", help="cash to invest, currency units")
    parser.add_argument("--rungs", metavar="SPEC",
                        help="rungs: 12x3M, 5x1Y or tenors 3M,6M,1Y,2Y (default: yearly to the policy's maximum)")
    parser.add_argument("--offerings", metavar="FILE",
                        help="securities on offer: holdings columns plus available_face, min_lot, lot_increment "
                             "(default: generic candidates from the curve and spread table)")
    parser.add_argument("--out", metavar="FILE", help="write the proposed trades (the columns `ladder check --trade` reads)")
    parser.add_argument("--apply", action="store_true", help="add the trades to the book's holdings (asks first)")
    parser.add_argument("--yes", action="store_true", help="with --apply: do not ask (for scripts)")
    parser.add_argument("--allow-sales", action="store_true", help="the build may sell holdings too")
    parser.add_argument("--fresh", action="store_true", help="a stand-alone ladder for new money; ignore the holdings")
    parser.add_argument("--rung-band", metavar="LOW,HIGH", default=None,
                        help="each rung's share of what is bought, as multiples of the even share "
                             "(default 0.5,1.5; 0,99 leaves the shares free)")
    parser.set_defaults(run=run)


def trades_csv(result: BuildResult) -> str:
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=list(COLUMNS) + ["action", "funded_from"], lineterminator="\n")
    writer.writeheader()
    writer.writerows({k: safe_cell(v) for k, v in row.items()} for row in trade_records(result.trades))
    return buffer.getvalue()


def parse_band(text: str | None) -> tuple[float, float]:
    """``LOW,HIGH`` multiples of the even share; InputError unless 0 <= LOW <= 1 <= HIGH."""
    if text is None:
        return RUNG_BAND
    problems = Problems()
    try:
        low, high = (float(x) for x in text.split(","))
    except ValueError:
        low = high = None
    if low is None or not (0 <= low <= 1 <= high):
        problems.add("--rung-band", 0, 0, f"{text!r}: write LOW,HIGH with 0 <= LOW <= 1 <= HIGH, e.g. 0.5,1.5")
    problems.raise_if_any()
    return low, high


def _refuse_early(args) -> None:
    problems = Problems()
    if args.apply and args.fresh:
        problems.add("--apply", 0, 0, "a fresh build ignores the book's holdings, so it cannot be added to them; "
                                      "write it with --out and review it first")
    if args.apply and not args.yes and not sys.stdin.isatty():
        problems.add("--apply", 0, 0, "--apply asks for confirmation on a terminal; add --yes to apply from a script")
    if args.out and not Path(args.out).parent.is_dir():
        problems.add(args.out, 0, 0, "the folder for --out does not exist")
    elif args.out and Path(args.out).is_dir():
        problems.add(args.out, 0, 0, "--out names a folder; name the trades file to write, e.g. trades.csv")
    problems.raise_if_any()


def _confirm(result: BuildResult, target) -> bool:
    answer = input(f"Add {len(result.trades)} trade(s) to {target}? The old file is kept as a version. [y/N] ")
    return answer.strip().lower() in ("y", "yes")


def run(args) -> int:
    _refuse_early(args)
    band = parse_band(args.rung_band)
    if args.apply:               # one writer at a time, from reading the book to writing it
        with writing(args.book, f"ladder build --cash {args.cash} --apply"):
            return _run(args, band)
    return _run(args, band)


def _run(args, band) -> int:
    book = load_book(args.book)
    progress = None
    if args.format == "table" and sys.stderr.isatty():
        progress = lambda fraction, text: print(f"\r{100 * fraction:3.0f}% {text:<50}", end="", file=sys.stderr)  # noqa: E731
    result = build_ladder(book, args.cash, rungs=args.rungs, offerings=args.offerings, allow_sales=args.allow_sales,
                          fresh=args.fresh, at=args.at, progress=progress, rung_band=band)
    if progress:
        print("\r" + " " * 56 + "\r", end="", file=sys.stderr)
    if args.format == "json":
        write_json(result.to_json())
    else:
        _print(result)
    if result.status != "built":
        return 1
    if args.apply:
        apply_build(book, result)   # refuses a build that cannot be applied before anything is written
    if args.out:
        with naming(args.out):
            write_atomic(Path(args.out), trades_csv(result))
        if args.format == "table":
            console().print(f"Trades written to {args.out}.")
    if args.apply:
        if args.yes or _confirm(result, book.files["holdings"]):
            with naming(book.files["holdings"]):
                booked = save_build(book, result)
            print(f"Applied {len(result.trades)} trade(s) to {booked.path} (previous file kept as version "
                  f"{booked.version}).", file=sys.stderr if args.format == "json" else sys.stdout)
        else:
            print("Not applied.", file=sys.stderr)
    return 0


def _pct(x) -> str:
    return fmt(None if x is None else 100 * x, 3)


def _print(result: BuildResult) -> None:
    from rich.table import Table

    con = console()
    c = result.candidates
    con.print(f"Ladder build at {result.as_of}: cash {fmt(result.cash, 2)}, rungs {result.rungs.spec} "
              f"({', '.join(result.rungs.labels)}); {len(c)} candidates from {term(c.source)}"
              + (" [bold](generic: ids GENERIC-...)[/]" if c.generic.any() else "")
              + ("; fresh ladder (holdings ignored)" if result.fresh else "")
              + ("; sales allowed" if result.allow_sales else ""))
    for reason, count in c.left_out:
        con.print(f"  left out {count}: {term(reason)}")
    if result.status == "time_limit":
        con.print(f"[bold red]The solver found no ladder within its time limit[/] ({result.solution.seconds:.0f} s) "
                  "and could not prove that none exists; try fewer offerings or wider rungs.")
        print_caution(con)
        return
    if result.status != "built":
        con.print("[bold red]No ladder satisfies every constraint.[/] The smallest relaxation that would admit one "
                  "(the budget and the candidates kept as given):")
        for conflict in result.conflicts:
            con.print(f"  [bold]{term(conflict.group)}[/]: {term(conflict.text)}")
            for label, limit, need in conflict.members:
                unit = UNIT_WORDS.get(conflict.unit, "")
                con.print(f"    {term(label) or 'portfolio'}: limit {fmt(limit, 4)}, relax by {fmt(need, 4)} {unit}".rstrip())
        print_caution(con)
        return
    generic = result.generic_trades
    table = Table(title="Proposed trades" + (" (* generic stand-ins, not offerings)" if generic.any() else ""),
                  header_style="bold")
    for title in ("Action", "Id", "Sector", "Issuer", "Maturity", "Coupon %", "Rating", "Face", "Price"):
        table.add_column(title, justify="right" if title in ("Face", "Price", "Coupon %") else "left")
    for row, stand_in in zip(trade_records(result.trades), generic):
        table.add_row(row["action"], term(row["id"]) + (" *" if stand_in else ""), row["sector"], term(row["issuer"]),
                      row["maturity_date"],
                      row["coupon_pct"], term("/".join(x for x in (row["rating"], row["short_rating"]) if x)),
                      fmt(float(row["face"]), 2), row["book_price"] or row["yield_pct"])
    con.print(table)
    if generic.any():
        con.print(f"[bold]* {GENERIC_NOTE}.[/]")
    con.print(f"Invested {fmt(result.invested, 2)} of {fmt(result.cash, 2)} (within one lot: largest lot "
              f"{fmt(result.largest_lot, 2)}).")
    summary = Table(title="Ladder before and after", header_style="bold")
    summary.add_column("")
    for title in ("Before", "After"):
        summary.add_column(title, justify="right")
    b, a = result.before, result.after
    rows = [("Market value", lambda s: fmt(s.market_value, 0)), ("Yield to worst %", lambda s: _pct(s.yield_to_worst)),
            ("Effective duration", lambda s: fmt(s.effective_duration, 3)),
            ("Effective convexity", lambda s: fmt(s.effective_convexity, 3)), ("WAM days", lambda s: fmt(s.wam_days, 0))]
    rows += [(f"Rung {label} %", (lambda s, i=i: fmt(s.rung_shares[i][1], 2))) for i, (label, _) in
             enumerate(a.rung_shares)]
    for name, get in rows:
        summary.add_row(name, get(b) if b else "—", get(a))
    con.print(summary)
    if result.naive_yield is not None:
        con.print(f"Naive even ladder from the same candidates: yield to worst {_pct(result.naive_yield)}% "
                  f"({'meets' if result.naive_feasible else 'does not meet'} every rule); this build "
                  f"{_pct(a.yield_to_worst)}%.")
    if result.binding:
        bind = Table(title="Binding limits (linear relaxation; approximate)", header_style="bold")
        for title in ("Rule", "Member", "Limit", "Relaxed by", "Income a year", "Yield bp"):
            bind.add_column(title, justify="left" if title in ("Rule", "Member") else "right")
        for item in result.binding[:15]:
            bind.add_row(term(item.group), term(item.label), fmt(item.limit, 4), STEP_WORDS[item.unit],
                         fmt(item.income_per_step, 0), fmt(item.yield_bp_per_step, 3))
        con.print(bind)
    status = result.compliance_status
    con.print(f"Policy check of the book after the trades: [bold]{status}[/]" if status else "No trades.")
    print_caution(con)
