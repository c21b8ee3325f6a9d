"""Table data for the screen: columns of display text, the values to sort them by, row marks.

No Textual here: frames are built in worker threads and handed to ``widgets.frame_table``.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

SORT_MARK = 2   # room beside a column label for the sort arrow


@dataclass(frozen=True)
class Column:
    key: str
    label: str
    numeric: bool = False       # right-aligned
    max_width: int = 40
    priority: int = 1           # 1: always shown; higher numbers drop first when the screen is narrow
    min_width: int | None = None   # narrower than its text (cut with "…") before columns scroll


@dataclass(frozen=True, eq=False)
class Frame:
    """Display text by column key (object arrays of equal length), sort values, per-row classes.

    ``row_style`` (optional) names a component style per row ("" for none): e.g. ``"breach"``.
    ``search`` (optional): one lower-case text per row that a filter matches against.
    ``fixed``: how many leading columns (the row's key) stay in place while the rest scroll sideways.
    """

    columns: tuple[Column, ...]
    text: dict[str, np.ndarray]
    sort_values: dict[str, np.ndarray]
    row_style: np.ndarray | None = None
    search: np.ndarray | None = None
    fixed: int = 1
    widths: tuple[int, ...] = field(init=False)

    def __post_init__(self) -> None:
        widths = []
        for c in self.columns:
            cells = self.text[c.key]
            longest = max((len(s) for s in cells.tolist()), default=0)
            widths.append(min(max(longest, len(c.label) + SORT_MARK), c.max_width))
        object.__setattr__(self, "widths", tuple(widths))

    def __len__(self) -> int:
        return len(self.text[self.columns[0].key]) if self.columns else 0

    @staticmethod
    def empty() -> "Frame":
        return Frame((), {}, {})


def sort_order(values: np.ndarray, descending: bool) -> np.ndarray:
    """Positions that sort ``values`` (NaN and blanks last either way), stable."""
    values = np.asarray(values)
    if values.dtype == object:
        text = values.astype(str)
        order = np.argsort(text, kind="stable")
        if descending:
            order = order[::-1]
        blank = text[order] == ""
        return np.concatenate([order[~blank], order[blank]])
    numbers = values.astype(np.float64)
    missing = np.isnan(numbers)
    key = np.where(missing, 0.0, -numbers if descending else numbers)
    order = np.lexsort((key, missing))
    return order
