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
- ``short of needs``: the net cash needed in the rung exceeds the face maturing in it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.risk.rungs import RUNG_END_MONTHS, RUNGS, rung_index

GAP_SHARE = 0.5
CROWDED_SHARE = 2.0


@dataclass(frozen=True, eq=False)
class RungSummary:
    """Per rung (R,): holdings count, face and market value maturing, net cash needs, marks."""

    rungs: tuple[str, ...]
    count: np.ndarray
    face: np.ndarray
    market_value: np.ndarray
    needs: np.ndarray
    share: np.ndarray          # market value share, decimal
    even_share: np.ndarray     # share of an evenly spread ladder over the held span, decimal
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
        if needs[k] > face[k]:
            mark.append("short of needs")
        marks.append(tuple(mark))
    return RungSummary(RUNGS, count, face, mv, needs, share, even, tuple(marks))
