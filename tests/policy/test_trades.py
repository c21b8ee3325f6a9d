"""Trades files (holdings columns + action), read with the book's holdings reader, and applied to a book."""

from __future__ import annotations

from ladder.demo import demo_source

import datetime as dt
from pathlib import Path

import numpy as np
import pytest

from ladder.book.holdings_file import read_holdings
from ladder.errors import InputError, Problems
from ladder.policy.trades import apply_trades, read_trades

DEMO = demo_source()
VALUATION = dt.date(2026, 11, 30)
HEADER = "id,action,sector,issuer,face,maturity_date,coupon_pct,rating,short_rating,price,discount_rate_pct\n"
BUY_CP = "NEW-CP-1,buy,commercial_paper,Marigold Foods Finance Corp,3000000,2027-04-15,,,A-1,,3.9\n"
BUY_CORP = "NEW-CORP-1,BUY,corporate,Halden Beverage Co,2000000,2029-12-01,4.5,A,,100.25,\n"
SELL_PART = "DEMO-TSY-0204,sell,treasury,US Treasury,2000000,2027-10-31,4.125,AA+,,,\n"
SELL_ALL = "DEMO-CP-0701,sell,commercial_paper,Silverbirch Financial Funding LLC,5000000,2026-12-08,,A+,A-1,,3.875\n"


@pytest.fixture(scope="module")
def book():
    holdings, _ = read_holdings(DEMO / "holdings.csv", VALUATION, Problems())
    return holdings


def write(tmp_path, *lines, header=HEADER) -> Path:
    path = tmp_path / "trades.csv"
    path.write_text(header + "".join(lines))
    return path


def test_read_and_apply(tmp_path, book):
    trades = read_trades(write(tmp_path, BUY_CP, BUY_CORP, SELL_PART, SELL_ALL), book, VALUATION)
    assert list(trades.action) == ["buy", "buy", "sell", "sell"]
    assert list(trades.holdings.row) == [2, 3, 4, 5]
    assert trades.label(2) == f"sell DEMO-TSY-0204 ({tmp_path / 'trades.csv'} row 4)"
    assert trades.holdings.kind[0] == "discount" and trades.holdings.coupon[1] == pytest.approx(0.045, rel=1e-12, abs=0)
    after = apply_trades(book, trades)
    assert len(after) == len(book) - 1 + 2
    assert "DEMO-CP-0701" not in set(after.id)
    assert after.face[list(after.id).index("DEMO-TSY-0204")] == 4_000_000.0     # 6m held, 2m sold
    assert list(after.id[-2:]) == ["NEW-CP-1", "NEW-CORP-1"]
    assert after.face.sum() == book.face.sum() + 5_000_000.0 - 7_000_000.0
    np.testing.assert_array_equal(book.face[:5], [8e6, 10e6, 7.5e6, 6e6, 6e6])   # the book itself is untouched


def test_every_problem_at_once(tmp_path, book):
    lines = [
        "NEW-CP-1,purchase,commercial_paper,Marigold Foods Finance Corp,3000000,2027-04-15,,,A-1,,3.9\n",
        "DEMO-CORP-0601,buy,corporate,Silverbirch Financial Corp,1000000,2027-01-25,5.375,A+,,100,\n",
        "NOPE-1,sell,corporate,Nobody,1000000,2027-01-25,5.0,A,,100,\n",
        "DEMO-TSY-0204,sell,treasury,US Treasury,7000000,2027-10-31,4.125,AA+,,,\n",
        "DEMO-CORP-0602,sell,corporate,Quillon Software,1000000,2027-05-20,2.9,AAA,,,\n",
        "DEMO-CORP-0603,sel,corporate,Kestrel Rail Systems Inc,1000000,2027-09-15,5.0,A2,,,\n",
    ]
    with pytest.raises(InputError) as err:
        read_trades(write(tmp_path, *lines), book, VALUATION)
    f = str(tmp_path / "trades.csv")
    assert [str(p) for p in err.value.problems] == [
        f"{f}:2:2: action 'purchase' is not buy or sell",
        f"{f}:3:1: DEMO-CORP-0601 is already in the book; a buy is a new lot with a new id",
        f"{f}:4:1: NOPE-1 is not in the book, so it cannot be sold",
        f"{f}:5:5: sells 7,000,000.00 face but the book holds 6,000,000.00 of DEMO-TSY-0204",
        f"{f}:6:4: issuer Quillon Software does not match the holding DEMO-CORP-0602 (Quillon Software Corp)",
        f"{f}:7:2: action 'sel' is not buy or sell (did you mean 'sell'?)",
    ]


def test_holdings_problems_come_from_the_holdings_reader(tmp_path, book):
    with pytest.raises(InputError) as err:
        read_trades(write(tmp_path, BUY_CP.replace("commercial_paper", "comercial_paper")), book, VALUATION)
    assert any(":2:3:" in str(p) and "comercial_paper" in str(p) for p in err.value.problems)


def test_action_column_is_required(tmp_path, book):
    header = HEADER.replace("id,action,", "id,")
    with pytest.raises(InputError) as err:
        read_trades(write(tmp_path, BUY_CP.replace(",buy,", ","), header=header), book, VALUATION)
    assert str(err.value) == f"{tmp_path / 'trades.csv'}:1:0: required column 'action' is missing (buy or sell)"
