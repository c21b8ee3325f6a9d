"""Reading a table file (CSV, or the first sheet of an .xlsx) as text cells with their positions.

Row 1 is the header; data rows are numbered from 2 as a spreadsheet shows them; columns from 1.
Every cell comes back as stripped text ("" when empty); spreadsheet dates become ISO text.
"""

from __future__ import annotations

import csv
import difflib
import zipfile
import datetime as dt
from dataclasses import dataclass
from pathlib import Path

from ladder.errors import Problems
from ladder.neutralize import read_cell


@dataclass(frozen=True)
class Table:
    """A header and text rows; ``column[name]`` is the 1-based column number."""

    path: str
    header: list[str]
    rows: list[list[str]]

    @property
    def column(self) -> dict[str, int]:
        return {name: i + 1 for i, name in enumerate(self.header)}

    def cell(self, row_index: int, name: str) -> str:
        """Text of column ``name`` in data row ``row_index`` (0-based), "" if the column is absent."""
        i = self.column.get(name)
        row = self.rows[row_index]
        return row[i - 1] if i is not None and i - 1 < len(row) else ""


def _text(value) -> str:
    if value is None:
        return ""
    if isinstance(value, dt.datetime):
        return value.date().isoformat()
    if isinstance(value, dt.date):
        return value.isoformat()
    if isinstance(value, float) and value.is_integer():
        return str(int(value))
    return read_cell(str(value).strip())


def read_table(path: Path, problems: Problems, label: str | None = None) -> Table | None:
    """The table at ``path`` or None (with a problem added) if it is not a table (not UTF-8 text, a
    damaged workbook). An error of the operating system (permission, a folder) is raised as it is."""
    label = label or str(path)
    if not path.exists():
        problems.add(label, 0, 0, "file not found")
        return None
    try:
        if path.suffix.lower() == ".xlsx":
            import openpyxl  # read only when a workbook is given

            book = openpyxl.load_workbook(path, read_only=True, data_only=True)
            raw = [[_text(v) for v in row] for row in book.worksheets[0].iter_rows(values_only=True)]
            book.close()
        else:
            with path.open(newline="", encoding="utf-8-sig") as handle:
                raw = [[read_cell(cell.strip()) for cell in row] for row in csv.reader(handle)]
    except (UnicodeDecodeError, csv.Error, ValueError, KeyError, zipfile.BadZipFile) as exc:
        what = "a damaged or not an .xlsx workbook" if path.suffix.lower() == ".xlsx" else "not UTF-8 CSV text"
        problems.add(label, 0, 0, f"cannot be read ({exc}): {what}; save it again from the spreadsheet program")
        return None
    while raw and not any(raw[-1]):
        raw.pop()
    if not raw or not any(raw[0]):
        problems.add(label, 1, 0, "the file is empty; the first row must name the columns")
        return None
    header = [h.strip().lower() for h in raw[0]]
    rows = [r + [""] * (len(header) - len(r)) for r in raw[1:]]
    for number, row in enumerate(rows, start=2):
        if len(row) > len(header) and any(row[len(header):]):
            problems.add(label, number, len(header) + 1, f"row has {len(row)} cells but the header has {len(header)}")
    return Table(label, header, rows)


def check_columns(table: Table, known: tuple[str, ...], required: tuple[str, ...], problems: Problems) -> None:
    """Unknown (with the nearest known name), duplicate and missing columns, each a problem on the header row."""
    seen: set[str] = set()
    for number, name in enumerate(table.header, start=1):
        if name in seen:
            problems.add(table.path, 1, number, f"column {name!r} appears twice")
        elif name not in known:
            close = difflib.get_close_matches(name, list(known), n=1, cutoff=0.6)
            hint = f" (did you mean {close[0]!r}?)" if close else ""
            problems.add(table.path, 1, number, f"unknown column {name!r}{hint}; known columns: {', '.join(known)}")
        seen.add(name)
    for name in required:
        if name not in seen:
            problems.add(table.path, 1, 0, f"required column {name!r} is missing")


Rows = list[tuple[int, dict[str, tuple[int, str]]]]


def read_rows(path, columns: tuple[str, ...], problems: Problems, required: tuple[str, ...] | None = None) -> Rows:
    """The non-blank data rows of a small table whose columns are ``columns`` (all ``required`` unless
    said otherwise), as ``(row number, {column: (column number, text)})``; [] with the problems added
    when the file or its header is wrong."""
    table = read_table(Path(path), problems)
    if table is None:
        return []
    before = len(problems.items)      # a ragged row is reported, but only header problems stop here
    check_columns(table, columns, columns if required is None else required, problems)
    if len(problems.items) > before:
        return []
    where = table.column
    return [(number, {name: (where.get(name, 0), table.cell(i, name)) for name in columns})
            for i, number in ((i, i + 2) for i in range(len(table.rows))) if any(table.rows[i])]
