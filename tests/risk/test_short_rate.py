"""Hull-White paths against the model's closed forms.

Sources: D. Brigo and F. Mercurio, *Interest Rate Models: Theory and Practice*, 2nd ed., 2006, ch. 3,
sec. 3.3: the short rate r(t) = x(t) + phi(t) is normal with mean
  f(0, t) + sigma^2 / (2 a^2) (1 - e^{-a t})^2
and variance sigma^2 / (2a) (1 - e^{-2 a t}) (eq. 3.37, written out here by hand, not taken from the
code), and the model fitted to today's curve prices every zero-coupon bond at today's discount
factor: E[exp(-int_0^t r) P(t, T)] = P(0, T) (the martingale property of discounted prices).
Every check is within 4 standard errors of the sample, over the first half of the paths (the second
half is their antithetic mirror, not independent of it).
"""

import math

import numpy as np
import pytest

from ladder.pricing.curve import ParCurve, bootstrap
from ladder.risk.short_rate import HullWhite, _g, simulate

A, SIGMA = 0.03, 0.01                   # the book.toml defaults
PATHS = 20_000
HORIZONS = (0.25, 1.0, 2.0, 5.0)


@pytest.fixture(scope="module")
def curve():
    # an upward-sloping curve of invented par yields (percent)
    par = ParCurve(("3M", "6M", "1Y", "2Y", "5Y", "10Y"), np.array([4.2, 4.1, 3.9, 3.7, 3.8, 4.1]) / 100)
    return bootstrap(par, np.datetime64("2026-11-30"))


@pytest.fixture(scope="module")
def paths(curve):
    return simulate(HullWhite(A, SIGMA), curve, np.array(HORIZONS), PATHS, seed=7)


def test_short_rate_mean_and_variance_match_closed_forms(curve, paths):
    half = PATHS // 2
    for k, t in enumerate(HORIZONS, start=1):
        # the short rate read from the simulated bond prices themselves: -ln P(t, t + h) / h, h small
        h = 1e-6
        r = -np.log(paths.bond(k, t + h)[:half, 0]) / h
        mean = float(curve.instantaneous_forward(t)) + SIGMA ** 2 / (2 * A ** 2) * (1 - math.exp(-A * t)) ** 2
        var = SIGMA ** 2 / (2 * A) * (1 - math.exp(-2 * A * t))
        se_mean = r.std() / math.sqrt(half)
        centred = r - r.mean()
        se_var = math.sqrt(((centred ** 4).mean() - centred.var() ** 2) / half)
        assert abs(r.mean() - mean) <= 4 * se_mean + 1e-7, t      # + h's bias, O(h) = 1e-7 at most
        assert abs(centred.var() - var) <= 4 * se_var, t


def test_discounted_bonds_are_martingales(curve, paths):
    half = PATHS // 2
    deflator = paths.deflator()[:half]
    for k, t in enumerate(HORIZONS, start=1):
        for T in (t, t + 0.5, t + 3.0, 10.0):      # T = t: the deflator alone, E D(t) = P(0, t)
            value = deflator[:, k] * paths.bond(k, T)[:half, 0]
            se = value.std() / math.sqrt(half)
            today = float(curve.discount(T))
            assert abs(value.mean() - today) <= 4 * se, (t, T)
            assert se > 0


def test_antithetic_pairs_mirror():
    # common practice: the second half of the normals is the first half negated
    c = bootstrap(ParCurve(("6M", "2Y"), np.array([0.04, 0.04])), np.datetime64("2026-11-30"))
    p = simulate(HullWhite(A, SIGMA), c, np.array([1.0, 2.0]), 10, seed=3)
    np.testing.assert_allclose(p.x[:5], -p.x[5:], rtol=1e-12, atol=0)
    with pytest.raises(ValueError):
        simulate(HullWhite(A, SIGMA), c, np.array([1.0]), 11, seed=3)


def test_g_series_and_closed_form_agree():
    # g(u) = u + 2 e^{-u} - e^{-2u}/2 - 3/2 = u^3/3 - u^4/4 + 7 u^5/60 - ... (Taylor series by hand)
    u = 1e-3
    np.testing.assert_allclose(_g(u), u ** 3 / 3 - u ** 4 / 4 + 7 * u ** 5 / 60, rtol=1e-9, atol=0)
    for u in (0.49, 0.51, 2.0):       # on both sides of the switch to the closed form
        np.testing.assert_allclose(_g(u), u + 2 * math.exp(-u) - 0.5 * math.exp(-2 * u) - 1.5, rtol=1e-12, atol=0)
