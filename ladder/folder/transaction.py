"""Every change to a book is one transaction: whole files replaced plus journal lines appended,
all or nothing, whatever instant the program is killed at.

API (the one way to change a book; booking, roll, import, build, the workstation's save and
``ladder restore`` all go through it)::

    with book_lock(book.folder, "roll"):            # ladder.folder.lock: one writer at a time
        book = load_book(book.folder)               # read under the lock ...
        ...                                         # ... decide the change ...
        commit(book, {book.files["holdings"]: data}, entries, reason="roll to 2026-12-31")

- ``replacements``: target path (as ``book.files`` names it: absolute or relative to the current
  directory) -> the file's complete new bytes. Write them with the file's own format (``ladder.folder.save``).
- ``entries``: ``JournalEntry`` lines to append to ``journal.jsonl`` (validated; the UTC time of
  recording filled in). Either may be empty: a journal note alone, or a file with no journal line.
- ``reason``: words for the version kept of each replaced file and for the lock's holder file.
- Returns ``Committed`` (files replaced, entries as recorded, the version that keeps the old files).
- ``commit`` takes the lock itself (re-entrant), so it is atomic on its own; hold ``book_lock``
  around the read as well so that the change is made to the book as it is now.
- Refuses (``WriteRefused``, an ``OSError``, before anything is changed) a target that is read-only,
  not a regular file, or whose owner could not be kept.

The protocol: a redo (write-ahead) record in ``BOOK/.ladder-transaction/``.

1. Prepare: write each file's new bytes (``new-N``), a copy of the file it replaces (``old-N``), the
   journal lines (``journal.lines``) and ``about.json`` of the version into the record folder;
   fsync each file, the record folder and the book folder.
2. Commit point: write ``manifest.json.part`` (targets, modes, owners, the journal's byte length
   before the change), fsync it, rename it to ``manifest.json`` and fsync the record folder. A
   rename within one file system is atomic (POSIX rename(2)); the directory fsync makes it durable
   (Linux fsync(2): "calling fsync() on the file descriptor for the directory is also needed").
3. Apply (redo): move each ``old-N`` into ``BOOK/versions/<version>/``; for each target write a
   temporary file beside the real file (a symlink is followed and kept), fsync it, give it the old
   file's mode and owner and ``os.replace`` it over the real file, fsync that directory; truncate the
   journal to its recorded length and append the lines, fsync; prune old versions.
4. Finish: remove ``manifest.json`` (fsync), then the record folder.

Every step of 3 is idempotent, so ``recover`` (run by every load and by every writer under the
lock) rolls a committed record forward by running 3 and 4 again, and discards a record that has no
``manifest.json`` (nothing outside it was touched). This is redo logging as in the database
literature (write-ahead logging: the change is made durable in a log before it is applied in place;
e.g. C. Mohan et al., "ARIES", ACM TODS 17(1), 1992). Appending costs time in proportion to the lines
added; the journal is never rewritten. Readers take no lock: a report run during a commit may see
a file before and another after; every load after a commit sees the whole change.

For tests, ``LADDER_CRASH_AFTER_STEP=N`` (environment) kills the process with SIGKILL at the N-th
step of the protocol (steps include half-written files), so a test can stop a change anywhere.
"""

from __future__ import annotations

import datetime as dt
import hashlib
import json
import os
import shutil
import signal
import stat
from dataclasses import dataclass
from pathlib import Path

from ladder.errors import naming
from ladder.folder.journal import JournalEntry, journal_lines, journal_path
from ladder.folder.lock import BookBusy, book_lock, holds_lock
from ladder.folder.versions import ABOUT, VERSIONS, about, prune, version_name, versions_kept

RECORD = ".ladder-transaction"
MANIFEST = "manifest.json"
LINES = "journal.lines"
CRASH_VARIABLE = "LADDER_CRASH_AFTER_STEP"


class WriteRefused(OSError):
    """A change the tool will not make (a read-only target, ...): nothing was changed."""


@dataclass(frozen=True)
class Committed:
    """A committed change: the files replaced (as the book names them), the journal entries as
    recorded, and the version (``BOOK/versions/<version>``) keeping the replaced files ("" if none)."""

    files: tuple[Path, ...]
    entries: tuple[JournalEntry, ...]
    version: str


def commit(book_or_folder, replacements: dict, entries=(), reason: str = "") -> Committed:
    """Replace the files and append the journal lines as one transaction (module docstring)."""
    folder = _folder(book_or_folder)
    if not replacements and not entries:
        return Committed((), (), "")
    with naming(folder), book_lock(folder, reason or "a change to the book"):
        recover(folder)
        manifest, recorded = _prepare(folder, replacements, tuple(entries), reason)
        _apply(folder, manifest)
    kept = manifest["version"] if any(f["old"] for f in manifest["files"]) else ""
    return Committed(tuple(folder / f["target"] for f in manifest["files"]), recorded, kept)


