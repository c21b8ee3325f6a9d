"""``ladder shock``: every holding revalued exactly under rate scenarios, beside the estimates."""

from __future__ import annotations

import re
from pathlib import Path

from ladder.analysis.shock import shock_book, shock_document, shock_rows, shock_scenarios, spread_duration_records
from ladder.folder.book_file import load_book
from ladder.commands.common import add_book
from ladder.commands.output import console, emit, fmt, print_caution, print_whole, term
from ladder.errors import InputError, Problems
from ladder.risk.scenarios import parse_bp_list

HELP = ("revalue every holding under parallel and non-parallel rate scenarios and spread moves, beside the "
        "duration and duration-plus-convexity estimates")
DESCRIPTION = (
    HELP + ". A shift moves the quoted par yields and the curve is rebuilt; spreads are held unless the scenario "
    "moves them. By default: parallel moves of -300 to +300 bp, steepener, flattener, short-end and long-end "
    "moves, a twist, the credit set (non-government spreads +50, +100, +200 bp, more for lower ratings) and "
    "the book's scenarios.csv. --bp and --scenarios run exactly the scenarios they name instead.")


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("shock", help=HELP, description=DESCRIPTION)
    add_book(parser)
    parser.add_argument("--bp", metavar="LIST",
                        help="parallel shifts in basis points, comma-separated: --bp=-300,-100,0,100,300")
    parser.add_argument("--scenarios", metavar="FILE", type=Path,
                        help="a scenario file (scenario,tenor,shift_bp[,sector,bucket]) to run")
    # argparse takes "-300,-100" for an option unless it looks like a negative number: let a list
    # starting with a negative shift follow --bp after a space too.
    parser._negative_number_matcher = re.compile(r"^-\d[\d.,\s+-]*$")
    parser.set_defaults(run=run)


def _inputs(args):
    """The book and the chosen parallel shifts; the problems of both are refused together."""
    problems = Problems()
    book = shifts = None
    if args.bp is not None:
        try:
            shifts = parse_bp_list(args.bp)
        except InputError as error:
            problems.extend(error)
    try:
        book = load_book(args.book)
    except InputError as error:
        problems.extend(error)
    problems.raise_if_any()
    return book, shifts


def run(args) -> int:
    book, shifts = _inputs(args)
    result = shock_book(book, args.at, shock_scenarios(book, shifts, args.scenarios))
    emit(args.format, lambda: shock_document(result), lambda: shock_rows(result), lambda: _tables(result))
    return 0


def _tables(r) -> None:
    from rich.table import Table

    con = console()

    def show(t: Table) -> None:
        print_whole(con, t)

    con.print(f"[bold]{term(r.book_name)}[/bold]: rate shocks at {r.as_of}   base value {fmt(r.base_value, 0)}   "
              f"effective duration {fmt(r.effective_duration, 3)}   effective convexity {fmt(r.effective_convexity, 3)}")
    krd = r.portfolio_key_rate_durations
    t = Table(title="Key-rate durations (years, market-value weighted)", header_style="bold")
    labels, values = r.tenors + ("Sum", "Effective"), [*krd, krd.sum(), r.effective_duration]
    if con.width >= 9 * len(labels) + 4:
        for label in labels:
            t.add_column(label, justify="right")
        t.add_row(*[fmt(x, 3) for x in values])
    else:
        t.add_column("Tenor")
        t.add_column("Years", justify="right")
        for label, x in zip(labels, values):
            t.add_row(label, fmt(x, 3))
    show(t)

    p = r.portfolio
    t = Table(title="Portfolio under each scenario: exact full revaluation beside the estimates", header_style="bold")
    for title in ("Scenario", "Shift bp", "Value", "Change", "Change %", "Est. duration", "Error",
                  "Est. dur + conv", "Error"):
        t.add_column(title, justify="left" if title == "Scenario" else "right", no_wrap=True)
    for s, (scenario, bp) in enumerate(zip(r.scenarios, r.parallel_bp)):
        shift = fmt(bp, 0) if bp is not None else f"({fmt(r.equivalent_shift[s] * 1e4, 0)})"
        t.add_row(term(scenario.name), shift, fmt(p.value[0, s], 0), fmt(p.change[0, s], 0),
                  fmt(100 * p.relative_change[0, s], 3), fmt(p.est_duration[0, s], 0), fmt(p.error_duration[0, s], 0),
                  fmt(p.est_duration_convexity[0, s], 0), fmt(p.error_duration_convexity[0, s], 0))
    show(t)
    for title, totals in (("maturity rung", r.by_rung), ("sector", r.by_sector)):
        t = Table(title=f"Change in value by {title} (exact); column heads show the base value", header_style="bold")
        t.add_column("Scenario", no_wrap=True)
        for group, base in zip(totals.groups, totals.base):
            t.add_column(f"{term(group)}\n{fmt(base, 0)}", justify="right", no_wrap=True)
        for s, scenario in enumerate(r.scenarios):
            t.add_row(term(scenario.name), *[fmt(x, 0) for x in totals.change[:, s]])
        show(t)
    _credit_tables(r, con, show)
    con.print("Estimates: parallel moves use the effective duration and convexity; other moves use the key-rate "
              "durations and the convexity on the exposure-weighted shift (in brackets). Error = estimate minus exact.")
    con.print("Spread moves add the spread duration and spread convexity terms; a holding's own spread (z-spread, "
              "or OAS for a callable) is moved, the curve held.")
    print_caution(con)


def _credit_tables(r, con, show) -> None:
    """Spread duration by holding and the scenarios that move spreads."""
    from rich.table import Table

    con.print(f"Spread duration {fmt(r.portfolio_spread_duration, 3)}   spread convexity "
              f"{fmt(r.portfolio_spread_convexity, 3)}   (years, market-value weighted)")
    t = Table(title="Spread duration by holding (own spread moved +/- 1 bp, curve held)", header_style="bold")
    for title in ("Holding", "Sector", "Bucket", "Spread bp", "Spread dur.", "Spread conv.", "Value"):
        t.add_column(title, justify="left" if title in ("Holding", "Sector", "Bucket") else "right", no_wrap=True)
    for x in spread_duration_records(r):
        t.add_row(x["id"], x["sector"], x["bucket"], fmt(x["spread_bp"], 1), fmt(x["spread_duration"], 3),
                  fmt(x["spread_convexity"], 3), fmt(x["base_value"], 0))
    show(t)
    moving = [s for s, scenario in enumerate(r.scenarios) if scenario.spread_moves]
    if not moving:
        return
    p = r.portfolio
    t = Table(title="Scenarios that move spreads: exact full revaluation beside the estimates", header_style="bold")
    for title in ("Scenario", "Spread bp", "Value", "Change", "Change %", "Est. duration", "Error",
                  "Est. dur + conv", "Error"):
        t.add_column(title, justify="left" if title == "Scenario" else "right", no_wrap=True)
    for s in moving:
        t.add_row(r.scenarios[s].name, f"({fmt(r.equivalent_spread_shift[s] * 1e4, 0)})", fmt(p.value[0, s], 0),
                  fmt(p.change[0, s], 0), fmt(100 * p.relative_change[0, s], 3), fmt(p.est_duration[0, s], 0),
                  fmt(p.error_duration[0, s], 0), fmt(p.est_duration_convexity[0, s], 0),
                  fmt(p.error_duration_convexity[0, s], 0))
    show(t)
    con.print("Spread bp in brackets: the scenario's spread moves weighted by each holding's market value times "
              "spread duration.")
