"""Bringing back an earlier version of a book's files (``BOOK/versions/``), as a journaled change.

A restore is itself one transaction: the files kept in the version replace the current ones (which
are kept as a new version, so a restore can be undone the same way) and one ``restore`` journal line
a file says what was brought back and from when.
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

from ladder.errors import InputError, Problem
from ladder.folder.journal import JournalEntry
from ladder.folder.lock import book_lock
from ladder.folder.transaction import Committed, commit, recover
from ladder.folder.versions import VERSIONS, list_versions


def restore_version(folder, name: str, on: dt.date | None = None) -> Committed:
    """Put back every file kept in version ``name``; journaled on ``on`` (default today).
    Raises InputError for a version that does not exist."""
    folder = Path(folder).absolute()
    with book_lock(folder, f"ladder restore {name}"):
        recover(folder)
        version = {v.name: v for v in list_versions(folder)}.get(name)
        if version is None:
            raise InputError([Problem(str(folder / VERSIONS), 0, 0, f"there is no version {name!r}; "
                                      f"'ladder restore {folder} --list' lists them")])
        files = {folder / target: (version.path(folder) / kept).read_bytes() for kept, target in version.files}
        entries = [JournalEntry(on or dt.date.today(), "restore", reason=f"{target} brought back to version {name}, "
                                f"as it was before: {version.reason or 'a change'}") for _, target in version.files]
        return commit(folder, files, entries, f"restore {name}")
