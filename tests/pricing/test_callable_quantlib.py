"""Callable bonds on the Hull-White tree against QuantLib (test reference only).

Reference: QuantLib 1.4x CallableFixedRateBond priced by TreeCallableFixedRateBondEngine on a
HullWhite model with the same a, sigma and curve (ql/experimental/callablebonds/). QuantLib turns a
clean call price into a dirty one with the accrued interest at the call date and adds the OAS to the
short rate on its tree, as ladder does.

Tolerance 0.01 per 100 on prices, explained: both are trinomial trees converging to the same
continuous-time Hull-White value, with different discretizations. QuantLib's grid is non-uniform
with a node on every coupon and call date and its branching rounds the mean, so its tree is about
0.5 / (a dt) nodes wide; ladder's grid is a shared weekly grid (52 steps a year) with exact stub
discounting of off-grid flows, calls decided at the grid time at or before the call date, and the
0.184 / (a dt) width of Hull and White (1994). Measured differences on these bonds at the default grid
are at most 0.005 per 100 (0.002 with 365 steps a year), the same size as QuantLib's own change from
100 to 1,000 steps per bond.
"""

from __future__ import annotations

import numpy as np
import pytest

import QuantLib as ql  # a test dependency (pyproject [test]): missing, the tests fail, not skip

from ladder.pricing.callable import (  # noqa: E402
    CallableBonds, HullWhiteParams, callable_prices, option_adjusted_spreads, value_callables,
    workout_yields,
)

REF = ql.Date(15, 3, 2025)
ISSUE = ql.Date(15, 3, 2024)
ACT365 = ql.Actual365Fixed()
BOND_BASIS = ql.Thirty360(ql.Thirty360.BondBasis)
PRICE_TOL = 0.01

CURVES = {
    "flat": lambda t: 0.04 + 0.0 * np.asarray(t, float),
    "sloped": lambda t: 0.03 + 0.015 * (1.0 - np.exp(-np.asarray(t, float) / 3.0)),
}

# (coupon, maturity, first call, months between calls; 0 = once), semiannual 30/360, calls at 100
SPECS = [
    (0.045, ql.Date(15, 3, 2030), ql.Date(15, 3, 2026), 6),
    (0.050, ql.Date(15, 3, 2029), ql.Date(15, 9, 2025), 3),
    (0.040, ql.Date(15, 3, 2032), ql.Date(15, 3, 2027), 0),
    (0.060, ql.Date(15, 3, 2030), ql.Date(15, 3, 2026), 12),
    (0.055, ql.Date(15, 3, 2030), ql.Date(15, 6, 2026), 3),   # calls between coupon dates: accrued
    (0.030, ql.Date(15, 9, 2027), ql.Date(15, 9, 2025), 1),
]


def discount_of(zero):
    """Closed-form discount function of ACT/365F years for a zero-rate function."""
    return lambda t: np.exp(-zero(np.asarray(t, float)) * np.asarray(t, float))


def ql_curve(zero):
    """QuantLib zero curve on weekly nodes of ``zero`` (linear in zero rates, error below 1e-7)."""
    ql.Settings.instance().evaluationDate = REF
    dates = [REF + 7 * i for i in range(52 * 31)]
    t = np.array([ACT365.yearFraction(REF, d) for d in dates])
    zeros = zero(np.maximum(t, 1e-6))
    return ql.YieldTermStructureHandle(
        ql.ZeroCurve(dates, list(zeros), ACT365, ql.NullCalendar(), ql.Linear(), ql.Continuous))


def ql_callable(coupon, maturity, first_call, months, call_price=100.0):
    """A QuantLib callable fixed-rate bond, semiannual 30/360 bond basis, unadjusted dates."""
    schedule = ql.Schedule(ISSUE, maturity, ql.Period(ql.Semiannual), ql.NullCalendar(),
                           ql.Unadjusted, ql.Unadjusted, ql.DateGeneration.Backward, False)
    calls = ql.CallabilitySchedule()
    date, k = first_call, 0
    while date < maturity:
        calls.append(ql.Callability(ql.BondPrice(call_price, ql.BondPrice.Clean), ql.Callability.Call, date))
        if months == 0:
            break
        k += 1
        date = first_call + ql.Period(months * k, ql.Months)
    return ql.CallableFixedRateBond(0, 100.0, schedule, [coupon], BOND_BASIS, ql.Unadjusted, 100.0,
                                    ISSUE, calls)


