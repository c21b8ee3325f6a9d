"""The rule checker on hand-built books: a compliant book passes every rule, and each planted breach
is found under the right rule id with the right holdings (and nothing else is flagged).

Book: ten holdings of 1,000,000 face each (market value = face), checked on 2025-01-31, so each
holding is exactly 10% of the portfolio and every expected share below is plain arithmetic.
"""

from __future__ import annotations

import datetime as dt

import numpy as np
import pytest

from ladder.book.cash_needs import CashNeeds
from ladder.errors import InputError
from ladder.policy.checker import check
from policy_books import AS_OF, HEAD, book, holding, measures, policy, principal_cash

POLICY = """
[portfolio]
max_effective_duration = 2.0
max_wam_days = 730
max_maturity_years = 5
issuer_max_pct = 15
callable_max_pct = 20
cash_needs_horizon_months = 3
liquidity = [{ within_days = 90, min_pct = 10 }]

[sectors.treasury]
issuer_cap_exempt = true
min_pct = 10

[sectors.agency]
max_pct = 50
callable_max_pct = 15

[sectors.corporate]
max_pct = 40
max_maturity_years = 3
min_long_rating = "A-"
issuer_max_pct = 15

[sectors.commercial_paper]
max_pct = 25
max_maturity_days = 270
min_short_rating = "A-1"
issuer_max_pct = 12

[sectors.fund]

[sectors.municipal]
allowed = false

[issuers."Big Agency"]
max_pct = 30
"""

BASE = [
    holding("T1", sector="treasury", issuer="US Treasury", maturity="2025-03-15", rating="AA+"),
    holding("T2", sector="treasury", issuer="US Treasury", maturity="2027-01-31", rating="AA+"),
    holding("A1", sector="agency", issuer="Big Agency", maturity="2027-06-30", rating="AA+"),
    holding("A2", sector="agency", issuer="Big Agency", maturity="2028-01-31", rating="AA+",
            first_call="2025-07-31", call_frequency=4, call_price=100.0),
    holding("A3", sector="agency", issuer="Other Agency", maturity="2026-06-30", rating="AA+"),
    holding("C1", sector="corporate", issuer="Acme Corp", maturity="2026-01-31", rating="AA"),
    holding("C2", sector="corporate", issuer="Beta Inc", maturity="2027-01-31", rating="A/A2"),
    holding("P1", sector="commercial_paper", issuer="Gamma Funding", kind="discount", maturity="2025-04-30",
            rating="", short_rating="A-1+"),
    holding("P2", sector="commercial_paper", issuer="Delta Funding", kind="discount", maturity="2025-03-31",
            rating="", short_rating="A-1/P-1"),
    holding("F1", sector="fund", issuer="Money Fund", kind="fund", maturity="2025-02-01", rating=""),
]
# Needs: 0.5m in February, 2.0m in March 2025 (coverage months are Feb, Mar, Apr: the check date is a month-end).
NEEDS = CashNeeds(np.array(["2025-02-14", "2025-03-14"], dtype="datetime64[D]"), np.array([500_000.0, 2_000_000.0]),
                  np.array(["tax", "notes"], dtype=object), np.array([2, 3]))


def rows(**changes):
    """BASE with fields changed by id: rows(C2={"rating": "BBB"}); extra rows via _add=[...]."""
    out = [dict(r, **changes.get(r["id"], {})) for r in BASE if r["id"] not in changes.get("_drop", ())]
    return out + list(changes.get("_add", []))


def run(rs=None, body=POLICY, head=HEAD, needs=NEEDS, **kw):
    h = book(rows() if rs is None else rs)
    kw.setdefault("cash", principal_cash(h))
    return check(policy(body, head), measures(h, **kw), needs)


def flagged(result):
    """{rule id: status} of every rule that is not pass."""
    return {r.rule: r.status for r in result.rules if r.status != "pass"}


def test_compliant_book_passes_every_rule():
    result = run()
    assert flagged(result) == {}
    assert result.status == "pass"
    # every rule written in POLICY is checked, plus the authorized-sectors rule
    assert len(result.rules) == 21


