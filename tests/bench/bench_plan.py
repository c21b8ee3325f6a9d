"""Benchmark: ``ladder plan`` on a generated 10,000-holding book, against the engine before needs
matching, in the same run.

Run as a script (not collected by pytest):  python tests/bench/bench_plan.py [--holdings 10000]
[--reference COMMIT] [--repeat 1]

The book is ``tests/bench/bench_shock.py``'s generator (the demo book's curve, policy, needs and
scenarios), once as generated and once with a fifth of its agency notes callable. The reference is
the package as it stood at ``--reference`` (default: the commit this branch started from),
extracted with ``git archive`` into a temporary folder and run from there; it does not know the
``match_needs`` rule, so it runs on a copy of the book whose book.toml asks for ``longest_rung``,
and this engine runs that copy too (same rule) as well as ``match_needs``. Each run is the whole
command in a subprocess (start-up, reading, valuation, the plan and the income-at-risk table, json
output): best wall and CPU time (user + system; on a busy machine the CPU time is the fairer
figure). Prints the ratios reference / this engine.
"""

from __future__ import annotations

import argparse
import os
import resource
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "pricing"))
from bench_shock import write_book  # noqa: E402

ROOT = Path(__file__).resolve().parents[2]
REFERENCE = "5c6bf95"     # the commit the needs-matching branch started from


def time_plan(folder: Path, package_root: Path, repeat: int) -> tuple[float, float]:
    """Best wall and CPU seconds of ``ladder plan FOLDER --format json`` run from ``package_root``."""
    env = dict(os.environ, PYTHONPATH=str(package_root))
    command = [sys.executable, "-m", "ladder.cli", "plan", str(folder), "--format", "json"]
    walls, cpus = [], []
    for _ in range(repeat):
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        start = time.perf_counter()
        subprocess.run(command, check=True, stdout=subprocess.DEVNULL, cwd=package_root, env=env)
        walls.append(time.perf_counter() - start)
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpus.append(after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime)
    return min(walls), min(cpus)


def with_rule(folder: Path, rule: str) -> Path:
    """A copy of ``folder`` whose book.toml reinvests by ``rule``."""
    copy = folder.with_name(f"{folder.name}-{rule}")
    shutil.copytree(folder, copy)
    text = (copy / "book.toml").read_text(encoding="utf-8")
    lines = [f'rule = "{rule}"' if line.startswith("rule = ") else line for line in text.splitlines()]
    (copy / "book.toml").write_text("\n".join(lines) + "\n", encoding="utf-8")
    return copy


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
            old_rule = with_rule(book, "longest_rung")
            new_rule = with_rule(book, "match_needs")
            ref_wall, ref_cpu = time_plan(old_rule, reference, args.repeat)
            same_wall, same_cpu = time_plan(old_rule, ROOT, args.repeat)
            new_wall, new_cpu = time_plan(new_rule, ROOT, args.repeat)
            print(f"{args.holdings} holdings, {label}:")
            print(f"  reference, longest_rung: {ref_wall:.1f} s wall, {ref_cpu:.1f} s CPU")
            print(f"  this engine, longest_rung: {same_wall:.1f} s wall, {same_cpu:.1f} s CPU "
                  f"(reference / this: {ref_cpu / same_cpu:.2f}x CPU)")
            print(f"  this engine, match_needs: {new_wall:.1f} s wall, {new_cpu:.1f} s CPU "
                  f"(reference / this: {ref_cpu / new_cpu:.2f}x CPU; target < {2 if share == 0 else 4} s)")
        print(f"load average now {os.getloadavg()[0]:.2f}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
