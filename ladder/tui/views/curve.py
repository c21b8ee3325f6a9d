"""Curve: the quoted par yields, editable in place, and the zero and forward curves built from them.

Every rate shown comes from the valuation's bootstrapped curve (``ladder.pricing.curve.Curve``):
zero rates semiannually compounded (bond-equivalent, comparable with par yields), instantaneous
forwards continuously compounded, on ACT/365F years from the curve date.
"""

from __future__ import annotations

import math

import numpy as np
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.message import Message
from textual.widgets import Input, Static

from ladder.pricing.curve import ParCurve
from ladder.pricing.curve_file import YIELD_RANGE_PCT
from ladder.tui import format as fmt
from ladder.tui.frame import Column, Frame
from ladder.tui.results import Results
from ladder.tui.views.base import Notice, View
from ladder.tui.widgets.chart import Chart, y_ticks
from ladder.tui.widgets.frame_table import FrameTable

COLUMNS = (Column("tenor", "Tenor"), Column("years", "Years", True, priority=3), Column("par", "Par yield %", True),
           Column("zero", "Zero % (s.a.)", True), Column("forward", "Forward % (cont.)", True, priority=2),
           Column("discount", "Discount factor", True, priority=3), Column("edited", "Edited"))
CHART_POINTS = 120


def curve_frame(curve, original: ParCurve) -> Frame:
    """Tenor rows of a bootstrapped curve (rates at each par instrument's maturity)."""
    par = curve.par_curve
    t = curve.instruments.maturity_times
    edited = np.abs(par.par_yields - original.par_yields) > 1e-12 if len(original) == len(par) else np.ones(len(par), bool)
    text = {"tenor": np.array(par.tenors, dtype=object), "years": fmt.numbers(t, 3),
            "par": fmt.percents(par.par_yields, 3), "zero": fmt.percents(curve.zero_rate(t, "semiannual"), 3),
            "forward": fmt.percents(curve.instantaneous_forward(t), 3), "discount": fmt.numbers(curve.discount(t), 6),
            "edited": np.where(edited, "edited", "").astype(object)}
    sort = {"tenor": t, "years": t, "par": par.par_yields, "zero": curve.zero_rate(t, "semiannual"),
            "forward": curve.instantaneous_forward(t), "discount": curve.discount(t), "edited": text["edited"]}
    return Frame(COLUMNS, text, sort, row_style=np.where(edited, "added", "").astype(object))


def par_curve_with(par: ParCurve, index: int, percent_text: str) -> ParCurve:
    """``par`` with tenor ``index`` set to ``percent_text`` (percent); ValueError on bad input."""
    value = float(percent_text.replace("%", "").strip())
    low, high = YIELD_RANGE_PCT
    if not math.isfinite(value) or not low <= value <= high:
        raise ValueError(f"{percent_text!r}: a par yield in percent from {low:g} to {high:g}, e.g. 4.25")
    yields = par.par_yields.copy()
    yields[index] = value / 100.0
    return ParCurve(par.tenors, yields)


