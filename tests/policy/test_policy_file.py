"""policy.toml: the documented example and the demo policy load; bad files are refused with every
problem at once, each with its key path, line and (for near-misspellings) a suggestion."""

from __future__ import annotations

from ladder.demo import demo_source

import datetime as dt
import re
from pathlib import Path

import pytest

from ladder.errors import InputError
from ladder.policy.model import MaturityLimit
from ladder.policy.policy_file import load_policy, parse_policy

ROOT = Path(__file__).resolve().parents[2]
HEAD = '[policy]\nname = "P"\nversion = "1"\nadopted = 2024-01-01\n'   # lines 1-4


def problems(text: str) -> list[str]:
    with pytest.raises(InputError) as err:
        parse_policy(text, "policy.toml")
    return [str(p) for p in err.value.problems]


def only(text: str) -> str:
    found = problems(text)
    assert len(found) == 1, found
    return found[0]


def test_documented_example_loads():
    doc = (ROOT / "docs" / "policy.md").read_text()
    example = re.search(r"```toml\n(.*?)```", doc, re.S).group(1)
    p = parse_policy(example, "docs/policy.md")
    assert (p.name, p.version, p.adopted) == ("Example Corp - Investment Policy for Operating and Reserve Cash",
                                              "2025.1", dt.date(2025, 3, 18))
    assert (p.basis, p.testing, p.near_pct, p.cure_days, p.split) == ("market", "at_purchase", 90.0, 30, "lowest")
    pf = p.portfolio
    assert (pf.max_effective_duration, pf.max_wam_days, pf.issuer_max_pct, pf.callable_max_pct,
            pf.cash_needs_horizon_months) == (2.5, 730.0, 5.0, 15.0, 12)
    assert pf.max_maturity == MaturityLimit(5.0, "years", "portfolio.max_maturity_years")
    assert [(f.within_days, f.min_pct, f.key) for f in pf.liquidity] == [
        (7, 10.0, "portfolio.liquidity[0].min_pct"), (90, 20.0, "portfolio.liquidity[1].min_pct")]
    assert [s.name for s in p.sectors] == ["treasury", "agency", "corporate", "commercial_paper", "fund", "municipal"]
    agency = p.sector("agency")
    assert (agency.max_pct, agency.min_pct, agency.issuer_max_pct, agency.callable_max_pct,
            agency.issuer_cap_exempt) == (40.0, 10.0, 15.0, 10.0, True)
    assert p.sector("municipal").allowed is False
    assert p.sector("commercial_paper").min_short_rating == "A-1"
    assert [(i.name, i.max_pct, i.exempt) for i in p.issuers] == [
        ("Northwind Bank", 3.0, False), ("Example Corp Pension Trust", None, True)]
    assert p.title == "Example Corp - Investment Policy for Operating and Reserve Cash, version 2025.1, adopted 2025-03-18"


def test_demo_policy_loads():
    p = load_policy(demo_source() / "policy.toml")
    assert p.testing == "at_purchase" and p.basis == "market"
    assert p.sector("commercial_paper").max_maturity == MaturityLimit(270, "days",
                                                                      "sectors.commercial_paper.max_maturity_days")


def test_lines_of_rule_ids():
    p = parse_policy(HEAD + '[sectors.corporate]\nmax_pct = 30\n\n[issuers."North Bank"]\nmax_pct = 2\n'
                            '[sectors.treasury]\n')
    assert p.line("sectors.corporate.max_pct") == 6
    assert p.line('issuers."North Bank".max_pct') == 9
    assert p.line("nothing") == 0


def test_every_problem_at_once_with_lines_and_suggestions():
    text = HEAD + '''basis = "markt"
near_pct = 190

[portfolio]
max_wam_dayz = 540
issuer_max_pct = "5"
max_maturity_years = 1.3

[sectors.corprate]
max_pct = 10

[sectors.commercial_paper]
max_pct = 150
max_maturity_days = -270
min_short_rating = "A1"
min_long_rating = "AAA+"
allowed = "yes"
'''
    assert problems(text) == [
        "policy.toml:5:1: policy.basis: 'markt' is not one of market, book, face (did you mean 'market'?)",
        "policy.toml:6:1: policy.near_pct: must be at most 100 (percent of a limit), got 190",
        "policy.toml:9:1: portfolio.max_wam_dayz: unknown key 'max_wam_dayz' in [portfolio] (did you mean 'max_wam_days'?)",
        "policy.toml:10:1: portfolio.issuer_max_pct: expected a number (percent of the portfolio, 0 to 100), "
        "got the text '5'",
        "policy.toml:11:1: portfolio.max_maturity_years: 1.3 years is not a whole number of months; "
        "use max_maturity_days instead",
        "policy.toml:13:1: sectors.corprate: unknown sector 'corprate' (did you mean 'corporate'?); sectors are "
        "treasury, agency, supranational, municipal, corporate, commercial_paper, cd, fund, deposit",
        "policy.toml:17:1: sectors.commercial_paper.max_pct: must be at most 100 (percent of the portfolio, 0 to 100), "
        "got 150",
        "policy.toml:18:1: sectors.commercial_paper.max_maturity_days: must be above 0 days, got -270",
        "policy.toml:19:1: sectors.commercial_paper.min_short_rating: 'A1' is a long-term rating "
        "(did you mean 'A-1' or 'A-1+'? or did you mean min_long_rating?)",
        "policy.toml:20:1: sectors.commercial_paper.min_long_rating: unknown long-term rating 'AAA+' "
        "(did you mean 'AAA' or 'AA+' or 'AA'?)",
        "policy.toml:21:1: sectors.commercial_paper.allowed: expected true or false, got the text 'yes'",
    ]


