"""Which positions to sell when cash falls short: the least realized loss per unit of cash raised
first, and among equal losses the shortest.

A shortfall's sales restore the cash buffer (the cash the plan keeps), not just zero. Candidates are
the holdings that can be sold before maturity (``Holdings.negotiable``: bank CDs and term deposits
cannot unless the holdings file says so) and the plan's own earlier purchases, still running after
the sale date. Each is priced at the sale date from its remaining flows on the scenario's curve at
its held spread (``ladder.plan.prices``, the pull to par); its realized gain is that clean price less
its clean amortized cost on the date (``ladder.pricing.amortization``; 100 for the plan's purchases,
bought at par). Face is sold in multiples of ``LOT`` (common practice: notes trade in $1,000
increments), the last sale rounded up, so the proceeds may exceed what is needed by less than a lot.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

LOT = 1000.0


@dataclass(frozen=True)
class Sale:
    """One sale at the end of ``period``: the position's ``id`` and ``maturity``, face sold, prices per
    100, proceeds (clean + accrued) and realized gain against amortized cost, currency units;
    ``position``: its index among the candidates the projection offered."""

    period: int
    position: int
    id: str
    maturity: np.datetime64
    face: float
    clean_price: float
    accrued: float
    proceeds: float
    realized_gain: float


def sale_order(maturity: np.ndarray, loss_per_cash: np.ndarray) -> np.ndarray:
    """Position order for selling: loss per unit of cash raised ascending, then maturity ascending."""
    return np.lexsort((maturity, loss_per_cash))


def choose_sales(period: int, need: float, face_left: np.ndarray, ids: np.ndarray, maturity: np.ndarray,
                 clean: np.ndarray, accrued: np.ndarray, cost: np.ndarray, sellable: np.ndarray) -> list[Sale]:
    """Sales that raise at least ``need`` (as far as the sellable face allows).

    Per candidate position (m,): ``face_left``, ``ids``, ``maturity``; ``clean``, ``accrued``, ``cost``
    per 100 on the sale date; ``sellable`` bool. Returns the sales in order; raises nothing.
    """
    dirty_all = clean + accrued
    rows = np.flatnonzero(sellable & (face_left > 0) & (dirty_all > 0))
    if need <= 0 or not len(rows):
        return []
    order = rows[sale_order(maturity[rows], (cost - clean)[rows] / dirty_all[rows])]
    dirty = dirty_all[order] / 100.0
    whole = face_left[order] * dirty
    before = np.concatenate([[0.0], np.cumsum(whole)[:-1]])
    count = min(int(np.searchsorted(before, need, side="left")), len(order))   # positions touched
    face = face_left[order[:count]].copy()
    rest = need - before[count - 1]
    face[-1] = min(face[-1], np.ceil(rest / dirty[count - 1] / LOT) * LOT)
    return [Sale(period, int(i), str(ids[i]), maturity[i], float(f), float(clean[i]), float(accrued[i]),
                 float(f * (clean[i] + accrued[i]) / 100), float(f * (clean[i] - cost[i]) / 100))
            for i, f in zip(order[:count], face)]
