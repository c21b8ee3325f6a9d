"""Securities the builder may buy: an offerings file, or generic candidates from the curve.

An offerings file (CSV or .xlsx) has the holdings columns (docs/formats.md) plus ``available_face``
(the most that can be bought), ``min_lot`` (the smallest purchase) and ``lot_increment`` (the step
above it), all face amounts in currency units; ``min_lot`` must be a whole number of increments, so a
purchase is ``n * lot_increment`` face with ``n = 0`` or ``min_lot / lot_increment <= n``. Every row
needs a quote (price, yield or discount rate): an offering is bought at its quoted price.

Generic candidates (no offerings file) stand for "a security of this sector and rating maturing at
this rung's end": one per rung, authorized sector and rating that occurs in the sector
(``SECTOR_RATINGS``), priced from the curve plus the book's spread lookup
(``ladder.pricing.spreads.table_spreads_bp``: by sector, rating and, where the table has them, tenor),
with a coupon that puts it at par on the settlement date. Each sector and rating is also offered
maturing at the horizon of each liquidity floor of the policy of 28 days or more (a four-week bill is
the shortest common Treasury bill), so the floors can be met with securities as well as funds.
Their ids start ``GENERIC-`` and their issuer names with ``generic``: every maturity of one sector and
rating has one generic issuer (``generic agency AA+ issuer``), so issuer and family limits hold for
it as for one real issuer (the treasurer then sources real issuers). A purchase is at least the book's
minimum ticket, in its lots (``[build]`` of book.toml); an offering is bought in at least the minimum
ticket too (rounded up to its own increments). Funds are bought in any amount.

The residual cash goes to a fund: the offerings' fund rows, else the book's own funds offered again,
else a generic government fund at the curve's one-month rate.
"""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np

from ladder.folder.book_file import Book, BuildSettings
from ladder.book.holdings import SECTORS, Holdings, make_holdings
from ladder.book.cells import MAX_FACE, parse_number
from ladder.book.holdings_file import read_holdings
from ladder.book.table_file import read_table
from ladder.build.rungs import Rungs
from ladder.errors import Problems
from ladder.market import ratings
from ladder.policy.model import Policy, issuer_key
from ladder.pricing.cashflows import cash_flows
from ladder.pricing.curve import bootstrap
from ladder.pricing.spreads import dirty_at_spread, settle_discount, table_spreads_bp

OFFERING_COLUMNS = ("available_face", "min_lot", "lot_increment")
GENERIC_PREFIX = "GENERIC-"
GENERIC_SOURCE = "generic stand-ins (curve + spread table), not offerings"
SHORT_SYMBOLS = ("A-1+", "A-1", "A-2", "A-3")
# The ratings a generic candidate of each sector may carry: those that occur in the sector (common
# practice, US market). Treasuries carry the sovereign's standing and need no rating here; the US
# agencies are rated with the sovereign (AAA by one agency, AA+ by another); supranationals are
# nearly all AAA or AA+; high-grade municipals AAA to A; corporates AA to BBB (AAA corporates are a
# handful of issuers); commercial paper, CDs and deposits carry short-term ratings (A-3 paper is rare).
SECTOR_RATINGS: dict[str, tuple[str, ...]] = {
    "treasury": ("",), "agency": ("AAA", "AA+"), "supranational": ("AAA", "AA+"),
    "municipal": ("AAA", "AA", "A"), "corporate": ("AA", "A", "BBB"),
    "commercial_paper": ("A-1+", "A-1", "A-2"), "cd": ("A-1+", "A-1", "A-2"), "deposit": ("A-1+", "A-1", "A-2"),
}
BILL_MONTHS = 12               # a generic Treasury maturing within a year is a bill (discount)
SHORTEST_DAYS = 28             # the shortest generic maturity (a four-week bill)


