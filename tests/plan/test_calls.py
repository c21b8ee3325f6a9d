"""Expected calls: the callable model's decision on the scenario's path (ladder.plan.calls).

Reference: on today's forwards the rule is the Hull-White tree of ladder.pricing.callable (itself
checked against QuantLib in tests/pricing/test_callable_quantlib.py) as its volatility goes to zero,
so the path value today must equal the tree's price at a volatility of 1e-8.
"""

from __future__ import annotations

import numpy as np
import pytest

from ladder.pricing.pricer import from_settle
from ladder.book.holdings import make_holdings
from ladder.plan.calls import expected_calls
from ladder.plan.rates import RatePath
from ladder.pricing.callable import HullWhiteParams, callable_prices
from ladder.pricing.callable_terms import call_terms
from ladder.pricing.cashflows import cash_flows
from ladder.pricing.curve import ParCurve, bootstrap

TODAY = np.datetime64("2026-11-30")
CURVE = bootstrap(ParCurve(("1M", "6M", "1Y", "2Y", "3Y", "5Y", "7Y", "10Y"),
                           np.array([3.70, 3.75, 3.72, 3.70, 3.76, 3.90, 4.02, 4.16]) / 100), TODAY)
BONDS = make_holdings(
    id=["Q", "ONCE", "M", "LOW"], sector=["agency"] * 4, face=[1e6] * 4,
    maturity=["2029-03-26", "2029-09-10", "2030-02-27", "2031-05-20"], coupon=[0.0525, 0.041, 0.0385, 0.02],
    issue_date=["2024-03-26", "2025-09-10", "2026-02-27", "2026-05-20"],
    first_call=["2027-03-26", "2027-09-10", "2027-02-27", "2027-05-20"], call_frequency=[4, 0, 12, 4],
    call_price=[100.0, 100.0, 100.0, 100.0])
OAS = np.array([0.0030, 0.0025, 0.0020, 0.0010])


def _inputs(h=BONDS):
    cf = cash_flows(h, TODAY)
    terms = call_terms(h, cf)
    return cf, terms, (cf.dates, np.where(cf.mask, cf.amount, 0.0), cf.mask, terms.dates,
                       terms.prices + terms.accrued, terms.mask, OAS[: len(h)])


@pytest.mark.parametrize("shift_bp", [-150.0, 0.0, 120.0])
def test_forward_path_is_the_tree_at_zero_volatility(shift_bp):
    cf, terms, inputs = _inputs()
    curve = CURVE.shifted(shift_bp)
    _, today = expected_calls(RatePath(curve, "forward"), *inputs)
    tree = callable_prices(terms.bonds, from_settle(curve, TODAY), OAS, HullWhiteParams(0.03, 1e-8, 52))
    assert np.allclose(today, tree, atol=1e-9, rtol=0)


def test_calls_follow_the_rates():
    """A 5.25% bond on a 3.7% curve is called at its first call; a 2% bond is not; falling rates
    never delay a call (the first call date expected is non-increasing as the curve falls)."""
    _, _, inputs = _inputs()
    base, _ = expected_calls(RatePath(CURVE), *inputs)
    assert base[0] == np.datetime64("2027-03-26") and np.isnat(base[3])
    previous = None
    for shift in (300.0, 100.0, 0.0, -100.0, -300.0):
        called, _ = expected_calls(RatePath(CURVE.shifted(shift)), *inputs)
        key = np.where(np.isnat(called), np.datetime64("2100-01-01"), called)
        if previous is not None:
            assert (key <= previous).all()
        previous = key
    assert not np.isnat(called).any()                 # 300 bp lower: every bond is called


def test_call_decision_is_dirty_to_dirty():
    """On a call date the issuer compares the call price plus accrued interest with the value of the
    later flows: a bond worth just under its redemption is not called, just over it is."""
    h = BONDS.take([1])                                            # callable once, 10 Sep 2027, 4.1%
    cf, terms, inputs = _inputs(h)
    curve = CURVE
    path = RatePath(curve)
    c = terms.dates[0, 0]
    later = cf.mask[0] & (cf.dates[0] > c)
    tau = (cf.dates[0][later] - c).astype(float) / 365.0
    hold = (cf.amount[0][later] * curve.discount(tau) * np.exp(-OAS[0] * tau)).sum()
    called, _ = expected_calls(path, *inputs)
    assert (not np.isnat(called[0])) == (hold > terms.prices[0, 0] + terms.accrued[0, 0])
