"""Reading curve.csv: the good file, and every refusal as file:row:column messages, all at once."""

import numpy as np
import pytest

from ladder.errors import InputError
from ladder.pricing.curve_file import read_curve

GOOD = "tenor,par_yield_pct\n1M,3.72\n3M,3.75\n6M,3.77\n1Y,3.74\n2Y,3.71\n10Y,4.16\n30Y,4.36\n"


def write(tmp_path, text, name="curve.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def problems(path):
    with pytest.raises(InputError) as caught:
        read_curve(path)
    return [str(p) for p in caught.value.problems]


def test_good_file_gives_decimal_par_yields(tmp_path):
    curve = read_curve(write(tmp_path, GOOD))
    assert curve.tenors == ("1M", "3M", "6M", "1Y", "2Y", "10Y", "30Y")
    np.testing.assert_array_equal(curve.months, [1, 3, 6, 12, 24, 120, 360])
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    np.testing.assert_allclose(curve.par_yields, [0.0372, 0.0375, 0.0377, 0.0374, 0.0371, 0.0416, 0.0436],
                               rtol=1e-12, atol=0)


def test_header_case_spaces_column_order_blank_lines_and_bom_are_accepted(tmp_path):
    path = tmp_path / "curve.csv"
    path.write_bytes("\ufeff Par_Yield_Pct , TENOR\n3.75, 3m\n\n3.74,12M\n".encode("utf-8"))
    curve = read_curve(path)
    assert curve.tenors == ("3M", "1Y")
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    np.testing.assert_allclose(curve.par_yields, [0.0375, 0.0374], rtol=1e-12, atol=0)


def test_unsorted_and_duplicate_tenors(tmp_path):
    path = write(tmp_path, "tenor,par_yield_pct\n3M,3.7\n2Y,3.8\n1Y,3.7\n2Y,3.9\n")
    assert problems(path) == [
        f"{path}:4:1: tenor 1Y comes after 2Y: list tenors from shortest to longest",
        f"{path}:5:1: tenor 2Y appears twice (also entry 2)",
    ]


def test_missing_short_end_says_where_the_curve_must_start(tmp_path):
    path = write(tmp_path, "tenor,par_yield_pct\n1Y,3.7\n2Y,3.8\n")
    assert problems(path) == [
        f"{path}:2:1: the curve must start at or below 6M (a bill tenor); its first tenor is 1Y"]


def test_non_numeric_and_implausible_yields_and_bad_tenors(tmp_path):
    path = write(tmp_path, "tenor,par_yield_pct\n3M,abc\n6M,nan\n1Y,31\n2Y,-5.5\n5T,3.9\n9M,4.0\n")
    assert problems(path) == [
        f"{path}:2:2: par yield 'abc' is not a number (percent, e.g. 4.25)",
        f"{path}:3:2: par yield 'nan' is not a number (percent, e.g. 4.25)",
        f"{path}:4:2: par yield 31% is implausible: expected -5 to 30 percent",
        f"{path}:5:2: par yield -5.5% is implausible: expected -5 to 30 percent",
        f"{path}:6:1: '5T' is not a tenor; write a whole number of months or years, e.g. 3M or 2Y",
        f"{path}:7:1: tenor 9M: tenors beyond 6M are semiannual par bonds and must be whole half-years "
        "(1Y, 18M, 2Y, ...)",
        f"{path}:7:1: tenor 9M comes after 2Y: list tenors from shortest to longest",
    ]


def test_decimals_written_for_percent_are_refused(tmp_path):
    path = write(tmp_path, "tenor,par_yield_pct\n3M,0.0425\n2Y,0.0410\n")
    assert problems(path) == [
        f"{path}:2:2: par yield 0.0425 looks like a decimal fraction; write percent (4.25 for 0.0425)",
        f"{path}:3:2: par yield 0.0410 looks like a decimal fraction; write percent (4.1 for 0.0410)",
    ]


def test_a_low_short_end_with_a_normal_long_end_is_fine(tmp_path):
    # 2021-like: one-month bills at a few basis points are real, not decimals.
    curve = read_curve(write(tmp_path, "tenor,par_yield_pct\n1M,0.04\n1Y,0.1\n10Y,1.5\n"))
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    np.testing.assert_allclose(curve.par_yields, [0.0004, 0.001, 0.015], rtol=1e-12, atol=0)


def test_unknown_missing_and_repeated_columns(tmp_path):
    path = write(tmp_path, "tenor,yield,tenor\n3M,3.7,3M\n")
    assert problems(path) == [
        f"{path}:1:0: required column 'par_yield_pct' is missing",
        f"{path}:1:2: unknown column 'yield'; known columns: tenor, par_yield_pct",
        f"{path}:1:3: column 'tenor' appears twice",
    ]


def test_empty_header_only_ragged_and_unreadable_files(tmp_path):
    empty = write(tmp_path, "\n\n", "empty.csv")
    assert problems(empty) == [f"{empty}:1:0: the file is empty; the first row must name the columns"]
    header = write(tmp_path, "tenor,par_yield_pct\n", "header.csv")
    assert problems(header) == [f"{header}:0:0: no tenors: the file has a header but no rows"]
    ragged = write(tmp_path, "tenor,par_yield_pct\n3M,3.7,extra\n6M\n", "ragged.csv")
    assert problems(ragged) == [
        f"{ragged}:2:3: row has 3 cells but the header has 2",
        f"{ragged}:3:2: par yield '' is not a number (percent, e.g. 4.25)",
    ]
    missing = tmp_path / "absent.csv"
    [message] = problems(missing)
    assert message == f"{missing}:0:0: file not found"
