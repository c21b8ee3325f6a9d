"""The Hull-White trinomial tree: construction (Hull and White 1994) and exact fit to the curve."""

from __future__ import annotations

import math

import numpy as np
import pytest

from ladder.pricing.callable import CallableBonds, HullWhiteParams, callable_prices
from ladder.pricing.hull_white_tree import HullWhiteTree

CURVES = {
    "flat": lambda t: np.exp(-0.04 * np.asarray(t, float)),
    "sloped": lambda t: np.exp(-(0.03 + 0.015 * (1 - np.exp(-np.asarray(t, float) / 3))) * np.asarray(t, float)),
}


def probabilities(tree: HullWhiteTree, i: int):
    """Branching probabilities of step i: the stored weights less each node's one-step discount factor."""
    df = np.exp(-(tree.alpha[i] + tree.nodes(i)) * tree.dt)
    return [w / df for w in tree.weights[i]]


@pytest.mark.parametrize("a", [0.0, 0.03, 0.1, 0.5])
def test_branching_matches_the_ornstein_uhlenbeck_moments(a):
    """Hull and White (1994): each node's branches match the mean and variance of x over the step."""
    sigma, dt = 0.012, 1 / 52
    tree = HullWhiteTree.build(CURVES["flat"], a, sigma, dt, 300)
    m = math.expm1(-a * dt)
    v = sigma ** 2 * (-math.expm1(-2 * a * dt) / (2 * a) if a else dt)
    for i in (0, 1, tree.j_max - 1, tree.j_max, 299):
        if i >= tree.n_steps:
            continue
        up, mid, down = probabilities(tree, i)
        x = tree.nodes(i)
        w, w1 = tree.width(i), tree.width(i + 1)
        centre = np.arange(-w, w + 1) * tree.dx
        if w1 == w:  # edges bend inwards
            centre[0] += tree.dx
            centre[-1] -= tree.dx
        moves = (centre + tree.dx - x, centre - x, centre - tree.dx - x)
        assert min(p.min() for p in (up, mid, down)) > 0
        np.testing.assert_allclose(up + mid + down, 1.0, atol=1e-13, rtol=0)
        mean = sum(p * d for p, d in zip((up, mid, down), moves))
        second = sum(p * d * d for p, d in zip((up, mid, down), moves))
        # exact in real arithmetic; the mean is zero at the centre node, so the tolerance is 1e-12 of the
        # node spacing, the scale of the moves it is summed from (round-off is ~1e-16 of it)
        np.testing.assert_allclose(mean, m * x, rtol=0, atol=1e-12 * tree.dx)
        np.testing.assert_allclose(second, v + (m * x) ** 2, rtol=1e-10, atol=0)   # v > 0: relative suffices


def test_width_follows_the_0184_rule():
    """Hull and White (1994): j_max is the smallest integer above 0.184 / (a dt)."""
    dt = 1 / 52
    for a in (0.01, 0.03, 0.1, 0.5):
        tree = HullWhiteTree.build(CURVES["flat"], a, 0.01, dt, 2000)
        assert tree.j_max == math.ceil(0.184 / -math.expm1(-a * dt))
        assert tree.j_max in (math.ceil(0.184 / (a * dt)), math.ceil(0.184 / (a * dt)) + 1)
        assert tree.state_prices.shape[1] == 2 * tree.j_max + 1
    assert HullWhiteTree.build(CURVES["flat"], 0.0, 0.01, dt, 40).j_max == 40  # Ho-Lee: never bends


@pytest.mark.parametrize("curve", sorted(CURVES))
def test_state_prices_sum_to_the_curve(curve):
    """Forward induction (Hull and White 1994, second stage) fits alpha so sum_j Q_ij = DF(t_i)."""
    tree = HullWhiteTree.build(CURVES[curve], 0.03, 0.01, 1 / 52, 520)
    grid = tree.dt * np.arange(tree.n_steps + 1)
    np.testing.assert_allclose(tree.state_prices.sum(axis=1), CURVES[curve](grid), rtol=1e-12, atol=0)


@pytest.mark.parametrize("curve", sorted(CURVES))
@pytest.mark.parametrize("a,sigma", [(0.03, 0.01), (0.1, 0.02), (0.0, 0.008)])
def test_zero_coupon_bonds_reprice_exactly(curve, a, sigma):
    """Common practice: a short-rate tree fitted to the curve reprices its zero-coupon bonds.

    Rolled back through the pricing path, on and between grid times (rel. 1e-10).
    """
    times = np.array([0.003, 1 / 52, 0.5, 1.0, 2.7183, 5.0, 7.77, 10.0, 14.99])
    n = len(times)
    zeros = CallableBonds(
        ids=np.array([f"Z{i}" for i in range(n)], dtype=object), flow_years=times[:, None],
        flow_amounts=np.full((n, 1), 100.0), flow_mask=np.ones((n, 1), bool),
        call_years=np.zeros((n, 1)), call_prices=np.zeros((n, 1)), call_accrued=np.zeros((n, 1)),
        call_mask=np.zeros((n, 1), bool))
    prices = callable_prices(zeros, CURVES[curve], 0.0, HullWhiteParams(a, sigma))
    np.testing.assert_allclose(prices, 100 * CURVES[curve](times), rtol=1e-10, atol=0)


def test_stub_discount_matches_the_step_discount_at_a_full_step():
    tree = HullWhiteTree.build(CURVES["sloped"], 0.03, 0.01, 1 / 52, 60)
    i = 37
    np.testing.assert_allclose(tree.stub_discount(i, np.array([(i + 1) * tree.dt]))[0],
                               np.exp(-(tree.alpha[i] + tree.nodes(i)) * tree.dt), rtol=1e-13, atol=0)
