"""Price, yield and their derivatives for coupon bonds, over the cash-flow matrix (street convention).

Yield y is compounded at the coupon frequency f and time is counted in coupon periods p (see
``cashflows``): dirty = sum CF_k (1 + y/f)^(-p_k). In the final coupon period a bond is priced with
simple interest, dirty = CF / (1 + (y/f) p), the money-market convention SIFMA's Standard Securities
Calculation Methods and 31 CFR 356 App. B use for one remaining period.

Measures (years, with y compounded at f):
  Macaulay D = sum (p_k/f) PV_k / P;  modified D = -(1/P) dP/dy;  convexity = (1/P) d2P/dy2,
which for compounding give modified = Macaulay / (1 + y/f) and
convexity = sum p_k (p_k + 1) PV_k / (P f^2 (1 + y/f)^2).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.pricing.cashflows import CashFlows


@dataclass(frozen=True, eq=False)
class YieldMeasures:
    """Per-holding measures at one yield; durations in years, convexity in years^2, per 100 face."""

    dirty: np.ndarray
    macaulay: np.ndarray
    modified: np.ndarray
    convexity: np.ndarray


def _terms(amount, periods, mask, y, f, simple):
    """PV_k and the first two y-derivatives of each flow's discount factor, per flow."""
    y = np.asarray(y, dtype=np.float64)[:, None]
    f = np.asarray(f, dtype=np.float64)[:, None]
    base = 1.0 + y / f
    compound = base ** (-periods)
    lin = 1.0 + (y / f) * periods
    simple = np.asarray(simple)[:, None]
    df = np.where(simple, 1.0 / lin, compound)
    d1 = np.where(simple, -(periods / f) / lin**2, -(periods / f) * compound / base)
    d2 = np.where(simple, 2 * (periods / f) ** 2 / lin**3,
                  periods * (periods + 1) / f**2 * compound / base**2)
    amount = np.where(mask, amount, 0.0)
    return amount * df, amount * d1, amount * d2


def final_period(cf: CashFlows) -> np.ndarray:
    """Holdings with one coupon period or less to run (priced with simple interest)."""
    return cf.count <= 1


def measures_at_yield(cf: CashFlows, y, frequency) -> YieldMeasures:
    """Dirty price per 100 and yield measures of each holding at yield ``y`` (decimal, compounded at f)."""
    f = np.where(np.asarray(frequency) > 0, frequency, 2).astype(np.float64)
    pv, d1, d2 = _terms(cf.amount, cf.periods, cf.mask, y, f, final_period(cf))
    price = pv.sum(axis=1)
    safe = np.where(price != 0, price, np.nan)
    macaulay = (pv * cf.periods / f[:, None]).sum(axis=1) / safe
    return YieldMeasures(price, macaulay, -d1.sum(axis=1) / safe, d2.sum(axis=1) / safe)


def dirty_from_yield(cf: CashFlows, y, frequency) -> np.ndarray:
    """Dirty price per 100 face at yield ``y``."""
    return measures_at_yield(cf, y, frequency).dirty


def yield_from_dirty(cf: CashFlows, dirty, frequency, tol: float = 1e-14, max_iter: int = 100) -> np.ndarray:
    """Yield (decimal, compounded at f) that reprices each holding to ``dirty``; vectorized Newton.

    Newton steps on P(y) - dirty, which is convex and decreasing in y, kept inside a bracket
    (bisection when a step leaves it). NaN where no yield in (-f, 1) reprices the holding.
    """
    dirty = np.asarray(dirty, dtype=np.float64)
    f = np.where(np.asarray(frequency) > 0, frequency, 2).astype(np.float64)
    simple = final_period(cf)
    lo = np.full(len(dirty), -0.99) * f
    hi = np.full(len(dirty), 1.0)
    y = np.full(len(dirty), 0.05)
    for _ in range(max_iter):
        pv, d1, _ = _terms(cf.amount, cf.periods, cf.mask, y, f, simple)
        gap = pv.sum(axis=1) - dirty
        slope = d1.sum(axis=1)
        lo = np.where(gap > 0, y, lo)          # price too high -> yield must rise
        hi = np.where(gap < 0, y, hi)
        step = np.where(slope != 0, gap / np.where(slope != 0, slope, 1.0), 0.0)
        candidate = y - step
        outside = (candidate <= lo) | (candidate >= hi) | ~np.isfinite(candidate)
        new = np.where(outside, 0.5 * (lo + hi), candidate)
        if np.all(np.abs(new - y) <= tol * np.maximum(1.0, np.abs(y))):
            y = new
            break
        y = new
    pv, _, _ = _terms(cf.amount, cf.periods, cf.mask, y, f, simple)
    ok = np.abs(pv.sum(axis=1) - dirty) <= 1e-9 * np.maximum(1.0, np.abs(dirty))
    return np.where(ok, y, np.nan)
