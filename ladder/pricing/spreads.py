"""Spreads over the government curve: the book's spread table, z-spreads, and pricing at a spread.

Convention: the z-spread z is a continuously compounded ACT/365F spread added to the curve's zero
rate, so a flow t years after settlement is discounted by DF(t_curve) / DF(t_settle) * exp(-z t).
Spreads are held constant under every rate scenario.
"""

from __future__ import annotations

import numpy as np

from ladder.book.holdings import Holdings
from ladder.market.ratings import long_notches, long_symbol, short_notches, short_symbol
from ladder.pricing.cashflows import CashFlows


def rating_buckets(holdings: Holdings) -> tuple[np.ndarray, np.ndarray]:
    """(long, short) spread-table buckets of each holding: the letter grade without notches
    ("AA+" and "Aa1" -> "AA") and the S&P-style short symbol ("P-1" and "F1" -> "A-1"); "" if unrated."""
    def letter(symbol: str) -> str:
        return "" if symbol == "unrated" else symbol.rstrip("+-")
    long_ = np.array([letter(long_symbol(n)) for n in long_notches(holdings.rating)], dtype=object)
    short = np.array(["" if (s := short_symbol(n)) == "unrated" else s for n in short_notches(holdings.short_rating)],
                     dtype=object)
    return long_, short


def table_spreads_bp(holdings: Holdings, spreads: dict[str, dict[str, float]]) -> np.ndarray:
    """Spread of each holding from the book's table (sector -> bucket -> bp): its long-term bucket,
    else its short-term bucket, else the sector's ``default``; NaN where none applies."""
    long_, short = rating_buckets(holdings)
    out = np.full(len(holdings), np.nan)
    for i, sector in enumerate(holdings.sector):
        table = spreads.get(sector, {})
        for key in (long_[i], short[i], "default"):
            if key and key in table:
                out[i] = table[key]
                break
    return out


def settle_discount(curve, cf: CashFlows) -> np.ndarray:
    """Discount factor of each flow from its holding's settlement date, curve-only: (n, k)."""
    t_settle = curve.years(cf.settle)
    t_flows = np.where(cf.mask, t_settle[:, None] + cf.years, t_settle[:, None])
    return curve.discount(t_flows) / curve.discount(t_settle)[:, None]


def dirty_at_spread(cf: CashFlows, discount: np.ndarray, z) -> np.ndarray:
    """Dirty price per 100 of each holding from flow discount factors (n, k) and z-spreads (n,).

    ``discount`` may carry leading scenario axes: (..., n, k) gives (..., n)."""
    z = np.asarray(z, dtype=np.float64)[..., None]
    return np.sum(np.where(cf.mask, cf.amount * discount * np.exp(-z * cf.years), 0.0), axis=-1)


def z_spreads(cf: CashFlows, discount: np.ndarray, dirty, tol: float = 1e-13, max_iter: int = 60) -> np.ndarray:
    """z-spread (decimal) of each holding that reprices it to ``dirty``; vectorized Newton.

    Price is convex and decreasing in z, so Newton from below converges monotonically; NaN where the
    holding has no rate sensitivity (a fund) or no spread reprices it.
    """
    dirty = np.asarray(dirty, dtype=np.float64)
    pv = np.where(cf.mask, cf.amount * discount, 0.0)
    sensitive = (np.where(cf.mask, cf.years, 0.0) > 0).any(axis=1)
    z = np.zeros(len(dirty))
    for _ in range(max_iter):
        grow = np.exp(-z[:, None] * cf.years)
        price = (pv * grow).sum(axis=1)
        slope = -(pv * cf.years * grow).sum(axis=1)
        step = np.where(slope < 0, (price - dirty) / np.where(slope < 0, slope, -1.0), 0.0)
        z = np.clip(z - step, -1.0, 2.0)
        if np.all(np.abs(step) < tol):
            break
    ok = sensitive & (np.abs(dirty_at_spread(cf, discount, z) - dirty) < 1e-8 * np.maximum(dirty, 1.0))
    return np.where(ok, z, np.nan)
