"""Credit on the demo book: the issue's complaints (credit never moves; a 3-month generic corporate
out-yields commercial paper) and the cash plan's combined scenarios."""


import numpy as np
import pytest

from ladder.analysis.plan import PlanOptions, plan_book
from ladder.analysis.shock import shock_book
from ladder.analysis.valuation import value_book
from ladder.build.candidates import generic_candidates
from ladder.build.rungs import make_rungs
from ladder.plan.rates import RatePath
from ladder.pricing.curve import bootstrap

from shock_books import demo_book


def test_demo_shock_has_spread_durations_and_the_credit_set():
    book = demo_book()
    r = shock_book(book)
    names = [s.name for s in r.scenarios]
    assert {"credit +50 bp", "credit +100 bp", "credit +200 bp"} <= set(names)
    non_government = ~np.isin(book.holdings.sector, ("treasury", "fund"))
    fund = book.holdings.kind == "fund"           # a fund or sweep balance: no spread sensitivity
    assert (r.spread_duration[non_government & ~fund] > 0).all() and (r.spread_duration[fund] == 0).all()
    # Every non-government holding loses value as spreads widen; Treasuries and funds do not move (their
    # spread is held): what is left is the round-off of the scenario curve rebuilt with no rate move.
    s = names.index("credit +100 bp")
    change, base = r.revaluation.change[s], r.revaluation.base
    held = ~non_government | fund
    assert (change[non_government & ~fund] < -1e-4 * base[non_government & ~fund]).all()
    assert (np.abs(change[held]) <= 1e-12 * base[held]).all()
    # A wider move costs more: the credit set is ordered.
    totals = [r.portfolio.change[0, names.index(f"credit +{bp} bp")] for bp in (50, 100, 200)]
    assert totals[0] > totals[1] > totals[2]


def test_a_3_month_generic_corporate_does_not_out_yield_commercial_paper_of_its_bucket():
    book = demo_book()
    settle = book.valuation_date
    candidates = generic_candidates(book, make_rungs("4x3M", book.policy, settle), settle).holdings
    v = value_book(book.with_holdings(candidates), settle)
    yields = dict(zip(candidates.id, v.measures.bey))
    # Long buckets against the matching short bucket (common practice: AA ~ A-1+, A ~ A-1, BBB ~ A-2); the
    # generic corporates are the ratings a corporate issuer has (no AAA).
    for long_bucket, short_bucket in (("AA", "A-1+"), ("A", "A-1"), ("BBB", "A-2")):
        corporate = yields[f"GENERIC-corporate-{long_bucket}-0-3M"]
        paper = yields[f"GENERIC-commercial_paper-{short_bucket}-0-3M"]
        assert corporate < paper, (long_bucket, corporate, paper)


def test_a_plan_scenario_moves_reinvestment_spreads_and_sale_prices():
    book = demo_book()
    options = PlanOptions(sector="corporate", rule="longest_rung")     # one tenor bought: one yield a period
    base = plan_book(book, scenario=None, options=options, with_income=False)
    wide = plan_book(book, scenario="credit +100 bp", options=options, with_income=False)
    # The reinvestment spread moves by the face-weighted move of the demo's own non-callable corporates:
    # +100 bp for AAA and AA, +150 bp for A (the credit set's scales), weighted by face by hand here.
    h = book.holdings
    corporate = (h.sector == "corporate") & ~h.callable
    scale = {"A+": 150.0, "A": 150.0, "A1": 150.0, "A2": 150.0, "AA": 100.0, "AA-": 100.0, "AAA": 100.0,
             "Aaa": 100.0}
    moves = np.array([scale[r] for r in h.rating[corporate]])
    move_bp = float((moves * h.face[corporate]).sum() / h.face[corporate].sum())
    r = base.reinvestment
    bought = ~np.isnan(wide.projection.reinvest_yield)
    on = wide.periods.end[bought]
    path = RatePath(bootstrap(book.curve, np.datetime64(book.valuation_date)))
    expected = path.purchase_terms(on, r.months, (r.spread_bp + move_bp) / 1e4).y
    assert wide.projection.reinvest_yield[bought] == pytest.approx(expected, rel=0, abs=1e-12)
    both = bought & ~np.isnan(base.projection.reinvest_yield)      # the policy's limits may stop a purchase
    assert both.any() and (wide.projection.reinvest_yield[both] > base.projection.reinvest_yield[both]).all()
    # A corporate or CD sold under wider spreads fetches less than under the base case.
    sector = dict(zip(base.holdings.id, base.holdings.sector))
    base_prices = {s.id: s.clean_price for s in base.projection.sale_list}
    for sale in wide.projection.sale_list:
        if sale.id in base_prices and sector.get(sale.id, "treasury") != "treasury":
            assert sale.clean_price < base_prices[sale.row]
