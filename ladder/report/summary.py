"""The month-end's summary figures, and the summary table against last month and the year so far.

Figures (money in currency, rates decimal, durations years, WAM days) are what the history keeps a
month; the table shows this month, last month (from the history), the change, and for the income
figures the year to date: the sum of the income recorded in the history for the earlier month-ends
of the same calendar year, plus this month's.
"""

from __future__ import annotations

import math

import numpy as np

from ladder.analysis.valuation import Valuation
from ladder.report.accounting import Accounting
from ladder.report.departed import Departed
from ladder.report.history import Snapshot
from ladder.report.model import Column, Table

# name, title, kind, summed over the year
FIGURES = (
    ("beginning_market_value", "Beginning market value (last month's ending)", "money", False),
    ("market_value", "Ending market value (with accrued interest)", "money", False),
    ("clean_value", "Market value without accrued interest", "money", False),
    ("accrued", "Accrued interest", "money", False),
    ("amortized_cost", "Amortized cost", "money", False),
    ("unrealized_gain", "Unrealized gain or loss against amortized cost", "money", False),
    ("face", "Face", "money", False),
    ("count", "Holdings", "int", False),
    ("coupon_income", "Coupon interest accrued in the period", "money", True),
    ("amortization", "Accretion of discount less amortization of premium", "money", True),
    ("interest_earned", "Income for the period (interest earned)", "money", True),
    ("departed_income", "of which: holdings that left the book in the period", "money", True),
    ("realized_gain", "Realized gain or loss (sales, maturities, calls against amortized cost)", "money", True),
    ("market_yield", "Yield to worst (bond-equivalent, weighted by market value)", "pct", False),
    ("book_yield", "Book yield (effective yield, weighted by amortized cost)", "pct", False),
    ("effective_duration", "Effective duration, years", "years", False),
    ("modified_duration", "Modified duration, years", "years", False),
    ("wam_days", "Weighted average maturity, days", "days", False),
    ("dv01", "DV01 (value of one basis point)", "money", False),
)


def _weighted(values, weights) -> float:
    ok = np.isfinite(values) & np.isfinite(weights)
    total = weights[ok].sum()
    return float((values[ok] * weights[ok]).sum() / total) if total else math.nan


def summary_figures(v: Valuation, a: Accounting, previous: Snapshot | None, departed: Departed,
                    realized_gain: float = 0.0) -> dict[str, float]:
    """This month-end's figures by name (see FIGURES); the period's income includes ``departed``'s;
    ``realized_gain`` is the roll-forward's (``ladder.report.roll_forward``)."""
    t = v.totals
    gone = float(departed.interest_earned.sum())
    face = v.holdings.face / 100.0
    return {
        "beginning_market_value": previous.figures["market_value"] if previous else math.nan,
        "market_value": t.market_value, "clean_value": float((v.clean * face).sum()), "accrued": t.accrued,
        "amortized_cost": a.total("amortized_cost"), "unrealized_gain": a.total("unrealized_gain"),
        "face": t.face, "count": float(t.count),
        "coupon_income": a.total("coupon_income") + float(departed.coupon_income.sum()),
        "amortization": a.total("amortization") + float(departed.amortization.sum()),
        "interest_earned": a.total("interest_earned") + gone, "departed_income": gone, "realized_gain": realized_gain,
        "market_yield": t.yield_to_worst, "book_yield": _weighted(a.book_yield, a.amortized_cost),
        "effective_duration": t.effective_duration, "modified_duration": t.modified_duration,
        "wam_days": t.wam_days, "dv01": t.dv01,
    }


def _value(x):
    return None if x is None or (isinstance(x, float) and not math.isfinite(x)) else x


def summary_table(figures: dict, previous: Snapshot | None, year: list[Snapshot]) -> Table:
    """Measure | this month | last month | change | year to date."""
    columns = (Column("measure", "Measure"), Column("this_month", "This month", "money"),
               Column("last_month", "Last month", "money"), Column("change", "Change", "money"),
               Column("year_to_date", "Year to date", "money"))
    rows, kinds = [], []
    for name, title, kind, summed in FIGURES:
        now = _value(figures[name])
        last = _value(previous.figures.get(name)) if previous else None
        change = now - last if now is not None and last is not None else None
        ytd = None
        if summed and now is not None:
            ytd = now + sum(_value(s.figures.get(name)) or 0.0 for s in year)
        rows.append((title, now, last, change, ytd))
        kinds.append(kind)
    return Table("Summary against last month and the year so far", columns, tuple(rows), row_kinds=tuple(kinds))