def ladder_bonds(bonds, ids=None) -> CallableBonds:
    """The same bonds as ladder's arrays: flows and calls after REF in ACT/365F years."""
    flows = []
    for b in bonds:
        merged: dict[float, float] = {}
        for cf in b.cashflows():
            if cf.date() > REF:
                t = ACT365.yearFraction(REF, cf.date())
                merged[t] = merged.get(t, 0.0) + cf.amount()
        flows.append(sorted(merged.items()))
    calls = [[(ACT365.yearFraction(REF, c.date()), c.price().amount(), b.accruedAmount(c.date()))
              for c in b.callability() if c.date() >= REF] for b in bonds]
    n, k, m = len(bonds), max(map(len, flows)), max(max(map(len, calls)), 1)
    arrays = {name: np.zeros((n, size)) for name, size in
              (("fy", k), ("fa", k), ("cy", m), ("cp", m), ("ca", m))}
    fm, cm = np.zeros((n, k), bool), np.zeros((n, m), bool)
    for i, (f, c) in enumerate(zip(flows, calls)):
        for j, (t, a) in enumerate(f):
            arrays["fy"][i, j], arrays["fa"][i, j], fm[i, j] = t, a, True
        for j, (t, p, acc) in enumerate(c):
            arrays["cy"][i, j], arrays["cp"][i, j], arrays["ca"][i, j], cm[i, j] = t, p, acc, True
    ids = np.array(ids if ids is not None else [f"CB{i}" for i in range(n)], dtype=object)
    return CallableBonds(ids, arrays["fy"], arrays["fa"], fm, arrays["cy"], arrays["cp"], arrays["ca"], cm)


def ql_dirty(bond, curve, a, sigma, steps, oas=0.0):
    """QuantLib tree dirty price per 100 at a continuously compounded OAS."""
    bond.setPricingEngine(ql.TreeCallableFixedRateBondEngine(ql.HullWhite(curve, a, sigma), steps))
    return bond.cleanPriceOAS(oas, curve, ACT365, ql.Continuous, ql.NoFrequency, REF) + bond.accruedAmount(REF)


def ql_steps(bonds: CallableBonds) -> list[int]:
    """QuantLib time steps per bond: 100 a year of life."""
    return [int(100 * t) for t in bonds.maturity_years]


@pytest.fixture(scope="module")
def setup():
    bonds = [ql_callable(*s) for s in SPECS]
    return bonds, ladder_bonds(bonds)


@pytest.mark.parametrize("curve_name", sorted(CURVES))
@pytest.mark.parametrize("a", [0.03, 0.1])
def test_prices_match_quantlib_tree(setup, curve_name, a):
    ql_bonds, bonds = setup
    zero = CURVES[curve_name]
    curve = ql_curve(zero)
    ours = callable_prices(bonds, discount_of(zero), 0.0, HullWhiteParams(a, 0.01))
    ref = [ql_dirty(b, curve, a, 0.01, s) for b, s in zip(ql_bonds, ql_steps(bonds))]
    # QuantLib TreeCallableFixedRateBondEngine; tolerance explained in the module docstring
    np.testing.assert_allclose(ours, ref, atol=PRICE_TOL, rtol=0)


def test_calls_between_coupon_dates_add_accrued(setup):
    """The 5.5% bond is called between coupon dates at 100 plus accrued; without the accrued it is far off."""
    ql_bonds, bonds = setup
    zero = CURVES["sloped"]
    ref = ql_dirty(ql_bonds[4], ql_curve(zero), 0.03, 0.01, ql_steps(bonds)[4])
    one = bonds.ids == "CB4"
    ours = callable_prices(_take(bonds, one), discount_of(zero), 0.0)
    no_accrued = callable_prices(_take(bonds, one, accrued=0.0), discount_of(zero), 0.0)
    assert abs(ours[0] - ref) < PRICE_TOL  # QuantLib adds accrued at the call date to a clean call price
    assert abs(no_accrued[0] - ref) > 10 * PRICE_TOL


