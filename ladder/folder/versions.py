"""Earlier versions of a book's files: every file a change replaces is kept, the last N of each.

``BOOK/versions/<name>/`` holds the files one change replaced, as they were just before it, under
their own names, and ``about.json`` (when they were replaced, the change's reason and, for each
kept file, the path it came from relative to the book folder). ``<name>`` is the UTC time of the
change, ``YYYY-MM-DD_HH-MM-SS_ffffff`` (sorts in time order; no characters a file system refuses).
The commit (``ladder.folder.transaction``) writes them completely and fsyncs them before anything is
replaced, then keeps the last ``[history] keep`` versions of each file (book.toml, default 20).
"""

from __future__ import annotations

import datetime as dt
import json
import shutil
import tomllib
from dataclasses import dataclass
from pathlib import Path

VERSIONS = "versions"
ABOUT = "about.json"
DEFAULT_KEEP = 20
MAX_KEEP = 10_000


@dataclass(frozen=True)
class Version:
    """One change's kept files: ``name`` (the folder, also the id ``ladder restore`` takes), when the
    files were replaced (UTC, ISO 8601), why, and (kept file name, path relative to the book folder)."""

    name: str
    saved: str
    reason: str
    files: tuple[tuple[str, str], ...]

    def path(self, folder) -> Path:
        return Path(folder) / VERSIONS / self.name


def version_name(now: dt.datetime) -> str:
    """The folder name of a version made at ``now`` (UTC)."""
    return now.strftime("%Y-%m-%d_%H-%M-%S_%f")


def about(saved: dt.datetime, reason: str, files: dict[str, str]) -> bytes:
    """The text of a version's about.json."""
    return json.dumps({"saved": saved.isoformat(timespec="microseconds"), "reason": reason, "files": files},
                      indent=1).encode("utf-8")


def list_versions(folder) -> tuple[Version, ...]:
    """Every complete version of the book's files, oldest first."""
    root = Path(folder) / VERSIONS
    found = []
    for path in sorted(root.iterdir()) if root.is_dir() else ():
        try:
            data = json.loads((path / ABOUT).read_text(encoding="utf-8"))
            files = tuple((name, str(target)) for name, target in data["files"].items() if (path / name).is_file())
            found.append(Version(path.name, str(data["saved"]), str(data.get("reason", "")), files))
        except (OSError, ValueError, KeyError, TypeError, AttributeError):
            continue      # not a version (or one still being moved into place by a commit)
    return tuple(found)


def prune(folder, keep: int) -> None:
    """Keep the newest ``keep`` versions of each file; a version left with no files is removed."""
    counts: dict[str, int] = {}
    for version in reversed(list_versions(folder)):
        left = len(version.files)
        for name, target in version.files:
            counts[target] = counts.get(target, 0) + 1
            if counts[target] > keep:
                (version.path(folder) / name).unlink(missing_ok=True)
                left -= 1
        if left == 0:
            shutil.rmtree(version.path(folder), ignore_errors=True)


def versions_kept(folder) -> int:
    """``[history] keep`` of the book's book.toml (DEFAULT_KEEP if absent; the book's loader reports
    a bad value with its line, so here a bad value falls back to the default)."""
    try:
        data = tomllib.loads((Path(folder) / "book.toml").read_text(encoding="utf-8-sig"))
        keep = data.get("history", {}).get("keep", DEFAULT_KEEP)
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError, AttributeError):
        return DEFAULT_KEEP
    return keep if isinstance(keep, int) and not isinstance(keep, bool) and 1 <= keep <= MAX_KEEP else DEFAULT_KEEP
