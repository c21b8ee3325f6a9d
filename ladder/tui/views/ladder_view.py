"""Ladder: face and market value maturing in each rung as bars, the cash-needs forecast over them,
and each rung's marks in words (gap, crowded, short of needs)."""

from __future__ import annotations

import numpy as np
from textual.app import ComposeResult
from textual.widgets import Static

from ladder.tui import format as fmt
from ladder.tui.frame import Column, Frame
from ladder.tui.results import Results
from ladder.analysis.rung_summary import CROWDED_SHARE, GAP_SHARE, RungSummary, rung_summary
from ladder.tui.views.base import Notice, View
from ladder.tui.widgets.chart import Chart, y_ticks
from ladder.tui.widgets.frame_table import FrameTable

COLUMNS = (Column("rung", "Rung"), Column("count", "Holdings", True, priority=3),
           Column("face", "Face maturing", True), Column("mv", "Market value", True, priority=2),
           Column("share", "Share %", True), Column("even", "Even ladder %", True, priority=2),
           Column("needs", "Net cash needs", True), Column("marks", "Gap, crowded or short", max_width=36))
SCALE = 1e6


def rung_frame(s: RungSummary) -> Frame:
    marks = np.array([", ".join(m) or "ok" for m in s.marks], dtype=object)
    style = np.array(["review" if "short of needs" in m else ("near" if m else "") for m in s.marks], dtype=object)
    text = {"rung": np.array(s.rungs, dtype=object), "count": fmt.numbers(s.count, 0), "face": fmt.numbers(s.face, 0),
            "mv": fmt.numbers(s.market_value, 0), "share": fmt.percents(s.share, 1),
            "even": fmt.percents(s.even_share, 1), "needs": fmt.numbers(s.needs, 0, sign=True), "marks": marks}
    order = np.arange(len(s.rungs), dtype=np.float64)
    sort = {"rung": order, "count": s.count.astype(np.float64), "face": s.face, "mv": s.market_value,
            "share": s.share, "even": s.even_share, "needs": s.needs, "marks": marks}
    return Frame(COLUMNS, text, sort, row_style=style)


class LadderView(View):
    TITLE = "Ladder"
    SHORT = "Ladder"
    NEEDS = ("valuation",)

    def compose(self) -> ComposeResult:
        yield Static(id="ladder-summary", classes="totals")
        yield Notice(id="ladder-notice")
        yield FrameTable(id="ladder-table")
        yield Chart(id="ladder-chart", classes="secondary")

    def refresh_view(self, results: Results) -> None:
        v = self.figures(results, "valuation")
        if v is None:
            return
        s = rung_summary(v, results.book.cash_needs)
        self.query_one("#ladder-table", FrameTable).show(rung_frame(s))
        self.query_one("#ladder-summary", Static).update(
            f"Maturities by rung from {v.as_of} (final maturity; calls not assumed). Flags: gap = under "
            f"{GAP_SHARE:g}x an even ladder's share, crowded = over {CROWDED_SHARE:g}x, short of needs = net cash "
            "needs so far above fund balances plus principal and coupons paid so far.")
        labels = [f"{r} {'/'.join(m)}" if m else r for r, m in zip(s.rungs, s.marks)]
        x = list(range(1, len(s.rungs) + 1))

        def paint(plt, series) -> None:
            plt.multiple_bar(x, [(s.face / SCALE).tolist(), (s.market_value / SCALE).tolist()],
                             labels=["face maturing", "market value"], color=[series.colour(0), series.colour(1)],
                             marker=[series.bar(0)["marker"], series.bar(1)["marker"]])
            plt.plot(x, (np.maximum(s.needs, 0) / SCALE).tolist(), label="net cash needs", **series.line(2))
            plt.xticks(x, labels)
            y_ticks(plt, 0.0, float(max(s.face.max(), s.market_value.max(), s.needs.max())) / SCALE)
            plt.title(f"By rung, millions of {results.book.currency}")

        self.query_one("#ladder-chart", Chart).draw(paint)
