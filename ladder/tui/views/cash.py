"""Cash: the cash account's balance and its statement (trades, maturities, coupons, calls,
transfers), from ``ladder.analysis.cash_activity.CashActivity``; ``/`` filters by activity and date."""

from __future__ import annotations

import datetime as dt

import numpy as np
from textual.app import ComposeResult
from textual.binding import Binding
from textual.widgets import Input, Static

from ladder.analysis.cash_activity import ACTIVITY
from ladder.tui import format as fmt
from ladder.tui.frame import Column, Frame
from ladder.tui.results import Results
from ladder.tui.views.base import Notice, View
from ladder.tui.widgets.frame_table import FrameTable

COLUMNS = (Column("date", "Date"), Column("action", "Action"), Column("amount", "Amount", True),
           Column("balance", "Balance after", True), Column("holding", "Holding", max_width=24, priority=2),
           Column("face", "Face", True, priority=3), Column("price", "Price", True, priority=4),
           Column("reason", "Reason", max_width=48, priority=3))
KINDS = tuple(dict.fromkeys(ACTIVITY.values()))
FILTER_HELP = (f"filter: {', '.join(KINDS)} or an action ({', '.join(ACTIVITY)}); dates as "
               "2026-12-01..2026-12-31 (either end open)")


def parse_filter(text: str) -> tuple[set[str] | None, dt.date | None, dt.date | None]:
    """(journal actions or None for all, first date, last date) from the filter's words: a kind of
    activity stands for its actions; ValueError names a word it does not know."""
    actions, start, end = set(), None, None
    for word in text.lower().replace(",", " ").split():
        if word in ACTIVITY:
            actions.add(word)
        elif word in KINDS:
            actions.update(a for a, kind in ACTIVITY.items() if kind == word)
        else:
            first, _, last = word.partition("..") if ".." in word else (word, "", word)
            try:
                start = dt.date.fromisoformat(first) if first else None
                end = dt.date.fromisoformat(last) if last else None
            except ValueError:
                raise ValueError(f"{word!r} is neither an activity ({', '.join(KINDS)}), an action nor a "
                                 "date") from None
    return actions or None, start, end


def statement_frame(a, rows) -> Frame:
    e = [a.entries[i] for i in rows]
    unsaved = a.unsaved[rows]
    amount = np.array([x.amount for x in e], dtype=np.float64)
    face = np.array([x.face for x in e], dtype=np.float64)
    price = np.array([x.price for x in e], dtype=np.float64)
    balance = a.balance_after[rows]
    action = np.array([x.action + (" (unsaved)" if u else "") for x, u in zip(e, unsaved)], dtype=object)
    text = {"date": np.array([str(x.date) for x in e], dtype=object), "action": action,
            "holding": fmt.texts(np.array([x.holding for x in e], dtype=object)),
            "face": fmt.numbers(face, 0), "amount": fmt.numbers(amount, 2, sign=True),
            "balance": fmt.numbers(balance, 2), "price": fmt.numbers(price, 4),
            "reason": fmt.texts(np.array([x.reason for x in e], dtype=object))}
    sort = dict(text)
    sort.update(date=np.arange(len(e), dtype=np.float64), amount=amount, balance=balance, face=face, price=price)
    style = np.where(unsaved, "added", "").astype(object)
    return Frame(COLUMNS, text, sort, row_style=style)


def summary_text(a, rows, currency: str, as_of) -> str:
    if not a.account:
        return "The book names no cash account ([cash] account in book.toml): every trade is new money."
    head = f"Cash account {a.account}: balance {fmt.money(a.balance, 2)} {currency} at {as_of}"
    if not a.entries:
        return (f"{head}\nNo journal lines yet: trades, ladder roll (coupons, maturities, calls) and ladder cash "
                "(transfers) add them.")
    money_in, money_out = a.totals(rows)
    shown = f"{len(rows):,} of {len(a.entries):,} lines" if len(rows) != len(a.entries) else f"{len(rows):,} lines"
    return (f"{head}   before the first line {fmt.money(a.opening, 2)}\n{shown}: in {fmt.money(money_in, 2)}   "
            f"out {fmt.money(money_out, 2)}")


class CashView(View):
    TITLE = "Cash"
    SHORT = "Cash"
    NEEDS = ("cash",)
    BINDINGS = [Binding("slash", "filter", "Filter", id="cash.filter", tooltip=FILTER_HELP),
                Binding("escape", "clear_filter", "Clear filter", id="cash.clear_filter", show=False)]

    def compose(self) -> ComposeResult:
        yield Static(id="cash-summary", classes="totals")
        yield Notice(id="cash-notice")
        yield FrameTable(id="cash-table")
        yield Input(placeholder=FILTER_HELP, id="cash-filter", classes="filter")

    def on_mount(self) -> None:
        self.query_one("#cash-filter").display = False
        self._activity = None
        self._wanted = (None, None, None)

    def refresh_view(self, results: Results) -> None:
        a = self.figures(results, "cash")
        if a is None:
            return
        self._activity = a
        self._show()

    def _show(self) -> None:
        a = self._activity
        rows = a.rows(*self._wanted)
        self.query_one("#cash-table", FrameTable).show(statement_frame(a, rows))
        book = self.results.book
        self.query_one("#cash-summary", Static).update(summary_text(a, rows, book.currency, book.valuation_date))

    def check_action(self, action: str, parameters) -> bool | None:
        if action == "clear_filter":    # otherwise Esc goes on to the app
            return self._wanted != (None, None, None) or self.query_one("#cash-filter").display
        if action == "filter":
            return self._activity is not None
        return True

    def action_filter(self) -> None:
        box = self.query_one("#cash-filter", Input)
        box.display = True
        box.focus()

    def action_clear_filter(self) -> None:
        box = self.query_one("#cash-filter", Input)
        box.value, box.display = "", False
        self._wanted = (None, None, None)
        if self._activity is not None:
            self._show()
        self.query_one("#cash-table", FrameTable).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        if event.input.id != "cash-filter":
            return
        event.stop()
        try:
            self._wanted = parse_filter(event.value)
        except ValueError as error:
            self.notify(str(error), title="Not a filter", severity="error")
            return
        event.input.display = False
        self._show()
        self.query_one("#cash-table", FrameTable).focus()
