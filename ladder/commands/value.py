"""``ladder value``: every holding's price, yield, accrued interest, duration and convexity, and totals."""

from __future__ import annotations

from ladder.analysis.records import holding_records, totals_record, valuation_document
from ladder.analysis.valuation import value_book
from ladder.folder.book_file import load_book
from ladder.commands.common import add_book
from ladder.commands.output import console, emit, fmt, print_caution, term

WIDE_TABLE = 190   # characters the full table needs; narrower terminals get the essential columns
NARROW_COLUMNS = ("id", "maturity_date", "face", "clean_price", "yield_to_worst_pct", "effective_duration")
HELP = "value every holding at a settlement date: prices, yields, duration, convexity, DV01, totals"


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("value", help=HELP, description=HELP)
    add_book(parser)
    parser.set_defaults(run=run)


def run(args) -> int:
    book = load_book(args.book)
    valuation = value_book(book, args.at)
    emit(args.format, lambda: _with_cash(book, valuation_document(valuation)), lambda: holding_records(valuation),
         lambda: _table(book, valuation))
    return 0


def _with_cash(book, document: dict) -> dict:
    """The document with ``totals.cash``: the cash account's balance (null when the book names none)."""
    from ladder.analysis.settlement import cash_balance

    cash = cash_balance(book)
    document["totals"]["cash"] = None if cash != cash else round(cash, 2)
    return document


def _table(book, valuation) -> None:
    from rich.table import Table

    con = console()
    from rich import box

    table = Table(title=f"{term(book.name)}: valuation at {valuation.as_of}", header_style="bold", box=box.SIMPLE_HEAD,
                  pad_edge=False)
    columns = [("id", "Id", None), ("sector", "Sector", None), ("maturity_date", "Maturity", None),
               ("coupon_pct", "Cpn %", 3), ("face", "Face", 0), ("clean_price", "Clean", 4),
               ("accrued", "Accrued", 4), ("market_value", "Market value", 0),
               ("yield_to_worst_pct", "Yld worst %", 3),
               ("modified_duration", "Mod dur", 3), ("effective_duration", "Eff dur", 3),
               ("convexity", "Convexity", 3), ("dv01", "DV01", 0), ("spread_bp", "Spread bp", 1),
               ("unrealized_gain", "Unrealized", 0)]
    if con.width < WIDE_TABLE:
        columns = [c for c in columns if c[0] in NARROW_COLUMNS]
    for key, title, digits in columns:
        table.add_column(title, justify="left" if digits is None else "right", no_wrap=True)
    for record in holding_records(valuation):
        marks = ("*" if record["callable"] else "") + ("~" if record["priced_from"] == "curve" else "")
        table.add_row(*[term(str(record[key]) + (marks if key == "id" else "")) if digits is None
                        else fmt(record[key], digits) for key, _, digits in columns])
    con.print(table)
    t = totals_record(valuation)
    con.print(
        f"[bold]Totals[/bold]  holdings {t['count']}  face {fmt(t['face'], 0)}  market value {fmt(t['market_value'], 0)}"
        f"  cost {fmt(t['cost'], 0)}  book value (amortized cost) {fmt(t['book_value'], 0)}"
        f"  unrealized {fmt(t['unrealized_gain'], 0)}\n"
        f"yield to worst (s.a. bond-equivalent, MV-weighted) {fmt(t['yield_to_worst_pct'], 3)}%  modified duration "
        f"{fmt(t['modified_duration'], 3)}  effective duration {fmt(t['effective_duration'], 3)}  convexity "
        f"{fmt(t['convexity'], 3)}  effective convexity {fmt(t['effective_convexity'], 3)}  DV01 {fmt(t['dv01'], 0)}"
        f"  WAM {fmt(t['wam_days'], 0)} days")
    con.print("* callable: valued with the Hull-White tree at its option-adjusted spread (spread bp is the OAS);\n"
              "  its yield is to worst (the lowest of the yields to each call and to maturity), others to maturity.\n"
              "~ no quote: priced from the curve plus the book's spread table.")
    print_caution(con)
