"""Benchmark: ``risk_book`` (``ladder risk``) against a straightforward loop over paths, in the same run.

Run as a script (not collected by pytest):
  python tests/bench/bench_risk.py [--demo-paths 200] [--large-paths 100] [--holdings 10000]

Two books: the demo (24 months, every rule) and ``bench_shock.py``'s generated book of
``--holdings`` holdings (12 months, every rule). The engine runs the cash plan on each path with the
path-independent parts of every curve question computed once and shared by all the paths of a chunk
(``ladder.plan.model_path.PathCurves``); the reference is the same plan on each path with every
curve evaluated from the closed form afresh (what a loop over paths that calls the model directly
does). Both give the same outcomes (checked here). Printed: wall and CPU seconds (on a busy machine the CPU time is the fairer figure), CPU a path, the ratio reference /
engine, the time the issue's path counts would take at that rate (2,000 paths on the demo,
1,000 on the large book), and the process's peak resident memory.
"""

from __future__ import annotations

import argparse
import resource
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "pricing"))
from bench_shock import write_book  # noqa: E402

import ladder.analysis.risk as engine  # noqa: E402
from ladder.demo import write_demo  # noqa: E402
from ladder.folder.book_file import load_book  # noqa: E402
from ladder.plan.model_path import PathCurves  # noqa: E402


class FreshCurves(PathCurves):
    """The reference: every curve question answered from the closed form, nothing kept."""

    def parts(self, on, tau):
        answer = super().parts(on, tau)
        self.known.clear()
        return answer


def timed(book, paths: int, months: int, reference: bool):
    engine.PathCurves = FreshCurves if reference else PathCurves
    try:
        start, cpu = time.perf_counter(), time.process_time()
        result = engine.risk_book(book, options=engine.RiskOptions(paths=paths, months=months))
        return time.perf_counter() - start, time.process_time() - cpu, result
    finally:
        engine.PathCurves = PathCurves


def compare(label: str, book, paths: int, months: int, target_paths: int, target_seconds: float) -> None:
    fast, fast_cpu, got = timed(book, paths, months, reference=False)
    slow, slow_cpu, want = timed(book, paths, months, reference=True)
    for a, b in zip(got.rules, want.rules):
        np.testing.assert_allclose(a.outcomes.income, b.outcomes.income, rtol=1e-9, atol=0)
    per = fast_cpu / paths
    print(f"{label}: {paths} paths x {months} months x {len(got.rules)} rules: engine {fast:.1f} s wall, "
          f"{fast_cpu:.1f} s CPU ({per * 1e3:.0f} ms CPU a path); reference {slow:.1f} s wall, {slow_cpu:.1f} s CPU; "
          f"reference / engine (CPU) {slow_cpu / fast_cpu:.2f}")
    print(f"  at that rate {target_paths:,} paths take {per * target_paths:.0f} s (target {target_seconds:g} s)")


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--demo-paths", type=int, default=200)
    parser.add_argument("--large-paths", type=int, default=100)   # the fewest ladder risk takes
    parser.add_argument("--holdings", type=int, default=10_000)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        demo = Path(tmp) / "demo"
        write_demo(demo)
        compare("demo", load_book(demo), args.demo_paths, 24, 2000, 3.0)
        large = write_book(Path(tmp) / "large", args.holdings)
        compare(f"{args.holdings:,} holdings", load_book(large), args.large_paths, 12, 1000, 30.0)
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"peak resident memory {peak:.0f} MB")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