def test_dotted_and_inline_forms_are_located():
    text = 'sectors.corporate.max_pc = 5\nportfolio = { max_wam_days = 0 }\n' + HEAD   # top-level keys come first
    assert problems(text) == [
        "policy.toml:1:1: sectors.corporate.max_pc: unknown key 'max_pc' in [sectors.corporate] (did you mean 'max_pct'?)",
        "policy.toml:2:15: portfolio.max_wam_days: must be above 0 days, got 0",
    ]


def test_array_of_tables_liquidity():
    text = HEAD + '[[portfolio.liquidity]]\nwithin_days = 30\nmin_pct = 10\n[[portfolio.liquidity]]\nwithin_days = 30\nmin_pct = 101\n'
    assert problems(text) == [
        "policy.toml:10:1: portfolio.liquidity[1].min_pct: must be at most 100 (percent of the portfolio, 0 to 100), "
        "got 101",
    ]
    text = HEAD + '[portfolio]\nliquidity = [{ within_days = 30, min_pct = 10 }, { within_days = 30, min_pct = 20 }, { min_pct = 5 }]\n'
    assert problems(text) == [
        "policy.toml:6:52: portfolio.liquidity[1].within_days: a second floor for 30 days "
        "(the first is portfolio.liquidity[0])",
        "policy.toml:6:86: portfolio.liquidity[2]: missing 'within_days'",
    ]


@pytest.mark.parametrize("body, message", [
    ('[portfolio]\nmax_effective_duration = true\n',
     "policy.toml:6:1: portfolio.max_effective_duration: expected a number years, got true/false"),
    ('[portfolio]\nmax_maturity_days = 30.5\n',
     "policy.toml:6:1: portfolio.max_maturity_days: expected a whole number days, got 30.5"),
    ('[portfolio]\ncash_needs_horizon_months = 0\n',
     "policy.toml:6:1: portfolio.cash_needs_horizon_months: must be at least 1 months, got 0"),
    ('[portfolio]\nmax_maturity_days = 400\nmax_maturity_years = 1\n',
     "policy.toml:7:1: portfolio.max_maturity_years: give max_maturity_days or max_maturity_years, not both"),
    ('[ratings]\nsplit = "midle_of_three"\n',
     "policy.toml:6:1: ratings.split: 'midle_of_three' is not one of lowest, middle_of_three "
     "(did you mean 'middle_of_three'?)"),
    ('[ratings]\nsplt = "lowest"\n',
     "policy.toml:6:1: ratings.splt: unknown key 'splt' in [ratings] (did you mean 'split'?)"),
    ('[sectors]\ncorporate = 5\n', "policy.toml:6:1: sectors.corporate: expected a table [sectors.corporate], got a number"),
    ('[sectors.corporate]\nmin_long_rating = "A-1"\n',
     "policy.toml:6:1: sectors.corporate.min_long_rating: 'A-1' is a short-term rating (did you mean "
     "'A1' or 'A-' or 'Aa1'? or did you mean min_short_rating?)"),
    ('[issuers."Bank"]\nmax_pct = 5\nexempt = true\n',
     'policy.toml:7:1: issuers.Bank.exempt: an exempt issuer has no cap: give max_pct or exempt = true, not both'),
    ('[issuers."North Bank"]\n', 'policy.toml:5:1: issuers."North Bank": give the issuer\'s own cap (max_pct) or exempt = true'),
    ('[issuers."North Bank"]\nmax_pct = 5\n[issuers."north  bank"]\nmax_pct = 4\n',
     'policy.toml:7:1: issuers."north  bank": the same issuer as [issuers."North Bank"] '
     '(names match ignoring case and spacing)'),
])
def test_single_problems(body, message):
    assert only(HEAD + body) == message