def test_shares_wam_duration_and_coverage_figures():
    result = run()
    assert result.rule("sectors.agency.max_pct").actual == pytest.approx(30.0, rel=1e-12, abs=0)
    assert result.rule("sectors.agency.max_pct").headroom == pytest.approx(20.0, rel=1e-12, abs=0)
    # US Treasury exempt, Big Agency named
    assert result.rule("portfolio.issuer_max_pct").actual == pytest.approx(10.0, rel=1e-12, abs=0)
    assert result.rule('issuers."Big Agency".max_pct').actual == pytest.approx(20.0, rel=1e-12, abs=0)
    assert result.rule("portfolio.liquidity[0].min_pct").actual == pytest.approx(40.0,
                                                                                 rel=1e-12, abs=0)   # T1, P1, P2, F1
    days = (np.array(["2025-03-15", "2027-01-31", "2027-06-30", "2028-01-31", "2026-06-30", "2026-01-31",
                      "2027-01-31", "2025-04-30", "2025-03-31"], dtype="datetime64[D]") - AS_OF).astype(int)
    assert result.rule("portfolio.max_wam_days").actual == pytest.approx((days.sum() + 1) / 10, rel=1e-12, abs=0)
    assert result.rule("portfolio.max_effective_duration").actual == pytest.approx(1.0, rel=1e-12, abs=0)
    cover = result.rule("portfolio.cash_needs_horizon_months")
    # tightest month is March: fund 1.0m + T1 and P2 maturing 2.0m = 3.0m against 2.5m of needs
    assert (cover.limit, cover.actual, cover.headroom) == (2_500_000.0, 3_000_000.0, 500_000.0)


def test_json_has_the_contract_fields():
    data = run().to_json()
    assert set(data) >= {"as_of", "status", "rules"}
    assert data["as_of"] == "2025-01-31"
    assert data["policy"] == {"name": "Test policy", "version": "1", "adopted": "2024-01-01", "basis": "market",
                              "testing": "continuous"}
    for rule in data["rules"]:
        assert set(rule) >= {"rule", "text", "limit", "actual", "headroom", "status", "holdings"}


# ---- planted breaches, one rule type each -------------------------------------------------------------

def test_effective_duration():
    result = run(duration=[1, 1, 1, 1, 1, 1, 12, 1, 1, 1])
    r = result.rule("portfolio.max_effective_duration")
    assert (r.status, r.actual, r.holdings) == ("breach", pytest.approx(2.1, rel=1e-12, abs=0), ("C2",))
    assert flagged(result) == {"portfolio.max_effective_duration": "breach"}


def test_weighted_average_maturity():
    result = run(body=POLICY.replace("max_wam_days = 730", "max_wam_days = 400"))
    r = result.rule("portfolio.max_wam_days")
    assert r.status == "breach"
    assert set(r.holdings) == {"T2", "A1", "A2", "A3", "C2"}   # each more than 400 days out
    assert flagged(result) == {"portfolio.max_wam_days": "breach"}


def test_portfolio_final_maturity_in_years():
    result = run(rows(_add=[holding("T3", sector="treasury", issuer="US Treasury", maturity="2030-02-01")]))
    r = result.rule("portfolio.max_maturity_years")
    # five calendar years from 2025-01-31 is 2030-01-31; one day more breaches
    assert (r.status, r.holdings, r.limit) == ("breach", ("T3",), 5.0)
    assert r.actual == pytest.approx(5.0 * (1827 / 1826), rel=1e-12, abs=0)
    assert flagged(result) == {"portfolio.max_maturity_years": "breach"}


def test_maturity_on_the_limit_date_passes():
    result = run(rows(_add=[holding("T3", sector="treasury", issuer="US Treasury", maturity="2030-01-31")]))
    assert result.rule("portfolio.max_maturity_years").status == "pass"


def test_default_issuer_cap():
    result = run(rows(_add=[holding("A4", sector="agency", issuer="other  AGENCY", maturity="2026-03-31")]))
    r = result.rule("portfolio.issuer_max_pct")
    assert (r.status, set(r.holdings)) == ("breach", {"A3", "A4"})    # names match ignoring case and spacing
    assert r.actual == pytest.approx(200 / 11, rel=1e-12, abs=0)
    assert [f.group for f in r.findings] == ["Other Agency"]
    assert flagged(result) == {"portfolio.issuer_max_pct": "breach"}


def test_named_issuer_override():
    extra = [holding(f"A{i}", sector="agency", issuer="Big Agency", maturity="2026-09-30") for i in (5, 6)]
    result = run(rows(_add=extra))
    r = result.rule('issuers."Big Agency".max_pct')
    assert (r.status, set(r.holdings)) == ("breach", {"A1", "A2", "A5", "A6"})
    assert r.actual == pytest.approx(400 / 12, rel=1e-12, abs=0)
    assert flagged(result) == {'issuers."Big Agency".max_pct': "breach"}


