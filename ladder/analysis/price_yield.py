"""One holding's price against its yield, beside the duration and duration-plus-convexity estimates.

Prices per 100, dirty: the exact curve is the holding repriced at each yield on its own yield basis by
``ladder.pricing.quotes.dirty_from_quote`` (the street formula of ``ladder.pricing.yield_math`` for
coupon bonds, the money-market formulas for single payments); the estimates are the second-order
Taylor expansion about the holding's yield y0 and price P0, with its modified duration D and
convexity C from the valuation:
    duration line          P0 (1 - D dy)
    duration + convexity   P0 (1 - D dy + C dy^2 / 2)
so the gap between the exact curve and the estimates is the estimation error.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from ladder.book.holdings import QUOTE_YIELD
from ladder.pricing.quotes import cf_rows, dirty_from_quote

CHART_SPAN_BP = 300.0
CHART_POINTS = 61


@dataclass(frozen=True, eq=False)
class PriceYield:
    """Yields (decimal) and dirty prices per 100 along them; ``y0``, ``p0`` the holding's own."""

    yields: np.ndarray
    exact: np.ndarray
    duration: np.ndarray
    convexity: np.ndarray
    y0: float
    p0: float


def price_yield(v, i: int, span_bp: float = CHART_SPAN_BP, points: int = CHART_POINTS) -> PriceYield | None:
    """Exact price and its duration and duration-plus-convexity estimates over y0 +/- ``span_bp``."""
    h = v.holdings
    y0, p0 = float(v.measures.ytm[i]), float(v.dirty[i])
    d, c = float(v.measures.modified[i]), float(v.measures.convexity[i])
    if h.kind[i] == "fund" or not (np.isfinite(y0) and np.isfinite(p0) and np.isfinite(d) and np.isfinite(c)):
        return None
    dy = np.linspace(-span_bp, span_bp, points) / 1e4
    yields = y0 + dy
    rows = np.full(points, i)
    grid = h.take(rows)
    grid = replace(grid, quote_type=np.full(points, QUOTE_YIELD, dtype=object), quote=yields)
    exact = dirty_from_quote(grid, cf_rows(v.pricer.cash_flows, rows))
    return PriceYield(yields, exact, p0 * (1 - d * dy), p0 * (1 - d * dy + 0.5 * c * dy * dy), y0, p0)
