"""What-if before a trade: statuses before and after, the breach rule for trades, and attribution."""

from __future__ import annotations

import numpy as np
import pytest

from ladder.book.holdings import Holdings
from ladder.policy.trades import Trades, apply_trades
from ladder.policy.whatif import check_trades
from policy_books import HEAD, book, holding, measures, policy

POLICY = """
[portfolio]
issuer_max_pct = 30
liquidity = [{ within_days = 90, min_pct = 20 }]

[sectors.treasury]
issuer_cap_exempt = true

[sectors.corporate]
max_pct = 50
min_long_rating = "A-"
"""
AT_PURCHASE = HEAD + 'testing = "at_purchase"\n'

BOOK = [
    holding("T1", sector="treasury", issuer="US Treasury", maturity="2025-03-31"),
    holding("T2", sector="treasury", issuer="US Treasury", maturity="2025-04-30"),
    holding("T3", sector="treasury", issuer="US Treasury", maturity="2027-01-31"),
    holding("C1", issuer="Acme", maturity="2026-06-30"),
    holding("C2", issuer="Beta", maturity="2026-06-30"),
]


def trades(buys=(), sells=()) -> Trades:
    """Buys are new rows; sells are (id, face) against BOOK."""
    parts, actions = [], []
    if buys:
        parts.append(book(list(buys)))
        actions += ["buy"] * len(buys)
    for hid, face in sells:
        row = dict(next(r for r in BOOK if r["id"] == hid), face=face)
        parts.append(book([row]))
        actions.append("sell")
    rows = Holdings.concat(parts)
    rows = Holdings(**{**rows.__dict__, "row": np.arange(2, len(rows) + 2)})
    return Trades(rows, np.array(actions, dtype=object), "trades.csv")


def what_if(t: Trades, head=HEAD, body=POLICY):
    before = book(BOOK)
    return check_trades(policy(body, head), measures(before), measures(apply_trades(before, t)), t)


def change(result, rule):
    return next(c for c in result.changes if c.rule == rule)


def test_buy_that_comes_close_to_a_cap_is_near_not_breach():
    t = trades(buys=[holding("C3", issuer="Acme", maturity="2026-09-30"),
                     holding("T4", sector="treasury", issuer="US Treasury", maturity="2025-02-28")])
    result = what_if(t, head=AT_PURCHASE)
    c = change(result, "portfolio.issuer_max_pct")
    # Acme: 2 of 7 = 28.6% of a 30% cap: inside the 10% band, not over
    assert (c.before.status, c.after.status, c.new_breach, c.caused_by) == ("pass", "near", False, ())
    assert c.after.actual == pytest.approx(200 / 7, rel=1e-12, abs=0)
    assert result.new_breaches == ()


def test_trade_that_pushes_a_limit_is_a_breach_whatever_the_mode():
    t = trades(buys=[holding("C3", issuer="Acme", maturity="2026-09-30")])
    for head in (HEAD, AT_PURCHASE):
        c = change(what_if(t, head=head), "portfolio.issuer_max_pct")
        assert (c.before.status, c.after.status, c.new_breach) == ("pass", "breach", True)
        assert c.after.actual == pytest.approx(200 / 6, rel=1e-12, abs=0)
        assert set(c.after.holdings) == {"C1", "C3"}
        assert [x.id for x in c.caused_by] == ["C3"]
        assert (c.caused_by[0].action, c.caused_by[0].row) == ("buy", 2)


def test_drift_not_worsened_by_the_trades_stays_review():
    body = POLICY.replace("issuer_max_pct = 30", "issuer_max_pct = 15")   # Acme and Beta are 20% each already
    t = trades(buys=[holding("T4", sector="treasury", issuer="US Treasury", maturity="2025-02-28")])
    result = what_if(t, head=AT_PURCHASE, body=body)
    c = change(result, "portfolio.issuer_max_pct")
    assert (c.before.status, c.after.status, c.new_breach, c.caused_by) == ("review", "review", False, ())
    assert c.after.actual == pytest.approx(100 / 6, rel=1e-12, abs=0)


