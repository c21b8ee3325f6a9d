"""The report as an xlsx workbook: a cover sheet with the cautions, then one sheet a section.

Numbers stay numbers with number formats (rates as fractions shown in percent, dates as dates);
every text cell a spreadsheet would read as a formula is neutralized (``safe_cell``).
"""

from __future__ import annotations

import io

from ladder.neutralize import safe_cell
from ladder.report.model import Report, Section, Table

NUMBER_FORMATS = {"money": "#,##0.00", "pct": "0.000%", "price": "0.0000", "bp": "+0;-0;0", "years": "0.000",
                  "days": "#,##0", "int": "0", "ratio": "0.000", "date": "yyyy-mm-dd"}
SHEET_NAMES = {"summary": "Summary", "holdings": "Holdings", "activity": "Activity", "allocation": "Allocation",
               "maturities": "Maturities", "shock": "Rate shocks", "income": "Income", "certificate": "Certificate"}


def _put(sheet, row: int, column: int, value, kind: str = "text"):
    cell = sheet.cell(row=row, column=column, value=safe_cell(value))
    if kind in NUMBER_FORMATS and not isinstance(value, str) and value is not None:
        cell.number_format = NUMBER_FORMATS[kind]
    return cell


def _table(sheet, row: int, table: Table) -> int:
    from openpyxl.styles import Font

    _put(sheet, row, 1, table.title).font = Font(bold=True)
    row += 1
    for c, column in enumerate(table.columns, start=1):
        _put(sheet, row, c, column.title).font = Font(bold=True)
    rows = [(i, r) for i, r in enumerate(table.rows)] + ([(-1, table.total)] if table.total is not None else [])
    for i, values in rows:
        row += 1
        for c, value in enumerate(values):
            cell = _put(sheet, row, c + 1, value, table.kind(i, c))
            if i == -1:
                cell.font = Font(bold=True)
    return row + 2


def _section(sheet, section: Section) -> None:
    from openpyxl.styles import Font

    _put(sheet, 1, 1, section.title).font = Font(bold=True, size=13)
    row = 3
    for table in section.tables:
        row = _table(sheet, row, table)
    for note in section.notes:
        _put(sheet, row, 1, note)
        row += 1
    for line in section.signatures:
        row += 2
        _put(sheet, row, 1, f"{line}: ______________________________")
    for letter, width in zip("ABCDEFGHIJKLMN", (34, 26, 16, 16, 16, 16, 16, 16, 16, 16, 16, 16, 14, 12)):
        sheet.column_dimensions[letter].width = width


def report_xlsx(report: Report) -> bytes:
    """The workbook's bytes."""
    from openpyxl import Workbook
    from openpyxl.styles import Font

    book = Workbook()
    cover = book.active
    cover.title = "Cover"
    _put(cover, 1, 1, report.title).font = Font(bold=True, size=14)
    _put(cover, 2, 1, f"Period {report.period_start.isoformat()} (exclusive) to {report.as_of.isoformat()}")
    _put(cover, 4, 1, "Cautions").font = Font(bold=True)
    for k, caution in enumerate(report.cautions):
        _put(cover, 5 + k, 1, caution)
    cover.column_dimensions["A"].width = 110
    for section in report.sections:
        _section(book.create_sheet(SHEET_NAMES.get(section.key, section.key[:31])), section)
    buffer = io.BytesIO()
    book.save(buffer)
    return buffer.getvalue()
