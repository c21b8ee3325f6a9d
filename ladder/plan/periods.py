"""The plan's periods: the horizon from the day after the plan date, cut into months, weeks or quarters.

The horizon runs from ``as_of + 1`` to the last day of the ``months``-th calendar month counted from
that day's month (so a month-end plan date covers exactly ``months`` whole months, and its months
are those of the policy's cash-needs coverage, ``ladder.policy.measures``). Periods:
- ``month``: calendar months (the first may be partial);
- ``quarter``: calendar quarters (the first and last may be partial);
- ``week``: seven-day blocks from ``as_of + 1`` (the last may be shorter).
A period is (start - 1, end]: a flow on a period's end date falls in that period.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.market.dates import to_days

STEPS = ("month", "week", "quarter")


@dataclass(frozen=True, eq=False)
class Periods:
    """``boundaries`` (P+1,) datetime64[D]: the plan date, then each period's last day."""

    boundaries: np.ndarray
    step: str

    def __len__(self) -> int:
        return len(self.boundaries) - 1

    @property
    def as_of(self) -> np.datetime64:
        return self.boundaries[0]

    @property
    def start(self) -> np.ndarray:
        """First day of each period."""
        return self.boundaries[:-1] + 1

    @property
    def end(self) -> np.ndarray:
        """Last day of each period."""
        return self.boundaries[1:]

    @property
    def days(self) -> np.ndarray:
        """Calendar days in each period (float64)."""
        return np.diff(self.boundaries).astype(np.float64)

    def index(self, dates) -> np.ndarray:
        """Period of each date (int64): -1 on or before the plan date, P after the horizon."""
        d = to_days(dates)
        return np.searchsorted(self.boundaries, d, side="left") - 1

    def within(self, dates) -> np.ndarray:
        """Dates inside the horizon (and not NaT)."""
        i = self.index(dates)
        return ~np.isnat(to_days(dates)) & (i >= 0) & (i < len(self))

    def total(self, dates, amounts) -> np.ndarray:
        """``amounts`` summed by the period of ``dates`` (same shape; outside the horizon ignored): (P,)."""
        d, a = to_days(dates).ravel(), np.asarray(amounts, dtype=np.float64).ravel()
        keep = self.within(d)
        return np.bincount(self.index(d[keep]), weights=a[keep], minlength=len(self))


def horizon_end(as_of, months: int) -> np.datetime64:
    """Last day of the ``months``-th calendar month counted from the month of ``as_of + 1``."""
    first = (np.datetime64(as_of, "D") + 1).astype("datetime64[M]")
    return (first + months).astype("datetime64[D]") - 1


def make_periods(as_of, months: int, step: str = "month") -> Periods:
    """The periods of a ``months``-month horizon after ``as_of``; ``step`` one of ``STEPS``."""
    if step not in STEPS:
        raise ValueError(f"unknown period {step!r}; use one of {', '.join(STEPS)}")
    if months < 1:
        raise ValueError("the horizon must be at least one month")
    as_of = np.datetime64(as_of, "D")
    last = horizon_end(as_of, months)
    if step == "week":
        ends = np.arange(as_of + 7, last, 7)
    else:
        first = (as_of + 1).astype("datetime64[M]")
        month_ends = np.arange(first + 1, last.astype("datetime64[M]") + 1).astype("datetime64[D]") - 1
        quarter_end = month_ends.astype("datetime64[M]").astype(np.int64) % 3 == 2
        ends = month_ends if step == "month" else month_ends[quarter_end]
    ends = np.concatenate([ends[ends < last], [last]])
    return Periods(np.concatenate([[as_of], ends]).astype("datetime64[D]"), step)
