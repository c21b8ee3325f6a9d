"""Two month-ends one month apart in a copy of the demo book: the history carries last month's
figures, the year to date adds up, the activity section is the journal's period, and a past report
is written again exactly."""

from __future__ import annotations

import csv
import datetime as dt
import math

import pytest
from report_books import copy_demo, recorded_month_end

from ladder.report.month_end import month_end_report, past_report, record_month_end
from ladder.folder.book_file import load_book
from ladder.report.history import snapshot_dates
from ladder.folder.journal import JournalEntry, append_journal, read_journal

FIRST, SECOND = dt.date(2026, 11, 30), dt.date(2026, 12, 31)


def _rewrite(path, keep, change=lambda row: row):
    with open(path, newline="", encoding="utf-8") as f:
        reader = csv.DictReader(f)
        columns, rows = reader.fieldnames, [change(r) for r in reader if keep(r)]
    with open(path, "w", newline="", encoding="utf-8") as f:
        writer = csv.DictWriter(f, fieldnames=columns, lineterminator="\n")
        writer.writeheader()
        writer.writerows(rows)


def roll_to_next_month(folder, book) -> list[JournalEntry]:
    """The book as the treasurer would roll it to 31 December: what matured is removed (and journaled),
    fund balances carry on, past cash needs drop out, the valuation date moves."""
    h = book.holdings
    matured = [(h.id[i], float(h.face[i]), h.maturity[i].astype(dt.date)) for i in range(len(h))
               if h.kind[i] != "fund" and h.maturity[i].astype(dt.date) <= SECOND]
    gone = {m[0] for m in matured}

    def fund_date(row):
        if row["kind"] == "fund" or row["sector"] == "fund":
            row["maturity_date"] = "2027-01-04"
        return row
    _rewrite(folder / "holdings.csv", lambda r: r["id"] not in gone, fund_date)
    _rewrite(folder / "cash_needs.csv", lambda r: dt.date.fromisoformat(r["date"]) > SECOND)
    toml = (folder / "book.toml").read_text(encoding="utf-8").replace("valuation_date = 2026-11-30",
                                                                      "valuation_date = 2026-12-31")
    (folder / "book.toml").write_text(toml, encoding="utf-8")
    return [JournalEntry(day, "mature", hid, face, face, 100.0, "matured at par") for hid, face, day in matured]


def test_second_month_shows_the_first_as_last_month(tmp_path):
    folder, book, first = recorded_month_end(copy_demo(tmp_path / "tessaline"))
    # one entry inside the first period, recorded before the second month-end
    append_journal(folder, [JournalEntry(dt.date(2026, 11, 20), "note", "", reason="custodian statement reconciled")])
    entries = roll_to_next_month(folder, book)
    append_journal(folder, entries)
    december = load_book(folder)
    second = month_end_report(december)
    record_month_end(december, second)
    assert snapshot_dates(folder) == [FIRST, SECOND]

    this = first.report.section("summary").tables[0]
    last = second.report.section("summary").tables[0]
    assert [r[0] for r in this.rows] == [r[0] for r in last.rows]
    for now_row, next_row in zip(this.rows, last.rows):
        assert next_row[2] == now_row[1], now_row[0]          # last month = the first report's figure
    # the beginning value of December is November's ending value
    assert last.row("Beginning market value (last month's ending)")[1] == this.row(
        "Ending market value (with accrued interest)")[1]
    # year to date: November's income plus December's
    income = last.row("Income for the period (interest earned)")
    assert income[4] == pytest.approx(this.row("Income for the period (interest earned)")[1] + income[1],
                                      rel=1e-12, abs=0)
    assert second.report.period_start == FIRST

    # the activity section lists exactly the journal's entries of (30 Nov, 31 Dec]
    journal = [e for e in read_journal(folder) if FIRST < e.date <= SECOND]
    activity = second.report.section("activity").tables[0]
    assert len(journal) == len(entries) > 0
    assert [(r[0], r[1], r[2], r[3], r[4], r[6]) for r in activity.rows] == [
        (e.date, e.action, e.holding, e.face, e.amount, e.reason) for e in journal]
    assert activity.total[4] == pytest.approx(sum(e.amount for e in journal), rel=1e-12, abs=0)
    assert all(r[1] != "note" for r in activity.rows)           # November's note is not December's activity

    # December's income, including the holdings that matured during it, is what November's income
    # projection expected for December: nothing was bought and the funds kept their balances
    projected = first.report.section("income").tables[0].row("2026-12")[1]
    assert income[1] == pytest.approx(projected, rel=1e-12, abs=0)
    departed = second.report.section("activity").tables[1]
    assert sorted(r[0] for r in departed.rows) == sorted(e.holding for e in entries)
    assert last.row("of which: holdings that left the book in the period")[1] == pytest.approx(departed.total[5],
                                                                                               rel=1e-12, abs=0)

    # the first month-end is written again exactly as it was, though the book has moved on
    assert past_report(folder, FIRST).to_json() == first.report.to_json()
    assert not math.isnan(second.snapshot.figures["beginning_market_value"])
