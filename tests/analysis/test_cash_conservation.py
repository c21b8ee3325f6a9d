"""Cash is conserved (issue 14, "Checks against the outside world" and "Done when"): after any sequence of
trades, rolls and transfers the cash account equals its opening balance plus every journal amount, to
the cent. The law is the bookkeeping identity of a single cash account (common practice)."""

from __future__ import annotations

import datetime as dt
import itertools

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from ladder.analysis.booking import book_trades
from ladder.analysis.settlement import cash_balance
from ladder.analysis.time_moves import roll_book, transfer
from ladder.book.holdings import make_holdings
from ladder.demo import write_demo
from ladder.errors import InputError
from ladder.folder.book_file import load_book
from ladder.folder.journal import read_journal
from ladder.policy.trades import Trades

CENT = 0.005   # half a cent: every amount is booked in cents

buy = st.tuples(st.just("buy"), st.integers(1, 30), st.integers(0, 20), st.sampled_from(["", "new_money",
                                                                                             "DEMO-MMF-0902"]))
sell = st.tuples(st.just("sell"), st.integers(0, 10_000), st.floats(0.05, 1.0), st.sampled_from(["", "new_money"]))
roll = st.tuples(st.just("roll"), st.integers(0, 120))
move = st.tuples(st.just("cash"), st.integers(-40_000_000, 40_000_000).filter(bool), st.integers(0, 10))
steps = st.lists(st.one_of(buy, sell, roll, move), min_size=1, max_size=6)
counter = itertools.count()


def _apply(folder, step) -> None:
    book = load_book(folder)
    v = book.valuation_date
    kind = step[0]
    if kind == "buy":
        _, millions, days, funded = step
        n = next(counter)
        h = make_holdings(id=[f"NEW-{n}"], sector=["treasury"], issuer=["US Treasury"], face=[millions * 1e6],
                          maturity=[str(v + dt.timedelta(days=400 + 30 * millions))], coupon=[0.04],
                          issue_date=[str(v - dt.timedelta(days=45))], quote_type=["price"], quote=[99.5])
        trades = Trades(h, np.array(["buy"], dtype=object), "t.csv",
                        np.array([v + dt.timedelta(days=days)], dtype="datetime64[D]"), np.array([funded], dtype=object))
    elif kind == "sell":
        _, pick, share, funded = step
        held = np.flatnonzero(book.holdings.kind != "fund")
        if not len(held):
            return
        sub = book.holdings.take(held[pick % len(held): pick % len(held) + 1])
        face = max(1000.0, round(float(sub.face[0]) * share, -3))
        from dataclasses import replace
        trades = Trades(replace(sub, face=np.array([min(face, float(sub.face[0]))])), np.array(["sell"], dtype=object),
                        "t.csv", None, np.array([funded], dtype=object))
    elif kind == "roll":
        roll_book(book, v + dt.timedelta(days=step[1]))
        return
    else:
        transfer(book, float(step[1]), v + dt.timedelta(days=step[2]), "test", allow_overdraft=True)
        return
    try:
        book_trades(book, trades, "property test")
    except InputError:            # the account could not pay: refused, nothing written
        pass


@settings(max_examples=12, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(steps=steps)
def test_cash_is_its_opening_balance_plus_every_journal_amount(tmp_path_factory, steps):
    folder = write_demo(tmp_path_factory.mktemp("conserve") / "book")
    opening = cash_balance(load_book(folder))
    for step in steps:
        _apply(folder, step)
    book = load_book(folder)
    amounts = [e.amount for e in read_journal(folder) if e.amount == e.amount]
    assert cash_balance(book) == pytest.approx(opening + sum(amounts), rel=0, abs=CENT)
    assert all(e.amount == e.amount and e.book_value == e.book_value for e in read_journal(folder))


def test_rolling_the_demo_monthly_through_2027_withdrawing_each_forecast_need(tmp_path):
    folder = write_demo(tmp_path / "book")
    book = load_book(folder)
    opening = cash_balance(book)
    month_ends = [(np.datetime64(m, "M") + 1).astype("datetime64[D]") - 1
                  for m in np.arange(np.datetime64("2026-12"), np.datetime64("2028-01"))]
    withdrawn = 0.0
    for end in month_ends:
        end = end.astype(dt.date)
        dates = book.cash_needs.date
        due = (dates > np.datetime64(book.valuation_date)) & (dates <= np.datetime64(end))
        need = round(float(book.cash_needs.amount[due].sum()), 2)
        roll_book(book, end)
        if need:
            transfer(load_book(folder), -need, end, "forecast net need")   # refused if the account runs dry
            withdrawn += need
        book = load_book(folder)                                           # loadable at every step
        assert book.valuation_date == end
    journal = read_journal(folder)
    assert cash_balance(book) == pytest.approx(opening + sum(e.amount for e in journal), rel=0, abs=CENT)
    assert sum(-e.amount for e in journal if e.action in ("withdraw", "deposit")) == pytest.approx(
        withdrawn, rel=0, abs=CENT)
    assert not (book.holdings.maturity[book.holdings.kind != "fund"] <= np.datetime64("2027-12-31")).any()
