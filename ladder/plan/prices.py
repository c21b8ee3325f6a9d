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
The sum is one product over the book's distinct flow days u: with F and d days from the first date,
exp(-z tau) = exp(-z F / 365) exp(z d / 365), so
  dirty_i(d) = exp(z_i d / 365) sum_u W_iu G_u(d),  W_iu = sum of amount x exp(-z_i F / 365) of
  holding i's flows on day u,  G_u(d) = DF_d((u - d) / 365) for u > d (else 0),
and the duration's numerator the same with G_u(d) (u - d) / 365: W is a sparse (n, U) matrix and G a
small (U, m) one, so no (holdings x flows x dates) array is formed and the curve is evaluated once
per distinct flow day and date.
"""

from __future__ import annotations

import numpy as np
from scipy import sparse

from ladder.market.dates import to_days
from ladder.plan.rates import RatePath
from ladder.pricing.cashflows import CashFlows


def later_values(flows: CashFlows, spread, path: RatePath, dates) -> tuple[np.ndarray, np.ndarray]:
    """(dirty value per 100, effective duration in years) of each holding on each of ``dates`` (m,):
    two (n, m) arrays; 0 once every flow is paid."""
    d = to_days(dates)
    n = len(flows.mask)
    if not flows.mask.size or not flows.mask.any():
        return np.zeros((n, len(d))), np.zeros((n, len(d)))
    rows, slots = np.nonzero(flows.mask)
    origin = d.min()
    flow_day = (flows.dates[rows, slots] - origin).astype(np.int64)
    days, column = np.unique(flow_day, return_inverse=True)               # the distinct flow days (U,)
    z = np.asarray(spread, dtype=np.float64)
    W = sparse.csr_matrix((flows.amount[rows, slots] * np.exp(-z[rows] * flow_day / 365.0), (rows, column)),
                          shape=(n, len(days)))
    at = (d - origin).astype(np.int64)                                     # (m,)
    ahead = days[:, None] - at[None, :]                                    # (U, m) days from each date
    tau = np.maximum(ahead, 0) / 365.0
    G = np.where(ahead > 0, path.discount(np.broadcast_to(d[None, :], ahead.shape), tau), 0.0)
    grow = np.exp(z[:, None] * at[None, :] / 365.0)                       # (n, m)
    dirty = np.asarray(W @ G) * grow
    timed = np.asarray(W @ (G * tau)) * grow
    duration = np.divide(timed, dirty, out=np.zeros_like(dirty), where=dirty > 0)
    return dirty, duration
