"""The workstation's own screen-side code, without the app: the holding detail's price/yield curve,
the rung summary's marks, table sorting, scenario text, the trade ticket's row and number text."""

from __future__ import annotations

from dataclasses import replace
from types import SimpleNamespace

import numpy as np
import pytest

from ladder.analysis.valuation import value_book
from ladder.book.cash_needs import CashNeeds
from ladder.errors import InputError
from ladder.risk.rungs import RUNGS
from ladder.tui import format as fmt
from ladder.tui.frame import sort_order
from ladder.analysis.price_yield import price_yield
from ladder.tui.holding_detail import detail
from ladder.analysis.rung_summary import rung_summary
from ladder.tui.ticket import Ticket, ticket_row
from ladder.tui.views.rates import scenario_from_text


@pytest.fixture(scope="module")
def valuation(demo_book):
    return value_book(demo_book)


def zero_coupon_book(book):
    """The demo book holds no zero-coupon bond: its longest non-callable Treasury note made one (no coupon,
    no quote, so priced on the curve plus the sector spread), alone in the book."""
    h = book.holdings
    note = np.flatnonzero((h.sector == "treasury") & (h.kind == "fixed") & ~h.callable)
    one = h.take([int(note[np.argmax(h.maturity[note])])])
    zero = replace(one, id=np.array(["ZERO-1"], object), kind=np.array(["zero"], object), coupon=np.zeros(1),
                   quote_type=np.array([""], object), quote=np.full(1, np.nan))
    return book.with_holdings(zero)


@pytest.mark.parametrize("kind", ["fixed", "zero", "discount", "at_maturity"])
def test_price_yield_curve_passes_through_the_holding_with_the_duration_slope(valuation, demo_book, kind):
    if kind == "zero":
        valuation = value_book(zero_coupon_book(demo_book))
    rows = np.flatnonzero((valuation.holdings.kind == kind) & ~valuation.holdings.callable)
    assert len(rows), f"the book holds no {kind} holding"
    i = int(rows[0])
    py = price_yield(valuation, i)
    mid = len(py.yields) // 2
    # The exact curve reprices the holding at its own yield (the valuation's dirty price).
    assert py.exact[mid] == pytest.approx(valuation.dirty[i], rel=1e-10, abs=0)
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    assert py.yields[mid] == pytest.approx(valuation.measures.ytm[i], rel=1e-12, abs=0)
    # Modified duration is -(1/P) dP/dy (yield_math docstring): the exact curve's slope at y0.
    h = py.yields[mid + 1] - py.yields[mid - 1]
    slope = (py.exact[mid + 1] - py.exact[mid - 1]) / h
    assert slope == pytest.approx(-py.p0 * valuation.measures.modified[i], rel=1e-3, abs=0)
    # Second order beats first order away from y0 (Taylor), and both meet the exact price at y0.
    far = [0, -1]
    assert np.all(np.abs(py.convexity[far] - py.exact[far]) < np.abs(py.duration[far] - py.exact[far]))
    assert py.duration[mid] == py.convexity[mid] == pytest.approx(py.p0, rel=1e-12, abs=0)


def test_funds_have_no_price_yield_curve_and_callables_show_their_calls(valuation):
    h = valuation.holdings
    fund = int(np.flatnonzero(h.kind == "fund")[0])
    assert price_yield(valuation, fund) is None
    i = int(np.flatnonzero(h.callable)[0])
    d = detail(valuation, i)
    j = int(np.flatnonzero(valuation.pricer.callable_rows == i)[0])
    calls = valuation.pricer.calls
    assert [c[0] for c in d.calls] == [str(x) for x in calls.dates[j][calls.mask[j]]]
    assert ("Yield to worst", f"{fmt.percent(valuation.yield_to_worst[i])}%") in d.call_figures


def _valuation(maturities, market_value, face=None):
    """A stand-in valuation with only what the rung summary reads: zero-coupon holdings paying their
    face at maturity."""
    maturities = np.array(maturities, dtype="datetime64[D]")
    mv = np.asarray(market_value, dtype=float)
    face = mv if face is None else np.asarray(face, float)
    holdings = SimpleNamespace(maturity=maturities, face=face, kind=np.array(["zero"] * len(mv), dtype=object))
    flows = SimpleNamespace(mask=np.ones((len(mv), 1), bool), pay_dates=maturities[:, None],
                            amount=np.full((len(mv), 1), 100.0))
    return SimpleNamespace(as_of=np.datetime64("2026-01-31"), holdings=holdings, market_value=mv,
                           pricer=SimpleNamespace(cash_flows=flows))


