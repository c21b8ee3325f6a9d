"""Read ``curve.csv``: government par yields by tenor, refused whole with every problem listed.

Format: a header ``tenor,par_yield_pct`` and one row per tenor, shortest first, e.g. ``3M,4.25``.
Tenors are whole months or years (``1M`` .. ``6M`` are bills, longer tenors whole half-years);
yields are percent on a semiannual bond-equivalent basis. Problems are ``file:row:column: message``
with the header as row 1.
"""

from __future__ import annotations

from ladder.book.cells import RATE_RANGE_PCT, parse_number
from ladder.book.table_file import read_rows
from ladder.errors import Problems
from ladder.market.tenors import tenor_months
from ladder.pricing.curve import ParCurve, tenor_problems

CURVE_COLUMNS = ("tenor", "par_yield_pct")
YIELD_RANGE_PCT = RATE_RANGE_PCT
# A whole curve inside +/-0.2 % is far likelier decimals typed for percent (0.0425 for 4.25).
DECIMAL_LOOKING_PCT = 0.2


def read_curve(path) -> ParCurve:
    """The par curve in ``path``; raises ``InputError`` listing every problem (nothing half-read)."""
    name = str(path)
    problems = Problems()
    rows = read_rows(path, CURVE_COLUMNS, problems)
    tenors: list[tuple[int, int, int]] = []     # (row, column, months) of readable tenors
    yields: list[tuple[int, int, str, float]] = []
    low, high = YIELD_RANGE_PCT
    for r, cells in rows:
        c, text = cells["tenor"]
        try:
            tenors.append((r, c, tenor_months(text)))
        except ValueError as error:
            problems.add(name, r, c, str(error))
        c, text = cells["par_yield_pct"]
        try:
            value = parse_number(text)
        except ValueError as why:
            problems.add(name, r, c, f"par yield {why} (percent, e.g. 4.25)")
            continue
        if not low <= value <= high:
            problems.add(name, r, c, f"par yield {text}% is implausible: expected {low:g} to {high:g} percent")
        else:
            yields.append((r, c, text, value))
    if not rows and not problems:
        problems.add(name, 0, 0, "no tenors: the file has a header but no rows")
    if yields and 0 < max(abs(v) for *_, v in yields) < DECIMAL_LOOKING_PCT:
        for r, c, text, value in yields:
            problems.add(name, r, c, f"par yield {text} looks like a decimal fraction; "
                                     f"write percent ({value * 100:g} for {text})")
    if tenors:
        for index, message in tenor_problems([m for *_, m in tenors]):
            r, c, _ = tenors[index]
            problems.add(name, r, c, message)
    problems.raise_if_any()
    return ParCurve(tuple(cells["tenor"][1] for _, cells in rows),
                    [value / 100.0 for *_, value in yields])
