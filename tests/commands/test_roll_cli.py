"""``ladder roll``: maturities and calls rolled past are taken off the book and journaled (issue 9 item 2)."""

from __future__ import annotations


import pytest

from ladder.folder.book_file import load_book
from ladder.folder.journal import read_journal
from ladder.cli import main
from ladder.demo import write_demo


@pytest.fixture()
def folder(tmp_path):
    target = tmp_path / "book"
    write_demo(target)
    return target


def test_roll_takes_off_matured_and_called_holdings_and_journals_them(folder, capsys):
    before = load_book(folder)
    # Demo: DEMO-TSY-0101 (bill, 2026-12-17), DEMO-CP-0701 (2026-12-08), DEMO-CD-0801 (2026-12-15) mature
    # by 2026-12-17; DEMO-AGY-0322 is callable.
    assert main(["roll", str(folder), "--to", "2026-12-17", "--called", "DEMO-AGY-0322", "--format", "json"]) == 0
    after = load_book(folder)
    gone = set(before.holdings.id) - set(after.holdings.id)
    matured = {i for i, m, k in zip(before.holdings.id, before.holdings.maturity, before.holdings.kind)
               if str(m) <= "2026-12-17" and k != "fund"}
    assert gone == matured | {"DEMO-AGY-0322"}
    journal = read_journal(folder)
    assert {(e.action, e.holding) for e in journal} == {("mature", i) for i in matured} | {("call", "DEMO-AGY-0322")}
    bill = next(e for e in journal if e.holding == "DEMO-TSY-0101")
    assert bill.amount == pytest.approx(bill.face, rel=1e-12, abs=0)          # a bill pays its face at maturity
    call = next(e for e in journal if e.action == "call")
    assert call.amount > call.face                          # call price 100 plus accrued interest


def test_roll_refuses_a_called_id_that_is_not_callable(folder, capsys):
    assert main(["roll", str(folder), "--to", "2026-12-17", "--called", "DEMO-TSY-0201"]) == 2
    assert "not a callable holding" in capsys.readouterr().err
    assert not (folder / "journal.jsonl").exists()