def test_oas_and_effective_measures_match_quantlib(setup):
    ql_bonds, bonds = setup
    zero = CURVES["sloped"]
    curve = ql_curve(zero)
    steps = ql_steps(bonds)
    oas_ref = 0.0035
    market = np.array([ql_dirty(b, curve, 0.03, 0.01, s, oas_ref) for b, s in zip(ql_bonds, steps)])
    # QuantLib CallableBond::OAS solves the same tree price for the spread
    oas = option_adjusted_spreads(bonds, discount_of(zero), market)
    np.testing.assert_allclose(oas, oas_ref, atol=3e-5, rtol=0)   # 0.3 bp: a price tolerance of 0.01 / duration

    def quantlib_measures(shift):
        up = np.array([ql_dirty(b, curve, 0.03, 0.01, s, oas_ref + shift) for b, s in zip(ql_bonds, steps)])
        down = np.array([ql_dirty(b, curve, 0.03, 0.01, s, oas_ref - shift) for b, s in zip(ql_bonds, steps)])
        return (down - up) / (2 * market * shift), (up + down - 2 * market) / (market * shift ** 2)

    # QuantLib CallableBond::effectiveDuration/effectiveConvexity shift the OAS, the same as a parallel
    # curve shift on the tree; formed here from dirty prices. Either tree's price noise (a few 0.001)
    # is divided by 2 P shift in duration and by P shift^2 in convexity, hence convexity at 50 bp.
    duration, _ = quantlib_measures(0.0025)
    values = value_callables(bonds, discount_of(zero), oas=oas_ref, shift=0.0025)
    np.testing.assert_allclose(values.effective_duration, duration, atol=0.01, rtol=0)
    _, convexity = quantlib_measures(0.005)
    values = value_callables(bonds, discount_of(zero), oas=oas_ref, shift=0.005)
    np.testing.assert_allclose(values.effective_convexity, convexity, atol=3.0, rtol=0)
    assert np.all(values.effective_convexity[[1, 3]] < 0)   # bonds trading near their call


def test_yields_match_quantlib_bond_yield():
    """Yield to maturity and to each call against QuantLib's bond yield (Compounded, Semiannual, 30/360).

    QuantLib's BondFunctions::yield discounts each flow by (1 + y/2)^(2 t) with t the 30/360 year
    fraction from settlement, the street convention; a yield to a call is the yield of the bond cut
    at the call date with the call price as redemption (a short last coupon pays the accrued).
    """
    settle = ql.Date(2, 5, 2025)  # between coupon dates: a broken first period
    ql.Settings.instance().evaluationDate = settle
    coupon, maturity = 0.05, ql.Date(15, 3, 2029)
    call_list = [ql.Date(15, 9, 2025), ql.Date(15, 12, 2025), ql.Date(15, 3, 2027)]
    call_price = 100.5
    dirty = 101.2

    def ql_bond_to(end, redemption):
        schedule = ql.Schedule(ISSUE, end, ql.Period(ql.Semiannual), ql.NullCalendar(), ql.Unadjusted,
                               ql.Unadjusted, ql.DateGeneration.Forward, False)
        return ql.FixedRateBond(0, 100.0, schedule, [coupon], BOND_BASIS, ql.Unadjusted, redemption)

    def ql_yield(bond):
        return ql.BondFunctions.bondYield(bond, ql.BondPrice(dirty, ql.BondPrice.Dirty), BOND_BASIS,
                                          ql.Compounded, ql.Semiannual, settle, 1e-12, 100)

    full = ql_bond_to(maturity, 100.0)
    flows = [(2 * BOND_BASIS.yearFraction(settle, cf.date()), cf.amount())
             for cf in full.cashflows() if cf.date() > settle]
    merged: dict[float, float] = {}
    for p, a in flows:
        merged[p] = merged.get(p, 0.0) + a
    periods = np.array([sorted(merged)])
    amounts = np.array([[merged[p] for p in sorted(merged)]])
    call_periods = np.array([[2 * BOND_BASIS.yearFraction(settle, d) for d in call_list]])
    accrued = np.array([[full.accruedAmount(d) for d in call_list]])
    got = workout_yields(np.array([dirty]), 2, periods, amounts, np.ones_like(periods, bool),
                         call_periods, np.full((1, 3), call_price), accrued, np.ones((1, 3), bool))
    want_calls = [ql_yield(ql_bond_to(d, call_price)) for d in call_list]
    np.testing.assert_allclose(got.to_call[0], want_calls, atol=1e-9, rtol=0)
    np.testing.assert_allclose(got.to_maturity, [ql_yield(full)], atol=1e-9, rtol=0)
    assert got.to_first_call[0] == got.to_call[0, 0]
    # worst = lowest of the calls and maturity (common practice)
    everything = want_calls + [ql_yield(full)]
    assert abs(got.to_worst[0] - min(everything)) < 1e-9
    assert got.worst_call[0] == (int(np.argmin(everything)) if np.argmin(everything) < 3 else -1)
    ql.Settings.instance().evaluationDate = REF


def _take(bonds: CallableBonds, keep, accrued=None) -> CallableBonds:
    return CallableBonds(
        bonds.ids[keep], bonds.flow_years[keep], bonds.flow_amounts[keep], bonds.flow_mask[keep],
        bonds.call_years[keep], bonds.call_prices[keep],
        bonds.call_accrued[keep] if accrued is None else np.full_like(bonds.call_accrued[keep], accrued),
        bonds.call_mask[keep])
