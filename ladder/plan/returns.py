"""Horizon values and total return of a plan.

Horizon value: the holdings still held on the horizon date priced on the curve the scenario sees
that day (``ladder.plan.rates``) at each holding's spread from the valuation (z-spread, or the
option-adjusted spread on the Hull-White tree for a callable), the plan's purchases priced the same
way at their own spread, plus the cash. Dirty values, currency units.

Total return over the horizon: the Modified Dietz method (P. O. Dietz, "Pension Funds: Measuring
Investment Performance", 1966; the usual approximation of a time-weighted return in the GIPS
standards; from memory): with start value V0, end value V1 and external flows F_i into the
portfolio on dates d_i (the cash needs, as outflows),
  gain = V1 - V0 - sum F_i,   return = gain / (V0 + sum w_i F_i),   w_i = days(d_i, end) / days(start, end).
The gain is interest income plus price change: the price change is the gain less the income.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.book.holdings import Holdings
from ladder.market.dates import days_between, to_days
from ladder.plan.rates import RatePath
from ladder.pricing.callable import HullWhiteParams, callable_prices
from ladder.pricing.callable_terms import call_terms
from ladder.pricing.cashflows import CashFlows, cash_flows
from ladder.pricing.quotes import cf_rows


def holdings_value(h: Holdings, face: np.ndarray, end_date: np.ndarray, spread: np.ndarray, path: RatePath,
                   at, params: HullWhiteParams, source: str = "holdings.csv", flows: CashFlows | None = None) -> float:
    """Dirty value on ``at`` of ``face`` (n,) of each holding still running then (``end_date`` after
    ``at``), at ``spread`` (n,) decimal; callables on the tree fitted to the curve seen on ``at``.
    ``flows``: the cash-flow matrix of every holding of ``h`` settled on ``at``, if already built."""
    at = np.datetime64(at, "D")
    rows = np.flatnonzero((face > 0) & (to_days(end_date) > at) & (h.kind != "fund"))
    if not len(rows):
        return 0.0
    sub = h.take(rows)
    cf = cash_flows(sub, at) if flows is None else cf_rows(flows, rows)
    df = path.discount(at, np.where(cf.mask, cf.years, 0.0)) * np.exp(-spread[rows, None] * cf.years)
    dirty = np.where(cf.mask, cf.amount * df, 0.0).sum(axis=1)
    tree = np.flatnonzero(sub.callable)
    if len(tree):
        terms = call_terms(sub.take(tree), cf_rows(cf, tree), source)
        dirty[tree] = callable_prices(terms.bonds, lambda t: path.discount(at, t), spread[rows][tree], params)
    return float((dirty * face[rows] / 100.0).sum())


@dataclass(frozen=True)
class HorizonReturn:
    """Total return over the horizon, currency units and percent (Modified Dietz)."""

    start_value: float
    end_value: float
    net_outflows: float
    gain: float
    income: float
    price_change: float
    return_pct: float


def modified_dietz(start_value: float, end_value: float, start, end, flow_dates, flows_in, income: float) -> HorizonReturn:
    """Total return from ``start`` to ``end`` with external ``flows_in`` (+ into the portfolio) on
    ``flow_dates``; ``income`` is the part of the gain earned as interest (see the module docstring)."""
    start, end = np.datetime64(start, "D"), np.datetime64(end, "D")
    dates, flows = to_days(flow_dates), np.asarray(flows_in, dtype=np.float64)
    inside = (dates > start) & (dates <= end)
    dates, flows = dates[inside], flows[inside]
    weight = days_between(dates, end) / days_between(start, end)
    gain = end_value - start_value - flows.sum()
    base = start_value + (weight * flows).sum()
    return HorizonReturn(start_value, end_value, float(-flows.sum()), float(gain), float(income),
                         float(gain - income), float(100.0 * gain / base) if base > 0 else float("nan"))
