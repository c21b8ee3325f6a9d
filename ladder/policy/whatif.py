"""What-if before a trade: every rule before and after the proposed trades, and which trades cause
each new breach.

A group (issuer, sector, holding, month, portfolio) that violates its limit after the trades is a
``breach`` whatever the policy's testing mode when the trades made it worse: it is new, or its
headroom shrank. A violation the trades did not worsen keeps the status the plain check gives it
(``review`` for drift under at_purchase testing, a downgrade since purchase).

Attribution: for each rule with such a breach, each traded id is taken out in turn (a buy removed, a
sell undone); the trades whose removal clears or eases one of the breaching groups are its causes.
When no single trade does (the trades only breach together), every trade is named.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ladder.book.cash_needs import CashNeeds
from ladder.policy.checker import grade, headroom, summarize, to_result, tolerance
from ladder.policy.measures import PositionMeasures
from ladder.policy.model import Policy
from ladder.policy.results import CheckResult, RuleResult, json_value
from ladder.policy.rules import BookView, Measured, Rule, book_view, compile_rules
from ladder.policy.trades import Trades


@dataclass(frozen=True)
class TradeRef:
    """One proposed trade: its id, action and row in the trades file."""

    id: str
    action: str
    row: int

    def to_json(self) -> dict:
        return {"id": self.id, "action": self.action, "row": self.row}


@dataclass(frozen=True)
class RuleChange:
    """One rule before and after the trades; ``caused_by`` names the trades behind a new breach."""

    rule: str
    before: RuleResult
    after: RuleResult
    new_breach: bool
    caused_by: tuple[TradeRef, ...] = ()

    def to_json(self) -> dict:
        before = self.before
        return {**self.after.to_json(),
                "before": {"limit": json_value(before.limit), "actual": json_value(before.actual),
                           "headroom": json_value(before.headroom), "status": before.status,
                           "holdings": list(before.holdings)},
                "new_breach": self.new_breach, "caused_by": [t.to_json() for t in self.caused_by]}


@dataclass(frozen=True)
class TradeCheck:
    """The check before and after the trades; ``status`` is the worst after them."""

    before: CheckResult
    after: CheckResult
    changes: tuple[RuleChange, ...]
    trades: tuple[TradeRef, ...]

    @property
    def status(self) -> str:
        return self.after.status

    @property
    def new_breaches(self) -> tuple[RuleChange, ...]:
        return tuple(c for c in self.changes if c.new_breach)

    def to_json(self) -> dict:
        after = self.after.to_json()
        return {"as_of": after["as_of"], "status": self.status, "status_before": self.before.status,
                "policy": after["policy"], "trades": [t.to_json() for t in self.trades],
                "rules": [c.to_json() for c in self.changes]}


def _lookup(keys_from: np.ndarray, values_from: np.ndarray, keys: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """``values_from`` at each of ``keys`` (by key), and whether the key was there."""
    source = keys_from.astype(str)
    order = np.argsort(source, kind="stable")
    ordered = source[order]
    wanted = keys.astype(str)
    pos = np.clip(np.searchsorted(ordered, wanted), 0, max(len(ordered) - 1, 0))
    found = (ordered[pos] == wanted) if len(ordered) else np.zeros(len(wanted), bool)
    values = values_from[order][pos] if len(ordered) else np.zeros(len(wanted))
    return values, found


def worsened(rule: Rule, before: Measured, after: Measured) -> np.ndarray:
    """(g_after,) True where a group violates after the trades and is new or has less headroom."""
    head = headroom(rule, after)
    tol = tolerance(after.limits)
    old, found = _lookup(before.keys, headroom(rule, before), after.keys)
    return (head < -tol) & (~found | (head < old - tol))


def _eases(rule: Rule, after: Measured, hit: np.ndarray, without: Measured) -> bool:
    """True when removing a trade clears or eases any of the ``hit`` groups of ``after``."""
    head = headroom(rule, after)[hit]
    keys = after.keys[hit]
    now, found = _lookup(without.keys, headroom(rule, without), keys)
    return bool(np.any(~found | (now > head + tolerance(after.limits[hit]))))


def check_trades(policy: Policy, before: PositionMeasures, after: PositionMeasures, trades: Trades,
                 cash_needs: CashNeeds | None = None) -> TradeCheck:
    """Every rule before and after ``trades``; ``after`` are the measures of
    ``apply_trades(before.holdings, trades)`` valued on the same date (same coverage months)."""
    if before.as_of != after.as_of or before.months != after.months:
        raise ValueError("before and after must share as_of and the number of coverage months")
    refs = tuple(TradeRef(str(trades.holdings.id[i]), str(trades.action[i]), int(trades.holdings.row[i]))
                 for i in range(len(trades)))
    view_before = book_view(policy, before, cash_needs)
    view_after = book_view(policy, after, cash_needs)
    without: dict[str, BookView] = {}

    def view_without(trade_id: str) -> BookView:
        if trade_id not in without:
            without[trade_id] = book_view(policy, after.with_rows_of(before, [trade_id]), cash_needs)
        return without[trade_id]

    results_before, results_after, changes = [], [], []
    for rule in compile_rules(policy):
        m_before, m_after = rule.measure(view_before), rule.measure(view_after)
        hit = worsened(rule, m_before, m_after)
        r_before = to_result(policy, grade(policy, rule, m_before), view_before)
        r_after = to_result(policy, grade(policy, rule, m_after, escalate=hit), view_after)
        causes: tuple[TradeRef, ...] = ()
        if hit.any():
            ids = list(dict.fromkeys(t.id for t in refs))
            guilty = {i for i in ids if _eases(rule, m_after, hit, rule.measure(view_without(i)))}
            causes = tuple(t for t in refs if t.id in guilty) or refs
        results_before.append(r_before)
        results_after.append(r_after)
        changes.append(RuleChange(rule.key, r_before, r_after, bool(hit.any()), causes))
    return TradeCheck(summarize(policy, before.as_of, results_before), summarize(policy, after.as_of, results_after),
                      tuple(changes), refs)
