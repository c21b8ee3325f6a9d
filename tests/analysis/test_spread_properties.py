"""Laws of spread shocks on option-free holdings (common practice), checked on exact revaluations.

- A wider spread lowers the price of every holding with future flows, a tighter one raises it, and
  price is convex in the spread (each flow's factor exp(-z t) is), so spread convexity is positive
  and the duration-plus-convexity estimate lies above the duration-only one.
- The duration-plus-convexity error is third order in the move: the exact change in z is the
  Taylor series of sum CF DF exp(-z t), whose third term bounds the error by V sum t^3 w |ds|^3 / 6
  (w the PV weights, taken at the moved spread: at most e^(t |ds|) <= 1.2 times today's for these
  moves); with maturities up to 10.1 years, 1.2 x 10.1^3 |ds|^3 / 6 of the value.
"""

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from ladder.analysis.shock import shock_book
from ladder.risk.scenarios import Scenario, SpreadMove

from shock_books import UPWARD_PCT, book_with, option_free

SECTORS = ("treasury", "commercial_paper", "cd")
curves = st.one_of(st.just(UPWARD_PCT), st.floats(1.0, 7.0).map(lambda level: (round(level, 2),) * 11))


@settings(max_examples=15, deadline=None)
@given(holdings=option_free(), curve_pct=curves, bp=st.sampled_from([-100.0, -25.0, 25.0, 100.0, 200.0]))
def test_spread_moves_are_monotone_convex_and_estimated_to_third_order(holdings, curve_pct, bp):
    book = book_with(holdings, curve_pct)
    moves = tuple(SpreadMove(sector, "", bp) for sector in SECTORS)
    scenario = Scenario(f"spreads {bp:+g}", "user", np.zeros(len(book.curve)), spread_moves=moves)
    r = shock_book(book, scenarios=(scenario,))
    rv = r.revaluation
    change = rv.change[0]
    assert (np.sign(change) == -np.sign(bp)).all()
    assert (r.spread_duration > 0).all() and (r.spread_convexity > 0).all()
    assert (rv.est_duration_convexity[0] > rv.est_duration[0]).all()
    ds = bp / 1e4
    bound = rv.base * 1.2 * 10.1**3 * abs(ds) ** 3 / 6
    assert (np.abs(rv.error_duration_convexity[0]) <= bound).all()
