"""Benchmark: price, effective duration and effective convexity of many callables, next to QuantLib.

Run as a script (not collected by pytest):  python tests/bench/bench_callable.py [--bonds 1000]

Second part (issue 18): the same bonds under 61 scenario curves (the zero curve moved in parallel by
-300 to +300 bp in 10 bp steps), every (bond, curve) pair rolled back together on one lattice,
against QuantLib's tree engine bond by bond and curve by curve (a ZeroSpreadedTermStructure per
shift) on a subset of pairs, scaled. Targets: under 1 s, and at least 50 times QuantLib.
Invented bonds: semiannual 30/360 agency-style callables, coupons 3-6%, 1 to --max-years years,
callable at 100 from 3 months to 2 years out, once or every 1, 3, 6 or 12 months. Both sides do three
tree valuations per bond (base, curve +25 bp, curve -25 bp, OAS held) on the same Hull-White
parameters and curve; QuantLib's TreeCallableFixedRateBondEngine runs bond by bond on a subset with
the same grid density (52 steps a year), and its time is scaled to the full count.
"""

from __future__ import annotations

import argparse
import os
import sys
import time
from pathlib import Path

import numpy as np
import QuantLib as ql

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "pricing"))
from test_callable_quantlib import (  # noqa: E402
    ACT365, CURVES, REF, discount_of, ladder_bonds, ql_callable, ql_curve, ql_dirty,
)

from ladder.pricing.callable import (  # noqa: E402
    HullWhiteParams, callable_prices, option_adjusted_spreads, value_callables,
)

SHIFTS_BP = np.arange(-300.0, 301.0, 10.0)


def invented_bonds(n: int, max_years: float, seed: int = 7):
    rng = np.random.default_rng(seed)
    specs = []
    for _ in range(n):
        months = int(rng.integers(12, int(12 * max_years) + 1))
        maturity = REF + ql.Period(months, ql.Months)
        first = REF + ql.Period(int(rng.integers(3, min(24, months - 1) + 1)), ql.Months)
        specs.append((round(float(rng.uniform(0.03, 0.06)), 4), maturity, first,
                      int(rng.choice([0, 1, 3, 6, 12]))))
    return [ql_callable(*s) for s in specs]


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--bonds", type=int, default=1000)
    parser.add_argument("--subset", type=int, default=40, help="bonds priced by QuantLib")
    parser.add_argument("--max-years", type=float, default=5.0)
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()

    params = HullWhiteParams()
    a, sigma, shift, oas = params.mean_reversion, params.volatility, 0.0025, 0.002
    zero = CURVES["sloped"]
    discount, curve = discount_of(zero), ql_curve(zero)
    ql_bonds = invented_bonds(args.bonds, args.max_years)
    bonds = ladder_bonds(ql_bonds)

    value_callables(bonds, discount, params, oas=oas, shift=shift)  # warm-up
    ours = []
    for _ in range(args.repeat):
        start = time.perf_counter()
        values = value_callables(bonds, discount, params, oas=oas, shift=shift)
        ours.append(time.perf_counter() - start)
    ours_s = min(ours)

    subset = np.linspace(0, args.bonds - 1, min(args.subset, args.bonds)).astype(int)
    start = time.perf_counter()
    ref = {}
    for i in subset:
        steps = max(int(round(params.steps_per_year * bonds.maturity_years[i])), 1)
        ref[i] = [ql_dirty(ql_bonds[i], curve, a, sigma, steps, oas + d) for d in (0.0, shift, -shift)]
    ql_s = (time.perf_counter() - start) * args.bonds / len(subset)

    target = values.dirty_price
    start = time.perf_counter()
    solved = option_adjusted_spreads(bonds, discount, target, params)
    oas_s = time.perf_counter() - start

    price_gap = max(abs(values.dirty_price[i] - ref[i][0]) for i in subset)
    duration_gap = max(abs(values.effective_duration[i] - (ref[i][2] - ref[i][1]) / (2 * ref[i][0] * shift))
                       for i in subset)
    print(f"{args.bonds} callables, 1 to {args.max_years:g} years, a={a}, sigma={sigma}, "
          f"{params.steps_per_year} steps a year, {os.cpu_count()} cores")
    print(f"ladder  price + effective duration + convexity: {ours_s:8.3f} s  (best of {args.repeat})")
    print(f"QuantLib tree engine, same 3 valuations:        {ql_s:8.3f} s  "
          f"(measured on {len(subset)} bonds, scaled)")
    print(f"ratio QuantLib / ladder:                        {ql_s / ours_s:8.1f}")
    print(f"ladder OAS from price, all bonds:               {oas_s:8.3f} s  "
          f"(max error {np.nanmax(np.abs(solved - oas)):.1e})")
    print(f"largest gap on the subset: price {price_gap:.4f} per 100, duration {duration_gap:.4f} y")
    return 0 if scenario_curves(args, params, zero, ql_bonds, bonds, oas) else 1


def scenario_curves(args, params, zero, ql_bonds, bonds, oas) -> bool:
    """Every bond under 61 parallel moves of the zero curve, ours batched, QuantLib pair by pair."""
    a, sigma = params.mean_reversion, params.volatility
    shifts = SHIFTS_BP / 1e4
    many = lambda t: np.exp(-np.outer(shifts, t) - zero(np.asarray(t, float)) * np.asarray(t, float))
    callable_prices(bonds, many, oas, params)                               # warm-up (lattice cached)
    walls, cpus = [], []
    for _ in range(args.repeat):
        wall, cpu = time.perf_counter(), time.process_time()
        ours = callable_prices(bonds, many, oas, params)
        walls.append(time.perf_counter() - wall)
        cpus.append(time.process_time() - cpu)
    wall_s, cpu_s = min(walls), min(cpus)

    base = ql_curve(zero)
    pick_bonds = np.linspace(0, args.bonds - 1, min(args.subset, args.bonds)).astype(int)
    pick_curves = np.linspace(0, len(shifts) - 1, 5).astype(int)
    start, cpu = time.perf_counter(), time.process_time()
    gap = 0.0
    for s in pick_curves:
        shifted = ql.YieldTermStructureHandle(ql.ZeroSpreadedTermStructure(
            base, ql.QuoteHandle(ql.SimpleQuote(float(shifts[s]))), ql.Continuous, ql.NoFrequency, ACT365))
        for i in pick_bonds:
            steps = max(int(round(params.steps_per_year * bonds.maturity_years[i])), 1)
            gap = max(gap, abs(ql_dirty(ql_bonds[i], shifted, a, sigma, steps, oas) - ours[s, i]))
    pairs = len(pick_bonds) * len(pick_curves)
    scale = len(shifts) * args.bonds / pairs
    ql_wall, ql_cpu = (time.perf_counter() - start) * scale, (time.process_time() - cpu) * scale
    print(f"\n{args.bonds} callables x {len(shifts)} curves ({args.bonds * len(shifts):,} pairs), one lattice:")
    print(f"ladder: {wall_s:.3f} s wall, {cpu_s:.3f} s CPU (best of {args.repeat}; target < 1 s)")
    print(f"QuantLib tree engine: {ql_wall:.1f} s wall, {ql_cpu:.1f} s CPU (measured on {pairs} pairs, scaled)")
    print(f"ratio QuantLib / ladder: {ql_wall / wall_s:.0f}x wall, {ql_cpu / cpu_s:.0f}x CPU (target >= 50x); "
          f"largest price gap on the pairs {gap:.4f} per 100")
    return wall_s < 1.0 and ql_cpu / cpu_s >= 50


if __name__ == "__main__":
    raise SystemExit(main())
