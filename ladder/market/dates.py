"""Vectorized calendar arithmetic on ``datetime64[D]`` arrays (year/month/day split, month steps)."""

from __future__ import annotations

import numpy as np

NAT = np.datetime64("NaT", "D")


def to_days(dates) -> np.ndarray:
    """``dates`` as a ``datetime64[D]`` array."""
    return np.asarray(dates, dtype="datetime64[D]")


def ymd(dates) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Year, month (1-12) and day (1-31) of each date, as int64 arrays (garbage where NaT)."""
    d = to_days(dates)
    months = d.astype("datetime64[M]")
    year = months.astype("datetime64[Y]").astype(np.int64) + 1970
    month = months.astype(np.int64) % 12 + 1
    day = (d - months.astype("datetime64[D]")).astype(np.int64) + 1
    return year, month, day


def month_end(dates) -> np.ndarray:
    """Last calendar day of each date's month."""
    m = to_days(dates).astype("datetime64[M]")
    return (m + 1).astype("datetime64[D]") - 1


def is_month_end(dates) -> np.ndarray:
    d = to_days(dates)
    return d == month_end(d)


def add_months(dates, months, end_of_month=False) -> np.ndarray:
    """Each date moved by ``months`` (broadcast), the day clipped to the month's length.

    With ``end_of_month`` (broadcast boolean), a date that is a month end moves to the target month's
    end: the end-of-month rule for coupon schedules (common practice, ISDA 2006 and SIFMA usage).
    """
    d = to_days(dates)
    _, _, day = ymd(d)
    target = d.astype("datetime64[M]") + np.asarray(months, dtype=np.int64)
    last = (target + 1).astype("datetime64[D]") - 1
    last_day = (last - target.astype("datetime64[D]")).astype(np.int64) + 1
    moved = target.astype("datetime64[D]") + (np.minimum(day, last_day) - 1)
    result = np.where(np.asarray(end_of_month) & is_month_end(d), last, moved)
    return np.where(np.isnat(d), NAT, result).astype("datetime64[D]")


def days_between(start, end) -> np.ndarray:
    """Actual calendar days from ``start`` to ``end`` as float64 (NaN where either is NaT)."""
    delta = (to_days(end) - to_days(start)).astype("timedelta64[D]")
    out = delta.astype(np.float64)
    return np.where(np.isnat(delta), np.nan, out)
