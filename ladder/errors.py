"""Errors for the user: every problem at once, each as ``file:row:column: message``."""

from __future__ import annotations

from dataclasses import dataclass


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
