"""``ladder roll``: time moves the book (issue 14 item 3): coupons, maturities, calls and fund dividends are
credited to the cash account, one journal line each; matured and called holdings leave; the valuation date
moves; bad dates are refused with nothing written."""

from __future__ import annotations

import pytest

from ladder.cli import main
from ladder.demo import write_demo
from ladder.folder.book_file import load_book
from ladder.folder.journal import read_journal
from cli_books import digest, run


@pytest.fixture()
def folder(tmp_path):
    target = tmp_path / "book"
    write_demo(target)
    return target


def test_roll_credits_maturities_coupons_calls_and_dividends(folder, capsys):
    before = load_book(folder)
    cash0 = float(before.holdings.face[before.holdings.id == before.cash_account][0])
    # Demo: DEMO-AGY-0324 (5,000,000 face, 3.85% 30/360 semiannual, first call 2027-02-27, monthly calls).
    assert main(["roll", str(folder), "--to", "2027-03-31", "--called", "DEMO-AGY-0324:2027-03-27",
                 "--yes", "--format", "json"]) == 0
    after = load_book(folder)
    assert after.valuation_date.isoformat() == "2027-03-31"
    gone = set(before.holdings.id) - set(after.holdings.id)
    matured = {i for i, m, k in zip(before.holdings.id, before.holdings.maturity, before.holdings.kind)
               if str(m) <= "2027-03-31" and k != "fund"}
    assert gone == matured | {"DEMO-AGY-0324"}
    assert set(after.holdings.id[after.holdings.kind == "fund"]) == set(before.holdings.id[before.holdings.kind == "fund"])
    journal = read_journal(folder)
    assert {e.holding for e in journal if e.action == "mature"} == matured
    call = next(e for e in journal if e.action == "call")
    # Hand arithmetic: 30/360 accrued from the coupon of 2027-02-27 to 2027-03-27 is 30 days;
    # 3.85% x 30/360 x 100 = 0.3208333 per 100; proceeds = (100 + 0.3208333) x 5,000,000 / 100, paid in
    # cents (half a cent of rounding).
    assert call.amount == pytest.approx((100 + 3.85 * 30 / 360) * 50_000, rel=0, abs=0.005)
    # Its coupon of 2027-02-27 (before the call) is credited: 3.85 / 2 x 50,000 = 96,250 (30/360 regular period).
    coupon = next(e for e in journal if e.action == "coupon" and e.holding == "DEMO-AGY-0324")
    assert str(coupon.date) == "2027-02-27" and coupon.amount == pytest.approx(96_250.0, rel=1e-12, abs=0)
    cash1 = float(after.holdings.face[after.holdings.id == after.cash_account][0])
    assert cash1 == pytest.approx(cash0 + sum(e.amount for e in journal), rel=0, abs=0.005)   # to the cent


@pytest.mark.parametrize("argv, message", [
    (["--to", "2026-10-31"], "is before the book's valuation date"),
    (["--to", "2026-12-31", "--called", "DEMO-AGY-0324"], "is before its first call date 2027-02-27"),
    (["--to", "2027-03-31", "--called", "DEMO-AGY-0324:2027-03-15"], "is not on its call schedule"),
    (["--to", "2026-12-17", "--called", "DEMO-TSY-0201"], "not a callable holding"),
])
def test_roll_refuses_bad_dates_and_writes_nothing(folder, capsys, argv, message):
    before = digest(folder)
    code, _, err = run(capsys, "roll", folder, *argv, "--yes")
    assert code == 2 and message in err
    assert digest(folder) == before
