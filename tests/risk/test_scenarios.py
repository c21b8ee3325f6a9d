"""Scenario builders: parallel sets, twists, end moves, key-rate bumps; their effect on the curve."""

import numpy as np
import pytest

from ladder.errors import InputError
from ladder.pricing.curve import ParCurve, bootstrap
from ladder.risk.scenarios import (DEFAULT_PARALLEL_BP, Scenario, flattener, key_rate_bumps, long_end_move,
                                   parallel, parallel_set, parse_bp_list, shift_matrix, short_end_move,
                                   standard_non_parallel, steepener, twist)

TENORS = ("1M", "3M", "6M", "1Y", "2Y", "3Y", "5Y", "7Y", "10Y", "20Y", "30Y")
CURVE = ParCurve(TENORS, np.array([3.72, 3.75, 3.77, 3.74, 3.71, 3.76, 3.89, 4.02, 4.16, 4.40, 4.36]) / 100)
YEARS = CURVE.years


def test_default_parallel_set():
    # Issue 3: -300 to +300 bp in 100 bp steps plus +/-25 and +/-50, sorted.
    scenarios = parallel_set(CURVE)
    assert [s.parallel_bp for s in scenarios] == [-300, -200, -100, -50, -25, 0, 25, 50, 100, 200, 300]
    assert [s.name for s in scenarios][4:7] == ["-25 bp", "0 bp", "+25 bp"]
    assert all(s.kind == "parallel" for s in scenarios)
    np.testing.assert_array_equal(scenarios[0].shift_bp_by_tenor, np.full(11, -300.0))
    assert DEFAULT_PARALLEL_BP == tuple(sorted(DEFAULT_PARALLEL_BP))


def test_custom_parallel_list_is_deduplicated_and_sorted():
    assert [s.parallel_bp for s in parallel_set(CURVE, [100, -50, 100, 0])] == [-50, 0, 100]
    assert parse_bp_list("-300,-100, 0,100,300,100") == (-300, -100, 0, 100, 300)


def test_bad_bp_list_lists_every_item():
    with pytest.raises(InputError) as caught:
        parse_bp_list("10,abc,,2000")
    assert [str(p) for p in caught.value.problems] == [
        "--bp:0:2: 'abc' is not a number of basis points",
        "--bp:0:3: '' is not a number of basis points",
        "--bp:0:4: shift 2000 bp is beyond +/-1000 bp",
    ]


def test_steepener_rotates_about_the_pivot():
    s = steepener(CURVE)
    shift = s.shift_bp_by_tenor
    assert (s.kind, s.name) == ("steepener", "steepener 100 bp about 2Y")
    assert shift[TENORS.index("2Y")] == 0.0
    assert (shift[0], shift[-1]) == (-50.0, 50.0)          # documented size: ends differ by 100 bp
    assert np.all(np.diff(shift) > 0)
    # Linear in tenor years on each side of the pivot.
    np.testing.assert_allclose(shift[:5], -50 + 50 * (YEARS[:5] - YEARS[0]) / (2 - YEARS[0]), atol=1e-12, rtol=0)
    np.testing.assert_allclose(shift[4:], 50 * (YEARS[4:] - 2) / 28, atol=1e-12, rtol=0)
    np.testing.assert_array_equal(flattener(CURVE).shift_bp_by_tenor, -shift)


def test_twist_about_another_pivot_and_refused_pivots():
    s = twist(CURVE, 50, -50, "60M")
    assert s.name == "twist +50/-50 bp about 5Y"
    assert s.shift_bp_by_tenor[TENORS.index("5Y")] == 0.0
    assert (s.shift_bp_by_tenor[0], s.shift_bp_by_tenor[-1]) == (50.0, -50.0)
    with pytest.raises(ValueError, match="pivot 1M must lie between"):
        twist(CURVE, 50, -50, "1M")
    with pytest.raises(ValueError, match="pivot 40Y must lie between"):
        steepener(CURVE, pivot="40Y")


def test_short_and_long_end_moves():
    short = short_end_move(CURVE, 100).shift_bp_by_tenor
    np.testing.assert_array_equal(short, [100, 100, 100, 100, 0, 0, 0, 0, 0, 0, 0])
    long = long_end_move(CURVE, -100).shift_bp_by_tenor
    np.testing.assert_allclose(long, [0, 0, 0, 0, 0, -100 / 3, -100, -100, -100, -100, -100], atol=1e-12, rtol=0)
    custom = short_end_move(CURVE, 60, full_to="6M", zero_from="3Y").shift_bp_by_tenor
    np.testing.assert_allclose(custom[2:6], [60, 60 * 2 / 2.5, 60 * 1 / 2.5, 0], atol=1e-12, rtol=0)
    with pytest.raises(ValueError, match="must be shorter"):
        long_end_move(CURVE, 100, zero_to="5Y", full_from="2Y")


def test_standard_non_parallel_set():
    names = [s.name for s in standard_non_parallel(CURVE)]
    assert names == ["steepener 100 bp about 2Y", "flattener 100 bp about 2Y", "short end +100 bp",
                     "short end -100 bp", "long end +100 bp", "long end -100 bp", "twist +50/-50 bp about 5Y"]


def test_key_rate_bumps_sum_to_the_parallel_shift_exactly():
    bumps = key_rate_bumps(CURVE, 25.0)
    assert [b.name for b in bumps][:2] == ["key rate 1M +25 bp", "key rate 3M +25 bp"]
    np.testing.assert_array_equal(shift_matrix(bumps).sum(axis=0), parallel(CURVE, 25.0).shift_bp_by_tenor)
    # Triangular: each is the key tenor's bump, zero at the neighbouring tenors.
    np.testing.assert_array_equal(shift_matrix(bumps), 25.0 * np.eye(11))


def key_rate_sum_gap(method, bp):
    """Largest relative gap between the summed key-rate durations and the effective duration of
    zero-coupon prices at 0.02..30 years, all from central differences of +/-bp curve rebuilds."""
    curve = bootstrap(CURVE, "2026-11-30", method)
    t = np.linspace(0.02, 30, 1500)
    price, step = curve.discount(t), 2 * bp * 1e-4
    bumps = shift_matrix(key_rate_bumps(CURVE, bp))
    key_rate = (curve.shifted_many(-bumps).discount(t) - curve.shifted_many(bumps).discount(t)) / (step * price)
    effective = (curve.shifted(-bp).discount(t) - curve.shifted(bp).discount(t)) / (step * price)
    return np.max(np.abs(key_rate.sum(axis=0) - effective) / effective)


@pytest.mark.parametrize("method,bp,tolerance", [
    ("log_linear", 25.0, 2e-3), ("log_linear", 1.0, 1e-5), ("monotone_convex", 0.01, 1e-3)])
def test_key_rate_durations_add_up_to_effective_duration(method, bp, tolerance):
    # Common practice: key-rate durations add up to the effective duration. The curve is rebuilt
    # from the bumped par yields, so the sum is exact only to first order. Log-linear is smooth in
    # its inputs; monotone convex (Hagan and West 2006) is not linear in them (its shape terms are
    # homogeneous of degree one in the forward deviations), so it adds up only for small bumps.
    assert key_rate_sum_gap(method, bp) < tolerance


def test_scenario_validation():
    with pytest.raises(ValueError, match="unknown scenario kind"):
        Scenario("x", "butterfly", np.zeros(11))
    with pytest.raises(ValueError, match="finite 1-D"):
        Scenario("x", "user", np.array([1.0, np.nan]))
