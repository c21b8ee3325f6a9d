"""What the app knows about its book at one moment: the book and each façade's latest result.

``Results`` is frozen with identity equality (``eq=False``): a new object for every change, so a
reactive holding it fires on every assignment and never compares numpy arrays.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any

from ladder.folder.book_file import Book

TASKS = ("valuation", "check", "shock", "plan", "cash", "history")


@dataclass(frozen=True, eq=False)
class Results:
    """``generation`` counts the book's changes; results of an older generation are dropped.

    ``earlier`` keeps the last results of the book before the change, for the views to show dimmed
    while the new ones compute (never used as inputs: ``get`` and ``valuation`` are current only).
    """

    generation: int
    book: Book
    values: dict[str, Any] = field(default_factory=dict)     # task -> result
    errors: dict[str, str] = field(default_factory=dict)     # task -> message for the screen
    pending: frozenset[str] = frozenset()
    earlier: dict[str, Any] = field(default_factory=dict)    # task -> result of the book before
    stopped: frozenset[str] = frozenset()                     # tasks the user stopped (Esc) before they landed

    def get(self, task: str):
        return self.values.get(task)

    def latest(self, task: str):
        """What to show for ``task``: (result, stale). Stale is the previous book's result while the
        new one computes, or a result being computed again; (None, False) when there is none."""
        if task in self.values:
            return self.values[task], task in self.pending
        if task in self.earlier and task not in self.errors:
            return self.earlier[task], True
        return None, False

    def next_book(self, book: Book) -> "Results":
        """Results for a changed book: nothing current yet, the figures so far kept as ``earlier``."""
        return Results(self.generation + 1, book, earlier={**self.earlier, **self.values})

    @property
    def valuation(self):
        return self.values.get("valuation")

    def landed(self, task: str, result=None, error: str | None = None) -> "Results":
        values = {k: v for k, v in self.values.items() if k != task}
        errors = {k: v for k, v in self.errors.items() if k != task}
        if error is None:
            values[task] = result
        else:
            errors[task] = error
        return replace(self, values=values, errors=errors, pending=self.pending - {task})

    def started(self, tasks) -> "Results":
        return replace(self, pending=self.pending | set(tasks), stopped=self.stopped - set(tasks))

    def stop(self) -> "Results":
        """No longer wait for the pending tasks: each keeps showing its previous figures, dimmed."""
        return replace(self, pending=frozenset(), stopped=self.stopped | self.pending)
