"""``ladder import`` (custodian file against the book) and ``ladder report`` end to end."""

from __future__ import annotations

import argparse
import csv
import io
import json
from contextlib import redirect_stdout

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


def test_custodian_differences_then_apply(demo_copy, tmp_path):
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
    assert (demo_copy / "holdings.csv").read_bytes() == original            # shown, not replaced
    assert "'=DEMO-NEW-1" in _run_import([str(demo_copy), str(path), "--format", "csv"])   # formula-safe csv

    _run_import([str(demo_copy), str(path), "--apply", "--reason", "November statement"])
    after = load_book(demo_copy)
    assert compare_holdings(after.holdings, read_custodian_file(book, path)) == ()      # the file is the book now
    assert len(after.holdings) == len(book.holdings)
    assert (demo_copy / "holdings.csv.bak").read_bytes() == original
    journal = read_journal(demo_copy)
    assert sorted((e.action, e.holding) for e in journal) == sorted(
        [("change", "DEMO-TSY-0101"), ("change", "DEMO-TSY-0202"), ("add", "=DEMO-NEW-1"), ("remove", removed)])
    assert all("November statement" in e.reason and e.date == book.valuation_date for e in journal)


def test_report_command_writes_every_format_and_reproduces(demo_copy, tmp_path):
    out = io.StringIO()
    with redirect_stdout(out):
        assert main(["report", str(demo_copy), "--format", "all", "--out", str(tmp_path / "r")]) == 0
        assert main(["report", str(demo_copy), "--at", "2026-11-30", "--reproduce", "--format", "md",
                     "--out", str(tmp_path / "again")]) == 0
    names = sorted(p.name for p in (tmp_path / "r").iterdir() if p.name != ".chart-cache")
    assert len(list((tmp_path / "r" / ".chart-cache").glob("*.png"))) == 3   # each chart drawn once, kept
    assert names == ["tessaline-report-2026-11-30-income-1.png", "tessaline-report-2026-11-30-maturities-1.png",
                     "tessaline-report-2026-11-30-shock-1.png", "tessaline-report-2026-11-30.html",
                     "tessaline-report-2026-11-30.md", "tessaline-report-2026-11-30.xlsx"]
    assert (tmp_path / "again" / "tessaline-report-2026-11-30.md").read_text() == \
        (tmp_path / "r" / "tessaline-report-2026-11-30.md").read_text()
    assert (demo_copy / "history.sqlite").exists()
    # a reproduction that was never recorded is refused as input, nothing written
    assert main(["report", str(demo_copy), "--at", "2026-10-31", "--reproduce", "--out", str(tmp_path / "no")]) == 2
    assert not (tmp_path / "no").exists()
