"""What the plan can buy at each period's end, and what a purchase brings in later periods.

The menu is a set of tenors of one sector, each a par security bought at 100 on a period's last day
(``ladder.plan.rates.RatePath.purchase_terms``: single-payment up to a year, semiannual notes beyond).
For each tenor j and purchase period p the menu holds, per 100 face bought:
- ``coupon_in`` / ``principal_in`` (J, P, P): the cash it pays in each later period (payments past the
  horizon are left out);
- ``income`` (J, P, P): its coupon accrual in each period, each coupon earned ratably by day over its
  accrual period (bought at 100, so there is nothing to amortize);
- ``dirty``, ``accrued``, ``duration`` (J, P, P+1): its dirty value, accrued interest (per 100) and
  effective duration (years) at each period boundary on the scenario's path at its spread (0 once
  repaid; values before the purchase are not used);
- ``days`` (J,) calendar days to maturity at purchase (at the first period's end).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.market.dates import days_between
from ladder.plan.periods import Periods
from ladder.plan.rates import PurchaseTerms, RatePath


@dataclass(frozen=True, eq=False)
class Menu:
    """The tenors (months) of ``sector`` on offer and what each purchase does; see the module docstring."""

    months: np.ndarray
    sector: str
    terms: tuple[PurchaseTerms, ...]
    coupon_in: np.ndarray
    principal_in: np.ndarray
    income: np.ndarray
    dirty: np.ndarray
    accrued: np.ndarray
    duration: np.ndarray
    days: np.ndarray

    def __len__(self) -> int:
        return len(self.months)

    @property
    def y(self) -> np.ndarray:
        """Yield of each tenor bought at each period's end (J, P), decimal."""
        return np.array([t.y for t in self.terms]).reshape(len(self), -1)

    @property
    def maturity(self) -> np.ndarray:
        """Repayment date of each tenor bought at each period's end (J, P)."""
        return np.array([t.pay_date[:, -1] for t in self.terms]).reshape(len(self), -1)


def make_menu(path: RatePath, periods: Periods, months, sector: str, z: float) -> Menu:
    """The menu of ``months`` (tenors) of ``sector`` at z-spread ``z`` (decimal) on ``path``."""
    months = np.asarray(sorted(set(int(m) for m in months)), dtype=np.int64)
    P = len(periods)
    terms = tuple(path.purchase_terms(periods.end, int(m), z) for m in months)
    parts = [_one(t, path, periods) for t in terms]
    stack = lambda i, shape: np.array([p[i] for p in parts]).reshape(shape)  # noqa: E731
    J = len(months)
    days = np.array([days_between(t.on[0], t.pay_date[0, -1]) for t in terms], dtype=np.float64)
    return Menu(months, sector, terms, stack(0, (J, P, P)), stack(1, (J, P, P)), stack(2, (J, P, P)),
                stack(3, (J, P, P + 1)), stack(4, (J, P, P + 1)), stack(5, (J, P, P + 1)), days)


def _one(t: PurchaseTerms, path: RatePath, periods: Periods):
    P = len(periods)
    index = periods.index(t.pay_date)                                   # (P, k)
    keep = (index >= 0) & (index < P)
    rows = np.broadcast_to(np.arange(P)[:, None], index.shape)
    flat = rows[keep] * P + index[keep]
    coupon_in = np.bincount(flat, weights=t.coupon[keep], minlength=P * P).reshape(P, P)
    principal_in = np.bincount(flat, weights=t.principal[keep], minlength=P * P).reshape(P, P)
    b = periods.boundaries
    start, end = t.accrual_start[:, :, None], t.accrual_end[:, :, None]
    lo, hi = np.maximum(start, b[None, None, :-1]), np.minimum(end, b[None, None, 1:])
    length = days_between(start, end)
    share = np.maximum(days_between(lo, hi), 0.0) / np.where(length > 0, length, 1.0)     # (P, k, P)
    income = np.einsum("pk,pkq->pq", t.coupon, share)
    at = b[None, None, :]
    tau = days_between(at, t.pay_date[:, :, None]) / 365.0                               # (P, k, P+1)
    later = t.pay_date[:, :, None] > at
    tau = np.where(later, tau, 0.0)
    df = path.discount(np.broadcast_to(at, tau.shape), tau) * np.exp(-t.z * tau)
    pv = np.where(later, (t.coupon + t.principal)[:, :, None] * df, 0.0)
    dirty = pv.sum(axis=1)
    duration = np.divide((pv * tau).sum(axis=1), dirty, out=np.zeros_like(dirty), where=dirty > 0)
    running = (start <= at) & (at < end)
    elapsed = days_between(start, at) / np.where(length > 0, length, 1.0)
    accrued = np.where(running, t.coupon[:, :, None] * elapsed, 0.0).sum(axis=1)
    return coupon_in, principal_in, income, dirty, accrued, duration
