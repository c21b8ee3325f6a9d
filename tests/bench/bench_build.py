"""Benchmark: the ladder builder with 500 offerings and 12 rungs on the demo book.

Run as a script (not collected by pytest): ``python tests/bench/bench_build.py``. Writes an invented
offerings file (500 rows, about 120 issuers, seven sectors, 1 to 36 months, a few callables) to a
temporary folder, builds ``--rungs 12x3M`` for 100,000,000 of cash, and prints the integer program's
solve time next to the linear relaxation's (the same rows and bounds without integrality), measured
in the same run, and the whole build (valuation, program, solve, what-if check, explanation).
"""

from __future__ import annotations

from ladder.demo import demo_source

import csv
import statistics
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

from ladder.analysis.build import build_ladder
from ladder.folder.book_file import load_book
from ladder.book.holdings_file import COLUMNS

ROOT = Path(__file__).resolve().parents[2]
N, RUNS, CASH = 500, 3, 100_000_000
SECTORS = [("treasury", "AA+", ""), ("agency", "AA+", "A-1+"), ("supranational", "AAA", ""),
           ("corporate", "A", ""), ("corporate", "AA-", ""), ("commercial_paper", "", "A-1"), ("cd", "A+", "A-1"),
           ("municipal", "AA", "")]


def offerings(path: Path, settle: np.datetime64, rng: np.random.Generator) -> None:
    rows = []
    for i in range(N):
        sector, rating, short = SECTORS[i % len(SECTORS)]
        months = int(rng.integers(1, 37)) if sector not in ("commercial_paper",) else int(rng.integers(1, 9))
        maturity = (settle.astype("datetime64[M]") + months).astype("datetime64[D]") + int(rng.integers(0, 27))
        spread = {"treasury": 0.0, "agency": 0.12, "supranational": 0.15, "corporate": 0.6, "commercial_paper": 0.2,
                  "cd": 0.25, "municipal": 0.3}[sector]
        ytm = 3.72 + 0.02 * months / 12 + spread + rng.normal(0, 0.05)
        row = dict.fromkeys(COLUMNS, "")
        issuer = "US Treasury" if sector == "treasury" else f"Bench {sector} issuer {i % 120:03d}"
        row.update(id=f"BENCH-{i:04d}", sector=sector, issuer=issuer, face="1000000",
                   maturity_date=str(maturity), rating=rating, short_rating=short)
        if sector == "commercial_paper":
            row.update(kind="discount", discount_rate_pct=f"{ytm - 0.05:.3f}")
        elif sector == "cd":
            row.update(kind="at_maturity", coupon_pct=f"{ytm:.3f}", issue_date=str(settle - 30), yield_pct=f"{ytm:.3f}")
        else:
            row.update(coupon_pct=f"{round(ytm * 8) / 8:.3f}", issue_date=str(settle - 200), yield_pct=f"{ytm:.3f}")
            if sector == "agency" and months > 12 and i % 3 == 0:
                row.update(first_call_date=str(settle + 180), call_frequency="4", call_price="100")
        row.update(available_face=str(int(rng.integers(1, 21)) * 1_000_000), min_lot="1000000",
                   lot_increment=str(int(rng.choice([1_000, 5_000, 100_000]))))
        rows.append(row)
    with path.open("w", newline="") as out:
        writer = csv.DictWriter(out, fieldnames=list(COLUMNS) + ["available_face", "min_lot", "lot_increment"])
        writer.writeheader()
        writer.writerows(rows)


def main() -> int:
    book = load_book(demo_source())
    rng = np.random.default_rng(7)
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "offerings.csv"
        offerings(path, np.datetime64(book.valuation_date), rng)
        results, walls = [], []
        for _ in range(RUNS):
            start = time.perf_counter()
            results.append(build_ladder(book, CASH, rungs="12x3M", offerings=path))
            walls.append(time.perf_counter() - start)
    r = results[-1]
    milp = statistics.median(x.solution.seconds for x in results)
    lp = statistics.median(x.relaxation.seconds for x in results)
    print(f"offerings: {N} ({len(r.candidates)} eligible incl. funds; left out: "
          f"{sum(n for _, n in r.candidates.left_out)}); rungs 12x3M; cash {CASH:,}")
    print(f"program: {len(r.program.c)} variables ({int((r.program.integrality > 0).sum())} integer), "
          f"{len(r.program.b)} rows; status {r.status}, solver {r.solution.status}, gap {r.solution.gap}")
    print(f"integer program (HiGHS milp): {milp:.3f} s   median of {RUNS}")
    print(f"linear relaxation (reference): {lp:.3f} s   ratio {milp / lp:.1f}x")
    print(f"whole build: {statistics.median(walls):.3f} s (valuation, program, solve, what-if check)")
    print(f"trades: {len(r.trades)}; compliance after: {r.compliance_status}")
    ok = r.status == "built" and r.solution.status == "optimal" and statistics.median(walls) < 5.0
    print("target (optimal, under 5 s):", "met" if ok else "NOT met")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
