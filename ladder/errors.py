"""Errors for the user: every problem at once, each as ``file:row:column: message``."""

from __future__ import annotations

import errno
import os
import re
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path


@dataclass(frozen=True)
class Problem:
    """One problem in one input file. ``row`` and ``column`` are 1-based; 0 means "whole file/row"."""

    file: str
    row: int
    column: int
    message: str

    def __str__(self) -> str:
        return f"{self.file}:{self.row}:{self.column}: {self.message}"


class InputError(Exception):
    """Raised when input is refused; carries every problem found, never a partial result."""

    def __init__(self, problems: list[Problem]):
        self.problems = sorted(problems, key=lambda p: (p.file, p.row, p.column))
        super().__init__("\n".join(str(p) for p in self.problems))


class Problems:
    """Collects problems while reading; ``raise_if_any`` refuses the input whole."""

    def __init__(self) -> None:
        self.items: list[Problem] = []

    def add(self, file: str, row: int, column: int, message: str) -> None:
        self.items.append(Problem(str(file), row, column, message))

    def extend(self, other: "Problems | InputError") -> None:
        self.items.extend(other.items if isinstance(other, Problems) else other.problems)

    def __bool__(self) -> bool:
        return bool(self.items)

    def raise_if_any(self) -> None:
        if self.items:
            raise InputError(self.items)


class FileFault(Exception):
    """A file that could not be read or written (exit status 3), with what to do, as one line."""

    def __init__(self, path, message: str):
        self.path, self.message = str(path), message
        super().__init__(f"{self.path}: {message}")


# What the user can do about an operating-system error, by errno.
_ADVICE = {
    errno.EACCES: "permission denied; make the folder writable for you, or work on a copy of the book",
    errno.EPERM: "not permitted; make the folder writable for you, or work on a copy of the book",
    errno.EROFS: "the file system is read-only; work on a copy of the book in a writable folder",
    errno.ENOSPC: "no space left on the device; free some space and run again",
    errno.EDQUOT: "disk quota exceeded; free some space and run again",
    errno.ENOTDIR: "not a folder; name a folder (or a file inside an existing folder)",
    errno.EISDIR: "is a folder; name a file",
    errno.ENOENT: "no such file or folder; check the path",
    errno.EEXIST: "already exists and is not a folder; name a folder",
}
# A write goes to a hidden temporary file beside its target (``.name.XXXX.tmp``): name the folder.
_TEMPORARY = re.compile(r"^\..+\.[^.]+\.tmp$")


def describe_os_error(error: OSError, path=None) -> str:
    """One line for ``error``: the file (``path`` if the error names none), what went wrong, what to do."""
    where = error.filename or path
    if where is not None and _TEMPORARY.match(Path(where).name):
        where = f"{Path(where).parent}{os.sep}"
    advice = _ADVICE.get(error.errno, str(error.strerror or error))
    return f"{where}: {advice}" if where is not None else advice


@contextmanager
def naming(path):
    """An operating-system error inside the block that names no file (a full disk does not) names ``path``."""
    try:
        yield
    except OSError as error:
        if error.filename is None and error.errno is not None:   # not our own refusals (their text says it all)
            error.filename = str(path)
        raise


class NothingToValue(Exception):
    """The book holds no holdings: there is no figure to show (not a failure; exit status 0)."""

    def __init__(self, holdings_file):
        self.holdings_file = str(holdings_file)
        super().__init__(f"{self.holdings_file} holds no holdings: there is nothing to value. Add holdings to it, "
                         "import a custodian file (ladder import) or build a ladder for new cash (ladder build).")
