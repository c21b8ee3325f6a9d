"""Laws of the builder on the small invented book (hypothesis, few examples: each is a full build).

Conservation of cash: what is bought costs exactly the cash (the fund takes the residual). Every built
ladder passes the policy check; more cash never lowers the income the relaxation can earn.
"""

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from build_books import RUNGS, make_book
from ladder.analysis.build import build_ladder
from ladder.analysis.check import check_proposed
from ladder.folder.book_file import load_book


@pytest.fixture(scope="module")
def small(tmp_path_factory):
    folder = make_book(tmp_path_factory.mktemp("props") / "book", duration=1.5, need=5_000_000)
    return folder, load_book(folder)


@settings(max_examples=6, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(cash=st.floats(min_value=6_000_000, max_value=14_000_000))
def test_cash_is_conserved_and_every_ladder_complies(small, cash):
    folder, book = small
    r = build_ladder(book, cash, rungs=RUNGS, offerings=folder / "offerings.csv")
    if r.status != "built":
        assert r.conflicts                        # a refusal always names what conflicts
        return
    assert r.invested == pytest.approx(cash, abs=0.01, rel=0)
    what_if = check_proposed(book, r.trades)
    assert what_if.check.status in ("pass", "near")   # at-all-times policy: no breach, no review
    more = build_ladder(book, cash + 1_000_000, rungs=RUNGS, offerings=folder / "offerings.csv")
    if more.relaxation.status == "optimal":
        assert more.relaxation.income >= r.relaxation.income - 1e-6
