"""One book value: ``ladder value`` and the month-end report show the same amortized cost and
unrealized gain on the demo book, and the book value is the effective-interest amortized cost."""

from __future__ import annotations

import json

import pytest

from ladder.cli import main
from ladder.folder.book_file import load_book
from ladder.report.month_end import month_end_report


def test_value_and_report_agree_on_the_demo(demo_copy, capsys):
    code = main(["value", str(demo_copy), "--format", "json"])
    out = capsys.readouterr().out
    assert code == 0
    doc = json.loads(out)
    totals = doc["totals"]
    figures = month_end_report(load_book(demo_copy)).snapshot.figures
    # the same two figures, rounded to the cent in the json
    assert totals["book_value"] == pytest.approx(figures["amortized_cost"], rel=0, abs=0.005)
    assert totals["unrealized_gain"] == pytest.approx(figures["unrealized_gain"], rel=0, abs=0.005)
    # unrealized = market value - accrued - amortized cost (the definition), to the cent over the book
    assert totals["unrealized_gain"] == pytest.approx(
        totals["market_value"] - totals["accrued"] - totals["book_value"], rel=0, abs=0.02)
    # original cost is kept apart: it differs from the amortized cost on the demo (premiums and discounts)
    assert abs(totals["cost"] - totals["book_value"]) > 1000.0
    bill = next(h for h in doc["holdings"] if h["id"] == "DEMO-TSY-0101")
    # Hand arithmetic: a bill (one accrual period) accretes its discount ratably by day. Bought at
    # 98.1275 on 2026-06-18, 100 at maturity 2026-12-17 (182 days); on 2026-11-30, 165 days in:
    # 98.1275 + 1.8725 x 165 / 182 = 99.82509615 per 100; x 8,000,000 / 100 = 7,986,007.69.
    assert bill["cost"] == pytest.approx(7_850_200.00, rel=0, abs=0.005)
    assert bill["book_value"] == pytest.approx(7_986_007.69, rel=0, abs=0.01)
