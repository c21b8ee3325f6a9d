"""Credit rating scales, their equivalence on one notch scale, and split-rating resolution.

Notches count down from the best: long-term notch 1 is AAA / Aaa, short-term notch 1 is A-1+ / F1+.
A larger notch is a weaker rating. A holding's rating field may list several agencies' ratings
separated by ``/`` (spaces around it allowed), e.g. ``"AA+/Aa1/AA"``; the order does not matter,
the agency is known from the symbol's form. ``NR`` and ``WR`` (not rated, rating withdrawn) may
appear and are ignored. The long-term symbols of S&P and Fitch are identical, so which of the two
gave a rating is not needed: they sit on the same notch.

Sources:
- S&P Global Ratings, "S&P Global Ratings Definitions": long-term AAA, AA, A, BBB, BB, B, CCC, CC,
  C, D (and SD); "ratings from 'AA' to 'CCC' may be modified by the addition of a plus (+) or
  minus (-) sign"; short-term A-1 (with "+" for extremely strong), A-2, A-3, B, C, D.
- Moody's, "Rating Symbols and Definitions": long-term Aaa, Aa, A, Baa, Ba, B, Caa, Ca, C with
  numerical modifiers 1, 2, 3 on "each generic rating classification from Aa through Caa"; short-term
  P-1, P-2, P-3 and NP (Not Prime).
- Fitch Ratings, "Rating Definitions": long-term AAA to D with "+"/"-" on AA to CCC, RD for
  restricted default; short-term F1 (with "+"), F2, F3, B, C, RD, D.
The one-to-one pairing S&P/Fitch <-> Moody's (AA+ = Aa1, ..., CCC- = Caa3) follows the parallel
category structure of those definitions and the agencies' customary correspondence; Ca = CC,
Moody's C = C and D/SD/RD below Moody's C are from memory (common practice). Short-term: P-1 is
placed with A-1/F1 (Moody's has no level above P-1, so a minimum of A-1+ is not met by P-1 alone),
and NP with B; both placements are from memory (common practice).
"""

from __future__ import annotations

import difflib
import re
from functools import lru_cache

import numpy as np

# (notch, S&P and Fitch symbol, Moody's symbol or None)
LONG_SCALE: tuple[tuple[int, str, str | None], ...] = (
    (1, "AAA", "Aaa"),
    (2, "AA+", "Aa1"), (3, "AA", "Aa2"), (4, "AA-", "Aa3"),
    (5, "A+", "A1"), (6, "A", "A2"), (7, "A-", "A3"),
    (8, "BBB+", "Baa1"), (9, "BBB", "Baa2"), (10, "BBB-", "Baa3"),
    (11, "BB+", "Ba1"), (12, "BB", "Ba2"), (13, "BB-", "Ba3"),
    (14, "B+", "B1"), (15, "B", "B2"), (16, "B-", "B3"),
    (17, "CCC+", "Caa1"), (18, "CCC", "Caa2"), (19, "CCC-", "Caa3"),
    (20, "CC", "Ca"),
    (21, "C", "C"),
    (22, "D", None),
)
# Default symbols outside the one-to-one table: S&P SD (selective default), Fitch RD (restricted default).
_LONG_DEFAULT_ALIASES = ("SD", "RD")

# (notch, S&P, Fitch, Moody's or None)
SHORT_SCALE: tuple[tuple[int, str, str, str | None], ...] = (
    (1, "A-1+", "F1+", None),
    (2, "A-1", "F1", "P-1"),
    (3, "A-2", "F2", "P-2"),
    (4, "A-3", "F3", "P-3"),
    (5, "B", "B", "NP"),
    (6, "C", "C", None),
    (7, "D", "D", None),
)
_SHORT_DEFAULT_ALIASES = ("SD", "RD")

NOT_RATED = ("NR", "WR")
SEPARATOR = "/"

LONG_NOTCH: dict[str, int] = {
    **{sp: n for n, sp, _ in LONG_SCALE},
    **{m: n for n, _, m in LONG_SCALE if m},
    **{alias: 22 for alias in _LONG_DEFAULT_ALIASES},
}
SHORT_NOTCH: dict[str, int] = {
    **{sp: n for n, sp, _, _ in SHORT_SCALE},
    **{f: n for n, _, f, _ in SHORT_SCALE},
    **{m: n for n, _, _, m in SHORT_SCALE if m},
    **{alias: 7 for alias in _SHORT_DEFAULT_ALIASES},
}
LONG_SYMBOL = {n: sp for n, sp, _ in LONG_SCALE}      # display symbol of a notch (S&P/Fitch form)
SHORT_SYMBOL = {n: sp for n, sp, _, _ in SHORT_SCALE}  # display symbol of a notch (S&P form)

SPLIT_RULES = ("lowest", "middle_of_three")
_SPLIT = re.compile(r"\s*/\s*")


def tokens(text: str) -> list[str]:
    """The ``/``-separated symbols of a rating field, blanks dropped."""
    return [t for t in _SPLIT.split(str(text).strip()) if t]


def _known(text: str, scale: dict[str, int]) -> bool:
    parts = tokens(text)
    return bool(parts) and all(t in scale or t in NOT_RATED for t in parts)


