"""Properties of the checker on random books, with a plain pandas groupby as the reference figure."""

from __future__ import annotations

import numpy as np
import pandas as pd
from hypothesis import given, settings, strategies as st

from ladder.policy.checker import check
from policy_books import book, holding, measures, policy

SECTORS = ["treasury", "agency", "corporate", "commercial_paper"]
ISSUERS = ["Acme", "Beta", "Gamma", "Delta", "acme "]

BODY = """
[portfolio]
issuer_max_pct = 25
[sectors.treasury]
issuer_cap_exempt = true
[sectors.agency]
max_pct = 40
[sectors.corporate]
max_pct = 30
issuer_max_pct = 10
[sectors.commercial_paper]
max_pct = 25
"""
POLICY = policy(BODY)

rows = st.lists(st.tuples(st.sampled_from(SECTORS), st.sampled_from(ISSUERS), st.floats(1e5, 1e7)),
                min_size=1, max_size=25)


def _book(data):
    return book([holding(f"H{i}", sector=s, issuer=iss, face=face) for i, (s, iss, face) in enumerate(data)])


@settings(max_examples=40, deadline=None)
@given(rows)
def test_shares_match_a_pandas_groupby(data):
    h = _book(data)
    result = check(POLICY, measures(h))
    frame = pd.DataFrame({"sector": h.sector, "issuer": [" ".join(i.split()).casefold() for i in h.issuer],
                          "value": h.face})
    pct = 100 * frame.groupby("sector")["value"].sum() / frame["value"].sum()
    for sector, cap in (("agency", 40), ("corporate", 30), ("commercial_paper", 25)):
        r = result.rule(f"sectors.{sector}.max_pct")
        share = pct.get(sector, 0.0)
        assert np.isclose(r.actual, share, rtol=1e-12, atol=0)
        assert (r.status == "breach") == (share > cap * (1 + 1e-9))
    others = frame[frame["sector"] != "treasury"]
    issuer_pct = 100 * others.groupby("issuer")["value"].sum() / frame["value"].sum()
    r = result.rule("portfolio.issuer_max_pct")
    assert np.isclose(r.actual, issuer_pct.max() if len(issuer_pct) else 0.0, rtol=1e-12, atol=0)
    over = set(issuer_pct[issuer_pct > 25 * (1 + 1e-9)].index)
    expected = {hid for hid, s, i in zip(h.id, frame["sector"], frame["issuer"]) if s != "treasury" and i in over}
    assert {hid for f in r.findings if f.status == "breach" for hid in f.holdings} == expected


@settings(max_examples=30, deadline=None)
@given(rows, st.integers(0, 24), st.floats(1.0, 10.0))
def test_adding_to_a_holding_never_lowers_its_sectors_share(data, which, factor):
    """Monotonicity: more face in one holding cannot reduce its sector's share or improve its status."""
    h = _book(data)
    i = which % len(h)
    bigger = h.face.copy()
    bigger[i] *= factor
    sector = h.sector[i]
    if sector == "treasury":
        return
    key = f"sectors.{sector}.max_pct"
    before = check(POLICY, measures(h)).rule(key)
    after = check(POLICY, measures(h, market_value=bigger)).rule(key)
    order = ["pass", "near", "review", "breach"]
    assert after.actual >= before.actual - 1e-9
    assert order.index(after.status) >= order.index(before.status)
