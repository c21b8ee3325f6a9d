"""Reading and validating ``holdings.csv`` / ``holdings.xlsx`` into ``Holdings``.

Every problem in the file is collected (``file:row:column: message``) before anything is returned;
a file with any problem gives no holdings at all. The column contract is in docs/formats.md.
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import numpy as np

from ladder.book.cells import MAX_FACE, RATE_RANGE_PCT, CellReader
from ladder.book.holdings import (DAY_COUNTS, FREQUENCIES, KIND_DAY_COUNT, KINDS, SECTOR_DEFAULTS, SECTORS,
                                  Holdings, make_holdings)
from ladder.book.table_file import Table, check_columns, read_table
from ladder.errors import Problems
from ladder.market.ratings import explain_long, explain_short, tokens

REQUIRED = ("id", "sector", "issuer", "face", "maturity_date")
OPTIONAL = ("kind", "coupon_pct", "frequency", "day_count", "issue_date", "first_coupon_date",
            "rating", "short_rating", "rating_at_purchase", "price", "yield_pct", "discount_rate_pct",
            "book_price", "purchase_date", "first_call_date", "call_frequency", "call_price", "negotiable",
            "price_date")
COLUMNS = REQUIRED + OPTIONAL
QUOTE_COLUMNS = {"price": "price", "yield_pct": "yield", "discount_rate_pct": "discount"}
CALL_FREQUENCIES = (0,) + FREQUENCIES
# A coupon below this many percent is taken for a decimal written by mistake (4.25% written 0.0425).
FRACTION_LOOKING_COUPON_PCT = 0.1


def read_holdings(path: Path, valuation_date: dt.date, problems: Problems, label: str | None = None,
                  extra_columns: tuple[str, ...] = (), cash_account: str = "",
                  ) -> tuple[Holdings | None, dict[str, list[str]]]:
    """Holdings in ``path`` (CSV or .xlsx), checked against ``valuation_date``. The ``cash_account``
    holding (a fund whose face is the book's cash balance) may hold 0 or be overdrawn (negative face).

    Returns (holdings, extras), extras holding the raw text of ``extra_columns`` by row; holdings is
    None if the file has any problem (all of them are in ``problems``).
    """
    before = len(problems.items)
    table = read_table(path, problems, label)
    if table is None:
        return None, {}
    check_columns(table, COLUMNS + extra_columns, REQUIRED, problems)
    if len(problems.items) > before:
        return None, {}
    columns = _parse_rows(table, valuation_date, problems, cash_account)
    extras = {name: [table.cell(i, name) for i in range(len(table.rows))] for name in extra_columns}
    if len(problems.items) > before:
        return None, extras
    return make_holdings(**columns), extras


def _parse_rows(table: Table, valuation: dt.date, problems: Problems, cash_account: str = "") -> dict[str, list]:
    cells = CellReader(table.path, problems)
    col = table.column
    out: dict[str, list] = {name: [] for name in (
        "id", "sector", "issuer", "kind", "face", "maturity", "coupon", "frequency", "day_count",
        "issue_date", "first_coupon", "rating", "short_rating", "rating_at_purchase", "quote_type",
        "quote", "book_price", "purchase_date", "first_call", "call_frequency", "call_price", "negotiable", "price_date",
        "row")}
    first_row_of: dict[str, int] = {}
    for index in range(len(table.rows)):
        row = index + 2
        text = {name: table.cell(index, name) for name in COLUMNS}
        at = {name: col.get(name, 0) for name in COLUMNS}
        record = _parse_row(cells, text, at, row, valuation, bool(cash_account) and text["id"] == cash_account)
        hid = text["id"]
        if not hid:
            cells.error(row, at["id"], "id is empty; every holding needs a unique id")
        elif hid in first_row_of:
            cells.error(row, at["id"], f"duplicate id {hid!r} (first on row {first_row_of[hid]})")
        else:
            first_row_of[hid] = row
        for name, value in record.items():
            out[name].append(value)
    return out


def _parse_row(cells: CellReader, text: dict, at: dict, row: int, valuation: dt.date, balance: bool = False) -> dict:
    sector = cells.choice(text["sector"], row, at["sector"], "sector", SECTORS)
    if not text["sector"]:
        cells.error(row, at["sector"], f"sector is empty; one of {', '.join(SECTORS)}")
    kind = cells.choice(text["kind"], row, at["kind"], "kind", KINDS) or (
        SECTOR_DEFAULTS[sector][0] if sector else "fixed")
    if not text["issuer"]:
        cells.error(row, at["issuer"], "issuer is empty; issuer limits need the issuer's name")
    face = cells.number(text["face"], row, at["face"], "face", low=-MAX_FACE if balance else 0.0, high=MAX_FACE,
                        what=f"the par amount must be positive and at most {MAX_FACE:,.0f}")
    if not text["face"]:
        cells.error(row, at["face"], "face is empty; give the par amount held")
    elif face == 0 and not balance:
        cells.error(row, at["face"], "face is 0; the par amount must be positive")
    maturity = cells.date(text["maturity_date"], row, at["maturity_date"], "maturity_date")
    if not text["maturity_date"]:
        cells.error(row, at["maturity_date"], "maturity_date is empty")
    elif maturity and maturity <= valuation:
        cells.error(row, at["maturity_date"],
                    f"maturity_date {maturity} is not after the valuation date {valuation}; remove matured holdings")
    coupon = _coupon(cells, text, at, row, kind)
    frequency = _frequency(cells, text, at, row, kind)
    day_count = cells.choice(text["day_count"], row, at["day_count"], "day_count", DAY_COUNTS)
    default_dc = KIND_DAY_COUNT.get(kind, SECTOR_DEFAULTS[sector][1] if sector else "30/360")
    if day_count and kind == "discount" and day_count != "ACT/360":
        cells.error(row, at["day_count"], f"a discount holding is quoted on ACT/360, not {day_count}")
    if day_count == "ACT/ACT" and kind in ("at_maturity", "fund"):
        cells.error(row, at["day_count"], "ACT/ACT (ICMA) needs coupon periods; use ACT/ACT-ISDA, ACT/365F or ACT/360")
    issue = cells.date(text["issue_date"], row, at["issue_date"], "issue_date")
    first = cells.date(text["first_coupon_date"], row, at["first_coupon_date"], "first_coupon_date")
    _check_schedule(cells, at, row, kind, issue, first, maturity)
    ratings = {}
    for name, explain in (("rating", explain_long), ("short_rating", explain_short),
                          ("rating_at_purchase", _explain_either)):
        if text[name] and (why := explain(text[name])):
            cells.error(row, at[name], why)
        ratings[name] = text[name]
    quote_type, quote = _quote(cells, text, at, row, kind)
    book_price = cells.number(text["book_price"], row, at["book_price"], "book_price", low=1.0, high=200.0,
                              what="a clean price per 100 face, e.g. 99.875")
    purchase = cells.date(text["purchase_date"], row, at["purchase_date"], "purchase_date")
    if purchase and purchase > valuation:
        cells.error(row, at["purchase_date"], f"purchase_date {purchase} is after the valuation date {valuation}")
    if purchase and maturity and purchase >= maturity:
        cells.error(row, at["purchase_date"], "purchase_date must be before maturity_date")
    if book_price is not None and not purchase:
        cells.error(row, at["purchase_date"] or at["book_price"], "book_price needs a purchase_date")
    first_call, call_frequency, call_price = _call(cells, text, at, row, kind, maturity)
    negotiable = _negotiable(cells, text["negotiable"], row, at["negotiable"])
    price_date = cells.date(text["price_date"], row, at["price_date"], "price_date")
    if price_date and price_date > valuation:
        cells.error(row, at["price_date"], f"price_date {price_date} is after the valuation date {valuation}")
    return dict(
        id=text["id"], sector=sector or "", issuer=text["issuer"], kind=kind, face=face if face or (balance and face is not None) else np.nan,
        maturity=maturity, coupon=coupon, frequency=frequency, day_count=day_count or default_dc,
        issue_date=issue, first_coupon=first, quote_type=quote_type, quote=quote,
        book_price=np.nan if book_price is None else book_price, purchase_date=purchase,
        first_call=first_call, call_frequency=call_frequency, call_price=call_price, negotiable=negotiable,
        price_date=price_date, row=row, **ratings)


NEGOTIABLE_WORDS = {"true": True, "false": False}


def _negotiable(cells: CellReader, text: str, row: int, column: int) -> bool | None:
    """``true``/``false`` (any case); None when empty (the sector's default)."""
    if not text:
        return None
    value = NEGOTIABLE_WORDS.get(text.strip().casefold())
    if value is None:
        cells.error(row, column, f"negotiable {text!r} is not true or false; leave it empty for the sector's "
                                 "default (CDs and deposits are held to maturity, everything else can be sold)")
    return value


def _explain_either(text: str) -> str | None:
    """``rating_at_purchase`` may hold long- and short-term symbols together ("AA-/A-1+")."""
    unknown = [t for t in tokens(text) if explain_long(t) and explain_short(t)]
    return explain_long(unknown[0]) if unknown else None


def _coupon(cells, text, at, row, kind) -> float:
    pct = cells.number(text["coupon_pct"], row, at["coupon_pct"], "coupon_pct", low=0.0, high=25.0,
                       what="an annual rate in percent from 0 to 25")
    if kind in ("fixed", "at_maturity") and not text["coupon_pct"]:
        cells.error(row, at["coupon_pct"] or 0, f"coupon_pct is needed for a {kind} holding")
    if pct is not None and 0 < pct < FRACTION_LOOKING_COUPON_PCT:
        cells.error(row, at["coupon_pct"], f"coupon_pct {text['coupon_pct']} looks like a fraction; "
                    f"write percent, e.g. {pct * 100:g} for {pct * 100:g}%")
    if pct and kind in ("zero", "discount", "fund"):
        cells.error(row, at["coupon_pct"], f"a {kind} holding has no coupon; leave coupon_pct empty")
    return (pct or 0.0) / 100.0


def _frequency(cells, text, at, row, kind) -> int:
    value = cells.number(text["frequency"], row, at["frequency"], "frequency")
    if value is None:
        return 2 if kind in ("fixed", "zero") else 0
    if value not in FREQUENCIES:
        cells.error(row, at["frequency"], f"frequency {text['frequency']} is not one of 1, 2, 4, 12 (coupons a year)")
        return 2
    return int(value)


def _check_schedule(cells, at, row, kind, issue, first, maturity) -> None:
    if kind == "at_maturity" and not issue:
        cells.error(row, at["issue_date"] or 0, "issue_date is needed for an at_maturity holding (interest runs from it)")
    if issue and maturity and issue >= maturity:
        cells.error(row, at["issue_date"], "issue_date must be before maturity_date")
    if first and kind != "fixed":
        cells.error(row, at["first_coupon_date"], f"a {kind} holding has no coupons; leave first_coupon_date empty")
    if first and maturity and first > maturity:
        cells.error(row, at["first_coupon_date"], "first_coupon_date is after maturity_date")
    if first and issue and first <= issue:
        cells.error(row, at["first_coupon_date"], "first_coupon_date must be after issue_date")
    if first and not issue:
        cells.error(row, at["issue_date"] or at["first_coupon_date"],
                    "an odd first coupon needs the issue_date its period starts from")


def _quote(cells, text, at, row, kind) -> tuple[str, float]:
    given = [name for name in QUOTE_COLUMNS if text[name]]
    if len(given) > 1:
        cells.error(row, at[given[1]], f"two quotes on one row ({' and '.join(given)}); give at most one")
        return "", np.nan
    if kind == "fund" and given != ["yield_pct"]:
        cells.error(row, at["yield_pct"] or 0, "a fund needs its stated yield in yield_pct (its price is always 1.00)")
        return "", np.nan
    if not given:
        return "", np.nan
    name = given[0]
    if name == "discount_rate_pct" and kind != "discount":
        cells.error(row, at[name], f"discount_rate_pct is for discount holdings only, not {kind}")
        return "", np.nan
    if name == "price":
        value = cells.number(text[name], row, at[name], "price", low=1.0, high=200.0,
                             what="a clean price per 100 face, e.g. 99.875")
        return ("price", value) if value is not None else ("", np.nan)
    low, high = RATE_RANGE_PCT
    value = cells.number(text[name], row, at[name], name, low=low, high=high,
                         what=f"a rate in percent from {low:g} to {high:g}")
    return (QUOTE_COLUMNS[name], value / 100.0) if value is not None else ("", np.nan)


def _call(cells, text, at, row, kind, maturity):
    first_call = cells.date(text["first_call_date"], row, at["first_call_date"], "first_call_date")
    freq = cells.number(text["call_frequency"], row, at["call_frequency"], "call_frequency")
    price = cells.number(text["call_price"], row, at["call_price"], "call_price", low=0.0, high=200.0,
                         what="a price per 100 face")
    if price == 0:
        cells.error(row, at["call_price"], "call_price is 0; a call is at a price per 100 face, usually 100")
    if not first_call:
        for name in ("call_frequency", "call_price"):
            if text[name]:
                cells.error(row, at[name], f"{name} given without first_call_date")
        return None, -1, 100.0
    if kind != "fixed":
        cells.error(row, at["first_call_date"], f"only fixed-coupon holdings may be callable, not {kind}")
    if maturity and first_call >= maturity:
        cells.error(row, at["first_call_date"], f"first_call_date {first_call} is not before maturity_date {maturity}")
    if freq is None:
        cells.error(row, at["call_frequency"] or at["first_call_date"],
                    "call_frequency is needed with first_call_date (0 = once, else 1, 2, 4 or 12 a year)")
        freq = 0
    elif freq not in CALL_FREQUENCIES:
        cells.error(row, at["call_frequency"], f"call_frequency {text['call_frequency']} is not one of 0, 1, 2, 4, 12")
        freq = 0
    return first_call, int(freq), 100.0 if price is None else price
