"""Credit shocks and spread duration against QuantLib (a test reference only; ``ladder`` never imports it).

Our z-spread convention (``ladder.pricing.spreads``): continuously compounded on ACT/365F years from
settlement, added to the curve's zero rate. QuantLib's ``BondFunctions.dirtyPrice(bond, curve,
zSpread, Actual365Fixed, Continuous, Annual, settlement)`` discounts on the curve with the same
spread (a ``ZeroSpreadedTermStructure``), so:
1. a spread move of s bp, alone or with a rate move, prices each option-free note at QuantLib's price
   at the z-spread plus s on the (moved) curve, to 1e-9 per 100;
2. the spread duration (our central difference at +/- 1 bp) is QuantLib's central difference at the
   same bump to 1e-7 years (1e-9 per 100 in each price over a 2 bp span), and equals the analytic
   duration to a parallel move of the continuously compounded zero rates, sum t CF DF e^(-z t) / P
   over QuantLib's own flows and discount factors, to the bump's truncation error h^2 sum t^3 w / 6
   (below 1e-6 years for these notes): spread duration equals effective duration for an option-free
   bond (common practice), both measured by the same zero-rate move.
"""

import datetime as dt
import sys
from pathlib import Path

import numpy as np
import pytest

ql = pytest.importorskip("QuantLib")

from ladder.analysis.shock import shock_book  # noqa: E402
from ladder.book.holdings import Holdings  # noqa: E402
from ladder.risk.credit import SPREAD_SHIFT_BP  # noqa: E402
from ladder.risk.scenarios import Scenario, SpreadMove, parallel  # noqa: E402

from shock_books import UPWARD_PCT, TENORS, book_with, months_after, notes  # noqa: E402
from test_shock_quantlib import ql_note  # noqa: E402

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "pricing"))
from test_curve_quantlib import quantlib_curve  # noqa: E402

DATE = dt.date(2026, 3, 16)
MATURITIES = months_after(dt.date(2026, 9, 15), [0, 9, 20, 33, 51, 62])
ISSUES = months_after(dt.date(2023, 3, 15), [0, 3, 0, 3, 0, 3])
COUPONS = [3.0, 4.25, 1.75, 5.0, 3.875, 4.5]
SPREAD_MOVES_BP = (-25.0, 50.0, 100.0, 200.0)


@pytest.fixture(autouse=True)
def _restore_evaluation_date():
    saved = ql.Settings.instance().evaluationDate
    yield
    ql.Settings.instance().evaluationDate = saved


def _book():
    holdings = Holdings.concat([notes(MATURITIES, COUPONS, sector="corporate", issue_dates=ISSUES, prefix="C"),
                                notes(MATURITIES, COUPONS, issue_dates=ISSUES, prefix="T")])
    return book_with(holdings, UPWARD_PCT, valuation_date=DATE)


def _bonds(book):
    k = len(MATURITIES)
    return [ql_note(ISSUES[j % k], MATURITIES[j % k], COUPONS[j % k] / 100, book.holdings.day_count[j])[0]
            for j in range(len(book.holdings))]


def _ql_dirty(bond, curve, z, ref):
    return ql.BondFunctions.dirtyPrice(bond, curve, float(z), ql.Actual365Fixed(), ql.Continuous, ql.Annual, ref)


def test_spread_shocks_alone_and_with_a_rate_move_are_quantlib_prices_at_the_moved_z_spread():
    book = _book()
    n_tenors = len(TENORS)
    scenarios = [Scenario(f"corporate {bp:+g}", "user", np.zeros(n_tenors),
                          spread_moves=(SpreadMove("corporate", "", bp),)) for bp in SPREAD_MOVES_BP]
    up = parallel(book.curve, 100.0)
    scenarios.append(Scenario("rates +100, corporate +50", "user", up.shift_bp_by_tenor,
                              spread_moves=(SpreadMove("corporate", "", 50.0),)))
    result = shock_book(book, scenarios=scenarios)
    ours = result.revaluation.value / (book.holdings.face / 100)
    z = result.valuation.spread
    corporate = book.holdings.sector == "corporate"
    bonds = _bonds(book)
    for s, scenario in enumerate(scenarios):
        curve, ref = quantlib_curve(DATE, TENORS, np.array(UPWARD_PCT) / 100 + scenario.shift_bp_by_tenor / 1e4,
                                    "monotone_convex")
        move = scenario.spread_moves[0].bp / 1e4
        for j, bond in enumerate(bonds):
            theirs = _ql_dirty(bond, curve, z[j] + (move if corporate[j] else 0.0), ref)
            assert ours[s, j] == pytest.approx(theirs, rel=0, abs=1e-9), (scenario.name, book.holdings.id[j])


def test_spread_duration_is_quantlibs_and_the_analytic_zero_rate_duration():
    book = _book()
    result = shock_book(book, scenarios=())
    z = result.valuation.spread
    curve, ref = quantlib_curve(DATE, TENORS, np.array(UPWARD_PCT) / 100, "monotone_convex")
    h = SPREAD_SHIFT_BP / 1e4
    dc = ql.Actual365Fixed()
    for j, bond in enumerate(_bonds(book)):
        down, base, up = (_ql_dirty(bond, curve, z[j] + d, ref) for d in (-h, 0.0, h))
        assert result.spread_duration[j] == pytest.approx((down - up) / (2 * base * h), rel=0, abs=1e-7)
        flows = [(dc.yearFraction(ref, c.date()), c.amount()) for c in bond.cashflows() if c.date() > ref]
        t = np.array([f[0] for f in flows])
        pv = np.array([f[1] for f in flows]) * np.array([curve.discount(c.date()) for c in bond.cashflows()
                                                         if c.date() > ref]) * np.exp(-z[j] * t)
        analytic = (t * pv).sum() / pv.sum()
        truncation = h * h * (t**3 * pv).sum() / pv.sum() / 6
        assert truncation < 1e-6
        assert result.spread_duration[j] == pytest.approx(analytic, rel=0, abs=1.1 * truncation + 1e-9)
