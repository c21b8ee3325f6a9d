"""The ladder builder's mixed-integer program: variables, policy rows, cash-needs rows, rung rows.

Variables (one per candidate, and one per holding when sales are allowed):
- a buy of a security: a count of lots, ``face = n * lot_increment``, with ``n = 0`` or
  ``min_lot / lot_increment <= n <= available / lot_increment`` (a semi-integer variable);
- a buy of a fund: any amount (continuous, in currency units);
- a sale (``allow_sales``): a count of 1,000-face units of a holding (a fund: any amount).

Every rule is linear in the faces bought and sold, because every policy measure is a share or a
basis-weighted average of the portfolio after the trades: with basis value W (per unit face) and
faces f, "group G is at most p% of the portfolio" is sum (100 [p in G] - p) W f <= 0, "the average
effective duration is at most D" is sum (d - D) W f <= 0, and a floor flips the sign. Existing
holdings enter with their face (a constant) unless the build is ``fresh``.

Under at-purchase testing (the rule's ``testing``, ``ladder.policy.rules``) a share or average already
past its limit before the trades may stay there but must not get worse (the what-if check calls a
worsened violation a breach): its row uses the current value as the limit. Rules tested continuously
(by default liquidity floors, duration and WAM) hold as stated. Cash-needs coverage, maturities and
ratings hold in every mode; issuer limits hold per issuer family unless the rule says ``per = "issuer"``; maturities, ratings and authorized sectors are met by choosing only
eligible candidates (``ladder.build.candidates.eligible``).

Each limit is tightened by a tiny margin (``MARGIN``) so that the solver's feasibility tolerance
cannot leave a solution a hair past a limit when the checker grades it.

Objective: maximize expected income a year, sum of yield x market value over what is bought,
less that of what is sold (the existing book's income is a constant). Rows are stored unscaled.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ladder.book.cash_needs import CashNeeds
from ladder.book.families import Families
from ladder.build.candidates import Candidates
from ladder.build.positions import Positions
from ladder.build.rungs import Rungs
from ladder.policy.measures import coverage_start
from ladder.policy.model import Policy, issuer_key
from ladder.policy.rules import compile_rules

SELL_UNIT = 1_000.0          # face: sales in whole thousands (common practice: minimum denomination)
RUNG_BAND = (0.5, 1.5)       # each rung between half and one and a half times the even share
MARGIN = {"pct": 1e-5, "years": 1e-8, "days": 1e-6, "currency": 0.01, "buys_pct": 1e-7}
# How a row's right-hand side moves when its limit moves by one unit (for the cost of a limit):
SENS_TOTAL, SENS_BUYS, SENS_ONE = "total", "buys", "one"
BUDGET = "budget"
RUNG_GROUP = "rung shares"
PER_WORDS = {"family": "issuer family", "issuer": "issuer"}


@dataclass(frozen=True, eq=False)
class Program:
    """``A x <= b`` (rows with ``eq`` as equalities); maximize ``c x``. x bounds [lb, ub]; integrality
    as ``scipy.optimize.milp`` (0 continuous, 1 integer, 3 semi-integer)."""

    A: np.ndarray
    b: np.ndarray
    eq: np.ndarray
    c: np.ndarray
    lb: np.ndarray
    ub: np.ndarray
    integrality: np.ndarray
    var_pos: np.ndarray       # (k,) position of each variable
    var_unit: np.ndarray      # (k,) face per unit of the variable
    var_sign: np.ndarray      # (k,) +1 buy, -1 sale
    var_offered: np.ndarray   # (k,) True where the upper bound is the face on offer (not the cash)
    group: np.ndarray         # (m,) rule id or build group of each row
    label: np.ndarray         # (m,) the row's group member (issuer, sector, month, rung) or ""
    unit: np.ndarray          # (m,) "pct", "years", "days", "currency", "share"
    limit: np.ndarray         # (m,) the limit in its unit (as the policy states it)
    sens: np.ndarray          # (m,) SENS_* code
    positions: Positions      # existing holdings (first ``n_existing``), then candidates
    face0: np.ndarray         # (p,) face held before the trades (0 for candidates, and for all if fresh)
    n_existing: int
    cash: float
    text: dict = field(default_factory=dict)   # group -> the rule in words

    @property
    def buys(self) -> np.ndarray:
        return self.var_sign > 0

    def faces(self, x: np.ndarray) -> np.ndarray:
        """Face traded per variable (currency units)."""
        return x * self.var_unit


class _Rows:
    def __init__(self, pos: Positions, face0: np.ndarray, var_pos, var_unit, var_sign):
        self.pos, self.face0 = pos, face0
        self.var_pos, self.var_unit, self.var_sign = var_pos, var_unit, var_sign
        self.rows: list[tuple] = []
        self.text: dict[str, str] = {}

    def add(self, group, label, unit, limit, coeff, rhs=0.0, sens=SENS_TOTAL, scope="after", eq=False):
        """A row ``sum coeff_p f_p <= rhs`` (``==`` with ``eq``) over the faces ``f`` of ``scope``: "after",
        the portfolio after the trades (holdings kept are a constant); "traded", what is bought less
        what is sold; "bought", what is bought."""
        k = coeff[self.var_pos] * self.var_unit * self.var_sign
        if scope == "bought":
            k = np.where(self.var_sign > 0, k, 0.0)
        const = float(coeff @ self.face0) if scope == "after" else 0.0
        self.rows.append((k, rhs - const, eq, group, label, unit, limit, sens))

    def value(self, coeff) -> float:
        return float(coeff @ self.face0)


def _variables(pos: Positions, cands: Candidates, n_existing: int, cash: float, allow_sales: bool,
               face0: np.ndarray):
    mv = pos.mv
    fund_pos = pos.fund
    proceeds = float((mv[:n_existing] * face0[:n_existing]).sum()) if allow_sales else 0.0
    spend = cash + proceeds
    c_idx = n_existing + np.arange(len(cands))
    c_fund = fund_pos[c_idx]
    unit = np.where(c_fund, 1.0, cands.lot)
    cap = np.minimum(cands.available, spend / np.maximum(mv[c_idx], 1e-9) + cands.lot)
    ub = np.floor(cap / unit + 1e-9)
    offered = cands.available < spend / np.maximum(mv[c_idx], 1e-9) + cands.lot
    lb_lots = np.where(c_fund, 0.0, np.round(cands.min_lot / np.where(c_fund, 1.0, cands.lot)))
    buyable = ub >= np.maximum(lb_lots, 1)
    integ = np.where(c_fund, 0, np.where(lb_lots > 1, 3, 1))
    lb = np.where(integ == 3, lb_lots, 0.0)
    ub = np.where(buyable, ub, 0.0)
    integ = np.where(buyable, integ, 1)
    lb = np.where(buyable, lb, 0.0)
    parts = [(c_idx, unit, np.ones(len(c_idx)), lb, ub, integ, offered)]
    if allow_sales and n_existing:
        e_idx = np.arange(n_existing)
        e_fund = fund_pos[e_idx]
        e_unit = np.where(e_fund, 1.0, SELL_UNIT)
        parts.append((e_idx, e_unit, -np.ones(n_existing), np.zeros(n_existing),
                      np.floor(face0[e_idx] / e_unit + 1e-9), np.where(e_fund, 0, 1), np.zeros(n_existing, bool)))
    return [np.concatenate([p[i] for p in parts]) for i in range(7)]


def build_program(policy: Policy, cash_needs: CashNeeds | None, settle, rungs: Rungs, existing: Positions,
                  candidates: Candidates, cand_pos: Positions, cash: float, allow_sales: bool = False,
                  fresh: bool = False, rung_band: tuple[float, float] = RUNG_BAND,
                  families: Families = Families.none()) -> Program:
    """The program for buying ``candidates`` (valued in ``cand_pos``) with ``cash`` on top of
    ``existing`` (ignored when ``fresh``); ``families`` groups issuers for issuer limits."""
    if fresh:
        existing = existing.take(np.zeros(len(existing), bool))
        allow_sales = False
    n_e = len(existing)
    pos = Positions.concat([existing, cand_pos])
    face0 = np.concatenate([existing.holdings.face, np.zeros(len(cand_pos))])
    var_pos, var_unit, var_sign, lb, ub, integ, offered = _variables(pos, candidates, n_e, cash, allow_sales, face0)
    r = _Rows(pos, face0, var_pos, var_unit, var_sign)
    _policy_rows(r, policy, cash_needs, settle, allow_sales, families)
    _rung_rows(r, rungs, rung_band)
    has_fund = bool(np.any(pos.fund[var_pos] & (var_sign > 0) & (ub > 0)))
    r.add(BUDGET, "", "currency", cash, pos.mv, cash, SENS_ONE, scope="traded", eq=has_fund)
    r.text[BUDGET] = (f"the buys cost the cash to invest ({cash:,.2f})" + (" plus the proceeds of sales"
                      if allow_sales else "") + ("; a fund takes the residual" if has_fund else ""))
    coeffs, b, eq, group, label, unit, limit, sens = zip(*r.rows)   # the budget row is always there
    c = pos.yld[var_pos] * pos.mv[var_pos] * var_unit * var_sign
    text = lambda values: np.array(values, dtype=object)  # noqa: E731
    return Program(np.vstack(coeffs), np.array(b, float), np.array(eq, bool), c, lb, ub, integ.astype(np.int64),
                   var_pos, var_unit, var_sign, offered, text(group), text(label), text(unit), np.array(limit, float),
                   text(sens), pos, face0, n_e, float(cash), r.text)


def _touched(r: _Rows, mask: np.ndarray, allow_sales: bool) -> bool:
    """Whether the trades can raise the share of ``mask``: some buy is in it, or sales are allowed."""
    return allow_sales or bool(np.any(mask[r.var_pos] & (r.var_sign > 0)))


def _policy_rows(r: _Rows, policy: Policy, cash_needs: CashNeeds | None, settle, allow_sales: bool,
                 families: Families) -> None:
    pos = r.pos
    W = pos.basis(policy.basis)
    total0 = r.value(W)
    rules = {rule.key: rule for rule in compile_rules(policy)}

    def lenient(key) -> bool:
        return rules[key].testing == "at_purchase"

    def share_cap(key, text, limit, mask, label=""):
        if not _touched(r, mask, allow_sales):
            return
        now = 100.0 * r.value(W * mask) / total0 if total0 > 0 else 0.0
        eff = max(limit, now) if lenient(key) else limit
        r.add(key, label, "pct", limit, (100.0 * mask - (eff - MARGIN["pct"])) * W)
        r.text.setdefault(key, text)

    def share_floor(key, text, limit, mask, label=""):
        now = 100.0 * r.value(W * mask) / total0 if total0 > 0 else limit
        eff = min(limit, now) if lenient(key) else limit
        r.add(key, label, "pct", limit, ((eff + MARGIN["pct"]) - 100.0 * mask) * W)
        r.text.setdefault(key, text)

    def average_cap(key, text, limit, values, unit):
        now = r.value(W * values) / total0 if total0 > 0 else 0.0
        eff = max(limit, now) if lenient(key) else limit
        r.add(key, "", unit, limit, (values - (eff - MARGIN[unit])) * W)
        r.text[key] = text

    pf = policy.portfolio
    sector = pos.holdings.sector
    keys = pos.issuer_keys
    family_names = families.families(pos.holdings.issuer)
    family_keys = np.array([issuer_key(x) for x in family_names], dtype=object)

    def groups(key):
        """Each position's group under issuer limit ``key`` (family or issuer key), and a display name."""
        if rules[key].per == "family":
            return family_keys, lambda k: _family_display(pos, family_keys, family_names, k)
        return keys, lambda k: _display(pos, keys, k)
    if pf.max_effective_duration is not None:
        average_cap("portfolio.max_effective_duration", f"effective duration at most {pf.max_effective_duration:g} "
                    "years", pf.max_effective_duration, pos.duration, "years")
    if pf.max_wam_days is not None:
        average_cap("portfolio.max_wam_days", f"WAM at most {pf.max_wam_days:g} days", pf.max_wam_days,
                    pos.days.astype(float), "days")
    if pf.issuer_max_pct is not None:
        key = "portfolio.issuer_max_pct"
        group, display = groups(key)
        exempt = [s.name for s in policy.sectors if s.issuer_cap_exempt]
        named = [issuer_key(i.name) for i in policy.issuers]
        scope = ~np.isin(sector, exempt) & ~np.isin(group, group[np.isin(keys, named)])
        for name in np.unique(group[scope]):
            share_cap(key, f"no {PER_WORDS[rules[key].per]} above {pf.issuer_max_pct:g}%", pf.issuer_max_pct,
                      scope & (group == name), display(name))
    if pf.callable_max_pct is not None:
        share_cap("portfolio.callable_max_pct", f"callables at most {pf.callable_max_pct:g}%", pf.callable_max_pct,
                  pos.holdings.callable)
    days = pos.days
    for floor in pf.liquidity:
        share_floor(floor.key, f"at least {floor.min_pct:g}% matures within {floor.within_days} days",
                    floor.min_pct, days <= floor.within_days)
    if pf.cash_needs_horizon_months is not None and cash_needs is not None:
        _coverage_rows(r, pf.cash_needs_horizon_months, cash_needs, settle)
    for s in policy.sectors:
        if not s.allowed:
            continue
        here = sector == s.name
        if s.max_pct is not None:
            share_cap(s.key("max_pct"), f"{s.name} at most {s.max_pct:g}%", s.max_pct, here, s.name)
        if s.min_pct is not None:
            share_floor(s.key("min_pct"), f"{s.name} at least {s.min_pct:g}%", s.min_pct, here, s.name)
        if s.issuer_max_pct is not None:
            key = s.key("issuer_max_pct")
            group, display = groups(key)
            for name in np.unique(group[here]):
                share_cap(key, f"no {PER_WORDS[rules[key].per]} above {s.issuer_max_pct:g}% in {s.name}",
                          s.issuer_max_pct, here & (group == name), display(name))
        if s.callable_max_pct is not None:
            share_cap(s.key("callable_max_pct"), f"callable {s.name} at most {s.callable_max_pct:g}%",
                      s.callable_max_pct, here & pos.holdings.callable, s.name)
    for i in policy.issuers:
        if i.max_pct is not None:
            group, _ = groups(i.key("max_pct"))
            mask = np.isin(group, group[keys == issuer_key(i.name)])
            share_cap(i.key("max_pct"), f"{i.name} at most {i.max_pct:g}%", i.max_pct, mask, i.name)


