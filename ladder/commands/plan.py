"""``ladder plan``: the cash plan: cash by period, reinvestment, the first shortfall and the sales that
would cover it, and the next 12 months' income and total return under every rate scenario."""

from __future__ import annotations

import argparse

from ladder.analysis.plan import (
    PLAN_MONTHS, PlanOptions, compare_records, compare_rules, crossing_records, income_records, period_records, plan_book, plan_document,
    sale_records,
)
from ladder.folder.book_file import REINVEST_RULES, load_book
from ladder.commands.common import add_book
from ladder.commands.output import console, emit, fmt, print_caution, print_whole, term
from ladder.plan.periods import STEPS
from ladder.plan.rates import RULES

HELP = "project cash by period: maturities, calls, needs, reinvestment, shortfalls and 12-month income at risk"


def _bp(text: str) -> float:
    try:
        return float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number of basis points") from None


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("plan", help=HELP, description=HELP)
    add_book(parser)
    parser.add_argument("--months", type=int, default=PLAN_MONTHS, metavar="N",
                        help=f"horizon in months (default {PLAN_MONTHS})")
    parser.add_argument("--period", choices=STEPS, default="month", help="period length (default: month)")
    scenario = parser.add_mutually_exclusive_group()
    scenario.add_argument("--scenario", metavar="NAME",
                          help="a scenario by name: base, '+100 bp', a standard or a scenarios.csv name")
    scenario.add_argument("--bp", type=_bp, metavar="X", help="a parallel move of every par yield, basis points")
    parser.add_argument("--reinvest", choices=REINVEST_RULES, help="reinvestment rule (default: book.toml)")
    parser.add_argument("--tenor", metavar="TENOR", help="tenor bought by the target_tenor rule, e.g. 6M or 2Y")
    parser.add_argument("--sector", metavar="SECTOR", help="sector bought when reinvesting (default: treasury)")
    parser.add_argument("--buffer", type=float, metavar="AMOUNT", help="minimum cash kept before reinvesting")
    parser.add_argument("--compare", action="store_true",
                        help="every reinvestment rule side by side under the base case and every scenario")
    parser.add_argument("--rates", choices=RULES, default="stay",
                        help="the curve after today: stays as it is (default) or follows today's forwards")
    parser.set_defaults(run=run)


def run(args) -> int:
    book = load_book(args.book)
    options = PlanOptions(months=args.months, period=args.period, rule=args.reinvest, tenor=args.tenor,
                          sector=args.sector, buffer=args.buffer, rates=args.rates)
    if args.compare:
        outcomes = _with_progress(lambda progress: compare_rules(book, args.at, options=options, progress=progress),
                                  "rules side by side: scenarios")
        records = compare_records(outcomes)
        emit(args.format, lambda: {"as_of": str(args.at or book.valuation_date), "compare": records},
             lambda: records, lambda: _compare_table(book, records))
        return 0
    plan = _with_progress(lambda progress: plan_book(book, args.at, scenario=args.scenario, bp=args.bp,
                                                      options=options, progress=progress))
    emit(args.format, lambda: plan_document(plan), lambda: period_records(plan), lambda: _table(plan))
    return 0


def _with_progress(work, what: str = "income at risk: scenarios"):
    """Run ``work(progress)`` with a transient progress bar on stderr (scenarios done)."""
    from rich.console import Console
    from rich.progress import Progress

    with Progress(console=Console(stderr=True), transient=True) as bar:
        task = bar.add_task(what, total=None)
        return work(lambda done, total: bar.update(task, completed=done, total=total))


def _compare_table(book, records) -> None:
    from rich.table import Table

    con = console()
    table = Table(title=f"{book.name}: reinvestment rules side by side (accrual income; forced sales are "
                        "proceeds of sales to cover shortfalls)", header_style="bold")
    columns = [("scenario", "Scenario", None), ("rule", "Rule", None), ("income_12m", "Income 12m", 0),
               ("income_24m", "Income 24m", 0), ("income_24m_vs_longest_rung", "vs longest_rung", 0),
               ("forced_sales", "Forced sales", 0), ("realized_gain", "Realized gain", 0),
               ("policy_crossings", "Policy crossings", None)]
    for _, title, digits in columns:
        table.add_column(title, justify="left" if title in ("Scenario", "Rule") else "right")
    previous = None
    for r in records:
        table.add_row(*[("" if k == "scenario" and r[k] == previous else str(r[k])) if d is None else fmt(r[k], d, "")
                        for k, _, d in columns], end_section=False)
        previous = r["scenario"]
    print_whole(con, table)
    print_caution(con)


def _value(x) -> str:
    return fmt(x, 2) if isinstance(x, float) else str(x)


