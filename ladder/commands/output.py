"""Writing results: rich tables for people, json and csv for programs; spreadsheet-safe csv cells."""

from __future__ import annotations

import csv
import io
import json
import sys

from ladder import CAUTION

FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def safe_cell(value):
    """A text cell a spreadsheet would run as a formula is prefixed with a quote (OWASP CSV injection)."""
    if isinstance(value, str) and value.startswith(FORMULA_START):
        return "'" + value
    return value


def write_json(document, out=None) -> None:
    out = out or sys.stdout
    json.dump(document, out, indent=2, allow_nan=False)
    out.write("\n")


def write_csv(records: list[dict], out=None) -> None:
    out = out or sys.stdout
    if not records:
        return
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=list(records[0]), lineterminator="\n")
    writer.writeheader()
    for record in records:
        writer.writerow({k: safe_cell("" if v is None else v) for k, v in record.items()})
    out.write(buffer.getvalue())


def console():
    from rich.console import Console

    return Console()


def print_caution(con) -> None:
    con.print(f"[dim]{CAUTION}[/dim]")


def fmt(value, digits: int = 2, empty: str = "—") -> str:
    """A number for a table cell with thousands separators; ``empty`` for None."""
    if value is None:
        return empty
    return f"{value:,.{digits}f}"
