"""Key-rate durations: they add up to the effective duration, and a bill's sits at its own tenor."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from ladder.analysis.shock import KEY_RATE_SUM_TOLERANCE, shock_book
from ladder.pricing.curve import par_instruments
from ladder.risk.scenarios import parallel_set

from shock_books import START, TENORS, UPWARD_PCT, book_with, demo_book, months_after, notes, option_free


def test_key_rate_durations_add_up_on_the_demo_book_callables_included():
    # Issue 3: key-rate durations add up to the effective duration within a stated tolerance.
    r = shock_book(demo_book(), scenarios=())
    v = r.valuation
    gap = r.key_rate_durations.sum(axis=1) - v.effective_duration
    assert np.abs(gap).max() <= KEY_RATE_SUM_TOLERANCE
    assert demo_book().holdings.callable.sum() == 4
    assert r.portfolio_key_rate_durations.sum() == pytest.approx(v.totals.effective_duration,
                                                                  abs=KEY_RATE_SUM_TOLERANCE, rel=0)
    # The demo ladder runs to 5 years: its rate risk sits at 5Y and shorter.
    krd = dict(zip(r.tenors, r.portfolio_key_rate_durations))
    assert sum(abs(krd[t]) for t in ("10Y", "20Y", "30Y")) < 1e-3
    assert max(krd, key=krd.get) in ("2Y", "3Y", "5Y")


@settings(max_examples=15, deadline=None)
@given(option_free(), st.one_of(st.just(UPWARD_PCT), st.floats(0.5, 8.0).map(lambda x: (round(x, 2),) * 11)))
def test_key_rate_durations_add_up_on_flat_and_sloped_curves(holdings, curve_pct):
    # Flat curves are where one-bump-at-a-time key rates fail to add up on a monotone convex curve.
    r = shock_book(book_with(holdings, curve_pct), scenarios=())
    gap = r.key_rate_durations.sum(axis=1) - r.valuation.effective_duration
    assert np.abs(gap).max() <= KEY_RATE_SUM_TOLERANCE


@pytest.mark.parametrize("tenor", ["3M", "6M"])
def test_a_bill_maturing_on_a_bill_tenor_has_all_its_key_rate_duration_there(tenor):
    # A bill tenor's node discount factor is set by its own quote alone, DF = 1 / (1 + y T) (31 CFR
    # 356 App. B VI.D bond-equivalent basis, ACT/365F), so the bill's price moves with that par yield
    # only: KRD = -dP/dy / P = T / (1 + y T), to second order in the 25 bp bump; 0 at every other tenor.
    curve = book_with(par_yields_pct=UPWARD_PCT).curve
    node = par_instruments(curve, demo_book().valuation_date).maturity_dates[TENORS.index(tenor)]
    book = book_with(notes([node], [0.0], sector="treasury", kind="discount"), UPWARD_PCT)
    r = shock_book(book, scenarios=())
    k = TENORS.index(tenor)
    t = float(r.valuation.curve.years(np.array([node]))[0])
    y = UPWARD_PCT[k] / 100
    expected = np.zeros(len(TENORS))
    expected[k] = t / (1 + y * t)
    np.testing.assert_allclose(r.key_rate_durations[0], expected, rtol=1e-5, atol=1e-9)


def test_a_parallel_scenario_estimate_equals_the_key_rate_estimate():
    # For a parallel move the first-order term -V D dy equals -V sum KRD_k dy, since they add up.
    book = book_with(notes(months_after(START, [18, 40, 75]), [4.0, 3.0, 5.0]), UPWARD_PCT)
    r = shock_book(book, scenarios=parallel_set(book.curve, (100.0,)))
    key_rate = r.revaluation.base * (1 - r.key_rate_durations.sum(axis=1) * 0.01)
    np.testing.assert_allclose(r.revaluation.est_duration[0], key_rate, rtol=1e-12, atol=0)