def _display(pos: Positions, keys: np.ndarray, key: str) -> str:
    return str(pos.holdings.issuer[np.flatnonzero(keys == key)[0]])


def _family_display(pos: Positions, family_keys: np.ndarray, family_names: np.ndarray, key: str) -> str:
    """The family's name, with its members among the positions: "Parent (family: A, B)"."""
    inside = family_keys == key
    name = str(family_names[np.flatnonzero(inside)[0]])
    members = sorted(set(map(str, pos.holdings.issuer[inside])))
    return name if members == [name] else f"{name} (family: {', '.join(members)})"


def _coverage_rows(r: _Rows, horizon: int, cash_needs: CashNeeds, settle) -> None:
    """Month m: fund balances plus cumulative principal and coupons >= cumulative net needs."""
    pos = r.pos
    start = coverage_start(settle)
    need = np.cumsum(cash_needs.by_month(start, horizon))
    cum = np.cumsum(pos.flows[:, :horizon], axis=1)
    fund = pos.fund
    months = start.astype("datetime64[M]") + np.arange(horizon)
    key = "portfolio.cash_needs_horizon_months"
    for m in range(horizon):
        available = np.where(fund, pos.mv, cum[:, m])
        r.add(key, str(months[m]), "currency", float(need[m]), -available, -(need[m] + MARGIN["currency"]), SENS_ONE)
    r.text[key] = f"fund balances plus maturities and coupons cover the cumulative cash needs, month by month " \
                  f"for {horizon} months"


def _rung_rows(r: _Rows, rungs: Rungs, band: tuple[float, float]) -> None:
    """Each rung between ``band`` x the even share of what is bought (market value, funds aside)."""
    pos = r.pos
    n = len(rungs)
    rung = np.where(pos.fund, -1, rungs.index(pos.holdings.maturity))
    in_ladder = (rung >= 0).astype(float)
    low, high = band[0] / n, min(band[1] / n, 1.0)
    for k, label in enumerate(rungs.labels):
        mine = (rung == k).astype(float)
        r.add(RUNG_GROUP, f"{label} at least", "buys_pct", 100 * low,
              (low + MARGIN["buys_pct"] / 100 - mine) * in_ladder * pos.mv, 0.0, SENS_BUYS, scope="bought")
        if high < 1.0:
            r.add(RUNG_GROUP, f"{label} at most", "buys_pct", 100 * high,
                  (mine - (high - MARGIN["buys_pct"] / 100)) * in_ladder * pos.mv, 0.0, SENS_BUYS, scope="bought")
    r.text[RUNG_GROUP] = (f"each of the {n} rungs holds {100 * low:.3g}% to {100 * high:.3g}% of what is bought "
                          "(market value; the fund aside)")
