"""Laws of rate shocks on option-free holdings (common practice), checked on exact revaluations.

- Option-free holdings have positive convexity (K. Bigel, Fixed Income Mathematics, §9.34
  "Properties of Convexity", Touro University Pressbooks), so the duration-plus-convexity estimate
  lies above the duration-only one.
- The duration-plus-convexity error is third order: it grows roughly with the cube of the shift.
- For shifts of 100 bp or more the duration-plus-convexity estimate beats duration alone.

Holdings are notes, discount paper and CDs priced from the curve. Curves: flat at a drawn level, or
the smooth rising curve of ``shock_books``; and the demo book's own option-free holdings maturing
after the curve's first coupon-bond tenor (1Y). Within the first year of the demo's humped curve
the curvature measured off the curve is the interpolation's as much as the holding's: a 35-day
deposit's effective convexity is -0.03 (its yield convexity 0.02) and, for notes of 8 to 12 months,
errors of a few currency units per million move erratically with the shift; they are left out.
"""

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from ladder.analysis.shock import shock_book
from ladder.risk.scenarios import parallel_set

from shock_books import UPWARD_PCT, book_with, demo_book, option_free

SHIFTS = (-300.0, -200.0, -100.0, 100.0, 200.0, 300.0)
curves = st.one_of(st.just(UPWARD_PCT), st.floats(1.0, 7.0).map(lambda level: (round(level, 2),) * 11))


def shocked(holdings, curve_pct, shifts=SHIFTS):
    book = book_with(holdings, curve_pct)
    return shock_book(book, scenarios=parallel_set(book.curve, shifts))


def demo_beyond_one_year():
    book = demo_book()
    h = book.holdings
    r = shock_book(book, scenarios=parallel_set(book.curve, SHIFTS))
    one_year = r.valuation.curve.instruments.maturity_dates[book.curve.tenors.index("1Y")]
    return r, ~h.callable & (h.kind != "fund") & (h.maturity > one_year)


@settings(max_examples=15, deadline=None)
@given(option_free(), curves)
def test_option_free_holdings_have_positive_convexity(holdings, curve_pct):
    r = shocked(holdings, curve_pct)
    assert np.all(r.valuation.effective_convexity > 0)
    rv = r.revaluation
    assert np.all(rv.est_duration_convexity >= rv.est_duration)          # above, both ways


def _cube_slopes(r, rows):
    """log-log slope of |duration + convexity error| from 100 to 200 and 200 to 300 bp, both ways."""
    e = np.abs(r.revaluation.error_duration_convexity[:, rows])
    down, up = e[[2, 1, 0]], e[[3, 4, 5]]
    steps = np.log([2.0, 1.5])[:, None]
    return np.concatenate([np.log(side[1:] / side[:-1]) / steps for side in (down, up)])


@settings(max_examples=15, deadline=None)
@given(option_free(), curves)
def test_duration_convexity_error_grows_with_the_cube_of_the_shift(holdings, curve_pct):
    r = shocked(holdings, curve_pct)
    notes_ = np.flatnonzero(np.char.startswith(holdings.id.astype(str), "N"))
    slopes = _cube_slopes(r, notes_)
    assert np.all((slopes > 2.7) & (slopes < 3.4)), slopes


@settings(max_examples=15, deadline=None)
@given(option_free(), curves)
def test_convexity_beats_duration_alone_for_shifts_of_100bp_or_more(holdings, curve_pct):
    r = shocked(holdings, curve_pct)
    rv, p = r.revaluation, r.portfolio
    assert np.all(np.abs(rv.error_duration_convexity) < np.abs(rv.error_duration))
    assert np.all(np.abs(p.error_duration_convexity) < np.abs(p.error_duration))


def test_the_laws_on_the_demo_books_option_free_holdings():
    r, rows = demo_beyond_one_year()
    assert rows.sum() >= 30
    assert np.all(r.valuation.effective_convexity[rows] > 0)
    slopes = _cube_slopes(r, rows)
    assert np.all((slopes > 2.7) & (slopes < 3.4)), slopes
    rv = r.revaluation
    assert np.all(np.abs(rv.error_duration_convexity[:, rows]) < np.abs(rv.error_duration[:, rows]))
