"""cash_needs.csv: the demo forecast loads; bad files are refused with every problem as file:row:column."""

from __future__ import annotations

from ladder.demo import demo_source

from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from ladder.book.cash_needs import CashNeeds, read_cash_needs
from ladder.errors import InputError

DEMO = demo_source() / "cash_needs.csv"


def write(tmp_path, text: str, encoding="utf-8") -> Path:
    path = tmp_path / "cash_needs.csv"
    path.write_text(text, encoding=encoding)
    return path


def problems(path) -> list[str]:
    with pytest.raises(InputError) as err:
        read_cash_needs(path)
    return [str(p) for p in err.value.problems]


def test_demo_forecast_matches_an_independent_read():
    needs = read_cash_needs(DEMO)
    reference = pd.read_csv(DEMO)   # pandas as the reference reader
    assert len(needs) == len(reference)
    np.testing.assert_array_equal(needs.date, reference["date"].to_numpy(dtype="datetime64[D]"))
    np.testing.assert_allclose(needs.amount, reference["amount"].to_numpy(float), rtol=1e-12, atol=0)
    assert list(needs.label) == list(reference["label"])
    assert list(needs.row[:2]) == [2, 3]
    # by month from December 2026: a pandas groupby over calendar months as the reference
    by_month = needs.by_month(np.datetime64("2026-12-01"), 24)
    expected = reference.groupby(pd.to_datetime(reference["date"]).dt.to_period("M"))["amount"].sum().to_numpy()
    np.testing.assert_allclose(by_month, expected, rtol=1e-12, atol=0)


def test_flexible_but_exact_cells(tmp_path):
    text = "\ufeffamount,date\n\"1,250,000.50\",2025-03-14\n\n-300,2025-04-01\n"
    needs = read_cash_needs(write(tmp_path, text))
    np.testing.assert_array_equal(needs.amount, [1_250_000.5, -300.0])
    np.testing.assert_array_equal(needs.row, [2, 4])                    # the blank line keeps its number
    assert list(needs.label) == ["", ""]                                # label is optional


def test_every_problem_at_once(tmp_path):
    text = ("date,amount,label\n"
            "2025-13-01,100,a\n"
            "14/03/2025,100,b\n"
            "2025-03-14,1.2.3,c\n"
            "2025-03-14,,d\n"
            "2025-03-14,inf,e\n"
            "2025-03-14,5,f,extra\n"
            "2025-03-15,5,fine\n")
    f = str(tmp_path / "cash_needs.csv")
    assert problems(write(tmp_path, text)) == [
        f"{f}:2:1: '2025-13-01' is not a calendar date",
        f"{f}:3:1: date '14/03/2025' is not YYYY-MM-DD",
        f"{f}:4:2: amount '1.2.3' is not a number (currency units; + needed, - inflow)",
        f"{f}:5:2: amount '' is not a number (currency units; + needed, - inflow)",
        f"{f}:6:2: amount 'inf' is not a number (currency units; + needed, - inflow)",
        f"{f}:7:4: row has 4 cells but the header has 3",
    ]


def test_header_problems(tmp_path):
    f = str(tmp_path / "cash_needs.csv")
    assert problems(write(tmp_path, "date,amout,label,date\n2025-01-01,1,x,2025-01-01\n")) == [
        f"{f}:1:0: required column 'amount' is missing",
        f"{f}:1:2: unknown column 'amout' (did you mean 'amount'?); known columns: date, amount, label",
        f"{f}:1:4: column 'date' appears twice",
    ]
    assert problems(write(tmp_path, "")) == [f"{f}:1:0: the file is empty; the first row must name the columns"]
    assert problems(tmp_path / "missing.csv")[0]== f"{tmp_path / 'missing.csv'}:0:0: file not found"


def test_empty_forecast():
    assert len(CashNeeds.empty()) == 0
