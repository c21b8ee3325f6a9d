"""Cash is conserved (issue 14, "Checks against the outside world" and "Done when"): after any sequence of
trades, rolls and transfers the cash account equals its opening balance plus every journal amount, to
the cent; and the book's market value plus its funds (the cash account among them) moves by exactly
the transfers, the income received, the realized gains, the interest accrued net of what trades paid
or received, the accretion less amortization and the change in unrealized gain, to the cent. Both
laws are the bookkeeping identities of a single cash account (common practice); the second uses the
month-end roll-forward's figures (``ladder.report.roll_forward``) on one side and the valuations and
journal on the other, so a movement of money that either misses shows as a difference."""

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
from ladder.report.month_end import month_end_report, record_month_end

CENT = 0.005   # half a cent: every amount is booked in cents
# The second law sums a few hundred amounts each rounded to the cent and valuations in float64: a few
# cents of rounding at most on books of about 300 million.
LAW_CENTS = 0.05
INCOME = ("coupon", "dividend")
TRANSFERS = ("deposit", "withdraw")


def _month_end(folder):
    """The month-end report of the book in ``folder`` at its valuation date, recorded in its history."""
    book = load_book(folder)
    m = month_end_report(book)
    record_month_end(book, m)
    return book, m


def _funds(book) -> float:
    """The funds' balances, the cash account among them (currency)."""
    h = book.holdings
    return float(h.face[h.kind == "fund"].sum())


def _assert_value_moves_by_its_causes(first, last, entries) -> None:
    """Securities' market value plus funds, from ``first`` (book, month-end) to ``last``, against the
    causes: transfers + income received + realized gains + accrued received on exits - accrued paid on
    buys + change in accrued + accretion - amortization + change in unrealized gain. Fund lines
    (a fund sold or bought to fund a trade, at 100) move money between funds and are left out."""
    (b0, m0), (b1, m1) = first, last
    funds = set(b0.holdings.id[b0.holdings.kind == "fund"]) | set(b1.holdings.id[b1.holdings.kind == "fund"])
    sec = [e for e in entries if e.holding not in funds]
    transfers = sum(e.amount for e in entries if e.action in TRANSFERS)
    income = sum(e.amount for e in entries if e.action in INCOME)
    exits = [e for e in sec if e.action in ("sell", "mature", "call")]
    realized = sum(e.price * e.face / 100.0 - e.book_value for e in exits)
    accrued_received = sum(e.amount - e.price * e.face / 100.0 for e in exits)
    accrued_paid = sum(-e.amount - e.book_value for e in sec if e.action == "buy")
    r0, r1 = m0.roll_forward, m1.roll_forward
    moved = (r1.market_value + _funds(b1)) - (r0.market_value + _funds(b0))
    causes = (transfers + income + realized + accrued_received - accrued_paid + (r1.accrued - r0.accrued)
              + r1.accretion - r1.amortization + (r1.unrealized_gain - r0.unrealized_gain))
    assert moved == pytest.approx(causes, rel=0, abs=LAW_CENTS)
    assert r1.unexplained == pytest.approx(0.0, rel=0, abs=LAW_CENTS) and not r1.unexplained_entries

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
    first = _month_end(folder)
    opening = cash_balance(first[0])
    for step in steps:
        _apply(folder, step)
    book = load_book(folder)
    amounts = [e.amount for e in read_journal(folder) if e.amount == e.amount]
    assert cash_balance(book) == pytest.approx(opening + sum(amounts), rel=0, abs=CENT)
    assert all(e.amount == e.amount and e.book_value == e.book_value for e in read_journal(folder))
    # past every settle date (at most 20 days ahead) and into the next month-end, then the second law
    roll_book(book, book.valuation_date + dt.timedelta(days=31))
    _assert_value_moves_by_its_causes(first, _month_end(folder), read_journal(folder))


def test_rolling_the_demo_monthly_through_2027_withdrawing_each_forecast_need(tmp_path):
    folder = write_demo(tmp_path / "book")
    book, m = _month_end(folder)
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
        before = (book, m)
        book, m = _month_end(folder)                                       # loadable at every step
        assert book.valuation_date == end
        month = [e for e in read_journal(folder) if before[0].valuation_date < e.date <= end]
        _assert_value_moves_by_its_causes(before, (book, m), month)         # each month-end ties
    journal = read_journal(folder)
    assert cash_balance(book) == pytest.approx(opening + sum(e.amount for e in journal), rel=0, abs=CENT)
    assert sum(-e.amount for e in journal if e.action in ("withdraw", "deposit")) == pytest.approx(
        withdrawn, rel=0, abs=CENT)
    assert not (book.holdings.maturity[book.holdings.kind != "fund"] <= np.datetime64("2027-12-31")).any()
