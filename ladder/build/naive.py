"""The naive even ladder, the yardstick for the optimizer: the cash split equally among the rungs,
each rung's share split equally among the candidates maturing in it (as many of them, in order, as
the share buys a minimum lot of each), each rounded down to whole lots, and the rest in the first fund."""

from __future__ import annotations

import numpy as np

from ladder.build.program import Program
from ladder.build.rungs import Rungs


def naive_ladder(p: Program, rungs: Rungs) -> np.ndarray:
    """Variable values (as ``Program``) of the naive even ladder; no sales."""
    pos = p.positions
    x = np.zeros(len(p.c))
    buy = p.buys & (p.ub > 0)
    fund = pos.fund[p.var_pos]
    rung = rungs.index(pos.holdings.maturity[p.var_pos])
    cost = pos.mv[p.var_pos] * p.var_unit    # per unit of each variable
    for k in range(len(rungs)):
        members = np.flatnonzero(buy & ~fund & (rung == k))
        if not len(members):
            continue
        share = p.cash / len(rungs)
        smallest = cost[members] * np.maximum(p.lb[members], 1)
        members = members[:max(1, int(share // smallest.max()))]
        each = share / len(members)
        lots = np.minimum(np.floor(each / cost[members]), p.ub[members])
        lots = np.where(lots >= np.maximum(p.lb[members], 1), lots, 0.0)
        x[members] = lots
    funds = np.flatnonzero(buy & fund)
    if len(funds):
        x[funds[0]] = min(max(p.cash - float(cost @ x), 0.0) / cost[funds[0]], p.ub[funds[0]])
    return x


def feasible(p: Program, x: np.ndarray, tol: float = 1e-6) -> np.ndarray:
    """(m,) whether each row holds at ``x`` (within ``tol`` of the row's size)."""
    activity = p.A @ x
    size = np.maximum(np.abs(p.A).max(axis=1) if p.A.size else 1.0, 1.0) * np.maximum(1.0, np.abs(x).max())
    ok = activity <= p.b + tol * size
    return np.where(p.eq, np.abs(activity - p.b) <= tol * size, ok)
