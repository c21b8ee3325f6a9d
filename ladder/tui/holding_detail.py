"""One holding's detail for the screen, taken from a Valuation: its terms, cash-flow schedule,
price against yield (``ladder.analysis.price_yield``), and for callables the call schedule and
option-adjusted figures, as text. No Textual here; no figures computed here.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.analysis.price_yield import PriceYield, price_yield
from ladder.tui import format as fmt


@dataclass(frozen=True, eq=False)
class CashFlowRows:
    """The holding's future flows: dates, pay dates, per 100 face, and money for its face."""

    dates: np.ndarray
    pay_dates: np.ndarray
    coupon: np.ndarray
    principal: np.ndarray
    amount: np.ndarray
    money: np.ndarray


@dataclass(frozen=True, eq=False)
class Detail:
    row: int
    id: str
    terms: tuple[tuple[str, str], ...]
    figures: tuple[tuple[str, str], ...]
    flows: CashFlowRows
    price_yield: PriceYield | None
    calls: tuple[tuple[str, str], ...]      # (call date, clean call price) for callables
    call_figures: tuple[tuple[str, str], ...]


def cash_flow_rows(v, i: int) -> CashFlowRows:
    cf = v.pricer.cash_flows
    keep = cf.mask[i]
    face = float(v.holdings.face[i])
    return CashFlowRows(cf.dates[i][keep], cf.pay_dates[i][keep], cf.coupon[i][keep], cf.principal[i][keep],
                        cf.amount[i][keep], cf.amount[i][keep] * face / 100.0)


def _calls(v, i: int):
    calls = v.pricer.calls
    if calls is None or not v.holdings.callable[i]:
        return (), ()
    j = int(np.flatnonzero(v.pricer.callable_rows == i)[0])
    keep = calls.mask[j]
    schedule = tuple((str(d), fmt.number(p, 3)) for d, p in zip(calls.dates[j][keep], calls.prices[j][keep]))
    figures = (
        ("Option-adjusted spread", f"{fmt.bp(v.spread[i])} bp"),
        ("Option value (per 100)", fmt.number(v.option_value[i], 4)),
        ("Yield to first call", f"{fmt.percent(v.yield_to_first_call[i])}%"),
        ("Yield to worst", f"{fmt.percent(v.yield_to_worst[i])}%"),
        ("Effective duration", fmt.number(v.effective_duration[i], 3)),
        ("Effective convexity", fmt.number(v.effective_convexity[i], 3)),
    )
    return schedule, figures


def detail(v, i: int) -> Detail:
    """Everything the detail panel shows for holding ``i`` of valuation ``v``."""
    h, m = v.holdings, v.measures
    rating = " / ".join(r for r in (h.rating[i], h.short_rating[i]) if r) or fmt.NA_TEXT
    terms = (
        ("Id", str(h.id[i])), ("Issuer", str(h.issuer[i])), ("Sector", str(h.sector[i])), ("Kind", str(h.kind[i])),
        ("Face", fmt.money(h.face[i])), ("Maturity", str(h.maturity[i])), ("Coupon", f"{fmt.percent(h.coupon[i])}%"),
        ("Coupons a year", str(int(h.frequency[i]))), ("Day count", str(h.day_count[i])),
        ("Issue date", fmt.texts(h.issue_date[i:i + 1])[0]), ("Rating", rating),
        ("Rating at purchase", str(h.rating_at_purchase[i]) or fmt.NA_TEXT),
        ("Book price", fmt.number(h.book_price[i], 4)), ("Purchase date", fmt.texts(h.purchase_date[i:i + 1])[0]),
        ("Priced from", str(v.priced_from[i])),
    )
    spread_name = "Option-adjusted spread" if h.callable[i] else "Spread (z)"
    figures = (
        ("Clean price", fmt.number(v.clean[i], 4)), ("Accrued (per 100)", fmt.number(v.accrued[i], 4)),
        ("Dirty price", fmt.number(v.dirty[i], 4)), ("Market value", fmt.money(v.market_value[i], 2)),
        ("Yield", f"{fmt.percent(m.ytm[i])}%"), ("Bond-equivalent yield", f"{fmt.percent(m.bey[i])}%"),
        ("Book yield", f"{fmt.percent(v.book_yield[i])}%"), ("Macaulay duration", fmt.number(m.macaulay[i], 3)),
        ("Modified duration", fmt.number(m.modified[i], 3)), ("Convexity", fmt.number(m.convexity[i], 3)),
        ("DV01", fmt.money(v.dv01[i], 2)), (spread_name, f"{fmt.bp(v.spread[i])} bp"),
        ("Cost", fmt.money(v.cost[i], 2)), ("Book value (amortized cost)", fmt.money(v.book_value[i], 2)),
        ("Unrealized gain", fmt.money(v.unrealized_gain[i], 2)), ("Days to maturity", str(int(v.days_to_maturity[i]))),
    )
    schedule, call_figures = _calls(v, i)
    return Detail(i, str(h.id[i]), terms, figures, cash_flow_rows(v, i), price_yield(v, i), schedule, call_figures)
