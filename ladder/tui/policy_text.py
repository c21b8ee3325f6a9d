"""Policy results as screen text: limits, actuals and headroom in each rule's own unit. No Textual."""

from __future__ import annotations

import math

from ladder.tui import format as fmt

UNIT_SUFFIX = {"pct": "%", "years": " y", "days": " d", "currency": ""}
NOTCHES = " notches"


def value_text(value, unit: str) -> str:
    """A limit or an actual as written for its unit (ratings are symbols already)."""
    if value is None:
        return fmt.NA_TEXT
    if isinstance(value, str):
        return value
    if isinstance(value, float) and not math.isfinite(value):
        return fmt.NA_TEXT
    if unit == "currency":
        return fmt.money(value)
    digits = 0 if unit == "days" else 2 if unit == "pct" else 3
    return fmt.number(value, digits) + UNIT_SUFFIX.get(unit, "")


def headroom_text(value, unit: str) -> str:
    if value is None:
        return fmt.NA_TEXT
    if unit.endswith("_rating"):
        return f"{value:+g}{NOTCHES}"
    if unit == "currency":
        return fmt.money(value, sign=True)
    digits = 0 if unit == "days" else 2 if unit == "pct" else 3
    return fmt.number(value, digits, sign=True) + UNIT_SUFFIX.get(unit, "")
