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
    Column("id", "Id"), Column("sector", "Sector"), Column("issuer", "Issuer", max_width=24),
    Column("rating", "Rating"), Column("maturity", "Maturity"), Column("coupon", "Coupon %", True),
    Column("face", "Face", True), Column("clean", "Clean", True), Column("market_value", "Market value", True),
    Column("ytm", "To maturity %", True), Column("ytw", "Yld worst %", True), Column("book_yield", "Book yld %", True),
    Column("modified", "Mod dur", True), Column("effective", "Eff dur", True),
    Column("convexity", "Convexity", True), Column("dv01", "DV01", True), Column("spread", "Spread bp", True),
    Column("unrealized", "Unrealized", True), Column("days", "Days", True), Column("call", "Call"),
    Column("priced", "Priced from"),
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


def totals_text(v) -> str:
    t = v.totals
    return (f"{t.count:,} holdings   face {fmt.money(t.face)}   market value {fmt.money(t.market_value)}   "
            f"yield to worst {fmt.percent(t.yield_to_worst)}%   book yield {fmt.percent(t.book_yield)}%   "
            f"mod dur {fmt.number(t.modified_duration, 3)}   eff dur {fmt.number(t.effective_duration, 3)}   "
            f"DV01 {fmt.money(t.dv01)}   WAM {fmt.number(t.wam_days, 0)} days")


class HoldingsView(View):
    TITLE = "Holdings"
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
        notice = self.query_one(Notice)
        state = self.state_text(results, "valuation")
        v = results.valuation
        if v is None:
            notice.say(state, "error" if "valuation" in results.errors else "computing")
            return
        notice.say("Recomputing…" if "valuation" in results.pending else None, "stale")
        self.set_class("valuation" in results.pending, "-stale")
        if self._frame_of is not v:
            self._frame_of = v
            self.table.show(holdings_frame(v))
        self.query_one("#holdings-totals", Static).update(totals_text(v))

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
        self.table.focus()

    def on_input_changed(self, event: Input.Changed) -> None:
        if event.input.id == "holdings-filter":
            self.table.set_filter(event.value)

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
