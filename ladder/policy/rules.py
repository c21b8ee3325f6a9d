"""The rules of a policy, each a vectorized measure over the book (numpy; no loop over holdings).

A rule measures one or more groups (the portfolio, a sector, each issuer, each holding, each month)
and gives each group a value and a limit; ``ladder.policy.checker`` grades them. What each rule
measures (all percentages of the whole portfolio on the policy's basis):

- portfolio.max_effective_duration: basis-weighted average effective duration, years.
- portfolio.max_wam_days: basis-weighted average days to final maturity.
- portfolio.max_maturity_days|years, sectors.X.max_maturity_days|years: each holding's days to final
  maturity (years are counted on the calendar from the check date).
- portfolio.issuer_max_pct: each issuer family's share (``PositionMeasures.family``; each issuer's
  with ``per = "issuer"``), leaving out holdings in sectors with ``issuer_cap_exempt`` and the
  families of issuers named under [issuers]; issuers."N".max_pct: N's family's share in every sector.
- portfolio.callable_max_pct, sectors.X.callable_max_pct: share of callable holdings.
- portfolio.liquidity[i].min_pct: share maturing within ``within_days`` days.
- portfolio.cash_needs_horizon_months: for each month of the horizon, fund balances plus cumulative
  principal and coupons against cumulative net cash needs (``ladder.policy.liquidity``).
- sectors: share of each sector the policy does not name (only when it names any); sectors.X.allowed:
  share of a sector the policy forbids (limit 0).
- sectors.X.max_pct / min_pct: the sector's share; sectors.X.issuer_max_pct: each issuer family's
  (or issuer's) share within the sector.
- sectors.X.min_long_rating / min_short_rating: each holding's notch after the split-rating rule
  (unrated fails); a holding whose ``rating_at_purchase`` met the minimum is excused to ``review``.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Callable

import numpy as np

from ladder.book.cash_needs import CashNeeds
from ladder.errors import Problems
from ladder.market import ratings
from ladder.policy.liquidity import needs_coverage
from ladder.policy.measures import PositionMeasures, coverage_start
from ladder.policy.model import MaturityLimit, Policy, issuer_key

PER_WORDS = {"family": "issuer family (a parent with its affiliates)", "issuer": "single issuer"}
BASIS_WORDS = {"market": "market value", "book": "book value", "face": "face value"}
SPLIT_WORDS = {"lowest": "the lowest of the agencies' ratings", "middle_of_three": "the middle of three ratings"}


@dataclass(frozen=True, eq=False)
class BookView:
    """The book as the rules see it: arrays derived once per check."""

    as_of: np.datetime64
    ids: np.ndarray          # (n,) object
    pct: np.ndarray          # (n,) percent of the portfolio on the policy's basis
    weight: np.ndarray       # (n,) basis value, currency
    sector: np.ndarray       # (n,) object
    issuer: np.ndarray       # (n,) int code into issuer_names / issuer_keys
    issuer_names: np.ndarray  # (k,) object: one spelling of each found in the book
    issuer_keys: np.ndarray   # (k,) object: issuer_key of each
    family: np.ndarray       # (n,) int code into family_names
    family_names: np.ndarray  # (f,) object
    family_members: np.ndarray  # (f,) object: tuple of the issuer names of each family found in the book
    callable: np.ndarray     # (n,) bool
    fund: np.ndarray         # (n,) bool, kind == "fund"
    days: np.ndarray         # (n,) days to final maturity
    duration: np.ndarray     # (n,) years
    long: np.ndarray         # (n,) resolved long-term notch, NaN unrated
    short: np.ndarray        # (n,) resolved short-term notch, NaN unrated
    long_bought: np.ndarray  # (n,) long-term notch at purchase, NaN if not given
    short_bought: np.ndarray
    market_value: np.ndarray
    cash_by_month: np.ndarray
    cash_needs: CashNeeds | None

    @property
    def n(self) -> int:
        return len(self.ids)


def book_view(policy: Policy, m: PositionMeasures, cash_needs: CashNeeds | None) -> BookView:
    """Derive the arrays every rule reads; refuses (InputError) data the policy's rules cannot use."""
    h = m.holdings
    problems = Problems()
    weight = m.basis_values(policy.basis)
    _require_finite(problems, m, weight, f"no {BASIS_WORDS[policy.basis]} (the policy's percentage basis)")
    _require_finite(problems, m, m.days_to_maturity, "no days to maturity")
    if policy.portfolio.max_effective_duration is not None:
        _require_finite(problems, m, m.effective_duration, "no effective duration")
    horizon = policy.portfolio.cash_needs_horizon_months
    if horizon is not None and cash_needs is None:
        key = "portfolio.cash_needs_horizon_months"
        problems.add(policy.source, policy.line(key), 0, f"{key}: the book has no cash-needs forecast to cover")
    if horizon is not None and m.months < horizon:
        raise ValueError(f"cash_by_month has {m.months} months; the policy's horizon is {horizon}")
    problems.raise_if_any()
    total = weight.sum()
    raw, raw_first, raw_inverse = np.unique(h.issuer.astype(str), return_index=True, return_inverse=True)
    keys = np.array([issuer_key(x) for x in raw], dtype=object)   # once per distinct spelling
    unique, first_key, key_inverse = np.unique(keys.astype(str), return_index=True, return_inverse=True)
    inverse = key_inverse.reshape(-1)[raw_inverse.reshape(-1)]
    first = raw_first[first_key]
    family, family_names, members = _families(m.family, inverse, h.issuer[first])
    return BookView(
        as_of=m.as_of, ids=h.id, weight=weight,
        pct=100.0 * weight / total if total > 0 else np.zeros_like(weight),
        sector=h.sector, issuer=inverse, issuer_names=h.issuer[first], issuer_keys=unique.astype(object),
        family=family, family_names=family_names, family_members=members,
        callable=h.callable, fund=h.kind == "fund", days=m.days_to_maturity, duration=m.effective_duration,
        long=ratings.long_notches(h.rating, policy.split), short=ratings.short_notches(h.short_rating, policy.split),
        long_bought=ratings.long_notches(h.rating_at_purchase, policy.split),
        short_bought=ratings.purchase_short_notches(h.rating_at_purchase, policy.split),
        market_value=m.market_value, cash_by_month=m.cash_by_month, cash_needs=cash_needs,
    )


