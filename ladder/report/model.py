"""The month-end report as data: sections of tables, notes and charts, rendered by html, xlsx and md.

Values in tables are in model units: money in currency, rates decimal (kind ``pct``), prices per
100, dates ``datetime.date``; None for "not available". ``Report.to_json`` / ``report_from_json``
carry a report through the history database unchanged, so a past report can be written again.
"""

from __future__ import annotations

import datetime as dt
import math
from dataclasses import dataclass

KINDS = ("text", "money", "price", "pct", "bp", "years", "days", "int", "date", "ratio")


@dataclass(frozen=True)
class Column:
    key: str
    title: str
    kind: str = "text"


@dataclass(frozen=True)
class Table:
    title: str
    columns: tuple[Column, ...]
    rows: tuple[tuple, ...]
    total: tuple | None = None
    row_kinds: tuple[str, ...] | None = None    # per row, the kind of its number cells (a summary table)

    def kind(self, row: int, column: int) -> str:
        """The kind of cell (row, column): the column's, or the row's for a number column of a table
        with ``row_kinds`` (row -1 is the total row)."""
        kind = self.columns[column].kind
        if self.row_kinds is not None and kind != "text" and row >= 0:
            return self.row_kinds[row]
        return kind

    def column(self, key: str) -> list:
        """The values of column ``key``, row by row (the total row excluded)."""
        index = [c.key for c in self.columns].index(key)
        return [row[index] for row in self.rows]

    def row(self, first: str) -> tuple:
        """The row whose first cell is ``first``."""
        for row in self.rows:
            if row[0] == first:
                return row
        raise KeyError(first)


@dataclass(frozen=True)
class Chart:
    """A bar or line chart: ``categories`` on the x axis, one series a name, values in ``unit``."""

    title: str
    kind: str                           # "bar" | "line"
    categories: tuple[str, ...]
    series: tuple[tuple[str, tuple[float, ...]], ...]
    x_label: str = ""
    y_label: str = ""


@dataclass(frozen=True)
class Section:
    key: str
    title: str
    tables: tuple[Table, ...] = ()
    notes: tuple[str, ...] = ()
    charts: tuple[Chart, ...] = ()
    signatures: tuple[str, ...] = ()    # signature lines (the compliance certificate)


@dataclass(frozen=True)
class Report:
    title: str
    book_name: str
    as_of: dt.date
    period_start: dt.date
    sections: tuple[Section, ...]
    cautions: tuple[str, ...]

    def section(self, key: str) -> Section:
        for s in self.sections:
            if s.key == key:
                return s
        raise KeyError(key)

    def to_json(self) -> dict:
        return {"title": self.title, "book_name": self.book_name, "as_of": self.as_of.isoformat(),
                "period_start": self.period_start.isoformat(), "cautions": list(self.cautions),
                "sections": [_section_json(s) for s in self.sections]}


def _cell_json(value, kind: str):
    if value is None:
        return None
    if isinstance(value, dt.date):
        return value.isoformat()
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


def _cell_from_json(value, kind: str):
    if value is None:
        return None
    if kind == "date" and isinstance(value, str):
        try:
            return dt.date.fromisoformat(value)
        except ValueError:       # a label such as "Total" in a date column
            return value
    return value


def _table_json(t: Table) -> dict:
    kinds = [c.kind for c in t.columns]
    rows = [[_cell_json(v, k) for v, k in zip(row, kinds)] for row in t.rows]
    total = None if t.total is None else [_cell_json(v, k) for v, k in zip(t.total, kinds)]
    return {"title": t.title, "columns": [[c.key, c.title, c.kind] for c in t.columns], "rows": rows,
            "total": total, "row_kinds": None if t.row_kinds is None else list(t.row_kinds)}


def _section_json(s: Section) -> dict:
    return {"key": s.key, "title": s.title, "tables": [_table_json(t) for t in s.tables], "notes": list(s.notes),
            "charts": [{"title": c.title, "kind": c.kind, "categories": list(c.categories),
                        "series": [[name, list(values)] for name, values in c.series],
                        "x_label": c.x_label, "y_label": c.y_label} for c in s.charts],
            "signatures": list(s.signatures)}


def _table_from_json(d: dict) -> Table:
    columns = tuple(Column(*c) for c in d["columns"])
    kinds = [c.kind for c in columns]
    row = lambda values: tuple(_cell_from_json(v, k) for v, k in zip(values, kinds))  # noqa: E731
    return Table(d["title"], columns, tuple(row(r) for r in d["rows"]),
                 None if d["total"] is None else row(d["total"]),
                 None if d.get("row_kinds") is None else tuple(d["row_kinds"]))


def report_from_json(d: dict) -> Report:
    """The Report that ``Report.to_json`` wrote."""
    sections = tuple(
        Section(s["key"], s["title"], tuple(_table_from_json(t) for t in s["tables"]), tuple(s["notes"]),
                tuple(Chart(c["title"], c["kind"], tuple(c["categories"]),
                            tuple((name, tuple(v)) for name, v in c["series"]), c["x_label"], c["y_label"])
                      for c in s["charts"]), tuple(s["signatures"]))
        for s in d["sections"])
    return Report(d["title"], d["book_name"], dt.date.fromisoformat(d["as_of"]),
                  dt.date.fromisoformat(d["period_start"]), sections, tuple(d["cautions"]))
