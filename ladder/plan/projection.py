"""The period-by-period cash projection: cash in, cash needed, shortfalls covered by sales, reinvestment.

In each period, in this order:
1. opening cash (the funds' balances at the start; a fund is cash you can use the same day) earns
   the fund yield on ACT/365F for the period's days: ``fund_income``;
2. coupons and principal (maturities and expected calls) of the holdings still held and of the
   plan's own purchases arrive; the period's net cash needs (``cash_needs.csv``: + needed,
   - received) go out. Flows inside a period are netted: the plan is as fine as its periods;
3. the cash the plan keeps at the period's end (``floor``) is the larger of the minimum cash buffer
   and what the policy's liquidity floors ask of cash: a floor of pct % within d days asks
   pct % of the book's value less what else matures within d days;
4. if step 2 left cash below zero, the gap is the period's ``shortfall``: positions are sold at the
   period's end (``ladder.plan.sales``) to bring cash back up to the floor; what no sale can cover is
   ``unfunded`` and is left as negative cash;
5. what is above the floor is ``reinvested`` at the period's end by the reinvestment rule: all of it
   in one tenor (``longest_rung``, ``target_tenor``), none (``fund``), or placed among the menu's
   tenors by the needs-matching program (``match_needs``, ``ladder.plan.matching``).
Every currency unit is accounted for:
  closing = opening + fund_income + coupons + principal + sales - needs - reinvested.
Income (accrual basis) is the holdings' interest earned (coupon accrual plus amortization) on the
face held during the period, the purchases' coupon accrual, and the fund income. The book at each
period's end (face of every holding and purchase still held, cash) is kept for the policy check.
Values and durations are on the scenario's path at held spreads (``ladder.plan.prices``); the
policy's percentages are taken on that market value whatever its basis.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.book.holdings import Holdings
from ladder.plan.holding_flows import HoldingCash
from ladder.plan.matching import MARGIN, Outlook, PolicyLimits, Tenors, place
from ladder.plan.menu import Menu
from ladder.plan.periods import Periods
from ladder.plan.sales import Sale, choose_sales

FUND_YEAR_DAYS = 365.0


@dataclass(frozen=True, eq=False)
class PlanSetup:
    """Everything one projection needs (built by ``ladder.analysis.plan``).

    ``holdings`` and ``cash``: the non-fund holdings and their flows by period; ``dirty``,
    ``duration`` (n, P+1): their dirty value per 100 and effective duration at each boundary on the
    scenario's path; ``opening_cash``; ``needs`` (P,) net needs; ``fund_rate`` (P,) decimal a year;
    ``menu``: what can be bought (None: the cash stays in the fund); ``rule``; ``long_end``: the menu
    index of the long-end tenor (the single tenor of ``longest_rung`` / ``target_tenor``);
    ``buffer``: minimum cash kept; ``limits``: the policy's purchase-time limits.
    """

    periods: Periods
    holdings: Holdings
    cash: HoldingCash
    dirty: np.ndarray
    duration: np.ndarray
    opening_cash: float
    needs: np.ndarray
    fund_rate: np.ndarray
    menu: Menu | None
    rule: str
    long_end: int
    buffer: float
    limits: PolicyLimits = PolicyLimits()


@dataclass(frozen=True, eq=False)
class Projection:
    """The plan by period (P,), currency units; see the module docstring for each column.

    ``available``: cash after step 2 (before sales and reinvestment); ``floor``: cash kept;
    ``sellable``: what selling every sellable position would raise at the period's end;
    ``reinvest_yield``: amount-weighted yield of what was bought (NaN when nothing is);
    ``face_path`` (n, P+1) face of each holding held at each boundary (after that period's sales);
    ``lot_path`` (P+1, J, P) face of each purchase (tenor j bought at the end of period p) held at
    each boundary; ``bought`` (J, P) amounts bought; ``sale_list``: every sale in order.
    """

    periods: Periods
    opening_cash: np.ndarray
    fund_income: np.ndarray
    coupons: np.ndarray
    principal: np.ndarray
    called: np.ndarray
    needs: np.ndarray
    available: np.ndarray
    floor: np.ndarray
    shortfall: np.ndarray
    sales: np.ndarray
    unfunded: np.ndarray
    reinvested: np.ndarray
    closing_cash: np.ndarray
    sellable: np.ndarray
    reinvest_yield: np.ndarray
    income_holdings: np.ndarray
    income_purchases: np.ndarray
    face_path: np.ndarray
    lot_path: np.ndarray
    bought: np.ndarray
    sale_list: tuple[Sale, ...]
    menu: Menu | None

    @property
    def income(self) -> np.ndarray:
        return self.income_holdings + self.income_purchases + self.fund_income

    @property
    def face_left(self) -> np.ndarray:
        return self.face_path[:, -1]

    @property
    def realized_gain(self) -> float:
        return float(sum(s.realized_gain for s in self.sale_list))

    @property
    def first_shortfall(self) -> int | None:
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


class _Book:
    """The positions held as the projection runs: holdings (n,) and purchases (J, P)."""

    def __init__(self, setup: PlanSetup):
        self.s = setup
        h = setup.holdings
        self.face0 = h.face.astype(np.float64)
        self.face = self.face0.copy()
        P = len(setup.periods)
        J = len(setup.menu) if setup.menu is not None else 0
        self.lots = np.zeros((J, P))
        self.lot_ids = np.array([f"PLAN-{setup.menu.months[j]}M-{str(setup.periods.end[p])}"
                                 for j in range(J) for p in range(P)], dtype=object).reshape(J, P)

    def share(self) -> np.ndarray:
        return np.divide(self.face, self.face0, out=np.zeros_like(self.face0), where=self.face0 > 0)

    def lot_flow(self, table: np.ndarray, q) -> np.ndarray:
        """Cash of the purchases held in period(s) ``q`` from a (J, P, P) menu table, currency."""
        return np.einsum("jp,jp...->...", self.lots, table[:, :, q]) / 100.0

    def values(self, b: int):
        """Per position at boundary ``b``: (value, days to maturity, duration, maturity, sellable,
        clean, accrued, cost, ids) for holdings then purchases."""
        s, day = self.s, self.s.periods.boundaries[b]
        h, cash = s.holdings, s.cash
        running = cash.end_date > day
        hv = np.where(running, self.face * s.dirty[:, b] / 100.0, 0.0)
        hdays = (h.maturity - day).astype(np.float64)
        parts = [(hv, hdays, s.duration[:, b], cash.end_date, running & h.negotiable,
                  s.dirty[:, b] - cash.accrued[:, b], cash.accrued[:, b], cash.cost[:, b], h.id, self.face)]
        if s.menu is not None and self.lots.size:
            m = s.menu
            mat = m.maturity.ravel()
            lot_running = mat > day
            lv = np.where(lot_running, self.lots.ravel() * m.dirty[:, :, b].ravel() / 100.0, 0.0)
            parts.append((lv, (mat - day).astype(np.float64), m.duration[:, :, b].ravel(), mat, lot_running,
                          m.dirty[:, :, b].ravel() - m.accrued[:, :, b].ravel(), m.accrued[:, :, b].ravel(),
                          np.full(mat.shape, 100.0), self.lot_ids.ravel(), self.lots.ravel()))
        return [np.concatenate(x) for x in zip(*parts)]

    def sell(self, sales: list[Sale]) -> None:
        n = len(self.face)
        for sale in sales:
            if sale.position < n:
                self.face[sale.position] -= sale.face
            else:
                j, p = np.unravel_index(sale.position - n, self.lots.shape)
                self.lots[j, p] -= sale.face


def _floor(setup: PlanSetup, cash: float, value, days) -> float:
    """The cash kept at a period end: the buffer, or what a liquidity floor asks of cash if more."""
    total = cash + value.sum()
    return max([setup.buffer, *((pct / 100.0 + MARGIN) * total - value[days <= d].sum()
                                for d, pct in setup.limits.floors)])


def project(setup: PlanSetup) -> Projection:
    """Run the plan period by period (a loop over periods; every step inside is over arrays)."""
    periods, cash = setup.periods, setup.cash
    P = len(periods)
    book = _Book(setup)
    menu = setup.menu
    J = book.lots.shape[0]
    cols = {name: np.zeros(P) for name in ("opening_cash", "fund_income", "coupons", "principal", "called",
                                           "available", "floor", "shortfall", "sales", "unfunded", "reinvested",
                                           "closing_cash", "sellable", "income_holdings", "income_purchases")}
    reinvest_yield = np.full(P, np.nan)
    face_path = np.zeros((len(book.face), P + 1))
    face_path[:, 0] = book.face
    lot_path = np.zeros((P + 1, J, P))
    bought = np.zeros((J, P))
    sales: list[Sale] = []
    balance = float(setup.opening_cash)
    days = periods.days
    in_sector = np.concatenate([setup.holdings.sector == (menu.sector if menu is not None else ""),
                                np.ones(J * P, bool)])
    for p in range(P):
        share = book.share()
        fund_income = max(balance, 0.0) * setup.fund_rate[p] * days[p] / FUND_YEAR_DAYS
        coupons = share @ cash.coupon[:, p] + (book.lot_flow(menu.coupon_in, p) if J else 0.0)
        principal = share @ cash.principal[:, p] + (book.lot_flow(menu.principal_in, p) if J else 0.0)
        income_holdings = share @ cash.income[:, p]
        income_purchases = book.lot_flow(menu.income, p) if J else 0.0
        available = balance + fund_income + coupons + principal - setup.needs[p]
        value, to_maturity, duration, maturity, sellable, clean, accrued, cost, ids, face = book.values(p + 1)
        floor = _floor(setup, max(available, 0.0), value, to_maturity)
        sold = []
        if available < 0:
            sold = choose_sales(p, floor - available, face, ids, maturity, clean, accrued, cost, sellable)
            book.sell(sold)
            sales.extend(sold)
        proceeds = sum(s.proceeds for s in sold)
        after = available + proceeds
        x = np.zeros(J)
        if J and after > 0:
            value, to_maturity, duration, maturity, *_ = book.values(p + 1)
            floor = _floor(setup, after, value, to_maturity)
            if setup.rule == "match_needs":
                x = _match(setup, book, p, after, (value, to_maturity, duration, maturity, in_sector))
            else:
                x[setup.long_end] = max(after - floor, 0.0)
        book.lots[:, p] += x
        bought[:, p] = x
        spent = float(x.sum())
        if spent > 0:
            reinvest_yield[p] = float(x @ menu.y[:, p] / spent)
        dirty_value = np.where(sellable, face * (clean + accrued) / 100.0, 0.0)
        values = dict(opening_cash=balance, fund_income=fund_income, coupons=coupons, principal=principal,
                      called=share @ cash.called[:, p], available=available, floor=floor,
                      shortfall=max(-available, 0.0), sales=proceeds, unfunded=max(-after, 0.0), reinvested=spent, closing_cash=after - spent,
                      sellable=float(dirty_value.sum()), income_holdings=income_holdings,
                      income_purchases=income_purchases)
        for name, v in values.items():
            cols[name][p] = v
        balance = after - spent
        face_path[:, p + 1] = book.face
        lot_path[p + 1] = book.lots
    return Projection(periods=periods, needs=np.asarray(setup.needs, dtype=np.float64), reinvest_yield=reinvest_yield,
                      face_path=face_path, lot_path=lot_path, bought=bought, sale_list=tuple(sales), menu=menu,
                      **cols)


def _match(setup: PlanSetup, book: _Book, p: int, cash: float, held) -> np.ndarray:
    """The needs-matching purchase at the end of period ``p`` (``ladder.plan.matching.place``):
    the book's outlook over now and each later period, and the menu's terms bought now."""
    menu, periods, lim = setup.menu, setup.periods, setup.limits
    value, to_maturity, duration, _, in_sector = held
    later = np.arange(p + 1, len(periods))
    share = book.share()
    inflow = share @ (setup.cash.coupon + setup.cash.principal)[:, later] + book.lot_flow(
        menu.coupon_in + menu.principal_in, later)
    coupons = share @ setup.cash.coupon[:, later] + book.lot_flow(menu.coupon_in, later)
    needs = setup.needs[later]
    now = periods.boundaries[p + 1]
    elapsed = np.concatenate([[0.0], (periods.boundaries[later + 1] - now).astype(np.float64)])
    total = cash + value.sum() + np.concatenate([[0.0], np.cumsum(coupons - needs)])
    order = np.argsort(to_maturity)                  # final maturity, as the checker counts a floor
    ends, cum = now + to_maturity[order].astype("timedelta64[D]"), np.concatenate([[0.0], np.cumsum(value[order])])
    edge = lambda dates: cum[np.searchsorted(ends, dates, side="right")]  # noqa: E731
    q_dates = now + elapsed.astype("timedelta64[D]")
    maturing = np.array([edge(q_dates + d) - edge(q_dates) for d, _ in lim.floors]).reshape(len(lim.floors),
                                                                                          len(q_dates))
    outlook = Outlook(base=np.concatenate([[0.0], np.cumsum(inflow - needs)]), total=total, elapsed=elapsed,
                      maturing=maturing,
                      wam=(value[None, :] * np.maximum(to_maturity[None, :] - elapsed[:, None], 0.0)).sum(axis=1),
                      duration=(value[None, :] * np.maximum(duration[None, :] - elapsed[:, None] / 365.0, 0.0)
                                ).sum(axis=1))
    back = np.concatenate([np.zeros((len(menu), 1)), np.cumsum(menu.coupon_in[:, p, later]
                                                                 + menu.principal_in[:, p, later], axis=1) / 100.0],
                          axis=1)
    days = (menu.maturity[:, p] - now).astype(np.float64)
    tenors = Tenors(menu.y[:, p], days, menu.duration[:, p, p + 1], back, setup.long_end)
    sector_room = None if lim.sector_cap_pct is None else lim.sector_cap_pct / 100.0 * total[0] - value[in_sector].sum()
    return place(cash, setup.buffer, float(setup.fund_rate[min(p + 1, len(periods) - 1)]), tenors, outlook, lim,
                 sector_room)
