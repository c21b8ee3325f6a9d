"""Holdings: every holding with its analytics; filter with ``/``, sort with ``s``, Enter for detail."""

from __future__ import annotations

import numpy as np
from textual.app import ComposeResult
from textual.binding import Binding
from textual.message import Message
from textual.widgets import Input, Static

from ladder.tui import format as fmt
from ladder.tui.frame import Column, Frame
from ladder.tui.results import Results
from ladder.tui.views.base import Notice, View
from ladder.tui.widgets.frame_table import FrameTable

COLUMNS = (
    Column("id", "Id"), Column("sector", "Sector", priority=2), Column("issuer", "Issuer", max_width=24, priority=3),
    Column("rating", "Rating", priority=2), Column("maturity", "Maturity"), Column("coupon", "Coupon %", True, priority=3),
    Column("face", "Face", True), Column("clean", "Clean price", True, priority=3),
    Column("market_value", "Market value", True), Column("ytw", "Yield to worst %", True),
    Column("ytm", "To maturity %", True, priority=4), Column("book_yield", "Book yield %", True, priority=3),
    Column("modified", "Mod dur", True, priority=4), Column("effective", "Eff dur", True, priority=2),
    Column("convexity", "Convexity", True, priority=4), Column("dv01", "DV01", True, priority=3),
    Column("spread", "Spread bp", True, priority=4), Column("unrealized", "Unrealized gain", True, priority=3),
    Column("days", "Days to maturity", True, priority=4), Column("call", "Call", priority=4),
    Column("priced", "Priced from", priority=4),
)


def holdings_frame(v) -> Frame:
    """The Holdings table of a Valuation (display text only; every figure is the valuation's)."""
    h, m = v.holdings, v.measures
    rating = np.where(h.rating != "", h.rating, h.short_rating)
    ytw = v.yield_to_worst
    text = {
        "id": h.id, "sector": h.sector, "issuer": h.issuer, "rating": rating.astype(object),
        "maturity": fmt.texts(h.maturity), "coupon": fmt.percents(h.coupon, 3),
        "face": fmt.numbers(h.face, 0), "clean": fmt.numbers(v.clean, 4),
        "market_value": fmt.numbers(v.market_value, 0), "ytm": fmt.percents(m.ytm, 3),
        "ytw": fmt.percents(ytw, 3), "book_yield": fmt.percents(v.book_yield, 3),
        "modified": fmt.numbers(m.modified, 3), "effective": fmt.numbers(v.effective_duration, 3),
        "convexity": fmt.numbers(m.convexity, 3), "dv01": fmt.numbers(v.dv01, 0),
        "spread": fmt.numbers(v.spread, 1, 1e4), "unrealized": fmt.numbers(v.unrealized_gain, 0),
        "days": fmt.numbers(v.days_to_maturity, 0),
        "call": np.where(h.callable, "callable", "").astype(object), "priced": v.priced_from,
    }
    sort = {
        "id": h.id, "sector": h.sector, "issuer": h.issuer, "rating": rating.astype(object),
        "maturity": h.maturity.astype("datetime64[D]").astype(np.float64), "coupon": h.coupon, "face": h.face,
        "clean": v.clean, "market_value": v.market_value, "ytm": m.ytm, "ytw": ytw, "book_yield": v.book_yield,
        "modified": m.modified, "effective": v.effective_duration, "convexity": m.convexity, "dv01": v.dv01,
        "spread": v.spread, "unrealized": v.unrealized_gain, "days": v.days_to_maturity.astype(np.float64),
        "call": text["call"], "priced": v.priced_from,
    }
    sort["maturity"] = np.where(np.isnat(h.maturity), np.nan, sort["maturity"])
    search = np.char.lower((h.id.astype(str) + " " + h.issuer.astype(str) + " " + h.sector.astype(str) + " "
                            + rating.astype(str) + " " + h.kind.astype(str) + " " + text["call"].astype(str)))
    return Frame(COLUMNS, text, sort, search=search.astype(object))


