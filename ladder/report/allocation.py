"""Allocation by sector, issuer and rating beside each policy limit, and the maturity distribution.

Shares are percent-of-portfolio figures on the policy's basis (market, book or face value), the same
weights the rule checker uses (``PositionMeasures.basis_values``); shares are decimals here (0.05 =
5%). A limit's status is the checker's: the group's finding when it has one, else ``pass``.
"""

from __future__ import annotations

import numpy as np

from ladder.folder.book_file import Book
from ladder.policy.model import issuer_key
from ladder.market.ratings import long_notches, long_symbol, short_notches, short_symbol
from ladder.policy.results import PASS, CheckResult, worst
from ladder.report.model import Chart, Column, Table
from ladder.risk.rungs import RUNGS, rung_ends, rung_index


NOT_CHECKED = "not checked"


def _status(check: CheckResult, rule: str, groups) -> str:
    """The status of ``rule`` for any of ``groups`` (names); NOT_CHECKED when the check has no such rule."""
    try:
        result = check.rule(rule)
    except KeyError:
        return NOT_CHECKED
    keys = {issuer_key(g) for g in groups}
    found = [f.status for f in result.findings if issuer_key(f.group) in keys]
    return worst(found) if found else (PASS if result.findings or result.status == PASS else result.status)


def _sector_rules(book: Book, sector: str) -> str:
    s = book.policy.sector(sector)
    if s is None:
        return "not named in the policy"
    parts = []
    if not s.allowed:
        parts.append("not authorized")
    if s.min_pct is not None:
        parts.append(f"at least {s.min_pct:g}%")
    if s.max_maturity is not None:
        parts.append(f"maturity at most {s.max_maturity.describe()}")
    if s.min_long_rating:
        parts.append(f"long-term rating at least {s.min_long_rating}")
    if s.min_short_rating:
        parts.append(f"short-term rating at least {s.min_short_rating}")
    if s.issuer_max_pct is not None:
        parts.append(f"issuer at most {s.issuer_max_pct:g}%")
    if s.callable_max_pct is not None:
        parts.append(f"callables at most {s.callable_max_pct:g}%")
    return "; ".join(parts)


SECTOR_COLUMNS = (Column("sector", "Sector"), Column("count", "Holdings", "int"),
                  Column("market_value", "Market value", "money"), Column("share", "Share", "pct"),
                  Column("limit", "Limit (max)", "pct"), Column("headroom", "Headroom", "pct"),
                  Column("status", "Status"), Column("rules", "Other limits"))


def sector_table(book: Book, check: CheckResult, market_value, weight) -> Table:
    h = book.holdings
    total = weight.sum()
    rows = []
    for sector in dict.fromkeys(h.sector):
        inside = h.sector == sector
        share = float(weight[inside].sum() / total)
        rule = book.policy.sector(sector)
        limit = None if rule is None or rule.max_pct is None else rule.max_pct / 100.0
        statuses = [r.status for r in check.rules if r.rule.startswith(f"sectors.{sector}.")]
        rows.append((sector, int(inside.sum()), float(market_value[inside].sum()), share, limit,
                     None if limit is None else limit - share, worst(statuses), _sector_rules(book, sector)))
    return Table(f"By sector ({book.policy.basis} value basis)", SECTOR_COLUMNS, tuple(rows),
                 ("Total", len(h), float(market_value.sum()), 1.0, None, None, check.status, ""))


ISSUER_COLUMNS = (Column("issuer", "Issuer family"), Column("members", "Issuers in the book"),
                  Column("sectors", "Sectors"), Column("count", "Holdings", "int"),
                  Column("market_value", "Market value", "money"), Column("share", "Share", "pct"),
                  Column("counted", "Share counted", "pct"), Column("limit", "Limit", "pct"),
                  Column("headroom", "Headroom", "pct"), Column("rule", "Limit from"), Column("status", "Status"))


def _counted(book: Book, key: str, inside: np.ndarray, scope: np.ndarray, pct: np.ndarray) -> float:
    """Share counted by issuer limit ``key`` for the family ``inside`` within ``scope``: the family's, or
    under ``per = "issuer"`` its largest single issuer's (percent)."""
    h = book.holdings
    here = inside & scope
    if book.policy.per_of(key) == "family" or not here.any():
        return float(pct[here].sum())
    keys = np.array([issuer_key(x) for x in h.issuer[here]], dtype=object)
    return max(float(pct[here][keys == k].sum()) for k in set(keys))


def _issuer_limits(book: Book, members, inside: np.ndarray, pct: np.ndarray) -> list[tuple[str, float, float]]:
    """(rule key, limit %, share counted %) of every issuer limit that applies to the family ``inside``
    (its issuers ``members``)."""
    p, h = book.policy, book.holdings
    everything = np.ones(len(h), bool)
    named = [i for i in p.issuers if issuer_key(i.name) in {issuer_key(m) for m in members}]
    out = [(i.key("max_pct"), i.max_pct, _counted(book, i.key("max_pct"), inside, everything, pct))
           for i in named if i.max_pct is not None]
    exempt = [s.name for s in p.sectors if s.issuer_cap_exempt]
    counted = ~np.isin(h.sector, exempt)
    if not named and p.portfolio.issuer_max_pct is not None and (inside & counted).any():
        key = "portfolio.issuer_max_pct"
        out.append((key, p.portfolio.issuer_max_pct, _counted(book, key, inside, counted, pct)))
    for s in p.sectors:
        here = h.sector == s.name
        if s.issuer_max_pct is not None and (inside & here).any():
            key = s.key("issuer_max_pct")
            out.append((key, s.issuer_max_pct, _counted(book, key, inside, here, pct)))
    return out


