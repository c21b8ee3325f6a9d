"""Hand-built books for the policy tests: Holdings arrays made directly, and their measures.

``holding(**fields)`` gives one row with plain defaults (a 1-year corporate note, face 1,000,000);
``book(rows)`` stacks them; ``measures(h, ...)`` fills PositionMeasures with market value = face
unless given, so shares are simple fractions of face the tests can state exactly.
"""

from __future__ import annotations

import numpy as np

from ladder.book.holdings import NO_CALL, Holdings
from ladder.policy.measures import PositionMeasures, days_to_maturity
from ladder.policy.policy_file import parse_policy

AS_OF = np.datetime64("2025-01-31", "D")
NAT = np.datetime64("NaT", "D")

DEFAULTS = dict(
    sector="corporate", issuer="Issuer", kind="fixed", face=1_000_000.0, maturity="2026-01-31", coupon=0.04,
    frequency=2, day_count="30/360", issue_date=NAT, first_coupon=NAT, rating="AA", short_rating="",
    rating_at_purchase="", quote_type="", quote=np.nan, book_price=100.0, purchase_date="2024-06-03",
    first_call=NAT, call_frequency=NO_CALL, call_price=np.nan, negotiable=True,
)
_DTYPES = dict(face=np.float64, coupon=np.float64, frequency=np.int64, quote=np.float64, book_price=np.float64,
               call_frequency=np.int64, call_price=np.float64, negotiable=bool, row=np.int64)
_DATES = ("maturity", "issue_date", "first_coupon", "purchase_date", "first_call", "price_date")


def holding(id: str, **fields) -> dict:
    row = dict(DEFAULTS, id=id)
    row.update(fields)
    return row


def book(rows: list[dict]) -> Holdings:
    columns = {}
    for name in Holdings.__dataclass_fields__:
        if name == "row":
            columns[name] = np.arange(2, len(rows) + 2, dtype=np.int64)
            continue
        values = [r.get(name, "NaT" if name == "price_date" else None) for r in rows]
        if name in _DATES:
            columns[name] = np.array(values, dtype="datetime64[D]")
        elif name in _DTYPES:
            columns[name] = np.array(values, dtype=_DTYPES[name])
        else:
            columns[name] = np.array(values, dtype=object)
    return Holdings(**columns)


def measures(h: Holdings, as_of=AS_OF, market_value=None, book_value=None, duration=None, cash=None,
             months: int = 12) -> PositionMeasures:
    """Measures of ``h``; ``cash`` is (n, months) received per coverage month (zeros by default)."""
    n = len(h)
    return PositionMeasures(
        holdings=h, as_of=as_of,
        market_value=h.face.copy() if market_value is None else np.asarray(market_value, float),
        book_value=h.face.copy() if book_value is None else np.asarray(book_value, float),
        effective_duration=np.full(n, 1.0) if duration is None else np.asarray(duration, float),
        days_to_maturity=days_to_maturity(h, as_of),
        cash_by_month=np.zeros((n, months)) if cash is None else np.asarray(cash, float),
    )


HEAD = """
[policy]
name = "Test policy"
version = "1"
adopted = 2024-01-01
"""


def policy(body: str, head: str = HEAD):
    """A Policy from a TOML body under a standard [policy] head (``head`` may add keys)."""
    return parse_policy(head + body, "policy.toml")


def principal_cash(h: Holdings, as_of=AS_OF, months: int = 12) -> np.ndarray:
    """(n, months): each holding's face in the coverage month of its maturity (funds left out)."""
    from ladder.policy.measures import coverage_start, month_index

    cash = np.zeros((len(h), months))
    month = month_index(h.maturity, coverage_start(as_of))
    rows = np.flatnonzero((month >= 0) & (month < months) & (h.kind != "fund"))
    cash[rows, month[rows]] = h.face[rows]
    return cash
