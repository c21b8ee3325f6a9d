"""A table that renders only the rows on screen (Textual's line API), for books of any size.

Data arrive as a ``Frame``: columns of display text (object arrays) and, per column, the values to
sort by (numbers or text). Sorting and filtering only reorder an index array, so a 10,000-row table
sorts in milliseconds and paints no more than a screenful. Messages name rows by their position in
the frame (the holding's index), not their place on screen.

Columns fit the width: the least important (highest ``Column.priority``) drop first until the rest
fit (``w`` shows every column again), and the frame's leading ``fixed`` columns (the row's key) stay
in place while the others scroll sideways.
"""

from __future__ import annotations

import numpy as np
from rich.segment import Segment
from rich.style import Style
from textual.binding import Binding
from textual.geometry import Size
from textual.message import Message
from textual.reactive import reactive
from textual.scroll_view import ScrollView
from textual.strip import Strip

from ladder.tui.frame import Frame, sort_order

GAP = 2   # blank cells between columns


class FrameTable(ScrollView, can_focus=True):
    """Rows of a Frame with a fixed header, a row cursor, a sort column and a text filter."""

    COMPONENT_CLASSES = {"frame-table--header", "frame-table--sorted", "frame-table--cursor",
                         "frame-table--column", "frame-table--breach", "frame-table--review",
                         "frame-table--near", "frame-table--muted", "frame-table--added"}
    DEFAULT_CSS = """
    FrameTable { height: 1fr; }
    """
    BINDINGS = [
        Binding("up", "cursor(-1)", "Up", id="table.up", show=False),
        Binding("down", "cursor(1)", "Down", id="table.down", show=False),
        Binding("pageup", "page(-1)", "Page up", id="table.page_up", show=False),
        Binding("pagedown", "page(1)", "Page down", id="table.page_down", show=False),
        Binding("home", "cursor(-1000000000)", "First", id="table.first", show=False),
        Binding("end", "cursor(1000000000)", "Last", id="table.last", show=False),
        Binding("left", "column(-1)", "Column left", id="table.left", show=False),
        Binding("right", "column(1)", "Column right", id="table.right", show=False),
        Binding("s", "sort", "Sort", id="table.sort", tooltip="Sort by the highlighted column; again to reverse"),
        Binding("w", "all_columns", "All columns", id="table.all_columns",
                tooltip="Show every column (scroll sideways) or only those that fit"),
    ]

    cursor_row = reactive(0)      # position on screen order
    cursor_column = reactive(0)

    class RowHighlighted(Message):
        def __init__(self, table: "FrameTable", row: int) -> None:
            super().__init__()
            self.table, self.row = table, row

        @property
        def control(self) -> "FrameTable":
            return self.table

    def __init__(self, *, id: str | None = None, classes: str | None = None) -> None:
        super().__init__(id=id, classes=classes)
        self.frame = Frame.empty()
        self.order = np.zeros(0, dtype=np.int64)
        self.sort_key: str | None = None
        self.descending = False
        self.filter_text = ""
        self.all_columns = False
        self.shown: tuple[int, ...] = ()     # frame column positions on screen, in order
        self.widths: list[int] = []          # cells of each frame column on screen

    # ---- data ----------------------------------------------------------------------------------
    def show(self, frame: Frame, keep_place: bool = True) -> None:
        """Show ``frame``, keeping sort, filter and (by frame row) the cursor where they can be."""
        current = self.current_row if keep_place else None
        self.frame = frame
        if self.sort_key is not None and frame.columns and self.sort_key not in frame.sort_values:
            self.sort_key = None
        self._reorder(current)

    def set_filter(self, text: str) -> None:
        self.filter_text = text.strip().lower()
        self._reorder(self.current_row)

    def sort_by(self, key: str, descending: bool = False) -> None:
        self.sort_key, self.descending = key, descending
        self._reorder(self.current_row)

    @property
    def row_count(self) -> int:
        return len(self.order)

    @property
    def current_row(self) -> int | None:
        """The frame row under the cursor, or None when the table is empty."""
        return int(self.order[self.cursor_row]) if 0 <= self.cursor_row < len(self.order) else None

    def visible_rows(self) -> np.ndarray:
        """Frame rows in screen order (after filter and sort)."""
        return self.order.copy()

    def _reorder(self, keep: int | None) -> None:
        n = len(self.frame)
        rows = np.arange(n)
        if self.filter_text and self.frame.search is not None:
            words = self.filter_text.split()
            hit = np.ones(n, bool)
            for word in words:
                hit &= np.char.find(self.frame.search.astype(str), word) >= 0
            rows = rows[hit]
        if self.sort_key in self.frame.sort_values:
            values = self.frame.sort_values[self.sort_key][rows]
            rows = rows[sort_order(values, self.descending)]
        self.order = rows
        self._fit()
        place = 0
        if keep is not None:
            found = np.flatnonzero(rows == keep)
            place = int(found[0]) if len(found) else 0
        self.set_reactive(FrameTable.cursor_row, -1)
        self.cursor_row = min(place, max(len(rows) - 1, 0))
        self._clear_cache()
        self.refresh()

    # ---- columns on screen ---------------------------------------------------------------------
    @property
    def hidden_count(self) -> int:
        return len(self.frame.columns) - len(self.shown)

    def _span(self, columns) -> int:
        """Cells taken by ``columns`` (frame positions), with the gaps after each."""
        return sum(self.widths[i] + GAP for i in columns)

    def _fit(self) -> None:
        """Choose the columns on screen: drop the least important (then the rightmost of them) until
        the rest fit the width, never a priority-1 column, then narrow those with a ``min_width``;
        set the scrollable size."""
        columns = list(range(len(self.frame.columns)))
        self.widths = list(self.frame.widths)
        width = self.scrollable_content_region.width or self.size.width
        if not self.all_columns and width:
            while 1 + self._span(columns) - GAP > width:
                droppable = [i for i in columns if self.frame.columns[i].priority > 1]
                if not droppable:
                    break
                columns.remove(max(droppable, key=lambda i: (self.frame.columns[i].priority, i)))
            for i in columns:
                excess = 1 + self._span(columns) - GAP - width
                least = self.frame.columns[i].min_width
                if excess > 0 and least is not None:
                    self.widths[i] = max(least, self.widths[i] - excess)
        self.shown = tuple(columns)
        self.cursor_column = min(self.cursor_column, max(len(self.shown) - 1, 0))
        self.virtual_size = Size(1 + self._span(columns), len(self.order) + 1)
        self._clear_cache()

    def on_resize(self) -> None:
        self._fit()
        self.refresh()

    @property
    def _fixed(self) -> tuple[int, ...]:
        return self.shown[: min(self.frame.fixed, max(len(self.shown) - 1, 0))]

    def action_all_columns(self) -> None:
        self.all_columns = not self.all_columns
        self._fit()
        self.refresh()

    # ---- keys ----------------------------------------------------------------------------------
    def action_cursor(self, step: int) -> None:
        if len(self.order):
            self.cursor_row = int(np.clip(self.cursor_row + step, 0, len(self.order) - 1))

    def action_page(self, step: int) -> None:
        self.action_cursor(step * max(self.size.height - 2, 1))

    def action_column(self, step: int) -> None:
        if self.shown:
            self.cursor_column = int(np.clip(self.cursor_column + step, 0, len(self.shown) - 1))

    @property
    def column_key(self) -> str | None:
        """The key of the highlighted column."""
        return self.frame.columns[self.shown[self.cursor_column]].key if self.shown else None

    def action_sort(self) -> None:
        if not self.shown:
            return
        column = self.frame.columns[self.shown[self.cursor_column]]
        descending = (not self.descending) if column.key == self.sort_key else column.numeric
        self.sort_by(column.key, descending)

    def watch_cursor_row(self, old: int, new: int) -> None:
        if new < 0:
            return
        body = max(self.size.height - 1, 1)
        top = int(self.scroll_y)
        if new < top:
            self.scroll_to(y=new, animate=False)
        elif new >= top + body:
            self.scroll_to(y=new - body + 1, animate=False)
        self._clear_cache()
        self.refresh()
        row = self.current_row
        if row is not None:
            self.post_message(self.RowHighlighted(self, row))

    def watch_cursor_column(self) -> None:
        self._clear_cache()
        self.refresh()
        fixed = self._fixed
        if self.shown and self.cursor_column >= len(fixed):
            moving = self.shown[len(fixed):]
            x = self._span(moving[: self.cursor_column - len(fixed)])
            w = self.widths[self.shown[self.cursor_column]]
            left, room = int(self.scroll_x), self.scrollable_content_region.width - 1 - self._span(fixed)
            if x < left:
                self.scroll_to(x=x, animate=False)
            elif x + w > left + room:
                self.scroll_to(x=x + w - room, animate=False)

    # ---- rendering -----------------------------------------------------------------------------
    def _clear_cache(self) -> None:
        self._lines: dict[tuple, Strip] = {}

    def notify_style_update(self) -> None:
        super().notify_style_update()
        self._clear_cache()

    def _cells(self, columns, values: list[str], styles: list[Style], gap: Style) -> list[Segment]:
        """Segments of one line for ``columns`` (frame positions), values and styles by position."""
        segments = []
        for i in columns:
            column, width, text = self.frame.columns[i], self.widths[i], values[i]
            text = text if len(text) <= width else text[: width - 1] + "…"
            cell = text.rjust(width) if column.numeric else text.ljust(width)
            segments.append(Segment(cell, styles[i]))
            segments.append(Segment(" " * GAP, gap))
        return segments

    def _line(self, values: list[str], styles: list[Style], gap: Style, scroll_x: int, width: int) -> Strip:
        """The fixed columns in place, then the others cropped to the horizontal scroll."""
        fixed = self._fixed
        head = Strip([Segment(" ", gap)] + self._cells(fixed, values, styles, gap))
        rest = Strip(self._cells(self.shown[len(fixed):], values, styles, gap))
        room = max(width - head.cell_length, 0)
        return Strip.join([head, rest.crop_extend(scroll_x, scroll_x + room, gap)]).crop_extend(0, width, gap)

    def render_line(self, y: int) -> Strip:
        if not hasattr(self, "_lines"):
            self._clear_cache()
        scroll_x, scroll_y = int(self.scroll_x), int(self.scroll_y)
        width = self.size.width
        base = self.rich_style
        if y == 0:
            key = ("header", scroll_x, width)
            row = None
        else:
            position = scroll_y + y - 1
            if position >= len(self.order):
                return Strip.blank(width, base)
            row = int(self.order[position])
            key = (row, position == self.cursor_row, scroll_x, width)
        if key in self._lines:
            return self._lines[key]
        columns = self.frame.columns
        if row is None:
            head = self.get_component_rich_style("frame-table--header")
            sorted_style = self.get_component_rich_style("frame-table--sorted")
            column_style = self.get_component_rich_style("frame-table--column")
            labels = []
            styles = []
            current = self.shown[self.cursor_column] if self.shown else -1
            for i, c in enumerate(columns):
                mark = (" ▼" if self.descending else " ▲") if c.key == self.sort_key else ""
                labels.append(c.label + mark)
                style = sorted_style if c.key == self.sort_key else head
                styles.append(style + column_style if i == current else style)
            strip = self._line(labels, styles, head, scroll_x, width)
        else:
            line_style = base
            if self.frame.row_style is not None and self.frame.row_style[row]:
                line_style = base + self.get_component_rich_style(f"frame-table--{self.frame.row_style[row]}")
            if position == self.cursor_row and self.has_focus:
                line_style = line_style + self.get_component_rich_style("frame-table--cursor")
            elif position == self.cursor_row:
                line_style = line_style + self.get_component_rich_style("frame-table--cursor", partial=True)
            values = [self.frame.text[c.key][row] for c in columns]
            strip = self._line(values, [line_style] * len(columns), line_style, scroll_x, width)
        self._lines[key] = strip
        return strip

    def on_focus(self) -> None:
        self._clear_cache()
        self.refresh()

    def on_blur(self) -> None:
        self._clear_cache()
        self.refresh()

    def watch_scroll_y(self, old, new) -> None:
        super().watch_scroll_y(old, new)
        self._clear_cache()

    def watch_scroll_x(self, old, new) -> None:
        super().watch_scroll_x(old, new)
        self._clear_cache()
