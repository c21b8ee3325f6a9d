"""Trade ticket: enter a buy or a sell and see, before committing, every policy rule and the risk
figures before and after it (``ladder.analysis.check.check_proposed``); commit books it."""

from __future__ import annotations

import numpy as np
from rich.markup import escape
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Grid, Horizontal, Vertical, VerticalScroll
from textual.message import Message
from textual.widgets import Button, Input, Label, Select, Static
from textual.worker import get_current_worker

from ladder.book.holdings import KINDS, SECTORS
from ladder.book.holdings_file import COLUMNS as FILE_COLUMNS
from ladder.neutralize import safe_terminal
from ladder.tui import format as fmt
from ladder.tui.frame import Column, Frame
from ladder.tui.policy_text import rule_cells
from ladder.tui.results import Results
from ladder.tui.ticket import BUY_FIELDS, SELL_FIELDS, SETTLEMENT, Ticket, booked_trades, check_ticket
from ladder.tui.views.base import Notice, View
from ladder.tui.views.policy import ROW_STYLE, STATUS_ORDER, status_word
from ladder.tui.widgets.frame_table import FrameTable

LABELS = {"id": "Id", "sector": "Sector", "issuer": "Issuer", "kind": "Kind", "face": "Face",
          "maturity_date": "Maturity (YYYY-MM-DD)", "coupon_pct": "Coupon %", "rating": "Rating (long)",
          "short_rating": "Rating (short)", "price": "Clean price", "yield_pct": "or yield %",
          "settle_date": "Settles (YYYY-MM-DD)", "funded_from": "Funded from"}
CHOICES = {"sector": SECTORS, "kind": KINDS}
COLUMNS = (Column("rule", "Rule id", max_width=38, min_width=24), Column("after", "After"), Column("before", "Before", priority=2),
           Column("limit", "Limit", True), Column("actual_before", "Actual before", True, priority=3),
           Column("actual_after", "Actual after", True), Column("headroom", "Headroom after", True, priority=2),
           Column("new", "New breach"), Column("cause", "Caused by", max_width=30, priority=3))
RISK = (("Market value", "market_value", 0, 1.0), ("Yield to worst %", "yield_to_worst", 3, 100.0), ("Book yield %", "book_yield", 3, 100.0),
        ("Effective duration", "effective_duration", 3, 1.0), ("Modified duration", "modified_duration", 3, 1.0),
        ("Convexity", "convexity", 3, 1.0), ("DV01", "dv01", 0, 1.0), ("WAM days", "wam_days", 0, 1.0),
        ("Holdings", "count", 0, 1.0))


def changes_frame(check) -> Frame:
    c = check.changes
    after = [x.after for x in c]
    before = [x.before for x in c]
    cells_after = np.array([rule_cells(a.limit, a.actual, a.headroom, a.unit) for a in after],
                           dtype=object).reshape(-1, 3)
    cells_before = np.array([rule_cells(b.limit, b.actual, b.headroom, b.unit) for b in before],
                            dtype=object).reshape(-1, 3)
    text = {"after": np.array([status_word(a.status) for a in after], dtype=object),
            "before": np.array([status_word(b.status) for b in before], dtype=object),
            "rule": np.array([f"{x.rule} (largest: {x.after.worst_group})" if x.after.per else x.rule for x in c],
                             dtype=object),
            "limit": cells_after[:, 0], "actual_before": cells_before[:, 1], "actual_after": cells_after[:, 1],
            "headroom": cells_after[:, 2],
            "new": np.array(["NEW BREACH" if x.new_breach else "" for x in c], dtype=object),
            "cause": np.array([", ".join(f"{t.action} {t.id}" for t in x.caused_by) for x in c], dtype=object)}
    sort = dict(text)
    sort["after"] = np.array([STATUS_ORDER[a.status] for a in after], dtype=np.float64)
    sort["before"] = np.array([STATUS_ORDER[b.status] for b in before], dtype=np.float64)
    style = np.array([ROW_STYLE[a.status] for a in after], dtype=object)
    return Frame(COLUMNS, text, sort, row_style=style)


def _text(value: str) -> str:
    return escape(safe_terminal(value))


