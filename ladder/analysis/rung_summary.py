"""The ladder by maturity rung: what matures in each rung against the cash needed in it. No Textual.

Rungs are ``ladder.risk.rungs.RUNGS`` (ends at the settlement date plus 3, 6, 12, 24, 36, 60 months);
a holding falls in the rung of its final maturity, a cash need in the rung of its date.
Marks (our own reading of a ladder's shape, on market value): an evenly spread ladder holds in each
rung a share proportional to the rung's length in months, over the bounded rungs from the first held
rung to the last (the open-ended last rung has no length and gets no even share):
- ``gap``: a bounded rung inside that span with less than ``GAP_SHARE`` of its even share;
- ``crowded``: a rung with more than ``CROWDED_SHARE`` times its even share (any holding in the
  open-ended rung beyond an even ladder's span counts as crowded only if its share is above the
  largest even share);
- ``short of needs``: by the rung's end, the cumulative net cash needs exceed the fund balances plus
  the principal and coupons paid so far (``ladder.policy.liquidity.needs_coverage``, the answer the
  checker's cash-needs rule and the cash plan give): a rung whose needs earlier rungs cover is not
  marked.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.policy.liquidity import COVERED, NeedsCoverage, needs_coverage
from ladder.risk.rungs import RUNG_END_MONTHS, RUNGS, rung_index

GAP_SHARE = 0.5
CROWDED_SHARE = 2.0


@dataclass(frozen=True, eq=False)
class RungSummary:
    """Per rung (R,): holdings count, face and market value maturing, net cash needs, the cumulative
    coverage of the needs (``coverage``), marks."""

    rungs: tuple[str, ...]
    count: np.ndarray
    face: np.ndarray
    market_value: np.ndarray
    needs: np.ndarray
    share: np.ndarray          # market value share, decimal
    even_share: np.ndarray     # share of an evenly spread ladder over the held span, decimal
    coverage: NeedsCoverage
    marks: tuple[tuple[str, ...], ...]


def rung_summary(v, cash_needs) -> RungSummary:
    """The rungs of valuation ``v`` with the book's cash-needs forecast laid over them."""
    settle = np.datetime64(v.as_of, "D")
    index = rung_index(settle, v.holdings.maturity)
    r = len(RUNGS)
    count = np.bincount(index, minlength=r)
    face = np.bincount(index, weights=v.holdings.face, minlength=r)
    mv = np.bincount(index, weights=v.market_value, minlength=r)
    future = cash_needs.date > settle
    needs = np.bincount(rung_index(settle, cash_needs.date[future]), weights=cash_needs.amount[future], minlength=r)
    fund = v.holdings.kind == "fund"
    cf = v.pricer.cash_flows
    paid = cf.mask & (cf.pay_dates > settle) & ~fund[:, None]
    flows = np.where(paid, cf.amount * v.holdings.face[:, None] / 100.0, 0.0)
    rung_of_flow = rung_index(settle, np.where(paid, cf.pay_dates, settle + 1))
    inflows = np.bincount(rung_of_flow[paid], weights=flows[paid], minlength=r)
    coverage = needs_coverage(float(v.market_value[fund].sum()), inflows, needs)
    covered = coverage.status == COVERED
    total = mv.sum()
    share = mv / total if total else np.zeros(r)
    held = np.flatnonzero(count)
    marks: list[tuple[str, ...]] = []
    span = np.zeros(r, bool)
    if len(held):
        span[held[0]:held[-1] + 1] = True
    months = np.diff(np.concatenate([[0], RUNG_END_MONTHS])).astype(np.float64)
    length = np.where(span[:-1], months, 0.0)
    even = np.append(length / length.sum() if length.sum() else length, 0.0)
    for k in range(r):
        mark = []
        if k < r - 1 and span[k] and share[k] < GAP_SHARE * even[k]:
            mark.append("gap")
        if share[k] > CROWDED_SHARE * (even[k] if k < r - 1 else even.max()):
            mark.append("crowded")
        if not covered[k]:
            mark.append("short of needs")
        marks.append(tuple(mark))
    return RungSummary(RUNGS, count, face, mv, needs, share, even, coverage, tuple(marks))
