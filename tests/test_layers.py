"""The layers of DEVELOPERS.md hold: imports point downward only, the model never loads a front's
library, and the package never loads QuantLib (a test reference only).

The layer contract itself is in pyproject.toml (``[tool.importlinter]``), checked with import-linter.
"""

import subprocess
import sys
from pathlib import Path


ROOT = Path(__file__).resolve().parents[1]

# Imports every module of the package in a fresh interpreter and prints what is loaded from outside.
EVERY_MODULE = (
    "import importlib, pkgutil, sys\n"
    "import ladder\n"
    "names = [m.name for m in pkgutil.walk_packages(ladder.__path__, 'ladder.')]\n"
    "for name in names:\n"
    "    importlib.import_module(name)\n"
    "print(len(names), sorted({m.split('.')[0] for m in sys.modules}))\n")


def test_import_contracts_are_kept():
    done = subprocess.run([sys.executable, "-c", "import sys; from importlinter.cli import lint_imports; "
                           "sys.exit(lint_imports(config_filename='pyproject.toml', no_cache=True))"],
                          capture_output=True, text=True, cwd=ROOT, timeout=300)
    assert "Contracts: 2 kept, 0 broken." in done.stdout, done.stdout[-3000:]
    assert done.returncode == 0


def test_no_module_of_the_package_loads_quantlib():
    done = subprocess.run([sys.executable, "-c", EVERY_MODULE], capture_output=True, text=True, cwd=ROOT,
                          timeout=300, check=True)
    count, loaded = done.stdout.split(" ", 1)
    assert int(count) > 100                       # every module was really imported
    assert "QuantLib" not in loaded and "textual" in loaded   # the fronts were imported too
