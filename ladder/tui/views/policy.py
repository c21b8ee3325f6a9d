"""Policy: every rule of the book's policy with its limit, actual, headroom and status (a word beside
its colour); Enter lists the groups and holdings behind the highlighted rule."""

from __future__ import annotations

import numpy as np
from textual.app import ComposeResult
from textual.binding import Binding
from textual.widgets import Static

from ladder.tui import format as fmt
from ladder.tui.frame import Column, Frame
from ladder.tui.policy_text import headroom_text, value_text
from ladder.tui.results import Results
from ladder.tui.views.base import Notice, View
from ladder.tui.widgets.frame_table import FrameTable

COLUMNS = (Column("status", "Status"), Column("rule", "Rule id", max_width=38), Column("text", "Rule", max_width=56),
           Column("limit", "Limit", True), Column("actual", "Actual", True), Column("headroom", "Headroom", True),
           Column("testing", "Tested"), Column("holdings", "Holdings", True))
FINDING_COLUMNS = (Column("status", "Status"), Column("group", "Group", max_width=40), Column("limit", "Limit", True),
                   Column("actual", "Actual", True), Column("headroom", "Headroom", True),
                   Column("holdings", "Holdings behind it", max_width=90))
STATUS_ORDER = {"breach": 0, "review": 1, "near": 2, "pass": 3}
ROW_STYLE = {"breach": "breach", "review": "review", "near": "near", "pass": ""}


def status_word(status: str) -> str:
    return status.upper() if status in ("breach", "review") else status


def rules_frame(result) -> Frame:
    rules = result.rules
    status = np.array([status_word(r.status) for r in rules], dtype=object)
    text = {"status": status, "rule": np.array([r.rule for r in rules], dtype=object),
            "text": np.array([r.text + (f"; largest: {r.worst_group}" if r.per else "") for r in rules],
                             dtype=object),
            "testing": np.array([r.testing.replace("_", " ") for r in rules], dtype=object),
            "limit": np.array([value_text(r.limit, r.unit) for r in rules], dtype=object),
            "actual": np.array([value_text(r.actual, r.unit) for r in rules], dtype=object),
            "headroom": np.array([headroom_text(r.headroom, r.unit) for r in rules], dtype=object),
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
    text = {"status": np.array([status_word(x.status) for x in f], dtype=object),
            "group": np.array([x.label for x in f], dtype=object),
            "limit": np.array([value_text(x.limit, rule.unit) for x in f], dtype=object),
            "actual": np.array([value_text(x.actual, rule.unit) for x in f], dtype=object),
            "headroom": np.array([headroom_text(x.headroom, rule.unit) for x in f], dtype=object),
            "holdings": np.array([", ".join(x.holdings) for x in f], dtype=object)}
    sort = dict(text)
    sort["status"] = np.array([STATUS_ORDER[x.status] for x in f], dtype=np.float64)
    return Frame(FINDING_COLUMNS, text, sort, row_style=np.array([ROW_STYLE[x.status] for x in f], dtype=object))


def summary_text(result) -> str:
    counts = result.counts()
    parts = "   ".join(f"{status_word(s)} {counts[s]}" for s in ("breach", "review", "near", "pass"))
    return (f"{result.policy_title}   basis {result.basis}, share limits tested "
            f"{result.testing.replace('_', ' ')} unless a rule says otherwise\n"
            f"Overall: {status_word(result.status)}   rules: {parts}   checked {result.as_of}")


class PolicyView(View):
    TITLE = "Policy"
    NEEDS = ("check",)
    BINDINGS = [Binding("enter", "behind", "Holdings behind", id="policy.behind",
                        tooltip="List the groups and holdings behind the highlighted rule")]

    def compose(self) -> ComposeResult:
        yield Static(id="policy-summary", classes="totals")
        yield Notice(id="policy-notice")
        yield FrameTable(id="policy-table")
        yield Static(id="policy-behind-title", classes="title")
        yield FrameTable(id="policy-findings", classes="short-table")

    def on_mount(self) -> None:
        self._result = None

    @property
    def table(self) -> FrameTable:
        return self.query_one("#policy-table", FrameTable)

    def refresh_view(self, results: Results) -> None:
        notice = self.query_one(Notice)
        r = results.get("check")
        if r is None:
            notice.say(self.state_text(results, "check"), "error" if "check" in results.errors else "computing")
            return
        notice.say("Recomputing…" if "check" in results.pending else None, "stale")
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
        title = self.query_one("#policy-behind-title", Static)
        if rule.findings:
            title.update(f"Behind {rule.rule} ({status_word(rule.status)}): {len(rule.findings)} group(s), "
                         f"{len(rule.holdings)} holding(s)")
        else:
            title.update(f"{rule.rule}: {status_word(rule.status)}, nothing near its limit")
        self.query_one("#policy-findings", FrameTable).show(findings_frame(rule), keep_place=False)

    def on_frame_table_row_highlighted(self, event: FrameTable.RowHighlighted) -> None:
        if event.table.id == "policy-table":
            self._behind()

    def check_action(self, action: str, parameters) -> bool | None:
        if action == "behind":
            return self._result is not None and self.table.current_row is not None
        return True

    def action_behind(self) -> None:
        self._behind()
        findings = self.query_one("#policy-findings", FrameTable)
        (self.table if findings.has_focus else findings).focus()
