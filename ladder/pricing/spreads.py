"""Spreads over the government curve: the book's spread table, z-spreads, and pricing at a spread.

Convention: the z-spread z is a continuously compounded ACT/365F spread added to the curve's zero
rate, so a flow t years after settlement is discounted by DF(t_curve) / DF(t_settle) * exp(-z t).
Spreads are held under rate moves; a credit scenario moves them (``ladder.risk.scenarios``).

The spread table runs by sector, rating bucket and tenor: each bucket holds a ``SpreadCurve`` of
basis points against tenor years, read linearly in tenor years between its points and flat beyond
its first and last (a flat entry is a curve of one point). A holding's tenor is ACT/365F years from
settlement to maturity; a table tenor label is nominal years (months / 12).
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass

import numpy as np

from ladder.book.holdings import Holdings
from ladder.market.ratings import long_notches, long_symbol, short_notches, short_symbol
from ladder.pricing.cashflows import CashFlows


LONG_BUCKETS = ("AAA", "AA", "A", "BBB")
SHORT_BUCKETS = ("A-1+", "A-1", "A-2", "A-3")
RATING_BUCKETS = LONG_BUCKETS + SHORT_BUCKETS


def rating_buckets(holdings: Holdings) -> tuple[np.ndarray, np.ndarray]:
    """(long, short) spread-table buckets of each holding: the letter grade without notches
    ("AA+" and "Aa1" -> "AA") and the S&P-style short symbol ("P-1" and "F1" -> "A-1"); "" if unrated."""
    def letter(symbol: str) -> str:
        return "" if symbol == "unrated" else symbol.rstrip("+-")
    long_ = np.array([letter(long_symbol(n)) for n in long_notches(holdings.rating)], dtype=object)
    short = np.array(["" if (s := short_symbol(n)) == "unrated" else s for n in short_notches(holdings.short_rating)],
                     dtype=object)
    return long_, short


@dataclass(frozen=True, eq=False)
class SpreadCurve:
    """One bucket's spread in bp against tenor ``years`` (ascending, float64 (k,)); linear in tenor
    years between the points, flat beyond the first and the last."""

    years: np.ndarray
    bp: np.ndarray

    @classmethod
    def flat(cls, bp: float) -> "SpreadCurve":
        return cls(np.zeros(1), np.array([float(bp)]))

    @classmethod
    def of(cls, points: dict[float, float]) -> "SpreadCurve":
        """From {tenor years: bp}, in any order."""
        years = np.array(sorted(points), dtype=np.float64)
        return cls(years, np.array([points[y] for y in years], dtype=np.float64))

    def at(self, years) -> np.ndarray:
        """Spread in bp at each tenor of ``years``."""
        return np.interp(np.asarray(years, dtype=np.float64), self.years, self.bp)

    @property
    def is_flat(self) -> bool:
        return len(self.bp) == 1


SpreadTable = dict[str, dict[str, SpreadCurve]]      # sector -> rating bucket -> curve


def spread_keys(holdings: Holdings, table: dict[str, dict]) -> np.ndarray:
    """The bucket each holding reads in ``table`` (sector -> bucket -> ...): its long-term bucket,
    else its short-term bucket, else ``default``; "" where none is in the table."""
    long_, short = rating_buckets(holdings)
    out = np.full(len(holdings), "", dtype=object)
    for i, sector in enumerate(holdings.sector):
        buckets = table.get(sector, {})
        out[i] = next((key for key in (long_[i], short[i], "default") if key and key in buckets), "")
    return out


def tenor_years(holdings: Holdings, settle) -> np.ndarray:
    """ACT/365F years from ``settle`` to each holding's maturity (0 for one already due)."""
    days = (holdings.maturity - np.datetime64(settle, "D")).astype(np.int64)
    return np.maximum(days, 0) / 365.0


def table_spreads_bp(holdings: Holdings, spreads: SpreadTable, settle: dt.date | np.datetime64) -> np.ndarray:
    """Spread in bp of each holding from the book's table by sector, rating bucket (``spread_keys``)
    and tenor (``tenor_years`` from ``settle``, read on the bucket's curve); NaN where none applies."""
    keys = spread_keys(holdings, spreads)
    years = tenor_years(holdings, settle)
    out = np.full(len(holdings), np.nan)
    for sector, key in {(s, k) for s, k in zip(holdings.sector, keys) if k}:
        rows = (holdings.sector == sector) & (keys == key)
        out[rows] = spreads[sector][key].at(years[rows])
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
