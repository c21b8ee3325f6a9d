"""Policy results as screen text: limits, actuals and headroom in each rule's own unit. No Textual."""

from __future__ import annotations

import math

from ladder.tui import format as fmt

UNIT_SUFFIX = {"pct": "%", "years": " y", "days": " d", "currency": ""}
NONE_ALLOWED, NONE_FOUND = "none allowed", "none found"


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
        return notches(value)
    if unit == "currency":
        return fmt.money(value, sign=True)
    digits = 0 if unit == "days" else 2 if unit == "pct" else 3
    return fmt.number(value, digits, sign=True) + UNIT_SUFFIX.get(unit, "")


def notches(value: float) -> str:
    """A rating headroom in notches, signed, singular for one: ``+2 notches``, ``-1 notch``."""
    return f"{value:+g} notch" + ("" if abs(value) == 1 else "es")


def nothing_to_show(limit, actual) -> bool:
    """A rule that allows none of something and finds none (e.g. holdings outside the named
    sectors): its zero limit, actual and headroom say nothing, so the screen says so in words."""
    return limit == 0 and actual == 0 and not isinstance(limit, str)


def rule_cells(limit, actual, headroom, unit: str) -> tuple[str, str, str]:
    """Limit, actual and headroom as written on screen; a rule with nothing to show says so."""
    if nothing_to_show(limit, actual):
        return NONE_ALLOWED, NONE_FOUND, fmt.NA_TEXT
    return value_text(limit, unit), value_text(actual, unit), headroom_text(headroom, unit)
