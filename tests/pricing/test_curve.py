"""The bootstrapped curve: exact repricing, the par instruments' terms, interpolation laws, properties.

QuantLib comparisons are in test_curve_quantlib.py.
"""

import numpy as np
import pytest
from hypothesis import assume, example, given, settings
from hypothesis import strategies as st

from ladder.pricing.curve import (METHODS, ParCurve, bootstrap, bootstrap_many, par_instruments,
                                  tenor_problems)

TENORS = ("1M", "3M", "6M", "1Y", "2Y", "3Y", "5Y", "7Y", "10Y", "20Y", "30Y")
CURVES_PCT = {
    "upward": [3.72, 3.75, 3.77, 3.74, 3.71, 3.76, 3.89, 4.02, 4.16, 4.40, 4.36],
    "inverted": [5.55, 5.50, 5.38, 5.05, 4.62, 4.38, 4.15, 4.10, 4.05, 4.35, 4.22],
    "near_zero_short": [0.05, 0.06, 0.08, 0.15, 0.45, 0.80, 1.25, 1.60, 1.80, 2.20, 2.30],
    "jump_after_1y": [0.05, 0.06, 0.08, 0.50, 2.50, 3.00, 3.20, 3.30, 3.40, 3.50, 3.50],
    "negative": [-0.75, -0.72, -0.70, -0.68, -0.60, -0.52, -0.40, -0.25, -0.10, 0.15, 0.25],
}
DATE = np.datetime64("2026-11-30")


def par_curve(name):
    return ParCurve(TENORS, np.array(CURVES_PCT[name]) / 100)


def pv_per_100(curve):
    inst = curve.instruments
    flows = inst.cash_flows(curve.par_curve.par_yields)[0]
    return 100 * (flows * curve.discount(inst.times)).sum(axis=1)


@pytest.mark.parametrize("method", METHODS)
@pytest.mark.parametrize("name", CURVES_PCT)
def test_every_par_instrument_reprices_at_par(name, method):
    # The bootstrap's defining condition (issue 3: "to 1e-10"): each bill and par bond at 100.
    curve = bootstrap(par_curve(name), DATE, method)
    np.testing.assert_allclose(pv_per_100(curve), 100.0, rtol=0, atol=1e-10)


def test_par_instrument_terms_on_a_month_end_curve_date():
    inst = par_instruments(par_curve("upward"), DATE)
    # Maturities: curve date plus the tenor, end-of-month rule (common practice).
    assert [str(d) for d in inst.maturity_dates[:5]] == [
        "2026-12-31", "2027-02-28", "2027-05-31", "2027-11-30", "2028-11-30"]
    y = np.array(CURVES_PCT["upward"]) / 100
    flows = inst.cash_flows(y)[0]
    # 3M bill: one payment of 1 + y * days/365 (bond-equivalent yield, 31 CFR 356 App. B VI.D.1).
    days_3m = (np.datetime64("2027-02-28") - DATE).astype(int)
    k = np.flatnonzero(flows[1])
    assert len(k) == 1
    assert inst.times[k[0]] == days_3m / 365
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    assert flows[1, k[0]] == pytest.approx(1 + y[1] * days_3m / 365, rel=1e-12, abs=0)
    # 2Y par bond: four coupons of y/2 (31 CFR 356 App. B I.A: half the annual rate), on month ends
    # stepped back from the maturity, at ACT/365F times from the actual dates; 1 more at maturity.
    coupon_dates = np.array(["2027-05-31", "2027-11-30", "2028-05-31", "2028-11-30"], dtype="datetime64[D]")
    k = np.flatnonzero(flows[4])
    np.testing.assert_array_equal(inst.times[k], (coupon_dates - DATE).astype(int) / 365)
    np.testing.assert_allclose(flows[4, k], [y[4] / 2] * 3 + [1 + y[4] / 2], rtol=1e-12, atol=0)
    # 30Y bond: 60 coupons.
    assert np.count_nonzero(flows[10]) == 60


def test_log_linear_forwards_are_flat_between_nodes():
    # Log-linear discount factors <=> piecewise-constant forwards (definition of the method).
    curve = bootstrap(par_curve("upward"), DATE, "log_linear")
    nodes = curve.node_times
    for a, b in zip(nodes[:-1], nodes[1:]):
        inside = np.linspace(a, b, 7)[1:-1]
        f = curve.instantaneous_forward(inside)
        np.testing.assert_allclose(f, curve.forward_rate(a, b), rtol=0, atol=1e-13)


@pytest.mark.parametrize("name", CURVES_PCT)
def test_monotone_convex_forward_is_continuous(name):
    # Hagan and West (2006): the instantaneous forward is continuous, nodes included.
    curve = bootstrap(par_curve(name), DATE)
    nodes = curve.node_times[1:-1]
    left = curve.instantaneous_forward(nodes - 1e-9)
    right = curve.instantaneous_forward(nodes + 1e-9)
    np.testing.assert_allclose(left, right, rtol=0, atol=1e-8)
    # No jump anywhere: the largest step between neighbouring grid points shrinks with the grid.
    def largest_step(points):
        grid = np.linspace(0, curve.node_times[-1], points)
        return np.max(np.abs(np.diff(curve.instantaneous_forward(grid))))
    assert largest_step(200001) < 0.2 * largest_step(20001)


