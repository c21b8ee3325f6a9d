"""What the app knows about its book at one moment: the book and each façade's latest result.

``Results`` is frozen with identity equality (``eq=False``): a new object for every change, so a
reactive holding it fires on every assignment and never compares numpy arrays.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any

from ladder.folder.book_file import Book

TASKS = ("valuation", "check", "shock", "plan")


@dataclass(frozen=True, eq=False)
class Results:
    """``generation`` counts the book's changes; results of an older generation are dropped."""

    generation: int
    book: Book
    values: dict[str, Any] = field(default_factory=dict)     # task -> result
    errors: dict[str, str] = field(default_factory=dict)     # task -> message for the screen
    pending: frozenset[str] = frozenset()

    def get(self, task: str):
        return self.values.get(task)

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
        return replace(self, pending=self.pending | set(tasks))
