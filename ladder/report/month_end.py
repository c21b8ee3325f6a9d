"""The month-end report: one call from a book to every section, and the snapshot the history keeps.

``month_end_report(book, at)`` values the book, books the accounting figures by the effective-
interest method, tests every policy rule, runs the parallel rate shocks, projects income, reads the
activity journal and last month's snapshot, and returns the ``Report`` (sections of tables, notes
and charts) with the ``Snapshot`` to record. Nothing is written here: ``record_month_end`` stores
the snapshot (one SQLite transaction), ``ladder.report.files.write_report`` writes the files.

The period is (start, as_of]: start is the date of the latest earlier snapshot in the history, or
the previous calendar month-end when there is none.
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import dataclass

from ladder import __version__
from ladder.analysis.check import check_book, position_measures
from ladder.analysis.plan import plan_book
from ladder.analysis.price_dates import price_dates
from ladder.analysis.shock import shock_book
from ladder.analysis.valuation import Valuation
from ladder.folder.book_file import BOOK_FILE, Book
from ladder.policy.results import CheckResult
from ladder.report import history
from ladder.report.accounting import Accounting, accounting_figures
from ladder.report.allocation import issuer_table, maturity_table, rating_table, sector_table
from ladder.report.certificate import certificate_section
from ladder.report.departed import departed_income, departed_table, previous_holdings
from ladder.report.findings import open_findings
from ladder.report.history import InputFile, Snapshot, input_file
from ladder.report.holdings_table import activity_table, holdings_table
from ladder.report.income import income_projection, liquidity_statement
from ladder.folder.journal import entries_between, journal_path, read_journal
from ladder.report.model import Report, Section
from ladder.report.roll_forward import RollForward, realized_table, roll_forward, roll_forward_notes, roll_forward_table
from ladder.report.shock_table import shock_section
from ladder.report.summary import summary_figures, summary_table
from ladder.risk.scenarios import parallel_set

REPORT_CAUTIONS = (
    "Decision support only: not investment, legal or accounting advice.",
    "Every figure is to be confirmed against the custodian's statements before it is booked or relied on.",
    "Prices are estimates, each with its source and date (see the compliance certificate).",
    "Rate scenarios are hypothetical moves, not forecasts.",
    "The board-approved investment policy governs; where this report and the policy differ, the policy prevails.",
)
PLAN_INCOME = ("Next-12-month income: the cash plan's accrual income over the next 12 months under each move "
               "(ladder plan's income at risk): the holdings' interest earned, the calls each move makes likely, "
               "maturities reinvested by the book's reinvestment rule at the moved rates, which stay moved, and "
               "the funds' income at the moved short rate.")


@dataclass(frozen=True, eq=False)
class MonthEnd:
    report: Report
    snapshot: Snapshot
    inputs: tuple[InputFile, ...]
    valuation: Valuation
    accounting: Accounting
    check: CheckResult
    roll_forward: RollForward


def previous_month_end(day: dt.date) -> dt.date:
    return day.replace(day=1) - dt.timedelta(days=1)


def input_files(book: Book) -> tuple[InputFile, ...]:
    """Every input the report reads, with its checksum and bytes."""
    files = dict(book.files)
    if not files["holdings"].exists():                      # a book kept as holdings.xlsx
        files["holdings"] = files["holdings"].with_suffix(".xlsx")
    paths = [("book", book.folder / BOOK_FILE)] + [(role, path) for role, path in files.items() if path.exists()]
    if journal_path(book).exists():
        paths.append(("journal", journal_path(book)))
    return tuple(input_file(role, path) for role, path in paths)


def _number(x):
    x = float(x)
    return x if math.isfinite(x) else None


def _holding_figures(v: Valuation, a: Accounting) -> dict[str, dict]:
    fields = {"face": v.holdings.face, "market_value": v.market_value, "amortized_cost": a.amortized_cost,
              "unrealized_gain": a.unrealized_gain, "book_yield": a.book_yield, "market_yield": v.yield_to_worst,
              "effective_duration": v.effective_duration, "interest_earned": a.interest_earned}
    return {hid: {k: _number(x[i]) for k, x in fields.items()} for i, hid in enumerate(v.holdings.id)}


def _missing_cost_note(v: Valuation, a: Accounting) -> tuple[str, ...]:
    missing = [str(i) for i, c in zip(v.holdings.id, a.amortized_cost) if not math.isfinite(c)]
    if not missing:
        return ()
    return (f"{len(missing)} holding(s) have no book price or purchase date, so no amortized cost, unrealized gain "
            f"or income in this report: {', '.join(missing)}. Add them to the holdings file.",)


def month_end_report(book: Book, at: dt.date | None = None) -> MonthEnd:
    """The month-end report of ``book`` at ``at`` (default: its valuation date)."""
    checked = check_book(book, at)
    v = checked.valuation
    check, found = open_findings(book, checked.result, book.policy.cure_days)
    previous = history.previous_snapshot(book, v.as_of)
    start = previous.as_of if previous else previous_month_end(v.as_of)
    a = accounting_figures(v, start)
    prices = price_dates(v, book.valuation_date)
    journal = read_journal(book)
    activity = entries_between(journal, start, v.as_of)
    before = previous_holdings(book, previous) if previous else None
    departed = departed_income(before, v.holdings.id, start, v.as_of, activity)
    rolled = roll_forward(v, a, start, previous, before, departed, activity)
    figures = summary_figures(v, a, previous, departed, rolled.realized_gain)
    year = history.year_snapshots(book, v.as_of)
    inputs = input_files(book)
    checksums = {f.role: (f.name, f.sha256) for f in inputs}
    weight = position_measures(book, v).basis_values(book.policy.basis)
    ladder_table, ladder_chart = maturity_table(book, v.as_of, v.market_value)
    shocks = shock_book(book, v.as_of, parallel_set(book.curve))
    plan = plan_book(book, v.as_of)
    projection, income_chart = income_projection(book, v, plan.periods.boundaries, plan.projection.income)
    incomes = {s.scenario: s.income for s in plan.income_at_risk}
    liquidity, liquidity_text = liquidity_statement(book, v)
    period = f"{start.isoformat()} (exclusive) to {v.as_of.isoformat()}"
    last = (f"the snapshot of {previous.as_of.isoformat()} in the history" if previous else
            "none (no earlier month-end is recorded in the history)")
    sections = (
        Section("summary", "Summary", (summary_table(figures, previous, year),),
                (f"Period: {period}. Last month: {last}.",
                 "Year to date: the income recorded for this year's earlier month-ends plus this period's "
                 f"({len(year)} earlier month-end(s) of {v.as_of.year} in the history).",
                 "Market value includes accrued interest; unrealized gain or loss is the clean value less the "
                 "amortized cost (effective-interest method).")),
        Section("holdings", "Holdings detail", (holdings_table(v, a, str(book.files["holdings"]), prices),),
                ("Amortized cost by the effective-interest method; a premium on a callable is amortized to its "
                 "earliest call at the call price and reset if the bond is not called. Book yield: the effective "
                 "yield at purchase. Yield to worst: bond-equivalent yield at today's price, to the worst call date for a callable and to maturity otherwise. Share: of market value.",
                 *_missing_cost_note(v, a))),
        Section("activity", "Activity",
                (activity_table(activity, rolled.purchases, rolled.unexplained_entries), departed_table(departed),
                 roll_forward_table(rolled), realized_table(rolled)),
                (f"Every entry of {journal_path(book).name} dated in the period {period}, as recorded, then the "
                 "purchases taken from the holdings file (purchase date in the period, no journal line).",
                 "Holdings in last month's snapshot that are no longer held earned interest until they left; "
                 "that income is part of the period's income in the summary.", *roll_forward_notes(rolled))),
        Section("allocation", "Allocation against limits",
                (sector_table(book, check, v.market_value, weight), issuer_table(book, check, v.market_value, weight),
                 rating_table(book, check, v.market_value, weight)),
                (f"Shares on the policy's {book.policy.basis} value basis; limits and statuses from "
                 f"{book.files['policy'].name}.",)),
        Section("maturities", "Maturity distribution against the ladder's targets", (ladder_table,),
                ("A ladder's target is to have money maturing before it is needed: each rung's maturities against "
                 "the net cash needs of cash_needs.csv falling in the same rung. Funds count in the first rung at "
                 "their balance; callables by final maturity.",), (ladder_chart,)),
        shock_section(book, shocks, a.total("amortized_cost"), a.total("accrued"), incomes, PLAN_INCOME),
        Section("income", "Income projection", (projection,),
                ("Interest earned by the effective-interest method (coupon accrual plus amortization): the holdings "
                 "as they stand, each until it matures, nothing reinvested, funds at their stated yield on their "
                 "balance; beside it the cash plan's accrual income with maturities reinvested by the book's rule "
                 "and shortfalls met by sales (ladder plan, base case). Coupons and principal by payment date.",),
                (income_chart,)),
        certificate_section(book, check, v, liquidity, liquidity_text, checksums, prices, found),
    )
    report = Report(f"{book.name}: month-end report at {v.as_of.isoformat()}", book.name, v.as_of, start, sections,
                    REPORT_CAUTIONS)
    p = book.policy
    snapshot = Snapshot(
        as_of=v.as_of, period_start=start, recorded=dt.datetime.now(dt.timezone.utc).isoformat(timespec="seconds"),
        book_name=book.name, policy_name=p.name, policy_version=p.version, policy_adopted=p.adopted,
        compliance=check.status, program_version=__version__, figures=figures, holdings=_holding_figures(v, a),
        rules={r.rule: (r.status, None if r.limit is None else str(r.limit), None if r.actual is None else str(r.actual))
               for r in check.rules},
        inputs=checksums, document=report.to_json())
    return MonthEnd(report, snapshot, inputs, v, a, check, rolled)


def record_month_end(book: Book, m: MonthEnd):
    """Store the month-end's snapshot in the book's history (one transaction); returns the path."""
    return history.record_snapshot(book, m.snapshot, m.inputs)


def past_report(book_or_folder, as_of: dt.date) -> Report:
    """The report recorded for ``as_of``, exactly as it was written; KeyError if there is none."""
    from ladder.report.model import report_from_json

    snapshot = history.load_snapshot(book_or_folder, as_of)
    if snapshot is None:
        raise KeyError(as_of)
    return report_from_json(snapshot.document)
