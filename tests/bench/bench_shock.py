"""Benchmark: full revaluation of a 10,000-holding book under 61 parallel scenarios, next to QuantLib.

Run as a script (not collected by pytest):  python tests/bench/bench_shock.py [--holdings 10000]

The book is generated (seeded, invented issuers) in a temporary folder with the demo book's curve,
spreads, policy and cash needs: Treasury and agency, supranational, municipal and corporate notes
(semiannual, ACT/ACT or 30/360), Treasury bills, commercial paper, CDs and funds, maturing in 2 weeks
to 10 years; about half quoted (price, yield or discount rate), the rest priced from the curve plus
the spread table. ``--callable-share`` makes that share of the agency notes callable (0 by default:
the QuantLib comparison is for option-free holdings, see tests/bench/bench_callable.py for the tree).

Both sides do the same work: rebuild the curve from the par yields moved by each of 61 parallel
shifts (-300 to +300 bp in 10 bp steps; monotone convex, the same par instruments), then price every
coupon note, bill and CD at its held z-spread on every curve. QuantLib (test reference only) builds
each curve with PiecewiseConvexMonotoneForward and prices bond by bond with BondFunctions.dirtyPrice
at the z-spread (continuous, ACT/365F, as ladder's); it prices a subset of the bonds and its pricing
time is scaled to the full count (its curve building is not scaled). Prices of the subset are
compared to show the work is the same. Then the whole ``ladder shock`` command is timed on the
generated book folder (a subprocess: start-up, reading, valuation, all default scenarios, key-rate
durations, output).
"""

from __future__ import annotations

from ladder.demo import demo_source

import argparse
import csv
import datetime as dt
import os
import resource
import shutil
import subprocess
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

import numpy as np
import QuantLib as ql

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "pricing"))
from test_curve_quantlib import quantlib_curve  # noqa: E402

from ladder.analysis.shock import shock_book  # noqa: E402
from ladder.analysis.valuation import value_book  # noqa: E402
from ladder.folder.book_file import load_book  # noqa: E402

ROOT = Path(__file__).resolve().parents[2]
DEMO = demo_source()
SHIFTS_BP = np.arange(-300.0, 301.0, 10.0)
COLUMNS = ("id", "sector", "issuer", "kind", "face", "maturity_date", "coupon_pct", "frequency", "day_count",
           "issue_date", "rating", "short_rating", "price", "yield_pct", "discount_rate_pct", "book_price",
           "purchase_date", "first_call_date", "call_frequency", "call_price")
# sector, share of the book, (shortest, longest) maturity in days, long rating, short rating
MIX = (("treasury", 0.22, (60, 3650), "AA+", ""), ("agency", 0.18, (90, 3650), "AA+", "A-1+"),
       ("supranational", 0.08, (180, 2900), "AAA", ""), ("municipal", 0.10, (180, 3650), "AA", ""),
       ("corporate", 0.20, (90, 3650), "A", ""), ("bill", 0.07, (14, 364), "AA+", "A-1+"),
       ("commercial_paper", 0.07, (14, 270), "", "A-1"), ("cd", 0.06, (30, 720), "A+", "A-1"),
       ("fund", 0.02, (1, 1), "", ""))


def _day(d: dt.date) -> str:
    return d.isoformat()


