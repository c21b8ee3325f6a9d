"""The bundled demo book (an invented company; see its README.md) and working copies of it.

The demo's home is ``demo_portfolios/`` at the top of the repository; the package reaches it through
``ladder/demo_books`` (a link in the checkout, real files in a built wheel). Nothing ever writes there:
``ladder`` with no book opens a working copy in the user's data folder, made on first use, and
``ladder demo FOLDER`` writes a fresh copy anywhere.
"""

from __future__ import annotations

import shutil
from importlib.resources import files
from pathlib import Path

from ladder.errors import InputError, Problem

DEMO_NAME = "tessaline"
# The demo's own files: what a copy holds (never what a run leaves beside them: journal, history,
# backups, reports).
DEMO_PATTERNS = ("*.toml", "*.csv", "*.md")


def demo_source() -> Path:
    """The installed demo book (read only: copy it before use)."""
    return Path(str(files("ladder") / "demo_books" / DEMO_NAME))


def demo_files(source: Path | None = None) -> list[Path]:
    """The demo's own files in ``source`` (default: the installed demo), sorted by name."""
    source = source or demo_source()
    return sorted({p for pattern in DEMO_PATTERNS for p in source.glob(pattern) if p.is_file()})


def write_demo(folder, source: Path | None = None) -> Path:
    """Copy the demo's own files into ``folder`` (created; refused if it already holds files)."""
    folder = Path(folder)
    if folder.exists() and (not folder.is_dir() or any(folder.iterdir())):
        raise InputError([Problem(str(folder), 0, 0, "already exists and is not an empty folder; "
                                                     "name a new folder for the demo copy")])
    folder.mkdir(parents=True, exist_ok=True)
    for path in demo_files(source):
        shutil.copy2(path, folder / path.name)
    return folder


def working_demo() -> Path:
    """The user's working copy of the demo, in the platform's data folder; made on first use."""
    from platformdirs import user_data_path

    folder = user_data_path("ladder") / "demo" / DEMO_NAME
    if not (folder / "book.toml").exists():
        if folder.exists():
            shutil.rmtree(folder)     # an incomplete copy left by an interrupted first use
        write_demo(folder)
    return folder
