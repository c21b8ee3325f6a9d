"""Results as plain records (lists of dicts of JSON-ready values): the one place json and csv come from.

Rates in records are percent and spreads basis points, as files and screens show them.
"""

from __future__ import annotations

import math


from ladder.analysis.valuation import Valuation


def clean_number(value, digits: int = 10):
    """A float rounded for output, None for NaN/inf (JSON has no NaN)."""
    value = float(value)
    return round(value, digits) if math.isfinite(value) else None


def holding_records(v: Valuation) -> list[dict]:
    """One record a holding: terms, prices per 100, money, yields in percent, risk in years."""
    h, m = v.holdings, v.measures
    pct = lambda x: clean_number(100 * x, 8)  # noqa: E731
    rows = []
    for i in range(len(h)):
        rows.append({
            "id": h.id[i], "sector": h.sector[i], "issuer": h.issuer[i], "kind": h.kind[i],
            "maturity_date": str(h.maturity[i]), "coupon_pct": pct(h.coupon[i]), "face": clean_number(h.face[i], 2),
            "rating": h.rating[i], "short_rating": h.short_rating[i],
            "clean_price": clean_number(v.clean[i], 8), "accrued": clean_number(v.accrued[i], 8),
            "dirty_price": clean_number(v.dirty[i], 8), "market_value": clean_number(v.market_value[i], 2),
            "ytm_pct": pct(m.ytm[i]), "bey_pct": pct(m.bey[i]),
            "macaulay_duration": clean_number(m.macaulay[i], 8), "modified_duration": clean_number(m.modified[i], 8),
            "convexity": clean_number(m.convexity[i], 8), "dv01": clean_number(v.dv01[i], 4),
            "effective_duration": clean_number(v.effective_duration[i], 8),
            "effective_convexity": clean_number(v.effective_convexity[i], 8),
            "spread_bp": clean_number(v.spread[i] * 1e4, 4),
            "cost": clean_number(v.cost[i], 2), "book_value": clean_number(v.book_value[i], 2),
            "unrealized_gain": clean_number(v.unrealized_gain[i], 2),
            "book_yield_pct": pct(v.book_yield[i]), "days_to_maturity": int(v.days_to_maturity[i]),
            "priced_from": v.priced_from[i], "callable": bool(h.callable[i]),
            "option_value": clean_number(v.option_value[i], 8),
            "yield_to_worst_pct": pct(v.yield_to_worst[i]), "yield_to_first_call_pct": pct(v.yield_to_first_call[i]),
        })
    return rows


def totals_record(v: Valuation) -> dict:
    t = v.totals
    return {
        "count": t.count, "face": clean_number(t.face, 2), "market_value": clean_number(t.market_value, 2),
        "cost": clean_number(t.cost, 2), "book_value": clean_number(t.book_value, 2),
        "unrealized_gain": clean_number(t.unrealized_gain, 2), "accrued": clean_number(t.accrued, 2),
        "yield_to_worst_pct": clean_number(100 * t.yield_to_worst, 8),
        "book_yield_pct": clean_number(100 * t.book_yield, 8),
        "modified_duration": clean_number(t.modified_duration, 8),
        "effective_duration": clean_number(t.effective_duration, 8),
        "convexity": clean_number(t.convexity, 8), "effective_convexity": clean_number(t.effective_convexity, 8),
        "dv01": clean_number(t.dv01, 4), "wam_days": clean_number(t.wam_days, 4),
    }


def valuation_document(v: Valuation) -> dict:
    """The ``ladder value --format json`` document."""
    return {"as_of": str(v.as_of), "holdings": holding_records(v), "totals": totals_record(v)}