def _families(names: np.ndarray, issuer: np.ndarray, issuer_names: np.ndarray):
    """Family codes of the holdings (families matched like issuers), one spelling of each family, and
    the issuers of each family found in the book (sorted)."""
    spelled, first, raw = np.unique(names.astype(str), return_index=True, return_inverse=True)
    keys = np.array([issuer_key(x) for x in spelled], dtype=object)
    unique, first_key, key_inverse = np.unique(keys.astype(str), return_index=True, return_inverse=True)
    code = key_inverse.reshape(-1)[raw.reshape(-1)]
    pairs = np.unique(np.stack([code, issuer]), axis=1) if len(code) else np.zeros((2, 0), np.int64)
    members = np.empty(len(unique), dtype=object)
    starts = np.searchsorted(pairs[0], np.arange(len(unique)))
    for f, part in enumerate(np.split(pairs[1], starts[1:])):
        members[f] = tuple(sorted(str(x) for x in issuer_names[part]))
    return code, names[first[first_key]], members


def _require_finite(problems: Problems, m: PositionMeasures, values, what: str) -> None:
    bad = ~np.isfinite(values)
    for row, hid in zip(m.holdings.row[bad], m.holdings.id[bad]):
        problems.add(m.holdings_file, int(row), 0, f"{hid}: {what}")


@dataclass(frozen=True, eq=False)
class Measured:
    """What one rule measured: ``g`` groups and the holdings behind them."""

    keys: np.ndarray     # (g,) object
    values: np.ndarray   # (g,) float
    limits: np.ndarray   # (g,) float
    member: np.ndarray   # (n,) int: group of each holding that would cause a non-pass status, -1 none
    excused: np.ndarray  # (g,) bool: a violation here is a review (met the minimum at purchase)
    members: np.ndarray | None = None   # (g,) object: the issuers of each family group, else None


