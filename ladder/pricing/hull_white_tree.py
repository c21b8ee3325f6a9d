"""Hull-White one-factor short-rate model on a trinomial tree, fitted exactly to a discount curve.

Method: J. Hull and A. White (1994), "Numerical procedures for implementing term structure models I:
single-factor models", Journal of Derivatives 2(1), 7-16. The short rate is r(t) = alpha(t) + x(t)
with dx = -a x dt + sigma dW, x(0) = 0. The tree for x has nodes x = j dx on the times t_i = i dt,
dx = sqrt(3 V); branching is normal (to j+1, j, j-1) up to |j| = j_max and bends inwards at the edge
(top node to j, j-1, j-2; bottom node to j+2, j+1, j), with the paper's probabilities

    normal:  pu = 1/6 + (j^2 M^2 + j M)/2,  pm = 2/3 - j^2 M^2,       pd = 1/6 + (j^2 M^2 - j M)/2
    top:     pu = 7/6 + (j^2 M^2 + 3jM)/2,  pm = -1/3 - j^2 M^2 - 2jM, pd = 1/6 + (j^2 M^2 + j M)/2
    bottom:  pu = 1/6 + (j^2 M^2 - j M)/2,  pm = -1/3 - j^2 M^2 + 2jM, pd = 7/6 + (j^2 M^2 - 3jM)/2

where pu/pm/pd go to the upper/middle/lower of the three children. The paper takes M = -a dt and
V = sigma^2 dt; this module uses the exact Ornstein-Uhlenbeck moments M = exp(-a dt) - 1 and
V = sigma^2 (1 - exp(-2 a dt)) / (2 a) (the same formulas hold, since they only need the mean
j M dx and the variance V = dx^2 / 3), and j_max = ceil(0.184 / -M), the smallest integer above the
paper's 0.184 / (a dt) bound that keeps every probability positive. With a = 0 (Ho-Lee) the tree never
bends. alpha(t_i) is fitted by forward induction on the Arrow-Debreu prices Q (paper, section "Second
stage") so that the tree reprices the zero-coupon bond to every grid time exactly.

Units: times in years on the curve's measure (ACT/365F from the valuation date), rates continuously
compounded decimals, the rate r at a node applying over the step that starts there.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

import numpy as np

Discount = Callable[[np.ndarray], np.ndarray]

# Hull and White (1994): probabilities stay positive for j_max * |M| between 0.184 and 0.816.
J_MAX_FACTOR = 0.184


@dataclass(frozen=True, eq=False)
class HullWhiteTree:
    """A fitted Hull-White trinomial tree on the uniform grid t_i = i * dt, i = 0..n_steps.

    Node j of step i (j = -width(i)..width(i), stored at column j + width(i)) has short rate
    ``alpha[i] + j * dx`` over [t_i, t_{i+1}]. ``state_prices[i, :2*width(i)+1]`` are the Arrow-Debreu
    prices Q_ij (value today of 1 paid at node (i, j)); their sum is the curve's DF(t_i).
    ``weights[i]`` is the triple (up, mid, down) of arrays over the nodes of step i: branching
    probability times the node's one-step discount factor exp(-r dt).
    """

    a: float
    sigma: float
    dt: float
    n_steps: int
    dx: float
    j_max: int
    alpha: np.ndarray          # (n_steps,)
    state_prices: np.ndarray   # (n_steps + 1, 2 * min(n_steps, j_max) + 1), zero-padded
    weights: tuple             # n_steps triples of (nodes_i,) arrays
    discount: Discount

    @staticmethod
    def build(discount: Discount, a: float, sigma: float, dt: float, n_steps: int) -> "HullWhiteTree":
        """Fit the tree to ``discount`` (vectorized DF of ACT/365F years) on ``n_steps`` steps of ``dt`` years.

        ``a`` is the mean reversion (per year, >= 0), ``sigma`` the absolute volatility of the short
        rate (decimal per sqrt(year), >= 0).
        """
        if a < 0 or sigma < 0 or dt <= 0 or n_steps < 1:
            raise ValueError("need a >= 0, sigma >= 0, dt > 0, n_steps >= 1")
        m = math.expm1(-a * dt)
        variance = sigma * sigma * (-math.expm1(-2 * a * dt) / (2 * a) if a > 0 else dt)
        dx = math.sqrt(3.0 * variance)
        j_max = n_steps if m == 0 else min(n_steps, math.ceil(J_MAX_FACTOR / -m))
        probs = _branch_probabilities(j_max, m)
        curve = np.asarray(discount(dt * np.arange(1, n_steps + 1)), dtype=float)

        width = np.minimum(np.arange(n_steps + 1), j_max)
        q = np.zeros((n_steps + 1, 2 * width[-1] + 1))
        q[0, 0] = 1.0
        alpha = np.empty(n_steps)
        weights = []
        for i in range(n_steps):
            w, w1 = width[i], width[i + 1]
            x = dx * np.arange(-w, w + 1)
            qi = q[i, : 2 * w + 1]
            alpha[i] = math.log(np.dot(qi, np.exp(-x * dt)) / curve[i]) / dt
            node_df = np.exp(-(alpha[i] + x) * dt)
            up, mid, down, centre = _step_branching(probs, j_max, w, w1)
            weights.append((up * node_df, mid * node_df, down * node_df))
            mass = qi * node_df
            child = centre + w1  # column of the middle child in step i + 1
            q[i + 1, : 2 * w1 + 1] = np.bincount(
                np.concatenate((child + 1, child, child - 1)),
                weights=np.concatenate((mass * up, mass * mid, mass * down)),
                minlength=2 * w1 + 1,
            )
        return HullWhiteTree(a, sigma, dt, n_steps, dx, j_max, alpha, q, tuple(weights), discount)

    def width(self, i: int) -> int:
        """Largest |j| at step ``i``."""
        return min(i, self.j_max)

    def nodes(self, i: int) -> np.ndarray:
        """x = j * dx at the nodes of step ``i`` (the short rate less alpha)."""
        w = self.width(i)
        return self.dx * np.arange(-w, w + 1)

    def stub_discount(self, i: int, times: np.ndarray, curve_discount: np.ndarray | None = None) -> np.ndarray:
        """Node discount factors from t_i to each of ``times`` (in [t_i, t_{i+1}]), shape (len(times), nodes_i).

        Row k is exp(-(alpha_k + x_j) h_k) with h_k = times[k] - t_i and alpha_k fitted like alpha in the
        forward induction, so that sum_j Q_ij * row_kj equals DF(times[k]): a cash flow between grid
        times is discounted over its stub with the node's own rate and the curve is still matched
        exactly. At h = dt the row is the node's one-step discount factor. ``curve_discount`` is
        DF(times) when the caller has it already (one curve evaluation for many steps).
        """
        times = np.asarray(times, dtype=float)
        h = times - i * self.dt
        e = np.exp(-np.outer(h, self.nodes(i)))
        w = self.width(i)
        fitted = e @ self.state_prices[i, : 2 * w + 1]
        df = self.discount(times) if curve_discount is None else curve_discount
        return e * (np.asarray(df, dtype=float) / fitted)[:, None]

    def roll_back(self, i: int, values: np.ndarray, out: np.ndarray) -> None:
        """Discounted expectation at step ``i`` of ``values`` (rows, nodes_{i+1}) into ``out[:rows]``."""
        up, mid, down = self.weights[i]
        rows = values.shape[0]
        if self.width(i + 1) > self.width(i):       # all branching normal: children j+1, j, j-1
            _stencil(values, up, mid, down, out[:rows])
            return
        inner = out[:rows, 1:-1]                     # |j| < j_max normal, edges bend inwards
        _stencil(values, up[1:-1], mid[1:-1], down[1:-1], inner)
        out[:rows, -1] = values[:, -1] * up[-1] + values[:, -2] * mid[-1] + values[:, -3] * down[-1]
        out[:rows, 0] = values[:, 2] * up[0] + values[:, 1] * mid[0] + values[:, 0] * down[0]


def _stencil(values, up, mid, down, out) -> None:
    """out = up * values[:, 2:] + mid * values[:, 1:-1] + down * values[:, :-2], with one temporary."""
    np.multiply(values[:, 2:], up, out=out)
    tmp = values[:, 1:-1] * mid
    out += tmp
    np.multiply(values[:, :-2], down, out=tmp)
    out += tmp


def _branch_probabilities(j_max: int, m: float) -> dict[str, np.ndarray]:
    """Hull-White (1994) probabilities for j = -j_max..j_max: normal branching, and edge branching.

    All are positive: normal branching needs |j M| < 0.816 (here |j M| < 0.184 + |M| for |j| < j_max),
    edge branching needs 0.1835 < j_max |M| < 1.816 (here 0.184 <= j_max |M| < 0.184 + |M|).
    """
    j = np.arange(-j_max, j_max + 1, dtype=float)
    jm, jm2 = j * m, (j * m) ** 2
    normal = (1 / 6 + (jm2 + jm) / 2, 2 / 3 - jm2, 1 / 6 + (jm2 - jm) / 2)
    top = (7 / 6 + (jm2 + 3 * jm) / 2, -1 / 3 - jm2 - 2 * jm, 1 / 6 + (jm2 + jm) / 2)
    bottom = (1 / 6 + (jm2 - jm) / 2, -1 / 3 - jm2 + 2 * jm, 7 / 6 + (jm2 - 3 * jm) / 2)
    return {"normal": np.array(normal), "top": np.array(top)[:, -1], "bottom": np.array(bottom)[:, 0]}


def _step_branching(probs, j_max: int, w: int, w1: int):
    """(up, mid, down, centre) over the nodes of a step of width ``w`` whose next step has width ``w1``.

    ``centre`` is the middle child's j; the edge nodes bend inwards only once the tree stops growing.
    """
    cols = slice(j_max - w, j_max + w + 1)
    up, mid, down = (p[cols].copy() for p in probs["normal"])
    centre = np.arange(-w, w + 1)
    if w1 == w:
        up[-1], mid[-1], down[-1] = probs["top"]
        up[0], mid[0], down[0] = probs["bottom"]
        centre[-1] -= 1
        centre[0] += 1
    return up, mid, down, centre
