"""The one number reader of every input file: thousands separators only in their places, bounds.

Source for the grouping rule: common practice in US financial documents (a comma every three digits
left of the decimal point, a point before the fraction); a comma anywhere else is refused because a
decimal comma ("5,5") and a misplaced separator ("10,000,00") cannot be told apart.
"""

import datetime as dt

import pytest
from hypothesis import given
from hypothesis import strategies as st

from ladder.book.cells import MAX_FACE, parse_number
from ladder.book.holdings_file import read_holdings
from ladder.errors import Problems

GOOD = [("10,000,000", 10_000_000.0), ("1,234.56", 1234.56), ("1,000", 1000.0), ("999", 999.0),
        ("-1,250.5", -1250.5), ("+3", 3.0), (".5", 0.5), ("2.", 2.0), ("1e6", 1e6), ("4.25", 4.25)]
BAD = [("5,5", "comma out of place"), ("10,000,00", "comma out of place"), ("1,0000", "comma out of place"),
       (",100", "comma out of place"), ("1,,000", "comma out of place"), ("12,34.5", "comma out of place"),
       ("1_000", "not a number"), ("abc", "not a number"), ("1.2.3", "not a number"), ("", "not a number"),
       ("1e999", "not a finite number"), ("nan", "not a number"), ("inf", "not a number"),
       ("1,000e3", "comma out of place")]


@pytest.mark.parametrize("text, value", GOOD)
def test_numbers_written_correctly_are_read_exactly(text, value):
    assert parse_number(text) == value      # exact: each is a short decimal float() reads the same


@pytest.mark.parametrize("text, words", BAD)
def test_misplaced_separators_and_non_numbers_are_refused_with_the_reason(text, words):
    with pytest.raises(ValueError, match=words):
        parse_number(text)


@given(st.integers(min_value=0, max_value=10**13))
def test_grouped_and_plain_forms_of_any_whole_amount_agree(n):
    # the law: grouping by thousands does not change the number
    assert parse_number(f"{n:,}") == parse_number(str(n)) == float(n)


def _face(tmp_path, text):
    path = tmp_path / "holdings.csv"
    path.write_text("id,sector,issuer,face,maturity_date,coupon_pct,price\n"
                    f'A1,agency,Invented Farm Credit Bank,"{text}",2029-03-15,4.25,99.5\n', encoding="utf-8")
    problems = Problems()
    holdings, _ = read_holdings(path, dt.date(2026, 11, 30), problems, label="holdings.csv")
    return holdings, [str(p) for p in problems.items]


@pytest.mark.parametrize("text, face", [("10,000,000", 1e7), ("1,234.56", 1234.56), ("10000000000000", MAX_FACE)])
def test_a_face_within_bounds_is_read(tmp_path, text, face):
    holdings, problems = _face(tmp_path, text)
    assert problems == [] and holdings.face[0] == face


@pytest.mark.parametrize("text, words", [("5,5", "comma out of place"), ("10,000,00", "comma out of place"),
                                         ("1e308", "out of range"), ("10000000000001", "out of range")])
def test_a_face_misread_or_beyond_1e13_is_refused_at_its_cell(tmp_path, text, words):
    holdings, problems = _face(tmp_path, text)
    assert holdings is None and len(problems) == 1
    assert problems[0].startswith("holdings.csv:2:4: face") and words in problems[0]


def test_a_yield_quote_outside_the_rate_range_is_refused(tmp_path):
    path = tmp_path / "holdings.csv"
    path.write_text("id,sector,issuer,face,maturity_date,coupon_pct,yield_pct\n"
                    "A1,agency,Invented Farm Credit Bank,1000000,2029-03-15,4.25,31\n", encoding="utf-8")
    problems = Problems()
    read_holdings(path, dt.date(2026, 11, 30), problems, label="holdings.csv")
    assert [str(p) for p in problems.items] == [
        "holdings.csv:2:7: yield_pct 31 is out of range; a rate in percent from -5 to 30"]
