"""The cash account (issue 14 items 1, 2 and 4): trades settle through it, transfers move it, and its
balance is always its opening balance plus every journal amount."""

from __future__ import annotations

import datetime as dt
import sys
from pathlib import Path

import numpy as np
import pytest
import QuantLib as ql

from ladder.analysis.booking import book_trades
from ladder.analysis.check import check_trade_file
from ladder.analysis.settlement import cash_balance, settle_trades
from ladder.book.holdings import make_holdings
from ladder.demo import write_demo
from ladder.errors import InputError
from ladder.folder.book_file import load_book
from ladder.folder.journal import read_journal
from ladder.policy.trades import Trades

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "commands"))
from cli_books import digest, run  # noqa: E402

CENT = 0.005   # half a cent: every amount is booked in cents


@pytest.fixture()
def folder(tmp_path):
    return write_demo(tmp_path / "book")


def _trade(rows: dict, action: str, settle=None, funded=None) -> Trades:
    h = make_holdings(**{k: [v] for k, v in rows.items()})
    return Trades(h, np.array([action], dtype=object), "t.csv",
                  None if settle is None else np.array([settle], dtype="datetime64[D]"),
                  None if funded is None else np.array([funded], dtype=object))


SIX = """id,sector,issuer,face,maturity_date,coupon_pct,rating,action{extra}
NEW-1,corporate,Quillon Software Corp,3000000,2028-06-15,4.2,A,buy{v}
NEW-2,corporate,Quillon Software Corp,3000000,2029-06-15,4.3,A,buy{v}
"""


def test_buys_funded_from_the_money_fund_show_the_liquidity_breach_new_money_hid(folder, tmp_path):
    book = load_book(folder)
    funded, new = tmp_path / "funded.csv", tmp_path / "new.csv"
    funded.write_text(SIX.format(extra="", v=""))
    new.write_text(SIX.format(extra=",funded_from", v=",new_money"))
    paid = check_trade_file(book, funded)
    grown = check_trade_file(book, new)
    rule = "portfolio.liquidity[0].min_pct"
    by_rule = {c.rule: c for c in paid.check.changes}
    assert by_rule[rule].new_breach and paid.status == "breach"
    assert not {c.rule: c for c in grown.check.changes}[rule].new_breach
    # Paid from the fund: the fund falls by exactly the two costs, the market value is unchanged.
    s = paid.settlement
    assert s.cash_before - s.cash_after == pytest.approx(-sum(t.amount for t in s.trades), rel=0, abs=CENT)
    assert paid.after.totals.market_value == pytest.approx(paid.before.totals.market_value, rel=1e-9, abs=0)


def test_a_buy_the_account_cannot_pay_is_a_breach_and_is_refused_when_booked(folder):
    book = load_book(folder)
    trades = _trade(dict(id="BIG-1", sector="treasury", issuer="US Treasury", face=40e6, maturity="2028-11-30",
                         coupon=0.04, quote_type="price", quote=100.0), "buy")
    settled = settle_trades(book, trades)
    # Hand arithmetic: 40,000,000 at 100 with no accrued (issued today) costs 40,000,000; the demo's money
    # fund holds 15,000,000, so it is short by 25,000,000.
    assert settled.shortfalls[0].shortfall == pytest.approx(25e6, rel=0, abs=CENT)
    before = digest(folder)
    with pytest.raises(InputError, match="short by 25,000,000.00"):
        book_trades(book, trades, "too big")
    assert digest(folder) == before


def _ql_note(issue: dt.date, maturity: dt.date, coupon: float, day_count: str):
    schedule = ql.Schedule(ql.Date(issue.day, issue.month, issue.year), ql.Date(maturity.day, maturity.month,
                           maturity.year), ql.Period(ql.Semiannual), ql.NullCalendar(), ql.Unadjusted, ql.Unadjusted,
                           ql.DateGeneration.Backward, False)
    dc = {"30/360": ql.Thirty360(ql.Thirty360.BondBasis), "ACT/360": ql.Actual360(),
          "ACT/365F": ql.Actual365Fixed(), "ACT/ACT-ISDA": ql.ActualActual(ql.ActualActual.ISDA)}[day_count]
    return ql.FixedRateBond(0, 100.0, schedule, [coupon], dc, ql.Unadjusted, 100.0)


@pytest.mark.parametrize("seed", range(6))
def test_sale_proceeds_are_clean_plus_accrued_by_the_holdings_own_day_count(folder, seed):
    # QuantLib: FixedRateBond.accruedAmount on the settlement date, same schedule and day count.
    rng = np.random.default_rng(seed)
    book = load_book(folder)
    dc = ["30/360", "ACT/360", "ACT/365F", "ACT/ACT-ISDA"][seed % 4]
    issue = book.valuation_date - dt.timedelta(days=int(rng.integers(10, 700)))
    maturity = dt.date(issue.year + int(rng.integers(3, 8)), issue.month, min(issue.day, 28))
    issue = dt.date(issue.year, issue.month, min(issue.day, 28))
    coupon, clean, face = round(float(rng.uniform(0.01, 0.07)), 4), round(float(rng.uniform(95, 105)), 3), 1e6 * int(rng.integers(1, 9))
    note = make_holdings(id=["Q-1"], sector=["agency"], issuer=["Q agency"], face=[face], maturity=[str(maturity)],
                         coupon=[coupon], day_count=[dc], issue_date=[str(issue)], quote_type=["price"], quote=[clean])
    from ladder.book.holdings import Holdings
    book = book.with_holdings(Holdings.concat([book.holdings, note]))
    settle = book.valuation_date + dt.timedelta(days=int(rng.integers(0, 40)))
    settled = settle_trades(book, _trade(dict(id="Q-1", sector="agency", issuer="Q agency", face=face,
                                              maturity=str(maturity)), "sell", settle=str(settle)))
    ql.Settings.instance().evaluationDate = ql.Date(settle.day, settle.month, settle.year)
    accrued = _ql_note(issue, maturity, coupon, dc).accruedAmount(ql.Date(settle.day, settle.month, settle.year))
    t = settled.trades[0]
    assert t.amount == pytest.approx((clean + accrued) * face / 100.0, rel=0, abs=CENT)   # booked in cents
    assert settled.cash_after - settled.cash_before == pytest.approx(t.amount, rel=0, abs=CENT)