def issuer_table(book: Book, check: CheckResult, market_value, weight) -> Table:
    """One row an issuer family (a parent and its affiliates, ``issuers.csv``; an issuer on its own is
    its own family), largest first; the binding limit is the one with the least headroom."""
    h = book.holdings
    pct = 100.0 * weight / weight.sum()
    family = book.families.families(h.issuer)
    rows = []
    for name in dict.fromkeys(family):
        inside = family == name
        members = tuple(dict.fromkeys(h.issuer[inside]))
        limits = _issuer_limits(book, members, inside, pct)
        share = float(pct[inside].sum()) / 100.0
        sectors = ", ".join(dict.fromkeys(h.sector[inside]))
        statuses = [_status(check, key, (name,) + members) for key, _, _ in limits]
        known = [s for s in statuses if s != NOT_CHECKED]
        status = worst(known) if len(known) == len(statuses) or worst(known) != PASS else NOT_CHECKED
        listed = ", ".join(members)
        if limits:
            key, limit, counted = min(limits, key=lambda x: x[1] - x[2])
            rows.append((name, listed, sectors, int(inside.sum()), float(market_value[inside].sum()), share,
                         counted / 100.0, limit / 100.0, (limit - counted) / 100.0, key, status))
        else:
            rows.append((name, listed, sectors, int(inside.sum()), float(market_value[inside].sum()), share,
                         None, None, None, "exempt (no issuer limit applies)", status))
    rows.sort(key=lambda r: -r[5])
    return Table(f"By issuer family ({book.policy.basis} value basis; affiliates from issuers.csv)",
                 ISSUER_COLUMNS, tuple(rows))


RATING_COLUMNS = (Column("rating", "Rating"), Column("scale", "Scale"), Column("count", "Holdings", "int"),
                  Column("market_value", "Market value", "money"), Column("share", "Share", "pct"),
                  Column("status", "Status of the rating rules"))


def rating_table(book: Book, check: CheckResult, market_value, weight) -> Table:
    """Holdings by long-term rating (split ratings read by the policy's rule), else short-term."""
    h, split = book.holdings, book.policy.split
    long_n, short_n = long_notches(h.rating, split), short_notches(h.short_rating, split)
    labels = []
    for ln, sn in zip(long_n, short_n):
        if np.isfinite(ln):
            labels.append((0, ln, long_symbol(ln), "long-term"))
        elif np.isfinite(sn):
            labels.append((1, sn, short_symbol(sn), "short-term"))
        else:
            labels.append((2, 0, "not rated", ""))
    total = weight.sum()
    rating_rules = [r for r in check.rules if r.rule.endswith(("min_long_rating", "min_short_rating"))]
    rows = []
    for key in sorted(set(labels)):
        inside = np.array([lab == key for lab in labels])
        ids = set(h.id[inside])
        status = worst([r.status for r in rating_rules if ids & set(r.holdings)])
        rows.append((key[2], key[3], int(inside.sum()), float(market_value[inside].sum()),
                     float(weight[inside].sum() / total), status))
    return Table("By rating (funds and deposits without a rating shown as not rated)", RATING_COLUMNS, tuple(rows))


RUNG_COLUMNS = (Column("rung", "Rung"), Column("end", "Rung ends", "date"), Column("count", "Holdings", "int"),
                Column("principal", "Principal maturing", "money"), Column("market_value", "Market value", "money"),
                Column("share", "Share", "pct"), Column("needs", "Net cash needs", "money"),
                Column("surplus", "Maturing less needs", "money"), Column("cumulative", "Cumulative", "money"))


def maturity_table(book: Book, as_of, market_value) -> tuple[Table, Chart]:
    """Maturities by rung against the cash needs falling in the same rung (the ladder's target is
    to have money maturing before it is needed); funds count in the first rung at their balance."""
    h = book.holdings
    settle = np.datetime64(as_of, "D")
    rung = rung_index(settle, h.maturity)
    needs_rung = rung_index(settle, book.cash_needs.date)
    ends = [e.astype(object) for e in rung_ends(settle)] + [None]
    total = market_value.sum()
    rows, cumulative = [], 0.0
    for r, name in enumerate(RUNGS):
        inside = rung == r
        principal = float(np.where(h.kind[inside] == "fund", market_value[inside], h.face[inside]).sum())
        needs = float(book.cash_needs.amount[needs_rung == r].sum())
        cumulative += principal - needs
        rows.append((name, ends[r], int(inside.sum()), principal, float(market_value[inside].sum()),
                     float(market_value[inside].sum() / total), needs, principal - needs, cumulative))
    table = Table("Maturity distribution against the cash needs", RUNG_COLUMNS, tuple(rows))
    chart = Chart("The ladder: market value by rung against net cash needs", "bar", RUNGS,
                  (("market value", tuple(r[4] / 1e6 for r in rows)), ("net cash needs", tuple(r[6] / 1e6 for r in rows))),
                  "rung (time to final maturity)", "USD millions" if book.currency == "USD" else f"{book.currency} millions")
    return table, chart
