"""Small book folders for the cash-plan tests, written to a temporary folder and loaded.

``flat_par_yields(r, date)`` gives the par yields of a curve whose continuously compounded zero rate
is ``r`` at every maturity: each quoted instrument of ``ladder.pricing.curve`` (bills up to 6M,
semiannual par bonds beyond) priced off DF(t) = exp(-r t), so the bootstrapped curve is exactly
flat (all discrete forwards equal r) and closed forms hold on it.
"""

from __future__ import annotations

import csv
from pathlib import Path

import numpy as np

from ladder.folder.book_file import load_book
from ladder.pricing.curve import ParCurve, par_instruments

TENORS = ("1M", "3M", "6M", "1Y", "2Y", "3Y", "5Y", "7Y", "10Y")
HOLDING_COLUMNS = ("id", "sector", "issuer", "kind", "face", "maturity_date", "coupon_pct", "frequency", "day_count",
                   "issue_date", "rating", "short_rating", "price", "yield_pct", "discount_rate_pct", "book_price",
                   "purchase_date", "first_call_date", "call_frequency", "call_price")
POLICY = """[policy]
name = "Plan test policy"
version = "1"
adopted = 2024-01-01

[portfolio]
max_maturity_years = 5
"""


def flat_par_yields(r: float, curve_date: str) -> np.ndarray:
    """Par yields (decimals) of the flat continuously compounded zero curve at ``r``."""
    inst = par_instruments(ParCurve(TENORS, np.zeros(len(TENORS))), np.datetime64(curve_date))
    df = np.exp(-r * inst.times)
    bill_df = np.exp(-r * inst.maturity_times)
    annuity = inst.coupon_flows @ df
    bond = 2.0 * (1.0 - bill_df) / np.where(inst.is_bill, 1.0, annuity)
    bill = (1.0 / bill_df - 1.0) / inst.maturity_times
    return np.where(inst.is_bill, bill, bond)


def write_book(folder: Path, valuation_date: str, holdings: list[dict], needs: list[tuple] = (),
               par_yields=None, reinvest: str = 'rule = "fund"', policy: str = POLICY, r: float = 0.04,
               spreads: str = ""):
    """Write a book folder and load it. ``holdings``: dicts of holdings.csv columns (a row without a
    maturity date, such as a fund, is next available the day after the valuation date); ``needs``:
    (date, amount, label); par yields default to the flat zero curve at ``r``; ``reinvest`` and
    ``spreads`` are the bodies of book.toml's tables."""
    folder.mkdir(parents=True, exist_ok=True)
    yields = flat_par_yields(r, valuation_date) if par_yields is None else np.asarray(par_yields)
    (folder / "book.toml").write_text(
        f'name = "Plan test"\nvaluation_date = {valuation_date}\n\n[reinvest]\n{reinvest}\n'
        + (f"\n[spreads]\n{spreads}\n" if spreads else ""), encoding="utf-8")
    (folder / "policy.toml").write_text(policy, encoding="utf-8")
    with (folder / "curve.csv").open("w", newline="") as f:
        w = csv.writer(f)
        w.writerow(["tenor", "par_yield_pct"])
        for tenor, y in zip(TENORS, yields):
            w.writerow([tenor, f"{100 * y:.12f}"])
    with (folder / "holdings.csv").open("w", newline="") as f:
        w = csv.DictWriter(f, fieldnames=HOLDING_COLUMNS)
        w.writeheader()
        next_day = str(np.datetime64(valuation_date) + 1)
        for row in holdings:
            w.writerow({"issuer": row.get("issuer", row["id"]), "maturity_date": next_day, **row})
    with (folder / "cash_needs.csv").open("w", newline="") as f:
        w = csv.writer(f)
        w.writerow(["date", "amount", "label"])
        for row in needs:
            w.writerow(row)
    return load_book(folder)


def fund(balance: float, yield_pct: float = 3.65, id: str = "FUND") -> dict:
    """A money-market fund row (``3.65`` percent earns exactly 0.0001 a day on ACT/365F)."""
    return {"id": id, "sector": "fund", "face": balance, "yield_pct": yield_pct}
