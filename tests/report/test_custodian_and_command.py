"""``ladder import`` (custodian file against the book) and ``ladder report`` end to end."""

from __future__ import annotations

import argparse
import csv
import io
import json
from contextlib import redirect_stdout

import pytest

from ladder.folder.book_file import load_book
from ladder.cli import main
from ladder.commands import custodian as custodian_command
from ladder.report.custodian import compare_holdings, read_custodian_file
from ladder.folder.journal import read_journal


def _custodian_file(folder, path):
    """The book's holdings with one face changed, one price changed, one sold, one new and an
    issuer a spreadsheet would run as a formula."""
    with open(folder / "holdings.csv", newline="", encoding="utf-8") as f:
        rows = list(csv.DictReader(f))
    rows[0]["face"] = "7000000"
    rows[5]["price"] = "100.5"
    removed = rows.pop(3)["id"]
    added = dict(rows[1], id="=DEMO-NEW-1")
    rows.append(added)
    with open(path, "w", newline="", encoding="utf-8") as f:
        writer = csv.DictWriter(f, fieldnames=list(rows[0]), lineterminator="\n")
        writer.writeheader()
        writer.writerows(rows)
    return removed


def _run_import(argv) -> str:
    parser = argparse.ArgumentParser()
    custodian_command.add_parser(parser.add_subparsers())
    args = parser.parse_args(["import", *argv])
    out = io.StringIO()
    with redirect_stdout(out):
        assert args.run(args) == 0
    return out.getvalue()


def test_custodian_breaks_then_apply(demo_copy, tmp_path):
    path = tmp_path / "custodian.csv"
    removed = _custodian_file(demo_copy, path)
    book = load_book(demo_copy)
    original = (demo_copy / "holdings.csv").read_bytes()
    doc = json.loads(_run_import([str(demo_copy), str(path), "--format", "json"]))
    kinds = {c["id"]: c["change"] for c in doc["changes"]}
    assert kinds == {"DEMO-TSY-0101": "changed", "DEMO-TSY-0202": "changed", "=DEMO-NEW-1": "added",
                     removed: "removed"}
    changed = {c["id"]: c for c in doc["changes"]}
    assert changed["DEMO-TSY-0101"]["old_face"] == 8e6 and changed["DEMO-TSY-0101"]["new_face"] == 7e6
    assert changed["DEMO-TSY-0202"]["new_price"] == "price 100.5"
    assert {k: c["breaks"] for k, c in changed.items()} == {
        "DEMO-TSY-0101": "face", "DEMO-TSY-0202": "price", "=DEMO-NEW-1": "custodian_only", removed: "book_only"}
    # Hand arithmetic (bank discount price, ACT/360): the bill at 3.668% with 17 days to run from
    # 2026-11-30 to 2026-12-17 is 100 x (1 - 0.03668 x 17 / 360) = 99.8267889 per 100, so 1,000,000
    # less face is -998,267.89 of market value.
    assert changed["DEMO-TSY-0101"]["money_effect"] == pytest.approx(-998_267.89, rel=0, abs=0.01)
    # the note's clean price 100.332 -> 100.5 on 5,000,000 face (accrued unchanged): +8,400.00
    assert changed["DEMO-TSY-0202"]["money_effect"] == pytest.approx(8_400.00, rel=0, abs=0.01)
    assert (demo_copy / "holdings.csv").read_bytes() == original            # shown, not replaced
    assert "'=DEMO-NEW-1" in _run_import([str(demo_copy), str(path), "--format", "csv"])   # formula-safe csv

    _run_import([str(demo_copy), str(path), "--apply", "--yes", "--reason", "November statement"])
    after = load_book(demo_copy)
    # the file is the book now, except the holding missing at the custodian: kept, still a break
    assert [(c.id, c.kind) for c in compare_holdings(after, read_custodian_file(book, path))] == [(removed, "removed")]
    assert len(after.holdings) == len(book.holdings) + 1
    assert [p.read_bytes() for p in (demo_copy / "versions").glob("*/holdings.csv")] == [original]
    journal = read_journal(demo_copy)
    assert sorted((e.action, e.holding) for e in journal) == sorted(
        [("change", "DEMO-TSY-0101"), ("change", "DEMO-TSY-0202"), ("add", "=DEMO-NEW-1")])
    assert all("November statement" in e.reason and e.date == book.valuation_date for e in journal)
    # no cash moves in an import: every line carries its amount, 0
    assert all(e.amount == 0.0 for e in journal)
    bill = next(e for e in journal if e.holding == "DEMO-TSY-0101")
    # the amortized cost that left with 1,000,000 face of the bill: 1/8 of its 7,986,007.69
    # (tests/report/test_one_book_value.py, by hand)
    assert bill.book_value == pytest.approx(-7_986_007.69 / 8, rel=0, abs=0.01)