def test_rung_marks_gap_crowded_and_short_of_needs():
    # 0-3M, 3-6M, 6-12M, 1-2Y, 2-3Y, 3-5Y: an even ladder over all six bounded rungs holds
    # 3/60, 3/60, 6/60, 12/60, 12/60, 24/60 of the value.
    v = _valuation(["2026-03-15", "2026-06-15", "2026-09-15", "2027-06-15", "2028-06-15", "2030-06-15"],
                   [5, 5, 10, 20, 55, 5])
    needs = CashNeeds(np.array(["2026-03-01", "2026-03-20", "2026-08-01"], dtype="datetime64[D]"),
                      np.array([4.0, 2.0, 12.0]), np.array(["a", "b", "c"], dtype=object), np.array([2, 3, 4]))
    s = rung_summary(v, needs)
    assert s.rungs == RUNGS
    assert s.even_share[:6] == pytest.approx(np.array([3, 3, 6, 12, 12, 24]) / 60, rel=1e-12, abs=0)
    assert list(s.needs[:3]) == [6.0, 0.0, 12.0]
    marks = dict(zip(s.rungs, s.marks))
    assert marks["0-3M"] == ("short of needs",)      # 6 needed so far, 5 paid so far
    # 6-12M needs 12 with 10 maturing in it, but by its end 5 + 5 + 10 = 20 has been paid against
    # 6 + 0 + 12 = 18 needed: covered cumulatively (ladder.policy.liquidity), so not marked
    assert marks["6-12M"] == () and list(s.coverage.headroom[:3]) == [-1.0, 4.0, 2.0]
    assert marks["2-3Y"] == ("crowded",)             # 55% against an even 20%
    assert marks["3-5Y"] == ("gap",)                 # 5% against an even 40%
    assert marks["1-2Y"] == () and marks["5Y+"] == ()


def test_sort_order_keeps_missing_values_last_both_ways():
    values = np.array([3.0, np.nan, 1.0, 2.0, 1.0])
    assert list(sort_order(values, False)) == [2, 4, 3, 0, 1]
    assert list(sort_order(values, True)) == [0, 3, 2, 4, 1]
    text = np.array(["b", "", "a"], dtype=object)
    assert list(sort_order(text, False)) == [2, 0, 1]
    assert list(sort_order(text, True)) == [0, 2, 1]


def test_scenarios_typed_by_the_user_are_made_by_the_scenario_module(demo_book):
    curve = demo_book.curve
    assert scenario_from_text(curve, "+75").name == "+75 bp"
    assert np.all(scenario_from_text(curve, "-20").shift_bp_by_tenor == -20)
    steep = scenario_from_text(curve, "steepener 50")
    assert steep.kind == "steepener" and steep.shift_bp_by_tenor[0] == -25 and steep.shift_bp_by_tenor[-1] == 25
    assert scenario_from_text(curve, "twist -25/+25 5Y").kind == "twist"
    assert scenario_from_text(curve, "short +50").kind == "short_end"
    with pytest.raises(ValueError, match="not a scenario"):
        scenario_from_text(curve, "up a lot")


def test_a_sell_ticket_is_completed_from_the_holding_it_names(demo_book):
    h = demo_book.holdings
    row = ticket_row(Ticket("sell", {"id": str(h.id[3]), "face": "1000000"}), h)
    assert (row["sector"], row["issuer"], row["maturity_date"], row["action"]) == (
        h.sector[3], h.issuer[3], str(h.maturity[3]), "sell")
    with pytest.raises(InputError, match="ticket.csv:2:1: NOPE is not in the book"):
        ticket_row(Ticket("sell", {"id": "NOPE", "face": "1"}), h)


def test_number_text():
    assert fmt.percent(0.0425) == "4.250"
    assert fmt.money(-1234567.4, sign=True) == "-1,234,567"
    assert fmt.bp(0.00125) == "12.5"
    assert list(fmt.numbers([1.5, np.nan], 1)) == ["1.5", fmt.NA_TEXT]
    assert list(fmt.texts(np.array(["2026-01-02", "NaT"], dtype="datetime64[D]"))) == ["2026-01-02", fmt.NA_TEXT]