@dataclass(frozen=True, eq=False)
class Candidates:
    """Securities to choose from, one row each; ``holdings.face`` is not used (see ``available``)."""

    holdings: Holdings
    available: np.ndarray   # (n,) face that can be bought, inf when unlimited
    min_lot: np.ndarray     # (n,) face
    lot: np.ndarray         # (n,) face increment; funds are bought in any amount from min_lot (lot 0.01)
    generic: np.ndarray     # (n,) bool
    source: str             # the offerings file, or GENERIC_SOURCE
    left_out: tuple[tuple[str, int], ...] = ()   # (reason, count) of candidates the policy rules out

    def __len__(self) -> int:
        return len(self.holdings)

    @property
    def fund(self) -> np.ndarray:
        return self.holdings.kind == "fund"

    def take(self, index) -> "Candidates":
        return replace(self, holdings=self.holdings.take(index), available=self.available[index],
                       min_lot=self.min_lot[index], lot=self.lot[index], generic=self.generic[index])

    @staticmethod
    def concat(parts: "list[Candidates]") -> "Candidates":
        first = parts[0]
        return replace(first, holdings=Holdings.concat([p.holdings for p in parts]),
                       available=np.concatenate([p.available for p in parts]),
                       min_lot=np.concatenate([p.min_lot for p in parts]),
                       lot=np.concatenate([p.lot for p in parts]),
                       generic=np.concatenate([p.generic for p in parts]))


def _face_numbers(texts: list[str]) -> tuple[np.ndarray, list[int]]:
    values, bad = [], []
    for i, text in enumerate(texts):
        try:
            value = parse_number(text) if text.strip() else np.nan
        except ValueError:
            value = np.nan
        if not np.isfinite(value) or not 0 < value <= MAX_FACE:
            bad.append(i)
        values.append(value)
    return np.array(values, dtype=np.float64), bad


def read_offerings(path, book: Book) -> Candidates:
    """The offerings in ``path``; raises ``InputError`` with every problem (nothing half-read)."""
    path = Path(path)
    label = str(path)
    problems = Problems()
    h, extras = read_holdings(path, book.valuation_date, problems, label, extra_columns=OFFERING_COLUMNS)
    table = read_table(path, Problems(), label)
    if table is not None:
        for name in OFFERING_COLUMNS:
            if name not in table.column:
                problems.add(label, 1, 0, f"required column {name!r} is missing (face amounts in currency units)")
    if h is None or table is None or problems:
        problems.raise_if_any()
    col = table.column
    numbers = {}
    for name in OFFERING_COLUMNS:
        numbers[name], bad = _face_numbers(extras[name])
        for i in bad:
            problems.add(label, int(h.row[i]), col[name], f"{name} {extras[name][i]!r} is not a positive face amount "
                                                             f"of at most {MAX_FACE:,.0f}")
    held = set(book.holdings.id)
    for i in range(len(h)):
        row = int(h.row[i])
        if h.kind[i] != "fund" and h.quote_type[i] == "":
            problems.add(label, row, 0, f"offering {h.id[i]} has no quote; give price, yield_pct or discount_rate_pct")
        if h.id[i] in held:
            problems.add(label, row, col["id"], f"{h.id[i]} is already in the book; an offering needs a new id")
        avail, low, step = (numbers[n][i] for n in OFFERING_COLUMNS)
        if np.isfinite(low) and np.isfinite(avail) and low > avail:
            problems.add(label, row, col["min_lot"], f"min_lot {low:,.2f} is more than available_face {avail:,.2f}")
        if np.isfinite(low) and np.isfinite(step) and abs(low / step - round(low / step)) > 1e-9:
            problems.add(label, row, col["min_lot"],
                         f"min_lot {low:,.2f} is not a whole number of lot_increment {step:,.2f}")
    problems.raise_if_any()
    fund = h.kind == "fund"
    return Candidates(h, numbers["available_face"], np.where(fund, 0.0, numbers["min_lot"]),
                      np.where(fund, 0.01, numbers["lot_increment"]), np.zeros(len(h), bool), label)


def _authorized(policy: Policy) -> list[str]:
    if not policy.sectors:
        return [s for s in SECTORS if s != "fund"]
    return [s.name for s in policy.sectors if s.allowed and s.name != "fund"]