def recover(book_or_folder) -> None:
    """Finish or undo an interrupted change: roll a committed record forward, discard an
    uncommitted one. A record another live writer is still preparing is left alone (the files are
    as before it); a committed one is waited for (the lock) and finished."""
    folder = _folder(book_or_folder)
    record = folder / RECORD
    if not record.exists():
        return
    if holds_lock(folder):
        _roll(folder)
        return
    committed = (record / MANIFEST).exists()
    try:
        with book_lock(folder, "finishing an interrupted change", wait=None if committed else 0):
            _roll(folder)
    except BookBusy:
        if committed:
            raise


def file_hashes(paths) -> dict[str, str]:
    """SHA-256 of each file's bytes ("" for a missing file), by path: what a change is checked against."""
    out = {}
    for path in paths:
        try:
            out[str(path)] = hashlib.sha256(Path(path).read_bytes()).hexdigest()
        except FileNotFoundError:
            out[str(path)] = ""
    return out


# ---- the protocol --------------------------------------------------------------------------------
_steps = 0


def _step() -> None:
    """A point where a test may kill the process (``LADDER_CRASH_AFTER_STEP``)."""
    global _steps
    crash = os.environ.get(CRASH_VARIABLE)
    if crash:
        _steps += 1
        if _steps == int(crash):
            os.kill(os.getpid(), getattr(signal, "SIGKILL", signal.SIGTERM))


def _folder(book_or_folder) -> Path:
    return Path(getattr(book_or_folder, "folder", book_or_folder)).absolute()


def _fsync_dir(path: Path) -> None:
    try:
        fd = os.open(path, os.O_RDONLY)
    except OSError:          # a system that cannot open a directory (Windows) orders renames itself
        return
    try:
        os.fsync(fd)
    finally:
        os.close(fd)


def _write(path: Path, data: bytes, mode: int = 0o666) -> None:
    """``data`` into ``path`` (created or truncated), flushed to disk."""
    fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_TRUNC | getattr(os, "O_BINARY", 0), mode)
    try:
        _write_all(fd, data)
    finally:
        os.close(fd)
    _step()


def _write_all(fd: int, data: bytes) -> None:
    """``data`` at the file offset of ``fd``, then fsync; a test may kill it halfway (a torn write)."""
    view, half = memoryview(data), len(data) // 2
    _write_part(fd, view[:half])
    _step()
    _write_part(fd, view[half:])
    os.fsync(fd)


def _write_part(fd: int, part: memoryview) -> None:
    while part:
        part = part[os.write(fd, part):]


def _umask_mode() -> int:
    """The mode a new file gets under the process's umask (0666 less the umask)."""
    umask = os.umask(0)
    os.umask(umask)
    return 0o666 & ~umask


def _check_target(target: Path, real: Path) -> tuple[os.stat_result | None, str]:
    """The real file's stat (None if it does not exist) and why it may not be replaced ("" if it may)."""
    try:
        st = os.stat(real)
    except FileNotFoundError:
        return None, ""
    if not stat.S_ISREG(st.st_mode):
        return st, f"{target}: not a regular file; nothing was changed"
    if not st.st_mode & 0o222 or not os.access(real, os.W_OK):
        return st, (f"{target}: the file is read-only, so the tool will not replace it; nothing was changed. "
                    "Make it writable (e.g. chmod u+w) if the change is meant to be made.")
    return st, ""


def _targets(folder: Path, replacements: dict, entries: tuple) -> tuple[list[dict], list[bytes]]:
    """Each target as the manifest records it (paths relative to the book folder, the real file a
    link points to, mode and owner to keep) and its new bytes; ``WriteRefused`` names every target
    (and the journal, when lines are added) that may not be replaced."""
    files, contents, refused = [], [], []
    names: set[str] = set()
    for i, (target, data) in enumerate(replacements.items()):
        target = Path(target).absolute()
        real = Path(os.path.realpath(target))
        st, problem = _check_target(target, real)
        refused += [problem] if problem else []
        keep_as = real.name if real.name not in names else f"{i}-{real.name}"
        names.add(keep_as)
        files.append({"target": os.path.relpath(target, folder), "real": os.path.relpath(real, folder),
                      "new": f"new-{i}", "old": f"old-{i}" if st else None, "keep_as": keep_as,
                      "mode": stat.S_IMODE(st.st_mode) if st else _umask_mode(),
                      "uid": st.st_uid if st else None, "gid": st.st_gid if st else None})
        contents.append(bytes(data))
    if entries:
        problem = _check_target(journal_path(folder), Path(os.path.realpath(journal_path(folder))))[1]
        refused += [problem] if problem else []
    if refused:
        raise WriteRefused("\n".join(refused))
    return files, contents