def trade_lines(whatif) -> list[str]:
    """Each trade as it settles (``TradeWhatIf.settlement``, shown as computed): clean price, yield,
    accrued, cost or proceeds, a sale's realized gain against amortized cost, and the account paying
    or credited with its balance before and after; a buy the account cannot pay is said to be short."""
    lines = []
    for t in whatif.settlement.trades:
        sale = t.action == "sell"
        money = (f"proceeds {fmt.money(t.amount, 2)}   realized gain {fmt.money(t.realized_gain, 2, sign=True)} "
                 f"against amortized cost {fmt.money(t.book_value, 2)}" if sale else f"cost {fmt.money(-t.amount, 2)}")
        cash = ("new money (the cash account does not move)" if t.cash_before != t.cash_before else
                f"{_text(t.account)} {fmt.money(t.cash_before, 2)} -> {fmt.money(t.cash_after, 2)}")
        lines.append(f"{t.action.capitalize()} {fmt.money(t.face)} {_text(t.id)}, settling {t.settle_date}: clean "
                     f"price {fmt.number(t.price, 4)}   yield {fmt.number(t.ytm, 3, 100.0)}%   accrued "
                     f"{fmt.money(t.accrued, 2)}   {money}")
        lines.append(f"  Cash: {cash}" + (f"   SHORT by {fmt.money(t.shortfall, 2)}: it cannot be booked"
                                           if t.shortfall > 0 else ""))
    return lines


def breach_words(check) -> str:
    """The rules a trade newly breaks, in words: id, rule text, limit and the actual after."""
    lines = []
    for c in check.new_breaches:
        a = c.after
        limit, actual, _ = rule_cells(a.limit, a.actual, a.headroom, a.unit)
        lines.append(f"- {c.rule}: {a.text} (limit {limit}; after the trade {actual})")
    return "\n".join(lines)


def field_of(problem) -> str | None:
    """The form field a ticket problem is about (its column of ticket.csv), or None."""
    names = list(FILE_COLUMNS) + ["action", *SETTLEMENT]
    if 1 <= problem.column <= len(names):
        return names[problem.column - 1]
    return None


def risk_text(whatif) -> str:
    b, a = whatif.before.totals, whatif.after.totals
    width = max(len(name) for name, *_ in RISK)
    lines = [f"{'Risk'.ljust(width)}  {'before':>16}  {'after':>16}  {'change':>14}"]
    for name, attr, digits, scale in RISK:
        x, y = getattr(b, attr), getattr(a, attr)
        lines.append(f"{name.ljust(width)}  {fmt.number(x, digits, scale):>16}  {fmt.number(y, digits, scale):>16}  "
                     f"{fmt.number(y - x, digits, scale, sign=True):>14}")
    return "\n".join(lines)


