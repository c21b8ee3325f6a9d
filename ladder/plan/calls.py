"""Which callables a scenario expects to be called, and when.

Rule: the callable model of ``ladder.pricing.callable`` with the rates fixed on the scenario's path
(``ladder.plan.rates``: the curve that stays, or today's forwards), i.e. that model's call decision
with zero volatility. On each call date the issuer calls when the bond's continuation value exceeds
the call price plus accrued interest (the model's dirty-to-dirty comparison), where the continuation
value is the value on that date, on the curve seen that day at the bond's option-adjusted spread, of
its later flows with the issuer calling optimally at every later call date. Solved backwards over
the call dates, all bonds at once; the bond is expected to be called on the first call date where
calling is the issuer's choice. A coupon due on a call date is paid either way.
"""

from __future__ import annotations

import numpy as np

from ladder.market.dates import NAT, days_between
from ladder.plan.rates import RatePath


def expected_calls(path: RatePath, flow_dates, flow_amounts, flow_mask, call_dates, call_redemption,
                   call_mask, oas) -> tuple[np.ndarray, np.ndarray]:
    """(first call date expected, or NaT; value today per 100 on the path) of each bond.

    ``flow_*`` (n, k): future flows per 100 (coupon plus principal) on their accrual dates;
    ``call_dates`` (n, m) in date order with ``call_redemption`` (n, m) = call price plus the
    interest accrued to the call date, per 100; ``oas`` (n,) decimal. The value today is the
    bond's price on the path (for a ``forward`` path, the tree's price as its volatility goes to 0).
    """
    n, m = call_mask.shape
    flow_dates = np.where(flow_mask, flow_dates, NAT)
    oas = np.asarray(oas, dtype=np.float64)[:, None]
    ahead = np.zeros(n)                      # X_{j+1}: value at the next call date with the call option
    called = np.zeros((n, m), bool)
    next_date = np.full(n, NAT)
    for j in range(m - 1, -1, -1):
        c = np.where(call_mask[:, j], call_dates[:, j], NAT)
        live = call_mask[:, j]
        tau = np.where(flow_mask, days_between(c[:, None], flow_dates) / 365.0, 0.0)
        upto = np.where(np.isnat(next_date)[:, None], True, flow_dates <= next_date[:, None])
        window = flow_mask & (flow_dates > c[:, None]) & upto
        g = path.discount(np.where(live, c, call_dates[:, 0])[:, None], np.where(window, tau, 0.0))
        hold = np.where(window, flow_amounts * g * np.exp(-oas * tau), 0.0).sum(axis=1)
        step = np.where(np.isnat(next_date), 0.0, days_between(c, next_date) / 365.0)
        g_next = path.discount(np.where(live, c, call_dates[:, 0]), np.where(live, step, 0.0))
        hold = hold + np.where(np.isnat(next_date), 0.0, g_next * np.exp(-oas[:, 0] * step) * ahead)
        redemption = call_redemption[:, j]
        called[:, j] = live & (redemption < hold)
        ahead = np.where(live, np.minimum(hold, redemption), ahead)
        next_date = np.where(live, c, next_date)
    today = _value_today(path, flow_dates, flow_amounts, flow_mask, next_date, ahead, oas[:, 0])
    first = np.argmax(called, axis=1)
    return np.where(called.any(axis=1), call_dates[np.arange(n), first], NAT), today


def _value_today(path, flow_dates, flow_amounts, flow_mask, first_call, at_first, oas) -> np.ndarray:
    """Flows up to the first call plus the value at the first call, discounted to the curve date."""
    today = path.curve.curve_date
    tau = np.where(flow_mask, days_between(today, flow_dates) / 365.0, 0.0)
    upto = np.where(np.isnat(first_call)[:, None], True, flow_dates <= first_call[:, None])
    window = flow_mask & upto
    value = np.where(window, flow_amounts * path.discount(today, tau) * np.exp(-oas[:, None] * tau), 0.0).sum(axis=1)
    step = np.where(np.isnat(first_call), 0.0, days_between(today, first_call) / 365.0)
    return value + np.where(np.isnat(first_call), 0.0, path.discount(today, step) * np.exp(-oas * step) * at_first)
