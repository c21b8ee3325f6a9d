"""Cash plan: the period table (shortfalls marked in words), a chart of cash against needs, and the
next 12 months' income under each scenario, from ``ladder.analysis.plan.CashPlan``. ``n`` plans
under another scenario (a name from the list, or a parallel move in bp)."""

from __future__ import annotations

import time

import numpy as np
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.message import Message
from textual.widgets import Input, Static
from textual.worker import get_current_worker

from ladder.tui import format as fmt
from ladder.tui.frame import Column, Frame
from ladder.tui.results import Results
from ladder.tui.views.base import Notice, View
from ladder.tui.widgets.chart import Chart, y_ticks
from ladder.tui.widgets.frame_table import FrameTable

COLUMNS = (Column("end", "Period end"), Column("status", "Status"),
           Column("opening", "Opening cash", True, priority=2), Column("coupons", "Coupons", True, priority=3),
           Column("principal", "Principal (incl. called)", True, priority=3),
           Column("called", "of it called", True, priority=4), Column("fund", "Fund income", True, priority=4),
           Column("needs", "Needs", True), Column("available", "Cash before sales", True, priority=2),
           Column("shortfall", "Shortfall", True, priority=2), Column("sales", "Sales", True, priority=3),
           Column("unfunded", "Unfunded", True, priority=3), Column("reinvested", "Reinvested", True, priority=3),
           Column("closing", "Closing cash", True), Column("yield", "Reinvest yield %", True, priority=4),
           Column("income", "Income", True, priority=3))
INCOME_COLUMNS = (Column("scenario", "Scenario", max_width=30), Column("income", "Income 12m", True),
                  Column("change", "Change", True), Column("price", "Price change 12m", True, priority=2),
                  Column("total", "Total return 12m", True, priority=2), Column("total_pct", "Return %", True, priority=3),
                  Column("calls", "Calls expected", True, priority=3))
COMPARE_COLUMNS = (Column("scenario", "Scenario", max_width=24), Column("rule", "Rule"),
                   Column("income_12m", "Income 12m", True, priority=2), Column("income_24m", "Income 24m", True),
                   Column("vs", "vs longest rung", True), Column("forced_sales", "Forced sales", True, priority=2),
                   Column("realized_gain", "Realized gain", True, priority=3),
                   Column("policy_crossings", "Policy crossings", True, priority=2))
RATE_RULES = {"stay": "the curve moves by the scenario and then stays unchanged",
              "forward": "the curve follows today's forward rates"}
SCALE = 1e6


def period_status(pr, buffer: float) -> np.ndarray:
    """A word per period: UNFUNDED (sales could not cover), SHORTFALL (sales needed), tight (cash
    before sales under the buffer), ok."""
    return np.where(pr.unfunded > 0, "UNFUNDED", np.where(pr.shortfall > 0, "SHORTFALL",
                    np.where(pr.available < buffer, "tight", "ok"))).astype(object)


def periods_frame(plan) -> Frame:
    pr = plan.projection
    status = period_status(pr, plan.reinvestment.buffer)
    money = {"opening": pr.opening_cash, "coupons": pr.coupons, "principal": pr.principal, "called": pr.called,
             "fund": pr.fund_income, "needs": pr.needs, "available": pr.available, "shortfall": pr.shortfall,
             "sales": pr.sales, "unfunded": pr.unfunded, "reinvested": pr.reinvested, "closing": pr.closing_cash,
             "income": pr.income}
    text = {k: fmt.numbers(v, 0) for k, v in money.items()}
    text.update(end=fmt.texts(pr.periods.end), status=status, **{"yield": fmt.percents(pr.reinvest_yield, 3)})
    sort = dict(money)
    sort.update(end=np.arange(len(status), dtype=np.float64), status=status, **{"yield": pr.reinvest_yield})
    style = np.where(status == "UNFUNDED", "breach", np.where(status == "SHORTFALL", "breach",
                     np.where(status == "tight", "review", ""))).astype(object)
    return Frame(COLUMNS, text, sort, row_style=style)


def income_frame(plan) -> Frame:
    rows = plan.income_at_risk
    base = plan.base.income if rows else np.nan
    income = np.array([r.income for r in rows], dtype=np.float64)
    price = np.array([r.horizon.price_change for r in rows], dtype=np.float64)
    total = np.array([r.horizon.gain for r in rows], dtype=np.float64)
    pct = np.array([r.horizon.return_pct for r in rows], dtype=np.float64)
    calls = np.array([len(r.calls) for r in rows], dtype=np.float64)
    text = {"scenario": np.array([r.scenario for r in rows], dtype=object), "income": fmt.numbers(income, 0),
            "change": fmt.numbers(income - base, 0, sign=True), "price": fmt.numbers(price, 0, sign=True),
            "total": fmt.numbers(total, 0, sign=True), "total_pct": fmt.numbers(pct, 3, sign=True),
            "calls": fmt.numbers(calls, 0)}
    sort = {"scenario": text["scenario"], "income": income, "change": income - base, "price": price,
            "total": total, "total_pct": pct, "calls": calls}
    return Frame(INCOME_COLUMNS, text, sort)


