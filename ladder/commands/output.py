"""Writing results: rich tables for people, json and csv for programs; spreadsheet-safe csv cells.

Everything the console prints passes ``safe_terminal`` (no control character reaches the terminal);
text that came from an input file is also given to rich through ``term`` so that brackets in it are
shown, not read as rich markup.
"""

from __future__ import annotations

import csv
import io
import json
import sys

from ladder import CAUTION
from ladder.neutralize import safe_cell, safe_terminal


def write_json(document, out=None) -> None:
    """The document as indented JSON, built whole and written once (NaN is refused)."""
    (out or sys.stdout).write(json.dumps(document, indent=2, allow_nan=False) + "\n")


def write_csv(records: list[dict], out=None) -> None:
    """Records as CSV with a header from the first record; formula-looking text cells neutralized."""
    if not records:
        return
    fields = list(records[0])
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(fields)
    writer.writerows([["" if (v := r[f]) is None else safe_cell(v) if isinstance(v, str) else v for f in fields]
                      for r in records])
    (out or sys.stdout).write(buffer.getvalue())


def console():
    """A rich console that removes control characters from every text it renders."""
    from rich.console import Console

    class TerminalConsole(Console):
        def render_str(self, text: str, **options):
            return super().render_str(safe_terminal(text), **options)

    return TerminalConsole()


def term(text) -> str:
    """Text from an input file (an id, an issuer, a name) for a rich table or markup line."""
    from rich.markup import escape

    return escape(safe_terminal(text))


def print_caution(con) -> None:
    con.print(f"[dim]{CAUTION}[/dim]")


def fmt(value, digits: int = 2, empty: str = "—") -> str:
    """A number for a table cell with thousands separators; ``empty`` for None."""
    if value is None:
        return empty
    return f"{value:,.{digits}f}"


def emit(fmt_name: str, document, records=None, table=None) -> None:
    """Write a result in the chosen format: ``document()`` as JSON, ``records()`` as CSV, or call
    ``table()`` for the rich table. Each is a callable so that only the chosen form is built."""
    if fmt_name == "json":
        write_json(document())
    elif fmt_name == "csv":
        write_csv(records())
    else:
        table()


def print_whole(con, table) -> None:
    """Print a rich table at its natural width even on a narrow console, so numbers are never cut."""
    from rich.measure import Measurement

    width = con.width
    con.width = max(width, Measurement.get(con, con.options.update(max_width=10_000), table).maximum)
    con.print(table)
    con.width = width