def is_known_long(text: str) -> bool:
    """True when every symbol in ``text`` is a long-term rating (or NR/WR). Empty text is not known."""
    return _known(text, LONG_NOTCH)


def is_known_short(text: str) -> bool:
    """True when every symbol in ``text`` is a short-term rating (or NR/WR). Empty text is not known."""
    return _known(text, SHORT_NOTCH)


def suggest(symbol: str, scale: dict[str, int]) -> list[str]:
    """Close known symbols for a misspelt one: same letters in another case first, then difflib."""
    same_case = [s for s in scale if s.casefold() == symbol.casefold()]
    return same_case or difflib.get_close_matches(symbol, list(scale), n=3, cutoff=0.6)


def _explain(text: str, scale: dict[str, int], other: dict[str, int], term: str, other_term: str) -> str | None:
    bad = [t for t in tokens(text) if t not in scale and t not in NOT_RATED]
    if not tokens(text):
        return f"no {term} rating given"
    if not bad:
        return None
    t = bad[0]
    if t in other:
        return f"{t!r} is a {other_term} rating, not a {term} one"
    hint = suggest(t, scale)
    more = f" (did you mean {' or '.join(repr(h) for h in hint)}?)" if hint else ""
    return f"unknown {term} rating {t!r}{more}; separate several agencies' ratings with '{SEPARATOR}'"


@lru_cache(maxsize=4096)   # a book repeats a few rating fields thousands of times
def explain_long(text: str) -> str | None:
    """Why ``text`` is not a long-term rating field (with suggestions), or None if it is one."""
    return _explain(text, LONG_NOTCH, SHORT_NOTCH, "long-term", "short-term")


@lru_cache(maxsize=4096)
def explain_short(text: str) -> str | None:
    """Why ``text`` is not a short-term rating field (with suggestions), or None if it is one."""
    return _explain(text, SHORT_NOTCH, LONG_NOTCH, "short-term", "long-term")


def resolve(notches: list[int], split: str) -> float:
    """One notch from several agencies' notches; NaN when there are none.

    ``lowest``: the weakest rating. ``middle_of_three``: with one rating that one, with two the weaker,
    with three or more the second best: Basel Committee, "International Convergence of Capital
    Measurement and Capital Standards" (June 2006), paragraphs 96-98 (two assessments: the higher risk
    weight; three or more: the higher of the two lowest risk weights).
    """
    if split not in SPLIT_RULES:
        raise ValueError(f"unknown split rule {split!r}; expected one of {SPLIT_RULES}")
    if not notches:
        return float("nan")
    ordered = sorted(notches)
    if split == "lowest" or len(ordered) <= 2:
        return float(ordered[-1])
    return float(ordered[1])


def _field_notches(text: str, scale: dict[str, int]) -> list[int]:
    return [scale[t] for t in tokens(text) if t in scale]


def long_notch(text: str, split: str = "lowest") -> float:
    """Resolved long-term notch of one rating field (NaN if no long-term symbol)."""
    return resolve(_field_notches(text, LONG_NOTCH), split)


def short_notch(text: str, split: str = "lowest") -> float:
    """Resolved short-term notch of one rating field (NaN if no short-term symbol)."""
    return resolve(_field_notches(text, SHORT_NOTCH), split)


def purchase_short_notch(text: str, split: str = "lowest") -> float:
    """Short-term notch in a mixed field such as ``rating_at_purchase``.

    B, C and D are read as long-term there (they exist on both scales), so only the unambiguous
    short symbols (A-1+ ... A-3, F1+ ... F3, P-1 ... P-3, NP) count.
    """
    return resolve([SHORT_NOTCH[t] for t in tokens(text) if t in SHORT_NOTCH and t not in LONG_NOTCH], split)


def _vectorized(texts, one) -> np.ndarray:
    """Apply ``one`` to each distinct text only (a book has few distinct rating fields)."""
    values = np.asarray(texts, dtype=object)
    if values.size == 0:
        return np.zeros(0)
    unique, inverse = np.unique(values.astype(str), return_inverse=True)
    return np.array([one(u) for u in unique], dtype=np.float64)[inverse.reshape(values.shape)]


def long_notches(texts, split: str = "lowest") -> np.ndarray:
    """Resolved long-term notch of each rating field, float64 with NaN for unrated."""
    return _vectorized(texts, lambda t: long_notch(t, split))


def short_notches(texts, split: str = "lowest") -> np.ndarray:
    """Resolved short-term notch of each rating field, float64 with NaN for unrated."""
    return _vectorized(texts, lambda t: short_notch(t, split))


def purchase_short_notches(texts, split: str = "lowest") -> np.ndarray:
    """``purchase_short_notch`` of each field."""
    return _vectorized(texts, lambda t: purchase_short_notch(t, split))


def long_symbol(notch: float) -> str:
    """S&P/Fitch-style symbol of a long-term notch; "unrated" for NaN or infinity."""
    return LONG_SYMBOL.get(int(notch), "unrated") if np.isfinite(notch) else "unrated"


def short_symbol(notch: float) -> str:
    """S&P-style symbol of a short-term notch; "unrated" for NaN or infinity."""
    return SHORT_SYMBOL.get(int(notch), "unrated") if np.isfinite(notch) else "unrated"
