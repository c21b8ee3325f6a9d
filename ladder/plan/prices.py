"""Prices of the holdings on later dates of a plan: the pull to par.

A holding sold (or valued) on date ``b`` is priced from its remaining flows on the curve the scenario
sees that day (``ladder.plan.rates.RatePath``) at the holding's spread from the valuation (its
z-spread, or its option-adjusted spread for a callable, whose flows run to the call the scenario
expects: ``ladder.plan.calls``, the zero-volatility call decision):
  dirty(b) = sum over flows dated after b of  amount x DF_b(tau) x exp(-z tau),  tau = ACT/365F years
from b to the flow's accrual date (the measure ``ladder.pricing.cashflows`` uses for the curve), and
clean(b) = dirty(b) less the interest accrued on b. As b nears maturity the clean price goes to the
redemption price. Alongside, the effective duration on that curve: for flows fixed in amount,
-dV/dz / V = sum tau x PV / sum PV (a parallel move of continuously compounded zero rates).
All holdings and dates at once: (n, dates).
"""

from __future__ import annotations

import numpy as np

from ladder.market.dates import days_between, to_days
from ladder.plan.rates import RatePath
from ladder.pricing.cashflows import CashFlows


def later_values(flows: CashFlows, spread, path: RatePath, dates) -> tuple[np.ndarray, np.ndarray]:
    """(dirty value per 100, effective duration in years) of each holding on each of ``dates`` (m,):
    two (n, m) arrays; 0 once every flow is paid."""
    d = to_days(dates)
    if not flows.mask.size:
        return np.zeros((len(flows.mask), len(d))), np.zeros((len(flows.mask), len(d)))
    tau = days_between(d[None, None, :], flows.dates[:, :, None]) / 365.0          # (n, k, m)
    later = flows.mask[:, :, None] & (tau > 0)
    tau = np.where(later, tau, 0.0)
    z = np.asarray(spread, dtype=np.float64)[:, None, None]
    df = path.discount(np.broadcast_to(d[None, None, :], tau.shape), tau) * np.exp(-z * tau)
    pv = np.where(later, flows.amount[:, :, None] * df, 0.0)
    dirty = pv.sum(axis=1)
    duration = np.divide((pv * tau).sum(axis=1), dirty, out=np.zeros_like(dirty), where=dirty > 0)
    return dirty, duration
