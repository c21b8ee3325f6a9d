"""``ladder check``: every policy rule with limit, actual, headroom and status; what-if for trades.

Exit status 0 when nothing breaches (``near`` and ``review`` included), 1 on any breach, 2 on bad
input, so it can run from a scheduler.
"""

from __future__ import annotations

from ladder.analysis.check import check_book, check_trade_file
from ladder.analysis.valuation import Totals
from ladder.folder.book_file import load_book
from ladder.commands.common import add_book
from ladder.commands.output import console, fmt, print_caution, term, write_json

HELP = "check the holdings (or the book after proposed trades) against the investment policy"
STATUS_STYLE = {"pass": "green", "near": "yellow", "review": "magenta", "breach": "bold red"}


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("check", help=HELP, description=HELP + ". Exit status 1 on any breach.")
    add_book(parser, formats=("table", "json"))
    parser.add_argument("--trade", metavar="FILE",
                        help="proposed trades: holdings columns plus action = buy | sell")
    parser.set_defaults(run=run)


def _value(v) -> str:
    return v if isinstance(v, str) else fmt(v, 2) if v is not None else "—"


def _status(s: str) -> str:
    return f"[{STATUS_STYLE.get(s, '')}]{s}[/]"


def run(args) -> int:
    book = load_book(args.book)
    if args.trade:
        what_if = check_trade_file(book, args.trade, args.at)
        status = what_if.status
        if args.format == "json":
            write_json(what_if.to_json())
        else:
            _trade_table(book, what_if)
    else:
        result = check_book(book, args.at).result
        status = result.status
        if args.format == "json":
            write_json(result.to_json())
        else:
            _rules_table(result)
    return 1 if status == "breach" else 0


def _rules_table(result) -> None:
    from rich.table import Table

    con = console()
    table = Table(title=f"Policy check at {result.as_of}: {term(result.policy_title)}", header_style="bold")
    for title, justify in (("Rule", "left"), ("In words", "left"), ("Limit", "right"), ("Actual", "right"),
                           ("Headroom", "right"), ("Status", "left"), ("Holdings", "left")):
        table.add_column(title, justify=justify, overflow="fold")
    for r in result.rules:
        text = f"{r.text}; largest: {r.worst_group}" if r.per else r.text
        table.add_row(term(r.rule), term(text), _value(r.limit), _value(r.actual), _value(r.headroom), _status(r.status),
                      term(", ".join(r.holdings[:6])) + (" …" if len(r.holdings) > 6 else ""))
    con.print(table)
    counts = ", ".join(f"{n} {s}" for s, n in result.counts().items() if n)
    con.print(f"Overall: {_status(result.status)} ({counts}); percentages on {result.basis} value; "
              f"share limits tested {result.testing.replace('_', ' ')} unless a rule says otherwise "
              "(json: each rule's testing).")
    print_caution(con)


def _risk_line(label: str, t: Totals) -> str:
    return (f"{label}: market value {fmt(t.market_value, 0)}  yield to worst {fmt(100 * t.yield_to_worst, 3)}%  "
            f"effective duration {fmt(t.effective_duration, 3)}  convexity {fmt(t.effective_convexity, 3)}  "
            f"DV01 {fmt(t.dv01, 0)}  WAM {fmt(t.wam_days, 0)} days")


def _trade_table(book, what_if) -> None:
    from rich.table import Table

    con = console()
    tc = what_if.check
    _economics_table(con, what_if.settlement)
    table = Table(title=f"What-if for {len(what_if.trades)} proposed trade(s): {term(tc.after.policy_title)}",
                  header_style="bold")
    for title in ("Rule", "Before", "Status before", "After", "Status after", "Caused by"):
        table.add_column(title, overflow="fold")
    for c in tc.changes:
        cause = term(", ".join(f"{t.action} {t.id}" for t in c.caused_by))
        rule = f"{c.rule} (largest: {c.after.worst_group})" if c.after.per else c.rule
        table.add_row(term(rule), _value(c.before.actual), _status(c.before.status), _value(c.after.actual),
                      _status(c.after.status) + (" (new)" if c.new_breach else ""), cause)
    con.print(table)
    con.print(_risk_line("Before", what_if.before.totals))
    con.print(_risk_line("After ", what_if.after.totals))
    for t in what_if.settlement.shortfalls:
        con.print(f"Rule cash_account: {_status('breach')} {term(t.action)} {term(t.id)} costs {fmt(-t.amount, 2)} but "
                  f"{term(t.account)} holds {fmt(t.cash_before, 2)}: short by {fmt(t.shortfall, 2)}.")
    con.print(f"Overall after the trades: {_status(what_if.status)} (before: {tc.before.status}).")
    print_caution(con)


def _money(value, digits: int = 2) -> str:
    return "—" if value != value else fmt(value, digits)      # NaN: not applicable


def _economics_table(con, settlement) -> None:
    """Each trade as it settles: price, yield, accrued, cost or proceeds, realized gain, cash."""
    from rich.table import Table

    table = Table(title="Trades as they settle (cash account " + term(settlement.account or "none: new money") + ")",
                  header_style="bold")
    for title in ("Trade", "Settles", "Face", "Price", "Yield %", "Accrued", "Cost (-) / proceeds (+)",
                  "Realized gain", "Paid from / to", "Cash before", "Cash after"):
        table.add_column(title, justify="left" if title in ("Trade", "Settles", "Paid from / to") else "right")
    for t in settlement.trades:
        table.add_row(term(f"{t.action} {t.id}"), str(t.settle_date), fmt(t.face, 0), fmt(t.price, 4),
                      fmt(100 * t.ytm, 3), fmt(t.accrued, 2), fmt(t.amount, 2), _money(t.realized_gain),
                      term(t.account), _money(t.cash_before), _money(t.cash_after))
    con.print(table)
