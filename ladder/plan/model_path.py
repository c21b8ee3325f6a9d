"""A simulated rate path as the curve the plan sees on every future date.

The plan reads later curves through ``ladder.plan.rates.RatePath.discount(on, tau)``. On a path of
the Hull-White model (``ladder.risk.short_rate``) the curve seen at a simulated date t_k is the
model's closed-form bond price P(t_k, .) at that path's state x(t_k). On a date s between two
simulated dates (a call date inside a period, or any date after the horizon) the curve is the one
seen at the last simulated date t_k <= s, carried forward as its own forwards:
  DF_s(tau) = P(t_k, s + tau) / P(t_k, s).
On the simulated dates themselves (every period end) this is P(t_k, t_k + tau) exactly. With zero
volatility x = 0 and every curve is today's forwards, DF(s + tau) / DF(s): the ``forward`` rule.
The plan asks every path the same questions (the same dates and times), and ln DF is a
path-independent part less a path-independent multiple of x(t_k); ``PathCurves`` keeps both parts
for each question asked, so that a path costs one multiply-add per question.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ladder.market.dates import to_days
from ladder.plan.rates import RatePath
from ladder.risk.short_rate import ShortRatePaths, log_bond_ratio


@dataclass(frozen=True, eq=False)
class PathCurves:
    """The simulated ``paths`` and the path-independent parts of every question asked of them."""

    paths: ShortRatePaths
    known: dict = field(default_factory=dict)

    def parts(self, on, tau):
        """(k, level, slope) with ln DF_on(tau) = level - slope x(t_k), broadcast shapes."""
        on, tau = to_days(on), np.maximum(np.asarray(tau, dtype=np.float64), 0.0)
        key = (on.shape, tau.shape, on.tobytes(), tau.tobytes())
        if key not in self.known:
            p = self.paths
            s = p.curve.years(on)
            s = np.broadcast_to(s, np.broadcast_shapes(np.shape(s), tau.shape))
            k = np.clip(np.searchsorted(p.times, s, side="right") - 1, 0, len(p.times) - 1)
            t = p.times[k]
            level = log_bond_ratio(p.model, p.curve, t, 0.0, s, s + tau)
            slope = p.model.B(s + tau - t) - p.model.B(s - t)
            self.known[key] = (k, level, slope)
        return self.known[key]


@dataclass(frozen=True, eq=False)
class SimulatedPath(RatePath):
    """Path ``row`` of ``curves`` (whose curve is ``curve``); see the module docstring."""

    curves: PathCurves | None = None
    row: int = 0

    def discount(self, on, tau) -> np.ndarray:
        k, level, slope = self.curves.parts(on, tau)
        return np.exp(level - slope * self.curves.paths.x[self.row][k])
