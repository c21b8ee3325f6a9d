"""Fitting a sector's spread curves to the z-spreads of its quoted holdings.

For each rating bucket of a fitted sector that has quoted option-free holdings, the bucket's curve
keeps its shape s(T) and moves by one level L: the least-squares fit of z_i = s(T_i) + L over those
holdings (unweighted), whose solution is L = mean(z_i - s(T_i)), bp. T_i is the holding's tenor
(``ladder.pricing.spreads.tenor_years``); z_i its z-spread solved from its quote. A bucket with no
quoted holding keeps its curve. Callables (whose quote gives an OAS, not a z-spread) and funds are
left out of the fit.
"""

from __future__ import annotations

import numpy as np

from ladder.book.holdings import QUOTE_NONE, Holdings
from ladder.pricing.cashflows import cash_flows
from ladder.pricing.curve import Curve
from ladder.pricing.quotes import dirty_from_quote
from ladder.pricing.spreads import SpreadCurve, SpreadTable, settle_discount, spread_keys, tenor_years, z_spreads


def quoted_z_spreads_bp(holdings: Holdings, curve: Curve, settle) -> np.ndarray:
    """z-spread in bp of each quoted option-free holding at ``settle``; NaN for the others."""
    out = np.full(len(holdings), np.nan)
    rows = np.flatnonzero((holdings.quote_type != QUOTE_NONE) & (holdings.kind != "fund") & ~holdings.callable)
    if len(rows):
        sub = holdings.take(rows)
        cf = cash_flows(sub, np.datetime64(settle, "D"))
        out[rows] = 1e4 * z_spreads(cf, settle_discount(curve, cf), dirty_from_quote(sub, cf))
    return out


def fit_levels(table: SpreadTable, holdings: Holdings, settle, z_bp: np.ndarray,
               sectors) -> tuple[SpreadTable, dict[tuple[str, str], float]]:
    """``table`` with the buckets of ``sectors`` moved to the z-spreads ``z_bp`` (n,) of the quoted
    holdings (module docstring), and the level L (bp) of each bucket fitted."""
    keys = spread_keys(holdings, table)
    years = tenor_years(holdings, settle)
    fitted = {sector: dict(buckets) for sector, buckets in table.items()}
    levels: dict[tuple[str, str], float] = {}
    for sector in sectors:
        for key, curve in table.get(sector, {}).items():
            rows = (holdings.sector == sector) & (keys == key) & np.isfinite(z_bp)
            if rows.any():
                level = float(np.mean(z_bp[rows] - curve.at(years[rows])))
                fitted[sector][key] = SpreadCurve(curve.years, curve.bp + level)
                levels[(sector, key)] = level
    return fitted, levels