def test_exempt_named_issuer_is_left_out_of_the_default_cap():
    body = POLICY.replace('[issuers."Big Agency"]\nmax_pct = 30', '[issuers."Big Agency"]\nexempt = true')
    extra = [holding(f"A{i}", sector="agency", issuer="Big Agency", maturity="2026-09-30") for i in (5, 6)]
    result = run(rows(_add=extra), body=body)
    assert result.rule("portfolio.issuer_max_pct").status == "pass"
    assert not any(r.rule.startswith("issuers.") for r in result.rules)


def test_portfolio_callables():
    call = dict(first_call="2025-07-31", call_frequency=2, call_price=100.0)
    result = run(rows(C1=call, C2=call))
    r = result.rule("portfolio.callable_max_pct")
    assert (r.status, set(r.holdings), r.actual) == ("breach", {"A2", "C1", "C2"}, pytest.approx(30.0,
                                                                                                 rel=1e-12, abs=0))
    assert flagged(result) == {"portfolio.callable_max_pct": "breach"}


def test_sector_callables():
    result = run(rows(A3=dict(first_call="2025-07-31", call_frequency=0, call_price=100.0)))
    r = result.rule("sectors.agency.callable_max_pct")
    assert (r.status, set(r.holdings)) == ("breach", {"A2", "A3"})
    assert flagged(result) == {"sectors.agency.callable_max_pct": "breach", "portfolio.callable_max_pct": "near"}


def test_liquidity_floor():
    result = run(body=POLICY.replace("min_pct = 10 }", "min_pct = 50 }"))
    r = result.rule("portfolio.liquidity[0].min_pct")
    assert (r.status, r.limit, r.actual, r.headroom) == ("breach", 50.0, pytest.approx(40.0, rel=1e-12, abs=0),
                                                          pytest.approx(-10.0, rel=1e-12, abs=0))
    assert r.holdings == ()
    assert flagged(result) == {"portfolio.liquidity[0].min_pct": "breach"}


def test_cash_needs_coverage():
    needs = CashNeeds(np.array(["2025-02-14", "2025-03-14", "2025-04-30"], dtype="datetime64[D]"),
                      np.array([500_000.0, 5_000_000.0, -1_000_000.0]), np.array(["a", "b", "c"], dtype=object),
                      np.array([2, 3, 4]))
    result = run(needs=needs)
    r = result.rule("portfolio.cash_needs_horizon_months")
    assert r.status == "breach"
    # March: 3.0m available against 5.5m needed; April: 4.0m (P1 matures) against 4.5m (an inflow of 1.0m)
    assert [(f.group, f.limit, f.actual) for f in r.findings] == [
        ("2025-03", 5_500_000.0, 3_000_000.0), ("2025-04", 4_500_000.0, 4_000_000.0)]
    assert flagged(result) == {"portfolio.cash_needs_horizon_months": "breach"}


def test_coverage_near_when_cushion_is_thin():
    needs = CashNeeds(np.array(["2025-03-03"], dtype="datetime64[D]"), np.array([2_800_000.0]),
                      np.array(["x"], dtype=object), np.array([2]))
    assert flagged(run(needs=needs)) == {"portfolio.cash_needs_horizon_months": "near"}   # 3.0m vs 2.8m: 7% cushion


def test_sector_not_named_in_the_policy():
    result = run(rows(_add=[holding("D1", sector="cd", issuer="Bank", kind="at_maturity", maturity="2025-06-30")]))
    r = result.rule("sectors")
    assert (r.status, r.holdings, [f.group for f in r.findings]) == ("breach", ("D1",), ["cd"])
    assert flagged(result) == {"sectors": "breach"}


def test_forbidden_sector():
    result = run(rows(_add=[holding("M1", sector="municipal", issuer="City", maturity="2026-06-30")]))
    r = result.rule("sectors.municipal.allowed")
    assert (r.status, r.holdings, r.limit) == ("breach", ("M1",), 0.0)
    assert flagged(result) == {"sectors.municipal.allowed": "breach"}


