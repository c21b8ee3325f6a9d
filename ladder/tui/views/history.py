"""History: the recorded month-ends (market value, yield, duration, income, compliance), from the
history database ``ladder report`` writes (``ladder.report.history.month_ends``), with a chart of
market value and yield over the months."""

from __future__ import annotations

import numpy as np
from textual.app import ComposeResult
from textual.widgets import Static

from ladder.tui import format as fmt
from ladder.tui.frame import Column, Frame
from ladder.tui.results import Results
from ladder.tui.views.base import Notice, View
from ladder.tui.views.policy import status_word
from ladder.tui.widgets.chart import Chart, y_ticks
from ladder.tui.widgets.frame_table import FrameTable

COLUMNS = (Column("as_of", "Month-end"), Column("mv", "Market value", True), Column("ytw", "YTW %", True),
           Column("duration", "Eff dur", True), Column("income", "Income", True),
           Column("compliance", "Compliance"), Column("breaches", "Rules in breach", True, priority=2),
           Column("book_yield", "Book yield %", True, priority=3))
SCALE = 1e6
EMPTY = ("No month-end recorded yet: each run of ladder report BOOK records the month-end in the book's "
         "history (history.sqlite).")


def months_frame(m) -> Frame:
    dates = np.array([str(d) for d in m.as_of], dtype=object)
    text = {"as_of": dates, "mv": fmt.numbers(m.market_value, 0), "ytw": fmt.percents(m.market_yield, 3),
            "duration": fmt.numbers(m.effective_duration, 3), "income": fmt.numbers(m.interest_earned, 0),
            "compliance": np.array([status_word(c) for c in m.compliance], dtype=object),
            "breaches": fmt.numbers(m.breaches, 0), "book_yield": fmt.percents(m.book_yield, 3)}
    sort = dict(text)
    sort.update(as_of=np.arange(len(dates), dtype=np.float64), mv=m.market_value, ytw=m.market_yield,
                duration=m.effective_duration, income=m.interest_earned, breaches=m.breaches.astype(np.float64),
                book_yield=m.book_yield)
    style = np.array(["breach" if c == "breach" else "review" if c == "review" else "" for c in m.compliance],
                     dtype=object)
    return Frame(COLUMNS, text, sort, row_style=style)


class HistoryView(View):
    TITLE = "History"
    SHORT = "Hist"
    NEEDS = ("history",)

    def compose(self) -> ComposeResult:
        yield Static(id="history-summary", classes="totals")
        yield Notice(id="history-notice")
        yield FrameTable(id="history-table")
        yield Chart(id="history-chart", classes="secondary")

    def refresh_view(self, results: Results) -> None:
        m = self.figures(results, "history")
        if m is None:
            return
        table = self.query_one("#history-table", FrameTable)
        table.show(months_frame(m))
        summary = self.query_one("#history-summary", Static)
        if not m.as_of:
            summary.update(EMPTY)
            return
        summary.update(f"{len(m.as_of)} month-end(s) recorded, {m.as_of[0]} to {m.as_of[-1]} (ladder report "
                       "records one each run); YTW = yield to worst; income = the month's interest earned.")
        x = list(range(1, len(m.as_of) + 1))

        def paint(plt, series) -> None:
            plt.plot(x, (m.market_value / SCALE).tolist(), label="market value (millions)", **series.line(0))
            y_ticks(plt, float(np.nanmin(m.market_value)) / SCALE, float(np.nanmax(m.market_value)) / SCALE)
            plt.xticks(x, [str(d)[:7] for d in m.as_of])
            plt.title(f"Market value by month-end, millions of {results.book.currency}")

        self.query_one("#history-chart", Chart).draw(paint)
