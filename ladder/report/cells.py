"""How report cells read as text (html and md): money with separators, rates in percent."""

from __future__ import annotations

import datetime as dt
import math

EMPTY = "—"


def cell_text(value, kind: str) -> str:
    """``value`` (model units) as text for a reader; rates (kind ``pct``) in percent."""
    if value is None or (isinstance(value, float) and not math.isfinite(value)):
        return EMPTY
    if isinstance(value, str):
        return value
    if isinstance(value, dt.date):
        return value.isoformat()
    if kind == "money":
        return f"{value:,.2f}"
    if kind == "pct":
        return f"{100 * value:.3f}%"
    if kind == "price":
        return f"{value:.4f}"
    if kind == "bp":
        return f"{value:+g}"
    if kind in ("years", "ratio"):
        return f"{value:.3f}"
    if kind in ("days", "int"):
        return f"{value:,.0f}"
    return str(value)


def is_number(kind: str) -> bool:
    return kind not in ("text", "date")
