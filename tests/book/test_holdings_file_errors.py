"""Bad holdings files are refused whole, every problem reported at once as file:row:column.

Source: issue 2's "Bad input" contract and docs/formats.md ("Validation: the whole book or nothing":
the header is row 1, the first data row is row 2, the first column is column 1; a whole-file problem
has row/column 0).
"""

import datetime as dt

import numpy as np
import openpyxl  # a dependency of ladder itself: missing, this fails, not skips
import pytest

from ladder.book.holdings_file import COLUMNS, read_holdings
from ladder.errors import Problems

VALUATION = dt.date(2026, 11, 30)
HEADER = "id,sector,issuer,face,maturity_date,coupon_pct,price,yield_pct,rating"
GOOD = "A1,agency,Invented Farm Credit Bank,1000000,2029-03-15,4.25,99.5,,AA+"
# (row text, row number, column number, words the message must contain)
BAD_ROWS = [
    ("A2,agency,Invented Farm Credit Bank,1000000,2029-02-30,4.25,99.5,,AA+", 3, 5, ["'2029-02-30' is not a date", "YYYY-MM-DD"]),
    ("A3,agency,Invented Farm Credit Bank,1000000,2026-06-15,4.25,99.5,,AA+", 4, 5, ["not after the valuation date 2026-11-30"]),
    ("A4,agency,Invented Farm Credit Bank,-250000,2029-03-15,4.25,99.5,,AA+", 5, 4, ["face -250000", "positive"]),
    ("A5,corporate,Invented Pump Works,1000000,2029-03-15,0.045,99.5,,A", 6, 6, ["looks like a fraction", "4.5"]),
    ("A6,tresury,US Treasury,1000000,2029-03-15,4.25,99.5,,AA+", 7, 2, ["unknown sector 'tresury'", "did you mean 'treasury'"]),
    ("A7,agency,Invented Farm Credit Bank,1000000,2029-03-15,4.25,99.5,,AAA+", 8, 9, ["rating 'AAA+'"]),
    ("A1,agency,Invented Farm Credit Bank,1000000,2030-03-15,4.25,99.5,,AA+", 9, 1, ["duplicate id 'A1'", "row 2"]),
    ("A9,agency,Invented Farm Credit Bank,1000000,2029-03-15,4.25,99.5,4.1,AA+", 10, 8, ["two quotes", "price and yield_pct"]),
]


def write(tmp_path, lines, name="holdings.csv"):
    path = tmp_path / name
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def read(path):
    problems = Problems()
    holdings, _ = read_holdings(path, VALUATION, problems, label=path.name)
    return holdings, problems.items


def test_good_file_reads(tmp_path):
    holdings, problems = read(write(tmp_path, [HEADER, GOOD]))
    assert problems == []
    assert list(holdings.id) == ["A1"] and holdings.coupon[0] == pytest.approx(0.0425, rel=1e-12, abs=0)
    assert holdings.maturity[0] == np.datetime64("2029-03-15") and holdings.row[0] == 2
    assert holdings.day_count[0] == "30/360" and holdings.frequency[0] == 2   # agency defaults (docs/formats.md)


def test_every_problem_at_once_with_its_position(tmp_path):
    # issue 2 "Bad input": a date that is not a date, maturity before the valuation date, a negative face,
    # a coupon that looks like a fraction, an unknown sector (with a suggestion) or rating, duplicate ids,
    # two quotes on a row: all reported at once, each at its row and column, nothing returned
    holdings, problems = read(write(tmp_path, [HEADER, GOOD] + [row for row, *_ in BAD_ROWS]))
    assert holdings is None
    assert [(p.row, p.column) for p in problems] == [(row, col) for _, row, col, _ in BAD_ROWS]
    for problem, (_, _, _, words) in zip(problems, BAD_ROWS):
        assert problem.file == "holdings.csv"
        for word in words:
            assert word in problem.message, (str(problem), word)
    assert str(problems[0]).startswith("holdings.csv:3:5: ")


@pytest.mark.parametrize("row,line,column,words", BAD_ROWS)
def test_each_problem_alone_refuses_the_file(tmp_path, row, line, column, words):
    holdings, problems = read(write(tmp_path, [HEADER, GOOD] + [GOOD.replace("A1,", f"Z{i},") for i in range(line - 3)]
                                    + [row]))
    assert holdings is None
    assert [(p.row, p.column) for p in problems] == [(line, column)]


def test_negotiable_is_true_false_or_the_sector_default(tmp_path):
    header = HEADER + ",issue_date,negotiable"
    cd = "C1,cd,Invented Bank,1000000,2027-06-15,4.1,100.1,,AA,2026-06-15"
    holdings, problems = read(write(tmp_path, [header, GOOD + ",,", cd + ",", cd.replace("C1", "C2") + ",TRUE",
                                               GOOD.replace("A1", "A2") + ",,false"]))
    assert problems == []
    # docs/formats.md: empty is the sector's default (CDs and deposits are held to maturity)
    assert list(holdings.negotiable) == [True, False, True, False]
    holdings, problems = read(write(tmp_path, [header, GOOD + ",,maybe"]))
    assert holdings is None
    assert [(p.row, p.column) for p in problems] == [(2, 11)] and "'maybe' is not true or false" in problems[0].message


def test_two_problems_on_one_row_both_reported(tmp_path):
    _, problems = read(write(tmp_path, [HEADER, "B1,agency,Invented Farm Credit Bank,abc,2029-13-01,4.25,,,AA+"]))
    assert sorted((p.row, p.column) for p in problems) == [(2, 4), (2, 5)]


def test_unknown_column_lists_the_known_ones(tmp_path):
    holdings, problems = read(write(tmp_path, [HEADER + ",colour", GOOD + ",blue"]))
    assert holdings is None
    assert [(p.row, p.column) for p in problems] == [(1, 10)]
    assert "unknown column 'colour'" in problems[0].message
    assert all(name in problems[0].message for name in COLUMNS)


def test_missing_required_column(tmp_path):
    _, problems = read(write(tmp_path, ["id,sector,face,maturity_date,coupon_pct,price",
                                        "A1,agency,1000000,2029-03-15,4.25,99.5"]))
    assert [(p.row, p.column) for p in problems] == [(1, 0)]
    assert "required column 'issuer' is missing" in problems[0].message


def test_missing_file(tmp_path):
    holdings, problems = read(tmp_path / "holdings.csv")
    assert holdings is None
    assert [(p.file, p.row, p.column, p.message) for p in problems] == [("holdings.csv", 0, 0, "file not found")]


def test_empty_file(tmp_path):
    holdings, problems = read(write(tmp_path, [""]))
    assert holdings is None and len(problems) == 1 and "empty" in problems[0].message


def test_xlsx_reports_the_same_positions(tmp_path):
    # docs/formats.md: holdings.xlsx has the same columns and the same validation as holdings.csv
    book = openpyxl.Workbook()
    sheet = book.active
    for line in [HEADER, GOOD] + [row for row, *_ in BAD_ROWS]:
        sheet.append([_cell(v) for v in line.split(",")])
    path = tmp_path / "holdings.xlsx"
    book.save(path)
    holdings, problems = read(path)
    assert holdings is None
    assert [(p.row, p.column) for p in problems] == [(row, col) for _, row, col, _ in BAD_ROWS]


def _cell(text):
    """A spreadsheet cell as a person would type it: numbers as numbers, real dates as dates."""
    try:
        return float(text)
    except ValueError:
        pass
    try:
        return dt.date.fromisoformat(text)
    except ValueError:
        return text or None