class CurveView(View):
    TITLE = "Curve"
    SHORT = "Curve"
    NEEDS = ("valuation",)
    BINDINGS = [
        Binding("enter", "edit", "Edit yield", id="curve.edit", tooltip="Type a new par yield for this tenor"),
        Binding("plus,equals_sign", "nudge(1)", "+1 bp", id="curve.up"),
        Binding("minus", "nudge(-1)", "-1 bp", id="curve.down"),
        Binding("z", "reset", "Reset curve", id="curve.reset", tooltip="Back to the curve in the book's file"),
    ]

    class CurveEdited(Message):
        """The user changed the par yields: the app rebuilds every figure from ``par_curve``."""

        def __init__(self, par_curve: ParCurve) -> None:
            super().__init__()
            self.par_curve = par_curve

    def compose(self) -> ComposeResult:
        yield Static(id="curve-summary", classes="totals")
        yield Notice(id="curve-notice")
        with Horizontal(classes="split"):
            yield FrameTable(id="curve-table", classes="narrow")
            yield Chart(id="curve-chart", classes="secondary")
        yield Input(placeholder="par yield in percent, e.g. 4.25 (Enter to apply, Esc to cancel)", id="curve-input",
                    classes="filter")

    def on_mount(self) -> None:
        self.query_one("#curve-input").display = False
        self._editing: int | None = None

    @property
    def table(self) -> FrameTable:
        return self.query_one("#curve-table", FrameTable)

    def refresh_view(self, results: Results) -> None:
        v = self.figures(results, "valuation")
        if v is None:
            return
        curve = v.curve
        original = getattr(self.app, "original_curve", results.book.curve)
        self.table.show(curve_frame(curve, original))
        self.query_one("#curve-summary", Static).update(
            f"Curve of {curve.curve_date}: {len(curve.par_curve)} tenors, {curve.method.replace('_', ' ')} "
            "interpolation; zero rates semiannual, forwards continuous, ACT/365F years")
        # The x axis is spaced by tenor (each quoted tenor one step), not by years: a linear 30-year
        # axis would squeeze the first five years, where the holdings sit, into a sixth of its width.
        tenors = curve.instruments.maturity_times
        place = np.arange(len(tenors), dtype=np.float64)
        x = np.linspace(0.0, place[-1], CHART_POINTS)
        t = np.interp(x, place, tenors)
        zero, forward = curve.zero_rate(t, "semiannual") * 100, curve.instantaneous_forward(t) * 100
        par = curve.par_curve.par_yields * 100

        def paint(plt, series) -> None:
            plt.plot(place.tolist(), par.tolist(), label="par", **series.line(1))
            plt.plot(x.tolist(), zero.tolist(), label="zero", **series.line(0))
            plt.plot(x.tolist(), forward.tolist(), label="forward", **series.line(2))
            plt.xticks(place.tolist(), list(curve.par_curve.tenors))
            y_ticks(plt, float(min(par.min(), zero.min(), forward.min())), float(max(par.max(), zero.max(), forward.max())))
            plt.title("Par, zero and forward (%) by tenor, tenors evenly spaced")

        self.query_one("#curve-chart", Chart).draw(paint)

    def _par(self) -> ParCurve | None:
        v = self.results.valuation if self.results else None
        return v.curve.par_curve if v is not None else None

    def check_action(self, action: str, parameters) -> bool | None:
        if action in ("edit", "nudge"):
            return self._par() is not None and self.table.current_row is not None
        if action == "reset":
            par, original = self._par(), getattr(self.app, "original_curve", None)
            return par is not None and original is not None and not np.array_equal(par.par_yields, original.par_yields)
        return True

    def action_edit(self) -> None:
        row = self.table.current_row
        par = self._par()
        if row is None or par is None:
            return
        self._editing = row
        box = self.query_one("#curve-input", Input)
        box.display = True
        box.value = f"{par.par_yields[row] * 100:.3f}"
        box.border_title = f"{par.tenors[row]} par yield %"
        box.focus()

    def action_nudge(self, bp: int) -> None:
        row, par = self.table.current_row, self._par()
        if row is None or par is None:
            return
        self.post_message(self.CurveEdited(par_curve_with(par, row, f"{(par.par_yields[row] * 1e4 + bp) / 100}")))

    def action_reset(self) -> None:
        original = getattr(self.app, "original_curve", None)
        if original is not None:
            self.post_message(self.CurveEdited(original))

    def on_input_submitted(self, event: Input.Submitted) -> None:
        if event.input.id != "curve-input" or self._editing is None:
            return
        event.stop()
        try:
            curve = par_curve_with(self._par(), self._editing, event.value)
        except ValueError as error:
            self.notify(str(error), title="Not a par yield", severity="error")
            return
        event.input.display = False
        self._editing = None
        self.table.focus()
        self.post_message(self.CurveEdited(curve))

    def on_key(self, event) -> None:
        box = self.query_one("#curve-input", Input)
        if event.key == "escape" and box.display:
            event.stop()
            box.display = False
            self._editing = None
            self.table.focus()
