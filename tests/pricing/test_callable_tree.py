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


@pytest.mark.parametrize("a", [0.0, 0.03, 0.1, 0.5])
def test_branching_matches_the_ornstein_uhlenbeck_moments(a):
    """Hull and White (1994): each node's branches match the mean and variance of x over the step."""
    sigma, dt = 0.012, 1 / 52
    tree = HullWhiteTree.build(a, sigma, dt, 300)
    m = math.expm1(-a * dt)
    v = sigma ** 2 * (-math.expm1(-2 * a * dt) / (2 * a) if a else dt)
    for i in (0, 1, tree.j_max - 1, tree.j_max, 299):
        if i >= tree.n_steps:
            continue
        up, mid, down, centre = tree.branching(i)
        x = tree.dx * np.arange(-min(i, tree.j_max), min(i, tree.j_max) + 1)
        centre = centre * tree.dx   # the edges bend inwards once the tree stops growing
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
        tree = HullWhiteTree.build(a, 0.01, dt, 2000)
        assert tree.j_max == math.ceil(0.184 / -math.expm1(-a * dt))
        assert tree.j_max in (math.ceil(0.184 / (a * dt)), math.ceil(0.184 / (a * dt)) + 1)
        assert tree.widths.max() <= tree.j_max
    assert HullWhiteTree.build(0.0, 0.01, dt, 40).j_max == 40  # Ho-Lee: never bends


def test_pruning_leaves_out_only_unreachable_mass():
    """The nodes left out hold less than 1e-18 of probability per step; the rest is kept.

    Reference: the probabilities of j after n steps of the unpruned tree, computed here by convolving
    the (up, mid, down) branching of each node (Hull and White 1994), and the normal approximation:
    at 10 years with a = 0.03 the spread of x is about 13 dx, so about 9 standard deviations (roughly
    120 nodes either side) are kept of the 320 of the full tree.
    """
    tree = HullWhiteTree.build(0.03, 0.01, 1 / 52, 520)
    reach = np.ones(1)
    for i in range(520):
        up, mid, down, centre = tree.branching(i)
        w1 = min(i + 1, tree.j_max)
        nxt = np.zeros(2 * w1 + 1)
        for p, d in ((up, 1), (mid, 0), (down, -1)):
            np.add.at(nxt, centre + d + w1, reach * p)
        reach = nxt
        k = tree.width(i + 1)
        dropped = reach[: w1 - k].sum() + reach[w1 + k + 1:].sum()
        assert dropped < 1e-18
        if k < w1:
            assert dropped + reach[w1 - k] + reach[w1 + k] >= 1e-18
    assert 100 < tree.width(520) < 140 < tree.j_max


@pytest.mark.parametrize("curve", sorted(CURVES))
def test_state_prices_sum_to_the_curve(curve):
    """Forward induction (Hull and White 1994, second stage) fits alpha so sum_j Q_ij = DF(t_i)."""
    tree = HullWhiteTree.build(0.03, 0.01, 1 / 52, 520)
    grid = tree.dt * np.arange(tree.n_steps + 1)
    np.testing.assert_allclose(tree.state_prices(CURVES[curve]).sum(axis=1), CURVES[curve](grid), rtol=1e-12, atol=0)


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


def test_stub_weights_give_the_fitted_step_discount_at_a_full_step():
    """At h = dt a stub is the node's one-step discount factor exp(-(alpha_i + x_j) dt) of the tree
    fitted to the curve (Hull and White 1994), once the deflation D_i and DF(t_i+1) are taken out."""
    curve = CURVES["sloped"]
    tree = HullWhiteTree.build(0.03, 0.01, 1 / 52, 60)
    i = 37
    t = np.array([(i + 1) * tree.dt])
    stub = tree.stub_weights(i, t)[0] * curve(t)[0] / tree.deflators(curve)[i]
    np.testing.assert_allclose(stub, np.exp(-(tree.alpha(curve)[i] + tree.nodes(i)) * tree.dt), rtol=1e-12, atol=0)


def test_many_curves_at_once_price_as_each_curve_alone():
    """The batched roll-back (every curve a set of lanes on one lattice) against the single-curve one.

    Reference: the same bonds priced curve by curve (one lane per bond); to 1e-10 per 100.
    """
    rng = np.random.default_rng(3)
    n = 40
    maturity = rng.uniform(0.6, 8.0, n)
    k = np.arange(16)
    years = maturity[:, None] - 0.5 * k[::-1][None, :]
    mask = years > 0
    coupon = rng.uniform(2.0, 6.0, n)[:, None] / 2
    amounts = np.where(mask, coupon + 100.0 * (k == 15), 0.0)
    calls = np.clip(rng.uniform(0.1, 0.5, n)[:, None] + 0.25 * np.arange(8)[None, :], 0, None)
    bonds = CallableBonds(
        ids=np.array([f"C{i}" for i in range(n)], dtype=object), flow_years=np.where(mask, years, 0.0),
        flow_amounts=amounts, flow_mask=mask, call_years=calls, call_prices=np.full(calls.shape, 100.0),
        call_accrued=np.zeros(calls.shape), call_mask=calls < maturity[:, None] - 0.01)
    shifts = np.linspace(-0.03, 0.03, 7)
    many = lambda t: CURVES["sloped"](t)[None, :] * np.exp(-np.outer(shifts, t) * (1 + 0.1 * np.asarray(t)))
    oas = rng.uniform(-0.002, 0.004, n)
    together = callable_prices(bonds, many, oas)
    assert together.shape == (len(shifts), n)
    for s in range(len(shifts)):
        alone = callable_prices(bonds, lambda t, s=s: many(t)[s], oas, workers=1)
        np.testing.assert_allclose(together[s], alone, rtol=0, atol=1e-10)
    assert np.ptp(together, axis=0).min() > 1.0   # the curves differ enough to matter
