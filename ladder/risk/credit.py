"""Credit risk: spread duration and convexity, the standard credit set, and repricing under scenarios
that move spreads as well as rates.

Spread duration and convexity of a holding (docs/methods.md, "Credit scenarios"): its own spread
(z-spread, or OAS for a callable) moved by +/- ``SPREAD_SHIFT_BP``, the curve held, and the holding
repriced through the same ``Pricer`` as every scenario:
``SD = (P(s - h) - P(s + h)) / (2 P h)`` years, ``SC = (P(s - h) + P(s + h) - 2 P) / (P h^2)`` years^2.
Under the continuously compounded z-spread convention a spread move is a parallel move of the
continuously compounded zero curve for that holding alone, so for an option-free holding SD is its
duration to such a move, ``sum t CF DF(t) e^(-z t) / P`` (common practice: spread duration equals
effective duration for an option-free bond); the central difference differs from it by about
``h^2 sum t^3 w / 6``: 2e-7 years for a 5-year note at h = 1 bp.

The standard credit set (``credit_set``): every non-government sector's spreads widened by 50, 100
and 200 bp for the best buckets (AAA, AA, A-1+), 1.5 times that for A and A-1, and twice that for
BBB, A-2, A-3 and holdings with no rated bucket; Treasuries and funds do not move.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

import numpy as np

from ladder.book.holdings import SECTORS, Holdings
from ladder.pricing.curve import Curve, CurveSet, ParCurve
from ladder.pricing.pricer import Pricer
from ladder.risk.scenarios import Scenario, SpreadMove

SPREAD_SHIFT_BP = 1.0
CREDIT_SET_BP = (50.0, 100.0, 200.0)
GOVERNMENT_SECTORS = ("treasury", "fund")
# The widening of each bucket as a multiple of the scenario's size; "" is the sector-wide move that
# holdings without a rated bucket take.
CREDIT_BUCKET_SCALE = {"AAA": 1.0, "AA": 1.0, "A-1+": 1.0, "A": 1.5, "A-1": 1.5,
                       "BBB": 2.0, "A-2": 2.0, "A-3": 2.0, "": 2.0}


def credit_widening(par_curve: ParCurve, bp: float) -> Scenario:
    """Spreads of every non-government sector widened by ``bp`` times its bucket's scale (no rate move)."""
    moves = tuple(SpreadMove(sector, bucket, bp * scale) for sector in SECTORS if sector not in GOVERNMENT_SECTORS
                  for bucket, scale in CREDIT_BUCKET_SCALE.items())
    return Scenario(f"credit {bp:+g} bp", "credit", np.zeros(len(par_curve)), spread_moves=moves)


def credit_set(par_curve: ParCurve, sizes_bp: Sequence[float] = CREDIT_SET_BP) -> tuple[Scenario, ...]:
    """The standard credit set (module docstring), smallest widening first."""
    return tuple(credit_widening(par_curve, bp) for bp in sorted(sizes_bp))


def spread_shifts(scenarios: Sequence[Scenario], holdings: Holdings) -> np.ndarray:
    """(S, n) each holding's spread move under each scenario, decimal."""
    return np.array([s.spread_shift_bp(holdings) for s in scenarios]).reshape(len(scenarios), len(holdings)) / 1e4


def at_spread(pricer: Pricer, shift) -> Pricer:
    """The same pricer with every spread moved by ``shift`` (decimal, scalar or (n,))."""
    return replace(pricer, spread=pricer.spread + shift)


def spread_risk(pricer: Pricer, curve: Curve, bump_bp: float = SPREAD_SHIFT_BP) -> tuple[np.ndarray, np.ndarray]:
    """(spread duration years, spread convexity years^2), (n,) each: see the module docstring. 0 for
    a holding without spread sensitivity (a fund) or with no price."""
    h = bump_bp / 1e4
    base = pricer.dirty(curve)
    down, up = at_spread(pricer, -h).dirty(curve), at_spread(pricer, h).dirty(curve)
    with np.errstate(invalid="ignore", divide="ignore"):
        duration = np.where(base != 0, (down - up) / (2 * base * h), 0.0)
        convexity = np.where(base != 0, (down + up - 2 * base) / (base * h * h), 0.0)
    return duration, convexity


def scenario_prices(pricer: Pricer, curves: CurveSet, shifts: np.ndarray) -> np.ndarray:
    """Dirty prices per 100 (S, n): scenario s on ``curves[s]`` with spreads moved by ``shifts[s]``
    (decimal, (S, n)); scenarios that share a spread move are priced together."""
    prices = np.empty((len(curves), len(pricer.spread)))
    distinct, group = np.unique(shifts, axis=0, return_inverse=True)
    for g, shift in enumerate(distinct):
        rows = np.flatnonzero(group.ravel() == g)
        moved = pricer if not shift.any() else at_spread(pricer, shift)
        prices[rows] = moved.dirty(replace(curves, par_yields=curves.par_yields[rows],
                                           node_discount=curves.node_discount[rows]))
    return prices