def _table(plan) -> None:
    from rich.table import Table

    con = console()
    r = plan.reinvestment
    buy = "stays in the fund" if r.rule == "fund" else f"{r.tenor} {r.sector} at {r.spread_bp:+.1f} bp ({r.rule})"
    if r.rule == "match_needs":
        buy = (f"{r.sector} at {r.spread_bp:+.1f} bp placed to mature by the needs the ladder does not cover, "
               f"the rest at {r.tenor} (match_needs)")
    con.print(f"[bold]{term(plan.book_name)}[/bold]: cash plan from {plan.as_of}, scenario {term(plan.scenario)}, "
              f"{len(plan.periods)} {plan.options.period}s; maturing money {buy}; cash buffer {fmt(r.buffer, 0)}; "
              f"rates {'stay as they are' if plan.options.rates == 'stay' else 'follow today' + chr(39) + 's forwards'}")
    table = Table(header_style="bold", show_lines=False)
    columns = [("start", "From", None), ("end", "To", None), ("opening_cash", "Opening", 0),
               ("fund_income", "Fund inc", 0), ("coupons", "Coupons", 0), ("principal", "Principal", 0),
               ("needs", "Needs", 0), ("sales", "Sales", 0), ("reinvested", "Reinvested", 0),
               ("closing_cash", "Closing", 0), ("shortfall", "Shortfall", 0), ("reinvest_yield_pct", "Buy yld %", 3),
               ("income", "Income", 0)]
    for _, title, digits in columns:
        table.add_column(title, justify="left" if digits is None else "right")
    for record in period_records(plan):
        style = "bold red" if record["shortfall"] else ("yellow" if record["tight"] else None)
        table.add_row(*[str(record[k]) if d is None else fmt(record[k], d, "") for k, _, d in columns], style=style)
    print_whole(con, table)
    first = plan.first_shortfall
    pr = plan.projection
    t = pr.tightest
    if pr.net_flow[t] < 0:
        con.print(f"[bold]Tight period: {pr.periods.start[t]} to {pr.periods.end[t]}[/bold]: needs exceed what comes "
                  f"in by {fmt(-pr.net_flow[t], 0)}; cash before any sale {fmt(pr.available[t], 0)}.")
    short = [x for x in period_records(plan) if x["needs_status"] != "covered"]
    if short:
        con.print("Needs not covered by cash and maturities: " + "; ".join(
            f"{x['end'][:7]} {x['needs_status']}" for x in short))
    if first is None:
        con.print("No shortfall: cash and maturities meet every need without a sale.")
    else:
        con.print(f"[bold red]First shortfall: {pr.periods.start[first]} to {pr.periods.end[first]}: "
                  f"{fmt(pr.shortfall[first], 0)} short without a sale.[/bold red] Sell (least loss per unit of cash raised first, then the shortest):")
        sales = Table(header_style="bold")
        for title in ("Id", "Maturity", "Face", "Clean", "Proceeds", "Realized gain"):
            sales.add_column(title, justify="left" if title in ("Id", "Maturity") else "right")
        for s in sale_records(plan, first):
            sales.add_row(term(s["id"]), s["maturity_date"], fmt(s["face"], 0), fmt(s["clean_price"], 4),
                          fmt(s["proceeds"], 0), fmt(s["realized_gain"], 0))
        print_whole(con, sales)
        if pr.unfunded[first] > 0:
            con.print(f"[bold red]{fmt(pr.unfunded[first], 0)} cannot be covered even by selling everything.[/bold red]")
        later = int((pr.shortfall > 0).sum()) - 1
        if later:
            con.print(f"{later} later period(s) also need sales (shortfall column).")
    crossings = crossing_records(plan.crossings)
    if crossings:
        con.print(f"[bold red]The projected book crosses {len(crossings)} policy limit(s)[/bold red] "
                  "(checked at each period's end by the same rules as 'ladder check'):")
        cross = Table(header_style="bold")
        for title in ("Period end", "Rule", "Group", "Actual", "Limit", "Status"):
            cross.add_column(title, justify="right" if title in ("Actual", "Limit") else "left")
        for c in crossings:
            cross.add_row(c["period_end"], c["rule"], term(c["group"]), _value(c["actual"]), _value(c["limit"]), c["status"])
        print_whole(con, cross)
    else:
        con.print("The projected book stays within every policy limit at every period's end.")
    if plan.calls:
        con.print("Expected calls: " + "; ".join(f"{term(c.id)} on {c.date} at {c.price:g}" for c in plan.calls))
    income = Table(title="Next 12 months: interest income (accrual) and total return", header_style="bold")
    for title in ("Scenario", "Income", "vs base", "Price change", "Total return", "Return %"):
        income.add_column(title, justify="left" if title == "Scenario" else "right")
    for x in income_records(plan):
        income.add_row(term(x["scenario"]), fmt(x["income_12m"], 0), fmt(x["income_change"], 0),
                       fmt(x["price_change_12m"], 0), fmt(x["total_return_12m"], 0), fmt(x["total_return_12m_pct"], 3))
    print_whole(con, income)
    for note in plan.notes:
        con.print(f"[dim]Note: {note}[/dim]")
    print_caution(con)
