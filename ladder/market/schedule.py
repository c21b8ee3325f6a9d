"""Coupon schedules of many bonds at once, on a regular month grid with odd first and last periods.

Each bond's regular coupon dates lie on a grid g(j) = anchor + j * (12 / frequency) months, with the
end-of-month rule when the anchor is a month end (common practice, SIFMA/ISDA usage):
- generated backward from maturity (anchor = maturity), the usual case; a first period that starts
  at an issue date off the grid is an odd (short, or with ``first_coupon`` a long) first period;
- generated forward from ``first_coupon`` (anchor = first coupon) when the first coupon date is not
  on the backward grid; the last period, ending at maturity off the grid, is then an odd short last
  period.
Dates are unadjusted (yields and accrual are on the unadjusted schedule; payments roll separately).

``grid_position`` gives the ICMA quasi-coupon position of any date on a bond's grid, so that the
ACT/ACT (ICMA Rule 251) fraction of any interval, odd periods included, is the difference of two
positions divided by the frequency.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.market.dates import NAT, add_months, days_between, is_month_end, to_days, ymd


@dataclass(frozen=True, eq=False)
class Grid:
    """Regular coupon grids of n bonds: g(j) = add_months(anchor, j * step, eom)."""

    anchor: np.ndarray   # datetime64[D] (n,)
    step: np.ndarray     # int64 months between coupons (n,)
    eom: np.ndarray      # bool (n,)

    def date(self, j) -> np.ndarray:
        """g(j) for integer j, broadcast against (n,) or (n, k)."""
        j = np.asarray(j, dtype=np.int64)
        extra = (slice(None),) + (None,) * (j.ndim - 1) if j.ndim > 1 else (slice(None),)
        return add_months(self.anchor[extra], j * self.step[extra], self.eom[extra])

    def index(self, dates) -> np.ndarray:
        """Largest j with g(j) <= date (dates broadcast with the bonds as the first axis)."""
        x = to_days(dates)
        extra = (slice(None),) + (None,) * (x.ndim - 1)
        ya, ma, _ = ymd(self.anchor)
        yx, mx, _ = ymd(x)
        months = (yx - ya[extra]) * 12 + (mx - ma[extra])
        j = np.floor_divide(months, self.step[extra])
        return np.where(self.date(j) > x, j - 1, j)

    def position(self, dates) -> np.ndarray:
        """ICMA quasi-coupon position: j + (days from g(j) to date) / (days from g(j) to g(j+1))."""
        j = self.index(dates)
        start, end = self.date(j), self.date(j + 1)
        return j + days_between(start, to_days(dates)) / days_between(start, end)


def make_grid(maturity, frequency, first_coupon) -> Grid:
    """The coupon grid of each bond: backward from maturity, or forward from an off-grid first coupon."""
    maturity = to_days(maturity)
    first_coupon = to_days(first_coupon)
    step = 12 // np.maximum(np.asarray(frequency, dtype=np.int64), 1)
    backward = Grid(maturity, step, is_month_end(maturity))
    has_first = ~np.isnat(first_coupon)
    safe_first = np.where(has_first, first_coupon, maturity)
    on_backward = backward.date(backward.index(safe_first)) == safe_first
    forward = has_first & ~on_backward
    anchor = np.where(forward, safe_first, maturity)
    return Grid(anchor, step, is_month_end(anchor))


@dataclass(frozen=True, eq=False)
class Periods:
    """The coupon periods of n bonds that end after a settlement date, as (n, k) matrices.

    Row i holds bond i's future periods in date order, padded (``mask`` False) to a common width k.
    """

    start: np.ndarray     # datetime64[D] accrual start of each period (issue date for an odd first)
    end: np.ndarray       # datetime64[D] coupon date (maturity for the last)
    mask: np.ndarray      # bool, True for a real period
    grid: Grid


def future_periods(maturity, frequency, issue_date, first_coupon, settle) -> Periods:
    """Every coupon period of each bond that ends strictly after ``settle`` (scalar or (n,))."""
    maturity = to_days(maturity)
    issue_date = to_days(issue_date)
    grid = make_grid(maturity, frequency, first_coupon)
    n = len(maturity)
    settle = np.broadcast_to(to_days(settle), (n,))
    first_coupon = to_days(first_coupon)
    # The first coupon date: given, else the first grid date after the issue date (if given).
    after_issue = grid.index(np.where(np.isnat(issue_date), maturity, issue_date)) + 1
    first_j = np.where(~np.isnat(first_coupon), grid.index(np.where(np.isnat(first_coupon), maturity, first_coupon)),
                       np.where(np.isnat(issue_date), np.iinfo(np.int32).min, after_issue))
    last_j = grid.index(maturity)
    last_j = np.where(grid.date(last_j) < maturity, last_j + 1, last_j)    # maturity closes the last period
    next_j = np.maximum(grid.index(settle) + 1, first_j)
    count = np.maximum(last_j - next_j + 1, 0)
    width = int(count.max()) if n else 0
    j = next_j[:, None] + np.arange(max(width, 1))[None, :]
    mask = np.arange(max(width, 1))[None, :] < count[:, None]
    end = np.where(j >= last_j[:, None], maturity[:, None], grid.date(j))
    start = grid.date(j - 1)
    is_first = (j == first_j[:, None]) & ~np.isnat(issue_date)[:, None]
    start = np.where(is_first, issue_date[:, None], start)
    return Periods(np.where(mask, start, NAT), np.where(mask, end, NAT), mask, grid)