def holdings_rows(n: int, valuation: dt.date, seed: int = 11, callable_share: float = 0.0) -> list[dict]:
    """``n`` invented holdings as holdings.csv rows (percent and prices as files write them)."""
    rng = np.random.default_rng(seed)
    sectors = rng.choice(len(MIX), size=n, p=[m[1] for m in MIX])
    rows = []
    for i, k in enumerate(sectors):
        sector, _, (low, high), rating, short = MIX[k]
        days = int(rng.integers(low, high + 1))
        maturity = valuation + dt.timedelta(days=days)
        maturity = maturity.replace(day=min(maturity.day, 28))      # month ends only in February
        if maturity <= valuation:
            maturity = valuation + dt.timedelta(days=1)
        row = dict.fromkeys(COLUMNS, "")
        row.update(id=f"GEN-{i:05d}", sector="treasury" if sector == "bill" else sector,
                   issuer=f"Invented Issuer {int(rng.integers(1, 400)):03d}" if sector not in ("treasury", "bill")
                   else "US Treasury", face=str(int(rng.integers(1, 41)) * 250_000),
                   maturity_date=_day(maturity), rating=rating, short_rating=short)
        quoted = rng.random() < 0.5
        if sector == "fund":
            row.update(yield_pct=f"{rng.uniform(3.4, 3.7):.2f}")
        elif sector in ("bill", "commercial_paper"):
            term = int(rng.integers(days + 1, days + 200))
            row.update(kind="discount", issue_date=_day(maturity - dt.timedelta(days=term)),
                       discount_rate_pct=f"{rng.uniform(3.55, 3.95):.3f}" if quoted or sector == "bill" else "")
        elif sector == "cd":
            term = int(rng.integers(days + 1, days + 365))
            row.update(coupon_pct=f"{rng.uniform(3.6, 4.2):.3f}", issue_date=_day(maturity - dt.timedelta(days=term)),
                       yield_pct=f"{rng.uniform(3.7, 4.0):.3f}" if quoted else "")
        else:
            years = int(rng.choice([2, 3, 5, 7, 10]))
            issue = maturity.replace(year=maturity.year - max(years, days // 365 + 1))
            coupon = round(float(rng.uniform(1.5, 5.5)) * 8) / 8
            row.update(coupon_pct=f"{coupon:g}", issue_date=_day(issue),
                       price=f"{100 + (coupon - 4.0) * min(days / 365, 7) * 0.9 + rng.normal(0, 0.3):.3f}"
                       if quoted else "")
            if sector == "agency" and rng.random() < callable_share and days > 400:
                first = valuation + dt.timedelta(days=int(rng.integers(60, days // 2)))
                row.update(first_call_date=_day(first.replace(day=min(first.day, 28))),
                           call_frequency=str(int(rng.choice([0, 4]))), call_price="100")
        rows.append(row)
    return rows


def write_book(folder: Path, n: int, seed: int = 11, callable_share: float = 0.0) -> Path:
    """A book folder with ``n`` generated holdings and the demo book's other files."""
    folder.mkdir(parents=True, exist_ok=True)
    for name in ("book.toml", "curve.csv", "policy.toml", "cash_needs.csv", "scenarios.csv"):
        shutil.copy(DEMO / name, folder / name)
    demo = load_book(DEMO)
    with open(DEMO / "holdings.csv", newline="") as handle:     # the demo's cash account, as book.toml names it
        account = [{k: row.get(k, "") for k in COLUMNS} for row in csv.DictReader(handle)
                   if row["id"] == demo.cash_account]
    with open(folder / "holdings.csv", "w", newline="") as handle:
        writer = csv.DictWriter(handle, fieldnames=COLUMNS)
        writer.writeheader()
        writer.writerows(account + holdings_rows(n, demo.valuation_date, seed, callable_share))
    return folder


# ---- QuantLib side ---------------------------------------------------------------------------------

def ql_date(d) -> ql.Date:
    d = dt.date.fromisoformat(str(d))
    return ql.Date(d.day, d.month, d.year)


def ql_bond(h, i: int):
    """Holding ``i`` as a QuantLib bond with the same cash flows (unadjusted dates, no calendar)."""
    calendar, maturity = ql.NullCalendar(), ql_date(h.maturity[i])
    issue = ql_date(h.issue_date[i])
    if h.kind[i] == "discount":
        return ql.ZeroCouponBond(0, calendar, 100.0, maturity, ql.Unadjusted, 100.0, issue)
    if h.kind[i] == "at_maturity":
        interest = 100.0 * h.coupon[i] * ql.Actual360().yearFraction(issue, maturity)
        return ql.ZeroCouponBond(0, calendar, 100.0, maturity, ql.Unadjusted, 100.0 + interest, issue)
    schedule = ql.Schedule(issue, maturity, ql.Period(ql.Semiannual), calendar, ql.Unadjusted, ql.Unadjusted,
                           ql.DateGeneration.Backward, ql.Date.isEndOfMonth(maturity))   # end-of-month rule
    day_count = (ql.ActualActual(ql.ActualActual.Bond, schedule) if h.day_count[i] == "ACT/ACT"
                 else ql.Thirty360(ql.Thirty360.BondBasis))
    return ql.FixedRateBond(0, 100.0, schedule, [float(h.coupon[i])], day_count, ql.Unadjusted)


def quantlib_loop(book, valuation, rows, shifts_bp):
    """QuantLib prices (S, len(rows)), the curve-building time and the pricing time (seconds)."""
    date = book.valuation_date
    bonds = [ql_bond(book.holdings, int(i)) for i in rows]
    settle = ql_date(date)
    day_count = ql.Actual365Fixed()
    prices = np.empty((len(shifts_bp), len(rows)))
    curve_s = price_s = 0.0
    for s, bp in enumerate(shifts_bp):
        start = time.perf_counter()
        curve, _ = quantlib_curve(date, book.curve.tenors, book.curve.par_yields + bp / 1e4, "monotone_convex")
        curve.discount(1.0)                                          # bootstrap now
        middle = time.perf_counter()
        for j, (bond, i) in enumerate(zip(bonds, rows)):
            prices[s, j] = ql.BondFunctions.dirtyPrice(bond, curve, float(valuation.spread[i]), day_count,
                                                       ql.Continuous, ql.Annual, settle)
        end = time.perf_counter()
        curve_s, price_s = curve_s + middle - start, price_s + end - middle
    return prices, curve_s, price_s


def engine(valuation, shifts):
    curves = valuation.curve.shifted_many(shifts)
    return valuation.pricer.dirty(curves)


def best_of(repeat: int, work) -> tuple[float, object]:
    times, result = [], None
    for _ in range(repeat):
        start = time.perf_counter()
        result = work()
        times.append(time.perf_counter() - start)
    return min(times), result


def time_command(folder: Path, fmt: str, repeat: int) -> tuple[float, float]:
    """Best wall time and best CPU time (user + system) of ``ladder shock`` in a subprocess, seconds.

    On a machine busy with other work the wall time overstates the command's own time; the CPU
    time does not (the command runs on one core except for numpy's and the tree's threads).
    """
    command = [sys.executable, "-m", "ladder.cli", "shock", str(folder), "--format", fmt]
    walls, cpus = [], []
    for _ in range(repeat):
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        start = time.perf_counter()
        subprocess.run(command, check=True, stdout=subprocess.DEVNULL, cwd=ROOT)
        walls.append(time.perf_counter() - start)
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpus.append(after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime)
    return min(walls), min(cpus)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--holdings", type=int, default=10_000)
    parser.add_argument("--subset", type=int, default=1_000, help="holdings priced by QuantLib")
    parser.add_argument("--callable-share", type=float, default=0.0, help="share of agency notes made callable")
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()

    with tempfile.TemporaryDirectory() as tmp:
        folder = write_book(Path(tmp) / "generated", args.holdings, callable_share=args.callable_share)
        book = load_book(folder)
        valuation = value_book(book)
        h = book.holdings
        shifts = SHIFTS_BP[:, None] * np.ones(len(book.curve))
        print(f"book: {len(h)} holdings ({int(h.callable.sum())} callable), "
              f"{int(valuation.pricer.cash_flows.mask.sum())} cash flows; {len(SHIFTS_BP)} parallel scenarios; "
              f"{os.cpu_count()} cores")

        engine(valuation, shifts)                                        # warm-up
        ours_s, ours = best_of(args.repeat, lambda: engine(valuation, shifts))
        tracemalloc.start()
        engine(valuation, shifts)
        peak = tracemalloc.get_traced_memory()[1]
        tracemalloc.stop()

        priced = np.flatnonzero((h.kind != "fund") & ~h.callable)
        rows = priced[np.linspace(0, len(priced) - 1, min(args.subset, len(priced))).astype(int)]
        theirs, curve_s, price_s = quantlib_loop(book, valuation, rows, SHIFTS_BP)
        ql_s = curve_s + price_s * len(priced) / len(rows)
        gap = np.abs(ours[:, rows] - theirs).max()

        shock_s, _ = best_of(1, lambda: shock_book(book))
        print(f"engine: 61 curves rebuilt + {len(h)} holdings repriced: {ours_s:.3f} s; "
              f"peak traced memory {peak / 2**20:.0f} MiB")
        print(f"QuantLib: 61 curves {curve_s:.3f} s + pricing {price_s:.3f} s for {len(rows)} bonds, "
              f"scaled to {len(priced)}: {ql_s:.1f} s")
        print(f"ratio QuantLib / engine: {ql_s / ours_s:.0f}x (target >= 40x); "
              f"largest price gap on the subset: {gap:.2e} per 100")
        print(f"shock_book (all default scenarios + key-rate durations), in process: {shock_s:.2f} s")
        print(f"load average now {os.getloadavg()[0]:.2f}; PYTHONUNBUFFERED={os.environ.get('PYTHONUNBUFFERED', '')!r}")
        for fmt in ("table", "json", "csv"):
            wall, cpu = time_command(folder, fmt, args.repeat)
            print(f"ladder shock --format {fmt}: {wall:.2f} s wall, {cpu:.2f} s CPU (target < 3 s)")
        print(f"peak RSS of the ladder shock runs {resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024:.0f} MiB")
    return 0


if __name__ == "__main__":
    sys.exit(main())
