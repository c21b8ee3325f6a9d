"""Private copies of the demo book for tests that run commands on it or write to it.

Only the files the repository tracks for the demo (csv, toml, md) are copied: never what a user's run
leaves in the demo folder (history.sqlite, journal.jsonl, *.bak, reports/), so every machine tests the
same book. ``tests/`` is on the import path through its conftest.py.
"""

from __future__ import annotations

import shutil
from pathlib import Path

from ladder.demo import DEMO_BOOK

TRACKED_SUFFIXES = (".csv", ".toml", ".md")


def untracked(folder, names) -> list[str]:
    """``shutil.copytree``'s ignore: every name in the demo folder but its tracked files."""
    return [name for name in names if not name.endswith(TRACKED_SUFFIXES)]


def copy_demo(target) -> Path:
    """The demo book's tracked files copied into the new folder ``target``; returns ``target``."""
    shutil.copytree(DEMO_BOOK, target, ignore=untracked)
    return Path(target)
