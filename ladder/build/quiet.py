"""Keeping the solver's stray debugging lines off standard output.

Some HiGHS builds print a debugging line (``HighsMipSolverData::...``) with C ``printf`` while they
solve, and ``highspy`` prints a banner when a solver is made, with C ``printf``; either would corrupt
``--format json`` output. ``solver_output_filtered`` sends file
descriptor 1 to a temporary file for the duration, then writes back everything else it caught (so
other output is only delayed, never lost) and drops the solver's lines.
"""

from __future__ import annotations

import contextlib
import ctypes
import os
import sys
import tempfile
import threading

SOLVER_NOISE = (b"HighsMipSolverData::", b"Running HiGHS", b"Includes third-party")   # debugging lines, banner
_LOCK = threading.Lock()


def _flush_c_stdio() -> None:
    try:
        ctypes.CDLL(None).fflush(None)
    except (OSError, AttributeError):
        pass


@contextlib.contextmanager
def solver_output_filtered():
    """Run the body with fd 1 caught; non-solver output is written back afterwards."""
    with _LOCK:
        try:
            sys.stdout.flush()
            saved = os.dup(1)
        except (OSError, ValueError):
            yield
            return
        with tempfile.TemporaryFile() as caught:
            os.dup2(caught.fileno(), 1)
            try:
                yield
            finally:
                _flush_c_stdio()
                os.dup2(saved, 1)
                os.close(saved)
                caught.seek(0)
                kept = b"".join(line for line in caught.read().splitlines(keepends=True)
                                if not line.startswith(SOLVER_NOISE))
                if kept:
                    os.write(1, kept)
