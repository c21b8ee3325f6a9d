"""The month-end ties out: the roll-forward of amortized cost over two month-ends of a demo copy with
journal lines written here (a sale, maturities, a purchase), realized gains by hand, purchases taken
from the holdings, older journal lines counted as unexplained, and a cure date that stays fixed."""

from __future__ import annotations

import csv
import datetime as dt

import pytest
from report_books import copy_demo, recorded_month_end
from test_two_months import SECOND, roll_to_next_month

from ladder.folder.book_file import load_book
from ladder.folder.journal import JournalEntry, append_journal
from ladder.report.month_end import month_end_report, record_month_end

CENT = 0.005
SOLD, BOUGHT = "DEMO-TSY-0102", "DEMO-TSY-0110"
# Hand arithmetic: DEMO-TSY-0102 is a bill (one accrual period, discount accreted ratably by day):
# bought at 98.1263 on 2026-07-30, 100 at maturity 2027-01-28 (182 days); sold 2026-12-15, 138 days in:
# 98.1263 + 1.8737 x 138 / 182 per 100, on 10,000,000 face.
SOLD_BOOK = 10_000_000 * (98.1263 + 1.8737 * 138 / 182) / 100          # 9,954,701.758...
SOLD_PRICE = 99.60
# Hand arithmetic: the CD DEMO-CD-0801 (3.9%, ACT/360, 2026-06-15 to 2026-12-15, 183 days) pays
# 5,000,000 x 0.039 x 183 / 360 = 99,125.00 of interest with its face at maturity.
CD_INTEREST = 99_125.00
# At maturity the effective-interest method has carried each holding to its redemption value, 100
# per 100 (FASB ASC 310-20, from memory): the amortized cost that leaves is the face.
MATURED = {"DEMO-CP-0701": (dt.date(2026, 12, 8), 5_000_000.0, 5_000_000.0),
           "DEMO-CD-0801": (dt.date(2026, 12, 15), 5_000_000.0, 5_000_000.0 + CD_INTEREST),
           "DEMO-TSY-0101": (dt.date(2026, 12, 17), 8_000_000.0, 8_000_000.0),
           "DEMO-CP-0702": (dt.date(2026, 12, 22), 5_000_000.0, 5_000_000.0)}


def _december(folder, book, share: float = 1.0) -> list[JournalEntry]:
    """31 December as the treasurer records it: maturities, ``share`` of the bill sold, a new bill bought."""
    roll_to_next_month(folder, book)
    path = folder / "holdings.csv"
    with open(path, newline="", encoding="utf-8") as f:
        reader = csv.DictReader(f)
        columns, rows = reader.fieldnames, [r for r in reader if r["id"] != SOLD or share < 1]
    for r in rows:
        if r["id"] == SOLD:
            r["face"] = str(10_000_000 * (1 - share))
    new = dict(next(r for r in rows if r["id"] == "DEMO-TSY-0103"))
    new.update(id=BOUGHT, face="4000000", maturity_date="2027-06-17", discount_rate_pct="3.55", book_price="98.5",
               purchase_date="2026-12-15")
    with open(path, "w", newline="", encoding="utf-8") as f:
        writer = csv.DictWriter(f, fieldnames=columns, lineterminator="\n")
        writer.writeheader()
        writer.writerows(rows + [new])
    entries = [JournalEntry(day, "mature", hid, face, amount, 100.0, "matured", book_value=face)
               for hid, (day, face, amount) in MATURED.items()]
    entries.append(JournalEntry(dt.date(2026, 12, 15), "sell", SOLD, 10_000_000.0 * share, 9_960_000.0 * share,
                                SOLD_PRICE, "sold", book_value=SOLD_BOOK * share))
    entries.append(JournalEntry(dt.date(2026, 12, 15), "buy", BOUGHT, 4_000_000.0, -3_940_000.0, 98.5, "bought",
                                book_value=3_940_000.0))
    append_journal(folder, entries)
    return entries


