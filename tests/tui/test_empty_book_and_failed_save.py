"""The workstation on an empty book and on a save that fails: a message on screen, never an exit."""

from __future__ import annotations

import errno
import os
import hashlib

from ladder.folder.book_file import load_book
from ladder.demo import write_demo
from ladder.folder.lock import LOCK_FILE

from conftest import drive


def _digest(folder):
    """SHA-256 of the book's files by name; the writers' empty lock file is not part of the book."""
    return {p.name: hashlib.sha256(p.read_bytes()).hexdigest() for p in sorted(folder.iterdir())
            if p.is_file() and p.name != LOCK_FILE}


def test_an_empty_book_opens_and_every_view_says_there_is_nothing_to_value(tmp_path):
    folder = write_demo(tmp_path / "book")
    header = (folder / "holdings.csv").read_text(encoding="utf-8").splitlines()[0]
    (folder / "holdings.csv").write_text(header + "\n", encoding="utf-8")
    seen = {}

    async def script(app, pilot):
        seen["errors"] = dict(app.results.errors)
        seen["running"] = app.is_running

    drive(load_book(folder), script)
    assert seen["running"]
    assert "nothing to value" in seen["errors"]["valuation"]
    assert "details in" not in seen["errors"]["valuation"]          # not logged as a failure
    assert all(seen["errors"][t].startswith("needs valuation") for t in ("check", "shock", "plan"))


def test_a_save_that_fails_notifies_and_keeps_every_change(tmp_path, monkeypatch):
    folder = write_demo(tmp_path / "book")
    before = _digest(folder)

    def full_disk(fd):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(os, "fsync", full_disk)
    state = {}

    async def script(app, pilot):
        await pilot.press("y", "plus")              # Curve view, +1 bp on the first tenor: unsaved
        await pilot.pause()
        await pilot.press("ctrl+s")                 # the write fails: the disk is full
        await pilot.pause()
        state["unsaved"] = dict(app.unsaved)
        state["running"] = app.is_running
        state["notes"] = [(n.title, n.message) for n in app._notifications]

    drive(load_book(folder), script)
    assert state["running"] and state["unsaved"] == {"curve": "par yields edited"}
    title, message = state["notes"][-1]
    assert title == "Not saved"
    assert "no space left" in message and "curve.csv" in message and "stay unsaved" in message
    assert _digest(folder) == before