def compare_frame(outcomes) -> Frame:
    """The reinvestment rules side by side (``compare_records`` of ``compare_rules``, as ``ladder plan --compare``)."""
    from ladder.analysis.plan import compare_records

    records = compare_records(outcomes)
    text, sort = {}, {}
    for c in COMPARE_COLUMNS:
        key = "income_24m_vs_longest_rung" if c.key == "vs" else c.key
        values = [x[key] for x in records]
        if c.numeric:
            numbers = np.array([np.nan if v is None else v for v in values], dtype=np.float64)
            text[c.key] = fmt.numbers(numbers, 0, sign=c.key == "vs")
            sort[c.key] = numbers
        else:
            text[c.key] = sort[c.key] = np.array([str(v).replace("_", " ") for v in values], dtype=object)
    return Frame(COMPARE_COLUMNS, text, sort)


def summary_text(plan) -> str:
    pr, r = plan.projection, plan.reinvestment
    first = plan.first_shortfall
    shortfall = (f"first SHORTFALL in the period ending {pr.periods.end[first]}: {fmt.money(pr.shortfall[first])} "
                 f"to raise by sales" + (f", {fmt.money(pr.unfunded[first])} UNFUNDED" if pr.unfunded[first] > 0 else "")
                 if first is not None else "no shortfall over the horizon")
    rule = r.rule.replace("_", " ") + (f" {r.tenor}" if r.tenor else "") + (f" ({r.sector})" if r.sector else "")
    rates = RATE_RULES.get(plan.options.rates, plan.options.rates)
    crossings = (f"the projected book crosses {len(plan.crossings)} policy limit(s), first in the period ending "
                 f"{plan.crossings[0].period_end} ({plan.crossings[0].rule})" if plan.crossings
                 else "the projected book stays within every policy limit")
    lines = [f"Scenario {plan.scenario} ({rates})   {len(pr.periods)} {plan.options.period}s from {plan.as_of}   "
             f"reinvest: {rule}, buffer {fmt.money(r.buffer)}", f"{shortfall.capitalize()}; {crossings}"]
    lines += [f"Note: {n}" for n in plan.notes]
    return "\n".join(lines)


