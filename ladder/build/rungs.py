"""Rungs of a ladder to build: where each rung ends, from a specification such as ``12x3M``, ``5x1Y``
or explicit tenors ``3M,6M,1Y,2Y``.

Rung k holds maturities after the end of rung k-1 (the first starts at the settlement date) up to
and including its own end; ends are the settlement date plus whole months (``add_months``, with the
end-of-month rule for a month-end settlement date, as ``ladder.risk.rungs``).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

from ladder.errors import Problems
from ladder.market.dates import add_months, is_month_end
from ladder.market.tenors import tenor_label, tenor_months
from ladder.policy.model import Policy

_EVEN = re.compile(r"^\s*(\d+)\s*[xX]\s*(\d+\s*[MmYy])\s*$")
SPEC_SOURCE = "--rungs"


@dataclass(frozen=True, eq=False)
class Rungs:
    """Rung ends in months from settlement (increasing) and as dates."""

    months: np.ndarray   # (r,) int64
    ends: np.ndarray     # (r,) datetime64[D]
    spec: str

    def __len__(self) -> int:
        return len(self.months)

    @property
    def labels(self) -> tuple[str, ...]:
        starts = np.concatenate([[0], self.months[:-1]])
        return tuple(f"{tenor_label(a) if a else '0'}-{tenor_label(b)}" for a, b in zip(starts, self.months))

    def index(self, maturity) -> np.ndarray:
        """Rung of each maturity (int64); -1 past the last rung (or NaT)."""
        maturity = np.asarray(maturity, dtype="datetime64[D]")
        i = np.searchsorted(self.ends, maturity, side="left")
        return np.where(np.isnat(maturity) | (i >= len(self.ends)), -1, i).astype(np.int64)


def parse_months(spec: str) -> list[int]:
    """Rung ends in months from a specification; raises ValueError with a message for the user."""
    text = spec.strip()
    even = _EVEN.match(text)
    if even:
        count, step = int(even.group(1)), tenor_months(even.group(2))
        if count == 0:
            raise ValueError(f"{spec!r}: the number of rungs must be at least 1")
        return [step * (k + 1) for k in range(count)]
    parts = [p for p in text.split(",")]
    if not text or any(not p.strip() for p in parts):
        raise ValueError(f"{spec!r} is not a rung specification; write e.g. 12x3M, 5x1Y or 3M,6M,1Y,2Y")
    try:
        months = [tenor_months(p) for p in parts]
    except ValueError as error:
        raise ValueError(f"{spec!r}: {error}; write e.g. 12x3M, 5x1Y or 3M,6M,1Y,2Y") from None
    if any(b <= a for a, b in zip(months, months[1:])):
        raise ValueError(f"{spec!r}: explicit tenors must increase (e.g. 3M,6M,1Y,2Y)")
    return months


def default_spec(policy: Policy, settle) -> str:
    """An even ladder up to the policy's maximum maturity: yearly rungs when it allows two years or
    more, else quarterly, else monthly; ``5x1Y`` when the policy sets no maximum."""
    limit = policy.portfolio.max_maturity
    if limit is None:
        return "5x1Y"
    months = _months_within(limit.days(settle), np.datetime64(settle, "D"))
    if months >= 24:
        return f"{months // 12}x1Y"
    if months >= 6:
        return f"{months // 3}x3M"
    return f"{max(months, 1)}x1M"


def _months_within(days: int, settle: np.datetime64) -> int:
    """The most whole months from ``settle`` that end within ``days`` calendar days."""
    months = days // 31
    while (add_months(np.array([settle]), months + 1, is_month_end(settle))[0] - settle).astype(np.int64) <= days:
        months += 1
    return months


def make_rungs(spec: str | None, policy: Policy, settle) -> Rungs:
    """The rungs of ``spec`` (default: ``default_spec``) from ``settle``; refuses (InputError) a
    specification that does not parse or whose last rung ends past the policy's maximum maturity."""
    settle = np.datetime64(settle, "D")
    spec = spec if spec is not None else default_spec(policy, settle)
    problems = Problems()
    try:
        months = np.array(parse_months(spec), dtype=np.int64)
    except ValueError as error:
        problems.add(SPEC_SOURCE, 0, 0, str(error))
        problems.raise_if_any()
    ends = add_months(np.full(len(months), settle), months, is_month_end(settle))
    limit = policy.portfolio.max_maturity
    if limit is not None:
        last = int((ends[-1] - settle).astype(np.int64))
        if last > limit.days(settle):
            problems.add(SPEC_SOURCE, 0, 0, f"{spec!r}: the last rung ends {ends[-1]}, past the policy's maximum "
                                            f"maturity of {limit.describe()} ({limit.key} in {policy.source})")
    problems.raise_if_any()
    return Rungs(months, ends, spec)
