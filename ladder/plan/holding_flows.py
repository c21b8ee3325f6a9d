"""The holdings' cash and interest income in each plan period, whole face, currency units.

Cash is counted on payment dates (coupon dates rolled to bond-market business days); income on an
accrual basis (``ladder.pricing.amortization``: coupon accrual plus effective-interest amortization).
A callable expected to be called (``ladder.plan.calls``) pays its call price plus accrued interest
on the call date and nothing after. Funds are cash in the plan and are not here.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.book.holdings import Holdings
from ladder.plan.periods import Periods
from ladder.pricing.amortization import Amortization, workout_flows
from ladder.pricing.cashflows import CashFlows


@dataclass(frozen=True, eq=False)
class HoldingCash:
    """Per holding (n rows) and period (P columns), currency units for the whole face.

    ``coupon``, ``principal`` (n, P): cash received; ``called`` (n, P): the part of ``principal``
    repaid by a call; ``income`` (n, P): interest earned (accrual basis); ``cost``, ``accrued``
    (n, P+1): clean amortized cost and accrued interest per 100 at each period boundary (0 once
    repaid); ``end_date`` (n,): the accrual date of the final repayment (maturity or call);
    ``flows``: the workout flows per 100 (to the expected call or maturity) that price a sale.
    """

    coupon: np.ndarray
    principal: np.ndarray
    called: np.ndarray
    income: np.ndarray
    cost: np.ndarray
    accrued: np.ndarray
    end_date: np.ndarray
    flows: CashFlows


def holding_cash(h: Holdings, cf: CashFlows, periods: Periods, amortization: Amortization) -> HoldingCash:
    """Bucket the flows of ``h`` (cash-flow matrix ``cf`` at the plan date) and their income by period.

    ``amortization`` must be of the same holdings, ended on their expected call dates.
    """
    n, P = len(h), len(periods)
    work = workout_flows(h, cf, amortization.end_date, amortization.redemption)
    face = h.face[:, None] / 100.0
    rows = np.broadcast_to(np.arange(n)[:, None], work.mask.shape)
    index = periods.index(work.pay_dates)
    keep = work.mask & (index >= 0) & (index < P)
    flat = rows[keep] * P + index[keep]

    def bucket(values):
        return np.bincount(flat, weights=(values * face)[keep], minlength=n * P).reshape(n, P)

    is_call = work.dates == np.where(amortization.end_date < h.maturity, amortization.end_date,
                                     np.datetime64("NaT"))[:, None]
    earned = amortization.earned(periods.boundaries)
    return HoldingCash(
        coupon=bucket(work.coupon), principal=bucket(work.principal),
        called=bucket(np.where(is_call, work.principal, 0.0)), income=earned.total * face,
        cost=np.nan_to_num(amortization.cost(periods.boundaries)),
        accrued=np.nan_to_num(amortization.accrued(periods.boundaries)), end_date=amortization.end_date,
        flows=work)
