"""Policy: every rule of the book's policy with its limit, actual, headroom and status (a word beside
its colour); Enter lists the groups and holdings behind the highlighted rule."""

from __future__ import annotations

import numpy as np
from textual.app import ComposeResult
from textual.binding import Binding
from textual.widgets import Static

from ladder.tui import format as fmt
from ladder.tui.frame import Column, Frame
from ladder.tui.policy_text import nothing_to_show, rule_cells
from ladder.tui.results import Results
from ladder.tui.views.base import Notice, View
from ladder.tui.widgets.frame_table import FrameTable

COLUMNS = (Column("rule", "Rule id", max_width=38, min_width=24), Column("status", "Status"), Column("limit", "Limit", True),
           Column("actual", "Actual", True), Column("headroom", "Headroom", True),
           Column("holdings", "Holdings", True, priority=2), Column("testing", "Tested", priority=3),
           Column("text", "Rule", max_width=60, priority=3))
FINDING_COLUMNS = (Column("group", "Group", max_width=40), Column("status", "Status"), Column("limit", "Limit", True),
                   Column("actual", "Actual", True), Column("headroom", "Headroom", True),
                   Column("holdings", "Holdings behind it", max_width=90))
STATUS_ORDER = {"breach": 0, "review": 1, "near": 2, "pass": 3}
ROW_STYLE = {"breach": "breach", "review": "review", "near": "near", "pass": ""}


def status_word(status: str) -> str:
    return status.upper() if status in ("breach", "review") else status


def rules_frame(result) -> Frame:
    rules = result.rules
    status = np.array([status_word(r.status) for r in rules], dtype=object)
    cells = np.array([rule_cells(r.limit, r.actual, r.headroom, r.unit) for r in rules], dtype=object).reshape(-1, 3)
    text = {"status": status, "rule": np.array([r.rule for r in rules], dtype=object),
            "text": np.array([r.text + (f"; largest: {r.worst_group}" if r.per else "") for r in rules],
                             dtype=object),
            "testing": np.array([r.testing.replace("_", " ") for r in rules], dtype=object),
            "limit": cells[:, 0], "actual": cells[:, 1], "headroom": cells[:, 2],
            "holdings": fmt.numbers([len(r.holdings) for r in rules], 0)}
    sort = dict(text)
    sort["status"] = np.array([STATUS_ORDER[r.status] for r in rules], dtype=np.float64)
    sort["holdings"] = np.array([len(r.holdings) for r in rules], dtype=np.float64)
    sort["headroom"] = np.array([np.nan if r.headroom is None else r.headroom for r in rules], dtype=np.float64)
    style = np.array([ROW_STYLE[r.status] for r in rules], dtype=object)
    search = np.array([f"{r.status} {r.rule} {r.text}".lower() for r in rules], dtype=object)
    return Frame(COLUMNS, text, sort, row_style=style, search=search)


def findings_frame(rule) -> Frame:
    f = rule.findings
    cells = np.array([rule_cells(x.limit, x.actual, x.headroom, rule.unit) for x in f], dtype=object).reshape(-1, 3)
    text = {"status": np.array([status_word(x.status) for x in f], dtype=object),
            "group": np.array([x.label for x in f], dtype=object),
            "limit": cells[:, 0], "actual": cells[:, 1], "headroom": cells[:, 2],
            "holdings": np.array([", ".join(x.holdings) for x in f], dtype=object)}
    sort = dict(text)
    sort["status"] = np.array([STATUS_ORDER[x.status] for x in f], dtype=np.float64)
    return Frame(FINDING_COLUMNS, text, sort, row_style=np.array([ROW_STYLE[x.status] for x in f], dtype=object))


def rule_line(rule) -> str:
    """The highlighted rule in full, with what lies behind it."""
    if nothing_to_show(rule.limit, rule.actual):
        behind = "nothing to show: no holding falls under it"
    elif rule.findings:
        behind = f"{len(rule.findings)} group(s) and {len(rule.holdings)} holding(s) near or over the limit (Enter)"
    else:
        behind = "nothing near its limit"
    return f"{rule.rule} ({status_word(rule.status)}): {rule.text}. {behind[0].upper()}{behind[1:]}."


def summary_text(result) -> str:
    counts = result.counts()
    parts = "   ".join(f"{status_word(s)} {counts[s]}" for s in ("breach", "review", "near", "pass"))
    return (f"{result.policy_title}   basis {result.basis}, share limits tested "
            f"{result.testing.replace('_', ' ')} unless a rule says otherwise\n"
            f"Overall: {status_word(result.status)}   rules: {parts}   checked {result.as_of}")


class PolicyView(View):
    TITLE = "Policy"
    SHORT = "Policy"
    NEEDS = ("check",)
    BINDINGS = [Binding("enter", "behind", "Holdings behind", id="policy.behind",
                        tooltip="List the groups and holdings behind the highlighted rule")]

    def compose(self) -> ComposeResult:
        yield Static(id="policy-summary", classes="totals")
        yield Notice(id="policy-notice")
        yield FrameTable(id="policy-table")
        yield Static(id="policy-rule", classes="totals")
        yield Static(id="policy-behind-title", classes="title secondary")
        yield FrameTable(id="policy-findings", classes="short-table secondary")

    def on_mount(self) -> None:
        self._result = None
        self.table.sort_by("status")      # worst first; the policy file's order within a status

    @property
    def table(self) -> FrameTable:
        return self.query_one("#policy-table", FrameTable)

    def refresh_view(self, results: Results) -> None:
        r = self.figures(results, "check")
        if r is None:
            return
        self._result = r.result
        summary = self.query_one("#policy-summary", Static)
        summary.update(summary_text(r.result))
        summary.set_class(r.result.status == "breach", "-breach")
        self.table.show(rules_frame(r.result))
        self._behind()

    def _behind(self) -> None:
        row = self.table.current_row
        if self._result is None or row is None:
            return
        rule = self._result.rules[row]
        self.query_one("#policy-rule", Static).update(rule_line(rule))
        title = self.query_one("#policy-behind-title", Static)
        if rule.findings:
            title.update(f"Behind {rule.rule} ({status_word(rule.status)}): {len(rule.findings)} group(s), "
                         f"{len(rule.holdings)} holding(s)")
        else:
            title.update(f"Behind {rule.rule}: nothing near its limit")
        self.query_one("#policy-findings", FrameTable).show(findings_frame(rule), keep_place=False)

    def on_frame_table_row_highlighted(self, event: FrameTable.RowHighlighted) -> None:
        if event.table.id == "policy-table":
            self._behind()

    def check_action(self, action: str, parameters) -> bool | None:
        if action == "behind":
            return self._result is not None and self.table.current_row is not None
        return True

    def action_behind(self) -> None:
        self.screen.add_class("-more")     # on a short screen the findings pane is folded: show it
        self._behind()
        findings = self.query_one("#policy-findings", FrameTable)
        (self.table if findings.has_focus else findings).focus()