def _par_coupons(h: Holdings, curve, settle, spreads_bp: np.ndarray) -> np.ndarray:
    """Coupon (decimal, rounded to 0.001%) putting each coupon-bearing row at par on ``settle``:
    the dirty price is linear in the coupon, so two pricings give it."""
    prices = []
    for c in (0.0, 0.01):
        trial = replace(h, coupon=np.where(h.kind == "discount", 0.0, c))
        cf = cash_flows(trial, settle)
        prices.append(dirty_at_spread(cf, settle_discount(curve, cf), spreads_bp / 1e4))
    slope = (prices[1] - prices[0]) / 0.01
    coupon = np.where(slope > 0, (100.0 - prices[0]) / np.where(slope > 0, slope, 1.0), 0.0)
    return np.where(h.kind == "discount", 0.0, np.round(np.maximum(coupon, 0.0) * 1e5) / 1e5)


def unique_ids(ids, taken) -> list[str]:
    """``ids`` with ``-2``, ``-3``, ... appended where one is already ``taken`` (a book that holds an
    earlier build's lots gets new ids for the next build's)."""
    seen = set(taken)
    out = []
    for base in ids:
        name, k = base, 1
        while name in seen:
            k += 1
            name = f"{base}-{k}"
        seen.add(name)
        out.append(name)
    return out


def generic_candidates(book: Book, rungs: Rungs, settle: dt.date) -> Candidates:
    """One generic security per rung, authorized sector and rating of the sector (see module docstring)."""
    policy = book.policy
    settle64 = np.datetime64(settle, "D")
    rows: dict[str, list] = {k: [] for k in ("id", "sector", "issuer", "kind", "maturity", "rating", "short_rating",
                                             "issue_date", "frequency")}
    starts = np.concatenate([[settle64], rungs.ends[:-1]])
    floors = sorted({f.within_days for f in policy.portfolio.liquidity if f.within_days >= SHORTEST_DAYS})
    floor_terms = [(settle64 + d, f"{d}D") for d in floors if settle64 + d <= rungs.ends[0]]
    for sector in _authorized(policy):
        rule = policy.sector(sector)
        limit = rule.max_maturity if rule is not None else None
        latest = settle64 + limit.days(settle64) if limit is not None else None
        for rating in SECTOR_RATINGS.get(sector, ()):
            long_, short = ("", rating) if rating in SHORT_SYMBOLS else (rating, "")
            terms = [(end, label, months, start) for start, end, label, months in
                     zip(starts, rungs.ends, rungs.labels, rungs.months)]
            terms += [(end, label, 0, settle64) for end, label in floor_terms]
            for end, label, months, start in terms:
                maturity = end if latest is None else min(end, latest)
                if maturity <= start:
                    continue
                bill = sector == "treasury" and months <= BILL_MONTHS
                kind = "discount" if bill else ""
                rows["id"].append(f"{GENERIC_PREFIX}{sector}-{rating or 'gov'}-{label}")
                rows["sector"].append(sector)
                rows["issuer"].append(f"generic {sector}{' ' + rating if rating else ''} issuer")
                rows["kind"].append(kind)
                rows["maturity"].append(maturity)
                rows["rating"].append(long_)
                rows["short_rating"].append(short)
                rows["issue_date"].append(settle64)
                rows["frequency"].append(-1)
    n = len(rows["id"])
    rows["id"] = unique_ids(rows["id"], book.holdings.id)
    ticket = book.build
    h = make_holdings(**rows, face=np.full(n, ticket.min_ticket))
    spread_bp = table_spreads_bp(h, book.spreads, settle64)
    priced = np.isfinite(spread_bp)
    h, spread_bp = h.take(priced), spread_bp[priced]
    curve = bootstrap(book.curve, np.datetime64(book.valuation_date))
    h = replace(h, coupon=_par_coupons(h, curve, settle64, spread_bp))
    m = len(h)
    left = (("no spread in book.toml [spreads] for the sector and rating", n - m),) if m < n else ()
    return Candidates(h, np.full(m, np.inf), np.full(m, ticket.min_ticket), np.full(m, ticket.lot), np.ones(m, bool),
                      GENERIC_SOURCE, left)


def with_tickets(c: Candidates, ticket: BuildSettings) -> Candidates:
    """``c`` with every security bought in at least the minimum ticket: its ``min_lot`` raised to the
    ticket rounded up to its own increments (funds unchanged)."""
    fund = c.fund
    steps = np.where(fund, 1.0, c.lot)
    raised = np.maximum(c.min_lot, np.ceil(ticket.min_ticket / steps - 1e-9) * steps)
    return replace(c, min_lot=np.where(fund, c.min_lot, raised))


