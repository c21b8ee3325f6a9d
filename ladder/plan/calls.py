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
    calls = np.where(call_mask, call_dates, NAT)
    # every discount factor the recursion needs, in two curve evaluations: flows seen from each call
    # date (n, m, k), and each call date seen from the call before it (n, m)
    tau = np.nan_to_num(days_between(calls[:, :, None], flow_dates[:, None, :]) / 365.0)
    seen = flow_mask[:, None, :] & call_mask[:, :, None] & (tau > 0)
    df = path.discount(calls[:, :, None], np.where(seen, tau, 0.0)) * np.exp(-oas[:, :, None] * tau)
    nxt = _next_call(calls)
    step = np.nan_to_num(days_between(calls, nxt) / 365.0)
    df_next = path.discount(calls, np.where(np.isnat(nxt), 0.0, step)) * np.exp(-oas * step)
    ahead = np.zeros(n)                      # X_{j+1}: value at the next call date with the call option
    called = np.zeros((n, m), bool)
    for j in range(m - 1, -1, -1):
        live, last = call_mask[:, j], np.isnat(nxt[:, j])
        window = seen[:, j] & (last[:, None] | (flow_dates <= nxt[:, j, None]))
        hold = np.where(window, flow_amounts * df[:, j], 0.0).sum(axis=1)
        hold = hold + np.where(last, 0.0, df_next[:, j] * ahead)
        redemption = call_redemption[:, j]
        called[:, j] = live & (redemption < hold)
        ahead = np.where(live, np.minimum(hold, redemption), ahead)
    first_call = np.where(call_mask.any(axis=1), calls[np.arange(n), np.argmax(call_mask, axis=1)], NAT)
    today = _value_today(path, flow_dates, flow_amounts, flow_mask, first_call, ahead, oas[:, 0])
    first = np.argmax(called, axis=1)
    return np.where(called.any(axis=1), call_dates[np.arange(n), first], NAT), today


def _next_call(calls: np.ndarray) -> np.ndarray:
    """The next live call date after each call slot (n, m), NaT for the last; slots are in date order."""
    n, m = calls.shape
    out = np.full((n, m), NAT)
    following = np.full(n, NAT)
    for j in range(m - 1, -1, -1):
        out[:, j] = following
        following = np.where(np.isnat(calls[:, j]), following, calls[:, j])
    return out


def _value_today(path, flow_dates, flow_amounts, flow_mask, first_call, at_first, oas) -> np.ndarray:
    """Flows up to the first call plus the value at the first call, discounted to the curve date."""
    today = path.curve.curve_date
    tau = np.where(flow_mask, days_between(today, flow_dates) / 365.0, 0.0)
    upto = np.where(np.isnat(first_call)[:, None], True, flow_dates <= first_call[:, None])
    window = flow_mask & upto
    value = np.where(window, flow_amounts * path.discount(today, tau) * np.exp(-oas[:, None] * tau), 0.0).sum(axis=1)
    step = np.where(np.isnat(first_call), 0.0, days_between(today, first_call) / 365.0)
    return value + np.where(np.isnat(first_call), 0.0, path.discount(today, step) * np.exp(-oas * step) * at_first)
