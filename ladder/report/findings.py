"""Open findings of the month-end: cure dates fixed at first detection, overdue findings escalated.

A rule found ``review`` (past a limit after purchase: a downgrade or market movement) has the
policy's cure period (``cure_days``) to be resolved. The period runs from the first month-end at
which the finding was detected, not from each report's date: the history database
(``ladder.report.history.rule_statuses``) gives the unbroken run of earlier month-ends at which the
same rule was ``review`` or ``breach``, and the first of them is the date of detection. A finding
still open after its cure date is overdue and is escalated in the compliance certificate.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, replace

from ladder.policy.results import BREACH, REVIEW, CheckResult
from ladder.report import history
from ladder.report.model import Column, Table

OPEN = (REVIEW, BREACH)


@dataclass(frozen=True)
class OpenFinding:
    rule: str
    status: str
    holdings: tuple[str, ...]
    first_detected: dt.date
    cure_by: dt.date | None
    days_overdue: int             # 0 when not overdue

    @property
    def overdue(self) -> bool:
        return self.days_overdue > 0


def first_detected(runs: list[tuple[dt.date, dict[str, str]]], rule: str, as_of: dt.date) -> dt.date:
    """The first month-end of the unbroken run of ``runs`` (newest first) at which ``rule`` was open;
    ``as_of`` when it was not open at the last one."""
    first = as_of
    for day, statuses in runs:
        if statuses.get(rule) not in OPEN:
            break
        first = day
    return first


def open_findings(book_or_folder, check: CheckResult, cure_days: int | None) -> tuple[CheckResult, tuple[OpenFinding, ...]]:
    """``check`` with each review's cure date counted from its first detection, and every open finding."""
    runs = history.rule_statuses(book_or_folder, check.as_of)
    rules, found = [], []
    for r in check.rules:
        if r.status not in OPEN:
            rules.append(r)
            continue
        first = first_detected(runs, r.rule, check.as_of)
        cure_by = first + dt.timedelta(days=cure_days) if r.status == REVIEW and cure_days is not None else None
        overdue = max((check.as_of - cure_by).days, 0) if cure_by else 0
        rules.append(replace(r, cure_by=cure_by))
        found.append(OpenFinding(r.rule, r.status, r.holdings, first, cure_by, overdue))
    return replace(check, rules=tuple(rules)), tuple(found)


def escalation(f: OpenFinding) -> str:
    if f.overdue:
        return (f"OVERDUE by {f.days_overdue} day(s): the cure date {f.cure_by.isoformat()} has passed; escalate to "
                "whoever the policy names (investment committee or board) for a documented decision")
    if f.cure_by:
        return f"open: cure by {f.cure_by.isoformat()}"
    return "open: past the limit, to be cured"


FINDING_COLUMNS = (Column("rule", "Rule"), Column("status", "Status"), Column("holdings", "Holdings"),
                   Column("first_detected", "First detected", "date"), Column("cure_by", "Cure by", "date"),
                   Column("overdue", "Days overdue", "int"), Column("escalation", "Escalation"))


def findings_table(found: tuple[OpenFinding, ...]) -> Table:
    rows = tuple((f.rule, f.status, ", ".join(f.holdings), f.first_detected, f.cure_by, f.days_overdue, escalation(f))
                 for f in found)
    return Table("Open findings: cure dates from first detection", FINDING_COLUMNS, rows)