def _prepare(folder: Path, replacements: dict, entries: tuple, reason: str):
    """Write the record and commit it (steps 1 and 2); returns the manifest and the recorded entries."""
    now = dt.datetime.now(dt.timezone.utc)
    while (folder / VERSIONS / version_name(now)).exists():
        now += dt.timedelta(microseconds=1)
    files, contents = _targets(folder, replacements, entries)
    journal = Path(os.path.realpath(journal_path(folder)))
    recorded, lines = journal_lines(entries)
    length = journal.stat().st_size if journal.exists() else 0
    if lines and length and _last_byte(journal) != b"\n":
        lines = b"\n" + lines
    record = folder / RECORD
    record.mkdir(mode=0o700)     # the files' contents wait here: readable by no one else meanwhile
    _step()
    try:
        for f, data in zip(files, contents):
            with naming(folder / f["target"]):      # a full disk names the file being changed
                _write(record / f["new"], data)
                if f["old"]:     # the version kept: same mode and owner as the file it was
                    _write(record / f["old"], (folder / f["real"]).read_bytes())
                    os.chmod(record / f["old"], f["mode"])
                    _keep_owner(record / f["old"], f, folder)
        if lines:
            with naming(journal):
                _write(record / LINES, lines)
        kept = {f["keep_as"]: f["target"] for f in files if f["old"]}
        if kept:
            _write(record / ABOUT, about(now, reason, kept))
        _fsync_dir(record)
        _fsync_dir(folder)
        manifest = {"version": version_name(now), "reason": reason, "files": files, "keep": versions_kept(folder),
                    "journal": {"path": os.path.relpath(journal, folder), "length": length,
                                "lines": LINES if lines else None}}
        _write(record / (MANIFEST + ".part"), json.dumps(manifest, indent=1).encode("utf-8"))
        os.replace(record / (MANIFEST + ".part"), record / MANIFEST)
    except BaseException:
        shutil.rmtree(record, ignore_errors=True)     # not committed: nothing outside the record changed
        raise
    _fsync_dir(record)
    _step()                      # committed: from here on the change happens, now or at recovery
    return manifest, recorded


def _keep_owner(path: Path, f: dict, folder: Path) -> None:
    """Give ``path`` the owner recorded in ``f``; refused when only root could (and we are not)."""
    if f["uid"] is None or not hasattr(os, "chown"):
        return
    try:
        os.chown(path, f["uid"], f["gid"])
    except PermissionError:
        raise WriteRefused(f"{folder / f['target']}: owned by another user; replacing it would change its "
                           "owner, so nothing was changed") from None


def _last_byte(path: Path) -> bytes:
    with path.open("rb") as handle:
        handle.seek(-1, os.SEEK_END)
        return handle.read(1)


def _roll(folder: Path) -> None:
    record = folder / RECORD
    if not record.exists():
        return
    if (record / MANIFEST).exists():
        _apply(folder, json.loads((record / MANIFEST).read_text(encoding="utf-8")))
    else:
        shutil.rmtree(record)
        _fsync_dir(folder)


def _apply(folder: Path, manifest: dict) -> None:
    """Steps 3 and 4; every operation may be run again after a crash with the same result."""
    record = folder / RECORD
    kept = folder / VERSIONS / manifest["version"]
    if any(f["old"] for f in manifest["files"]):
        kept.mkdir(parents=True, exist_ok=True)
        for f in manifest["files"]:
            if f["old"] and (record / f["old"]).exists():
                os.replace(record / f["old"], kept / f["keep_as"])
                _step()
        if (record / ABOUT).exists():
            os.replace(record / ABOUT, kept / ABOUT)
        _fsync_dir(kept)
        _fsync_dir(kept.parent)
    for f in manifest["files"]:
        real = Path(os.path.normpath(folder / f["real"]))
        temporary = real.with_name(f".{real.name}.ladder-new")
        _write(temporary, (record / f["new"]).read_bytes())
        os.chmod(temporary, f["mode"])
        _keep_owner(temporary, f, folder)
        os.replace(temporary, real)
        _fsync_dir(real.parent)
        _step()
    journal = manifest["journal"]
    if journal["lines"]:
        _append(Path(os.path.normpath(folder / journal["path"])), journal["length"],
                (record / journal["lines"]).read_bytes())
    prune(folder, manifest["keep"])
    _step()
    (record / MANIFEST).unlink()
    _fsync_dir(record)
    _step()
    shutil.rmtree(record)
    _fsync_dir(folder)


def _append(path: Path, length: int, lines: bytes) -> None:
    """The journal cut back to ``length`` bytes (undoing a partial append) with ``lines`` after it."""
    fd = os.open(path, os.O_RDWR | os.O_CREAT | getattr(os, "O_BINARY", 0), 0o666)
    try:
        if os.fstat(fd).st_size < length:
            raise WriteRefused(f"{path}: shorter than when the change was recorded ({length} bytes); was it "
                               f"edited by hand? The change is kept in {path.parent / RECORD}")
        os.ftruncate(fd, length)
        os.lseek(fd, length, os.SEEK_SET)
        _write_all(fd, lines)
    finally:
        os.close(fd)
    _fsync_dir(path.parent)
    _step()
