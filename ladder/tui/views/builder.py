"""Builder: cash, rungs and options in a form; the solve runs in a worker with its progress shown;
the proposed trades with the compliance before and after; accept applies them after a confirmation.
Every figure comes from ``ladder.analysis.build.build_ladder``."""

from __future__ import annotations

import threading

import numpy as np
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Grid, Horizontal, Vertical, VerticalScroll
from textual.message import Message
from textual.widgets import Input, Label, ProgressBar, Select, Static
from textual.worker import get_current_worker

from ladder.analysis.build import GENERIC_NOTE, NOT_FOUND
from ladder.tui import format as fmt
from ladder.tui.frame import Column, Frame
from ladder.tui.results import Results
from ladder.tui.views.base import Notice, View
from ladder.tui.views.policy import status_word
from ladder.tui.views.trade import changes_frame
from ladder.tui.widgets.frame_table import FrameTable

TRADE_COLUMNS = (Column("action", "Action"), Column("maturity", "Maturity"), Column("face", "Face", True),
                 Column("price", "Price", True), Column("yield", "Yield %", True), Column("sector", "Sector", priority=2),
                 Column("id", "Id", max_width=30, priority=2), Column("issuer", "Issuer", max_width=24, priority=3),
                 Column("rating", "Rating", priority=3), Column("coupon", "Coupon %", True, priority=3))
LIMIT_UNITS = {"buys_pct": "% of the purchase", "pct": "% of the portfolio", "years": " years", "days": " days",
               "currency": "", "face": " face"}


def trades_frame(trades, yields, generic) -> Frame:
    """The proposed trades; ``yields`` each trade's yield to worst (decimal, ``BuildResult.trade_yields``),
    ``generic`` marks the generic stand-ins (``BuildResult.generic_trades``)."""
    h = trades.holdings
    rating = np.where(h.rating != "", h.rating, h.short_rating).astype(object)
    yields = np.full(len(h), np.nan) if yields is None else yields
    text = {"action": trades.action,
            "id": np.where(generic, h.id + " (generic)", h.id), "sector": h.sector, "issuer": h.issuer, "rating": rating,
            "maturity": fmt.texts(h.maturity), "coupon": fmt.percents(h.coupon, 3), "face": fmt.numbers(h.face, 0),
            "price": fmt.numbers(h.book_price, 4), "yield": fmt.percents(yields, 3)}
    sort = dict(text)
    sort.update(coupon=h.coupon, face=h.face, price=h.book_price, **{"yield": yields},
                maturity=np.where(np.isnat(h.maturity), np.nan, h.maturity.astype("datetime64[D]").astype(np.float64)))
    return Frame(TRADE_COLUMNS, text, sort, fixed=2)


def binding_sentence(b) -> str:
    """A limit the build presses against, in words with its money: "Rung 4Y-5Y is capped at 30% of the
    purchase; one point more would add 269 a year (0.007 bp of yield)"."""
    unit = LIMIT_UNITS.get(b.unit, f" {b.unit}")
    step = "one point" if b.unit in ("pct", "buys_pct") and b.step == 1 else f"{b.step:,g}{unit}"
    member = b.label
    if member.endswith(" at most"):
        verb, relax, member = "is capped at", f"{step} more", member.removesuffix(" at most")
    elif member.endswith(" at least"):
        verb, relax, member = "must be at least", f"{step} less", member.removesuffix(" at least")
    else:
        verb, relax = "is limited to", f"{step} of room"
    subject = f"Rung {member}" if b.group == "rung shares" else (member or b.text)
    return (f"{subject[0].upper()}{subject[1:]} {verb} {b.limit:,g}{unit}; {relax} would add "
            f"{fmt.money(b.income_per_step)} a year ({b.yield_bp_per_step:.3f} bp of yield).")


def _summary_line(name: str, s) -> str:
    if s is None:
        return f"{name:<7} {fmt.NA_TEXT}"
    shares = "  ".join(f"{k} {v:.1f}%" for k, v in s.rung_shares if v)
    return (f"{name:<7} value {fmt.money(s.market_value):>14}   yield to worst {fmt.percent(s.yield_to_worst)}%   "
            f"eff dur {fmt.number(s.effective_duration, 3)}   WAM {fmt.number(s.wam_days, 0)} d   by rung: {shares}")