@dataclass(frozen=True, eq=False)
class Rule:
    """One limit of the policy. ``upper``: the value must not exceed the limit (else not fall below).
    ``drifts``: a share or average that moves after purchase (at_purchase testing reviews it).
    ``warns``: has a ``near`` band. ``testing``: "at_purchase" | "continuous" (the policy's [rules]
    entry, else the kind's default given to ``_Builder.add``, else the policy's ``testing``).
    ``per``: "family" | "issuer" for an issuer limit, else None."""

    key: str
    text: str
    unit: str
    limit: float | str
    upper: bool
    drifts: bool
    warns: bool
    uses_basis: bool
    empty_actual: float | None
    measure: Callable[[BookView], Measured]
    testing: str = "continuous"
    per: str | None = None


def _measured(n, keys, values, limits, member=None, excused=None) -> Measured:
    keys = np.asarray(keys, dtype=object)
    g = len(keys)
    return Measured(keys, np.asarray(values, dtype=np.float64).reshape(g),
                    np.broadcast_to(np.asarray(limits, dtype=np.float64), (g,)),
                    np.full(n, -1, np.int64) if member is None else member,
                    np.zeros(g, bool) if excused is None else excused)


def _whole(v: BookView, limit: float, value: float, causes=None, key="portfolio") -> Measured:
    """One group; ``causes`` marks the holdings behind it."""
    member = None if causes is None else np.where(causes, 0, -1)
    return _measured(v.n, [key], [value], limit, member)


def _by_group(v: BookView, limit: float, codes: np.ndarray, scope: np.ndarray, names: np.ndarray,
              causes: bool = True, members: np.ndarray | None = None) -> Measured:
    """One group per code present in ``scope``: the share of the portfolio of each."""
    present = np.unique(codes[scope])
    totals = np.bincount(codes[scope], weights=v.pct[scope], minlength=len(names))
    member = np.full(v.n, -1, np.int64)
    if causes:
        member[scope] = np.searchsorted(present, codes[scope])
    m = _measured(v.n, names[present], totals[present] if len(present) else [], limit, member)
    return m if members is None else replace(m, members=members[present])


def _by_issuer(v: BookView, limit: float, scope: np.ndarray, per: str) -> Measured:
    """One group per issuer family (``per = "family"``) or per issuer in ``scope``: the share of each."""
    if per == "family":
        return _by_group(v, limit, v.family, scope, v.family_names, members=v.family_members)
    return _by_group(v, limit, v.issuer, scope, v.issuer_names)


def group_of(v: BookView, per: str) -> np.ndarray:
    """Each holding's code in the groups of an issuer limit: its family or its issuer."""
    return v.family if per == "family" else v.issuer


def _each(v: BookView, limit: float, scope: np.ndarray, values: np.ndarray, excused=None) -> Measured:
    """One group per holding in ``scope``."""
    idx = np.flatnonzero(scope)
    member = np.full(v.n, -1, np.int64)
    member[idx] = np.arange(len(idx))
    return _measured(v.n, v.ids[idx], values[idx], limit, member, None if excused is None else excused[idx])


def _weighted_average(v: BookView, x: np.ndarray) -> float:
    total = v.weight.sum()
    return float((v.weight * x).sum() / total) if total > 0 else 0.0


def _sector_codes(v: BookView) -> tuple[np.ndarray, np.ndarray]:
    names, codes = np.unique(v.sector.astype(str), return_inverse=True)
    return codes.reshape(-1), names.astype(object)


