"""The rate-shock section: parallel moves of -300 to +300 bp, exact revaluation, with the model and
the assumptions printed beneath the table."""

from __future__ import annotations

from ladder.analysis.plan import BASE
from ladder.analysis.shock import ShockResult
from ladder.folder.book_file import Book
from ladder.report.model import Chart, Column, Section, Table

SHOCK_COLUMNS = (Column("shift_bp", "Parallel move, bp", "bp"), Column("value", "Market value", "money"),
                 Column("change", "Change in value", "money"), Column("change_pct", "Change", "pct"),
                 Column("unrealized_gain", "Unrealized gain/loss vs amortized cost", "money"),
                 Column("income_12m", "Next-12-month income", "money"),
                 Column("income_change", "Change in 12-month income", "money"))


def shock_section(book: Book, r: ShockResult, amortized_cost: float, accrued: float, incomes: dict[str, float],
                  income_note: str) -> Section:
    """``incomes``: next-12-month income by scenario name (the cash plan's income at risk; the no-move
    case under ``BASE``). Unrealized gain = scenario value less accrued interest less amortized cost
    (an instantaneous move leaves the accrued interest as it is)."""
    t = r.portfolio
    base = incomes.get(BASE)
    rows = []
    for s, (scenario, bp) in enumerate(zip(r.scenarios, r.parallel_bp)):
        value, change = float(t.value[0, s]), float(t.change[0, s])
        income = base if bp == 0 else incomes.get(scenario.name)
        d_income = income - base if income is not None and base is not None else None
        rows.append((bp, value, change, float(t.relative_change[0, s]), value - accrued - amortized_cost,
                     income, d_income))
    params = book.model
    notes = (
        "Each parallel move shifts every quoted par yield of curve.csv by the same number of basis points at "
        "once (an instantaneous shock); the curve is rebuilt from the moved par yields by the same bootstrap "
        "(monotone convex) and every holding is repriced on it exactly, not estimated.",
        "Spreads are held: each holding keeps the z-spread solved from its quote (or the spread table's spread "
        "for a holding priced from the curve).",
        f"Callable holdings are repriced with a one-factor Hull-White short-rate tree (mean reversion "
        f"{params.mean_reversion:g} a year, volatility {params.volatility * 1e4:g} bp a year) at their "
        "option-adjusted spread, so calls become more likely as rates fall.",
        "Funds and sweeps are held at their balance. Accrued interest is unchanged by an instantaneous move.",
        income_note,
        "The scenarios are hypothetical moves, not forecasts.",
    )
    chart = Chart("Market value against a parallel move", "line", tuple(f"{bp:+g}" for bp, *_ in rows),
                  (("market value", tuple(row[1] / 1e6 for row in rows)),), "parallel move, bp",
                  f"{book.currency} millions")
    table = Table("Rate shocks (parallel)", SHOCK_COLUMNS, tuple(rows))
    return Section("shock", "Rate-shock table", (table,), notes, (chart,))

