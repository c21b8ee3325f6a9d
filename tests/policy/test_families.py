"""Issuer families: issuer limits measured on a parent with its affiliates (``issuers.csv``), or per
single issuer where a rule says ``per = "issuer"``; shares checked against a pandas groupby."""

from __future__ import annotations

import dataclasses

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings, strategies as st

from ladder.book.families import Families, read_families
from ladder.errors import InputError
from ladder.policy.checker import check
from policy_books import book, holding, measures, policy

ISSUERS = ["Norr Inc", "Norr Funding LLC", "Kest Rail", "Kest Capital", "Grey Bank", "grey  bank sweep", "Solo"]
PARENTS = {"norr funding llc": "Norr Inc", "kest capital": "Kest Rail", "grey bank sweep": "Grey Bank"}
FAMILIES = Families(PARENTS, {"norr inc": "Norr Inc", "kest rail": "Kest Rail", "grey bank": "Grey Bank",
                              "norr funding llc": "Norr Funding LLC", "kest capital": "Kest Capital",
                              "grey bank sweep": "Grey Bank sweep"})
CAP = """
[portfolio]
issuer_max_pct = 5
"""


def _measures(h):
    m = measures(h)
    return dataclasses.replace(m, family=FAMILIES.families(h.issuer))


rows = st.lists(st.tuples(st.sampled_from(ISSUERS), st.floats(1e5, 1e7)), min_size=1, max_size=25)


@settings(max_examples=40, deadline=None)
@given(rows)
def test_family_shares_match_a_pandas_groupby(data):
    h = book([holding(f"H{i}", issuer=iss, face=face) for i, (iss, face) in enumerate(data)])
    result = check(policy(CAP), _measures(h)).rule("portfolio.issuer_max_pct")
    # Reference: a plain pandas groupby on the parent (names matched ignoring case and spacing).
    frame = pd.DataFrame({"issuer": [i for i, _ in data], "face": [f for _, f in data]})
    key = frame.issuer.map(lambda x: " ".join(x.split()).casefold())
    frame["family"] = key.map(lambda k: PARENTS.get(k, k).casefold())
    shares = 100 * frame.groupby("family").face.sum() / frame.face.sum()
    assert result.actual == pytest.approx(shares.max(), rel=1e-12, abs=1e-12)   # float sums in another order
    flagged = {f.group.casefold(): f.actual for f in result.findings}
    for family, share in shares.items():
        if share >= 4.5:                                   # near or over the 5% cap: listed
            assert flagged[family] == pytest.approx(share, rel=1e-12, abs=1e-12)


def test_planted_family_over_the_cap_while_each_member_is_under():
    # Grey Bank 4% + its sweep 3% = 7% of the book; every other issuer 93 / 31 = 3%.
    rows = [holding("G1", issuer="Grey Bank", face=4.0), holding("G2", issuer="Grey Bank sweep", face=3.0)]
    rows += [holding(f"O{i}", issuer=f"Other {i}", face=3.0) for i in range(31)]
    h = book(rows)
    family = check(policy(CAP), _measures(h)).rule("portfolio.issuer_max_pct")
    assert (family.status, family.group, family.per) == ("breach", "Grey Bank", "family")
    assert family.actual == pytest.approx(7.0, rel=1e-12, abs=0)   # hand arithmetic: (4 + 3) / 100
    assert family.members == ("Grey Bank", "Grey Bank sweep")
    assert set(family.holdings) == {"G1", "G2"}
    per_issuer = policy(CAP + '[rules."portfolio.issuer_max_pct"]\nper = "issuer"\n')
    single = check(per_issuer, _measures(h)).rule("portfolio.issuer_max_pct")
    assert (single.status, single.per) == ("pass", "issuer")
    assert single.actual == pytest.approx(4.0, rel=1e-12, abs=0)   # the largest single issuer


def test_a_named_issuer_cap_covers_its_family():
    h = book([holding("G1", issuer="Grey Bank", face=4.0), holding("G2", issuer="Grey Bank sweep", face=3.0),
              holding("O1", issuer="Other", face=93.0)])
    p = policy('[issuers."Grey Bank"]\nmax_pct = 6\n')
    r = check(p, _measures(h)).rule('issuers."Grey Bank".max_pct')
    assert r.status == "breach" and r.actual == pytest.approx(7.0, rel=1e-12, abs=0)


def _write(tmp_path, text):
    path = tmp_path / "issuers.csv"
    path.write_text(text)
    return path


def test_issuers_file_chains_to_the_top_parent(tmp_path):
    f = read_families(_write(tmp_path, "issuer,parent\nA Funding,A Inc\nA Inc,A Group\n"))
    assert list(f.families(np.array(["a funding", "A Inc", "B"], dtype=object))) == ["A Group", "A Group", "B"]


@pytest.mark.parametrize("text, where, words", [
    ("issuer,parent\nA,P\nA,Q\n", (3, 2), "already has the parent P"),
    ("issuer,parent\nA,B\nB,C\nC,A\n", (2, 2), "a cycle of parents"),
    ("issuer,parent\nA,a\n", (2, 2), "its own parent"),
    ("issuer,parent\nA,\n", (2, 2), "parent is empty"),
    ("issuer,boss\nA,B\n", (1, 2), "unknown column"),
])
def test_bad_issuers_files_are_refused_with_their_place(tmp_path, text, where, words):
    path = _write(tmp_path, text)
    with pytest.raises(InputError) as error:
        read_families(path)
    found = [(p.row, p.column, p.message) for p in error.value.problems]
    assert any((row, col) == where and words in message for row, col, message in found), found
