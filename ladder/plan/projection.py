"""The period-by-period cash projection: cash in, cash needed, shortfalls covered by sales, reinvestment.

In each period, in this order:
1. opening cash (the funds' balances at the start; a fund is cash you can use the same day) earns
   the fund yield on ACT/365F for the period's days: ``fund_income``;
2. coupons and principal (maturities and expected calls) of the holdings still held and of the
   plan's own purchases arrive; the period's net cash needs (``cash_needs.csv``: + needed,
   - received) go out. Flows inside a period are netted: the plan is as fine as its periods;
3. if that leaves cash below zero, the gap is the period's ``shortfall``: holdings are sold at the
   period's end (``ladder.plan.sales``) to cover it; what no sale can cover is ``unfunded`` and is
   left as negative cash;
4. what is above the minimum cash buffer is ``reinvested`` at the period's end in the security the
   reinvestment rule buys (none under the fund rule, where the cash stays in the fund).
Every currency unit is accounted for:
  closing = opening + fund_income + coupons + principal + sales - needs - reinvested.
Income (accrual basis) is the holdings' interest earned (coupon accrual plus amortization) on the
face held during the period, the purchases' coupon accrual, and the fund income.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.book.holdings import Holdings
from ladder.market.dates import days_between
from ladder.plan.holding_flows import HoldingCash
from ladder.plan.periods import Periods
from ladder.plan.rates import PurchaseTerms
from ladder.plan.sales import Sale, choose_sales

FUND_YEAR_DAYS = 365.0


@dataclass(frozen=True, eq=False)
class PlanSetup:
    """Everything one projection needs (built by ``ladder.analysis.plan``).

    ``holdings`` and ``cash``: the non-fund holdings and their flows by period; ``sale_clean`` (n,)
    clean sale price per 100; ``opening_cash``; ``needs`` (P,) net needs; ``fund_rate`` (P,) decimal
    a year; ``purchases``: the security bought at each period's end (None: cash stays in the fund);
    ``buffer``: minimum cash kept before reinvesting.
    """

    periods: Periods
    holdings: Holdings
    cash: HoldingCash
    sale_clean: np.ndarray
    opening_cash: float
    needs: np.ndarray
    fund_rate: np.ndarray
    purchases: PurchaseTerms | None
    buffer: float


@dataclass(frozen=True, eq=False)
class Projection:
    """The plan by period (P,), currency units; see the module docstring for each column.

    ``available``: cash after step 2 (before sales and reinvestment); ``reinvest_yield``: yield of
    the security bought (NaN when nothing is bought); ``face_left`` (n,): face still held at the end;
    ``sales``: every sale in order; ``income_holdings``, ``income_purchases``: the parts of ``income``.
    """

    periods: Periods
    opening_cash: np.ndarray
    fund_income: np.ndarray
    coupons: np.ndarray
    principal: np.ndarray
    called: np.ndarray
    needs: np.ndarray
    available: np.ndarray
    shortfall: np.ndarray
    sales: np.ndarray
    unfunded: np.ndarray
    reinvested: np.ndarray
    closing_cash: np.ndarray
    reinvest_yield: np.ndarray
    income_holdings: np.ndarray
    income_purchases: np.ndarray
    face_left: np.ndarray
    sale_list: tuple[Sale, ...]
    purchases: PurchaseTerms | None

    @property
    def income(self) -> np.ndarray:
        return self.income_holdings + self.income_purchases + self.fund_income

    @property
    def first_shortfall(self) -> int | None:
        """Index of the first period that needs a sale, or None."""
        hit = np.flatnonzero(self.shortfall > 0)
        return int(hit[0]) if len(hit) else None

    @property
    def net_flow(self) -> np.ndarray:
        """Cash in less cash needed in each period (fund income, coupons, principal less needs)."""
        return self.available - self.opening_cash

    @property
    def tightest(self) -> int:
        """Index of the tight period: the one whose needs most exceed what comes in."""
        return int(np.argmin(self.net_flow))


def project(setup: PlanSetup) -> Projection:
    """Run the plan period by period (a loop over periods; every step inside is over arrays)."""
    periods, cash = setup.periods, setup.cash
    P = len(periods)
    face0 = setup.holdings.face.astype(np.float64)
    face_left = face0.copy()
    lot_coupon, lot_principal = np.zeros(P + 1), np.zeros(P + 1)
    cols = {name: np.zeros(P) for name in ("opening_cash", "fund_income", "coupons", "principal", "called",
                                           "available", "shortfall", "sales", "unfunded", "reinvested",
                                           "closing_cash", "income_holdings")}
    reinvest_yield = np.full(P, np.nan)
    sales: list[Sale] = []
    balance = float(setup.opening_cash)
    days = periods.days
    for p in range(P):
        share = np.divide(face_left, face0, out=np.zeros_like(face0), where=face0 > 0)
        fund_income = max(balance, 0.0) * setup.fund_rate[p] * days[p] / FUND_YEAR_DAYS
        coupons = share @ cash.coupon[:, p] + lot_coupon[p]
        principal = share @ cash.principal[:, p] + lot_principal[p]
        available = balance + fund_income + coupons + principal - setup.needs[p]
        sold = []
        if available < 0:
            sellable = cash.end_date > periods.boundaries[p + 1]
            sold = choose_sales(p, -available, face_left, cash.end_date, setup.sale_clean,
                                cash.accrued[:, p + 1], cash.cost[:, p + 1], sellable)
            for sale in sold:
                face_left[sale.row] -= sale.face
            sales.extend(sold)
        proceeds = sum(s.proceeds for s in sold)
        after = available + proceeds
        bought = max(after - setup.buffer, 0.0) if setup.purchases is not None else 0.0
        if bought > 0:
            _add_lot(setup.purchases, p, bought, periods, lot_coupon, lot_principal)
            reinvest_yield[p] = setup.purchases.y[p]
        values = dict(opening_cash=balance, fund_income=fund_income, coupons=coupons, principal=principal,
                      called=share @ cash.called[:, p], available=available, shortfall=max(-available, 0.0),
                      sales=proceeds, unfunded=max(-after, 0.0), reinvested=bought, closing_cash=after - bought,
                      income_holdings=share @ cash.income[:, p])
        for name, value in values.items():
            cols[name][p] = value
        balance = after - bought
    income_purchases = _purchase_income(setup.purchases, cols["reinvested"], periods)
    return Projection(periods=periods, needs=np.asarray(setup.needs, dtype=np.float64), reinvest_yield=reinvest_yield,
                      income_purchases=income_purchases, face_left=face_left, sale_list=tuple(sales),
                      purchases=setup.purchases, **cols)


def _add_lot(terms: PurchaseTerms, p: int, amount: float, periods: Periods, coupon, principal) -> None:
    """Add the flows of ``amount`` bought at the end of period ``p`` to the later periods' cash."""
    index = np.minimum(periods.index(terms.pay_date[p]), len(periods))
    np.add.at(coupon, index, amount / 100.0 * terms.coupon[p])
    np.add.at(principal, index, amount / 100.0 * terms.principal[p])


def _purchase_income(terms: PurchaseTerms | None, amounts: np.ndarray, periods: Periods) -> np.ndarray:
    """Coupon accrual of the purchases in each period: each coupon earned ratably by day over its
    accrual period (bought at 100, so there is nothing to amortize). (P,)"""
    if terms is None or not np.any(amounts > 0):
        return np.zeros(len(periods))
    b = periods.boundaries
    start, end = terms.accrual_start[:, :, None], terms.accrual_end[:, :, None]       # (lots, k, 1)
    lo, hi = np.maximum(start, b[None, None, :-1]), np.minimum(end, b[None, None, 1:])
    overlap = np.maximum(days_between(lo, hi), 0.0)
    length = days_between(start, end)
    share = overlap / np.where(length > 0, length, 1.0)                                # (lots, k, P)
    coupon = (amounts / 100.0)[:, None] * terms.coupon                                  # (lots, k)
    return np.einsum("lk,lkp->p", coupon, share)
