"""Tenor labels and month arithmetic (the end-of-month rule) against QuantLib's date arithmetic.

Source: QuantLib Date + Period (day clipped to the month's length) and NullCalendar.advance with
endOfMonth = True (a month-end date moves to the target month's end), the usual end-of-month rule
for coupon schedules (common practice).
"""

import datetime as dt

import numpy as np
import pytest
import QuantLib as ql

from ladder.market.dates import add_months, days_between, is_month_end, month_end, ymd
from ladder.market.tenors import tenor_label, tenor_months


def _ql(d) -> ql.Date:
    y, m, day = str(d).split("-")
    return ql.Date(int(day), int(m), int(y))


def _np(d: ql.Date):
    return np.datetime64(dt.date(d.year(), d.month(), d.dayOfMonth()), "D")


@pytest.mark.parametrize("label,months", [("1M", 1), ("3m", 3), (" 6M ", 6), ("1Y", 12), ("2y", 24), ("18M", 18)])
def test_tenor_months(label, months):
    # common practice: M = months, Y = 12 months
    assert tenor_months(label) == months


@pytest.mark.parametrize("label", ["", "0M", "3W", "1.5Y", "Y", "12"])
def test_bad_tenor_refused(label):
    with pytest.raises(ValueError, match="not a tenor"):
        tenor_months(label)


def test_tenor_label_round_trip():
    assert [tenor_label(m) for m in (1, 6, 12, 18, 24, 120)] == ["1M", "6M", "1Y", "18M", "2Y", "10Y"]
    assert all(tenor_months(tenor_label(m)) == m for m in range(1, 400))


def test_add_months_against_quantlib():
    # QuantLib Date + Period(n, Months) clips the day; NullCalendar.advance(..., endOfMonth=True) keeps
    # month ends at month ends
    rng = np.random.default_rng(5)
    months = np.datetime64("1998-01", "M") + rng.integers(0, 600, 600)
    ends = (months + 1).astype("datetime64[D]") - 1
    dates = np.where(rng.random(600) < 0.4, ends, months.astype("datetime64[D]") + rng.integers(0, 31, 600))
    dates = np.minimum(dates, ends)
    steps = rng.integers(-120, 121, 600)
    cal = ql.NullCalendar()
    plain = [_np(_ql(d) + ql.Period(int(s), ql.Months)) for d, s in zip(dates, steps)]
    eom = [_np(cal.advance(_ql(d), ql.Period(int(s), ql.Months), ql.Unadjusted, True)) for d, s in zip(dates, steps)]
    np.testing.assert_array_equal(add_months(dates, steps), np.array(plain, dtype="datetime64[D]"))
    np.testing.assert_array_equal(add_months(dates, steps, True), np.array(eom, dtype="datetime64[D]"))


def test_date_parts():
    # calendar facts: 29 Feb 2024 is a leap-year month end; 28 Feb 2023 is a month end
    d = np.array(["2024-02-29", "2023-02-28", "2023-02-27", "NaT"], dtype="datetime64[D]")
    y, m, day = ymd(d[:3])
    assert (list(y), list(m), list(day)) == ([2024, 2023, 2023], [2, 2, 2], [29, 28, 27])
    assert list(is_month_end(d[:3])) == [True, True, False]
    assert str(month_end(np.datetime64("2023-02-03"))) == "2023-02-28"
    assert days_between(d[0], np.datetime64("2025-02-28")) == 365
    assert np.isnan(days_between(d[3], d[0]))
