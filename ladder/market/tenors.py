"""Tenor labels such as ``1M``, ``3M``, ``1Y`` and their length in months."""

from __future__ import annotations

import re

_TENOR = re.compile(r"^\s*(\d+)\s*([MY])\s*$", re.IGNORECASE)


def tenor_months(label: str) -> int:
    """Months in a tenor label (``"3M"`` -> 3, ``"2Y"`` -> 24). Raises ValueError if not a tenor."""
    match = _TENOR.match(str(label))
    if not match or int(match.group(1)) == 0:
        raise ValueError(f"{label!r} is not a tenor; write a whole number of months or years, e.g. 3M or 2Y")
    count, unit = int(match.group(1)), match.group(2).upper()
    return count * 12 if unit == "Y" else count


def tenor_label(months: int) -> str:
    """The shortest label for ``months`` (24 -> ``"2Y"``, 18 -> ``"18M"``)."""
    return f"{months // 12}Y" if months % 12 == 0 else f"{months}M"
