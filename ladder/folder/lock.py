"""One writer at a time: the book's lock, held for the whole read-change-write of every change.

``book_lock(folder, command)`` takes an operating-system lock on ``BOOK/.ladder.lock`` (the
``filelock`` package: ``flock`` on POSIX, ``LockFileEx`` on Windows; the system drops it when the
holder dies, so a killed program never leaves the book locked) and writes who holds it into
``BOOK/.ladder.lock.holder`` (process id, host, command, since when, UTC). A second writer waits up
to ``LADDER_LOCK_WAIT`` seconds (environment; default 5) and is then refused with ``BookBusy``,
whose message names the holder. The lock is re-entrant within one process (a command that holds it
may call ``commit``, which takes it again); it is not meant to be shared between threads.
"""

from __future__ import annotations

import datetime as dt
import json
import os
import socket
from contextlib import contextmanager
from pathlib import Path

from filelock import FileLock, Timeout

LOCK_FILE = ".ladder.lock"
HOLDER_FILE = ".ladder.lock.holder"
DEFAULT_WAIT = 5.0   # seconds a second writer waits before it is refused

_held: dict[str, int] = {}   # real folder path -> depth of book_lock in this process


class BookBusy(OSError):
    """Another program holds the book's lock: nothing was changed."""


def lock_wait() -> float:
    """Seconds to wait for the lock: ``LADDER_LOCK_WAIT`` if set to a number, else DEFAULT_WAIT."""
    try:
        return max(0.0, float(os.environ.get("LADDER_LOCK_WAIT", DEFAULT_WAIT)))
    except ValueError:
        return DEFAULT_WAIT


def holds_lock(folder) -> bool:
    """Whether this process holds the lock of the book in ``folder``."""
    return _held.get(os.path.realpath(folder), 0) > 0


def holder(folder) -> str:
    """Who holds (or last held) the lock, in words, from the holder file ("" if unknown)."""
    try:
        data = json.loads((Path(folder) / HOLDER_FILE).read_text(encoding="utf-8"))
        return f"{data['command']} (process {data['pid']} on {data['host']}, since {data['since']})"
    except (OSError, ValueError, KeyError, TypeError):
        return ""


@contextmanager
def book_lock(folder, command: str, wait: float | None = None):
    """Hold the book's lock for the block; ``command`` says what is changing the book (for the
    holder file). Raises ``BookBusy`` after ``wait`` seconds (default ``lock_wait()``)."""
    key = os.path.realpath(folder)
    if _held.get(key):
        _held[key] += 1
        try:
            yield
        finally:
            _held[key] -= 1
        return
    lock = FileLock(os.path.join(key, LOCK_FILE), timeout=lock_wait() if wait is None else wait)
    try:
        lock.acquire()
    except Timeout:
        who = holder(key) or "another program"
        raise BookBusy(f"{key}: the book is being changed by {who}; nothing was changed. "
                       "Try again when it has finished.") from None
    _held[key] = 1
    holder_path = Path(key) / HOLDER_FILE
    try:
        since = dt.datetime.now(dt.timezone.utc).isoformat(timespec="seconds")
        holder_path.write_text(json.dumps({"pid": os.getpid(), "host": socket.gethostname(), "command": command,
                                           "since": since}), encoding="utf-8")
        yield
    finally:
        del _held[key]
        holder_path.unlink(missing_ok=True)
        lock.release()
