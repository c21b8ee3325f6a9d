"""The bytes of a book's files as the book reads them, and atomic writes of the tool's output files.

``holdings_change`` and ``curve_change`` give a change's replacements (path -> bytes) for
``ladder.folder.transaction.commit``: the holdings are written to the file the book reads, in its
format (a workbook as a workbook with the CSV's columns, anything else as CSV, which is how the
reader reads it). ``write_atomic`` replaces an output file outside a book (a report, a trades file).
"""

from __future__ import annotations

import csv
import datetime as dt
import io
import os
import stat
import tempfile
from pathlib import Path

import numpy as np

from ladder.book.holdings import NOT_NEGOTIABLE, QUOTE_DISCOUNT, QUOTE_PRICE, QUOTE_YIELD, Holdings
from ladder.book.holdings_file import COLUMNS
from ladder.errors import InputError, Problem
from ladder.neutralize import safe_cell

NUMBER_COLUMNS = ("face", "coupon_pct", "frequency", "price", "yield_pct", "discount_rate_pct", "book_price",
                  "call_frequency", "call_price", "par_yield_pct")
CURVE_COLUMNS = ("tenor", "par_yield_pct")


def _date(value) -> str:
    return "" if np.isnat(value) else str(value)


def _number(value, scale: float = 1.0) -> str:
    return "" if not np.isfinite(value) else f"{value * scale:.10g}"


def _face(value) -> str:
    """A face (currency units) to the cent: ten significant digits would drop the cents of a balance of
    100 million or more."""
    return "" if not np.isfinite(value) else f"{value:.2f}".rstrip("0").rstrip(".")


def holdings_rows(h: Holdings) -> list[dict[str, str]]:
    """The holdings as ``holdings.csv`` rows (percent in files, as the reader expects)."""
    rows = []
    for i in range(len(h)):
        quote = {QUOTE_PRICE: ("price", 1.0), QUOTE_YIELD: ("yield_pct", 100.0),
                 QUOTE_DISCOUNT: ("discount_rate_pct", 100.0)}.get(h.quote_type[i])
        callable_ = not np.isnat(h.first_call[i])
        row = {
            "id": h.id[i], "sector": h.sector[i], "issuer": h.issuer[i], "kind": h.kind[i],
            "face": _face(h.face[i]), "maturity_date": _date(h.maturity[i]),
            "coupon_pct": _number(h.coupon[i], 100.0) if h.kind[i] in ("fixed", "at_maturity") else "",
            "frequency": str(h.frequency[i]) if h.kind[i] == "fixed" else "",
            "day_count": h.day_count[i], "issue_date": _date(h.issue_date[i]),
            "first_coupon_date": _date(h.first_coupon[i]), "rating": h.rating[i],
            "short_rating": h.short_rating[i], "rating_at_purchase": h.rating_at_purchase[i],
            "price": "", "yield_pct": "", "discount_rate_pct": "",
            "book_price": _number(h.book_price[i]), "purchase_date": _date(h.purchase_date[i]),
            "first_call_date": _date(h.first_call[i]),
            "call_frequency": str(h.call_frequency[i]) if callable_ else "",
            "call_price": _number(h.call_price[i]) if callable_ else "",
            "negotiable": "" if h.negotiable[i] == (h.sector[i] not in NOT_NEGOTIABLE) else str(bool(h.negotiable[i])).lower(),
            "price_date": _date(h.price_date[i]),
        }
        if quote:
            row[quote[0]] = _number(h.quote[i], quote[1])
        rows.append(row)
    return rows


def write_atomic(path: Path, text: str) -> None:
    """Replace the output file ``path`` with ``text`` atomically (temporary file in the same folder,
    flushed, ``os.replace``); a replaced file keeps its mode, a new one follows the umask."""
    path = Path(path)
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(handle, "w", encoding="utf-8", newline="") as out:
            out.write(text)
            out.flush()
            os.fsync(out.fileno())
        try:
            mode = stat.S_IMODE(os.stat(path).st_mode)
        except FileNotFoundError:
            umask = os.umask(0)
            os.umask(umask)
            mode = 0o666 & ~umask
        os.chmod(temporary, mode)            # mkstemp makes 0600
        os.replace(temporary, path)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise


def _workbook(columns, rows: list[dict[str, str]], title: str) -> bytes:
    """A workbook of one sheet with ``columns`` and the rows' cells: numbers as numbers, dates as dates."""
    import openpyxl  # only when a workbook book is written

    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = title
    sheet.append(list(columns))
    for row in rows:
        sheet.append([_cell(name, row[name]) for name in columns])
    buffer = io.BytesIO()
    book.save(buffer)
    return buffer.getvalue()


def _cell(name: str, text: str):
    if not text:
        return None
    if name.endswith("_date"):
        return dt.date.fromisoformat(text)
    return float(text) if name in NUMBER_COLUMNS else text


def _refuse_workbook_with_other_sheets(path: Path) -> None:
    """A workbook whose other sheets a rewrite would lose is left alone (InputError)."""
    import openpyxl

    if path.exists():
        book = openpyxl.load_workbook(path, read_only=True)
        names = book.sheetnames
        book.close()
        if len(names) > 1:
            raise InputError([Problem(str(path), 0, 0, f"the workbook has {len(names)} sheets ({', '.join(names)}); "
                                      "the tool writes only its first sheet and would lose the others, so "
                                      "nothing was changed. Keep this table in a workbook of its own.")])


def _table_bytes(path: Path, columns, rows: list[dict[str, str]]) -> bytes:
    """The file of a table in ``path``'s format: a workbook for .xlsx, else CSV (as the reader reads it);
    text cells through ``safe_cell`` so that no cell is read as a formula."""
    rows = [{k: safe_cell(v) for k, v in row.items()} for row in rows]
    if path.suffix.lower() == ".xlsx":
        _refuse_workbook_with_other_sheets(path)
        return _workbook(columns, rows, path.stem)
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=list(columns), lineterminator="\n")
    writer.writeheader()
    writer.writerows(rows)
    return buffer.getvalue().encode("utf-8")


def holdings_change(book, holdings: Holdings) -> dict[Path, bytes]:
    """The replacement of the book's holdings file with ``holdings``, in that file's format."""
    target = Path(book.files["holdings"])
    return {target: _table_bytes(target, COLUMNS, holdings_rows(holdings))}


def curve_change(book, par_curve) -> dict[Path, bytes]:
    """The replacement of the book's curve file with ``par_curve`` (par yields in percent)."""
    target = Path(book.files["curve"])
    rows = [{"tenor": t, "par_yield_pct": f"{y * 100:.10g}"} for t, y in zip(par_curve.tenors, par_curve.par_yields)]
    return {target: _table_bytes(target, CURVE_COLUMNS, rows)}
