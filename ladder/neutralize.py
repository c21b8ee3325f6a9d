"""Text made harmless for where it lands: one helper per destination, used by every writer."""

from __future__ import annotations

FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def safe_cell(value):
    """A text cell a spreadsheet would run as a formula is prefixed with a quote (OWASP CSV injection)."""
    if isinstance(value, str) and value.startswith(FORMULA_START):
        return "'" + value
    return value
