"""The cash-flow matrix: every holding's future cash flows after a settlement date, holdings x slots.

Per 100 face. Coupon amounts are C x (day-count fraction of the accrual period); for ACT/ACT (ICMA)
the fraction is taken on the bond's quasi-coupon grid, so odd first and last periods follow
ICMA Rule 251. Time to each flow is kept in two measures:
- ``periods``: coupon periods from settlement by the bond's own day count, accumulated period by
  period; in the first period it is (fraction of the period) - (fraction accrued), SIFMA's
  DSC = E - A (Standard Securities Calculation Methods; also QuantLib's stepwise discount time);
- ``years``: ACT/365F years from settlement, for the curve.
Interest-at-maturity instruments (CDs, deposits) pay face plus simple interest on their day count from
issue to maturity; discount instruments and zeros pay face at maturity; a fund is one flow of 100 on
the settlement date (available at once, no rate sensitivity).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.book.holdings import Holdings
from ladder.market.calendar import roll_following
from ladder.market.dates import NAT, days_between, to_days
from ladder.market.daycount import year_fraction_by_row
from ladder.market.schedule import future_periods


@dataclass(frozen=True, eq=False)
class CashFlows:
    """Future cash flows (date > settlement) of n holdings, padded to k slots; see module docstring."""

    settle: np.ndarray      # (n,) datetime64[D] settlement date of each holding
    dates: np.ndarray       # (n, k) datetime64[D], unadjusted; NaT where no flow
    pay_dates: np.ndarray   # (n, k) datetime64[D], rolled to the next bond-market business day
    coupon: np.ndarray      # (n, k) float64 per 100 face (interest, incl. CD interest at maturity)
    principal: np.ndarray   # (n, k) float64 per 100 face
    mask: np.ndarray        # (n, k) bool
    periods: np.ndarray     # (n, k) float64 coupon periods from settlement (yield measure)
    years: np.ndarray       # (n, k) float64 ACT/365F years from settlement (curve measure)
    accrued: np.ndarray     # (n,) float64 per 100 face
    period_fraction: np.ndarray  # (n,) float64: fraction of the current coupon period still to run

    @property
    def amount(self) -> np.ndarray:
        return self.coupon + self.principal

    @property
    def count(self) -> np.ndarray:
        """Number of future flows of each holding."""
        return self.mask.sum(axis=1)


def _icma_fraction(periods, a, b, frequency) -> np.ndarray:
    """ACT/ACT (ICMA) year fraction from a to b on each bond's quasi-coupon grid."""
    freq = np.asarray(frequency, dtype=np.float64).reshape((-1,) + (1,) * (np.ndim(a) - 1))
    return (periods.grid.position(b) - periods.grid.position(a)) / freq


def _coupon_flows(h: Holdings, settle) -> tuple:
    """Coupon bonds and zeros: (dates, coupon, principal, mask, periods, accrued, fraction)."""
    freq = np.where(h.frequency > 0, h.frequency, 2)
    p = future_periods(h.maturity, freq, h.issue_date, h.first_coupon, settle)
    n, k = p.mask.shape
    settle_col = np.broadcast_to(to_days(settle), (n,))
    icma = (h.day_count == "ACT/ACT")[:, None]
    codes = np.where(icma[:, 0], "ACT/365F", h.day_count)   # placeholder code for ICMA rows
    ref = np.full((n, k), NAT)
    yf_period = np.where(icma, _icma_fraction(p, p.start, p.end, freq),
                         year_fraction_by_row(codes, p.start, p.end, ref, ref, freq))
    first_start = p.start[:, 0]
    yf_accrued = np.where(icma[:, 0], _icma_fraction(p, first_start, settle_col, freq),
                          year_fraction_by_row(codes, first_start, settle_col, ref[:, 0], ref[:, 0], freq))
    yf_accrued = np.where(settle_col > first_start, yf_accrued, 0.0)
    yf_period = np.where(p.mask, yf_period, 0.0)
    step = yf_period.copy()
    step[:, 0] -= yf_accrued
    periods = np.cumsum(step, axis=1) * freq[:, None]
    coupon = np.where(p.mask, 100.0 * h.coupon[:, None] * yf_period, 0.0)
    last = (np.arange(k)[None, :] == (p.mask.sum(axis=1) - 1)[:, None]) & p.mask
    principal = np.where(last, 100.0, 0.0)
    accrued = 100.0 * h.coupon * yf_accrued
    fraction = np.where(yf_period[:, 0] > 0, step[:, 0] / np.where(yf_period[:, 0] > 0, yf_period[:, 0], 1), 0.0)
    return p.end, coupon, principal, p.mask, periods, accrued, fraction


def _single_flows(h: Holdings, settle) -> tuple:
    """Discount, interest-at-maturity and fund holdings: one flow each."""
    n = len(h)
    settle_col = np.broadcast_to(to_days(settle), (n,))
    fund = h.kind == "fund"
    at_maturity = h.kind == "at_maturity"
    start = np.where(np.isnat(h.issue_date), settle_col, h.issue_date)
    ref = np.full(n, NAT)
    term = year_fraction_by_row(h.day_count, start, h.maturity, ref, ref, np.ones(n))
    interest = np.where(at_maturity, 100.0 * h.coupon * term, 0.0)
    run = year_fraction_by_row(h.day_count, start, np.maximum(settle_col, start), ref, ref, np.ones(n))
    accrued = np.where(at_maturity, 100.0 * h.coupon * run, 0.0)
    dates = np.where(fund, settle_col, h.maturity)[:, None]
    return (dates, interest[:, None], np.full((n, 1), 100.0), np.ones((n, 1), bool),
            np.zeros((n, 1)), accrued, np.zeros(n))


def cash_flows(h: Holdings, settle) -> CashFlows:
    """The cash-flow matrix of ``h`` at ``settle`` (a date, or one per holding); holdings must mature
    after their settlement date."""
    settle = np.broadcast_to(to_days(settle), (len(h),))
    coupon_rows = np.isin(h.kind, ("fixed", "zero"))
    parts = [(_coupon_flows(h.take(coupon_rows), settle[coupon_rows]), coupon_rows),
             (_single_flows(h.take(~coupon_rows), settle[~coupon_rows]), ~coupon_rows)]
    n = len(h)
    k = max((part[0].shape[1] for part, rows in parts if rows.any()), default=1)
    dates = np.full((n, k), NAT)
    coupon, principal, periods = (np.zeros((n, k)) for _ in range(3))
    mask = np.zeros((n, k), bool)
    accrued, fraction = np.zeros(n), np.zeros(n)
    for (d, c, pr, m, per, acc, frac), rows in parts:
        if not rows.any():
            continue
        w = d.shape[1]
        dates[rows, :w], coupon[rows, :w], principal[rows, :w] = d, c, pr
        mask[rows, :w], periods[rows, :w] = m, per
        accrued[rows], fraction[rows] = acc, frac
    dates = np.where(mask, dates, NAT)
    years = np.where(mask, days_between(settle[:, None], dates) / 365.0, 0.0)
    return CashFlows(settle, dates, np.where(mask, roll_following(dates), NAT), coupon, principal, mask,
                     periods, years, accrued, fraction)
