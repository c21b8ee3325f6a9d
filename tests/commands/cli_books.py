"""Helpers of the command tests: run ``ladder`` in-process, and a fingerprint of a book folder."""

from __future__ import annotations

import hashlib

from ladder.cli import main


def digest(folder) -> dict[str, str]:
    """SHA-256 of every file under ``folder`` (hidden temporary files included), by relative path."""
    return {str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest()
            for p in sorted(folder.rglob("*")) if p.is_file()}


def run(capsys, *argv) -> tuple[int, str, str]:
    """``ladder *argv`` in this process: (exit status, stdout, stderr)."""
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err
