"""PositionMeasures and the monthly bucketing of cash flows for cash-needs coverage."""

from __future__ import annotations

import numpy as np
import pytest

from ladder.book.cash_needs import CashNeeds
from ladder.policy.measures import PositionMeasures, cash_by_month, coverage_start, days_to_maturity, month_index
from ladder.pricing.cashflows import cash_flows
from policy_books import AS_OF, NAT, book, holding, measures


def test_coverage_months_start_the_day_after_the_check_date():
    assert coverage_start(AS_OF) == np.datetime64("2025-02-01")
    dates = np.array(["2025-02-01", "2025-02-28", "2025-12-31", "2026-01-01"], dtype="datetime64[D]")
    np.testing.assert_array_equal(month_index(dates, coverage_start(AS_OF)), [0, 0, 10, 11])


def test_cash_by_month_from_the_cash_flow_matrix():
    h = book([
        holding("N1", maturity="2026-01-31", coupon=0.04, frequency=2),            # 30/360 semiannual note
        holding("B1", kind="discount", coupon=0.0, frequency=0, day_count="ACT/360", maturity="2025-03-31"),
        holding("F1", sector="fund", kind="fund", coupon=0.0, frequency=0, day_count="ACT/365F",
                maturity="2025-02-03"),
    ])
    cf = cash_flows(h, AS_OF)
    cash = cash_by_month(cf, h.face, AS_OF, 13)
    assert cash.shape == (3, 13)
    # Coupon 2% of 1,000,000 on 2025-07-31 (month 5). Maturity 2026-01-31 is a Saturday, paid on the
    # following business day, Monday 2026-02-02: month 12 (business-day rolling: common practice).
    expected = np.zeros(13)
    expected[5], expected[12] = 20_000.0, 1_020_000.0
    np.testing.assert_allclose(cash[0], expected, rtol=1e-12, atol=0)
    assert cash[1, 1] == pytest.approx(1_000_000.0, rel=1e-12, abs=0)
    assert cash[1].sum() == pytest.approx(1_000_000.0, rel=1e-12, abs=0)
    # the fund's balance is available on the check date itself, before coverage month 0: left out here
    # (coverage counts fund balances at market value instead)
    assert cash[2].sum() == 0.0
    assert cash_by_month(cf, h.face, AS_OF, 12)[0].sum() == pytest.approx(20_000.0,
                                                                          rel=1e-12, abs=0)   # horizon cuts month 12


def test_days_to_maturity():
    h = book([holding("A", maturity="2025-03-02"), holding("F", sector="fund", kind="fund", maturity=NAT)])
    np.testing.assert_array_equal(days_to_maturity(h, AS_OF), [30, 1])


def test_shapes_are_checked():
    h = book([holding("A"), holding("B")])
    with pytest.raises(ValueError, match="market_value"):
        measures(h, market_value=[1.0])
    with pytest.raises(ValueError, match="cash_by_month"):
        measures(h, cash=np.zeros((3, 12)))


def test_basis_values_take_concat_and_rows_of():
    h = book([holding("A", face=2e6), holding("B", face=3e6)])
    m = measures(h, market_value=[1.0, 2.0], book_value=[3.0, 4.0])
    np.testing.assert_array_equal(m.basis_values("market"), [1.0, 2.0])
    np.testing.assert_array_equal(m.basis_values("book"), [3.0, 4.0])
    np.testing.assert_array_equal(m.basis_values("face"), [2e6, 3e6])
    other = measures(book([holding("B", face=9e6), holding("C", face=1e6)]))
    mixed = m.with_rows_of(other, ["B", "Z"])
    assert list(mixed.holdings.id) == ["A", "B"] and list(mixed.market_value) == [1.0, 9e6]
    dropped = m.with_rows_of(measures(book([holding("C")])), ["B"])
    assert list(dropped.holdings.id) == ["A"]
    with pytest.raises(ValueError):
        PositionMeasures.concat([m, measures(h, months=3)])


def test_cash_needs_by_month():
    needs = CashNeeds(np.array(["2025-01-31", "2025-02-01", "2025-02-28", "2025-04-15", "2026-02-01"],
                               dtype="datetime64[D]"), np.array([1.0, 2.0, 4.0, -8.0, 16.0]),
                      np.array(list("abcde"), dtype=object), np.arange(2, 7))
    np.testing.assert_array_equal(needs.by_month(coverage_start(AS_OF), 12), [6.0, 0, -8.0] + [0] * 9)
    np.testing.assert_array_equal(CashNeeds.empty().by_month(coverage_start(AS_OF), 3), [0.0, 0.0, 0.0])
