"""Valuation of every holding of a book at a settlement date, and the portfolio totals.

Prices: a holding's own quote where it has one (its z-spread or option-adjusted spread is then solved
from it); else the curve plus the book's spread table. Callables are valued with the Hull-White tree
(``ladder.pricing.callable``) at their option-adjusted spread. Effective duration and convexity come
from the quoted par yields shifted by +/- ``EFFECTIVE_SHIFT_BP`` and the curve rebuilt, spreads held.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, field, fields, replace

import numpy as np

from ladder.analysis.amortized import amortized_cost, original_cost
from ladder.folder.book_file import Book
from ladder.book.holdings import QUOTE_NONE, Holdings
from ladder.errors import NothingToValue, Problems
from ladder.market.dates import days_between
from ladder.pricing.callable import (CallableBonds, HullWhiteParams, bullet_prices, callable_prices,
                                     option_adjusted_spreads, workout_yields)
from ladder.pricing.callable_terms import CallTerms, call_terms
from ladder.pricing.cashflows import cash_flows
from ladder.pricing.curve import Curve, bootstrap
from ladder.pricing.pricer import Pricer, from_settle
from ladder.pricing.quotes import Measures, cf_rows, dirty_from_quote, measures_from_dirty
from ladder.pricing.spreads import dirty_at_spread, settle_discount, table_spreads_bp, z_spreads

EFFECTIVE_SHIFT_BP = 25.0
# A fund or sweep balance is available the next business day: one day for WAM and liquidity
# (common practice; SEC Rule 2a-7 treats such balances as daily liquid assets).
FUND_DAYS = 1.0


@dataclass(frozen=True, eq=False)
class Totals:
    """Portfolio totals. Yields: market-value-weighted semiannual bond-equivalent, the portfolio's yield
    being its yield to worst (``Valuation.yield_to_worst``); durations years."""

    count: int
    face: float
    market_value: float
    book_value: float                # amortized cost (effective-interest method)
    cost: float                      # original cost
    unrealized_gain: float
    accrued: float
    yield_to_worst: float
    book_yield: float
    modified_duration: float
    effective_duration: float
    convexity: float
    effective_convexity: float
    dv01: float
    wam_days: float


@dataclass(frozen=True, eq=False)
class Valuation:
    """Every holding's price, yield and risk at ``as_of`` (arrays aligned with ``holdings``)."""

    as_of: dt.date
    holdings: Holdings
    curve: Curve
    pricer: Pricer
    clean: np.ndarray
    accrued: np.ndarray
    dirty: np.ndarray
    market_value: np.ndarray
    measures: Measures
    dv01: np.ndarray
    book_value: np.ndarray           # amortized cost, currency (ladder.analysis.amortized)
    cost: np.ndarray                 # original cost: book price x face / 100, currency
    unrealized_gain: np.ndarray      # market value - accrued - amortized cost
    book_yield: np.ndarray
    spread: np.ndarray
    effective_duration: np.ndarray
    effective_convexity: np.ndarray
    days_to_maturity: np.ndarray
    priced_from: np.ndarray          # "quote" | "curve"
    option_value: np.ndarray         # per 100, callables only (NaN otherwise)
    yield_to_worst: np.ndarray       # every holding: to worst for callables, else to maturity (see worst_yields)
    yield_to_first_call: np.ndarray
    totals: Totals = field(init=False)

    def __post_init__(self) -> None:
        object.__setattr__(self, "totals", _totals(self))

    def subtotal(self, rows) -> Totals:
        """Totals of the holdings at positions ``rows`` (e.g. a filtered list), by the same rules."""
        return _totals(self, np.asarray(rows, dtype=np.int64))


def _weighted(values, weights) -> float:
    ok = np.isfinite(values) & np.isfinite(weights)
    total = weights[ok].sum()
    return float((values[ok] * weights[ok]).sum() / total) if total else float("nan")


