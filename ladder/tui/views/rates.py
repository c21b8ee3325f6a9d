"""Rates: the book under every rate scenario, exact beside the duration and convexity estimates.

Figures come from ``ladder.analysis.shock.ShockResult``: the scenario table (exact value and
change, both estimates and their errors), the value against parallel shift, key-rate durations,
and the chosen scenario's moves by tenor and its effect by maturity rung. ``e`` adds a scenario
of the user's own (built by ``ladder.risk.scenarios``), which the app runs through the façade.
"""

from __future__ import annotations

import re

import numpy as np
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.widgets import Input, Static

from ladder.risk import scenarios as sc
from ladder.tui import format as fmt
from ladder.tui.frame import Column, Frame
from ladder.tui.results import Results
from ladder.tui.views.base import Notice, View
from ladder.tui.widgets.chart import Chart, y_ticks
from ladder.tui.widgets.frame_table import FrameTable

COLUMNS = (
    Column("name", "Scenario", max_width=30), Column("kind", "Kind", priority=3), Column("value", "Value", True),
    Column("change", "Change", True), Column("change_pct", "Change %", True, priority=2),
    Column("est_d", "Est. by duration", True, priority=3), Column("err_d", "Its error", True, priority=3),
    Column("est_dc", "Est. dur+convexity", True, priority=4), Column("err_dc", "Its error", True, priority=2),
    Column("income", "Income chg 12m", True, priority=2), Column("spread", "Spread bp", True, priority=2),
)
SPREAD_COLUMNS = (Column("id", "Holding", max_width=30), Column("sector", "Sector", priority=2),
                  Column("bucket", "Rating", priority=3), Column("spread_bp", "Spread bp", True),
                  Column("spread_duration", "Spread dur", True), Column("spread_convexity", "Spread conv", True,
                                                                         priority=3),
                  Column("base_value", "Value", True, priority=2))
SCENARIO_HELP = ("+75 (parallel bp) · steepener 50 · flattener 50 · twist -25/+25 [pivot 2Y] · short +50 · "
                 "long -50")


def scenario_from_text(par_curve, text: str) -> sc.Scenario:
    """A scenario typed by the user, made by ``ladder.risk.scenarios``; ValueError if not understood."""
    words = text.strip().lower().split()
    number = r"[+-]?\d+(\.\d+)?"
    if len(words) == 1 and re.fullmatch(number, words[0]):
        return sc.parallel(par_curve, float(words[0]))
    if len(words) >= 2 and words[0] in ("steepener", "flattener") and re.fullmatch(number, words[1]):
        pivot = words[2].upper() if len(words) > 2 else sc.DEFAULT_PIVOT
        maker = sc.steepener if words[0] == "steepener" else sc.flattener
        return maker(par_curve, float(words[1]), pivot)
    if len(words) >= 2 and words[0] == "twist" and re.fullmatch(f"{number}/{number}", words[1]):
        short, long = (float(x) for x in words[1].split("/"))
        pivot = words[2].upper() if len(words) > 2 else sc.DEFAULT_PIVOT
        return sc.twist(par_curve, short, long, pivot)
    if len(words) == 2 and words[0] in ("short", "long") and re.fullmatch(number, words[1]):
        maker = sc.short_end_move if words[0] == "short" else sc.long_end_move
        return maker(par_curve, float(words[1]))
    raise ValueError(f"{text!r} is not a scenario; try: {SCENARIO_HELP}")


def income_changes(r, plan) -> np.ndarray:
    """The next 12 months' income change of each scenario (S,), currency: the shock's own when it has
    one, else the cash plan's income-at-risk table matched by scenario name (NaN where absent)."""
    if r.income_change is not None:
        return r.income_change
    if plan is None or not plan.income_at_risk:
        return np.full(len(r.scenarios), np.nan)
    base = plan.base.income
    by_name = {x.scenario: x.income - base for x in plan.income_at_risk}
    by_name.setdefault("0 bp", 0.0)
    return np.array([by_name.get(x.name, np.nan) for x in r.scenarios], dtype=np.float64)