def test_a_file_without_rating_columns_keeps_the_ratings(demo_copy, tmp_path):
    with open(demo_copy / "holdings.csv", newline="", encoding="utf-8") as f:
        rows = list(csv.DictReader(f))
    columns = [c for c in rows[0] if c not in ("rating", "short_rating", "rating_at_purchase")]
    path = tmp_path / "custodian.csv"
    with open(path, "w", newline="", encoding="utf-8") as f:
        writer = csv.DictWriter(f, fieldnames=columns, lineterminator="\n", extrasaction="ignore")
        writer.writeheader()
        writer.writerows(rows)
    book = load_book(demo_copy)
    assert compare_holdings(book, read_custodian_file(book, path)) == ()     # nothing differs
    rated = int((book.holdings.rating != "").sum())
    assert rated > 50
    assert "Nothing to apply" in _run_import([str(demo_copy), str(path), "--apply", "--yes"])
    assert list(load_book(demo_copy).holdings.rating) == list(book.holdings.rating)


def test_a_custodian_file_with_duplicate_ids_is_refused_and_nothing_written(demo_copy, tmp_path, capsys):
    lines = (demo_copy / "holdings.csv").read_text(encoding="utf-8").splitlines(keepends=True)
    path = tmp_path / "custodian.csv"
    path.write_text("".join(lines + [lines[3]]), encoding="utf-8")
    before = (demo_copy / "holdings.csv").read_bytes()
    assert main(["import", str(demo_copy), str(path), "--apply", "--yes"]) == 2
    err = capsys.readouterr().err
    assert f"{path}:{len(lines) + 1}:1:" in err and "duplicate id" in err and "first on row 4" in err
    assert (demo_copy / "holdings.csv").read_bytes() == before and not (demo_copy / "journal.jsonl").exists()


def test_report_command_writes_every_format_and_reproduces(demo_copy, tmp_path):
    out = io.StringIO()
    with redirect_stdout(out):
        assert main(["report", str(demo_copy), "--format", "all", "--out", str(tmp_path / "r")]) == 0
        assert main(["report", str(demo_copy), "--at", "2026-11-30", "--reproduce", "--format", "md",
                     "--out", str(tmp_path / "again")]) == 0
    names = sorted(p.name for p in (tmp_path / "r").iterdir())
    assert names == ["tessaline-report-2026-11-30-income-1.png", "tessaline-report-2026-11-30-maturities-1.png",
                     "tessaline-report-2026-11-30-shock-1.png", "tessaline-report-2026-11-30.html",
                     "tessaline-report-2026-11-30.md", "tessaline-report-2026-11-30.xlsx"]
    assert (tmp_path / "again" / "tessaline-report-2026-11-30.md").read_text() == \
        (tmp_path / "r" / "tessaline-report-2026-11-30.md").read_text()
    assert (demo_copy / "history.sqlite").exists()
    # a reproduction that was never recorded is refused as input, nothing written
    assert main(["report", str(demo_copy), "--at", "2026-10-31", "--reproduce", "--out", str(tmp_path / "no")]) == 2
    assert not (tmp_path / "no").exists()