def test_the_roll_forward_ties_over_two_month_ends(tmp_path):
    folder, book, first = recorded_month_end(copy_demo(tmp_path / "tessaline"))
    november = first.roll_forward
    # November: no journal, the demo's six November purchases taken from the holdings at cost
    assert len([p for p in november.purchases if p.source == "holdings"]) == 6
    assert abs(november.unexplained) < CENT and abs(november.unexplained_market_value) < CENT
    _december(folder, book)
    december = load_book(folder)
    second = month_end_report(december)
    r = second.roll_forward
    securities = {hid for hid, kind in zip(book.holdings.id, book.holdings.kind) if kind != "fund"}
    # the beginning is November's recorded amortized cost of the securities
    assert r.beginning == pytest.approx(sum(first.snapshot.holdings[h]["amortized_cost"] for h in securities),
                                        rel=1e-12, abs=0)
    assert r.left["sell"] == pytest.approx(SOLD_BOOK, rel=1e-12, abs=0)
    assert r.left["mature"] == pytest.approx(23_000_000.0, rel=1e-12, abs=0)      # 5 + 5 + 8 + 5 million
    assert r.purchases_journal == pytest.approx(3_940_000.0, rel=1e-12, abs=0)
    assert r.purchases_holdings == 0.0
    # tied to the cent: the valued ending equals beginning + purchases - what left + accretion - amortization
    assert abs(r.unexplained) < CENT
    assert abs(r.unexplained_market_value) < CENT
    assert "ties to the cent" in " ".join(second.report.section("activity").notes)
    # realized: 99.60 x 10,000,000 / 100 = 9,960,000.00 less the amortized cost; maturities at par realize 0
    sale = next(x for x in r.realized if x.action == "sell")
    assert sale.gain == pytest.approx(9_960_000.00 - SOLD_BOOK, rel=0, abs=1e-6)      # 5,298.24
    assert r.realized_gain == pytest.approx(9_960_000.00 - SOLD_BOOK, rel=0, abs=1e-6)
    cd = next(x for x in r.realized if x.holding == "DEMO-CD-0801")
    assert cd.accrued == pytest.approx(CD_INTEREST, rel=0, abs=1e-6) and cd.gain == 0.0
    assert second.snapshot.figures["realized_gain"] == pytest.approx(5_298.24, rel=0, abs=CENT)
    record_month_end(december, second)


def test_a_partial_sale_ties_too(tmp_path):
    folder, book, _ = recorded_month_end(copy_demo(tmp_path / "tessaline"))
    _december(folder, book, share=0.5)
    r = month_end_report(load_book(folder)).roll_forward
    # half the bill sold: half its amortized cost left, half its hand-computed gain realized
    assert r.left["sell"] == pytest.approx(SOLD_BOOK / 2, rel=1e-12, abs=0)
    assert r.realized_gain == pytest.approx((9_960_000.00 - SOLD_BOOK) / 2, rel=0, abs=1e-6)
    # the half sold accreted from 30 November to 15 December before it left: still tied to the cent
    assert abs(r.unexplained) < CENT and abs(r.unexplained_market_value) < CENT


def test_older_journal_lines_are_unexplained_not_guessed(tmp_path):
    folder, book, _ = recorded_month_end(copy_demo(tmp_path / "tessaline"))
    append_journal(folder, roll_to_next_month(folder, book))          # mature lines without a book value
    r = month_end_report(load_book(folder)).roll_forward
    assert len(r.unexplained_entries) == 4                                   # what matured by 31 December
    # the matured holdings' amortized cost at maturity (their face, 5 + 5 + 8 + 5 = 23 million) is not
    # taken off: the ending computed is 23 million above the valued one
    assert r.unexplained == pytest.approx(-23_000_000.0, rel=1e-9, abs=0)
    assert r.left["mature"] == 0.0


def test_a_cure_date_stays_fixed_and_an_overdue_finding_is_escalated(tmp_path):
    rule = "sectors.municipal.min_long_rating"
    folder, book, first = recorded_month_end(copy_demo(tmp_path / "tessaline"))
    nov = first.report.section("certificate").tables[3].row(rule)
    assert nov[3:6] == (dt.date(2026, 11, 30), dt.date(2026, 12, 30), 0)    # 30 cure days from 30 November
    append_journal(folder, roll_to_next_month(folder, book))
    second = month_end_report(load_book(folder))
    assert second.report.as_of == SECOND
    dec = second.report.section("certificate")
    # still first detected on 30 November: cure by 30 December, not 30 January; one day overdue
    assert dec.tables[3].row(rule)[3:6] == (dt.date(2026, 11, 30), dt.date(2026, 12, 30), 1)
    assert "cure by 2026-12-30" in dec.tables[1].row(rule)[3]
    assert any(n.startswith(f"ESCALATED: {rule}") for n in dec.notes)
