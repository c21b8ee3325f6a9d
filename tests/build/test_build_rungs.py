"""Rung specifications: even ladders, explicit tenors, the default, and refused input."""

import datetime as dt

import numpy as np
import pytest

from ladder.build.rungs import make_rungs, parse_months
from ladder.errors import InputError
from ladder.policy.model import MaturityLimit, Policy, PortfolioRules

SETTLE = dt.date(2026, 11, 30)   # a month end: rung ends follow the end-of-month rule


def policy(limit=None):
    return Policy("p", "1", dt.date(2026, 1, 1), portfolio=PortfolioRules(max_maturity=limit))


FIVE_YEARS = MaturityLimit(5, "years", "portfolio.max_maturity_years")


@pytest.mark.parametrize("spec, months", [
    ("12x3M", [3 * k for k in range(1, 13)]),
    ("5x1Y", [12, 24, 36, 48, 60]),
    ("3M,6M,1Y,2Y", [3, 6, 12, 24]),
    (" 4 x 6m ", [6, 12, 18, 24]),
])
def test_specifications_parse(spec, months):
    assert parse_months(spec) == months


def test_rung_ends_are_month_ends_and_inclusive():
    r = make_rungs("3M,6M,1Y", policy(FIVE_YEARS), SETTLE)
    assert list(r.ends.astype(str)) == ["2027-02-28", "2027-05-31", "2027-11-30"]
    assert r.labels == ("0-3M", "3M-6M", "6M-1Y")
    index = r.index(np.array(["2027-02-28", "2027-03-01", "2027-11-30", "2027-12-01"], dtype="datetime64[D]"))
    assert list(index) == [0, 1, 2, -1]


def test_default_is_yearly_to_the_policy_maximum():
    assert make_rungs(None, policy(FIVE_YEARS), SETTLE).spec == "5x1Y"
    assert make_rungs(None, policy(MaturityLimit(397, "days", "k")), SETTLE).spec == "4x3M"
    assert make_rungs(None, policy(), SETTLE).spec == "5x1Y"


@pytest.mark.parametrize("spec, words", [
    ("abc", "not a tenor"), ("3x0M", "not a tenor"), ("1Y,6M", "must increase"), ("0x1Y", "at least 1"),
    ("3M,,1Y", "not a rung specification"), ("6x1Y", "past the policy's maximum maturity"),
])
def test_bad_specifications_are_refused(spec, words):
    with pytest.raises(InputError) as error:
        make_rungs(spec, policy(FIVE_YEARS), SETTLE)
    assert words in str(error.value) and str(error.value).startswith("--rungs:")