def totals_text(v, rows=None) -> str:
    """The totals line; with ``rows`` (a filtered list) the subtotal of those holdings."""
    t = v.totals if rows is None else v.subtotal(rows)
    count = f"{t.count:,} holdings" if rows is None else f"{t.count:,} of {v.totals.count:,} holdings (filtered)"
    return (f"{count}   face {fmt.money(t.face)}   market value {fmt.money(t.market_value)}   "
            f"yield to worst {fmt.percent(t.yield_to_worst)}%   book yield {fmt.percent(t.book_yield)}%   "
            f"mod dur {fmt.number(t.modified_duration, 3)}   eff dur {fmt.number(t.effective_duration, 3)}   "
            f"DV01 {fmt.money(t.dv01)}   WAM {fmt.number(t.wam_days, 0)} days")


class HoldingsView(View):
    TITLE = "Holdings"
    SHORT = "Hold"
    NEEDS = ("valuation",)
    BINDINGS = [
        Binding("slash", "filter", "Filter", id="holdings.filter", tooltip="Show only holdings matching words"),
        Binding("enter", "detail", "Detail", id="holdings.detail", tooltip="Terms, cash flows, price/yield chart"),
        Binding("x", "sell", "Sell in ticket", id="holdings.sell",
                tooltip="Open the trade ticket with a sale of this whole holding"),
        Binding("escape", "clear_filter", "Clear filter", id="holdings.clear_filter", show=False),
    ]

    class SellWanted(Message):
        def __init__(self, row: int) -> None:
            super().__init__()
            self.row = row

    class DetailWanted(Message):
        def __init__(self, row: int) -> None:
            super().__init__()
            self.row = row

    def compose(self) -> ComposeResult:
        yield Static(id="holdings-totals", classes="totals")
        yield Notice(id="holdings-notice")
        yield FrameTable(id="holdings-table")
        yield Input(placeholder="filter: words to match in id, issuer, sector, rating (Enter to apply, Esc to clear)",
                    id="holdings-filter", classes="filter")

    def on_mount(self) -> None:
        self.query_one("#holdings-filter").display = False
        self._frame_of = None

    @property
    def table(self) -> FrameTable:
        return self.query_one("#holdings-table", FrameTable)

    def refresh_view(self, results: Results) -> None:
        v = self.figures(results, "valuation")
        if v is None:
            return
        if self._frame_of is not v:
            self._frame_of = v
            self.table.show(holdings_frame(v))
        self._totals()

    def _totals(self) -> None:
        if self._frame_of is not None:
            rows = self.table.visible_rows() if self.table.filter_text else None
            self.query_one("#holdings-totals", Static).update(totals_text(self._frame_of, rows))

    def check_action(self, action: str, parameters) -> bool | None:
        if action in ("detail", "sell"):
            return self.table.current_row is not None
        if action == "clear_filter":
            return bool(self.table.filter_text) or self.query_one("#holdings-filter").display
        return True

    def action_filter(self) -> None:
        box = self.query_one("#holdings-filter", Input)
        box.display = True
        box.value = self.table.filter_text
        box.focus()

    def action_clear_filter(self) -> None:
        box = self.query_one("#holdings-filter", Input)
        box.value = ""
        box.display = False
        self.table.set_filter("")
        self._totals()
        self.table.focus()

    def on_input_changed(self, event: Input.Changed) -> None:
        if event.input.id == "holdings-filter":
            self.table.set_filter(event.value)
            self._totals()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        if event.input.id == "holdings-filter":
            event.input.display = bool(event.value)
            self.table.focus()

    def action_sell(self) -> None:
        row = self.table.current_row
        if row is not None:
            self.post_message(self.SellWanted(row))

    def action_detail(self) -> None:
        row = self.table.current_row
        if row is not None:
            self.post_message(self.DetailWanted(row))
