"""A book folder is read whole or refused whole: every problem of every file in one InputError.

Source: issue 2's "Bad input" contract and docs/formats.md ("Validation: the whole book or nothing";
in book.toml the row is the line of the key). The policy file of the small books made here is the
complete example of docs/policy.md, taken from that page.
"""

import datetime as dt
import re
from pathlib import Path

import pytest

from ladder.analysis.valuation import value_book
from ladder.folder.book_file import load_book
from ladder.errors import InputError

DOCS = Path(__file__).resolve().parents[2] / "docs"
BOOK_TOML = """\
name = "Invented Widget Co - operating cash"
base_currency = "USD"
valuation_date = 2026-11-30

[reinvest]
rule = "longest_rung"
"""
HOLDINGS = """\
id,sector,issuer,face,maturity_date,coupon_pct,price,discount_rate_pct,rating,short_rating
W-AG-1,agency,Invented Farm Credit Bank,5000000,2028-06-15,4.125,100.25,,AA+,
W-CP-1,commercial_paper,Invented Lamp Co,2000000,2027-02-26,,,3.80,,A-1
"""
CURVE = "tenor,par_yield_pct\n3M,3.75\n6M,3.77\n1Y,3.74\n2Y,3.70\n5Y,3.80\n10Y,4.10\n"
CASH_NEEDS = "date,amount,label\n2026-12-15,1500000,payroll\n"


def policy_example() -> str:
    """The first TOML example of docs/policy.md (a complete, valid policy)."""
    return re.search(r"```toml\n(.*?)```", (DOCS / "policy.md").read_text(encoding="utf-8"), re.S).group(1)


def make_book(folder: Path, **replace: str | None) -> Path:
    """A small valid book in ``folder``; ``holdings_csv="..."`` replaces a file, ``=None`` leaves it out."""
    files = {"book.toml": BOOK_TOML, "holdings.csv": HOLDINGS, "curve.csv": CURVE,
             "policy.toml": policy_example(), "cash_needs.csv": CASH_NEEDS}
    files.update({".".join(key.rsplit("_", 1)): text for key, text in replace.items()})   # holdings_csv -> holdings.csv
    folder.mkdir(exist_ok=True)
    for name, text in files.items():
        if text is not None:
            (folder / name).write_text(text, encoding="utf-8")
    return folder


def problems_of(folder) -> list:
    with pytest.raises(InputError) as caught:
        load_book(folder)
    return caught.value.problems


def test_small_book_loads(tmp_path):
    book = load_book(make_book(tmp_path / "book"))
    assert book.valuation_date == dt.date(2026, 11, 30) and len(book.holdings) == 2
    assert list(book.holdings.kind) == ["fixed", "discount"]


def test_missing_book_toml(tmp_path):
    problems = problems_of(tmp_path)
    assert len(problems) == 1
    assert problems[0].file.endswith("book.toml") and "no book.toml here" in problems[0].message


def test_unknown_top_level_key_with_its_line(tmp_path):
    text = BOOK_TOML.replace('base_currency = "USD"\n', 'base_currency = "USD"\nvaluation_dat = 2026-11-30\n')
    problems = problems_of(make_book(tmp_path / "book", book_toml=text))
    [p] = [p for p in problems if "valuation_dat'" in p.message]
    assert p.file.endswith("book.toml") and p.row == 3
    assert "did you mean 'valuation_date'" in p.message and "Known:" in p.message


def test_unknown_nested_key_with_its_line(tmp_path):
    text = BOOK_TOML + "min_cash_bufer = 1000000\n"
    problems = problems_of(make_book(tmp_path / "book", book_toml=text))
    [p] = problems
    assert p.row == 7 and "reinvest.min_cash_bufer" in p.message and "min_cash_buffer" in p.message


def test_problems_of_every_file_at_once(tmp_path):
    # issue 2: a book with problems is refused whole, every problem listed at once
    text = BOOK_TOML.replace('rule = "longest_rung"', 'rule = "shortest_rung"')
    bad_holdings = HOLDINGS.replace("2028-06-15", "2028-06-31").replace("4.125", "0.04125")
    folder = make_book(tmp_path / "book", book_toml=text, holdings_csv=bad_holdings, cash_needs_csv=None)
    problems = problems_of(folder)
    where = {(Path(p.file).name, p.row, p.column) for p in problems}
    assert any(Path(p.file).name == "book.toml" and p.row == 6 and "shortest_rung" in p.message for p in problems)
    assert ("holdings.csv", 2, 5) in where and ("holdings.csv", 2, 6) in where
    assert ("cash_needs.csv", 0, 0) in where                              # the missing file


def test_missing_holdings_file(tmp_path):
    folder = make_book(tmp_path / "book")
    (folder / "holdings.csv").unlink()
    problems = problems_of(folder)
    assert [(Path(p.file).name, p.row, p.column, p.message) for p in problems] == [
        ("holdings.csv", 0, 0, "file not found")]


def test_maturity_on_or_before_the_settlement_date(tmp_path):
    # issue 2: maturity before settlement is an input error; with --at after a maturity the holding's row
    # in holdings.csv is named
    book = load_book(make_book(tmp_path / "book"))
    with pytest.raises(InputError) as caught:
        value_book(book, dt.date(2027, 3, 1))
    [p] = caught.value.problems
    assert Path(p.file).name == "holdings.csv" and p.row == 3 and "W-CP-1" in p.message


def test_settlement_before_the_valuation_date_refused(tmp_path):
    book = load_book(make_book(tmp_path / "book"))
    with pytest.raises(InputError) as caught:
        value_book(book, dt.date(2026, 11, 1))
    assert "before the book's valuation date" in caught.value.problems[0].message
