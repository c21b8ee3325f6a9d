"""The compliance certificate: the policy, every rule with its basis and timing, the exceptions and
their cause, the liquidity statement, where the prices came from, and signature lines."""

from __future__ import annotations

import numpy as np

from ladder.analysis.valuation import Valuation
from ladder.folder.book_file import Book
from ladder.policy.results import BREACH, NEAR, PASS, REVIEW, CheckResult, RuleResult
from ladder.analysis.price_dates import STALE_DAYS, PriceDates
from ladder.report.findings import OpenFinding, escalation, findings_table
from ladder.report.model import Column, Section, Table

TESTING_WORDS = {"at_purchase": "tested at the date of purchase (a drift or downgrade since is a review)",
                 "continuous": "tested continuously"}
SIGNATURES = ("Prepared by (name, title, signature, date)", "Reviewed by (name, title, signature, date)")


def _text(value, unit: str) -> str:
    if value is None:
        return ""
    if isinstance(value, str):
        return value
    if unit == "pct":
        return f"{value:.2f}%"
    if unit == "currency":
        return f"{value:,.0f}"
    if unit == "days":
        return f"{value:.0f} days"
    if unit == "years":
        return f"{value:.2f} years"
    return f"{value:g}"


RULE_COLUMNS = (Column("rule", "Rule"), Column("text", "Limit in words"), Column("limit", "Limit"),
                Column("actual", "Actual"), Column("status", "Status"), Column("basis", "Basis"),
                Column("timing", "Timing"))


def rule_table(check: CheckResult) -> Table:
    rows = tuple((r.rule, r.text + (f"; largest: {r.worst_group}" if r.per else ""), _text(r.limit, r.unit),
                  _text(r.actual, r.unit), r.status, f"{r.basis} value" if r.basis else "not a percentage",
                  TESTING_WORDS.get(r.testing, r.testing)
                  + (f"; cure by {r.cure_by.isoformat()}" if r.cure_by else "")) for r in check.rules)
    return Table("Rule by rule", RULE_COLUMNS, rows)


def _cause(r: RuleResult, book: Book) -> str:
    h = book.holdings
    if r.rule.endswith(("min_long_rating", "min_short_rating")):
        parts = []
        for hid in r.holdings:
            i = int(np.flatnonzero(h.id == hid)[0])
            was = h.rating_at_purchase[i]
            now = h.rating[i] if r.rule.endswith("min_long_rating") else h.short_rating[i]
            parts.append(f"{hid} rated {now}" + (f", {was} at purchase (downgraded since)" if was else ""))
        cause = "; ".join(parts)
    else:
        groups = "; ".join(f"{f.label}: {_text(f.actual, r.unit)} against {_text(f.limit, r.unit)}"
                           for f in r.findings)
        cause = groups or f"{_text(r.actual, r.unit)} against {_text(r.limit, r.unit)}"
    what = {NEAR: "within the warning band of the limit (no action required)",
            REVIEW: "past the limit after purchase (market movement or a downgrade): a documented decision "
                    "is needed, not a forced sale",
            BREACH: "past the limit: must be cured"}[r.status]
    return f"{cause}. {what[0].upper()}{what[1:]}" + (f"; cure by {r.cure_by.isoformat()}." if r.cure_by else ".")


EXCEPTION_COLUMNS = (Column("rule", "Rule"), Column("status", "Status"), Column("holdings", "Holdings"),
                     Column("cause", "Cause"))


def exceptions_table(check: CheckResult, book: Book) -> Table:
    rows = tuple((r.rule, r.status, ", ".join(r.holdings), _cause(r, book)) for r in check.rules if r.status != PASS)
    return Table("Exceptions", EXCEPTION_COLUMNS, rows)


def _as_of(prices: PriceDates, v: Valuation) -> str:
    if prices.oldest is None:
        return f"No quoted prices; settlement {v.as_of.isoformat()}."
    span = (prices.oldest.isoformat() if prices.oldest == prices.newest else
            f"{prices.oldest.isoformat()} (oldest quote) to {prices.newest.isoformat()}")
    return f"Prices as of {span}; settlement {v.as_of.isoformat()}."


def price_sources(book: Book, v: Valuation, checksums: dict[str, str], prices: PriceDates) -> list[str]:
    """Where every price came from and when, and the inputs' checksums."""
    h = v.holdings
    quoted = (v.priced_from == "quote") & (h.kind != "fund")
    curve_priced = v.priced_from == "curve"
    files = book.files
    lines = [
        _as_of(prices, v),
        f"{int(quoted.sum())} holdings priced from the quotes in {files['holdings'].name} (clean price, yield or "
        "discount rate as given there); callables among them at their option-adjusted spread.",
        f"{int(curve_priced.sum())} holdings with no quote priced from the government curve in {files['curve'].name} "
        "plus the spread table in book.toml: "
        + (", ".join(h.id[curve_priced]) or "none") + ".",
        f"{int((h.kind == 'fund').sum())} funds and sweeps at their balance.",
        "Prices are estimates; confirm them against the custodian's statement.",
    ]
    stale = [f"{h.id[i]} ({prices.date[i]})" for i in np.flatnonzero(prices.stale)]
    if stale:
        lines.append(f"{len(stale)} stale price(s), more than {STALE_DAYS} days older than the valuation date "
                     f"{prices.valuation_date.isoformat()}: " + ", ".join(stale) + ". Get current quotes.")
    lines += [f"Input {role}: {name} (SHA-256 {sha})" for role, (name, sha) in sorted(checksums.items())]
    return lines


def certificate_section(book: Book, check: CheckResult, v: Valuation, liquidity: Table, liquidity_text: str,
                        checksums: dict[str, str], prices: PriceDates, found: tuple[OpenFinding, ...] = ()) -> Section:
    p = book.policy
    counts = check.counts()
    summary = (f"Policy: {check.policy_title}. Percentages on {check.basis} value; "
               f"share limits {TESTING_WORDS.get(check.testing, check.testing)} unless a rule says otherwise "
               "(each rule's timing below). Overall status at {check.as_of.isoformat()}: "
               f"{check.status.upper()} ({counts[PASS]} pass, {counts[NEAR]} near, {counts[REVIEW]} review, "
               f"{counts[BREACH]} breach).")
    statement = ("We certify that the holdings listed in this report were tested against every rule of the "
                 f"investment policy named above ({p.name}, version {p.version}, adopted {p.adopted.isoformat()}) "
                 f"on {check.as_of.isoformat()}, with the results shown, and that every exception is listed with "
                 "its cause.")
    exceptions = exceptions_table(check, book)
    notes = (summary, statement, "No exceptions." if not exceptions.rows else
             f"{len(exceptions.rows)} exception(s), listed with their cause.", liquidity_text,
             *price_sources(book, v, checksums, prices))
    overdue = [f for f in found if f.overdue]
    notes += tuple(f"ESCALATED: {f.rule} ({', '.join(f.holdings) or 'the portfolio'}) first detected "
                   f"{f.first_detected.isoformat()}, {escalation(f)}." for f in overdue)
    if found:
        notes += ("Cure dates run from the month-end at which a finding was first detected (from the history), "
                  "not from this report's date.",)
    return Section("certificate", "Compliance certificate", (rule_table(check), exceptions, liquidity,
                                                             findings_table(found)), notes,
                   signatures=SIGNATURES)