def _totals(v: Valuation, rows: np.ndarray | None = None) -> Totals:
    """Totals over every holding, or over the positions ``rows``."""
    r = np.arange(len(v.holdings)) if rows is None else rows
    mv, face, m = v.market_value[r], v.holdings.face[r], v.measures
    return Totals(
        count=len(r), face=float(face.sum()), market_value=float(mv.sum()),
        book_value=float(np.nansum(v.book_value[r])), cost=float(np.nansum(v.cost[r])),
        unrealized_gain=float(np.nansum(v.unrealized_gain[r])),
        accrued=float((v.accrued[r] * face / 100).sum()),
        yield_to_worst=_weighted(v.yield_to_worst[r], mv),
        book_yield=_weighted(v.book_yield[r], np.nan_to_num(v.book_value[r])),
        modified_duration=_weighted(m.modified[r], mv), effective_duration=_weighted(v.effective_duration[r], mv),
        convexity=_weighted(m.convexity[r], mv), effective_convexity=_weighted(v.effective_convexity[r], mv),
        dv01=float(v.dv01[r].sum()), wam_days=_weighted(v.days_to_maturity[r], mv),
    )


def settlement_date(book: Book, at: dt.date | None) -> dt.date:
    """The settlement date: ``at`` or the book's valuation date; refuses dates before the curve's."""
    settle = at or book.valuation_date
    problems = Problems()
    if settle < book.valuation_date:
        problems.add("--at", 0, 0, f"{settle} is before the book's valuation date {book.valuation_date}; "
                                   "the curve and prices are as of that date")
    matured = (book.holdings.maturity <= np.datetime64(settle)) & (book.holdings.kind != "fund")
    for row, hid, mat in zip(book.holdings.row[matured], book.holdings.id[matured], book.holdings.maturity[matured]):
        problems.add(str(book.files["holdings"]), int(row), 0,
                     f"holding {hid} matures on {mat}, on or before the settlement date {settle}")
    problems.raise_if_any()
    return settle


def _book_yields(h: Holdings) -> np.ndarray:
    """Yield at purchase (bond-equivalent) from ``book_price`` on ``purchase_date``; NaN if not given."""
    rows = np.flatnonzero(~np.isnan(h.book_price) & ~np.isnat(h.purchase_date))
    out = np.where(h.kind == "fund", h.quote, np.nan)
    if len(rows):
        sub = h.take(rows)
        cf = cash_flows(sub, sub.purchase_date)
        dirty = sub.book_price + cf.accrued
        out[rows] = measures_from_dirty(sub, cf, dirty).bey
    return out


def _spread_problems(book: Book, rows: np.ndarray) -> None:
    problems = Problems()
    h = book.holdings
    for i in rows:
        problems.add(str(book.files["holdings"]), int(h.row[i]), 0,
                     f"holding {h.id[i]} has no quote and book.toml [spreads] has no spread for sector "
                     f"{h.sector[i]!r} and rating {h.rating[i] or h.short_rating[i] or 'unrated'!r}; "
                     "add a quote or a spread (or a 'default' for the sector)")
    problems.raise_if_any()