def test_sector_cap_near_then_breach():
    corp = [holding(f"C{i}", sector="corporate", issuer=f"Corp {i}", maturity="2026-06-30") for i in range(3, 7)]
    near = run(rows(_add=corp[:3]))
    assert flagged(near) == {"sectors.corporate.max_pct": "near"}               # 5/13 = 38.5% of a 40% cap
    breach = run(rows(_add=corp))
    r = breach.rule("sectors.corporate.max_pct")
    assert (r.status, set(r.holdings)) == ("breach", {"C1", "C2", "C3", "C4", "C5", "C6"})
    assert r.actual == pytest.approx(600 / 14, rel=1e-12, abs=0)


def test_sector_minimum():
    result = run(body=POLICY.replace("min_pct = 10\n", "min_pct = 25\n"))
    r = result.rule("sectors.treasury.min_pct")
    assert (r.status, r.actual, r.holdings) == ("breach", pytest.approx(20.0, rel=1e-12, abs=0), ())
    assert flagged(result) == {"sectors.treasury.min_pct": "breach"}


def test_sector_maturity_in_years():
    result = run(rows(C1={"maturity": "2028-02-01"}))
    r = result.rule("sectors.corporate.max_maturity_years")
    assert (r.status, r.holdings) == ("breach", ("C1",))
    assert flagged(result) == {"sectors.corporate.max_maturity_years": "breach"}


def test_sector_maturity_in_days():
    february = CashNeeds(NEEDS.date[:1], NEEDS.amount[:1], NEEDS.label[:1], NEEDS.row[:1])
    result = run(rows(P2={"maturity": "2025-12-31"}), needs=february)   # P2 no longer pays March's needs
    r = result.rule("sectors.commercial_paper.max_maturity_days")
    assert (r.status, r.holdings, r.actual, r.limit) == ("breach", ("P2",), 334.0, 270.0)
    assert flagged(result) == {"sectors.commercial_paper.max_maturity_days": "breach"}


@pytest.mark.parametrize("rating", ["BBB+", "Baa1", "A-/BBB+", ""])
def test_long_rating_below_minimum_is_a_breach(rating):
    result = run(rows(C2={"rating": rating}))
    r = result.rule("sectors.corporate.min_long_rating")
    assert (r.status, r.holdings, r.limit) == ("breach", ("C2",), "A-")
    assert r.actual == ("unrated" if rating == "" else "BBB+")
    assert flagged(result) == {"sectors.corporate.min_long_rating": "breach"}


def test_downgrade_since_purchase_is_review_with_cure_date():
    head = HEAD + "cure_days = 30\n"
    result = run(rows(C2={"rating": "BBB+", "rating_at_purchase": "A"}), head=head)
    r = result.rule("sectors.corporate.min_long_rating")
    assert (r.status, r.holdings, r.cure_by) == ("review", ("C2",), dt.date(2025, 3, 2))
    assert result.status == "review"


def test_bought_below_minimum_stays_a_breach():
    result = run(rows(C2={"rating": "BBB", "rating_at_purchase": "BBB+"}))
    assert result.rule("sectors.corporate.min_long_rating").status == "breach"


def test_short_rating():
    assert run(rows(P2={"short_rating": "P-1"})).rule("sectors.commercial_paper.min_short_rating").status == "pass"
    result = run(rows(P2={"short_rating": "A-2/P-1"}))        # split rating: the lowest is A-2
    r = result.rule("sectors.commercial_paper.min_short_rating")
    assert (r.status, r.holdings, r.actual) == ("breach", ("P2",), "A-2")
    downgraded = run(rows(P2={"short_rating": "A-2", "rating_at_purchase": "A-1"}))
    assert downgraded.rule("sectors.commercial_paper.min_short_rating").status == "review"


def test_issuer_cap_within_a_sector():
    result = run(body=POLICY.replace("issuer_max_pct = 12", "issuer_max_pct = 5"))
    r = result.rule("sectors.commercial_paper.issuer_max_pct")
    assert (r.status, set(r.holdings)) == ("breach", {"P1", "P2"})
    assert sorted(f.group for f in r.findings) == ["Delta Funding", "Gamma Funding"]
    assert flagged(result) == {"sectors.commercial_paper.issuer_max_pct": "breach"}


# ---- modes, bases, split rule -------------------------------------------------------------------------

