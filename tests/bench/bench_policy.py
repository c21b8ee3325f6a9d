"""Benchmark: a 10,000-holding book against a 50-rule policy.

Run as a script (not collected by pytest): ``python tests/bench/bench_policy.py``. Prints the time of
one full check next to a reference measured in the same run: a plain pandas groupby computing the
same book's sector, issuer and sector-by-issuer shares (what the share rules need), so the ratio says
how the whole check (ratings parsed, every rule graded, results built) compares with bare grouping.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "policy"))

from ladder.book.cash_needs import CashNeeds  # noqa: E402
from ladder.book.holdings import NO_CALL, SECTORS, Holdings  # noqa: E402
from ladder.policy.checker import check  # noqa: E402
from ladder.policy.measures import PositionMeasures, days_to_maturity  # noqa: E402
from ladder.policy.rules import compile_rules  # noqa: E402
from policy_books import HEAD, policy  # noqa: E402

N = 10_000
AS_OF = np.datetime64("2025-01-31", "D")
LONG = np.array(["AAA", "AA+/Aa1", "AA", "AA-/Aa3/AA", "A+", "A1/A+", "A", "A-", "BBB+", ""], dtype=object)
SHORT = np.array(["A-1+", "A-1/P-1", "F1", "A-2", ""], dtype=object)

SECTOR_BODY = """
[sectors.{name}]
max_pct = 60
min_pct = 1
max_maturity_years = 5
min_long_rating = "BBB+"
issuer_max_pct = 8
callable_max_pct = 30
"""
PORTFOLIO = """
[portfolio]
max_effective_duration = 3.0
max_wam_days = 900
max_maturity_years = 5
issuer_max_pct = 8
callable_max_pct = 30
cash_needs_horizon_months = 12
liquidity = [{ within_days = 7, min_pct = 1 }, { within_days = 30, min_pct = 3 }, { within_days = 90, min_pct = 8 }]
"""


def make_book(rng: np.random.Generator) -> PositionMeasures:
    sector = rng.choice(np.array(SECTORS, dtype=object), N)
    maturity = AS_OF + rng.integers(1, 5 * 365, N).astype("timedelta64[D]")
    callable_ = rng.random(N) < 0.1
    h = Holdings(
        id=np.array([f"H{i:05d}" for i in range(N)], dtype=object), sector=sector,
        issuer=np.array([f"Issuer {i}" for i in rng.integers(0, 400, N)], dtype=object),
        kind=np.where(sector == "fund", "fund", "fixed").astype(object), face=rng.uniform(1e5, 5e6, N),
        maturity=maturity, coupon=np.full(N, 0.04), frequency=np.full(N, 2), day_count=np.full(N, "30/360", object),
        issue_date=np.full(N, np.datetime64("NaT", "D")), first_coupon=np.full(N, np.datetime64("NaT", "D")),
        rating=rng.choice(LONG, N), short_rating=rng.choice(SHORT, N), rating_at_purchase=rng.choice(LONG, N),
        quote_type=np.full(N, "", object), quote=np.full(N, np.nan), book_price=np.full(N, 100.0),
        purchase_date=np.full(N, np.datetime64("2024-06-03", "D")),
        first_call=np.where(callable_, AS_OF + 180, np.datetime64("NaT", "D")),
        call_frequency=np.where(callable_, 4, NO_CALL), call_price=np.full(N, 100.0), negotiable=np.ones(N, bool),
        row=np.arange(2, N + 2))
    market = h.face * rng.uniform(0.97, 1.03, N)
    cash = np.zeros((N, 12))
    month = rng.integers(0, 12, N)
    cash[np.arange(N), month] = h.face * 0.02
    return PositionMeasures(h, AS_OF, market, h.face.copy(), rng.uniform(0, 4.5, N), days_to_maturity(h, AS_OF), cash)


def reference(m: PositionMeasures) -> None:
    frame = pd.DataFrame({"sector": m.holdings.sector, "issuer": m.holdings.issuer, "value": m.market_value})
    total = frame["value"].sum()
    frame.groupby("sector")["value"].sum().div(total)
    frame.groupby("issuer")["value"].sum().div(total)
    frame.groupby(["sector", "issuer"])["value"].sum().div(total)


def best_of(fn, repeat: int = 5) -> float:
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return min(times)


def main() -> None:
    rng = np.random.default_rng(20250131)
    m = make_book(rng)
    body = PORTFOLIO + "".join(SECTOR_BODY.format(name=s) for s in SECTORS[:6])
    body += "".join(f'[issuers."Issuer {i}"]\nmax_pct = 6\n' for i in range(4))
    p = policy(body, HEAD)
    rules = compile_rules(p)
    needs = CashNeeds(AS_OF + np.arange(30, 360, 30).astype("timedelta64[D]"), np.full(11, 1e8),
                      np.full(11, "need", object), np.arange(2, 13))
    result = check(p, m, needs)
    t_check = best_of(lambda: check(p, m, needs))
    t_ref = best_of(lambda: reference(m))
    print(f"{N:,} holdings, {len(rules)} rules, overall status {result.status} {result.counts()}")
    print(f"policy check       {t_check * 1e3:8.1f} ms")
    print(f"pandas groupby ref {t_ref * 1e3:8.1f} ms  (sector, issuer, sector x issuer shares)")
    print(f"ratio check / reference = {t_check / t_ref:.1f}")


if __name__ == "__main__":
    main()
