"""Benchmark: price, effective duration and effective convexity of many callables, next to QuantLib.

Run as a script (not collected by pytest):  python tests/bench/bench_callable.py [--bonds 1000]
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
    CURVES, REF, discount_of, ladder_bonds, ql_callable, ql_curve, ql_dirty,
)

from ladder.pricing.callable import HullWhiteParams, option_adjusted_spreads, value_callables  # noqa: E402


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
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