def test_drift_worsened_by_a_trade_becomes_a_breach():
    body = POLICY.replace("issuer_max_pct = 30", "issuer_max_pct = 15")
    t = trades(buys=[holding("C3", issuer="Beta", maturity="2026-09-30")])
    c = change(what_if(t, head=AT_PURCHASE, body=body), "portfolio.issuer_max_pct")
    assert (c.before.status, c.after.status, c.new_breach) == ("review", "breach", True)
    assert [x.id for x in c.caused_by] == ["C3"]
    # Acme (now 1/6) still drifts above 15% but the trade did not worsen it: it stays a review finding
    assert {f.group: f.status for f in c.after.findings} == {"Beta": "breach", "Acme": "review"}


def test_sell_that_breaks_a_liquidity_floor_is_named():
    t = trades(sells=[("T1", 1_000_000.0), ("C2", 400_000.0)])
    result = what_if(t)
    c = change(result, "portfolio.liquidity[0].min_pct")
    # within 90 days after the sales: T2 only, 1.0m of 3.6m = 27.8%, still above the 20% floor
    assert c.after.actual == pytest.approx(100 / 3.6, rel=1e-12, abs=0)
    assert c.after.status == "pass"
    t = trades(sells=[("T1", 1_000_000.0), ("T2", 500_000.0)])
    c = change(what_if(t), "portfolio.liquidity[0].min_pct")
    # half of T2 left: 0.5m of 3.5m = 14.3% (before: T1 and T2, 40%)
    assert (c.before.status, c.after.status, c.new_breach) == ("pass", "breach", True)
    assert c.after.actual == pytest.approx(50 / 3.5, rel=1e-12, abs=0)
    assert {x.id for x in c.caused_by} == {"T1", "T2"}    # undoing either sale lifts the floor


def test_rating_breach_of_a_buy_names_only_that_buy():
    t = trades(buys=[holding("C3", issuer="Gamma", rating="BBB", maturity="2026-09-30"),
                     holding("T4", sector="treasury", issuer="US Treasury", maturity="2026-02-27")])
    result = what_if(t)
    c = change(result, "sectors.corporate.min_long_rating")
    assert (c.after.status, c.after.holdings, [x.id for x in c.caused_by]) == ("breach", ("C3",), ["C3"])
    assert result.status == "breach" and result.before.status == "pass"
    assert [x.rule for x in result.new_breaches] == ["sectors.corporate.min_long_rating"]


def test_buying_a_downgraded_security_is_a_breach_even_with_a_good_rating_at_purchase():
    t = trades(buys=[holding("C3", issuer="Gamma", rating="BBB", rating_at_purchase="AA", maturity="2026-09-30")])
    c = change(what_if(t), "sectors.corporate.min_long_rating")
    assert (c.after.status, c.new_breach) == ("breach", True)


def test_sector_cap_breach_from_two_buys_names_both():
    t = trades(buys=[holding("C3", issuer="Gamma", maturity="2026-09-30"),
                     holding("C4", issuer="Delta", maturity="2026-09-30")])
    c = change(what_if(t), "sectors.corporate.max_pct")
    assert c.after.actual == pytest.approx(400 / 7, rel=1e-12, abs=0)
    assert {x.id for x in c.caused_by} == {"C3", "C4"}


def test_json_lists_every_rule_before_and_after():
    t = trades(buys=[holding("C3", issuer="Acme", maturity="2026-09-30")])
    data = what_if(t).to_json()
    assert (data["status"], data["status_before"]) == ("breach", "pass")
    assert data["trades"] == [{"id": "C3", "action": "buy", "row": 2}]
    rules = {r["rule"]: r for r in data["rules"]}
    assert set(rules) == {"portfolio.issuer_max_pct", "portfolio.liquidity[0].min_pct", "sectors",
                          "sectors.corporate.max_pct", "sectors.corporate.min_long_rating"}
    issuer = rules["portfolio.issuer_max_pct"]
    assert (issuer["before"]["status"], issuer["status"], issuer["new_breach"]) == ("pass", "breach", True)
    assert issuer["caused_by"] == [{"id": "C3", "action": "buy", "row": 2}]


def test_mismatched_dates_are_refused():
    before = book(BOOK)
    with pytest.raises(ValueError):
        check_trades(policy(POLICY), measures(before), measures(before, as_of=np.datetime64("2025-02-03")),
                     trades())
