"""Booking trades: the holdings file and the journal change together (issue 9 item 2)."""

from __future__ import annotations


import numpy as np
import pytest

import ladder.folder.transaction as transaction
from ladder.analysis.booking import book_trades
from ladder.folder.book_file import load_book
from ladder.folder.journal import read_journal
from ladder.demo import write_demo
from ladder.policy.trades import read_trades

TRADES = """id,sector,issuer,kind,face,maturity_date,coupon_pct,rating,price,action
NEW-TSY-1,treasury,US Treasury,fixed,2000000,2028-11-30,4.0,AA+,100.25,buy
DEMO-TSY-0101,treasury,US Treasury,discount,3000000,2026-12-17,,AA+,,sell
"""


@pytest.fixture()
def book(tmp_path):
    folder = tmp_path / "book"
    write_demo(folder)
    return load_book(folder)


def _trades(book, tmp_path):
    path = tmp_path / "trades.csv"
    path.write_text(TRADES, encoding="utf-8")
    return read_trades(path, book.holdings, book.valuation_date)


def test_booked_trades_change_the_holdings_and_are_journaled(book, tmp_path):
    original = (book.folder / "holdings.csv").read_bytes()
    trades = _trades(book, tmp_path)
    booked = book_trades(book, trades, "test booking")
    reread = load_book(book.folder)
    assert "NEW-TSY-1" in set(reread.holdings.id)
    held = dict(zip(reread.holdings.id, reread.holdings.face))
    assert held["DEMO-TSY-0101"] == pytest.approx(8_000_000 - 3_000_000, rel=1e-12, abs=0)
    entries = read_journal(book.folder)
    assert [(e.action, e.holding, e.face) for e in entries] == [("buy", "NEW-TSY-1", 2_000_000.0),
                                                                ("sell", "DEMO-TSY-0101", 3_000_000.0)]
    buy, sell = entries
    assert buy.price == pytest.approx(100.25, rel=1e-12, abs=0)
    assert buy.amount < 0 < sell.amount                              # cash out for a buy, in for a sale
    assert booked.entries[0].reason == "test booking"
    assert (book.folder / "versions" / booked.version / "holdings.csv").read_bytes() == original


def test_a_failure_before_the_commit_point_leaves_the_book_as_it_was(book, tmp_path, monkeypatch):
    original = (book.folder / "holdings.csv").read_bytes()
    trades = _trades(book, tmp_path)

    def fail(*args):
        raise OSError("disk full (simulated)")
    monkeypatch.setattr(transaction.os, "replace", fail)      # the first rename is the commit point's
    with pytest.raises(OSError, match="disk full"):
        book_trades(book, trades, "test booking")
    monkeypatch.undo()
    assert (book.folder / "holdings.csv").read_bytes() == original
    assert not np.isin("NEW-TSY-1", load_book(book.folder).holdings.id)
    assert read_journal(book.folder) == () and not (book.folder / transaction.RECORD).exists()


def test_a_failure_after_the_commit_point_is_finished_by_the_next_load(book, tmp_path, monkeypatch):
    trades = _trades(book, tmp_path)
    real_replace = transaction.os.replace

    def fail_on_the_holdings(source, target):
        if str(target).endswith("holdings.csv"):
            raise OSError("disk full (simulated)")
        real_replace(source, target)
    monkeypatch.setattr(transaction.os, "replace", fail_on_the_holdings)
    with pytest.raises(OSError, match="disk full"):
        book_trades(book, trades, "test booking")
    monkeypatch.undo()
    assert b"NEW-TSY-1" not in (book.folder / "holdings.csv").read_bytes()      # committed, not yet applied
    assert (book.folder / transaction.RECORD / transaction.MANIFEST).exists()
    reread = load_book(book.folder)
    assert "NEW-TSY-1" in set(reread.holdings.id)
    assert [e.holding for e in read_journal(book.folder)] == ["NEW-TSY-1", "DEMO-TSY-0101"]
    assert not (book.folder / transaction.RECORD).exists()
