"""The income projection and the liquidity statement of the month-end report.

Months run from the day after the settlement date to each calendar month-end (a month-end
settlement date gives whole months). Cash: coupons and principal of the holdings by payment date
(funds excluded: a fund is available at its balance on any day). Income: interest earned by the
effective-interest method (``ladder.report.accounting.interest_by_period``), holdings as they stand,
each earning until it matures, nothing reinvested. Cash needs: ``cash_needs.csv`` (+ needed).
The liquidity statement runs over the policy's cash-needs horizon (``LIQUIDITY_MONTHS`` when the
policy sets none) and reads the coverage from ``ladder.policy.liquidity.needs_coverage``, the
answer the checker's cash-needs rule, the Ladder view and the cash plan give.
"""

from __future__ import annotations

import numpy as np

from ladder.analysis.valuation import Valuation
from ladder.folder.book_file import Book
from ladder.market.dates import add_months, month_end
from ladder.policy.liquidity import needs_coverage
from ladder.report.accounting import interest_by_period
from ladder.report.model import Chart, Column, Table

PROJECTION_MONTHS = 12
LIQUIDITY_MONTHS = 12


def month_boundaries(as_of, months: int) -> np.ndarray:
    """``as_of`` then the last day of each of the next ``months`` calendar months: (months+1,)."""
    start = np.datetime64(as_of, "D")
    ends = month_end(add_months(np.full(months, start + 1), np.arange(months)))
    return np.concatenate([[start], ends])


def _by_period(dates, amounts, boundaries) -> np.ndarray:
    """Sum of ``amounts`` whose ``dates`` fall in each (b[p-1], b[p]]; others dropped."""
    dates, amounts = np.ravel(dates), np.ravel(amounts)
    ok = ~np.isnat(dates) & (dates > boundaries[0]) & (dates <= boundaries[-1])
    period = np.searchsorted(boundaries, dates[ok], side="left") - 1
    return np.bincount(period, weights=amounts[ok], minlength=len(boundaries) - 1)


def cash_by_period(v: Valuation, boundaries) -> tuple[np.ndarray, np.ndarray]:
    """(coupons, principal) received by the holdings (funds excluded) in each period, currency."""
    cf, h = v.pricer.cash_flows, v.holdings
    held = (h.kind != "fund")[:, None] & cf.mask
    money = h.face[:, None] / 100.0
    dates = np.where(held, cf.pay_dates, np.datetime64("NaT"))
    return (_by_period(dates, np.where(held, cf.coupon * money, 0.0), boundaries),
            _by_period(dates, np.where(held, cf.principal * money, 0.0), boundaries))


PROJECTION_COLUMNS = (Column("month", "Month"), Column("income", "Interest earned, holdings as they stand", "money"),
                      Column("plan_income", "Income with reinvestment (cash plan)", "money"),
                      Column("coupons", "Coupons received", "money"), Column("principal", "Principal maturing", "money"),
                      Column("needs", "Net cash needs", "money"), Column("net", "Cash in less needs", "money"))


def income_projection(book: Book, v: Valuation, plan_boundaries, plan_income) -> tuple[Table, Chart]:
    """The next 12 months month by month and its chart. ``plan_boundaries`` / ``plan_income``: the
    cash plan's period ends and accrual income by period (used where its months are these months)."""
    b = month_boundaries(v.as_of, PROJECTION_MONTHS)
    income = interest_by_period(v, b).sum(axis=0)
    plan_boundaries = np.asarray(plan_boundaries, dtype="datetime64[D]")
    same = len(plan_boundaries) > PROJECTION_MONTHS and (plan_boundaries[:len(b)] == b).all()
    planned = np.asarray(plan_income[:PROJECTION_MONTHS], dtype=float) if same else np.full(PROJECTION_MONTHS, np.nan)
    coupons, principal = cash_by_period(v, b)
    needs = _by_period(book.cash_needs.date, book.cash_needs.amount, b)
    labels = tuple(str(d.astype("datetime64[M]")) for d in b[1:])
    optional = lambda x: float(x) if np.isfinite(x) else None  # noqa: E731
    rows = tuple((m, float(i), optional(q), float(c), float(p), float(n), float(c + p - n))
                 for m, i, q, c, p, n in zip(labels, income, planned, coupons, principal, needs))
    total = ("Total", float(income.sum()), optional(planned.sum()), float(coupons.sum()), float(principal.sum()),
             float(needs.sum()), float((coupons + principal - needs).sum()))
    series = [("holdings as they stand", tuple(float(x) / 1e3 for x in income))]
    if same:
        series.append(("with reinvestment (cash plan)", tuple(float(x) / 1e3 for x in planned)))
    chart = Chart("Income by month", "bar", labels, tuple(series), "month", f"{book.currency} thousands")
    return Table("Income projection, next 12 months", PROJECTION_COLUMNS, rows, total), chart


LIQUIDITY_COLUMNS = (Column("month", "Month"), Column("coming_in", "Maturities and coupons", "money"),
                     Column("needs", "Net cash needs", "money"), Column("available", "Available at month-end", "money"),
                     Column("status", "Needs so far"))


def liquidity_statement(book: Book, v: Valuation) -> tuple[Table, str]:
    """Fund balances plus maturities and coupons against the cash needs over the policy's cash-needs
    horizon, month by month, and the statement."""
    months = book.policy.portfolio.cash_needs_horizon_months or LIQUIDITY_MONTHS
    b = month_boundaries(v.as_of, months)
    coupons, principal = cash_by_period(v, b)
    needs = _by_period(book.cash_needs.date, book.cash_needs.amount, b)
    funds = float(v.market_value[v.holdings.kind == "fund"].sum())
    cover = needs_coverage(funds, coupons + principal, needs)
    available = cover.headroom
    labels = [str(d.astype("datetime64[M]")) for d in b[1:]]
    rows = tuple((m, float(c + p), float(n), float(a), s) for m, c, p, n, a, s in zip(
        labels, coupons, principal, needs, available, cover.status))
    low = int(np.argmin(available))
    cur = book.currency
    if cover.first_uncovered is None:
        text = (f"Liquidity for the next {months} months: fund and sweep balances of {cur} {funds:,.0f} plus "
                f"{cur} {float((coupons + principal).sum()):,.0f} of maturities and coupons cover the "
                f"{cur} {float(needs.sum()):,.0f} of net cash needs forecast in cash_needs.csv in every month; "
                f"the lowest month-end balance is {cur} {available[low]:,.0f} ({labels[low]}), before any "
                "sale or reinvestment.")
    else:
        text = (f"Liquidity for the next {months} months is NOT sufficient: by {labels[low]} the net cash needs "
                f"exceed fund balances plus maturities and coupons by {cur} {-available[low]:,.0f}; holdings "
                "would have to be sold before maturity or cash found elsewhere.")
    return Table(f"Liquidity, next {months} months", LIQUIDITY_COLUMNS, rows), text