def test_monotone_convex_forward_stays_positive_when_discrete_forwards_are():
    # Hagan and West (2006), positivity amendment. 1M at 5%, then a 1M-3M forward near 0.2%, then a
    # 3M-6M forward near 5%: the basic method dips below zero here (shown in test_curve_quantlib.py).
    bills = ParCurve(("1M", "3M", "6M"), np.array([5.0, 1.8, 3.4]) / 100)
    curve = bootstrap(bills, DATE)
    fd = -np.diff(np.log(curve.node_discount)) / np.diff(curve.node_times)
    assert np.all(fd > 0)
    fine = np.linspace(0, 1.0, 20001)
    assert curve.instantaneous_forward(fine).min() >= 0.0
    np.testing.assert_allclose(pv_per_100(curve), 100.0, rtol=0, atol=1e-10)


def test_forwards_keep_the_sign_of_their_discrete_forward():
    # Hagan and West's positivity bound and its mirror for negative forwards (module docstring):
    # on a curve whose discrete forwards change sign, every interval keeps its discrete forward's sign.
    curve = bootstrap(par_curve("negative"), DATE)
    nodes = curve.node_times
    fd = -np.diff(np.log(curve.node_discount)) / np.diff(nodes)
    assert fd.min() < 0 < fd.max()
    # a forward that touches zero may land a round-off below it: 1e-12 of the largest discrete forward
    margin = 1e-12 * np.abs(fd).max()
    for a, b, sign in zip(nodes[:-1], nodes[1:], np.sign(fd)):
        assert np.all(sign * curve.instantaneous_forward(np.linspace(a, b, 201)) >= -margin)


def test_par_yields_without_positive_discount_factors_are_refused():
    # A 30Y par bond at 12% after a 20Y at 4%: its first 40 coupons alone are worth more than 100.
    impossible = ParCurve(("3M", "20Y", "30Y"), [0.04, 0.04, 0.12])
    for method in METHODS:
        with pytest.raises(ValueError, match="no curve prices these par yields at par"):
            bootstrap(impossible, DATE, method)


@pytest.mark.parametrize("method", METHODS)
def test_extrapolation_holds_the_last_discrete_forward(method):
    # Our convention (module docstring), QuantLib's too: beyond the last node the instantaneous
    # forward is flat at the last interval's average forward.
    curve = bootstrap(par_curve("upward"), DATE, method)
    end = curve.node_times[-1]
    f_end = -np.log(curve.node_discount[-1] / curve.node_discount[-2]) / (end - curve.node_times[-2])
    later = end + np.array([0.5, 5.0, 20.0])
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    np.testing.assert_allclose(curve.instantaneous_forward(later), f_end, rtol=1e-12, atol=0)
    np.testing.assert_allclose(curve.discount(later), curve.discount(end) * np.exp(-f_end * (later - end)),
                               rtol=1e-12, atol=0)


def test_zero_and_forward_rates_agree_with_discount_factors():
    curve = bootstrap(par_curve("upward"), DATE)
    t = np.array([0.1, 0.5, 1.0, 2.7, 10.0, 29.0])
    df = curve.discount(t)
    # Definitions: DF = exp(-z t) continuous; DF = (1 + z/2)^(-2t) semiannual.
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    np.testing.assert_allclose(np.exp(-curve.zero_rate(t) * t), df, rtol=1e-12, atol=0)
    np.testing.assert_allclose((1 + curve.zero_rate(t, "semiannual") / 2) ** (-2 * t), df, rtol=1e-13, atol=0)
    np.testing.assert_allclose(curve.discount(t[:-1]) / curve.discount(t[1:]),
                               np.exp(curve.forward_rate(t[:-1], t[1:]) * np.diff(t)), rtol=1e-12, atol=0)
    # At t = 0 the zero rate is its limit, the instantaneous forward at 0.
    assert curve.zero_rate(0.0) == pytest.approx(curve.instantaneous_forward(0.0), rel=1e-12, abs=0)
    assert curve.zero_rate(1e-7) == pytest.approx(curve.zero_rate(0.0), abs=1e-8, rel=0)
    assert curve.discount(0.0) == 1.0
    with pytest.raises(ValueError):
        curve.zero_rate(1.0, compounding="annual")


def test_discount_on_dates_uses_act_365f_years_and_keeps_nat():
    curve = bootstrap(par_curve("upward"), DATE)
    dates = np.array([["2027-03-15", "NaT"], ["2031-06-30", "2026-11-30"]], dtype="datetime64[D]")
    got = curve.discount_on(dates)
    assert got.shape == (2, 2)
    assert got[0, 0] == curve.discount((np.datetime64("2027-03-15") - DATE).astype(int) / 365)
    assert np.isnan(got[0, 1])
    assert got[1, 1] == 1.0


