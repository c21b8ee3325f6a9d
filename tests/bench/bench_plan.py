"""Benchmark: ``ladder plan`` on a generated 10,000-holding book, against the engine before this
speed work, in the same run.

Run as a script (not collected by pytest):  python tests/bench/bench_plan.py [--holdings 10000]
[--reference COMMIT] [--repeat 1]

The book is ``tests/bench/bench_shock.py``'s generator (the demo book's curve, policy, needs and
scenarios), once as generated and once with a fifth of its agency notes callable; both reinvest by
the default rule, ``match_needs``. The reference is the package as it stood at ``--reference``
(default: the commit the plan's speed work started from), extracted with ``git archive`` into a
temporary folder and run from there on the same books. Each run is the whole command in a
subprocess (start-up, reading, valuation, the plan with its policy check of every period, the
income-at-risk table under every scenario, json output): best wall and CPU time (user + system; on
a busy machine the CPU time is the fairer figure). Prints the ratios reference / this engine and
checks that both engines print the same plan.
"""

from __future__ import annotations

import argparse
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "pricing"))
from bench_shock import write_book  # noqa: E402

ROOT = Path(__file__).resolve().parents[2]
REFERENCE = "f2a6e47"     # the commit the plan's speed work started from


def time_plan(folder: Path, package_root: Path, repeat: int) -> tuple[float, float, bytes]:
    """Best wall and CPU seconds of ``ladder plan FOLDER --format json`` run from ``package_root``, and
    what it printed."""
    env = dict(os.environ, PYTHONPATH=str(package_root))
    command = [sys.executable, "-m", "ladder.cli", "plan", str(folder), "--format", "json"]
    walls, cpus = [], []
    for _ in range(repeat):
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        start = time.perf_counter()
        out = subprocess.run(command, check=True, capture_output=True, cwd=package_root, env=env).stdout
        walls.append(time.perf_counter() - start)
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpus.append(after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime)
    return min(walls), min(cpus), out


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--holdings", type=int, default=10_000)
    parser.add_argument("--reference", default=REFERENCE, help="git commit of the reference engine")
    parser.add_argument("--repeat", type=int, default=1)
    args = parser.parse_args()
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        reference = tmp / "reference"
        reference.mkdir()
        archive = subprocess.run(["git", "archive", args.reference, "ladder"], cwd=ROOT, check=True,
                                 capture_output=True).stdout
        subprocess.run(["tar", "-x", "-C", str(reference)], input=archive, check=True)
        print(f"reference engine: {args.reference}; {os.cpu_count()} cores; "
              f"load average {os.getloadavg()[0]:.2f}")
        for share, label in ((0.0, "as generated"), (0.2, "a fifth of the agency notes callable")):
            book = write_book(tmp / f"book-{share:g}", args.holdings, callable_share=share)
            ref_wall, ref_cpu, ref_out = time_plan(book, reference, args.repeat)
            wall, cpu, out = time_plan(book, ROOT, args.repeat)
            print(f"{args.holdings} holdings, {label}:")
            print(f"  reference: {ref_wall:.1f} s wall, {ref_cpu:.1f} s CPU")
            print(f"  this engine: {wall:.1f} s wall, {cpu:.1f} s CPU (reference / this: {ref_wall / wall:.1f}x wall, "
                  f"{ref_cpu / cpu:.1f}x CPU); same plan printed: {ref_out == out}")
        print(f"load average now {os.getloadavg()[0]:.2f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