def result_text(r) -> str:
    if r.status in NOT_FOUND:
        why = "was stopped" if r.status == "stopped" else "reached its time limit"
        return (f"NO PLAN YET: the search {why} after {r.seconds:.1f} s before it found any ladder. "
                "Build again (ctrl+g) and let it run longer.")
    if r.status != "built":
        lines = ["NO LADDER fits every rule. The smallest relaxation that would admit one:"]
        for c in r.conflicts:
            members = "; ".join(f"{label}: limit {limit:g}, needs {need:g}" for label, limit, need in c.members)
            lines.append(f"  {c.group}: {c.text} ({c.unit}) {members}")
        return "\n".join(lines)
    compliance = status_word(r.compliance_status) if r.compliance_status else fmt.NA_TEXT
    generic = r.generic_trades
    lines = [f"BUILT: {len(r.trades)} trade(s), invested {fmt.money(r.invested)} of {fmt.money(r.cash)}   rungs "
             f"{r.rungs.spec}   policy after: {compliance}   solved in {r.seconds:.2f} s"]
    if r.optimality_note:
        lines.insert(0, f"{r.optimality_note}.")
    if r.naive_yield is not None and r.after is not None:
        lines.append(f"Built {fmt.percent(r.after.yield_to_worst)}% against an even ladder's "
                     f"{fmt.percent(r.naive_yield)}% ({fmt.number(r.gain_over_naive_bp, 1, sign=True)} bp); the even "
                     f"ladder {'meets every rule' if r.naive_feasible else 'breaks a rule'}.")
    lines += [_summary_line("before", r.before), _summary_line("after", r.after)]
    if generic.any():
        lines.append(f"{int(generic.sum())} of the trades are {GENERIC_NOTE}")
    lines += [binding_sentence(b) for b in r.binding[:4]]
    return "\n".join(lines)