def test_split_rule_middle_of_three():
    three = rows(C2={"rating": "A/BBB+/A-"})
    assert run(three).rule("sectors.corporate.min_long_rating").status == "breach"      # lowest: BBB+
    middle = POLICY + '\n[ratings]\nsplit = "middle_of_three"\n'
    assert run(three, body=middle).rule("sectors.corporate.min_long_rating").status == "pass"   # middle: A-
    two = rows(C2={"rating": "A/BBB+"})
    assert run(two, body=middle).rule("sectors.corporate.min_long_rating").status == "breach"   # two: the lower


def test_percentage_basis_is_the_policys():
    values = np.full(10, 1_000_000.0)
    values[7] = 3_000_000.0                                                            # P1 worth 3m
    market = run(market_value=values)
    r = market.rule("sectors.commercial_paper.max_pct")
    assert (r.status, r.basis, r.actual) == ("breach", "market", pytest.approx(400 / 12, rel=1e-12, abs=0))
    face = run(market_value=values, head=HEAD + 'basis = "face"\n')
    assert face.rule("sectors.commercial_paper.max_pct").status == "pass"
    assert face.rule("sectors.commercial_paper.max_pct").basis == "face"
    book_basis = run(book_value=values, head=HEAD + 'basis = "book"\n')
    assert book_basis.rule("sectors.commercial_paper.max_pct").status == "breach"


def test_at_purchase_testing_reviews_drift_but_not_maturity_or_coverage():
    head = HEAD + 'testing = "at_purchase"\n'
    corp = [holding(f"C{i}", sector="corporate", issuer=f"Corp {i}", maturity="2026-06-30") for i in range(3, 8)]
    result = run(rows(_add=corp + [holding("T3", sector="treasury", issuer="US Treasury", maturity="2031-01-31")]),
                 head=head)
    assert result.rule("sectors.corporate.max_pct").status == "review"
    assert result.rule("portfolio.max_maturity_years").status == "breach"
    needs = CashNeeds(np.array(["2025-03-14"], dtype="datetime64[D]"), np.array([9e6]), np.array(["x"], dtype=object),
                      np.array([2]))
    assert run(head=head, needs=needs).rule("portfolio.cash_needs_horizon_months").status == "breach"


def test_missing_basis_value_is_an_input_error():
    values = np.full(10, 1_000_000.0)
    values[4] = np.nan
    with pytest.raises(InputError) as err:
        run(book_value=values, head=HEAD + 'basis = "book"\n')
    assert str(err.value) == "holdings.csv:6:0: A3: no book value (the policy's percentage basis)"


def test_coverage_without_a_forecast_is_an_input_error():
    with pytest.raises(InputError) as err:
        run(needs=None)
    line = 1 + HEAD.count("\n") + POLICY.splitlines().index("cash_needs_horizon_months = 3")
    assert str(err.value) == (f"policy.toml:{line}:0: portfolio.cash_needs_horizon_months: "
                              "the book has no cash-needs forecast to cover")


def test_policy_without_sectors_checks_no_sector_rules():
    result = run(body="[portfolio]\nissuer_max_pct = 25\n")
    assert [r.rule for r in result.rules] == ["portfolio.issuer_max_pct"]
    # US Treasury, Big Agency
    assert result.rule("portfolio.issuer_max_pct").actual == pytest.approx(20.0, rel=1e-12, abs=0)


def test_each_rule_has_its_testing_mode_and_may_change_it():
    # Defaults a treasurer expects (issue 16, common practice): liquidity, coverage, WAM and duration
    # continuous; ratings and maturities at purchase; shares follow the policy's own testing.
    head = HEAD + 'testing = "at_purchase"\n'
    result = run(head=head)
    modes = {r.rule: r.testing for r in result.rules}
    assert modes["portfolio.cash_needs_horizon_months"] == "continuous"
    assert modes["sectors.corporate.min_long_rating"] == "at_purchase"
    assert modes["sectors.commercial_paper.max_maturity_days"] == "at_purchase"
    assert modes["sectors.corporate.max_pct"] == "at_purchase"
    assert {r.rule: r.testing for r in run().rules}["sectors.corporate.max_pct"] == "continuous"
    # a downgrade since purchase: a review at purchase, a breach when the rule is tested continuously
    downgraded = rows(C2={"rating": "BBB+", "rating_at_purchase": "A"})
    assert run(downgraded).rule("sectors.corporate.min_long_rating").status == "review"
    strict = POLICY + '\n[rules."sectors.corporate.min_long_rating"]\ntesting = "continuous"\n'
    assert run(downgraded, body=strict).rule("sectors.corporate.min_long_rating").status == "breach"
