"""Numbers to screen text, vectorized over arrays: percent for rates, thousands separators for money.

Inputs follow the model's units (rates decimal, prices per 100, money in currency units); NaN and
None show as ``NA_TEXT``. Nothing here computes a figure: it only writes figures down.
"""

from __future__ import annotations

import math

import numpy as np

from ladder.neutralize import safe_terminal

NA_TEXT = "—"


def number(value, digits: int = 2, scale: float = 1.0, sign: bool = False) -> str:
    """One number with thousands separators; ``scale`` multiplies first (100 for percent)."""
    if value is None:
        return NA_TEXT
    value = float(value) * scale
    if not math.isfinite(value):
        return NA_TEXT
    return f"{value:+,.{digits}f}" if sign else f"{value:,.{digits}f}"


def numbers(values, digits: int = 2, scale: float = 1.0, sign: bool = False) -> np.ndarray:
    """``number`` over an array: an object array of text."""
    out = np.empty(len(values), dtype=object)
    spec = f"{{:{'+' if sign else ''},.{digits}f}}"
    scaled = np.asarray(values, dtype=np.float64) * scale
    finite = np.isfinite(scaled)
    out[~finite] = NA_TEXT
    out[finite] = [spec.format(v) for v in scaled[finite].tolist()]
    return out


def percent(value, digits: int = 3, sign: bool = False) -> str:
    """A decimal rate as percent text without the sign: 0.0425 -> ``4.250``."""
    return number(value, digits, 100.0, sign)


def percents(values, digits: int = 3, sign: bool = False) -> np.ndarray:
    return numbers(values, digits, 100.0, sign)


def bp(value, digits: int = 1, sign: bool = False) -> str:
    """A decimal spread as basis points: 0.0012 -> ``12.0``."""
    return number(value, digits, 1e4, sign)


def money(value, digits: int = 0, sign: bool = False) -> str:
    return number(value, digits, 1.0, sign)


def texts(values) -> np.ndarray:
    """Any array as text (dates ISO, NaT as ``NA_TEXT``), control characters removed (``safe_terminal``)."""
    values = np.asarray(values)
    if np.issubdtype(values.dtype, np.datetime64):
        out = np.datetime_as_string(values, unit="D").astype(object)
        out[np.isnat(values)] = NA_TEXT
        return out
    return np.array([("" if v is None else safe_terminal(v)) for v in values.tolist()], dtype=object)