class _Builder:
    """Turns a Policy into its Rules, in file order."""

    def __init__(self, policy: Policy):
        self.p = policy
        self.rules: list[Rule] = []
        self.basis = BASIS_WORDS[policy.basis]

    def add(self, key, text, unit, limit, measure, upper=True, drifts=True, warns=True, uses_basis=True,
            empty_actual=0.0, testing=None, issuer_limit=False):
        """``testing``: the default mode of this kind of rule (None: the policy's ``testing``)."""
        self.rules.append(Rule(key, text, unit, limit, upper, drifts, warns, uses_basis, empty_actual, measure,
                               self.p.testing_of(key, testing), self.p.per_of(key) if issuer_limit else None))

    def share(self, key, text, limit, scope_of, upper=True, causes=True, group="portfolio", testing=None):
        """A cap (or floor) on the share of the holdings selected by ``scope_of(view)``, as group ``group``."""
        def measure(v: BookView) -> Measured:
            scope = scope_of(v)
            return _whole(v, limit, float(v.pct[scope].sum()), scope if causes and upper else None, group)
        self.add(key, f"{text} ({self.basis})", "pct", limit, measure, upper=upper, testing=testing)

    def maturity(self, limit: MaturityLimit, where: str, scope_of):
        def measure(v: BookView) -> Measured:
            days = limit.days(v.as_of)
            scale = limit.amount / days if limit.unit == "years" and days > 0 else 1.0
            return _each(v, limit.amount, scope_of(v), v.days * scale)
        self.add(limit.key, f"{where} matures more than {limit.describe()} after the check date", limit.unit,
                 limit.amount, measure, drifts=False, warns=False, uses_basis=False, empty_actual=None,
                 testing="at_purchase")

    def rating(self, key, symbol: str, sector: str, long_term: bool):
        notch = (ratings.LONG_NOTCH if long_term else ratings.SHORT_NOTCH)[symbol]

        def measure(v: BookView) -> Measured:
            now, bought = (v.long, v.long_bought) if long_term else (v.short, v.short_bought)
            now = np.where(np.isnan(now), np.inf, now)
            return _each(v, notch, v.sector == sector, now, excused=(bought <= notch) & (now > notch))
        term = "long-term" if long_term else "short-term"
        self.add(key, f"{sector} holdings rated {symbol} or better {term} ({SPLIT_WORDS[self.p.split]}; "
                      f"unrated fails)", "long_rating" if long_term else "short_rating", symbol, measure,
                 drifts=False, warns=False, uses_basis=False, empty_actual=None, testing="at_purchase")

    def build(self) -> tuple[Rule, ...]:
        self.portfolio()
        self.sectors()
        self.issuers()
        return tuple(self.rules)

    def portfolio(self):
        pf = self.p.portfolio
        if pf.max_effective_duration is not None:
            lim = pf.max_effective_duration
            self.add("portfolio.max_effective_duration",
                     f"portfolio effective duration at most {lim:g} years (weighted by {self.basis})", "years", lim,
                     lambda v, lim=lim: _whole(v, lim, _weighted_average(v, v.duration), v.duration > lim),
                     testing="continuous")
        if pf.max_wam_days is not None:
            lim = pf.max_wam_days
            self.add("portfolio.max_wam_days",
                     f"weighted average maturity at most {lim:g} days (weighted by {self.basis})", "days", lim,
                     lambda v, lim=lim: _whole(v, lim, _weighted_average(v, v.days), v.days > lim),
                     testing="continuous")
        if pf.max_maturity is not None:
            self.maturity(pf.max_maturity, "no holding", lambda v: np.ones(v.n, bool))
        if pf.issuer_max_pct is not None:
            self.default_issuer_cap(pf.issuer_max_pct)
        if pf.callable_max_pct is not None:
            lim = pf.callable_max_pct
            self.share("portfolio.callable_max_pct", f"callable securities at most {lim:g}% of the portfolio", lim,
                       lambda v: v.callable)
        for floor in pf.liquidity:
            self.share(floor.key, f"at least {floor.min_pct:g}% of the portfolio matures within "
                                  f"{floor.within_days} days", floor.min_pct,
                       lambda v, d=floor.within_days: v.days <= d, upper=False, testing="continuous")
        if pf.cash_needs_horizon_months is not None:
            self.coverage(pf.cash_needs_horizon_months)

    def default_issuer_cap(self, lim: float):
        exempt_sectors = np.array([s.name for s in self.p.sectors if s.issuer_cap_exempt], dtype=object)
        named = np.array([issuer_key(i.name) for i in self.p.issuers], dtype=object)
        key = "portfolio.issuer_max_pct"
        per = self.p.per_of(key)

        def measure(v: BookView) -> Measured:
            group = group_of(v, per)
            has_own_rule = np.unique(group[np.isin(v.issuer_keys[v.issuer], named)])
            scope = ~np.isin(v.sector, exempt_sectors) & ~np.isin(group, has_own_rule)
            return _by_issuer(v, lim, scope, per)
        exempt = [f"{', '.join(exempt_sectors)} holdings"] if len(exempt_sectors) else []
        exempt += [f"issuers named under [issuers]{' and their families' if per == 'family' else ''}"] if len(
            named) else []
        tail = f"; exempt: {' and '.join(exempt)}" if exempt else ""
        self.add(key, f"no {PER_WORDS[per]} above {lim:g}% of the portfolio ({self.basis}){tail}", "pct", lim,
                 measure, issuer_limit=True)

    def coverage(self, horizon: int):
        def measure(v: BookView) -> Measured:
            start = coverage_start(v.as_of)
            cover = needs_coverage(v.market_value[v.fund].sum(), v.cash_by_month[~v.fund, :horizon].sum(axis=0),
                                   v.cash_needs.by_month(start, horizon))
            months = start.astype("datetime64[M]") + np.arange(horizon)
            return _measured(v.n, months.astype(str).astype(object), cover.cash, cover.needs)
        self.add("portfolio.cash_needs_horizon_months",
                 f"in each of the next {horizon} months, fund balances plus maturities and coupons received so far "
                 "cover the cash needs so far", "currency", 0.0, measure, upper=False, uses_basis=False,
                 testing="continuous")

    def sectors(self):
        if not self.p.sectors:
            return
        named = np.array([s.name for s in self.p.sectors], dtype=object)

        def unlisted(v: BookView) -> Measured:
            codes, names = _sector_codes(v)
            return _by_group(v, 0.0, codes, ~np.isin(v.sector, named), names)
        self.add("sectors", f"every holding is in a sector the policy names ({', '.join(named)})", "pct", 0.0,
                 unlisted, drifts=False, warns=False)
        for s in self.p.sectors:
            name = s.name
            in_sector = (lambda v, name=name: v.sector == name)
            if not s.allowed:
                self.add(s.key("allowed"), f"{name} is not an authorized investment ({self.basis})", "pct", 0.0,
                         lambda v, f=in_sector, name=name: _whole(v, 0.0, float(v.pct[f(v)].sum()), f(v), name),
                         drifts=False, warns=False)
                continue
            if s.max_pct is not None:
                self.share(s.key("max_pct"), f"{name} at most {s.max_pct:g}% of the portfolio", s.max_pct, in_sector,
                           group=name)
            if s.min_pct is not None:
                self.share(s.key("min_pct"), f"{name} at least {s.min_pct:g}% of the portfolio", s.min_pct, in_sector,
                           upper=False, group=name)
            if s.max_maturity is not None:
                self.maturity(s.max_maturity, f"no {name} holding", in_sector)
            if s.min_long_rating is not None:
                self.rating(s.key("min_long_rating"), s.min_long_rating, name, long_term=True)
            if s.min_short_rating is not None:
                self.rating(s.key("min_short_rating"), s.min_short_rating, name, long_term=False)
            if s.issuer_max_pct is not None:
                lim, key = s.issuer_max_pct, s.key("issuer_max_pct")
                per = self.p.per_of(key)
                self.add(key, f"no {PER_WORDS[per]} above {lim:g}% of the portfolio in {name} ({self.basis})",
                         "pct", lim, lambda v, f=in_sector, lim=lim, per=per: _by_issuer(v, lim, f(v), per),
                         issuer_limit=True)
            if s.callable_max_pct is not None:
                self.share(s.key("callable_max_pct"),
                           f"callable {name} at most {s.callable_max_pct:g}% of the portfolio", s.callable_max_pct,
                           lambda v, f=in_sector: f(v) & v.callable, group=name)

    def issuers(self):
        for i in self.p.issuers:
            if i.max_pct is None:
                continue
            wanted, key = issuer_key(i.name), i.key("max_pct")
            per = self.p.per_of(key)

            def measure(v: BookView, w=wanted, lim=i.max_pct, per=per) -> Measured:
                group = group_of(v, per)
                scope = np.isin(group, group[v.issuer_keys[v.issuer] == w])
                return _by_issuer(v, lim, scope, per)
            family = " and its family" if per == "family" else ""
            self.add(key, f"{i.name}{family} at most {i.max_pct:g}% of the portfolio, all sectors ({self.basis})",
                     "pct", i.max_pct, measure, issuer_limit=True)


def compile_rules(policy: Policy) -> tuple[Rule, ...]:
    """Every rule the policy states, in the order of the file's sections (portfolio, sectors, issuers)."""
    return _Builder(policy).build()

