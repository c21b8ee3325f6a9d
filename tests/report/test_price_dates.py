"""Each holding's price date (the optional ``price_date`` column), stale prices flagged, and "Prices as
of" giving the quotes' dates rather than the report's."""

from __future__ import annotations

import csv
import datetime as dt

import pytest

from ladder.analysis.price_dates import STALE_DAYS, price_dates
from ladder.analysis.valuation import value_book
from ladder.errors import InputError
from ladder.folder.book_file import load_book
from ladder.report.month_end import month_end_report


def _price_dates(folder, dates: dict[str, str]) -> None:
    path = folder / "holdings.csv"
    with open(path, newline="", encoding="utf-8") as f:
        reader = csv.DictReader(f)
        columns, rows = reader.fieldnames + ["price_date"], list(reader)
    for row in rows:
        row["price_date"] = dates.get(row["id"], "")
    with open(path, "w", newline="", encoding="utf-8") as f:
        writer = csv.DictWriter(f, fieldnames=columns, lineterminator="\n")
        writer.writeheader()
        writer.writerows(rows)


def test_stale_prices_are_flagged_and_prices_as_of_is_the_oldest_quote(demo_copy):
    # 2026-11-27 is 3 days before the valuation date 2026-11-30 (not stale: at most 5);
    # 2026-11-20 is 10 days before it (stale)
    assert STALE_DAYS == 5
    _price_dates(demo_copy, {"DEMO-TSY-0202": "2026-11-27", "DEMO-CORP-0601": "2026-11-20"})
    book = load_book(demo_copy)
    p = price_dates(value_book(book), book.valuation_date)
    ids = list(book.holdings.id)
    assert p.date[ids.index("DEMO-TSY-0202")] == dt.date(2026, 11, 27)
    assert int(p.age_days[ids.index("DEMO-CORP-0601")]) == 10
    assert [ids[i] for i in p.stale.nonzero()[0]] == ["DEMO-CORP-0601"]
    assert p.oldest == dt.date(2026, 11, 20) and p.newest == dt.date(2026, 11, 30)
    m = month_end_report(book)
    notes = " ".join(m.report.section("certificate").notes)
    assert "Prices as of 2026-11-20 (oldest quote) to 2026-11-30" in notes
    assert "1 stale price(s)" in notes and "DEMO-CORP-0601 (2026-11-20)" in notes
    table = m.report.section("holdings").tables[0]
    row = table.row("DEMO-CORP-0601")
    assert row[-2:] == (dt.date(2026, 11, 20), "stale: 10 days old")
    assert table.row("DEMO-TSY-0202")[-1] == ""


def test_a_price_date_after_the_valuation_date_is_refused(demo_copy):
    _price_dates(demo_copy, {"DEMO-TSY-0202": "2026-12-01"})
    with pytest.raises(InputError) as error:
        load_book(demo_copy)
    assert any("price_date 2026-12-01 is after the valuation date" in p.message for p in error.value.problems)