def test_header_problems():
    assert problems('[portfolio]\nmax_wam_days = 10\n') == [
        "policy.toml:0:0: missing the [policy] table (name, version, adopted)"]
    assert problems('[policy]\nname = "P"\nadopted = "2024-01-01"\n') == [
        "policy.toml:1:1: policy: missing 'version' (text)",
        "policy.toml:3:1: policy.adopted: expected a date written without quotes such as adopted = 2025-01-15, "
        "got the text '2024-01-01'",
    ]
    assert problems('[policy]\nname = "P"\nversion = 2\nadopted = 2024-01-01T10:00:00\n') == [
        "policy.toml:3:1: policy.version: expected text, got a number",
        "policy.toml:4:1: policy.adopted: expected a date such as adopted = 2025-01-15, got a date and time",
    ]


def test_not_toml():
    assert problems(HEAD + "[portfolio\nmax = 1\n") == [
        "policy.toml:5:11: not valid TOML: Expected ']' at the end of a table declaration"]


@pytest.mark.parametrize("body, message", [
    ('[portfolio]\nmax_maturity_years = 3\n[sectors.corporate]\nmax_maturity_years = 5\n',
     "policy.toml:8:1: sectors.corporate.max_maturity_years: 5 years is longer than the portfolio maximum of "
     "3 years (portfolio.max_maturity_years, line 6)"),
    ('[portfolio]\nmax_maturity_years = 1\n[sectors.corporate]\nmax_maturity_days = 367\n',
     "policy.toml:8:1: sectors.corporate.max_maturity_days: 367 days is longer than the portfolio maximum of "
     "1 year (portfolio.max_maturity_years, line 6)"),
    ('[sectors.corporate]\nmax_pct = 20\nmin_pct = 30\n',
     "policy.toml:7:1: sectors.corporate.min_pct: the minimum 30% is above the maximum 20% (line 6)"),
    ('[sectors.corporate]\nmax_pct = 20\nissuer_max_pct = 25\n',
     "policy.toml:7:1: sectors.corporate.issuer_max_pct: 25% is above the sector's own cap of 20% (line 6), "
     "so it can never apply"),
    ('[sectors.agency]\nmax_pct = 20\ncallable_max_pct = 25\n',
     "policy.toml:7:1: sectors.agency.callable_max_pct: 25% is above the sector's own cap of 20% (line 6), "
     "so it can never apply"),
    ('[portfolio]\nissuer_max_pct = 5\n[sectors.commercial_paper]\nissuer_max_pct = 10\n',
     "policy.toml:8:1: sectors.commercial_paper.issuer_max_pct: 10% is above portfolio.issuer_max_pct = 5% "
     "(line 6), which also applies to these issuers; to let them go higher, set issuer_cap_exempt = true in "
     "this sector"),
    ('[sectors.municipal]\nallowed = false\nmin_pct = 5\n',
     "policy.toml:7:1: sectors.municipal.min_pct: a minimum of 5% in a sector that is not allowed"),
    ('[sectors.treasury]\nmin_pct = 60\n[sectors.agency]\nmin_pct = 50\n',
     "policy.toml:6:1: sectors.treasury.min_pct: the sector minimums add up to 110%, more than the whole portfolio"),
])
def test_contradictions(body, message):
    assert only(HEAD + body + "[sectors.cd]\n") == message    # an uncapped sector, so the caps can add up


def test_allowed_sector_caps_must_reach_the_whole_portfolio():
    assert only(HEAD + '[sectors.treasury]\nmax_pct = 50\n[sectors.agency]\nmax_pct = 40\n[sectors.cd]\n'
                       'allowed = false\n') == (
        "policy.toml:5:1: sectors: the caps of the allowed sectors (treasury, agency) add up to 90%: a fully "
        "invested portfolio cannot comply")


def test_unknown_top_level_key():
    assert only("x = 1\n" + HEAD) == "policy.toml:1:1: x: unknown key 'x' at the top of the file"


def test_exempt_sector_may_have_a_higher_issuer_cap():
    p = parse_policy(HEAD + '[portfolio]\nissuer_max_pct = 5\n[sectors.agency]\nissuer_cap_exempt = true\n'
                            'issuer_max_pct = 30\n')
    assert p.sector("agency").issuer_max_pct == 30.0


def test_load_policy_missing_file(tmp_path):
    with pytest.raises(InputError) as err:
        load_policy(tmp_path / "policy.toml")
    assert str(err.value).startswith(f"{tmp_path / 'policy.toml'}:0:0: cannot read the policy file")


@pytest.mark.parametrize("value", ["inf", "nan", "-inf"])
def test_a_whole_number_that_is_not_finite_is_a_problem_not_a_crash(value):
    # found by replacing every value of the demo policy with inf and nan (issue 13's fault hunt)
    text = f'[portfolio]\ncash_needs_horizon_months = {value}\n'
    with pytest.raises(InputError) as caught:
        parse_policy(text, "policy.toml")
    assert any("expected a finite number" in str(p) for p in caught.value.problems)
