"""One answer to "are the cash needs covered?", period by period.

Every front that speaks of covering the cash needs uses ``needs_coverage``: the checker's cash-needs
rule (``portfolio.cash_needs_horizon_months``), the Ladder view's "short of needs" marks, the cash
plan's status column and the month-end report's liquidity table. Coverage is cumulative (our own
reading of the policy rule, which compares running totals): in period p,
  cash[p]  = opening cash + sum over periods q <= p of what comes in (maturities, coupons, ...),
  needs[p] = sum over q <= p of the net cash needs (+ needed, - received),
  headroom[p] = cash[p] - needs[p],
and the period is ``covered`` when the headroom is zero or more, ``by selling`` when what could be
sold at that date (``sellable``, not cumulative) makes up the rest, else ``short``. A period left
short of needs early is short however much arrives later in the same period's rung or month:
money that comes after a need does not pay it, so a gap shows where it opens.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

COVERED, BY_SELLING, SHORT = "covered", "by selling", "short"


@dataclass(frozen=True, eq=False)
class NeedsCoverage:
    """Per period (P,), currency units: cumulative ``cash`` and ``needs``, ``sellable`` at each date."""

    cash: np.ndarray
    needs: np.ndarray
    sellable: np.ndarray

    @property
    def headroom(self) -> np.ndarray:
        return self.cash - self.needs

    @property
    def status(self) -> np.ndarray:
        """``COVERED``, ``BY_SELLING`` or ``SHORT`` for each period (object array)."""
        h = self.headroom
        return np.where(h >= 0, COVERED, np.where(h + self.sellable >= 0, BY_SELLING, SHORT)).astype(object)

    @property
    def first_uncovered(self) -> int | None:
        """First period not covered by cash and maturities, None when every one is."""
        short = np.flatnonzero(self.headroom < 0)
        return int(short[0]) if len(short) else None


def needs_coverage(opening: float, inflows, needs, sellable=None) -> NeedsCoverage:
    """Coverage of ``needs`` (P,) by ``opening`` cash and ``inflows`` (P,) arriving in each period;
    ``sellable`` (P,): what could be raised by selling at each period's end (default none)."""
    inflows = np.asarray(inflows, dtype=np.float64)
    needs = np.asarray(needs, dtype=np.float64)
    sellable = np.zeros_like(needs) if sellable is None else np.asarray(sellable, dtype=np.float64)
    return NeedsCoverage(float(opening) + np.cumsum(inflows), np.cumsum(needs), sellable)