def test_transfers_move_the_account_and_refuse_an_overdraft(folder, capsys):
    before = digest(folder)
    code, _, err = run(capsys, "cash", folder, "--withdraw", "20000000")
    assert code == 2 and "--allow-overdraft" in err and digest(folder) == before
    assert run(capsys, "cash", folder, "--withdraw", "2,500,000.25", "--memo", "payroll")[0] == 0
    assert run(capsys, "cash", folder, "--deposit", "1000000", "--date", "2026-12-15")[0] == 0
    assert run(capsys, "cash", folder, "--withdraw", "14000000", "--allow-overdraft")[0] == 0
    book = load_book(folder)
    # Hand arithmetic: 15,000,000 - 2,500,000.25 + 1,000,000 - 14,000,000 = -500,000.25 (overdrawn).
    assert cash_balance(book) == pytest.approx(-500_000.25, rel=0, abs=CENT)
    assert [e.action for e in read_journal(folder)] == ["withdraw", "deposit", "withdraw"]


def test_bad_cash_account_and_settle_date_are_refused(folder, tmp_path, capsys):
    toml = folder / "book.toml"
    toml.write_text(toml.read_text().replace('account = "DEMO-MMF-0901"', 'account = "NO-SUCH"'))
    code, _, err = run(capsys, "value", folder)
    line = next(i for i, t in enumerate(toml.read_text().splitlines(), 1) if t.startswith("account"))
    assert code == 2 and f"book.toml:{line}:1: cash.account: 'NO-SUCH' is not a holding" in err
    toml.write_text(toml.read_text().replace('"NO-SUCH"', '"DEMO-MMF-0901"'))
    trades = tmp_path / "early.csv"
    trades.write_text(SIX.format(extra=",settle_date", v=",2026-11-02"))
    code, _, err = run(capsys, "check", folder, "--trade", trades)
    assert code == 2 and "early.csv:2:9: settle_date 2026-11-02 is before the valuation date" in err


def test_build_out_is_accepted_by_check_as_it_is(folder, tmp_path, capsys):
    out = tmp_path / "built.csv"
    assert run(capsys, "build", folder, "--cash", "20000000", "--out", out)[0] == 0
    assert "new_money" in out.read_text()
    code, _, err = run(capsys, "check", folder, "--trade", out, "--format", "json")
    assert code in (0, 1) and err == ""


def test_the_plan_uses_actual_transfers_for_dates_passed_and_the_forecast_after(folder, capsys):
    # Demo forecast: 2026-12-15 8,900,000 and 6,000,000, 2026-12-22 3,000,000, 2026-12-31 -7,500,000
    # (net 10,400,000 in December), 2027-01 net 1,800,000.
    import json

    assert run(capsys, "cash", folder, "--withdraw", "10400000", "--date", "2026-12-31", "--memo", "December")[0] == 0
    code, out, _ = run(capsys, "plan", folder, "--format", "json", "--months", "3")
    doc = json.loads(out)
    months = {p["start"][:7]: p["needs"] for p in doc["periods"]}
    assert code == 0 and months["2026-12"] == 0.0
    assert months["2027-01"] == pytest.approx(1_800_000.0, rel=0, abs=CENT)
    assert any("4 forecast cash need(s) up to 2026-12-31 are replaced" in n for n in doc["notes"])


NORTH_ATLANTIC = """id,sector,issuer,face,maturity_date,coupon_pct,rating,action{extra}
NEW-1,supranational,North Atlantic Development Bank,3800000,2028-06-15,4.2,AAA,buy{v}
NEW-2,supranational,North Atlantic Development Bank,3800000,2029-06-15,4.3,AAA,buy{v}
"""


def test_funded_buys_show_the_issuer_and_liquidity_breaches_that_new_money_hides(folder, tmp_path):
    # The demo holds 9,259,436 of North Atlantic Development Bank (market value) in a book of 333,892,957;
    # 7.6 million more of it: as new money (9.26 + 7.6) / (333.9 + 7.6) = 4.94% < 5% (the policy's issuer
    # cap); paid from the money fund (9.26 + 7.6) / 333.9 = 5.05% > 5%, and the fund's 15 million falls to
    # about 7.4 million, below the 7-day liquidity floor. Hand arithmetic at par (prices near 100).
    book = load_book(folder)
    funded, new = tmp_path / "funded.csv", tmp_path / "new.csv"
    funded.write_text(NORTH_ATLANTIC.format(extra="", v=""))
    new.write_text(NORTH_ATLANTIC.format(extra=",funded_from", v=",new_money"))
    grown = {c.rule: c for c in check_trade_file(book, new).check.changes}
    paid = {c.rule: c for c in check_trade_file(book, funded).check.changes}
    for rule in ("portfolio.issuer_max_pct", "portfolio.liquidity[0].min_pct"):
        assert paid[rule].new_breach and not grown[rule].new_breach
    assert grown["portfolio.issuer_max_pct"].after.status == "near"
    assert grown["portfolio.issuer_max_pct"].after.actual < 5.0 < paid["portfolio.issuer_max_pct"].after.actual
