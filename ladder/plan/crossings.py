"""The projected book checked against the policy at every period's end, by ``ladder check``'s checker.

At each boundary the book is: the holdings still held (face after the plan's sales), the plan's
purchases still running (a holding of the bought sector each, rated as the book's own holdings of
that sector most often are, issuer "plan purchases (<sector>)"), and the cash spread over the book's
funds in proportion to their opening balances (one fund "plan cash" if the book holds none).
Measures: market value and effective duration on the scenario's path at held spreads
(``ladder.plan.prices``), book value at amortized cost, days to final maturity from the boundary.
The cash-needs rule is left out: the plan's own coverage answers it (``ladder.policy.liquidity``).
A crossing is a limit (rule and group) failed (review or breach) at a period's end that the
projected book did not fail at the plan date.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, replace

import numpy as np

from ladder.book.holdings import Holdings, make_holdings
from ladder.plan.projection import PlanSetup, Projection
from ladder.policy.checker import check
from ladder.policy.measures import PositionMeasures
from ladder.policy.model import Policy
from ladder.policy.results import BREACH, REVIEW

FAILED = (REVIEW, BREACH)


@dataclass(frozen=True)
class Crossing:
    """A limit the projection crosses at ``period_end``: rule key, group, actual, limit, status."""

    period_end: dt.date
    rule: str
    group: str
    actual: float | str | None
    limit: float | str | None
    status: str


def _modal(values: np.ndarray) -> str:
    values = values[values != ""]
    if not len(values):
        return ""
    names, counts = np.unique(values.astype(str), return_counts=True)
    return str(names[np.argmax(counts)])


def projected_crossings(policy: Policy, full: Holdings, setup: PlanSetup, pr: Projection) -> tuple[Crossing, ...]:
    """Every crossing of the projection ``pr`` (see the module docstring); ``full``: the whole book."""
    plain = replace(policy, portfolio=replace(policy.portfolio, cash_needs_horizon_months=None))
    failed_at = [_failed(plain, full, setup, pr, b) for b in range(len(pr.periods) + 1)]
    start = failed_at[0]
    out = []
    for b in range(1, len(failed_at)):
        for key, (actual, limit, status) in failed_at[b].items():
            if key not in start:
                out.append(Crossing(pr.periods.boundaries[b].astype(dt.date), key[0], key[1], actual, limit, status))
    return tuple(out)


def _failed(policy: Policy, full: Holdings, setup: PlanSetup, pr: Projection, b: int) -> dict:
    day = setup.periods.boundaries[b]
    h, cash = setup.holdings, setup.cash
    face = pr.face_path[:, b]
    held = np.flatnonzero((face > 0) & (cash.end_date > day))
    parts = [h.take(held)]
    value = [face[held] * setup.dirty[held, b] / 100.0]
    book = [face[held] * (cash.cost[held, b] + cash.accrued[held, b]) / 100.0]
    duration = [setup.duration[held, b]]
    menu = pr.menu
    if menu is not None and pr.lot_path.size:
        lots = pr.lot_path[b]
        mat = menu.maturity
        j, p = np.nonzero((lots > 0) & (mat > day))
        if len(j):
            same = full.sector == menu.sector
            n = len(j)
            parts.append(make_holdings(
                id=[f"PLAN-{menu.months[a]}M-{setup.periods.end[c]}" for a, c in zip(j, p)], sector=[menu.sector] * n,
                issuer=[f"plan purchases ({menu.sector})"] * n, face=lots[j, p], maturity=mat[j, p],
                rating=[_modal(full.rating[same])] * n, short_rating=[_modal(full.short_rating[same])] * n))
            value.append(lots[j, p] * menu.dirty[j, p, b] / 100.0)
            book.append(lots[j, p] * (100.0 + menu.accrued[j, p, b]) / 100.0)
            duration.append(menu.duration[j, p, b])
    balance = pr.closing_cash[b - 1] if b else setup.opening_cash
    funds = full.take(np.flatnonzero(full.kind == "fund"))
    if not len(funds):
        funds = make_holdings(id=["plan cash"], sector=["fund"], face=[1.0], maturity=["NaT"])
    weights = funds.face / funds.face.sum()
    cash_value = max(float(balance), 0.0) * weights
    parts.append(replace(funds, face=cash_value))
    value.append(cash_value)
    book.append(cash_value)
    duration.append(np.zeros(len(funds)))
    held_all = Holdings.concat(parts)
    days = np.where(np.isnat(held_all.maturity), 1, (held_all.maturity - day).astype(np.int64))
    m = PositionMeasures(held_all, day, np.concatenate(value), np.concatenate(book), np.concatenate(duration),
                         days, np.zeros((len(held_all), 1)))
    result = check(policy, m)
    failed = {}
    for r in result.rules:
        for f in r.findings:
            if f.status in FAILED:
                failed[(r.rule, f.group)] = (f.actual, f.limit, f.status)
    return failed
