"""Valuation.subtotal: the totals of a chosen set of holdings (the workstation's filtered list)."""

from __future__ import annotations

import numpy as np
import pytest

from ladder.analysis.valuation import value_book
from ladder.demo import write_demo
from ladder.folder.book_file import load_book


@pytest.fixture(scope="module")
def valuation(tmp_path_factory):
    return value_book(load_book(write_demo(tmp_path_factory.mktemp("demo") / "book")))


def test_subtotal_of_every_holding_is_the_total(valuation):
    whole, every = valuation.totals, valuation.subtotal(np.arange(len(valuation.holdings)))
    for name in ("count", "face", "market_value", "yield_to_worst", "effective_duration", "dv01", "wam_days"):
        assert getattr(every, name) == getattr(whole, name), name


def test_subtotal_of_two_holdings_by_hand(valuation):
    # Hand arithmetic: sums add up; yields and durations are market-value-weighted means (the
    # Totals docstring), here of two holdings.
    v, rows = valuation, np.array([0, 3])
    t = v.subtotal(rows)
    mv = v.market_value[rows]
    assert t.count == 2
    assert t.market_value == pytest.approx(mv[0] + mv[1], rel=1e-15, abs=0.0)
    assert t.dv01 == pytest.approx(v.dv01[0] + v.dv01[3], rel=1e-15, abs=0.0)
    weighted = (v.yield_to_worst[0] * mv[0] + v.yield_to_worst[3] * mv[1]) / (mv[0] + mv[1])
    assert t.yield_to_worst == pytest.approx(weighted, rel=1e-13, abs=0.0)
