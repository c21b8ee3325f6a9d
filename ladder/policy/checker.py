"""Grade every rule of a policy against a book: ``pass``, ``near``, ``review`` or ``breach``.

For each group a rule measures, headroom = limit - value for a maximum (value - limit for a minimum);
negative headroom is a violation (with a relative tolerance of 1e-9 for rounding). Each rule has a
testing mode (``Rule.testing``). A violation is:
- ``review`` under ``at_purchase`` testing when the holding met a rating minimum at purchase
  (``rating_at_purchase``) and was downgraded since;
- ``review`` under ``at_purchase`` testing when the rule is a share or an average that moves after
  purchase (sector, issuer and callable shares, liquidity floors, duration, WAM, cash-needs
  coverage): a drift;
- ``breach`` otherwise (maturities, ratings bought below the minimum, forbidden sectors, and every
  violation of a rule tested ``continuous``ly).
A group within its limit is ``near`` when the rule has a warning band and headroom is less than
(100 - near_pct)% of the limit's size; otherwise ``pass``. Ratings, maturities and forbidden sectors
have no ``near`` band.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.book.cash_needs import CashNeeds
from ladder.market import ratings
from ladder.policy.measures import PositionMeasures
from ladder.policy.model import Policy
from ladder.policy.results import BREACH, NEAR, REVIEW, STATUSES, CheckResult, Finding, RuleResult
from ladder.policy.rules import BookView, Measured, Rule, book_view, compile_rules

NEAR_CODE, REVIEW_CODE, BREACH_CODE = STATUSES.index(NEAR), STATUSES.index(REVIEW), STATUSES.index(BREACH)
_STATUS = np.array(STATUSES, dtype=object)


@dataclass(frozen=True, eq=False)
class Graded:
    """A rule's groups with their headroom and status codes (indices into ``STATUSES``)."""

    rule: Rule
    measured: Measured
    headroom: np.ndarray   # (g,)
    violated: np.ndarray   # (g,) bool
    codes: np.ndarray      # (g,) int

    @property
    def status(self) -> str:
        return STATUSES[int(self.codes.max())] if len(self.codes) else STATUSES[0]


def headroom(rule: Rule, m: Measured) -> np.ndarray:
    """Room left in each group, in the rule's unit (notches for ratings); negative = violated."""
    return m.limits - m.values if rule.upper else m.values - m.limits


def tolerance(limits: np.ndarray) -> np.ndarray:
    """Rounding allowance: 1e-9 of the limit's size (at least 1e-9)."""
    return 1e-9 * np.maximum(1.0, np.abs(limits))


def grade(policy: Policy, rule: Rule, m: Measured, escalate: np.ndarray | None = None) -> Graded:
    """Status of each group; ``escalate`` (g,) marks violations a proposed trade caused: breach."""
    head = headroom(rule, m)
    violated = head < -tolerance(m.limits)
    soft = (m.excused | rule.drifts) & (rule.testing == "at_purchase")
    if escalate is not None:
        soft = soft & ~escalate
    band = (1.0 - policy.near_pct / 100.0) * np.abs(m.limits)
    near = rule.warns & ~violated & (head < band)
    codes = np.where(violated, np.where(soft, REVIEW_CODE, BREACH_CODE), np.where(near, NEAR_CODE, 0))
    return Graded(rule, m, head, violated, codes.astype(np.int64))


def _display(rule: Rule, value: float):
    if rule.unit == "long_rating":
        return ratings.long_symbol(value)
    if rule.unit == "short_rating":
        return ratings.short_symbol(value)
    return float(value)


def _finite(x: float) -> float | None:
    return float(x) if np.isfinite(x) else None


def _members(member: np.ndarray, ids: np.ndarray, groups: np.ndarray) -> dict[int, tuple[str, ...]]:
    """Holding ids of each group in ``groups`` (grouped by one stable sort, not a loop per group)."""
    wanted = np.zeros(max(int(member.max(initial=-1)), int(groups.max(initial=-1))) + 2, bool)
    wanted[groups + 1] = True
    idx = np.flatnonzero(wanted[member + 1])
    idx = idx[np.argsort(member[idx], kind="stable")]
    codes, starts = np.unique(member[idx], return_index=True)
    return {int(c): tuple(part) for c, part in zip(codes, np.split(ids[idx], starts[1:]))}


def to_result(policy: Policy, g: Graded, view: BookView) -> RuleResult:
    """The RuleResult of graded groups: the worst group's figures, the holdings of every flagged group."""
    rule, m = g.rule, g.measured
    basis = policy.basis if rule.uses_basis else None
    if len(m.keys) == 0:
        actual = rule.empty_actual
        room = None if actual is None or isinstance(rule.limit, str) else _finite(
            (rule.limit - actual) if rule.upper else (actual - rule.limit))
        return RuleResult(rule.key, rule.text, rule.limit, actual, room, STATUSES[0], (), basis, rule.unit,
                          testing=rule.testing, per=rule.per)
    relative = g.headroom / np.maximum(np.abs(m.limits), 1e-12)
    order = np.lexsort((relative, -g.codes))
    flagged = order[g.codes[order] >= NEAR_CODE]
    members = _members(m.member, view.ids, flagged)
    rating_rule = rule.unit.endswith("_rating")
    findings = tuple(
        Finding(str(m.keys[i]), rule.limit if rating_rule else float(m.limits[i]), _display(rule, m.values[i]),
                _finite(g.headroom[i]), STATUSES[int(g.codes[i])], members.get(int(i), ()),
                () if m.members is None else m.members[i])
        for i in flagged)
    in_flagged = m.member >= 0
    in_flagged[in_flagged] = g.codes[m.member[in_flagged]] >= NEAR_CODE
    w = order[0]
    status = STATUSES[int(g.codes[w])]
    cure_by = None
    if status == REVIEW and policy.cure_days is not None:
        cure_by = (view.as_of + policy.cure_days).astype(object)
    return RuleResult(rule.key, rule.text, rule.limit if rating_rule else float(m.limits[w]),
                      _display(rule, m.values[w]), _finite(g.headroom[w]), status, tuple(view.ids[in_flagged]),
                      basis, rule.unit, findings, cure_by, rule.testing, rule.per,
                      () if m.members is None else m.members[w], str(m.keys[w]))


def summarize(policy: Policy, as_of, results) -> CheckResult:
    """A CheckResult from rule results; its status is the worst of them."""
    results = tuple(results)
    worst = max((STATUSES.index(r.status) for r in results), default=0)
    return CheckResult(np.datetime64(as_of, "D").astype(object), policy.name, policy.version, policy.adopted,
                       policy.basis, policy.testing, STATUSES[worst], results)


def check(policy: Policy, measures: PositionMeasures, cash_needs: CashNeeds | None = None) -> CheckResult:
    """Check every rule of ``policy`` on the book in ``measures`` (and its cash-needs forecast).

    Raises ``InputError`` when the book lacks data the policy's rules need (a value on the policy's
    basis, an effective duration, a cash-needs forecast)."""
    view = book_view(policy, measures, cash_needs)
    graded = [grade(policy, rule, rule.measure(view)) for rule in compile_rules(policy)]
    return summarize(policy, measures.as_of, (to_result(policy, g, view) for g in graded))
