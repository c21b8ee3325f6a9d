"""Reinvestment: the closed-form yield and income of a purchase on a flat curve, the two rates rules,
the rules' tenors and the refusals (tenor beyond the policy, unknown or forbidden sector)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from ladder.analysis.plan import PlanOptions, plan_book
from ladder.errors import InputError
from ladder.plan.rates import RatePath, modified_following
from ladder.pricing.curve import bootstrap
from plan_books import POLICY, fund, write_book

R = 0.04


def _fund_only(tmp_path, reinvest='rule = "target_tenor"\ntarget_tenor = "2Y"\nmin_cash_buffer = 0', **kw):
    return write_book(tmp_path / "b", "2026-12-31", [fund(1_000_000)], reinvest=reinvest,
                      spreads="treasury = { default = 0 }", **kw)


def test_flat_curve_note_yield_and_income_closed_form(tmp_path):
    """Flat zero curve r = 4% (continuous), curve stays, treasury spread 0, buffer 0.

    January: the fund earns 1,000,000 x 0.0001 x 31 = 3,100, and A = 1,003,100 is bought at the end of
    January in a 2Y semiannual par note. Its half-year dates from 31 Jan 2027 (end-of-month rule):
    31 Jul 2027, 31 Jan 2028, 31 Jul 2028, 31 Jan 2029: 181, 365, 547, 731 days. Par yield:
    y = 2 (1 - e^(-r t4)) / sum_j e^(-r tj). Its first coupon, A y / 2, accrues over those 181 days, so
    February to June earn A y / 2 x (28, 31, 30, 31, 30) / 181.
    """
    book = _fund_only(tmp_path)
    pr = plan_book(book, options=PlanOptions(months=6), with_income=False).projection
    t = np.array([181, 365, 547, 731]) / 365.0
    y = 2 * (1 - math.exp(-R * t[-1])) / np.exp(-R * t).sum()
    amount = 1_000_000 * (1 + 0.0001 * 31)
    assert pr.reinvested[0] == pytest.approx(amount, rel=1e-12, abs=0)
    assert pr.reinvest_yield[0] == pytest.approx(y, abs=1e-11, rel=0)
    expected = amount * y / 2 * np.array([0, 28, 31, 30, 31, 30]) / 181
    assert np.allclose(pr.income_purchases, expected, rtol=1e-9, atol=1e-9)
    assert np.allclose(pr.fund_income[1:], 0.0, rtol=1e-12, atol=0) and not pr.reinvested[1:].any()


def test_flat_curve_forwards_equal_the_curve_that_stays(tmp_path):
    """On a flat curve today's forwards are today's rates, so the two rules plan the same."""
    book = _fund_only(tmp_path)
    stay = plan_book(book, options=PlanOptions(months=12), with_income=False).projection
    forward = plan_book(book, options=PlanOptions(months=12, rates="forward"), with_income=False).projection
    assert np.allclose(stay.income, forward.income, rtol=1e-9, atol=0)
    assert np.allclose(stay.reinvest_yield, forward.reinvest_yield, rtol=1e-9, equal_nan=True, atol=0)


def test_rate_paths_on_a_sloped_curve(tmp_path):
    """stay: DF seen later is today's DF(t); forward: DF(s + t) / DF(s) (exactly, by definition)."""
    book = _fund_only(tmp_path, par_yields=np.linspace(0.03, 0.05, 9))
    curve = bootstrap(book.curve, np.datetime64("2026-12-31"))
    on = np.datetime64("2027-12-31")
    s = 365 / 365.0
    tau = np.array([0.25, 1.0, 3.0])
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    assert np.allclose(RatePath(curve, "stay").discount(on, tau), curve.discount(tau), rtol=1e-12, atol=0)
    assert np.allclose(RatePath(curve, "forward").discount(on, tau),
                       curve.discount(s + tau) / curve.discount(s), rtol=1e-12, atol=0)
    # an upward curve: the one-month rate seen in a year is above today's under forwards, equal under stay
    ahead = np.array([on])
    assert RatePath(curve, "forward").short_rate(ahead)[0] > RatePath(curve, "stay").short_rate(ahead)[0]


