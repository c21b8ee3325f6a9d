"""Reading scenarios.csv: interpolation across the curve's tenors, and every refusal at once."""

import numpy as np
import pytest

from ladder.errors import InputError
from ladder.pricing.curve import ParCurve
from ladder.risk.scenarios import read_scenarios

TENORS = ("1M", "3M", "6M", "1Y", "2Y", "3Y", "5Y", "7Y", "10Y", "20Y", "30Y")
CURVE = ParCurve(TENORS, np.full(len(TENORS), 0.04))


def write(tmp_path, text):
    path = tmp_path / "scenarios.csv"
    path.write_text(text, encoding="utf-8")
    return path


def problems(path):
    with pytest.raises(InputError) as caught:
        read_scenarios(path, CURVE)
    return [str(p) for p in caught.value.problems]


def test_points_are_interpolated_in_tenor_years_and_flat_beyond_the_ends(tmp_path):
    path = write(tmp_path, "scenario,tenor,shift_bp\n"
                           "scare,3M,25\nscare,2Y,60\nscare,10Y,110\n"
                           "rally,1M,-150\nrally,30Y,-45\n"
                           "scare,5Y,90\n")
    scare, rally = read_scenarios(path, CURVE)
    assert (scare.name, scare.kind, scare.parallel_bp) == ("scare", "user", None)
    years = np.array([1 / 12, 3 / 12, 0.5, 1, 2, 3, 5, 7, 10, 20, 30])
    expected = np.interp(years, [0.25, 2, 5, 10], [25, 60, 90, 110])
    np.testing.assert_allclose(scare.shift_bp_by_tenor, expected, atol=1e-12, rtol=0)
    assert scare.shift_bp_by_tenor[0] == 25 and scare.shift_bp_by_tenor[-1] == 110      # flat ends
    assert scare.shift_bp_by_tenor[TENORS.index("7Y")] == pytest.approx(98.0, rel=1e-12, abs=0)        # 90 + 2/5 * 20
    np.testing.assert_allclose(rally.shift_bp_by_tenor, np.interp(years, [1 / 12, 30], [-150, -45]), atol=1e-12, rtol=0)


def test_tenor_labels_match_by_length(tmp_path):
    [s] = read_scenarios(write(tmp_path, "scenario,tenor,shift_bp\nx,12M,10\nx,60m,20\n"), CURVE)
    assert s.shift_bp_by_tenor[TENORS.index("1Y")] == 10 and s.shift_bp_by_tenor[TENORS.index("5Y")] == 20


def test_every_bad_row_is_reported(tmp_path):
    path = write(tmp_path, "scenario,tenor,shift_bp\n"
                           "up,4Y,10\n"        # not a curve tenor
                           "up,2X,10\n"        # not a tenor
                           "up,2Y,ten\n"       # not a number
                           ",3Y,5\n"           # no name
                           "up,5Y,1500\n"      # implausible
                           "up,10Y,5\n"
                           "up,10Y,6\n")       # repeated
    assert problems(path) == [
        f"{path}:2:2: tenor 4Y is not on the curve; its tenors are 1M, 3M, 6M, 1Y, 2Y, 3Y, 5Y, 7Y, 10Y, 20Y, 30Y",
        f"{path}:3:2: '2X' is not a tenor; write a whole number of months or years, e.g. 3M or 2Y",
        f"{path}:4:3: shift 'ten' is not a number of basis points",
        f"{path}:5:1: the scenario has no name",
        f"{path}:6:3: shift 1500 bp is beyond +/-1000 bp",
        f"{path}:8:2: scenario 'up' gives tenor 10Y twice (also row 7)",
    ]


def test_bad_header_and_empty_files(tmp_path):
    path = write(tmp_path, "scenario,tenor,bp\n")
    assert problems(path) == [
        f"{path}:1:0: required column 'shift_bp' is missing",
        f"{path}:1:3: unknown column 'bp'; known columns: scenario, tenor, shift_bp, sector, bucket",
    ]
    path = write(tmp_path, "")
    assert problems(path) == [f"{path}:1:0: the file is empty; the first row must name the columns"]
    path = write(tmp_path, "scenario,tenor,shift_bp\n")
    assert problems(path) == [f"{path}:0:0: no scenarios: the file has a header but no rows"]


def test_spread_rows_move_sectors_and_buckets_alone_or_with_rates(tmp_path):
    from ladder.book.holdings import make_holdings

    path = write(tmp_path, "scenario,tenor,shift_bp,sector,bucket\n"
                           "wider,,75,corporate,\nwider,,150,corporate,BBB\nwider,,40,commercial_paper,A-1\n"
                           "wider,,90,commercial_paper,\n"
                           "sell-off,2Y,50,,\nsell-off,,100,municipal,\n")
    wider, selloff = read_scenarios(path, CURVE)
    assert not wider.shift_bp_by_tenor.any()                              # spreads alone: no rate move
    np.testing.assert_array_equal(selloff.shift_bp_by_tenor, np.full(len(TENORS), 50.0))
    cp = "commercial_paper"
    h = make_holdings(id=["C1", "C2", "C3", "P1", "P2", "M1", "T1"],
                      sector=["corporate", "corporate", "corporate", cp, cp, "municipal", "treasury"],
                      face=[1e6] * 7, maturity=["2028-06-15"] * 7, coupon=[0.04] * 7,
                      rating=["BBB-", "A+", "", "", "", "AA", "AA+"], short_rating=["", "", "", "P-1", "", "", ""])
    # BBB- reads the BBB move, A+ and unrated the sector's move for every bucket; P-1 (no long rating)
    # the A-1 move before its sector's, unrated paper the sector's.
    np.testing.assert_array_equal(wider.spread_shift_bp(h), [150.0, 75.0, 75.0, 40.0, 90.0, 0.0, 0.0])
    np.testing.assert_array_equal(selloff.spread_shift_bp(h), [0.0, 0.0, 0.0, 0.0, 0.0, 100.0, 0.0])


def test_bad_spread_rows_are_refused_with_their_cells(tmp_path):
    path = write(tmp_path, "scenario,tenor,shift_bp,sector,bucket\n"
                           "x,,50,corporates,\n"
                           "x,,50,corporate,B\n"
                           "x,2Y,50,corporate,A\n"
                           "x,,50,agency,AA\n"
                           "x,,60,agency,AA\n")
    assert problems(path) == [
        f"{path}:2:4: unknown sector 'corporates'; known: treasury, agency, supranational, municipal, corporate, "
        "commercial_paper, cd, fund, deposit",
        f"{path}:3:5: unknown rating bucket 'B'; known: AAA, AA, A, BBB, A-1+, A-1, A-2, A-3 (or blank for every "
        "bucket of the sector)",
        f"{path}:4:2: a spread move applies at every tenor: leave tenor blank on a row with a sector",
        f"{path}:6:4: scenario 'x' moves agency AA twice (also row 5)",
    ]
