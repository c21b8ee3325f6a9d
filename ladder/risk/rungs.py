"""Maturity rungs of a ladder: the buckets a treasurer reads a ladder by.

A holding falls in the first rung whose end is on or after its final maturity (calls are not
workouts here); rung ends are the settlement date plus 3, 6, 12, 24, 36 and 60 months, with the
end-of-month rule (a month-end settlement date gives month-end rung ends, as ``add_months``). A
holding without a maturity date (NaT) is available at once and falls in the first rung.
"""

from __future__ import annotations

import numpy as np

from ladder.market.dates import add_months, is_month_end, to_days

RUNGS = ("0-3M", "3-6M", "6-12M", "1-2Y", "2-3Y", "3-5Y", "5Y+")
RUNG_END_MONTHS = (3, 6, 12, 24, 36, 60)


def rung_ends(settle) -> np.ndarray:
    """Last maturity date of each rung but the open-ended last one, datetime64[D] (6,)."""
    settle = np.datetime64(settle, "D")
    return add_months(np.full(len(RUNG_END_MONTHS), settle), np.array(RUNG_END_MONTHS), is_month_end(settle))


def rung_index(settle, maturity) -> np.ndarray:
    """Index into ``RUNGS`` of each maturity (datetime64[D] array) seen from ``settle``: int64 (n,)."""
    maturity = to_days(maturity)
    index = np.searchsorted(rung_ends(settle), maturity, side="left")
    return np.where(np.isnat(maturity), 0, index).astype(np.int64)
