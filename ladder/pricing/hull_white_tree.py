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

One lattice for every curve: the tree's geometry (dx, branching, probabilities) does not depend on
the curve, only alpha does, and alpha at a step multiplies every node's one-step discount factor by
the same number exp(-alpha_i dt). So the lattice is built once with alpha = 0: ``steps[i]`` is the
(nodes_i, nodes_{i+1}) matrix of branching probability times exp(-x_j dt), and ``arrow_debreu[i]``
(Pi_ij) are its forward-induction prices. For a curve with discount factors DF, the fitted tree's
Arrow-Debreu prices are Q_ij = D_i Pi_ij with D_i = DF(t_i) / sum_j Pi_ij (so sum_j Q_ij = DF(t_i)
exactly) and exp(-alpha_i dt) = D_{i+1} / D_i. Values rolled back with ``steps`` alone are the fitted
tree's values times D_i (U_i = D_i V_i satisfies U_i = steps[i] U_{i+1}); a cash flow at time t in
step i enters U as amount * DF(t) * ``stub_weights(i, t)``, curve-free weights times the curve's
discount factor. Any number of curves is therefore rolled back as extra columns of one array.

Units: times in years on the curve's measure (ACT/365F from the valuation date), rates continuously
compounded decimals, the rate r at a node applying over the step that starts there.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

import numpy as np
from scipy import sparse

Discount = Callable[[np.ndarray], np.ndarray]

# Hull and White (1994): probabilities stay positive for j_max * |M| between 0.184 and 0.816.
J_MAX_FACTOR = 0.184
# Probability mass of the outermost nodes left out of each step (see HullWhiteTree.build).
PRUNED_MASS = 1e-18