def test_times_before_the_curve_date_are_refused():
    curve = bootstrap(par_curve("upward"), DATE)
    with pytest.raises(ValueError, match="on or after the curve date"):
        curve.discount([-0.01, 1.0])
    with pytest.raises(ValueError, match="t2 > t1"):
        curve.forward_rate(2.0, 1.0)


def test_many_scenarios_at_once_equal_one_at_a_time():
    base = par_curve("upward")
    shifts = np.array([np.full(11, -300.0), np.linspace(-50, 50, 11), np.full(11, 200.0)])
    curve = bootstrap(base, DATE)
    many = curve.shifted_many(shifts)
    t = np.linspace(0, 30, 301)
    grid = many.discount(t)
    assert grid.shape == (3, 301)
    for s in range(3):
        alone = bootstrap(base.shifted(shifts[s]), DATE)
        # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
        np.testing.assert_allclose(grid[s], alone.discount(t), rtol=1e-12, atol=0)
        np.testing.assert_allclose(many[s].par_curve.par_yields, base.par_yields + shifts[s] / 1e4, rtol=1e-12, atol=0)
    same = bootstrap_many(base, DATE, base.par_yields + shifts / 1e4)
    np.testing.assert_array_equal(same.discount(t), grid)


def test_shifted_moves_the_quoted_par_yields_and_rebuilds():
    # "+100 bp" moves every quoted par yield (issue 3); the rebuilt curve prices the moved instruments.
    curve = bootstrap(par_curve("upward"), DATE)
    up = curve.shifted(100)
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    np.testing.assert_allclose(up.par_curve.par_yields, curve.par_curve.par_yields + 0.01, rtol=1e-12, atol=0)
    np.testing.assert_allclose(pv_per_100(up), 100.0, rtol=0, atol=1e-10)
    assert up.method == curve.method and up.curve_date == curve.curve_date


def test_tenor_problems_and_par_curve_validation():
    assert tenor_problems([1, 3, 6, 12, 24]) == []
    assert tenor_problems([12, 24]) == [
        (0, "the curve must start at or below 6M (a bill tenor); its first tenor is 1Y")]
    assert tenor_problems([3, 24, 12, 12, 9]) == [
        (2, "tenor 1Y comes after 2Y: list tenors from shortest to longest"),
        (3, "tenor 1Y appears twice (also entry 3)"),
        (4, "tenor 9M: tenors beyond 6M are semiannual par bonds and must be whole half-years "
            "(1Y, 18M, 2Y, ...)"),
        (4, "tenor 9M comes after 1Y: list tenors from shortest to longest")]
    with pytest.raises(ValueError, match="start at or below 6M"):
        ParCurve(("1Y", "2Y"), [0.04, 0.04])
    with pytest.raises(ValueError, match="one finite par yield per tenor"):
        ParCurve(("3M", "1Y"), [0.04])
    assert ParCurve(("3M", "12M"), [0.04, 0.04]).tenors == ("3M", "1Y")
    with pytest.raises(ValueError, match="unknown interpolation"):
        bootstrap(par_curve("upward"), DATE, "cubic")


# ---- properties (hypothesis) over ordinary curves --------------------------------------------------

ordinary_curves = st.tuples(
    st.floats(0.5, 8.0),
    st.lists(st.floats(-0.35, 0.35), min_size=len(TENORS) - 1, max_size=len(TENORS) - 1),
).map(lambda p: ParCurve(TENORS, (p[0] + np.concatenate([[0.0], np.cumsum(p[1])])) / 100))


@settings(max_examples=30, deadline=None)
@given(ordinary_curves, st.sampled_from(METHODS))
def test_property_exact_repricing(curve, method):
    # Bootstrap condition, for any ordinary curve.
    np.testing.assert_allclose(pv_per_100(bootstrap(curve, DATE, method)), 100.0, rtol=0, atol=1e-10)


@settings(max_examples=30, deadline=None)
@given(ordinary_curves, st.floats(1.0, 300.0), st.sampled_from(METHODS))
def test_property_upward_shift_lowers_every_discount_factor(curve, bp, method):
    # Common practice: higher par yields everywhere mean every future cash flow is worth less.
    base = bootstrap(curve, DATE, method)
    t = np.linspace(0.01, 35, 400)
    assert np.all(base.shifted(bp).discount(t) < base.discount(t))


@settings(max_examples=30, deadline=None)
@given(ordinary_curves)
# Found by hypothesis: a falling 30Y end pinned the last node forward to 0, and a curve extrapolated
# at that forward stopped discounting past 30Y.
@example(ParCurve(TENORS, (1.25 + np.concatenate([[0.0], np.cumsum([0.0] * 9 + [-0.3125])])) / 100))
def test_property_positive_curve_has_falling_discount_factors(curve):
    # Common practice: positive forwards <=> discount factors fall with time (monotone convex keeps
    # forwards positive when the discrete forwards are, Hagan and West 2006).
    c = bootstrap(curve, DATE)
    fd = -np.diff(np.log(c.node_discount)) / np.diff(c.node_times)
    assume(np.all(fd > 0))
    t = np.linspace(0, 35, 2000)
    assert np.all(c.instantaneous_forward(t) >= 0)
    assert np.all(np.diff(c.discount(t)) < 0)
