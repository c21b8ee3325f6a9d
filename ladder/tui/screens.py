"""Screens over the views: a holding's detail, the quit question, a yes/no confirmation."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, DataTable, Input, Label, Static

from ladder import CAUTION
from ladder.tui import format as fmt
from ladder.tui.holding_detail import Detail
from ladder.tui.widgets.chart import Chart, y_ticks


def pairs_text(pairs) -> str:
    width = max((len(k) for k, _ in pairs), default=0)
    return "\n".join(f"{k.ljust(width)}  {v}" for k, v in pairs)


class DetailScreen(ModalScreen[None]):
    """One holding: terms, figures, cash-flow schedule, price against yield (and calls)."""

    BINDINGS = [Binding("escape", "dismiss", "Back", id="detail.back"),
                Binding("q", "dismiss", "Back", id="detail.back_q", show=False),
                Binding("g", "app.more", "Charts", id="detail.charts",
                        tooltip="Show or fold the charts (folded on screens under 30 rows)")]

    def __init__(self, detail: Detail, currency: str) -> None:
        super().__init__(classes="detail-screen")
        self.detail, self.currency = detail, currency

    def compose(self) -> ComposeResult:
        d = self.detail
        with Vertical(id="detail"):
            yield Label(f"{d.id} (Esc to go back): terms, cash flows and price against yield", classes="title")
            with Horizontal(id="detail-top"):
                yield Static(pairs_text(d.terms), id="detail-terms", classes="pairs")
                yield Static(pairs_text(d.figures), id="detail-figures", classes="pairs")
                if d.calls:
                    calls = [("Call date", "Call price")] + list(d.calls)
                    yield Static(pairs_text(d.call_figures) + "\n\n" + pairs_text(calls), id="detail-calls",
                                 classes="pairs")
            with Horizontal(id="detail-bottom"):
                yield DataTable(id="detail-flows", cursor_type="row", zebra_stripes=True)
                if d.price_yield is not None:
                    with Vertical(id="detail-charts", classes="secondary"):
                        yield Chart(id="detail-chart")
                        yield Chart(id="detail-error-chart")
                else:
                    yield Static("No price/yield chart: a fund's price does not move with rates.", id="detail-chart")
            yield Static(CAUTION, classes="caution")

    def on_mount(self) -> None:
        d = self.detail
        table = self.query_one("#detail-flows", DataTable)
        table.add_columns("Date", "Paid on", "Coupon /100", "Principal /100", f"Amount {self.currency}")
        f = d.flows
        for row in zip(fmt.texts(f.dates), fmt.texts(f.pay_dates), fmt.numbers(f.coupon, 4),
                       fmt.numbers(f.principal, 4), fmt.numbers(f.money, 2)):
            table.add_row(*row)
        table.focus()
        if d.price_yield is not None:
            py = d.price_yield
            x = (py.yields * 100).tolist()

            def paint(plt, series) -> None:
                plt.plot(x, py.exact.tolist(), label="exact", **series.line(0))
                plt.plot(x, py.duration.tolist(), label="duration", **series.line(1))
                plt.plot(x, py.convexity.tolist(), label="duration + convexity", **series.line(2))
                y_ticks(plt, float(min(py.exact.min(), py.duration.min(), py.convexity.min())),
                        float(max(py.exact.max(), py.duration.max(), py.convexity.max())))
                plt.title("Dirty price per 100 against yield (%)")

            def errors(plt, series) -> None:
                plt.plot(x, (py.duration - py.exact).tolist(), label="duration - exact", **series.line(1))
                plt.plot(x, (py.convexity - py.exact).tolist(), label="duration + convexity - exact",
                         **series.line(2))
                y_ticks(plt, float(min((py.duration - py.exact).min(), (py.convexity - py.exact).min())),
                        float(max((py.duration - py.exact).max(), (py.convexity - py.exact).max())))
                plt.title("Estimation error per 100 against yield (%)")

            self.query_one("#detail-chart", Chart).draw(paint)
            self.query_one("#detail-error-chart", Chart).draw(errors)


class QuitScreen(ModalScreen[str]):
    """Unsaved changes: save and quit, quit without saving, or stay."""

    BINDINGS = [Binding("escape", "stay", "Stay", id="quit.stay"),
                Binding("s", "choose('save')", "Save and quit", id="quit.save"),
                Binding("d", "choose('discard')", "Quit without saving", id="quit.discard")]

    def __init__(self, changes: list[str]) -> None:
        super().__init__(classes="question-screen")
        self.changes = changes

    def compose(self) -> ComposeResult:
        with Vertical(id="question"):
            yield Label("Unsaved changes: " + "; ".join(self.changes) + ".\nSave them before quitting?",
                        id="question-text")
            with Horizontal(classes="buttons"):
                yield Button("Save and quit (s)", id="save", variant="primary")
                yield Button("Quit without saving (d)", id="discard", variant="error")
                yield Button("Stay (Esc)", id="stay")

    def on_button_pressed(self, event: Button.Pressed) -> None:
        self.dismiss(event.button.id)

    def action_choose(self, choice: str) -> None:
        self.dismiss(choice)

    def action_stay(self) -> None:
        self.dismiss("stay")


class ConfirmScreen(ModalScreen[bool]):
    """A yes/no question (y / n); with ``default_no`` the No button has the focus, so Enter declines."""

    BINDINGS = [Binding("y", "answer(True)", "Yes", id="confirm.yes"),
                Binding("n,escape", "answer(False)", "No", id="confirm.no")]

    def __init__(self, question: str, default_no: bool = False) -> None:
        super().__init__(classes="question-screen")
        self.question, self.default_no = question, default_no

    def on_mount(self) -> None:
        if self.default_no:
            self.query_one("#no", Button).focus()

    def compose(self) -> ComposeResult:
        with Vertical(id="question"):
            yield Label(self.question, id="question-text")
            with Horizontal(classes="buttons"):
                yield Button("Yes (y)", id="yes", variant="primary")
                yield Button("No (n)", id="no")

    def on_button_pressed(self, event: Button.Pressed) -> None:
        self.dismiss(event.button.id == "yes")

    def action_answer(self, answer: bool) -> None:
        self.dismiss(answer)


BREACH_WORD = "breach"


class BreachScreen(ModalScreen[bool]):
    """A booking that breaks the policy: the rules in words, and the trade is booked only when the
    user types the word ``breach`` and Enter; anything else, or Esc, declines (the default)."""

    BINDINGS = [Binding("escape", "answer(False)", "No", id="breach.no")]

    def __init__(self, question: str) -> None:
        super().__init__(classes="question-screen")
        self.question = question

    def compose(self) -> ComposeResult:
        with Vertical(id="question"):
            yield Label(self.question, id="question-text")
            yield Label(f"To book it anyway type {BREACH_WORD} and press Enter; Esc or anything else does not book.",
                        classes="hint")
            yield Input(placeholder=f"type {BREACH_WORD} to book", id="breach-word", compact=True)

    def on_mount(self) -> None:
        self.query_one("#breach-word", Input).focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        event.stop()
        self.dismiss(event.value.strip().lower() == BREACH_WORD)

    def action_answer(self, answer: bool) -> None:
        self.dismiss(answer)