def value_book(book: Book, at: dt.date | None = None) -> Valuation:
    """Value every holding of ``book`` at ``at`` (default: the valuation date); ``NothingToValue``
    for a book without holdings (every figure would be empty)."""
    settle = settlement_date(book, at)
    h = book.holdings
    if not len(h):
        raise NothingToValue(book.files["holdings"])
    curve = bootstrap(book.curve, np.datetime64(book.valuation_date))
    cf = cash_flows(h, np.datetime64(settle))
    discount = settle_discount(curve, cf)
    quoted = h.quote_type != QUOTE_NONE
    table_bp = table_spreads_bp(h, book.spreads, settle)
    missing = np.flatnonzero(~quoted & np.isnan(table_bp) & (h.kind != "fund"))
    if len(missing):
        _spread_problems(book, missing)
    dirty = dirty_from_quote(h, cf)
    spread = np.where(quoted, z_spreads(cf, discount, np.where(quoted, dirty, 100.0)), table_bp / 1e4)
    spread = np.where(h.kind == "fund", 0.0, spread)
    dirty = np.where(quoted, dirty, dirty_at_spread(cf, discount, spread))
    params = HullWhiteParams(book.model.mean_reversion, book.model.volatility)
    calls, option_value, ytw, ytfc = _callables(book, cf, curve, quoted, dirty, spread, params)
    pricer = Pricer(h, cf, spread, calls, params)
    if calls is not None:
        rows = pricer.callable_rows
        dirty = dirty.copy()
        dirty[rows] = np.where(quoted[rows], dirty[rows], pricer.dirty(curve)[rows])
    shocked = pricer.dirty(curve.shifted_many(np.array([[-EFFECTIVE_SHIFT_BP], [EFFECTIVE_SHIFT_BP]])
                                              * np.ones(len(book.curve))))
    base = pricer.dirty(curve)
    d = EFFECTIVE_SHIFT_BP / 1e4
    with np.errstate(invalid="ignore", divide="ignore"):
        eff_dur = (shocked[0] - shocked[1]) / (2 * base * d)
        eff_cx = (shocked[0] + shocked[1] - 2 * base) / (base * d * d)
    measures = measures_from_dirty(h, cf, dirty)
    clean = dirty - cf.accrued
    face = h.face / 100.0
    book_value = amortized_cost(h, settle)
    return Valuation(
        as_of=settle, holdings=h, curve=curve, pricer=pricer, clean=clean, accrued=cf.accrued, dirty=dirty,
        market_value=dirty * face, measures=measures, dv01=measures.modified * dirty * face * 1e-4,
        book_value=book_value, cost=original_cost(h), unrealized_gain=clean * face - book_value, book_yield=_book_yields(h),
        spread=spread, effective_duration=eff_dur, effective_convexity=eff_cx,
        days_to_maturity=np.where(h.kind == "fund", FUND_DAYS, days_between(np.datetime64(settle), h.maturity)),
        priced_from=np.where(quoted | (h.kind == "fund"), "quote", "curve").astype(object),
        option_value=option_value, yield_to_worst=worst_yields(h, measures, ytw), yield_to_first_call=ytfc)


def worst_yields(h: Holdings, measures: Measures, callable_ytw: np.ndarray) -> np.ndarray:
    """The yield every portfolio figure uses (decimal, bond-equivalent): yield to worst for a callable
    (the lowest of the yields to each call date and to maturity), yield to maturity for the rest (a
    fund: its stated yield). Common practice for a portfolio of callables: the yield to worst is the
    yield an investor can count on."""
    return np.where(h.callable & np.isfinite(callable_ytw), callable_ytw, measures.bey)


def _callables(book, cf, curve, quoted, dirty, spread, params):
    """Call terms, and OAS (written into ``spread``), option value and workout yields of callables."""
    h = book.holdings
    n = len(h)
    option_value, ytw, ytfc = np.full(n, np.nan), np.full(n, np.nan), np.full(n, np.nan)
    rows = np.flatnonzero(h.callable)
    if not len(rows):
        return None, option_value, ytw, ytfc
    sub = h.take(rows)
    sub_cf = cf_rows(cf, rows)
    terms = call_terms(sub, sub_cf, str(book.files["holdings"]))
    problems = terms.bonds.problems(params.dt)
    problems.extend(params.problems(list(sub.id), str(book.files.get("book", "book.toml"))))
    problems.raise_if_any()
    discount = from_settle(curve, cf.settle[0])
    q = quoted[rows]
    oas = spread[rows].copy()
    if q.any():
        oas[q] = option_adjusted_spreads(_subset(terms, np.flatnonzero(q)), discount, dirty[rows][q], params)
    spread[rows] = oas
    price = callable_prices(terms.bonds, discount, oas, params)
    bullet = bullet_prices(terms.bonds, discount, oas)
    option_value[rows] = bullet - price
    worked = workout_yields(np.where(q, dirty[rows], price), sub.frequency, sub_cf.periods, sub_cf.amount,
                            sub_cf.mask, terms.periods, terms.prices, terms.accrued, terms.mask)
    ytw[rows], ytfc[rows] = worked.to_worst, worked.to_first_call
    return terms, option_value, ytw, ytfc


def _subset(terms: CallTerms, index) -> CallableBonds:
    b = terms.bonds
    return replace(b, **{f.name: getattr(b, f.name)[index] for f in fields(b)
                         if isinstance(getattr(b, f.name), np.ndarray)})
