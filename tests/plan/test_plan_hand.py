"""Hand-computed plans: a two-bond ladder with a fund, with and without a shortfall, and a bill rolled
monthly. Every expected figure is worked out below from the rules in ladder.plan (arithmetic shown).

Book (valuation Thursday 31 Dec 2026):
- FUND 1,000,000 at a stated 3.65% on ACT/365F: 0.0365 / 365 = 0.0001 a day;
- A: corporate 4% 30/360 semiannual (31 Mar / 30 Sep), face 2,000,000, due Wed 31 Mar 2027, bought at 100;
- B: corporate 5% 30/360 semiannual (30 Jun / 31 Dec), face 3,000,000, due Wed 30 Jun 2027, bought at 100;
  its 31 Dec 2026 coupon is paid on the plan date itself and so is not in the plan.
Cash needs: 15 Jan 500,000; 20 Mar 2,500,000; 10 May -100,000 (a receipt). Reinvestment: fund rule.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from ladder.analysis.plan import PlanOptions, plan_book
from plan_books import fund, write_book

A = {"id": "A", "sector": "corporate", "face": 2_000_000, "maturity_date": "2027-03-31", "coupon_pct": 4,
     "issue_date": "2025-03-31", "rating": "AA", "price": 100, "book_price": 100, "purchase_date": "2025-03-31"}
B = {"id": "B", "sector": "corporate", "face": 3_000_000, "maturity_date": "2027-06-30", "coupon_pct": 5,
     "issue_date": "2025-06-30", "rating": "AA", "price": 100, "book_price": 100, "purchase_date": "2025-06-30"}
NEEDS = [("2027-01-15", 500_000, "payroll"), ("2027-03-20", 2_500_000, "tax"), ("2027-05-10", -100_000, "receipt")]
DAY = 0.0365 / 365          # the fund's rate a day


def _two_bond(tmp_path, needs=NEEDS):
    book = write_book(tmp_path / "ladder", "2026-12-31", [fund(1_000_000), A, B], needs)
    return plan_book(book, options=PlanOptions(months=6), with_income=False)


def test_two_bond_ladder_cash_by_month(tmp_path):
    pr = _two_bond(tmp_path).projection
    # Jan: fund 1,000,000 x 0.0001 x 31 = 3,100; need 500,000      -> 503,100
    # Feb: fund   503,100 x 0.0001 x 28 = 1,408.68                  -> 504,508.68
    # Mar: fund 504,508.68 x 0.0031 = 1,563.976908; A pays its last coupon 2,000,000 x 4% / 2 = 40,000
    #      and 2,000,000 principal; need 2,500,000                   -> 46,072.656908
    # Apr: fund x 0.0030 = 138.217971                               -> 46,210.874879
    # May: fund x 0.0031 = 143.253712; receipt 100,000              -> 146,354.128591
    # Jun: fund x 0.0030 = 439.062386; B pays 75,000 and 3,000,000  -> 3,221,793.190977
    fund_income, closing = [], []
    cash = 1_000_000.0
    for days, inflow in ((31, -500_000), (28, 0), (31, 40_000 + 2_000_000 - 2_500_000), (30, 0), (31, 100_000),
                         (30, 75_000 + 3_000_000)):
        fund_income.append(cash * DAY * days)
        cash += fund_income[-1] + inflow
        closing.append(cash)
    assert np.allclose(pr.fund_income, fund_income, rtol=0, atol=1e-6)
    assert np.allclose(pr.closing_cash, closing, rtol=0, atol=1e-6)
    assert closing[2] == pytest.approx(46_072.656908, abs=1e-6, rel=0)
    assert closing[-1] == pytest.approx(3_221_793.190977, abs=1e-6, rel=0)
    assert np.allclose(pr.coupons, [0, 0, 40_000, 0, 0, 75_000], rtol=1e-12, atol=0)
    assert np.allclose(pr.principal, [0, 0, 2_000_000, 0, 0, 3_000_000], rtol=1e-12, atol=0)
    assert np.allclose(pr.needs, [500_000, 0, 2_500_000, 0, -100_000, 0], rtol=1e-12, atol=0)
    assert not pr.reinvested.any() and not pr.shortfall.any() and pr.first_shortfall is None


def test_two_bond_ladder_accrual_income(tmp_path):
    pr = _two_bond(tmp_path).projection
    # 30/360 accrued days (ISDA 4.16(f)) counted from each coupon period's start:
    # A from 30 Sep: 31 Dec 90, 31 Jan 120, 28 Feb 148, then the 31 Mar coupon (180): monthly 30, 28, 32
    # B from 31 Dec: 31 Jan 30, 28 Feb 58, 31 Mar 90, 30 Apr 120, 31 May 150, 30 Jun coupon 180:
    #   monthly 30, 28, 32, 30, 30, 30. Both bought at 100, so nothing to amortize.
    a_days = np.array([30, 28, 32, 0, 0, 0])
    b_days = np.array([30, 28, 32, 30, 30, 30])
    expected = 2_000_000 * 0.04 * a_days / 360 + 3_000_000 * 0.05 * b_days / 360 + pr.fund_income
    assert np.allclose(pr.income, expected, rtol=0, atol=1e-6)
    # the coupon less the 90 days bought
    assert (2_000_000 * 0.04 * a_days / 360).sum() == pytest.approx(20_000, rel=1e-12, abs=0)


def test_two_bond_ladder_shortfall_and_sale(tmp_path):
    needs = NEEDS + [("2027-02-26", 1_000_000, "earn-out")]
    plan = _two_bond(tmp_path, needs)
    pr = plan.projection
    # Feb: 503,100 + 1,408.68 - 1,000,000 = -495,491.32: the first shortfall.
    assert plan.first_shortfall == 1
    assert pr.shortfall[1] == pytest.approx(495_491.32, abs=1e-6, rel=0)
    # Sales are priced at the sale date on the curve at the held spread (the pull to par). On the flat
    # curve (zero rate r) with spread z, a bond with one flow F left t years ahead is worth F e^{-(r+z) t}.
    # A (bought at 100, due 31 Mar: one flow 102): today (31 Dec) clean 100 + accrued 4 x 90/360 = 101,
    # so e^{-(r+z) 90/365} = 101/102 and on 28 Feb dirty = 102 (101/102)^(31/90); accrued 4 x 148/360.
    # B (due 30 Jun: one flow 102.5, no accrued today): dirty 28 Feb = 102.5 (100/102.5)^(122/181),
    # accrued 5 x 58/360. Both sell above their cost of 100 (A 100.0101, B 100.0026, hand-computed): A
    # gains more per unit of cash raised, so A is sold first.
    # face = 495,491.32 / (dirty / 100) rounded up to a 1,000 lot; realized gain = face x (clean - 100) / 100.
    dirty = 102 * (101 / 102) ** (31 / 90)
    clean = dirty - 4 * 148 / 360
    b_clean = 102.5 * (100 / 102.5) ** (122 / 181) - 5 * 58 / 360
    assert (clean - 100) / dirty > (b_clean - 100) / (b_clean + 5 * 58 / 360)
    face = math.ceil(495_491.32 / (dirty / 100) / 1000) * 1000
    (sale,) = [s for s in pr.sale_list if s.period == 1]
    assert sale.id == "A"
    assert sale.face == face
    assert sale.clean_price == pytest.approx(clean, rel=0, abs=1e-9)
    assert sale.proceeds == pytest.approx(face * dirty / 100, abs=1e-6, rel=0)
    assert sale.realized_gain == pytest.approx(face * (clean - 100) / 100, abs=1e-6, rel=0)
    assert pr.closing_cash[1] == pytest.approx(face * dirty / 100 - 495_491.32, abs=1e-6, rel=0)
    left = 2_000_000 - face
    # Mar: A pays on the face left: coupon 2% and principal.
    assert pr.coupons[2] == pytest.approx(left * 0.02, rel=1e-12, abs=0)
    assert pr.principal[2] == pytest.approx(left, rel=1e-12, abs=0)
    # March is short again (closing + fund income + A's 1.02 x face left - 2,500,000 < 0): B, the only
    # one left, is sold.
    march = pr.closing_cash[1] * (1 + DAY * 31) + left * 1.02 - 2_500_000
    assert pr.shortfall[2] == pytest.approx(-march, abs=1e-6, rel=0)
    assert [s.id for s in pr.sale_list if s.period == 2] == ["B"]
    # Income stops on the face sold: March accrual of A is the face left x 4% x 32/360.
    a_march = left * 0.04 * 32 / 360
    b_march = 3_000_000 * 0.05 * 32 / 360
    assert pr.income[2] == pytest.approx(a_march + b_march + pr.fund_income[2], abs=1e-6, rel=0)


def test_bill_rolled_monthly(tmp_path):
    """A 1M bill bought at each month-end with everything that comes back (buffer 0, no fund).

    Flat zero curve r = 4% continuously compounded, treasury spread 0, so a one-payment purchase
    over tau = days / 365 yields y = (e^(r tau) - 1) / tau and returns A e^(r tau). The bill held,
    1,000,000 due Fri 29 Jan 2027 (no quote: priced from the curve at the table's treasury spread 0), was
    bought 29 Oct 2026 at 99.00: 92 days, accreting 1.00 / 92 a day.
    Maturities (month-end plus a month, Modified Following on the SIFMA calendar):
      31 Jan -> 28 Feb is a Sunday, 1 Mar is next month -> Fri 26 Feb (26 days)
      28 Feb -> Wed 31 Mar (31 days); 31 Mar -> Fri 30 Apr (30 days);
      30 Apr -> Mon 31 May is Memorial Day, 1 Jun is next month -> Fri 28 May (28 days);
      31 May -> Wed 30 Jun (30 days).
    """
    bill = {"id": "BILL", "sector": "treasury", "kind": "discount", "face": 1_000_000, "maturity_date": "2027-01-29",
            "book_price": 99.0, "purchase_date": "2026-10-29", "rating": "AA+"}
    book = write_book(tmp_path / "bill", "2026-12-31", [bill], reinvest='rule = "target_tenor"\n'
                      'target_tenor = "1M"\nmin_cash_buffer = 0', spreads="treasury = { default = 0 }")
    pr = plan_book(book, options=PlanOptions(months=6), with_income=False).projection
    r = 0.04
    taus = np.array([26, 31, 30, 28, 30]) / 365.0
    amounts = [1_000_000.0]
    for tau in taus[:-1]:
        amounts.append(amounts[-1] * math.exp(r * tau))
    # reinvested at the end of Jan..May; the June bill (bought 30 Jun) is the sixth
    assert np.allclose(pr.reinvested[:5], amounts, rtol=1e-12, atol=0)
    assert np.allclose(pr.reinvest_yield[:5], np.expm1(r * taus) / taus, rtol=1e-9, atol=0)
    assert np.allclose(pr.closing_cash, 0.0, atol=1e-6, rtol=0)
    # income: January is the bill's accretion, 1,000,000 x 1.00% x 29 / 92 (31 Dec to 29 Jan);
    # each later month the bill bought a month before earns A (e^(r tau) - 1) (each repays inside the month)
    assert pr.income_holdings[0] == pytest.approx(1_000_000 * 0.01 * 29 / 92, rel=1e-12, abs=0)
    earned = [a * math.expm1(r * tau) for a, tau in zip(amounts, taus)]
    assert np.allclose(pr.income_purchases[1:6], earned, rtol=1e-9, atol=0)
    assert pr.income_purchases[0] == 0.0
