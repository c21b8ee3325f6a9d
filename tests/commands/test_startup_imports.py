"""Issue 18: ``ladder --help`` and ``ladder value`` start without the heavy libraries they do not use.

Each command runs in a fresh interpreter (as ``python -m ladder.cli`` does) and then reports which of
matplotlib (the report's charts), scipy.optimize and highspy (the solvers) and textual (the
workstation) were loaded. The demo book has callable holdings, so ``value`` also solves option-adjusted
spreads. ``value`` only reads, so it does not load the book lock's filelock either.
"""

import subprocess
import sys

import pytest

from ladder.demo import write_demo

HEAVY = ("matplotlib", "scipy.optimize", "highspy", "textual")


def run_and_list(modules) -> str:
    return (
        "import sys\n"
        "from ladder import cli\n"
        "try:\n"
        "    code = cli.main(sys.argv[1:])\n"
        "except SystemExit as stop:\n"
        "    code = stop.code\n"
        f"print('LOADED', sorted(m for m in {modules!r} if m in sys.modules), 'EXIT', code, file=sys.stderr)\n")


def loaded(*args, modules=HEAVY) -> str:
    done = subprocess.run([sys.executable, "-c", run_and_list(modules), *map(str, args)], capture_output=True,
                          text=True, timeout=300)
    return done.stderr.strip().splitlines()[-1]


@pytest.mark.parametrize("fmt", ["table", "json"])
def test_value_loads_no_heavy_library(tmp_path, fmt):
    write_demo(tmp_path / "book")
    assert loaded("value", tmp_path / "book", "--format", fmt) == "LOADED [] EXIT 0"


def test_value_does_not_load_the_lock(tmp_path):
    write_demo(tmp_path / "book")
    assert loaded("value", tmp_path / "book", modules=HEAVY + ("filelock",)) == "LOADED [] EXIT 0"


def test_help_loads_no_heavy_library():
    assert loaded("--help") == "LOADED [] EXIT 0"
    assert loaded("value", "--help") == "LOADED [] EXIT 0"


def test_the_check_sees_a_heavy_library_when_one_is_loaded():
    # the builder's command does need scipy.optimize: the check above can tell
    done = subprocess.run([sys.executable, "-c", "import scipy.optimize\n" + run_and_list(HEAVY), "--help"],
                          capture_output=True, text=True, timeout=300)
    assert done.stderr.strip().splitlines()[-1] == "LOADED ['scipy.optimize'] EXIT 0"