class TradeView(View):
    TITLE = "Trade ticket"
    SHORT = "Ticket"
    NEEDS = ("valuation",)
    BINDINGS = [
        Binding("ctrl+g", "check_ticket", "Check trade", id="trade.check",
                tooltip="The trade's economics, every rule and the risk before and after (as ctrl+g builds in the Builder)"),
        Binding("ctrl+b", "commit", "Book trade", id="trade.commit",
                tooltip="Apply the checked trade to the book (asks first; as ctrl+b in the Builder; save with ctrl+s)"),
        Binding("f", "form", "Form", id="trade.form", tooltip="Go to the form (to the field in error after a failed check)"),
        Binding("escape", "leave_form", "Leave form / stop", id="trade.leave",
                tooltip="Stop a running check, else leave the form for the results table"),
    ]

    class TradeBooked(Message):
        def __init__(self, trades, label: str) -> None:
            super().__init__()
            self.trades, self.label = trades, label

    def compose(self) -> ComposeResult:
        yield Notice(id="trade-notice")
        with Horizontal(classes="split"):
            with VerticalScroll(id="ticket-form"):
                with Grid(id="ticket-grid"):
                    yield Label("Action")
                    yield Select([("buy", "buy"), ("sell", "sell")], value="buy", allow_blank=False,
                                 id="ticket-action", compact=True)
                    for name in BUY_FIELDS:
                        yield Label(LABELS[name], classes="ticket-label", id=f"label-{name}")
                        if name in CHOICES:
                            yield Select([(c, c) for c in CHOICES[name]], id=f"ticket-{name}", compact=True,
                                         prompt="(by sector)" if name == "kind" else "choose")
                        else:
                            yield Input(id=f"ticket-{name}", compact=True)
                with Horizontal(classes="buttons"):
                    yield Button("Check ^g", id="ticket-check", variant="primary", compact=True)
                    yield Button("Book ^b", id="ticket-commit", compact=True)
                yield Static("f goes to the form, Tab moves between fields, Esc leaves the form.",
                             classes="hint")
            with Vertical(id="ticket-result"):
                yield Static("Fill in a trade and press ctrl+g: the trade's price, cost and cash, every rule and the "
                             "risk before and after appear here before anything is booked.", id="ticket-status",
                             classes="totals")
                yield FrameTable(id="ticket-table")
                yield Static(id="ticket-risk", classes="pairs secondary")

    def on_mount(self) -> None:
        self.whatif = None
        self._ticket: Ticket | None = None
        self._asked = 0
        self._wrong: str | None = None      # the field of a failed check's first problem
        self._show_fields("buy")

    def refresh_view(self, results: Results) -> None:
        self.show_state(results, "valuation")
        if self.whatif is not None and self.whatif.before is not results.valuation:
            self._clear("The book changed: check the trade again (ctrl+g).")

    def _clear(self, message: str) -> None:
        self.whatif = None
        self.query_one("#ticket-status", Static).update(message)
        self.query_one("#ticket-table", FrameTable).show(Frame.empty())
        self.query_one("#ticket-risk", Static).update("")
        self.refresh_bindings()

    # ---- form ----------------------------------------------------------------------------------
    def ticket(self) -> Ticket:
        action = self.query_one("#ticket-action", Select).value
        fields = {}
        for name in BUY_FIELDS if action == "buy" else SELL_FIELDS:
            widget = self.query_one(f"#ticket-{name}")
            blank = widget.is_blank() if isinstance(widget, Select) else not widget.value
            fields[name] = "" if blank else str(widget.value)
        return Ticket(str(action), fields)

    def fill(self, action: str, **fields: str) -> None:
        """Put a trade on the form (e.g. a sell of a holding chosen elsewhere)."""
        self.query_one("#ticket-action", Select).value = action
        for name, value in fields.items():
            widget = self.query_one(f"#ticket-{name}")
            widget.value = value
        self._show_fields(action)
        self._wrong = None
        self._mark_wrong(set())
        self._clear("Press ctrl+g to check this trade.")

    def _show_fields(self, action: str) -> None:
        wanted = BUY_FIELDS if action == "buy" else SELL_FIELDS
        for name in BUY_FIELDS:
            self.query_one(f"#ticket-{name}").display = name in wanted
            self.query_one(f"#label-{name}").display = name in wanted
        self.query_one("#label-face", Label).update("Face to sell" if action == "sell" else LABELS["face"])

    def on_select_changed(self, event: Select.Changed) -> None:
        if event.select.id == "ticket-action":
            self._show_fields(str(event.value))
        self._changed()

    def on_input_changed(self, event: Input.Changed) -> None:
        self._changed()

    def _changed(self) -> None:
        """A field changed: a shown what-if no longer describes the form (unless it is back as checked)."""
        if self.whatif is not None and self.ticket() != self._ticket:
            self._clear("Changed: press ctrl+g to check.")

    def on_button_pressed(self, event: Button.Pressed) -> None:
        if event.button.id == "ticket-check":
            self.action_check_ticket()
        elif event.button.id == "ticket-commit":
            self.action_commit()

    # ---- checking ------------------------------------------------------------------------------
    def check_action(self, action: str, parameters) -> bool | None:
        if action == "leave_form":    # otherwise Esc goes on to the app (stop the figures)
            return self.has_class("-computing") or self.query_one("#ticket-form").has_focus_within
        if action == "commit":
            return self.whatif is not None or None
        if action == "check_ticket":
            return (self.results is not None and self.results.valuation is not None) or None
        return True

    def action_form(self) -> None:
        self.set_class(False, "-folded")
        self.query_one(f"#ticket-{self._wrong}" if self._wrong else "#ticket-action").focus()

    def _mark_wrong(self, fields: set[str]) -> None:
        for name in BUY_FIELDS:
            self.query_one(f"#ticket-{name}").set_class(name in fields, "-invalid")

    def action_leave_form(self) -> None:
        if self.has_class("-computing"):     # drop the running check (its thread finishes, ignored)
            self.workers.cancel_group(self, "ticket")
            self._asked += 1
            self.set_class(False, "-computing")
            self.query_one("#ticket-status", Static).update("Stopped: ctrl+g checks again.")
        self.query_one("#ticket-table", FrameTable).focus()

    def action_check_ticket(self) -> None:
        if self.results is None or self.results.valuation is None:
            return
        self._asked += 1
        self._ticket = self.ticket()
        self.query_one("#ticket-status", Static).update("Checking the trade against every rule…")
        self.set_class(True, "-computing")
        self.run_check(self._asked, self.results.book, self._ticket, self.results.valuation)

    @work(thread=True, exclusive=True, exit_on_error=False, group="ticket")
    def run_check(self, asked: int, book, ticket: Ticket, valuation) -> None:
        from ladder.tui.tasks import describe

        from ladder.errors import InputError

        problems = ()
        try:
            result, error = check_ticket(book, ticket, valuation), None
        except Exception as problem:   # shown on the ticket, never a crash
            result, error = None, describe(problem)
            problems = tuple(problem.problems) if isinstance(problem, InputError) else ()
        if not get_current_worker().is_cancelled:
            self.post_message(self.Checked(asked, result, error, problems))

    class Checked(Message):
        def __init__(self, asked: int, whatif, error: str | None, problems=()) -> None:
            super().__init__()
            self.asked, self.whatif, self.error, self.problems = asked, whatif, error, problems

    def on_trade_view_checked(self, message: "TradeView.Checked") -> None:
        if message.asked != self._asked:
            return   # an older ticket
        self.set_class(False, "-computing")
        status = self.query_one("#ticket-status", Static)
        if message.error is not None:
            self._failed(message.error, message.problems)
            return
        w = message.whatif
        self.whatif = w
        self._wrong = None
        self._mark_wrong(set())
        new = w.check.new_breaches
        words = (f"BREACH: this trade breaks {len(new)} rule(s): " + ", ".join(c.rule for c in new)) if new else \
            "no new breach"
        status.update("\n".join(trade_lines(w)) + f"\nPolicy before: {status_word(w.check.before.status)}   "
                      f"after: {status_word(w.check.status)}   {words}")
        status.set_class(bool(new) or bool(w.settlement.shortfalls), "-breach")
        self.set_class(True, "-folded")      # short screens fold the form under a result (f shows it)
        table = self.query_one("#ticket-table", FrameTable)
        table.show(changes_frame(w.check), keep_place=False)
        table.sort_by("after")
        table.focus()
        self.query_one("#ticket-risk", Static).update(risk_text(w))
        self.refresh_bindings()

    def _failed(self, error: str, problems) -> None:
        """A check that found problems: each named by the form's field, the focus on the first field
        in error (the form unfolded), nothing else changed."""
        self._clear("")
        lines, wrong = [], []
        for problem in problems:
            name = field_of(problem)
            shown = name if name in LABELS and self.query_one(f"#ticket-{name}").display else None
            if shown:
                wrong.append(shown)
            lines.append(f"{LABELS[shown]}: {problem.message}" if shown else f"Ticket: {problem.message}")
        lines = lines or error.splitlines()
        status = self.query_one("#ticket-status", Static)
        status.update("The ticket cannot be checked:\n" + "\n".join(_text(x) for x in lines))
        status.set_class(True, "-breach")
        self._wrong = wrong[0] if wrong else None
        self._mark_wrong(set(wrong))
        self.set_class(False, "-folded")
        if self._wrong:
            self.query_one(f"#ticket-{self._wrong}").focus()

    def action_commit(self) -> None:
        if self.whatif is None:
            return
        from ladder.tui.screens import BreachScreen, ConfirmScreen

        w = self.whatif
        label = self._ticket.label()

        def answered(yes: bool | None) -> None:
            if yes and self.whatif is w:
                self.post_message(self.TradeBooked(booked_trades(w), label))
                self._clear(f"Booked: {label}. Save the book with ctrl+s.")
                self.query_one("#ticket-table", FrameTable).focus()

        trade = "\n".join(trade_lines(w))
        if w.check.new_breaches:
            self.app.push_screen(BreachScreen(f"Book this trade?\n{trade}\nIt BREAKS the policy:\n"
                                              f"{breach_words(w.check)}"), answered)
            return
        self.app.push_screen(ConfirmScreen(f"Book this trade?\n{trade}\nThe book changes on screen; ctrl+s "
                                           "writes it to the holdings file.", default_no=True), answered)
