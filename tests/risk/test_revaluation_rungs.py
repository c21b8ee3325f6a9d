"""Maturity rungs: 0-3M, 3-6M, 6-12M, 1-2Y, 2-3Y, 3-5Y, 5Y+ from the settlement date."""

import numpy as np

from ladder.risk.rungs import RUNGS, rung_ends, rung_index


def test_rung_ends_follow_the_end_of_month_rule():
    # A month-end settlement date gives month-end rung ends (common practice, as coupon schedules).
    assert [str(d) for d in rung_ends("2026-11-30")] == [
        "2027-02-28", "2027-05-31", "2027-11-30", "2028-11-30", "2029-11-30", "2031-11-30"]
    assert str(rung_ends("2026-03-15")[0]) == "2026-06-15"


def test_each_rung_holds_maturities_up_to_its_end():
    maturity = np.array(["2026-12-01", "2027-02-28", "2027-03-01", "2027-05-31", "2027-06-01", "2027-11-30",
                         "2028-11-30", "2028-12-01", "2029-11-30", "2031-11-30", "2031-12-01", "2040-01-01",
                         "NaT"], dtype="datetime64[D]")
    labels = [RUNGS[i] for i in rung_index(np.datetime64("2026-11-30"), maturity)]
    assert labels == ["0-3M", "0-3M", "3-6M", "3-6M", "6-12M", "6-12M", "1-2Y", "2-3Y", "2-3Y", "3-5Y", "5Y+",
                      "5Y+", "0-3M"]