class BuilderView(View):
    TITLE = "Builder"
    SHORT = "Build"
    NEEDS = ("valuation",)
    BINDINGS = [
        Binding("ctrl+g", "solve", "Build", id="builder.solve",
                tooltip="Design the ladder for this cash (as ctrl+g checks a trade on the ticket)"),
        Binding("ctrl+b", "accept", "Book trades", id="builder.accept",
                tooltip="Book the proposed trades (asks first; as ctrl+b on the ticket; save with ctrl+s)"),
        Binding("f", "form", "Form", id="builder.form", tooltip="Go to the first field of the form"),
        Binding("escape", "leave_form", "Leave form / stop", id="builder.leave",
                tooltip="Stop a running build (the previous result stays), else leave the form for the trades table"),
    ]

    class Progressed(Message):
        def __init__(self, asked: int, fraction: float, text: str) -> None:
            super().__init__()
            self.asked, self.fraction, self.text = asked, fraction, text

    class Built(Message):
        def __init__(self, asked: int, result, error: str | None) -> None:
            super().__init__()
            self.asked, self.result, self.error = asked, result, error

    class Accepted(Message):
        """The user accepted the build: the app applies ``result`` to the book."""

        def __init__(self, result) -> None:
            super().__init__()
            self.result = result

    def compose(self) -> ComposeResult:
        yield Notice(id="builder-notice")
        with Horizontal(id="builder-top"):
            with Grid(id="builder-form"):
                yield Label("Cash to invest")
                yield Input(placeholder="e.g. 25,000,000", id="builder-cash", compact=True)
                yield Label("Rungs")
                yield Input(placeholder="default: even to the policy's maximum; 5x1Y, 12x3M, 3M,6M,1Y,2Y",
                            id="builder-rungs", compact=True)
                yield Label("Sales")
                yield Select([("buy only", False), ("buy and sell holdings", True)], value=False, allow_blank=False,
                             id="builder-sales", compact=True)
            with Vertical(id="builder-state"):
                yield Static("f goes to the form: enter the cash, press ctrl+g to build; Esc leaves the form.", id="builder-status")
                yield ProgressBar(total=1.0, show_eta=False, id="builder-progress")
        with VerticalScroll(id="builder-result-box"):
            yield Static(id="builder-result")
        yield FrameTable(id="builder-trades")
        yield Static("Policy after the trades (worst first)", id="builder-compliance-title", classes="title secondary")
        yield FrameTable(id="builder-compliance", classes="secondary")

    def on_mount(self) -> None:
        self.result = None
        self._asked = 0
        self._stopping = threading.Event()
        self.query_one("#builder-progress").display = False

    def refresh_view(self, results: Results) -> None:
        self.query_one(Notice).say(self.state_text(results, "valuation"),
                                   "error" if "valuation" in results.errors else "computing")
        if self.result is not None and self._book is not results.book:
            self._show(None, "The book changed since this build: build again (ctrl+g).")

    def check_action(self, action: str, parameters) -> bool | None:
        if action == "leave_form":    # otherwise Esc goes on to the app (stop the figures)
            return self.has_class("-computing") or self.query_one("#builder-form").has_focus_within
        if action == "accept":
            return (self.result is not None and self.result.status == "built" and len(self.result.trades) > 0) or None
        if action == "solve":
            return (self.results is not None and self.results.valuation is not None) or None
        return True

    def action_form(self) -> None:
        self.set_class(False, "-folded")
        self.query_one("#builder-cash").focus()

    def action_leave_form(self) -> None:
        if self.has_class("-computing"):
            self.stop()
        self.query_one("#builder-trades", FrameTable).focus()

    def stop(self) -> None:
        """Esc during a build: the solver ends its search at its next check and the best plan found so
        far comes back marked as not proven optimal (``BuildResult.optimality_note``); before the
        search has begun the build ends with no plan. A second Esc drops the build and keeps the
        previous result, if any."""
        if not self._stopping.is_set():
            self._stopping.set()
            self.query_one("#builder-status", Static).update(
                "Stopping: the best plan found so far comes next (Esc again drops the build)…")
            return
        self.workers.cancel_group(self, "builder")
        self._asked += 1
        self.set_class(False, "-computing")
        self.query_one("#builder-progress").display = False
        self.query_one("#builder-status", Static).update(
            "Dropped." + (" The result below is the previous build's." if self.result is not None else "")
            + " ctrl+g builds again.")

    def action_solve(self) -> None:
        if self.results is None:
            return
        self._asked += 1
        self._stopping = threading.Event()
        self._book = self.results.book
        bar = self.query_one("#builder-progress", ProgressBar)
        bar.display = True
        bar.update(progress=0.0)
        self.query_one("#builder-status", Static).update("Building…")
        self.set_class(True, "-computing")
        rungs = self.query_one("#builder-rungs", Input).value.strip() or None
        self.run_build(self._asked, self._book, self.query_one("#builder-cash", Input).value, rungs,
                       bool(self.query_one("#builder-sales", Select).value), self._stopping)

    @work(thread=True, exclusive=True, exit_on_error=False, group="builder")
    def run_build(self, asked: int, book, cash: str, rungs: str | None, allow_sales: bool,
                  stopping: threading.Event) -> None:
        from ladder.analysis.build import build_ladder
        from ladder.tui.tasks import describe

        worker = get_current_worker()

        def progress(fraction: float, text: str) -> None:
            if not worker.is_cancelled:
                self.post_message(self.Progressed(asked, fraction, text))

        try:
            result, error = build_ladder(book, cash, rungs=rungs, allow_sales=allow_sales, progress=progress,
                                         stop=stopping.is_set), None
        except Exception as problem:   # shown in the view, never a crash
            result, error = None, describe(problem)
        if not worker.is_cancelled:
            self.post_message(self.Built(asked, result, error))

    def on_builder_view_progressed(self, message: "BuilderView.Progressed") -> None:
        if message.asked == self._asked:
            self.query_one("#builder-progress", ProgressBar).update(progress=message.fraction)
            self.query_one("#builder-status", Static).update(f"Building: {message.text}…")

    def on_builder_view_built(self, message: "BuilderView.Built") -> None:
        if message.asked != self._asked:
            return
        self.set_class(False, "-computing")
        self.query_one("#builder-progress").display = False
        if message.error is not None:
            self._show(None, "The build was refused:\n" + message.error)
            return
        r = message.result
        if r.status == "built":
            status = ("Proposed: review the trades and the policy after them; ctrl+b books them." if r.proven_optimal
                      else "Stopped: the best plan found so far, NOT proven optimal (see below); ctrl+b books it, "
                           "ctrl+g builds again.")
        else:
            status = "No plan: see below."
        self._show(r, status)
        self.query_one("#builder-trades", FrameTable).focus()

    def _show(self, result, status: str) -> None:
        self.result = result
        self.query_one("#builder-status", Static).update(status)
        text = self.query_one("#builder-result", Static)
        text.update(result_text(result) if result is not None else "")
        text.set_class(result is not None and (result.status != "built" or result.compliance_status == "breach"),
                       "-breach")
        trades = self.query_one("#builder-trades", FrameTable)
        compliance = self.query_one("#builder-compliance", FrameTable)
        self.set_class(result is not None, "-folded")      # short screens fold the form under a result
        if result is not None and result.trades is not None:
            trades.show(trades_frame(result.trades, result.trade_yields, result.generic_trades), keep_place=False)
        else:
            trades.show(Frame.empty())
        check = getattr(result.compliance, "check", None) if result is not None else None
        compliance.show(changes_frame(check) if check is not None else Frame.empty(), keep_place=False)
        if check is not None:
            compliance.sort_by("after")
        self.refresh_bindings()

    def action_accept(self) -> None:
        r = self.result
        if r is None or r.status != "built":
            return
        from ladder.tui.screens import BreachScreen, ConfirmScreen
        from ladder.tui.views.trade import breach_words

        def answered(yes: bool | None) -> None:
            if yes and self.result is r:
                self.post_message(self.Accepted(r))
                self._show(None, f"Booked: {len(r.trades)} trade(s) added to the book. Save with ctrl+s.")
                self.query_one("#builder-trades", FrameTable).focus()

        question = f"Book the {len(r.trades)} proposed trade(s), {fmt.money(r.invested)} invested?"
        check = getattr(r.compliance, "check", None)
        if check is not None and check.new_breaches:
            self.app.push_screen(BreachScreen(f"{question}\nThey BREAK the policy:\n{breach_words(check)}"), answered)
            return
        after = status_word(r.compliance_status) if r.compliance_status else fmt.NA_TEXT
        self.app.push_screen(ConfirmScreen(f"{question} Policy after them: {after}.\nThe book changes on screen; "
                                           "ctrl+s writes it.", default_no=True), answered)
