"""Which holdings to sell to cover a shortfall: the shortest first, and among equal maturities the
least loss first.

Sales are priced at valuation prices: each holding's clean price on the plan date under the plan's
scenario, plus the interest accrued to the sale date (the pull to par between the plan date and the
sale is not modelled). Loss is amortized cost less that clean price. Face is sold in multiples of
``LOT`` (common practice: notes trade in $1,000 increments), the last sale rounded up, so the
proceeds may exceed the shortfall by less than one lot.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

LOT = 1000.0


@dataclass(frozen=True)
class Sale:
    """One sale: ``row`` into the holdings, face sold, proceeds (clean + accrued) and realized gain
    against amortized cost plus accrued interest, currency units; prices per 100."""

    period: int
    row: int
    face: float
    clean_price: float
    accrued: float
    proceeds: float
    realized_gain: float


def sale_order(maturity: np.ndarray, loss_per_100: np.ndarray) -> np.ndarray:
    """Row order for selling: maturity ascending, then loss per 100 ascending."""
    return np.lexsort((loss_per_100, maturity))


def choose_sales(period: int, need: float, face_left: np.ndarray, maturity: np.ndarray, clean: np.ndarray,
                 accrued: np.ndarray, cost: np.ndarray, sellable: np.ndarray) -> list[Sale]:
    """Sales that raise at least ``need`` (as far as the sellable face allows).

    ``face_left`` (n,): face still held; ``clean``, ``accrued``, ``cost`` (n,) per 100 on the sale
    date; ``sellable`` (n,) bool. Returns the sales in order; raises nothing.
    """
    rows = np.flatnonzero(sellable & (face_left > 0) & (clean + accrued > 0))
    if need <= 0 or not len(rows):
        return []
    order = rows[sale_order(maturity[rows], (cost - clean)[rows])]
    dirty = (clean + accrued)[order] / 100.0
    whole = face_left[order] * dirty
    before = np.concatenate([[0.0], np.cumsum(whole)[:-1]])
    count = min(int(np.searchsorted(before, need, side="left")), len(order))   # positions touched
    face = face_left[order[:count]].copy()
    rest = need - before[count - 1]
    face[-1] = min(face[-1], np.ceil(rest / dirty[count - 1] / LOT) * LOT)
    picked = order[:count]
    return [Sale(period, int(i), float(f), float(clean[i]), float(accrued[i]), float(f * (clean[i] + accrued[i]) / 100),
                 float(f * (clean[i] - cost[i]) / 100)) for i, f in zip(picked, face)]