def scenario_frame(r, plan=None) -> Frame:
    t = r.portfolio
    income = income_changes(r, plan)
    moves = np.array([bool(x.spread_moves) for x in r.scenarios], dtype=bool)
    spread_bp = np.where(moves, r.equivalent_spread_shift * 1e4, np.nan)
    text = {
        "name": np.array([x.name for x in r.scenarios], dtype=object),
        "kind": np.array([x.kind.replace("_", " ") for x in r.scenarios], dtype=object),
        "value": fmt.numbers(t.value[0], 0), "change": fmt.numbers(t.change[0], 0, sign=True),
        "change_pct": fmt.percents(t.relative_change[0], 3, sign=True),
        "est_d": fmt.numbers(t.est_duration[0], 0), "err_d": fmt.numbers(t.error_duration[0], 0, sign=True),
        "est_dc": fmt.numbers(t.est_duration_convexity[0], 0),
        "err_dc": fmt.numbers(t.error_duration_convexity[0], 0, sign=True),
        "income": fmt.numbers(income, 0, sign=True),
        "spread": np.where(moves, fmt.numbers(spread_bp, 0, sign=True), "").astype(object),
    }
    sort = {"name": text["name"], "kind": text["kind"], "value": t.value[0], "change": t.change[0],
            "change_pct": t.relative_change[0], "est_d": t.est_duration[0], "err_d": t.error_duration[0],
            "est_dc": t.est_duration_convexity[0], "err_dc": t.error_duration_convexity[0], "income": income,
            "spread": spread_bp}
    return Frame(COLUMNS, text, sort, search=np.char.lower(text["name"].astype(str)).astype(object))


def spread_frame(r) -> Frame:
    """Spread duration by holding (``spread_duration_records``: holdings with spread exposure)."""
    from ladder.analysis.shock import spread_duration_records

    records = spread_duration_records(r)
    text, sort = {}, {}
    for c in SPREAD_COLUMNS:
        values = [x[c.key] for x in records]
        if c.numeric:
            numbers = np.array([np.nan if v is None else v for v in values], dtype=np.float64)
            digits = {"spread_bp": 1, "base_value": 0}.get(c.key, 3)
            text[c.key], sort[c.key] = fmt.numbers(numbers, digits), numbers
        else:
            text[c.key] = sort[c.key] = fmt.texts(np.array(values, dtype=object))
    return Frame(SPREAD_COLUMNS, text, sort)


def scenario_text(r, s: int) -> str:
    """The chosen scenario: its par-yield moves by tenor and its exact change by rung."""
    scenario = r.scenarios[s]
    moves = "  ".join(f"{t} {b:+.0f}" for t, b in zip(r.tenors, scenario.shift_bp_by_tenor))
    rungs = r.by_rung
    by_rung = "  ".join(f"{g} {fmt.money(c, sign=True)}" for g, c, b in zip(rungs.groups, rungs.change[:, s], rungs.base)
                        if b)
    return (f"{scenario.name}: par-yield moves (bp)  {moves}\n"
            f"exact change by rung  {by_rung}")