class CashPlanView(View):
    TITLE = "Cash plan"
    SHORT = "Plan"
    NEEDS = ("plan",)
    BINDINGS = [Binding("n", "scenario", "Plan scenario", id="plan.scenario",
                        tooltip="Plan under another scenario: a name from the income table or a move in bp"),
                Binding("o", "compare", "Compare rules", id="plan.compare",
                        tooltip="Every reinvestment rule under every scenario over 24 months (as ladder plan "
                                "--compare); o again goes back to the periods; Esc stops"),
                Binding("escape", "stop", "Stop", id="plan.stop", tooltip="Stop the rule comparison")]

    class Compared(Message):
        def __init__(self, asked: int, outcomes, error: str | None) -> None:
            super().__init__()
            self.asked, self.outcomes, self.error = asked, outcomes, error

    class CompareProgress(Message):
        def __init__(self, asked: int, done: int, total: int) -> None:
            super().__init__()
            self.asked, self.done, self.total = asked, done, total

    class ScenarioWanted(Message):
        def __init__(self, name: str | None, bp: float | None) -> None:
            super().__init__()
            self.name, self.bp = name, bp

    def compose(self) -> ComposeResult:
        yield Static(id="plan-summary", classes="totals")
        yield Notice(id="plan-notice")
        yield FrameTable(id="plan-table")
        yield FrameTable(id="plan-compare")
        with Horizontal(id="plan-bottom", classes="secondary"):
            yield FrameTable(id="plan-income", classes="narrow")
            yield Chart(id="plan-chart")
        yield Input(placeholder="scenario name (e.g. +100 bp, bear-flattener, base) or a parallel move in bp",
                    id="plan-input", classes="filter")

    def on_mount(self) -> None:
        self.query_one("#plan-input").display = False
        self.query_one("#plan-compare").display = False
        self._plan = None
        self._compared = None          # (book, outcomes) of the last comparison
        self._comparing = 0            # the comparison asked for (0: none running)
        self._asked = 0

    def refresh_view(self, results: Results) -> None:
        compare = self.query_one("#plan-compare", FrameTable)
        if compare.display and self._compared is not None and self._compared[0] is not results.book:
            compare.display = False                 # the comparison was of the book before the change
            self.query_one("#plan-table", FrameTable).display = True
        plan = self.figures(results, "plan")
        if plan is None or plan is self._plan:
            return
        self._plan = plan
        summary = self.query_one("#plan-summary", Static)
        summary.update(summary_text(plan))
        summary.set_class(plan.first_shortfall is not None, "-breach")
        self.query_one("#plan-table", FrameTable).show(periods_frame(plan))
        self.query_one("#plan-income", FrameTable).show(income_frame(plan))
        pr = plan.projection
        x = list(range(1, len(pr.periods) + 1))
        labels = [str(d)[:7] for d in pr.periods.end]

        def paint(plt, series) -> None:
            plt.bar(x, (pr.available / SCALE).tolist(), label="cash before sales", **series.bar(0))
            plt.plot(x, (pr.needs / SCALE).tolist(), label="needs", **series.line(1))
            plt.plot(x, (pr.closing_cash / SCALE).tolist(), label="closing cash", **series.line(2))
            y_ticks(plt, float(min(0.0, pr.available.min(), pr.needs.min(), pr.closing_cash.min()) / SCALE),
                    float(max(pr.available.max(), pr.needs.max(), pr.closing_cash.max()) / SCALE))
            step = max(1, len(x) // 8)
            plt.xticks(x[::step], labels[::step])
            plt.title(f"Cash by period, millions of {results.book.currency}")

        self.query_one("#plan-chart", Chart).draw(paint)

    def check_action(self, action: str, parameters) -> bool | None:
        if action == "scenario":
            return self._plan is not None
        if action == "stop":        # otherwise Esc goes on to the app
            return bool(self._comparing)
        return True

    # ---- the rule comparison (long: Esc stops it) --------------------------------------------------
    def action_compare(self) -> None:
        table, compare = self.query_one("#plan-table", FrameTable), self.query_one("#plan-compare", FrameTable)
        if compare.display:
            compare.display, table.display = False, True
            table.focus()
            return
        if self._compared is not None and self._compared[0] is self.results.book:
            self._show_compare(self._compared[1])
            return
        if self._comparing or self.results is None:
            return
        self._asked += 1
        self._comparing = self._asked
        self._started = time.monotonic()
        self.query_one(Notice).say("Comparing the reinvestment rules: starting… (Esc stops)", "computing")
        self.run_compare(self._asked, self.results.book)
        self.refresh_bindings()

    @work(thread=True, exclusive=True, exit_on_error=False, group="compare")
    def run_compare(self, asked: int, book) -> None:
        from ladder.analysis.plan import compare_rules
        from ladder.tui.tasks import describe

        worker = get_current_worker()

        class Stopped(Exception):
            pass

        def progress(done: int, total: int) -> None:
            if worker.is_cancelled:
                raise Stopped         # between scenarios: the comparison ends there
            self.post_message(self.CompareProgress(asked, done, total))

        try:
            outcomes, error = compare_rules(book, progress=progress), None
        except Stopped:
            return
        except Exception as problem:    # shown in the view, never a crash
            outcomes, error = None, describe(problem)
        if not worker.is_cancelled:
            self.post_message(self.Compared(asked, (book, outcomes), error))

    def on_cash_plan_view_compare_progress(self, message: "CashPlanView.CompareProgress") -> None:
        if message.asked == self._comparing:
            self.query_one(Notice).say(f"Comparing the reinvestment rules: scenario {message.done} of "
                                       f"{message.total} done, {time.monotonic() - self._started:.1f} s "
                                       "(Esc stops)", "computing")

    def on_cash_plan_view_compared(self, message: "CashPlanView.Compared") -> None:
        if message.asked != self._comparing:
            return
        self._comparing = 0
        self.refresh_bindings()
        if message.error is not None:
            self.query_one(Notice).say(f"The rules could not be compared: {message.error}", "error")
            return
        self.query_one(Notice).say(None)
        self._compared = message.outcomes
        self._show_compare(message.outcomes[1])

    def _show_compare(self, outcomes) -> None:
        table, compare = self.query_one("#plan-table", FrameTable), self.query_one("#plan-compare", FrameTable)
        compare.show(compare_frame(outcomes))
        table.display, compare.display = False, True
        compare.focus()

    def action_stop(self) -> None:
        if self._comparing:
            self.workers.cancel_group(self, "compare")
            self._comparing = 0
            self.query_one(Notice).say("Stopped the rule comparison (o starts it again).", "stale")
            self.refresh_bindings()

    def action_scenario(self) -> None:
        box = self.query_one("#plan-input", Input)
        box.display = True
        box.focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        if event.input.id != "plan-input":
            return
        event.stop()
        text = event.value.strip()
        event.input.display = False
        event.input.value = ""
        self.query_one("#plan-table", FrameTable).focus()
        try:
            bp = float(text.replace("bp", "").strip())
            name = None
        except ValueError:
            bp, name = None, text or None
        self.post_message(self.ScenarioWanted(name, bp))

    def on_key(self, event) -> None:
        box = self.query_one("#plan-input", Input)
        if event.key == "escape" and box.display:
            event.stop()
            box.display = False
            self.query_one("#plan-table", FrameTable).focus()
