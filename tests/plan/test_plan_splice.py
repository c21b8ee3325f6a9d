"""The plan reworks only the holdings a scenario calls and splices them into the whole book's cash
worked out to maturity: the same cash as working out the whole book with those calls, because each
holding's cash, income, cost and accrued interest depend on that holding alone (a law of the
computation, checked on the demo book's callables)."""

from __future__ import annotations

from dataclasses import fields

import numpy as np

from ladder.analysis.plan import PlanOptions, _Planner, resolve_scenario
from ladder.analysis.valuation import value_book
from ladder.demo import write_demo
from ladder.folder.book_file import load_book
from ladder.plan.holding_flows import holding_cash
from ladder.plan.periods import make_periods
from ladder.plan.reinvestment import resolve_reinvestment, with_spread
from ladder.pricing.amortization import CallSchedule, amortize


def test_spliced_cash_equals_the_whole_book_worked_out_with_the_calls(tmp_path):
    write_demo(tmp_path)
    book = load_book(tmp_path)
    v = value_book(book)
    r = with_spread(resolve_reinvestment(book, book.valuation_date), book, v.spread)
    planner = _Planner(book, v, PlanOptions(), r)
    periods = make_periods(planner.as_of, 24, planner.options.period)
    redeemed = planner.redeemed_on(planner.path(resolve_scenario(book, None, -300)), planner.spread)
    assert (~np.isnat(redeemed)).sum() >= 1 and np.isnat(redeemed).sum() >= 1   # some called, some not
    spliced = planner.holding_cash(periods, redeemed)
    source = str(book.files["holdings"])
    whole = holding_cash(planner.h, planner.cf, periods, amortize(
        planner.h, purchase_price=planner.purchase_price, purchase_date=planner.purchase_date,
        calls=CallSchedule.of(planner.h, source), redeemed_on=redeemed, source=source))
    for f in fields(whole):
        if f.name == "flows":
            for g in fields(whole.flows):
                np.testing.assert_array_equal(getattr(spliced.flows, g.name), getattr(whole.flows, g.name))
        else:
            # the same arithmetic on the same rows: equal to round-off of a few operations
            a, b = getattr(spliced, f.name), getattr(whole, f.name)
            if a.dtype.kind == "M":
                np.testing.assert_array_equal(a, b)
            else:
                np.testing.assert_allclose(a, b, rtol=1e-12, atol=1e-9)