class RatesView(View):
    TITLE = "Rates"
    SHORT = "Rates"
    NEEDS = ("shock",)
    BINDINGS = [
        Binding("e", "edit", "Add scenario", id="rates.add", tooltip="Run a scenario of your own: " + SCENARIO_HELP),
        Binding("enter", "pick", "Pick", id="rates.pick", tooltip="Show this scenario's moves and rung effects"),
    ]

    class ScenarioWanted(Message):
        def __init__(self, scenario) -> None:
            super().__init__()
            self.scenario = scenario

    def compose(self) -> ComposeResult:
        yield Static(id="rates-summary", classes="totals")
        yield Notice(id="rates-notice")
        with Horizontal(classes="split"):
            yield FrameTable(id="rates-table", classes="narrow")
            with Vertical(classes="charts secondary"):
                yield Chart(id="rates-value-chart")
                yield Chart(id="rates-krd-chart")
        yield Static(id="rates-picked", classes="totals secondary")
        yield Static("Spread duration by holding (own spread moved +/- 1 bp, the curve held). Credit scenarios "
                     "widen spreads with the curve held; their Spread bp is the move weighted by spread exposure.",
                     classes="title secondary")
        yield FrameTable(id="rates-spreads", classes="secondary")
        yield Input(placeholder=SCENARIO_HELP, id="rates-input", classes="filter")

    def on_mount(self) -> None:
        self.query_one("#rates-input").display = False
        self._result = self._plan = None

    @property
    def table(self) -> FrameTable:
        return self.query_one("#rates-table", FrameTable)

    def refresh_view(self, results: Results) -> None:
        r = self.figures(results, "shock")
        if r is None:
            return
        plan, _ = results.latest("plan")
        if (r, plan) == (self._result, self._plan):
            return
        self._result, self._plan = r, plan
        self.table.show(scenario_frame(r, plan))
        krd = r.portfolio_key_rate_durations
        self.query_one("#rates-summary", Static).update(
            f"Base value {fmt.money(r.base_value)}   effective duration {fmt.number(r.effective_duration, 3)}   "
            f"effective convexity {fmt.number(r.effective_convexity, 3)}   key-rate durations sum "
            f"{fmt.number(krd.sum(), 3)}   spread duration {fmt.number(r.portfolio_spread_duration, 3)}   "
            f"spread convexity {fmt.number(r.portfolio_spread_convexity, 3)}   {len(r.scenarios)} scenarios   "
            "errors = estimate - exact")
        self.query_one("#rates-spreads", FrameTable).show(spread_frame(r))
        self._charts(r)
        self._pick()

    def _charts(self, r) -> None:
        bp = np.array([np.nan if b is None else b for b in r.parallel_bp])
        rows = np.flatnonzero(np.isfinite(bp))
        rows = rows[np.argsort(bp[rows])]
        t = r.portfolio

        def value_chart(plt, series) -> None:
            if len(rows):
                x = bp[rows].tolist()
                scale = 1e6
                lines = [t.value[0, rows] / scale, t.est_duration[0, rows] / scale,
                         t.est_duration_convexity[0, rows] / scale]
                for i, (y, label) in enumerate(zip(lines, ("exact", "duration", "duration + convexity"))):
                    plt.plot(x, y.tolist(), label=label, **series.line(i))
                y_ticks(plt, float(min(y.min() for y in lines)), float(max(y.max() for y in lines)))
            plt.title("Value (millions) by parallel shift (bp)")

        def krd_chart(plt, series) -> None:
            krd = r.portfolio_key_rate_durations
            plt.bar(list(r.tenors), krd.tolist(), **series.bar(0))
            y_ticks(plt, min(0.0, float(krd.min())), float(krd.max()))
            plt.title("Key-rate durations (years) by tenor")

        self.query_one("#rates-value-chart", Chart).draw(value_chart)
        self.query_one("#rates-krd-chart", Chart).draw(krd_chart)

    def _pick(self) -> None:
        row = self.table.current_row
        if self._result is not None and row is not None:
            self.query_one("#rates-picked", Static).update(scenario_text(self._result, row))

    def on_frame_table_row_highlighted(self, event: FrameTable.RowHighlighted) -> None:
        self._pick()

    def check_action(self, action: str, parameters) -> bool | None:
        if action in ("edit", "pick"):
            return self._result is not None
        return True

    def action_pick(self) -> None:
        self._pick()

    def action_edit(self) -> None:
        box = self.query_one("#rates-input", Input)
        box.display = True
        box.focus()

    def on_input_submitted(self, event: Input.Submitted) -> None:
        if event.input.id != "rates-input":
            return
        event.stop()
        try:
            scenario = scenario_from_text(self.results.book.curve, event.value)
        except ValueError as error:
            self.notify(str(error), title="Not a scenario", severity="error")
            return
        event.input.display = False
        event.input.value = ""
        self.table.focus()
        self.post_message(self.ScenarioWanted(scenario))

    def on_key(self, event) -> None:
        box = self.query_one("#rates-input", Input)
        if event.key == "escape" and box.display:
            event.stop()
            box.display = False
            self.table.focus()
