"""Day-count fractions, vectorized over ``datetime64[D]`` arrays.

Definitions: ISDA 2006 Definitions, section 4.16:
- ``30/360``      (b)/(f) "30/360, Bond Basis": D1 = 31 -> 30; D2 = 31 -> 30 if D1 is 30 or 31.
- ``30E/360``     (g) "30E/360, Eurobond Basis": D1 = 31 -> 30; D2 = 31 -> 30.
- ``ACT/360``     (e) actual days / 360.
- ``ACT/365F``    (d) actual days / 365.
- ``ACT/ACT-ISDA`` (b) days in leap years / 366 + days in other years / 365.
- ``ACT/ACT``     ICMA Rule 251 (period-based): days / (frequency x days in the reference period).
  The caller passes the regular (quasi-)coupon period containing [start, end]; schedules split odd
  periods into such pieces (``ladder.market.schedule``).
"""

from __future__ import annotations

import numpy as np

from ladder.market.dates import days_between, to_days, ymd

DAY_COUNTS = ("30/360", "30E/360", "ACT/360", "ACT/365F", "ACT/ACT", "ACT/ACT-ISDA")


def _thirty_360(start, end, eurobond: bool) -> np.ndarray:
    y1, m1, d1 = ymd(start)
    y2, m2, d2 = ymd(end)
    d1 = np.minimum(d1, 30)
    d2 = np.where((d2 == 31) & ((d1 == 30) | eurobond), 30, d2)
    days = 360 * (y2 - y1) + 30 * (m2 - m1) + (d2 - d1)
    return np.where(np.isnat(to_days(start)) | np.isnat(to_days(end)), np.nan, days / 360.0)


def _year_basis(year: np.ndarray) -> np.ndarray:
    leap = ((year % 4 == 0) & (year % 100 != 0)) | (year % 400 == 0)
    return np.where(leap, 366.0, 365.0)


def _act_act_isda(start, end) -> np.ndarray:
    s, e = to_days(start), to_days(end)
    y1, _, _ = ymd(s)
    y2, _, _ = ymd(e)
    jan1_after_start = ((y1 + 1 - 1970).astype("datetime64[Y]")).astype("datetime64[D]")
    jan1_of_end = ((y2 - 1970).astype("datetime64[Y]")).astype("datetime64[D]")
    same_year = days_between(s, e) / _year_basis(y1)
    spanning = (days_between(s, jan1_after_start) / _year_basis(y1)
                + (y2 - y1 - 1)
                + days_between(jan1_of_end, e) / _year_basis(y2))
    return np.where(y1 == y2, same_year, spanning)


def year_fraction(day_count: str, start, end, ref_start=None, ref_end=None, frequency=None) -> np.ndarray:
    """Year fraction from ``start`` to ``end`` by ``day_count`` (one of ``DAY_COUNTS``).

    ``ref_start``, ``ref_end`` (the regular coupon period containing the interval) and ``frequency``
    (coupons a year) are needed for ``ACT/ACT`` only. Returns float64, NaN where a date is NaT.
    """
    if day_count == "30/360":
        return _thirty_360(start, end, eurobond=False)
    if day_count == "30E/360":
        return _thirty_360(start, end, eurobond=True)
    if day_count == "ACT/360":
        return days_between(start, end) / 360.0
    if day_count == "ACT/365F":
        return days_between(start, end) / 365.0
    if day_count == "ACT/ACT-ISDA":
        return _act_act_isda(start, end)
    if day_count == "ACT/ACT":
        if ref_start is None or ref_end is None or frequency is None:
            raise ValueError("ACT/ACT (ICMA) needs the reference period and the coupon frequency")
        return days_between(start, end) / (np.asarray(frequency, dtype=np.float64) * days_between(ref_start, ref_end))
    raise ValueError(f"unknown day count {day_count!r}; known: {', '.join(DAY_COUNTS)}")


def year_fraction_by_row(day_counts, start, end, ref_start, ref_end, frequency) -> np.ndarray:
    """``year_fraction`` where each row (first axis) has its own day count; other axes broadcast.

    ``day_counts`` is a 1-D object array with one code per row; the date arrays have that many rows.
    """
    start, end = to_days(start), to_days(end)
    ref_start, ref_end = to_days(ref_start), to_days(ref_end)
    shape = np.broadcast_shapes(start.shape, end.shape)
    out = np.full(shape, np.nan)
    frequency = np.asarray(frequency)
    codes = np.asarray(day_counts, dtype=object)
    for code in np.unique(codes):
        rows = codes == code

        def pick(a):
            a = np.broadcast_to(a, shape) if np.ndim(a) else a
            return a[rows] if np.ndim(a) else a
        freq = frequency[rows].reshape((-1,) + (1,) * (len(shape) - 1)) if frequency.ndim else frequency
        out[rows] = year_fraction(code, pick(start), pick(end), pick(ref_start), pick(ref_end), freq)
    return out
