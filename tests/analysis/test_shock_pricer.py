"""``Pricer.dirty`` on a set of scenario curves: one array operation, the same prices as curve by curve."""

import numpy as np

from ladder.analysis.valuation import value_book
from ladder.pricing.spreads import dirty_at_spread, settle_discount

from shock_books import demo_book


def test_scenario_prices_equal_the_one_curve_formula():
    # Reference: the pricing formula of ladder.pricing.spreads, applied to each curve on its own.
    book = demo_book()
    v = value_book(book)
    pricer = v.pricer
    curves = v.curve.shifted_many(np.array([[-200.0], [-25.0], [0.0], [60.0], [300.0]]) * np.ones(len(book.curve)))
    prices = pricer.dirty(curves)
    assert prices.shape == (5, len(book.holdings))
    option_free = ~book.holdings.callable
    for s in range(len(curves)):
        expected = dirty_at_spread(pricer.cash_flows, settle_discount(curves[s], pricer.cash_flows), pricer.spread)
        np.testing.assert_allclose(prices[s, option_free], expected[option_free], rtol=1e-13, atol=0)
    # Callables are priced by callable_prices itself, so comparing with it could not fail; the tree is
    # checked against QuantLib in tests/pricing/test_callable_quantlib.py.
    # One curve gives one row; the base curve reprices every holding at its valuation price.
    np.testing.assert_allclose(pricer.dirty(curves[2]), prices[2], rtol=1e-13, atol=0)
    np.testing.assert_allclose(pricer.dirty(v.curve), v.dirty, rtol=1e-9, atol=0)
    assert len(pricer.callable_rows) == 4


def test_a_later_settlement_date_prices_from_that_date():
    demo = demo_book()
    at = demo.valuation_date.replace(day=15, month=1, year=demo.valuation_date.year + 1)
    book = demo.with_holdings(demo.holdings.take(demo.holdings.maturity > np.datetime64(at)))
    v = value_book(book, at)
    curves = v.curve.shifted_many(np.array([[-100.0], [100.0]]) * np.ones(len(book.curve)))
    prices = v.pricer.dirty(curves)
    option_free = ~book.holdings.callable
    assert v.pricer.cash_flows.settle[0] == np.datetime64(at)
    for s in range(2):
        expected = dirty_at_spread(v.pricer.cash_flows, settle_discount(curves[s], v.pricer.cash_flows),
                                   v.pricer.spread)
        np.testing.assert_allclose(prices[s, option_free], expected[option_free], rtol=1e-13, atol=0)
