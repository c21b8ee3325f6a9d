"""Helpers of the command tests: run ``ladder`` in-process, and a fingerprint of a book folder."""

from __future__ import annotations

import hashlib

from ladder.cli import main
from ladder.folder.lock import LOCK_FILE


def digest(folder) -> dict[str, str]:
    """SHA-256 of every file under ``folder`` (hidden temporary files included), by relative path; the
    writers' empty lock file is left out (it stays once made: removing it would race the next writer)."""
    return {str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest()
            for p in sorted(folder.rglob("*")) if p.is_file() and p.name != LOCK_FILE}


def run(capsys, *argv) -> tuple[int, str, str]:
    """``ladder *argv`` in this process: (exit status, stdout, stderr)."""
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err
