"""Read ``curve.csv``: government par yields by tenor, refused whole with every problem listed.

Format: a header ``tenor,par_yield_pct`` and one row per tenor, shortest first, e.g. ``3M,4.25``.
Tenors are whole months or years (``1M`` .. ``6M`` are bills, longer tenors whole half-years);
yields are percent on a semiannual bond-equivalent basis. Problems are ``file:row:column: message``
with the header as row 1.
"""

from __future__ import annotations

import csv
import math

from ladder.errors import Problems
from ladder.market.tenors import tenor_months
from ladder.pricing.curve import ParCurve, tenor_problems

CURVE_COLUMNS = ("tenor", "par_yield_pct")
YIELD_RANGE_PCT = (-5.0, 30.0)
# A whole curve inside +/-0.2 % is far likelier decimals typed for percent (0.0425 for 4.25).
DECIMAL_LOOKING_PCT = 0.2

Rows = list[tuple[int, dict[str, tuple[int, str]]]]


def read_table(path, columns: tuple[str, ...], problems: Problems) -> Rows:
    """The rows of a small CSV file whose header names exactly ``columns`` (any order, any case).

    Returns ``(row number, {column: (column number, stripped text)})`` per non-blank row; adds
    unreadable-file, empty-file, header and ragged-row problems to ``problems``.
    """
    name = str(path)
    try:
        with open(path, newline="", encoding="utf-8-sig") as handle:
            lines = list(csv.reader(handle))
    except (OSError, UnicodeDecodeError, csv.Error) as error:
        problems.add(name, 0, 0, f"cannot read the file: {error}")
        return []
    numbered = [(r, line) for r, line in enumerate(lines, start=1) if any(cell.strip() for cell in line)]
    expected = ",".join(columns)
    if not numbered:
        problems.add(name, 0, 0, f"the file is empty; expected a header row {expected}")
        return []
    header_row, header = numbered[0]
    position: dict[str, int] = {}
    for c, cell in enumerate(header, start=1):
        key = cell.strip().lower()
        if key not in columns:
            problems.add(name, header_row, c, f"unknown column {cell.strip()!r}; expected {expected}")
        elif key in position:
            problems.add(name, header_row, c, f"column {key!r} appears twice")
        else:
            position[key] = c
    for key in columns:
        if key not in position:
            problems.add(name, header_row, 0, f"missing column {key!r}; expected {expected}")
    if len(position) != len(columns) or len(header) != len(columns):
        return []
    rows: Rows = []
    for r, line in numbered[1:]:
        if len(line) != len(header):
            problems.add(name, r, 0, f"expected {len(header)} fields ({expected}), found {len(line)}")
            continue
        rows.append((r, {key: (c, line[c - 1].strip()) for key, c in position.items()}))
    return rows


def _percent(text: str) -> float | None:
    try:
        value = float(text)
    except ValueError:
        return None
    return value if math.isfinite(value) else None


def read_curve(path) -> ParCurve:
    """The par curve in ``path``; raises ``InputError`` listing every problem (nothing half-read)."""
    name = str(path)
    problems = Problems()
    rows = read_table(path, CURVE_COLUMNS, problems)
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
        value = _percent(text)
        if value is None:
            problems.add(name, r, c, f"par yield {text!r} is not a number (percent, e.g. 4.25)")
        elif not low <= value <= high:
            problems.add(name, r, c, f"par yield {text}% is implausible: expected {low:g} to {high:g} percent")
        else:
            yields.append((r, c, text, value))
    if not rows and not problems:
        problems.add(name, 0, 0, "no tenors: the file has a header but no rows")
    if yields and 0 < max(abs(v) for *_, v in yields) < DECIMAL_LOOKING_PCT:
        for r, c, text, _ in yields:
            problems.add(name, r, c, f"par yield {text} looks like a decimal fraction; "
                                     f"write percent ({float(text) * 100:g} for {text})")
    if tenors:
        for index, message in tenor_problems([m for *_, m in tenors]):
            r, c, _ = tenors[index]
            problems.add(name, r, c, message)
    problems.raise_if_any()
    return ParCurve(tuple(cells["tenor"][1] for _, cells in rows),
                    [float(cells["par_yield_pct"][1]) / 100.0 for _, cells in rows])
