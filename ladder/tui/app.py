"""The workstation app: holds the Book, recomputes through the façade in a worker, shows the views.

``make_app(book)`` is the one way to build it (the command line and the tests share it). The app
owns the state: the current Book (with edits), the curve in the book's file, what is unsaved, and
the latest ``Results``; views get ``results`` set on them and post messages for changes.
"""

from __future__ import annotations

import asyncio
import dataclasses
import time

from rich.markup import escape
from textual import work
from textual.app import App, ComposeResult, SystemCommand
from textual.binding import Binding
from textual.containers import Horizontal
from textual.message import Message
from textual.widgets import ContentSwitcher, Static
from textual.worker import get_current_worker

from ladder import CAUTION
from ladder.errors import FileFault, describe_os_error
from ladder.neutralize import safe_terminal
from ladder.folder.book_file import Book
from ladder.tui import tasks
from ladder.tui.executor import DaemonExecutor
from ladder.tui.results import TASKS, Results
from ladder.tui.screens import DetailScreen, QuitScreen
from ladder.tui.theme import THEMES
from ladder.tui.views.base import View
from ladder.tui.widgets.footer import KeyFooter
from ladder.tui.views.builder import BuilderView
from ladder.tui.views.cash import CashView
from ladder.tui.views.cash_plan import CashPlanView
from ladder.tui.views.curve import CurveView
from ladder.tui.views.history import HistoryView
from ladder.tui.views.holdings import HoldingsView
from ladder.tui.views.ladder_view import LadderView
from ladder.tui.views.policy import PolicyView
from ladder.tui.views.rates import RatesView
from ladder.tui.views.trade import TradeView

# (view id, key, class); the order is the order of the view bar and the footer.
VIEWS: tuple[tuple[str, str, type[View]], ...] = (
    ("holdings", "h", HoldingsView),
    ("ladder", "l", LadderView),
    ("policy", "p", PolicyView),
    ("rates", "r", RatesView),
    ("plan", "c", CashPlanView),
    ("cash", "a", CashView),
    ("history", "m", HistoryView),
    ("builder", "b", BuilderView),
    ("curve", "y", CurveView),
    ("trade", "t", TradeView),
)


VIEW_KEYS = Binding.Group("Views", compact=True)
WIDE = 120     # columns: below it side-by-side panes stack and the view bar uses short names
COMPACT = 100  # columns: below it the view bar's entries are one space apart
TALL = 30      # rows: below it charts and secondary panes fold away (g shows them)
# Palette verbs (the command-line names): what each finds, and the view that shows it.
VERBS = (("value", "holdings", "market value, yields, durations of every holding"),
         ("check", "policy", "every policy rule against the book"),
         ("shock", "rates", "the book under rate scenarios"),
         ("cash", "cash", "the cash account's balance and statement"),     # before plan: "cash" finds it first
         ("plan", "plan", "cash against needs, period by period"),
         ("build", "builder", "a ladder designed for new cash"),
         ("risk", "rates", "credit scenarios and spread durations beside the rate scenarios"))


class Computed(Message):
    """A task's result (or error text) for the book of ``generation``."""

    def __init__(self, generation: int, task: str, result=None, error: str | None = None) -> None:
        super().__init__()
        self.generation, self.task, self.result, self.error = generation, task, result, error


