"""Candidates: generic ones priced at par from the curve and spread table, the policy's filters,
and offerings files refused whole with every problem."""

import numpy as np
import pytest

from build_books import DEMO, OFFERINGS, OFFERINGS_HEADER, make_book
from ladder.analysis.valuation import value_book
from ladder.folder.book_file import load_book
from ladder.build.candidates import eligible, fund_candidates, generic_candidates, read_offerings
from ladder.build.rungs import make_rungs
from ladder.errors import InputError
from ladder.market import ratings


@pytest.fixture(scope="module")
def demo():
    return load_book(DEMO)


@pytest.fixture(scope="module")
def generic(demo):
    rungs = make_rungs(None, demo.policy, demo.valuation_date)
    return rungs, eligible(demo.policy, generic_candidates(demo, rungs, demo.valuation_date), rungs,
                           demo.valuation_date)


def test_generic_candidates_are_labelled_and_priced_near_par(demo, generic):
    rungs, c = generic
    h = c.holdings
    assert c.generic.all() and all(i.startswith("GENERIC-") for i in h.id)
    assert all(i.startswith("generic ") for i in h.issuer)
    v = value_book(demo.with_holdings(h), demo.valuation_date)
    coupon_bearing = h.kind != "discount"
    # the coupon is rounded to 0.001%: at most 0.0005% a year off par, times the duration (< 5 years)
    assert np.all(np.abs(v.clean[coupon_bearing] - 100.0) < 0.0005 * 5.0 + 1e-9)
    assert set(rungs.index(h.maturity)) == set(range(len(rungs)))
    floor = (h.maturity - np.datetime64(demo.valuation_date)).astype(int) == 90   # portfolio.liquidity[1]
    assert floor.any() and all(i.endswith("-90D") for i in h.id[floor])


def test_generic_candidates_obey_the_policy_filters(demo, generic):
    _, c = generic
    h, p = c.holdings, demo.policy
    days = (h.maturity - np.datetime64(demo.valuation_date)).astype(int)
    cp = h.sector == "commercial_paper"
    assert cp.any() and days[cp].max() <= 270                         # sectors.commercial_paper.max_maturity_days
    corp = h.sector == "corporate"
    assert np.all(ratings.long_notches(h.rating[corp]) <= ratings.LONG_NOTCH["A-"])   # no BBB corporate
    assert not np.isin(h.rating[corp], ["BBB"]).any()
    # one BBB candidate a rung, and one at the 90-day liquidity floor's horizon
    assert dict(c.left_out)["sectors.corporate.min_long_rating"] == 6
    assert p.portfolio.max_maturity.days(demo.valuation_date) >= days.max()


def test_residual_goes_to_the_books_funds(demo):
    f = fund_candidates(demo, demo.valuation_date)
    assert list(f.holdings.id) == ["BUILD-DEMO-MMF-0901", "BUILD-DEMO-MMF-0902", "BUILD-DEMO-MMF-0903"]
    assert np.allclose(f.holdings.quote, [0.0361, 0.0358, 0.0355], rtol=1e-12, atol=0)


def test_offerings_read(tmp_path):
    folder = make_book(tmp_path / "b")
    c = read_offerings(folder / "offerings.csv", load_book(folder))
    assert list(c.holdings.id) == ["OF-BILL", "OF-CORP-Y", "OF-CORP-X", "OF-AGY", "OF-MMF"]
    assert list(c.min_lot[:4]) == [1e6, 2e6, 1e6, 1e6] and list(c.available[:4]) == [4e6, 3e6, 3e6, 3e6]
    assert not c.generic.any()


def test_bad_offerings_are_refused_with_every_problem(tmp_path):
    folder = make_book(tmp_path / "b")
    lines = OFFERINGS.strip().splitlines()
    no_quote = lines[2].replace(",100.20,", ",,")                       # OF-CORP-Y without its price
    bad_lot = lines[3].replace("3000000,1000000,1000000", "3000000,1500000,1000000")
    bad_face = lines[4].replace("3000000,1000000,1000000", "lots,1000000,1000000")
    held = lines[1].replace("OF-BILL", "SB-TSY-1")
    (folder / "offerings.csv").write_text("\n".join([lines[0], held, no_quote, bad_lot, bad_face]) + "\n")
    with pytest.raises(InputError) as error:
        read_offerings(folder / "offerings.csv", load_book(folder))
    text = str(error.value)
    assert "SB-TSY-1 is already in the book" in text
    assert "OF-CORP-Y has no quote" in text
    assert "not a whole number of lot_increment" in text
    assert "available_face 'lots' is not a positive face amount" in text
    assert len(error.value.problems) == 4


def test_offerings_need_the_lot_columns(tmp_path):
    folder = make_book(tmp_path / "b")
    header = OFFERINGS_HEADER.replace(",available_face,min_lot,lot_increment", "")
    row = OFFERINGS.strip().splitlines()[1].rsplit(",", 3)[0]
    (folder / "offerings.csv").write_text(header + "\n" + row + "\n")
    with pytest.raises(InputError) as error:
        read_offerings(folder / "offerings.csv", load_book(folder))
    assert sum("is missing" in p.message for p in error.value.problems) == 3
