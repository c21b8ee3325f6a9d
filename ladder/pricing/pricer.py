"""The repricing engine: every holding repriced off any curve, or a set of scenario curves, at held spreads.

Option-free holdings are priced in one sparse product over their distinct flow dates; callables go
through the Hull-White tree (``ladder.pricing.callable``) at their option-adjusted spread. Valuation,
rate shocks, the cash plan and the builder all price through a ``Pricer``.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np
from scipy import sparse

from ladder.book.holdings import Holdings
from ladder.pricing.callable import HullWhiteParams, callable_prices
from ladder.pricing.callable_terms import CallTerms
from ladder.pricing.cashflows import CashFlows
from ladder.pricing.curve import Curve, CurveSet


@dataclass(frozen=True, eq=False)
class Pricer:
    """Prices holdings off a curve at fixed spreads: the engine under valuation and every scenario."""

    holdings: Holdings
    cash_flows: CashFlows
    spread: np.ndarray          # z-spread, or OAS for callables (decimal)
    calls: CallTerms | None     # for the callable rows, in order
    params: HullWhiteParams

    @cached_property
    def callable_rows(self) -> np.ndarray:
        return np.flatnonzero(self.holdings.callable)

    @cached_property
    def _grids(self) -> dict:
        return {}

    def _grid(self, curve_date) -> tuple[np.ndarray, sparse.csr_matrix, np.ndarray]:
        """The flows on one curve-time grid: the distinct flow and settlement times (U,), ACT/365F
        years from ``curve_date``; the (n, U) sparse weights, each flow's amount per 100 times its
        spread factor exp(-z t) summed per holding and time; and each holding's settlement column."""
        key = np.datetime64(curve_date, "D")
        if key not in self._grids:
            cf = self.cash_flows
            rows, slots = np.nonzero(cf.mask)
            days = np.concatenate([(cf.dates[rows, slots] - key).astype(np.int64),
                                   (cf.settle - key).astype(np.int64)])
            unique, column = np.unique(days, return_inverse=True)
            weight = cf.amount[rows, slots] * np.exp(-self.spread[rows] * cf.years[rows, slots])
            weights = sparse.csr_matrix((weight, (rows, column[:len(rows)])), shape=(len(cf.settle), len(unique)))
            self._grids[key] = (unique / 365.0, weights, column[len(rows):])
        return self._grids[key]

    def dirty(self, curve) -> np.ndarray:
        """Dirty price per 100 of every holding on ``curve`` (a Curve: (n,); a CurveSet: (S, n)).

        One evaluation of the discount factors on (curves x distinct flow dates), then one sparse
        product: price = sum amount * DF(t) / DF(t_settle) * exp(-z t), as ``dirty_at_spread``.
        """
        many = isinstance(curve, CurveSet)
        times, weights, settle_column = self._grid(curve.curve_date)
        discount = np.atleast_2d(curve.discount(times))                       # (S, U)
        prices = (weights @ discount.T).T / discount[:, settle_column]        # (S, n)
        if self.calls is not None and len(self.callable_rows):
            prices[:, self.callable_rows] = callable_prices(
                self.calls.bonds, from_settle(curve, self.cash_flows.settle[0]), self.spread[self.callable_rows],
                self.params)
        return prices if many else prices[0]


def from_settle(curve: Curve | CurveSet, settle) -> callable:
    """Discount function in ACT/365F years from ``settle`` (the callable model's clock): for a Curve,
    DF of the times' shape; for a CurveSet of S curves, (S, len(t)) for 1-D times."""
    t0 = float(curve.years(np.array([settle]))[0])
    base = np.asarray(curve.discount(np.array([t0])))[..., 0]
    if isinstance(curve, CurveSet):
        return lambda t: curve.discount(np.asarray(t, dtype=np.float64) + t0) / base[:, None]
    return lambda t: curve.discount(np.asarray(t, dtype=np.float64) + t0) / base