@dataclass(frozen=True, eq=False)
class HullWhiteTree:
    """The Hull-White trinomial lattice on the uniform grid t_i = i * dt, i = 0..n_steps, for any curve.

    Node j of step i (j = -width(i)..width(i), stored at row j + width(i)) has short rate
    ``alpha_i + j * dx`` over [t_i, t_{i+1}], alpha_i fitted to a curve by ``alpha``.
    ``steps[i]`` (nodes_i, nodes_{i+1}) sparse: branching probability times exp(-j dx dt) (alpha = 0).
    ``arrow_debreu[i, :2*width(i)+1]``: Pi_ij, the forward-induction prices with alpha = 0.
    """

    a: float
    sigma: float
    dt: float
    n_steps: int
    dx: float
    j_max: int
    widths: np.ndarray         # (n_steps + 1,) largest |j| kept at each step
    steps: tuple               # n_steps sparse.csr_matrix
    arrow_debreu: np.ndarray   # (n_steps + 1, 2 * widths.max() + 1), zero-padded

    @staticmethod
    def build(a: float, sigma: float, dt: float, n_steps: int) -> "HullWhiteTree":
        """The lattice for mean reversion ``a`` (per year, >= 0) and absolute volatility ``sigma``
        (decimal per sqrt(year), >= 0) on ``n_steps`` steps of ``dt`` years.

        Nodes that the tree reaches with probability below ``PRUNED_MASS`` in all (the outermost
        nodes of each step, both sides together) are left out: the flows they would carry change a
        price by less than that mass times the price at each step (below 1e-13 per 100 over a
        thousand steps), and the curve is still matched exactly by the nodes kept.
        """
        if a < 0 or sigma < 0 or dt <= 0 or n_steps < 1:
            raise ValueError("need a >= 0, sigma >= 0, dt > 0, n_steps >= 1")
        m = math.expm1(-a * dt)
        variance = sigma * sigma * (-math.expm1(-2 * a * dt) / (2 * a) if a > 0 else dt)
        dx = math.sqrt(3.0 * variance)
        j_max = n_steps if m == 0 else min(n_steps, math.ceil(J_MAX_FACTOR / -m))
        probs = _branch_probabilities(j_max, m)
        full = np.minimum(np.arange(n_steps + 1), j_max)
        kept = np.zeros(n_steps + 1, int)
        reach = np.ones(1)                   # probability of each node of the full tree
        steps, pi = [], [np.ones(1)]
        for i in range(n_steps):
            w, w1 = full[i], full[i + 1]
            up, mid, down, centre = _step_branching(probs, j_max, w, w1)
            p = np.stack((up, mid, down), axis=1)                        # (nodes_i, 3)
            cols = (centre + w1)[:, None] + np.array([1, 0, -1])         # children, rows of step i + 1
            reach = np.bincount(cols.ravel(), weights=(reach[:, None] * p).ravel(), minlength=2 * w1 + 1)
            kept[i + 1] = w1 - int(np.count_nonzero(np.cumsum(reach[:w1] + reach[::-1][:w1]) < PRUNED_MASS))
            k, k1 = kept[i], kept[i + 1]
            cols = cols[w - k: w + k + 1] - (w1 - k1)
            inside = (cols >= 0) & (cols <= 2 * k1)
            weight = p[w - k: w + k + 1] * np.exp(-dx * np.arange(-k, k + 1) * dt)[:, None]
            indptr = np.concatenate(([0], np.cumsum(inside.sum(axis=1))))
            steps.append(sparse.csr_matrix((weight[inside], cols[inside], indptr), shape=(2 * k + 1, 2 * k1 + 1)))
            pi.append(steps[-1].T @ pi[-1])
        arrow_debreu = np.zeros((n_steps + 1, 2 * kept.max() + 1))
        for i, row in enumerate(pi):
            arrow_debreu[i, : len(row)] = row
        return HullWhiteTree(a, sigma, dt, n_steps, dx, j_max, kept, tuple(steps), arrow_debreu)

    def width(self, i: int) -> int:
        """Largest |j| kept at step ``i``."""
        return int(self.widths[i])

    def branching(self, i: int) -> tuple[np.ndarray, ...]:
        """(up, mid, down, centre) over the nodes j = -min(i, j_max)..min(i, j_max) of step ``i`` of the
        tree before pruning: the branching probabilities and the middle child's j."""
        w, w1 = min(i, self.j_max), min(i + 1, self.j_max)
        return _step_branching(_branch_probabilities(self.j_max, math.expm1(-self.a * self.dt)), self.j_max, w, w1)

    def nodes(self, i: int) -> np.ndarray:
        """x = j * dx at the nodes of step ``i`` (the short rate less alpha)."""
        w = self.width(i)
        return self.dx * np.arange(-w, w + 1)

    def deflators(self, discount: Discount) -> np.ndarray:
        """D_i = DF(t_i) / sum_j Pi_ij for i = 0..n_steps: (n_steps + 1,), or (S, n_steps + 1) when
        ``discount`` gives S curves ((S, len(t)) for times t)."""
        grid = self.dt * np.arange(self.n_steps + 1)
        return np.asarray(discount(grid), float) / self.arrow_debreu.sum(axis=1)

    def alpha(self, discount: Discount) -> np.ndarray:
        """The drift alpha_i fitted to ``discount`` (decimal): (n_steps,) or (S, n_steps)."""
        d = np.log(self.deflators(discount))
        return -np.diff(d, axis=-1) / self.dt

    def state_prices(self, discount: Discount) -> np.ndarray:
        """Arrow-Debreu prices Q_ij of the tree fitted to one curve: (n_steps + 1, nodes), zero-padded."""
        return self.arrow_debreu * self.deflators(discount)[:, None]

    def stub_weights(self, i: int, times: np.ndarray) -> np.ndarray:
        """Curve-free weights (len(times), nodes_i) that bring 1 paid at each of ``times`` (in [t_i, t_{i+1}])
        back to the nodes of step ``i``, in deflated values: times DF(t) they are D_i times the fitted
        tree's node discount factors exp(-(alpha_k + x_j) h_k), h_k = times[k] - t_i, with alpha_k fitted
        like alpha so that sum_j Q_ij * factor_kj = DF(times[k]). A cash flow between grid times is
        discounted over its stub with the node's own rate and the curve is still matched exactly.
        """
        times = np.asarray(times, dtype=float)
        e = np.exp(-np.outer(times - i * self.dt, self.nodes(i)))
        w = self.width(i)
        return e / (e @ self.arrow_debreu[i, : 2 * w + 1])[:, None]

    def roll_back(self, i: int, values: np.ndarray) -> np.ndarray:
        """Deflated values at step ``i`` from ``values`` (nodes_{i+1}, lanes) at step i + 1."""
        return self.steps[i] @ values


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