def test_modified_following():
    """ISDA 2006 4.12 Modified Following on the SIFMA calendar (dates checked on a 2027 calendar)."""
    days = np.array(["2027-02-28", "2027-05-31", "2027-07-31", "2027-03-31", "2027-01-16"], dtype="datetime64[D]")
    # Sun -> Mon 1 Mar crosses the month: Fri 26 Feb; Memorial Day Mon 31 May: Fri 28 May;
    # Sat 31 Jul: Fri 30 Jul; a Wednesday stays; Sat 16 Jan -> Tue 19 Jan (Mon 18 Jan is MLK Day)
    expected = np.array(["2027-02-26", "2027-05-28", "2027-07-30", "2027-03-31", "2027-01-19"], dtype="datetime64[D]")
    assert (modified_following(days) == expected).all()


LADDER = [fund(1_000_000),
          {"id": "N4", "sector": "treasury", "face": 1_000_000, "maturity_date": "2030-06-30", "coupon_pct": 4,
           "issue_date": "2025-06-30", "price": 100, "book_price": 100, "purchase_date": "2025-06-30"},
          {"id": "N1", "sector": "treasury", "face": 1_000_000, "maturity_date": "2028-03-31", "coupon_pct": 4,
           "issue_date": "2025-03-31", "price": 100, "book_price": 100, "purchase_date": "2025-03-31"}]


def test_longest_rung(tmp_path):
    """A ladder whose longest holding (Jun 2030, 3.5 years) is in the 3-5Y rung buys 5Y notes."""
    book = write_book(tmp_path / "l", "2026-12-31", LADDER, reinvest='rule = "longest_rung"')
    plan = plan_book(book, options=PlanOptions(months=3), with_income=False)
    assert plan.reinvestment.months == 60 and plan.reinvestment.note == ""
    short = write_book(tmp_path / "s", "2026-12-31", LADDER[::2], reinvest='rule = "longest_rung"')
    assert plan_book(short, options=PlanOptions(months=3), with_income=False).reinvestment.months == 24


def test_longest_rung_cut_to_the_policy_maximum(tmp_path):
    policy = POLICY.replace("max_maturity_years = 5", "max_maturity_years = 2")
    book = write_book(tmp_path / "l", "2026-12-31", LADDER, reinvest='rule = "longest_rung"', policy=policy)
    plan = plan_book(book, options=PlanOptions(months=3), with_income=False)
    assert plan.reinvestment.months == 24
    assert any("maximum maturity" in note and "2Y" in note for note in plan.notes)


def test_tenor_beyond_the_policy_is_refused(tmp_path):
    book = _fund_only(tmp_path)
    with pytest.raises(InputError) as error:
        plan_book(book, options=PlanOptions(rule="target_tenor", tenor="7Y"))
    (problem,) = error.value.problems
    assert problem.file == "--tenor" and "beyond the policy's maximum maturity of 5 years" in problem.message
    with pytest.raises(InputError, match="whole half-years"):
        plan_book(book, options=PlanOptions(tenor="15M"))              # a tenor alone: the target_tenor rule
    with pytest.raises(InputError, match="--tenor is the tenor of the target_tenor rule"):
        plan_book(book, options=PlanOptions(rule="longest_rung", tenor="2Y"))


def test_sector_refusals(tmp_path):
    book = _fund_only(tmp_path, policy=POLICY + "\n[sectors.corporate]\nallowed = false\n")
    with pytest.raises(InputError, match="not a sector to buy"):
        plan_book(book, options=PlanOptions(sector="bonds"))
    with pytest.raises(InputError, match="does not allow the corporate sector"):
        plan_book(book, options=PlanOptions(sector="corporate"))
    # A [spreads] entry replaces that sector's default spreads; an empty one leaves it none.
    no_agency_spread = write_book(tmp_path / "c", "2026-12-31", [fund(1_000_000)],
                                  reinvest='rule = "target_tenor"\ntarget_tenor = "2Y"\nmin_cash_buffer = 0',
                                  spreads="treasury = { default = 0 }\nagency = {}", policy=POLICY)
    with pytest.raises(InputError, match="no spread for sector 'agency'"):
        plan_book(no_agency_spread, options=PlanOptions(sector="agency"))


def test_fund_rule_keeps_the_cash_in_the_fund(tmp_path):
    book = _fund_only(tmp_path, reinvest='rule = "fund"')
    pr = plan_book(book, options=PlanOptions(months=12), with_income=False).projection
    assert not pr.reinvested.any()
    # 1,000,000 compounding monthly at 0.0001 a day for the days of each month of 2027
    days = np.array([31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31])
    assert pr.closing_cash[-1] == pytest.approx(1_000_000 * np.prod(1 + 0.0001 * days), rel=1e-12, abs=0)
