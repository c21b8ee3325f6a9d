"""Estimates beside the exact revaluation: Taylor terms, exposure-weighted shifts, group totals."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from ladder.book.holdings import make_holdings
from ladder.pricing.cashflows import cash_flows
from ladder.pricing.yield_math import dirty_from_yield, measures_at_yield
from ladder.risk.revaluation import (Revaluation, estimated_changes, exposure_weighted_shifts, is_parallel,
                                     key_rate_durations, revalue)


def test_regression_values_of_the_8_75_bond():
    # REFERENCES.md §3.6 [D] (derived, not published): the 8 3/4% bond of 31 CFR 356 App. B II.A,
    # 15 May 1990 to 15 May 2020, at 8.84% on a coupon date (P = 99.057893 is the published price);
    # exact prices at the shocked yield, and the duration-only and duration-plus-convexity estimates.
    h = make_holdings(id=["B"], sector=["treasury"], face=[100.0], maturity=["2020-05-15"], coupon=[0.0875],
                      issue_date=["1990-05-15"], day_count=["ACT/ACT"])
    cf = cash_flows(h, np.datetime64("1990-05-15"))
    m = measures_at_yield(cf, np.array([0.0884]), h.frequency)
    assert m.dirty[0] == pytest.approx(99.057893, abs=5e-7, rel=0)         # App. B II.A, published [R][V]
    assert m.modified[0] == pytest.approx(10.481870, abs=5e-7, rel=0)      # §3.6 [D]
    assert m.convexity[0] == pytest.approx(188.8117, abs=5e-5, rel=0)      # §3.6 [D]
    shifts = np.array([0.01, -0.01, 0.02, -0.02])
    exact = [dirty_from_yield(cf, np.array([0.0884 + d]), h.frequency)[0] for d in shifts]
    first, second = estimated_changes(m.dirty, m.modified, m.convexity, m.modified[:, None], shifts[:, None])
    # §3.6 table [D]: +100, -100, +200, -200 bp
    np.testing.assert_allclose(exact, [89.543540, 110.451624, 81.531894, 124.211145], atol=5e-7, rtol=0)
    np.testing.assert_allclose(m.dirty + first[:, 0], [88.674774, 109.441012, 78.291655, 119.824131], atol=5e-7, rtol=0)
    np.testing.assert_allclose(m.dirty + second[:, 0], [89.609938, 110.376176, 82.032313, 123.564789],
                               atol=5e-7, rtol=0)


def test_fabozzi_200bp_shock_terms():
    # REFERENCES.md §3.5 [V]: 9% 20-year bond at 6%, duration 10.66, convexity 164.11 (standard scale):
    # +200 bp duration term -21.33%, convexity term +3.28%.
    first, second = estimated_changes([100.0], [10.6628], [164.106], [[10.6628]], [[0.02]])
    assert first[0, 0] == pytest.approx(-21.33, abs=0.01, rel=0)
    assert second[0, 0] - first[0, 0] == pytest.approx(3.28, abs=0.01, rel=0)


def test_parallel_and_non_parallel_first_order_terms():
    krd = np.array([[0.5, 1.5, 0.0], [0.0, 0.2, 2.8]])              # (n=2, K=3)
    duration, convexity, value = np.array([2.0, 3.0]), np.array([6.0, 12.0]), np.array([1000.0, 2000.0])
    shifts = np.array([[0.01, 0.01, 0.01], [0.02, 0.0, -0.01]])
    first, second = estimated_changes(value, duration, convexity, krd, shifts)
    # parallel: -V D dy, then + V C dy^2 / 2
    np.testing.assert_allclose(first[0], [-1000 * 2 * 0.01, -2000 * 3 * 0.01], rtol=1e-12, atol=0)
    np.testing.assert_allclose(second[0] - first[0], [0.5 * 1000 * 6 * 1e-4, 0.5 * 2000 * 12 * 1e-4],
                               rtol=1e-12, atol=0)
    # non-parallel: -V sum KRD_k dy_k; convexity on the |KRD|-weighted shift
    np.testing.assert_allclose(first[1], [-1000 * (0.5 * 0.02), -2000 * (2.8 * -0.01)], rtol=1e-12, atol=0)
    e = np.array([(0.5 * 0.02 + 0) / 2.0, (0.2 * 0 + 2.8 * -0.01) / 3.0])
    np.testing.assert_allclose(second[1] - first[1], 0.5 * value * convexity * e**2, rtol=1e-12, atol=0)
    np.testing.assert_array_equal(is_parallel(shifts), [True, False])


@settings(max_examples=60, deadline=None)
@given(st.lists(st.floats(-3.0, 3.0, allow_subnormal=False), min_size=3, max_size=3), st.floats(-0.03, 0.03),
       st.lists(st.floats(-0.03, 0.03), min_size=3, max_size=3))
def test_exposure_weighted_shift_is_an_average_of_the_tenor_shifts(krd, parallel, tenors):
    krd = np.array([krd])
    shifts = exposure_weighted_shifts(krd, np.array([[parallel] * 3, tenors]))
    if np.abs(krd).sum() == 0:
        assert np.all(shifts == 0)
        return
    # exact in real arithmetic: relative 1e-12 for round-off, and 1e-12 of the largest shift drawn (0.03)
    # for shifts near zero, where subnormal numbers lose relative precision
    assert shifts[0, 0] == pytest.approx(parallel, rel=1e-12, abs=3e-14)
    assert min(tenors) - 3e-14 <= shifts[1, 0] <= max(tenors) + 3e-14     # the same round-off margin


def test_key_rate_durations_from_cumulative_bumps_add_up_to_the_parallel_duration():
    # Rows: tenors 1..1 moved, then 1..2 moved (the parallel move). Durations 20 then 25 years.
    base = np.array([100.0, 0.0])
    down, up = np.array([[100.2, 0.0], [100.25, 0.0]]), np.array([[99.8, 0.0], [99.75, 0.0]])
    krd = key_rate_durations(base, down, up, 0.0001)
    np.testing.assert_allclose(krd, [[20.0, 5.0], [0.0, 0.0]], rtol=1e-12, atol=0)
    assert krd[0].sum() == pytest.approx((100.25 - 99.75) / (2 * 100 * 0.0001), rel=1e-12, abs=0)


def test_revaluation_totals_by_group():
    r = revalue(base_value=[100.0, 200.0, 300.0], base_price=np.array([99.0, 100.0, 101.0]),
                prices=np.array([[99.0, 100.0, 101.0], [98.0, 99.0, 100.0]]), face=[100.0, 200.0, 300.0],
                duration=np.array([1.0, 1.0, 1.0]), convexity=np.zeros(3), krd=np.ones((3, 1)),
                tenor_shifts=[[0.0], [0.01]])
    assert isinstance(r, Revaluation)
    np.testing.assert_allclose(r.change[0], 0.0, rtol=1e-12, atol=0)                       # no move, no change
    np.testing.assert_allclose(r.change[1], [-1.0, -2.0, -3.0], rtol=1e-12, atol=0)        # (price change / 100) x face
    np.testing.assert_allclose(r.est_duration[1], [99.0, 198.0, 297.0], rtol=1e-12, atol=0)
    by = r.totals(np.array([1, 0, 1]), ("a", "b"))
    np.testing.assert_allclose(by.base, [200.0, 400.0], rtol=1e-12, atol=0)
    np.testing.assert_allclose(by.change[:, 1], [-2.0, -4.0], rtol=1e-12, atol=0)
    np.testing.assert_allclose(by.relative_change[:, 1], [-0.01, -0.01], rtol=1e-12, atol=0)
    np.testing.assert_allclose(by.error_duration[:, 1], [0.0, 0.0], rtol=1e-12, atol=0)
    total = r.totals()
    np.testing.assert_allclose(total.value, by.value.sum(axis=0, keepdims=True), rtol=1e-12, atol=0)