def fund_candidates(book: Book, settle: dt.date) -> Candidates:
    """Where the residual goes: the book's funds offered again (a new lot of each fund issuer, at the
    yield of its first holding), else a generic government fund at the curve's one-month continuously
    compounded zero rate."""
    h = book.holdings
    is_fund = (h.kind == "fund") & (h.sector == "fund")
    keys = issuer_keys(h)
    funds = [i for i in np.flatnonzero(is_fund) if i == np.flatnonzero(is_fund & (keys == keys[i]))[0]]
    maturity = np.datetime64(settle, "D") + 1
    if len(funds):
        src = h.take(np.array(funds))
        ids = unique_ids([i if i.startswith("BUILD-") else f"BUILD-{i}" for i in src.id], h.id)
        offered = make_holdings(id=ids, sector=src.sector, issuer=src.issuer,
                                kind=src.kind, face=np.ones(len(src)), maturity=[maturity] * len(src),
                                day_count=src.day_count, quote_type=src.quote_type, quote=src.quote)
        generic = np.zeros(len(src), bool)
    else:
        curve = bootstrap(book.curve, np.datetime64(book.valuation_date))
        rate = float(curve.zero_rate(np.array([1.0 / 12.0]))[0])
        offered = make_holdings(id=unique_ids([f"{GENERIC_PREFIX}fund"], h.id), sector=["fund"], issuer=["generic government fund"],
                                kind=["fund"], face=[1.0], maturity=[maturity], quote_type=["yield"],
                                quote=[round(rate, 6)])
        generic = np.ones(1, bool)
    n = len(offered)
    return Candidates(offered, np.full(n, np.inf), np.zeros(n), np.full(n, 0.01), generic, "fund")


def eligible(policy: Policy, c: Candidates, rungs: Rungs, settle: dt.date) -> Candidates:
    """The candidates a purchase may take under ``policy`` (named and authorized sector, rating minima,
    maximum maturities) and inside the rungs (funds need no rung); ``left_out`` counts the rest by reason."""
    h = c.holdings
    settle64 = np.datetime64(settle, "D")
    days = np.where(np.isnat(h.maturity), 1, (h.maturity - settle64).astype(np.int64))
    keep = np.ones(len(h), bool)
    reasons: list[tuple[str, int]] = []

    def rule_out(mask, reason):
        nonlocal keep
        hit = keep & mask
        if hit.any():
            reasons.append((reason, int(hit.sum())))
        keep = keep & ~mask

    named = {s.name for s in policy.sectors}
    if named:
        rule_out(~np.isin(h.sector, list(named)), "sectors: in a sector the policy does not name")
    long_ = ratings.long_notches(h.rating, policy.split)
    short = ratings.short_notches(h.short_rating, policy.split)
    for s in policy.sectors:
        here = h.sector == s.name
        if not s.allowed:
            rule_out(here, s.key("allowed"))
            continue
        if s.max_maturity is not None:
            rule_out(here & (days > s.max_maturity.days(settle64)), s.max_maturity.key)
        if s.min_long_rating is not None:
            notch = ratings.LONG_NOTCH[s.min_long_rating]
            rule_out(here & ~(long_ <= notch), s.key("min_long_rating"))
        if s.min_short_rating is not None:
            notch = ratings.SHORT_NOTCH[s.min_short_rating]
            rule_out(here & ~(short <= notch), s.key("min_short_rating"))
    if policy.portfolio.max_maturity is not None:
        rule_out(days > policy.portfolio.max_maturity.days(settle64), policy.portfolio.max_maturity.key)
    rule_out((h.kind != "fund") & (rungs.index(h.maturity) < 0), f"matures after the last rung ({rungs.ends[-1]})")
    rule_out(days <= 0, "matures on or before the settlement date")
    return replace(c.take(keep), left_out=c.left_out + tuple(reasons))


def issuer_keys(h: Holdings) -> np.ndarray:
    return np.array([issuer_key(x) for x in h.issuer], dtype=object)
