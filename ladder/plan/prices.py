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
All holdings at once for each date; the curve is evaluated once per whole day
up to the last flow, from each date, and looked up.
"""

from __future__ import annotations

import numpy as np

from ladder.market.dates import to_days
from ladder.plan.rates import RatePath
from ladder.pricing.cashflows import CashFlows


def later_values(flows: CashFlows, spread, path: RatePath, dates) -> tuple[np.ndarray, np.ndarray]:
    """(dirty value per 100, effective duration in years) of each holding on each of ``dates`` (m,):
    two (n, m) arrays; 0 once every flow is paid."""
    d = to_days(dates)
    if not flows.mask.size:
        return np.zeros((len(flows.mask), len(d))), np.zeros((len(flows.mask), len(d)))
    flow_day = np.where(flows.mask, flows.dates, d[0]).astype(np.int64)
    days = flow_day[:, :, None] - d.astype(np.int64)[None, None, :]                   # (n, k, m)
    later = flows.mask[:, :, None] & (days > 0)
    days = np.where(later, days, 0)
    tau = days / 365.0
    z = np.asarray(spread, dtype=np.float64)[:, None, None]
    df = np.empty(days.shape)
    every = np.arange(int(days.max()) + 1)
    for j, on in enumerate(d):            # the curve once per whole day seen from each date, then looked up
        df[:, :, j] = path.discount(np.full(every.shape, on), every / 365.0)[days[:, :, j]]
    df *= np.exp(-z * tau)
    pv = np.where(later, flows.amount[:, :, None] * df, 0.0)
    dirty = pv.sum(axis=1)
    duration = np.divide((pv * tau).sum(axis=1), dirty, out=np.zeros_like(dirty), where=dirty > 0)
    return dirty, duration
