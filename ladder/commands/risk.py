"""``ladder risk``: income and liquidity at risk over simulated rate paths and uncertain cash needs:
the spread of 12-month income and horizon value, the chance of a forced sale and its loss, for every
reinvestment rule, and a fan of cash against needs by month."""

from __future__ import annotations

import argparse

from ladder.analysis.risk import (
    DEFAULT_PATHS, DEFAULT_SEED, NEEDS_CORRELATION, RISK_MONTHS, SHORTFALL_CHANCE, RiskOptions, fan_records,
    risk_book, risk_document, risk_records, rule_record,
)
from ladder.commands.common import add_book
from ladder.commands.output import console, emit, fmt, print_caution, print_whole, term
from ladder.folder.book_file import REINVEST_RULES, load_book

HELP = "income and liquidity at risk over simulated rate paths and uncertain cash needs, every reinvestment rule"
BAR = 24                                   # characters of the fan chart's bar


def _fraction(text: str) -> float:
    try:
        return float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number") from None


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("risk", help=HELP, description=HELP)
    add_book(parser)
    parser.add_argument("--paths", type=int, default=DEFAULT_PATHS, metavar="N",
                        help=f"simulated rate paths, 100 to 1,000,000 (default {DEFAULT_PATHS:,})")
    parser.add_argument("--seed", type=int, default=DEFAULT_SEED, metavar="S",
                        help=f"seed of the random numbers (default {DEFAULT_SEED})")
    parser.add_argument("--months", type=int, default=RISK_MONTHS, metavar="M",
                        help=f"horizon in months, within the cash-needs forecast (default {RISK_MONTHS})")
    parser.add_argument("--needs-correlation", type=_fraction, default=NEEDS_CORRELATION, metavar="RHO",
                        help=f"month-to-month correlation of the needs' surprises (default {NEEDS_CORRELATION})")
    parser.add_argument("--reinvest", choices=REINVEST_RULES, action="append",
                        help="a reinvestment rule to run (repeat for several; default: every rule)")
    parser.add_argument("--fan", choices=REINVEST_RULES, metavar="RULE",
                        help="the rule whose cash fan is drawn (default: book.toml's rule)")
    parser.add_argument("--dask", choices=("threads", "processes", "synchronous"), metavar="SCHEDULER",
                        help="run the chunks of paths on a dask scheduler (needs the 'scale' extra)")
    parser.set_defaults(run=run)


def run(args) -> int:
    book = load_book(args.book)
    options = RiskOptions(paths=args.paths, seed=args.seed, months=args.months,
                          needs_correlation=args.needs_correlation,
                          rules=tuple(args.reinvest) if args.reinvest else None)
    from ladder.commands.plan import _with_progress

    run_on = None
    if args.dask:
        from ladder.analysis.risk_dask import dask_runner

        run_on = dask_runner(args.dask)
    result = _with_progress(lambda progress: risk_book(book, args.at, options, progress=progress, run=run_on),
                            "income and liquidity at risk: paths")
    emit(args.format, lambda: risk_document(result), lambda: risk_records(result),
         lambda: _table(book, result, args.fan))
    return 0


def _table(book, result, fan_rule) -> None:
    from rich.table import Table

    con = console()
    o = result.options
    con.print(f"[bold]{term(result.book_name)}[/bold]: {o.paths:,} Hull-White rate paths (mean reversion "
              f"{result.model.a:g} a year, volatility {result.model.sigma * 1e4:g} bp a year; seed {o.seed}) over "
              f"{o.months} months from {result.as_of}; needs' month-to-month correlation {o.needs_correlation:g}")
    table = Table(title=f"Interest income over {result.income_months} months (accrual), horizon value and forced sales",
                  header_style="bold")
    for title in ("Rule", "Income mean", "Income 5th pct", "Income 95th pct", "Income at risk", "Forced sale chance",
                  "Loss mean", "Loss 95th pct", "Value mean", "Value 5th pct", "Value 95th pct", "First risky month"):
        table.add_column(title, justify="left" if title == "Rule" else "right")
    for r in result.rules:
        x = rule_record(result, r)
        inc, loss, hv = x["income_12m"], x["realized_loss"], x["horizon_value"]
        table.add_row(x["rule"], fmt(inc["mean"], 0), fmt(inc["p05"], 0), fmt(inc["p95"], 0), fmt(inc["at_risk"], 0),
                      f"{100 * x['forced_sale_probability']:.1f} %", fmt(loss["mean"], 0), fmt(loss["p95"], 0),
                      fmt(hv["mean"], 0), fmt(hv["p05"], 0), fmt(hv["p95"], 0), x["first_risky_month"] or "none")
    print_whole(con, table)
    con.print(f"Income at risk = mean less the 5th percentile. First risky month: the first month end where the chance "
              f"of cash falling short of the needs (before any sale) exceeds {100 * SHORTFALL_CHANCE:g} %.")
    chosen = next((r for r in result.rules if r.rule == (fan_rule or book.reinvest.rule)), result.rules[0])
    _fan(con, result, chosen)
    for note in result.notes:
        con.print(f"[dim]Note: {note}[/dim]")
    print_caution(con)


def _fan(con, result, rule) -> None:
    """Cash before sales by month end: the 5-95 band as a bar, the middle half darker, the median a bar."""
    from rich.table import Table

    records = fan_records(result, rule)
    low = min(min(r["cash_p05"] for r in records), 0.0)
    high = max(max(r["cash_p95"] for r in records), 0.0)
    width = (high - low) or 1.0
    at = lambda v: min(BAR - 1, max(0, int((v - low) / width * BAR)))  # noqa: E731
    table = Table(title=f"Cash after the month's needs, before any sale ({rule.rule}): 5th to 95th percentile "
                        f"(░), middle half (▒), median (█), zero (|)", header_style="bold")
    for title in ("Month end", "Needs (mean)", "Cash 5th pct", "Cash median", "Cash 95th pct", "Fan", "Shortfall chance"):
        table.add_column(title, justify="left" if title in ("Month end", "Fan") else "right")
    for r in records:
        bar = [" "] * BAR
        for i in range(at(r["cash_p05"]), at(r["cash_p95"]) + 1):
            bar[i] = "░"
        for i in range(at(r["cash_p25"]), at(r["cash_p75"]) + 1):
            bar[i] = "▒"
        bar[at(r["cash_p50"])] = "█"
        if bar[at(0.0)] == " ":
            bar[at(0.0)] = "|"
        style = "bold red" if r["shortfall_chance"] > SHORTFALL_CHANCE else None
        table.add_row(r["period_end"], fmt(r["needs_mean"], 0), fmt(r["cash_p05"], 0), fmt(r["cash_p50"], 0),
                      fmt(r["cash_p95"], 0), "".join(bar), f"{100 * r['shortfall_chance']:.1f} %", style=style)
    print_whole(con, table)
