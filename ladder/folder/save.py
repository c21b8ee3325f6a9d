"""Writing a book's holdings back to its folder: atomically, keeping the previous file as a backup.

The new file is written to a temporary file in the same folder, flushed to disk, and moved over the
old one with ``os.replace`` (atomic on POSIX and Windows); the old file is first copied to
``<name>.bak``. A failure at any point leaves the old file as it was.
"""

from __future__ import annotations

import csv
import io
import os
import shutil
import tempfile
from pathlib import Path

import numpy as np

from ladder.book.holdings import NOT_NEGOTIABLE, QUOTE_DISCOUNT, QUOTE_PRICE, QUOTE_YIELD, Holdings
from ladder.book.holdings_file import COLUMNS


def _date(value) -> str:
    return "" if np.isnat(value) else str(value)


def _number(value, scale: float = 1.0) -> str:
    return "" if not np.isfinite(value) else f"{value * scale:.10g}"


def holdings_rows(h: Holdings) -> list[dict[str, str]]:
    """The holdings as ``holdings.csv`` rows (percent in files, as the reader expects)."""
    rows = []
    for i in range(len(h)):
        quote = {QUOTE_PRICE: ("price", 1.0), QUOTE_YIELD: ("yield_pct", 100.0),
                 QUOTE_DISCOUNT: ("discount_rate_pct", 100.0)}.get(h.quote_type[i])
        callable_ = not np.isnat(h.first_call[i])
        row = {
            "id": h.id[i], "sector": h.sector[i], "issuer": h.issuer[i], "kind": h.kind[i],
            "face": _number(h.face[i]), "maturity_date": _date(h.maturity[i]),
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
        }
        if quote:
            row[quote[0]] = _number(h.quote[i], quote[1])
        rows.append(row)
    return rows


def write_atomic(path: Path, text: str, backup: bool = True) -> None:
    """Replace ``path`` with ``text`` atomically; the previous file (if any) is kept as ``path.bak``."""
    path = Path(path)
    handle, temporary = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(handle, "w", encoding="utf-8", newline="") as out:
            out.write(text)
            out.flush()
            os.fsync(out.fileno())
        if backup and path.exists():
            shutil.copy2(path, path.with_name(path.name + ".bak"))
        os.replace(temporary, path)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise


def holdings_csv(h: Holdings) -> str:
    """The text of a ``holdings.csv`` for ``h``."""
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=list(COLUMNS), lineterminator="\n")
    writer.writeheader()
    writer.writerows(holdings_rows(h))
    return buffer.getvalue()


def save_holdings(book, holdings: Holdings) -> Path:
    """Write ``holdings`` as the book's holdings file (CSV; an .xlsx book gets a holdings.csv beside it)."""
    target = Path(book.files["holdings"])
    if target.suffix.lower() != ".csv":
        target = target.with_suffix(".csv")
    write_atomic(target, holdings_csv(holdings))
    return target


def curve_csv(par_curve) -> str:
    """The text of a ``curve.csv`` for a par curve (yields in percent)."""
    lines = ["tenor,par_yield_pct"] + [f"{t},{y * 100:.10g}" for t, y in zip(par_curve.tenors, par_curve.par_yields)]
    return "\n".join(lines) + "\n"


def save_curve(book, par_curve) -> Path:
    """Write ``par_curve`` as the book's curve file (atomic, previous file kept as ``.bak``)."""
    target = Path(book.files["curve"])
    write_atomic(target, curve_csv(par_curve))
    return target