class LadderApp(App[None]):
    CSS_PATH = "ladder.tcss"
    TITLE = "ladder"
    HORIZONTAL_BREAKPOINTS = [(0, "-narrow"), (WIDE, "-wide")]
    VERTICAL_BREAKPOINTS = [(0, "-short"), (TALL, "-tall")]
    BINDINGS = [
        *[Binding(key, f"show_view('{name}')", cls.TITLE, id=f"view.{name}", tooltip=f"Show the {cls.TITLE} view",
                  group=VIEW_KEYS) for name, key, cls in VIEWS],
        Binding("question_mark", "keys", "Keys", id="app.keys",
                tooltip="Show or hide every key of this screen and the caution in full"),
        Binding("g", "more", "Charts", id="app.more",
                tooltip="Show or fold the charts and side panes (folded on screens under 30 rows)"),
        Binding("ctrl+s", "save", "Save", id="app.save",
                tooltip="Write changes to the book (one transaction; the previous files kept as a version)"),
        Binding("escape", "stop", "Stop", id="app.stop",
                tooltip="Stop the running computation; the previous figures stay, dimmed (ctrl+r computes again)"),
        Binding("ctrl+r", "recompute", "Recompute", id="app.recompute", show=False,
                tooltip="Value the book again and refresh every view"),
        Binding("q", "quit", "Quit", id="app.quit", tooltip="Quit (asks first when there are unsaved changes)"),
    ]

    def __init__(self, book: Book) -> None:
        super().__init__()
        from ladder.analysis.booking import loaded_state

        self.book = book
        self.original_curve = book.curve
        self.loaded = loaded_state(book)     # the files' hashes at load: a save refuses if they changed
        self.pending: list = []              # trades booked here and not yet saved (Pending), in order
        self.pending_journal: list = []      # their journal lines, written with the holdings
        self.unsaved: dict[str, str] = {}
        self.results = Results(0, book)
        self.options = tasks.Options()
        self.started_at = time.monotonic()    # when the running computation began

    # ---- layout --------------------------------------------------------------------------------
    def compose(self) -> ComposeResult:
        with Horizontal(id="top-line"):
            yield Static("UNSAVED", id="unsaved-badge")
            yield Static(id="book-line")
        yield Static(id="view-bar")
        with ContentSwitcher(initial=VIEWS[0][0], id="views"):
            for name, _, cls in VIEWS:
                yield cls(id=name)
        yield Static(CAUTION, id="caution", classes="caution")
        yield KeyFooter(hidden_groups=(VIEW_KEYS.description,))

    def on_mount(self) -> None:
        asyncio.get_running_loop().set_default_executor(DaemonExecutor())
        for theme in THEMES:
            self.register_theme(theme)
        self.theme = THEMES[0].name
        self.recompute()
        self._show_bar()
        self.set_interval(0.5, self._tick)
        self.current_view.query_one("FrameTable").focus()

    @property
    def current_view(self) -> View:
        switcher = self.query_one("#views", ContentSwitcher)
        return self.query_one(f"#{switcher.current}", View)

    def _show_bar(self) -> None:
        current = self.query_one("#views", ContentSwitcher).current
        wide = self.size.width >= WIDE
        pad = " " if self.size.width >= COMPACT else ""      # under COMPACT columns the entries close up
        parts = []
        for name, key, cls in VIEWS:
            label = f"[b]{key}[/b] {cls.TITLE if wide else cls.SHORT}"
            parts.append(f"[reverse]{pad}{label}{pad}[/reverse]" if name == current else f"{pad}{label}{pad}")
        self.query_one("#view-bar", Static).update(("" if pad else " ").join(parts))
        r = self.results
        book = self.book
        state = []
        if r.pending:
            running = next(t for t in TASKS if t in r.pending)
            done = len(TASKS) - len(r.pending)
            state.append(f"computing {running} ({done + 1} of {len(TASKS)}), "
                         f"{time.monotonic() - self.started_at:.1f} s, Esc stops")
        elif r.stopped:
            state.append("stopped: " + ", ".join(t for t in TASKS if t in r.stopped) + " (ctrl+r computes again)")
        if r.errors:
            state.append("not available: " + ", ".join(sorted(r.errors)))
        line = [escape(safe_terminal(book.name)), f"valued {book.valuation_date}", book.currency]
        line += [] if state else ["figures current"]
        changes = ["changes: " + "; ".join(self.unsaved.values()) + " (ctrl+s saves)"] if self.unsaved else []
        folder = [escape(safe_terminal(book.folder))] if wide else []
        bar = self.query_one("#book-line", Static)
        bar.update("  ·  ".join(state + line + changes + folder))
        self.query_one("#unsaved-badge").display = bool(self.unsaved)
        bar.set_class(bool(r.pending), "-computing")

    def _tick(self) -> None:
        """Keep the elapsed time of a running computation current on the top line."""
        if self.results.pending:
            self._show_bar()

    def on_resize(self) -> None:
        self._show_bar()
        self.refresh_bindings()

    # ---- computing -----------------------------------------------------------------------------
    def recompute(self) -> None:
        """Start every task for the current book; results of earlier books are dropped on arrival."""
        self.options = dataclasses.replace(self.options, unsaved_journal=tuple(self.pending_journal))
        self.results = self.results.next_book(self.book).started(TASKS)
        self.started_at = time.monotonic()
        self._hand_down()
        self.compute(self.results.generation, self.book, self.options)

    def recompute_task(self, task: str) -> None:
        """Run one task again for the same book (after a change of options); others stay."""
        if self.results.pending:
            self.recompute()      # a full run is under way: start it again with the new options
            return
        self.options = dataclasses.replace(self.options, unsaved_journal=tuple(self.pending_journal))
        self.results = self.results.started([task])
        self.started_at = time.monotonic()
        self._hand_down()
        self.compute(self.results.generation, self.book, self.options, (task,), self.results)

    @work(thread=True, exclusive=True, exit_on_error=False, group="figures")
    def compute(self, generation: int, book: Book, options: tasks.Options, only: tuple[str, ...] = TASKS,
                done: Results | None = None) -> None:
        """Run the façade tasks ``only`` in order (valuation first), posting each result as it lands;
        ``done`` holds the results already known for this generation."""
        worker = get_current_worker()
        done = done or Results(generation, book)
        for task in only:
            if worker.is_cancelled:
                return
            missing = [need for need in tasks.DEPENDS[task] if done.get(need) is None]
            if missing:
                message = f"needs {', '.join(missing)}"
                done = done.landed(task, error=message)
                self.post_message(Computed(generation, task, error=message))
                continue
            try:
                result = tasks.RUNNERS[task](book, done, options)
            except tasks.Unavailable as error:
                done = done.landed(task, error=str(error))
                self.post_message(Computed(generation, task, error=str(error)))
                continue
            except Exception as error:  # every failure is shown in the view, never a crash
                done = done.landed(task, error=tasks.describe(error))
                self.post_message(Computed(generation, task, error=tasks.describe(error)))
                continue
            done = done.landed(task, result)
            if not worker.is_cancelled:
                self.post_message(Computed(generation, task, result))

    def on_computed(self, message: Computed) -> None:
        if message.generation != self.results.generation:
            return   # stale: the book changed since this task started
        self.results = self.results.landed(message.task, message.result, message.error)
        self._hand_down()

    def _hand_down(self) -> None:
        for view in self.query(View):
            view.results = self.results
        self._show_bar()
        self.refresh_bindings()

    def change_book(self, book: Book, what: str, description: str) -> None:
        """Take an edited book (``what``: "holdings" or "curve") and recompute every view."""
        self.book = book
        if what == "curve" and book.curve is self.original_curve:
            self.unsaved.pop("curve", None)
        else:
            self.unsaved[what] = description
        self.recompute()

    # ---- messages from views -------------------------------------------------------------------
    def on_curve_view_curve_edited(self, message: CurveView.CurveEdited) -> None:
        par = message.par_curve
        if par is not self.original_curve and (par.par_yields == self.original_curve.par_yields).all():
            par = self.original_curve
        self.change_book(dataclasses.replace(self.book, curve=par), "curve", "par yields edited")

    def on_rates_view_scenario_wanted(self, message: RatesView.ScenarioWanted) -> None:
        extra = self.options.extra_scenarios + (message.scenario,)
        self.options = dataclasses.replace(self.options, extra_scenarios=extra)
        self.recompute_task("shock")

    def on_trade_view_trade_booked(self, message: TradeView.TradeBooked) -> None:
        from ladder.analysis.booking import Pending
        from ladder.analysis.settlement import settle_trades

        reason = f"trade ticket: {message.label}"
        settled = settle_trades(self.book, message.trades, reason)
        if settled.shortfalls:
            t = settled.shortfalls[0]
            self.notify(f"{t.account} is short by {t.shortfall:,.2f}; fund the trade or deposit first",
                        title="Not booked", severity="error")
            return
        self.pending.append(Pending(message.trades, reason))
        self.pending_journal.extend(settled.entries)
        self.change_book(self.book.with_holdings(settled.holdings), "holdings", self._holdings_change(message.label))

    def _holdings_change(self, label: str) -> str:
        previous = self.unsaved.get("holdings")
        return f"{previous}; {label}" if previous else f"holdings: {label}"

    def on_cash_plan_view_scenario_wanted(self, message: CashPlanView.ScenarioWanted) -> None:
        self.options = dataclasses.replace(self.options, plan_scenario=message.name, plan_bp=message.bp)
        self.recompute_task("plan")

    def on_builder_view_accepted(self, message: BuilderView.Accepted) -> None:
        from ladder.analysis.build import apply_build
        from ladder.tui.tasks import describe

        try:
            book = apply_build(self.book, message.result)
        except Exception as error:   # an InputError explains why it cannot be applied
            self.notify(describe(error), title="Not applied", severity="error")
            return
        from ladder.analysis.booking import Pending, trade_entries

        reason = f"ladder builder: {message.result.invested:,.2f} invested"
        self.pending.append(Pending(message.result.trades, reason))
        self.pending_journal.extend(trade_entries(self.book, message.result.trades, reason))
        self.change_book(book, "holdings", self._holdings_change(f"builder: {len(message.result.trades)} trade(s)"))

    def on_holdings_view_sell_wanted(self, message: HoldingsView.SellWanted) -> None:
        h = self.book.holdings
        self.action_show_view("trade")
        self.query_one("#trade", TradeView).fill("sell", id=str(h.id[message.row]), face=f"{h.face[message.row]:.2f}")

    def on_holdings_view_detail_wanted(self, message: HoldingsView.DetailWanted) -> None:
        from ladder.tui.holding_detail import detail

        v = self.results.valuation
        if v is not None:
            self.push_screen(DetailScreen(detail(v, message.row), self.book.currency))

    # ---- actions -------------------------------------------------------------------------------
    def action_show_view(self, name: str) -> None:
        switcher = self.query_one("#views", ContentSwitcher)
        switcher.current = name
        view = self.current_view
        view.catch_up()
        self._show_bar()
        # A table first: single-letter view keys keep working; forms are one key (f) or Tab away.
        for widget in view.query("FrameTable"):
            if widget.display and widget.focusable:
                widget.focus()
                break

    def action_keys(self) -> None:
        showing = bool(self.screen.query("HelpPanel"))
        if showing:
            self.action_hide_help_panel()
        else:
            self.action_show_help_panel()
        self.query_one("#caution").set_class(not showing, "-full")

    def action_more(self) -> None:
        self.screen.toggle_class("-more")

    def action_report(self) -> None:
        self.action_show_view("history")
        self.notify("The month-end report is written by the command line: ladder report BOOK_FOLDER "
                    "(html by default; --format all for every format).", title="report", timeout=10)

    def action_stop(self) -> None:
        """Esc: cancel the running figures; the task running finishes in its thread and is dropped."""
        if self.results.pending:
            self.workers.cancel_group(self, "figures")
            self.results = self.results.stop()
            self._hand_down()

    def action_recompute(self) -> None:
        self.recompute()

    def check_action(self, action: str, parameters) -> bool | None:
        if action == "stop":
            return bool(self.results.pending)
        if action == "save":
            return bool(self.unsaved) or None
        if action == "more":
            return self.screen.has_class("-short") or None
        return True

    def action_save(self) -> None:
        if self.unsaved:
            self.save()

    def save(self) -> bool:
        """Write the unsaved parts of the book as one transaction (the previous files kept as a
        version). Refused when the files changed on disk since they were loaded: then a dialog offers
        to reload the book and re-apply the pending trades. Returns whether it was saved."""
        from ladder.analysis.booking import BookChanged, loaded_state, save_edits
        from ladder.errors import InputError
        from ladder.tui.screens import ConfirmScreen
        from ladder.tui.tasks import describe

        try:
            done = save_edits(self.book, self.loaded, self.pending_journal, "holdings" in self.unsaved,
                              "curve" in self.unsaved)
        except BookChanged as changed:
            trades = sum(len(p.trades) for p in self.pending)
            self.push_screen(ConfirmScreen(
                f"Not saved: {', '.join(changed.files)} changed on disk since the book was loaded (another "
                f"program wrote to the book).\nReload the book from disk and re-apply your {trades} pending "
                "trade(s)" + (" and the edited curve" if "curve" in self.unsaved else "") + "? They are checked "
                "again; nothing is written until you save."),
                lambda yes: self.reload() if yes else None)
            return False
        except (OSError, InputError, FileFault) as error:   # another writer, a read-only file, a full disk
            text = describe(error) if isinstance(error, InputError) else (
                describe_os_error(error) if isinstance(error, OSError) else str(error))
            self.notify(f"{text}. Nothing is lost: the changes stay unsaved.", title="Not saved", severity="error")
            return False
        self.pending.clear()
        self.pending_journal.clear()
        self.original_curve = self.book.curve
        self.loaded = loaded_state(self.book)
        self.unsaved.clear()
        self.recompute_task("cash")           # the statement's lines are saved now
        self._show_bar()
        self.refresh_bindings()
        kept = f" (previous kept as version {done.version})" if done.version else ""
        self.notify("Saved " + ", ".join(p.name for p in done.files) + kept, title="Saved")
        return True

    def reload(self) -> None:
        """Read the book from disk again and re-apply the pending trades (and the edited curve) to it;
        trades that no longer apply (a sale of a holding rolled off meanwhile, ...) are dropped, said."""
        from ladder.analysis.booking import loaded_state, reapply
        from ladder.folder.book_file import load_book
        from ladder.tui.tasks import describe

        try:
            book = load_book(self.book.folder)
        except Exception as error:   # an InputError lists what is wrong with the files on disk
            self.notify(describe(error), title="Not reloaded", severity="error")
            return
        loaded = loaded_state(book)
        if "curve" in self.unsaved:
            self.original_curve = book.curve
            book = dataclasses.replace(book, curve=self.book.curve)
        self.book, self.pending, self.pending_journal, dropped = reapply(book, self.pending)
        self.loaded = loaded
        if not self.pending:
            self.unsaved.pop("holdings", None)
        if dropped:
            self.notify("Dropped: " + "; ".join(dropped), title="Pending trades no longer apply", severity="warning")
        self.notify("Reloaded from disk" + (f"; {len(self.pending)} pending booking(s) re-applied" if self.pending
                                             else ""), title="Reloaded")
        self.recompute()

    async def action_quit(self) -> None:
        if not self.unsaved:
            self.exit()
            return

        def answered(choice: str | None) -> None:
            if choice == "save":
                if self.save():     # a failed save keeps the workstation open with the changes
                    self.exit()
            elif choice == "discard":
                self.exit()

        self.push_screen(QuitScreen(list(self.unsaved.values())), answered)

    def get_system_commands(self, screen):
        titles = {name: cls.TITLE for name, _, cls in VIEWS}
        for verb, view, what in VERBS:
            yield SystemCommand(f"{verb}: {what} ({titles[view]} view)", f"Open the {titles[view]} view",
                                lambda view=view: self.action_show_view(view))
        yield SystemCommand("report: the month-ends ladder report recorded (History view)",
                            "Open the History view and say which command writes the month-end report",
                            self.action_report)
        for name, key, cls in VIEWS:
            yield SystemCommand(f"Show {cls.TITLE}", f"Switch to the {cls.TITLE} view (key {key})",
                                lambda name=name: self.action_show_view(name))
        if self.unsaved:
            yield SystemCommand("Save changes", "Write the edited holdings and curve to the book",
                                self.action_save)
        yield SystemCommand("Recompute", "Value the book again and refresh every view", self.recompute)
        for theme in THEMES:
            yield SystemCommand(f"Theme: {theme.name}", "Use this colour theme",
                                lambda name=theme.name: setattr(self, "theme", name))
        # Textual's own theme chooser offers palettes that are not ours: left out.
        yield from (c for c in super().get_system_commands(screen) if c.title != "Theme")


def make_app(book) -> LadderApp:
    """The workstation on ``book`` (a Book, or a folder path read with ``load_book``)."""
    if not isinstance(book, Book):
        from ladder.folder.book_file import load_book

        book = load_book(book)
    return LadderApp(book)
