"""The cash plan of a book: ``plan_book`` projects cash, reinvestment, shortfalls and income.

What it does (the rules are in ``ladder.plan``'s modules and docs/methods.md, "Cash plan"):
- values the book (``value_book``) and moves the curve by the scenario (``--scenario`` / ``--bp``;
  the base case is no move), which then stays or follows today's forwards (``rates``); a scenario
  that moves spreads (``ladder.risk.scenarios.SpreadMove``) moves them for the whole horizon: the
  holdings' spreads (OAS for callables) in sale prices, call decisions and horizon values, and the
  reinvestment spread by the move of the bought sector (``reinvestment_move_bp``);
- buckets the holdings' coupons and principal (with the calls the scenario expects) and the cash
  needs by period, runs the periods (``ladder.plan.projection``) with the reinvestment rule, and
  finds the first shortfall and the sales that would cover it;
- for the base case and every scenario of the shock set (the parallel set, the standard non-parallel
  set, the standard credit set and the book's own scenarios) runs the first 12 months again:
  interest income on an accrual basis and the 12-month total return (the income-at-risk table).
Holdings without a book price or purchase date are amortized from the plan date at today's price.
"""

from __future__ import annotations

import datetime as dt
import difflib
from collections.abc import Callable
from dataclasses import dataclass, replace
from functools import cached_property

import numpy as np

from ladder.analysis.records import clean_number
from ladder.analysis.valuation import Valuation, value_book
from ladder.folder.book_file import REINVEST_RULES, Book
from ladder.pricing.spreads import RATING_BUCKETS
from ladder.book.holdings import Holdings
from ladder.errors import InputError, Problems
from ladder.market.dates import NAT, to_days
from ladder.plan.calls import expected_calls
from ladder.plan.holding_flows import HoldingCash, holding_cash
from ladder.plan.periods import STEPS, Periods, horizon_end, make_periods
from ladder.plan.crossings import Crossing, projected_crossings
from ladder.plan.menu import make_menu
from ladder.plan.prices import later_values
from ladder.plan.projection import PlanSetup, PolicyLimits, Projection, project
from ladder.plan.rates import RULES, RatePath
from ladder.plan.reinvestment import Reinvestment, resolve_reinvestment, with_spread
from ladder.policy.liquidity import NeedsCoverage, needs_coverage
from ladder.plan.returns import HorizonReturn, holdings_value, modified_dietz
from ladder.pricing.amortization import Amortization, CallSchedule, amortize
from ladder.pricing.cashflows import cash_flows
from ladder.pricing.quotes import cf_rows
from ladder.risk.credit import credit_set
from ladder.risk.scenarios import (
    DEFAULT_PARALLEL_BP, MAX_SHIFT_BP, Scenario, parallel, parallel_set, standard_non_parallel,
)

PLAN_MONTHS = 24
INCOME_MONTHS = 12
MAX_MONTHS = 120
BASE = "base"


@dataclass(frozen=True)
class PlanOptions:
    """How to plan: horizon in months, period (``STEPS``), reinvestment overrides (None: book.toml),
    and the rates rule (``RULES``)."""

    months: int = PLAN_MONTHS
    period: str = "month"
    rule: str | None = None
    tenor: str | None = None
    sector: str | None = None
    buffer: float | None = None
    rates: str = "stay"


@dataclass(frozen=True)
class ExpectedCall:
    """A callable the scenario expects to be called: holding id, call date, clean call price per 100."""

    id: str
    date: dt.date
    price: float


@dataclass(frozen=True, eq=False)
class ScenarioIncome:
    """One scenario's next 12 months: accrual income and the horizon total return."""

    scenario: str
    income: float
    horizon: HorizonReturn
    calls: tuple[ExpectedCall, ...]


@dataclass(frozen=True, eq=False)
class CashPlan:
    """The plan: its projection under ``scenario`` and the income-at-risk table (base first)."""

    book_name: str
    as_of: dt.date
    scenario: str
    options: PlanOptions
    reinvestment: Reinvestment
    holdings: Holdings                    # the non-fund holdings, aligned with the projection
    projection: Projection
    calls: tuple[ExpectedCall, ...]
    income_at_risk: tuple[ScenarioIncome, ...]
    notes: tuple[str, ...]
    crossings: tuple[Crossing, ...] = ()

    @property
    def coverage(self) -> NeedsCoverage:
        """The plan's needs coverage by period (``ladder.policy.liquidity``): opening cash, then what
        comes in each period less the reinvestment and plus the sales of the period before (so that
        the cumulative cash is the cash before each period's sales), and what could be sold."""
        return plan_coverage(self.projection)

    @property
    def periods(self) -> Periods:
        return self.projection.periods

    @property
    def first_shortfall(self) -> int | None:
        return self.projection.first_shortfall

    @property
    def base(self) -> ScenarioIncome:
        return self.income_at_risk[0]


def scenario_choices(book: Book) -> dict[str, Scenario]:
    """Every scenario ``--scenario`` can name: the base case, the parallel set, the standard
    non-parallel set, the standard credit set and the book's own scenarios (``scenarios.csv``), by name."""
    choices = {BASE: parallel(book.curve, 0.0)}
    for s in (*parallel_set(book.curve, DEFAULT_PARALLEL_BP), *standard_non_parallel(book.curve),
              *credit_set(book.curve), *book.scenarios):
        if s.parallel_bp != 0.0:
            choices.setdefault(s.name, s)
    return choices


def resolve_scenario(book: Book, name: str | None = None, bp: float | None = None) -> Scenario:
    """The scenario named ``name`` (case-insensitive) or the parallel move ``bp``; the base case if
    neither. Raises ``InputError`` for an unknown name, both given, or a move beyond +/-1000 bp."""
    problems = Problems()
    choices = scenario_choices(book)
    if name is not None and bp is not None:
        problems.add("--scenario", 0, 0, "give --scenario or --bp, not both")
    elif bp is not None:
        if np.isfinite(bp) and abs(bp) <= MAX_SHIFT_BP:
            return choices[BASE] if bp == 0 else parallel(book.curve, bp)
        problems.add("--bp", 0, 0, f"{bp:g} bp is beyond +/-{MAX_SHIFT_BP:g} bp")
    elif name is not None:
        found = {key.casefold(): s for key, s in choices.items()}.get(name.strip().casefold())
        if found is not None:
            return found
        close = difflib.get_close_matches(name, list(choices), n=1, cutoff=0.5)
        hint = f"; did you mean {close[0]!r}?" if close else ""
        problems.add("--scenario", 0, 0, f"unknown scenario {name!r}{hint} Known: {', '.join(choices)}")
    problems.raise_if_any()
    return choices[BASE]


def _option_problems(options: PlanOptions) -> Problems:
    problems = Problems()
    if not 1 <= options.months <= MAX_MONTHS:
        problems.add("--months", 0, 0, f"the horizon must be 1 to {MAX_MONTHS} months, not {options.months}")
    if options.period not in STEPS:
        problems.add("--period", 0, 0, f"{options.period!r} is not a period; use one of {', '.join(STEPS)}")
    if options.rates not in RULES:
        problems.add("--rates", 0, 0, f"{options.rates!r} is not a rates rule; use one of {', '.join(RULES)}")
    return problems


def reinvestment_move_bp(book: Book, scenario: Scenario, sector: str) -> float:
    """The scenario's move of the reinvestment spread, bp: the face-weighted move of the book's own
    (non-callable) holdings of ``sector``, whose spreads set the reinvestment spread; when it holds
    none, the move of the ``[spreads]`` bucket the spread was read from (``default``: the sector's
    move for every bucket)."""
    h = book.holdings
    rows = (h.sector == sector) & (h.kind != "fund") & ~h.callable
    if rows.any():
        return float((scenario.spread_shift_bp(h)[rows] * h.face[rows]).sum() / h.face[rows].sum())
    moves = {(m.sector, m.bucket): m.bp for m in scenario.spread_moves}
    table = book.spreads.get(sector, {})
    bucket = next((b for b in RATING_BUCKETS if b in table and "default" not in table), "")
    return moves.get((sector, bucket), moves.get((sector, ""), 0.0))


def _actual_transfers(book: Book, as_of: np.datetime64, dates: np.ndarray) -> tuple[np.datetime64, int]:
    """Actual transfers for dates passed, the forecast after: the date up to which forecast needs are
    replaced by the journal's transfers (``ladder cash``: deposits and withdrawals dated on or after
    ``as_of`` are already in the cash account's balance; the day before ``as_of`` when there are none),
    and how many forecast rows from ``as_of`` on that replaces."""
    from ladder.analysis.settlement import FUNDING_REASON
    from ladder.folder.journal import read_journal

    moved = [np.datetime64(e.date, "D") for e in read_journal(book) if e.action in ("deposit", "withdraw")
             and not e.reason.startswith(FUNDING_REASON) and np.datetime64(e.date, "D") >= as_of]
    until = max(moved) if moved else as_of - 1
    return until, int(((dates >= as_of) & (dates <= until)).sum())


class _Planner:
    """The book-level pieces every scenario's projection shares; ``run`` does one scenario."""

    def __init__(self, book: Book, valuation: Valuation, options: PlanOptions, reinvestment: Reinvestment):
        self.book, self.valuation, self.options, self.reinvestment = book, valuation, options, reinvestment
        full = book.holdings
        self.as_of = np.datetime64(valuation.as_of, "D")
        self.rows = np.flatnonzero(full.kind != "fund")
        self.h = full.take(self.rows)
        self.cf = cf_rows(valuation.pricer.cash_flows, self.rows)
        self.spread = valuation.pricer.spread[self.rows]
        fund = full.kind == "fund"
        self.opening_cash = float(full.face[fund].sum())
        self.base_short = float(RatePath(valuation.curve).short_rate(np.array([self.as_of]))[0])
        fund_table = book.spreads.get("fund", {}).get("default")
        table = 0.0 if fund_table is None else float(fund_table.at(0.0)) / 1e4
        self.fund_yield = (float((full.quote[fund] * full.face[fund]).sum() / full.face[fund].sum())
                           if fund.any() else self.base_short + table)
        missing = np.isnan(self.h.book_price) | np.isnat(self.h.purchase_date) | (self.h.purchase_date > self.as_of)
        self.missing = missing
        self.purchase_price = np.where(missing, valuation.clean[self.rows], self.h.book_price)
        self.purchase_date = np.where(missing, self.as_of, self.h.purchase_date)
        self.calls = CallSchedule.of(self.h, str(book.files["holdings"]))
        self._amortizations: dict[bytes, Amortization] = {}
        self._cash: dict[tuple, HoldingCash] = {}
        dates = to_days(book.cash_needs.date)
        self.past_needs = int((dates < self.as_of).sum())
        self.actual_until, self.replaced_needs = _actual_transfers(book, self.as_of, dates)
        keep = dates > self.actual_until
        self.need_dates = np.maximum(dates[keep], self.as_of + 1)
        self.need_amounts = book.cash_needs.amount[keep]

    @cached_property
    def callable_inputs(self):
        """For the callable rows (positions into ``h``): flows, calls with their redemption, OAS."""
        terms = self.valuation.pricer.calls
        where = np.flatnonzero(self.h.callable)
        if terms is None or not len(where):
            return where, None
        cf = cf_rows(self.cf, where)
        return where, (cf.dates, np.where(cf.mask, cf.amount, 0.0), cf.mask, terms.dates,
                       terms.prices + terms.accrued, terms.mask)

    def path(self, scenario: Scenario) -> RatePath:
        curve = self.valuation.curve
        moved = curve if not np.any(scenario.shift_bp_by_tenor) else curve.shifted(scenario.shift_bp_by_tenor)
        return RatePath(moved, self.options.rates)

    def spread_move(self, scenario: Scenario) -> np.ndarray:
        """The scenario's move of each planned holding's spread (``h``), decimal."""
        return scenario.spread_shift_bp(self.h) / 1e4

    def redeemed_on(self, path: RatePath, spread: np.ndarray) -> np.ndarray:
        """The call date each callable is expected on (NaT otherwise), at ``spread`` (OAS, decimal)."""
        where, inputs = self.callable_inputs
        out = np.full(len(self.h), NAT)
        if inputs is not None:
            out[where] = expected_calls(path, *inputs, spread[where])[0]
        return out

    def amortization(self, redeemed: np.ndarray) -> Amortization:
        key = redeemed.tobytes()
        if key not in self._amortizations:
            self._amortizations[key] = amortize(self.h, purchase_price=self.purchase_price,
                                                purchase_date=self.purchase_date, calls=self.calls,
                                                redeemed_on=redeemed, source=str(self.book.files["holdings"]))
        return self._amortizations[key]

    def holding_cash(self, periods: Periods, redeemed: np.ndarray) -> HoldingCash:
        """The holdings' cash by period; a plan whose periods begin another's (12 months of a
        24-month plan) takes its first columns."""
        key = (redeemed.tobytes(), periods.boundaries.tobytes())
        if key not in self._cash:
            b = periods.boundaries
            for (red, bounds), cash in self._cash.items():
                longer = np.frombuffer(bounds, dtype=b.dtype)
                if red == key[0] and len(longer) >= len(b) and (longer[:len(b)] == b).all():
                    P = len(periods)
                    self._cash[key] = replace(cash, coupon=cash.coupon[:, :P], principal=cash.principal[:, :P],
                                              called=cash.called[:, :P], income=cash.income[:, :P],
                                              cost=cash.cost[:, :P + 1], accrued=cash.accrued[:, :P + 1])
                    break
            else:
                self._cash[key] = holding_cash(self.h, self.cf, periods, self.amortization(redeemed))
        return self._cash[key]

    @cached_property
    def flows_at_income_end(self):
        """The cash-flow matrix of the holdings settled on the income horizon's last day."""
        return cash_flows(self.h, horizon_end(self.as_of, INCOME_MONTHS))

    @cached_property
    def limits(self) -> PolicyLimits:
        """The policy's purchase-time limits the plan keeps (``ladder.plan.projection``)."""
        policy, pf = self.book.policy, self.book.policy.portfolio
        bought, fund = policy.sector(self.reinvestment.sector), policy.sector("fund")
        return PolicyLimits(floors=tuple((f.within_days, f.min_pct) for f in pf.liquidity),
                            sector_cap_pct=bought.max_pct if bought is not None else None,
                            wam_days=pf.max_wam_days, duration_years=pf.max_effective_duration,
                            fund_cap_pct=fund.max_pct if fund is not None else None)

    def setup(self, scenario: Scenario, months: int, reinvestment: Reinvestment | None = None):
        """(the projection's setup, the scenario's rate path, expected call dates)."""
        periods = make_periods(self.as_of, months, self.options.period)
        path = self.path(scenario)
        redeemed = self.redeemed_on(path, self.spread + self.spread_move(scenario))
        cash = self.holding_cash(periods, redeemed)
        r = reinvestment or self.reinvestment
        spread_bp = r.spread_bp + reinvestment_move_bp(self.book, scenario, r.sector)
        menu = None if r.rule == "fund" else make_menu(path, periods, r.menu, r.sector, spread_bp / 1e4)
        long_end = -1 if menu is None else int(np.searchsorted(menu.months, r.months))
        shift = path.short_rate(periods.boundaries[:-1]) - self.base_short
        dirty, duration = later_values(cash.flows, self.spread + self.spread_move(scenario), path, periods.boundaries)
        setup = PlanSetup(periods, self.h, cash, dirty, duration, self.opening_cash,
                          periods.total(self.need_dates, self.need_amounts), np.maximum(self.fund_yield + shift, 0.0),
                          menu, r.rule, long_end, r.buffer, self.limits)
        return setup, path, redeemed

    def run(self, scenario: Scenario, months: int, reinvestment: Reinvestment | None = None):
        setup, path, redeemed = self.setup(scenario, months, reinvestment)
        return project(setup), path, redeemed

    def crossings(self, scenario: Scenario, months: int, reinvestment: Reinvestment | None = None):
        """(projection, the limits it crosses by period)."""
        setup, _, _ = self.setup(scenario, months, reinvestment)
        projection = project(setup)
        return projection, projected_crossings(self.book.policy, self.book.holdings, setup, projection)

    def income(self, scenario: Scenario) -> ScenarioIncome:
        projection, path, redeemed = self.run(scenario, INCOME_MONTHS)
        end = horizon_end(self.as_of, INCOME_MONTHS)
        cash = self.holding_cash(projection.periods, redeemed)
        params = self.valuation.pricer.params
        held = holdings_value(self.h, projection.face_left, cash.end_date, self.spread + self.spread_move(scenario),
                              path, end, params, str(self.book.files["holdings"]), self.flows_at_income_end)
        bought = 0.0
        if projection.menu is not None:
            bought = float((projection.lot_path[-1] * projection.menu.dirty[:, :, -1]).sum() / 100.0)
        start_value = float(self.valuation.market_value[self.rows].sum()) + self.opening_cash
        end_value = held + bought + float(projection.closing_cash[-1])
        horizon = modified_dietz(start_value, end_value, self.as_of, end, self.need_dates, -self.need_amounts,
                                 float(projection.income.sum()))
        return ScenarioIncome(scenario.name if scenario.parallel_bp != 0 else BASE, float(projection.income.sum()),
                              horizon, self.expected(redeemed, end))

    def expected(self, redeemed: np.ndarray, until: np.datetime64) -> tuple[ExpectedCall, ...]:
        rows = np.flatnonzero(~np.isnat(redeemed) & (redeemed <= until))
        a = self.amortization(redeemed)
        return tuple(ExpectedCall(str(self.h.id[i]), redeemed[i].astype(dt.date), float(a.redemption[i]))
                     for i in rows[np.argsort(redeemed[rows], kind="stable")])


def income_scenarios(book: Book, chosen: Scenario) -> tuple[Scenario, ...]:
    """The base case, then the shock set, then ``chosen`` if it is none of them."""
    choices = list(scenario_choices(book).values())
    names = {s.name for s in choices}
    if chosen.name not in names and chosen.parallel_bp != 0:
        choices.append(chosen)
    return tuple(choices)


def plan_book(book: Book, at: dt.date | None = None, *, scenario: str | None = None, bp: float | None = None,
              options: PlanOptions = PlanOptions(), with_income: bool = True,
              progress: Callable[[int, int], None] | None = None) -> CashPlan:
    """The cash plan of ``book`` at ``at`` (default: the valuation date); see the module docstring.

    ``with_income=False`` leaves out the income-at-risk table (the projection alone); ``progress``
    is called with (scenarios done, scenarios in all) as the table is built. Raises ``InputError``
    with every problem in the options, the scenario or the reinvestment.
    """
    problems = _option_problems(options)
    chosen = reinvestment = None
    try:
        chosen = resolve_scenario(book, scenario, bp)
    except InputError as error:                     # every problem is gathered before refusing
        problems.extend(error)
    try:
        reinvestment = resolve_reinvestment(book, at or book.valuation_date, options.rule, options.tenor,
                                            options.sector, options.buffer)
    except InputError as error:
        problems.extend(error)
    problems.raise_if_any()
    valuation = value_book(book, at)
    whole = float(valuation.market_value.sum())
    if reinvestment.buffer > whole:
        problems.add("--buffer", 0, 0, f"the minimum cash buffer {reinvestment.buffer:,.0f} is more than the whole "
                                       f"book ({whole:,.0f})")
        problems.raise_if_any()
    reinvestment = with_spread(reinvestment, book, valuation.spread)
    planner = _Planner(book, valuation, options, reinvestment)
    projection, crossings = planner.crossings(chosen, options.months)
    redeemed = planner.redeemed_on(planner.path(chosen), planner.spread + planner.spread_move(chosen))
    scenarios = income_scenarios(book, chosen) if with_income else ()
    income = []
    for done, s in enumerate(scenarios, start=1):
        income.append(planner.income(s))
        if progress is not None:
            progress(done, len(scenarios))
    notes = []
    if reinvestment.note:
        notes.append(reinvestment.note)
    if planner.missing.any():
        notes.append(f"{int(planner.missing.sum())} holding(s) have no book price or purchase date "
                     f"({', '.join(planner.h.id[planner.missing][:5])}{' ...' if planner.missing.sum() > 5 else ''}): "
                     "their income is amortized from the plan date at today's price")
    if planner.past_needs:
        notes.append(f"{planner.past_needs} cash need(s) dated before {valuation.as_of} are past and left out")
    if planner.replaced_needs:
        notes.append(f"{planner.replaced_needs} forecast cash need(s) up to {planner.actual_until} are replaced by "
                     "the transfers journaled (ladder cash), already in the cash account")
    last_need = planner.need_dates.max() if len(planner.need_dates) else None
    if last_need is None or last_need < projection.periods.boundaries[-1] - 31:
        notes.append("the cash-needs forecast ends before the horizon; later months show no needs")
    end = projection.periods.boundaries[-1]
    return CashPlan(book.name, valuation.as_of, chosen.name if chosen.parallel_bp != 0 else BASE, options,
                    reinvestment, planner.h, projection, planner.expected(redeemed, end), tuple(income), tuple(notes),
                    crossings)


def plan_coverage(pr: Projection) -> NeedsCoverage:
    """See ``CashPlan.coverage``."""
    carried = np.concatenate([[0.0], (pr.sales - pr.reinvested)[:-1]])
    return needs_coverage(pr.opening_cash[0], pr.fund_income + pr.coupons + pr.principal + carried, pr.needs,
                          pr.sellable)


COMPARE_MONTHS = 24


@dataclass(frozen=True)
class RuleOutcome:
    """One reinvestment rule under one scenario: accrual income over 12 and 24 months, forced sales
    (proceeds) and their realized gain, and the number of policy limits the projection crosses."""

    scenario: str
    rule: str
    income_12m: float
    income_24m: float
    forced_sales: float
    realized_gain: float
    crossings: int


def compare_rules(book: Book, at: dt.date | None = None, *, options: PlanOptions = PlanOptions(),
                  progress: Callable[[int, int], None] | None = None) -> tuple[RuleOutcome, ...]:
    """Every reinvestment rule (``REINVEST_RULES``; ``target_tenor`` at book.toml's tenor) under the
    base case and every scenario of ``scenario_choices``, over at least ``COMPARE_MONTHS`` months;
    the options' sector and buffer apply to every rule. Scenario by scenario, rules in their order."""
    problems = _option_problems(options)
    rules = []
    for rule in REINVEST_RULES:
        try:
            rules.append(resolve_reinvestment(book, at or book.valuation_date, rule, None, options.sector,
                                              options.buffer))
        except InputError as error:
            problems.extend(error)
    problems.raise_if_any()
    valuation = value_book(book, at)
    rules = [with_spread(r, book, valuation.spread) for r in rules]
    months = max(options.months, COMPARE_MONTHS)
    planner = _Planner(book, valuation, options, rules[0])
    scenarios = list(scenario_choices(book).values())
    out = []
    for done, scenario in enumerate(scenarios, start=1):
        for r in rules:
            pr, crossings = planner.crossings(scenario, months, r)
            name = scenario.name if scenario.parallel_bp != 0 else BASE
            out.append(RuleOutcome(name, r.rule, float(pr.income[:INCOME_MONTHS].sum()),
                                   float(pr.income[:COMPARE_MONTHS].sum()), float(pr.sales.sum()),
                                   pr.realized_gain, len(crossings)))
        if progress is not None:
            progress(done, len(scenarios))
    return tuple(out)


def compare_records(outcomes) -> list[dict]:
    """One record a scenario and rule, with the 24-month income against ``longest_rung``'s."""
    reference = {o.scenario: o.income_24m for o in outcomes if o.rule == "longest_rung"}
    return [{"scenario": o.scenario, "rule": o.rule, "income_12m": _money(o.income_12m),
             "income_24m": _money(o.income_24m),
             "income_24m_vs_longest_rung": _money(o.income_24m - reference.get(o.scenario, float("nan"))),
             "forced_sales": _money(o.forced_sales), "realized_gain": _money(o.realized_gain),
             "policy_crossings": o.crossings} for o in outcomes]


# ---- records for json and csv --------------------------------------------------------------------

def _money(value) -> float | None:
    return clean_number(value, 2)


def period_records(plan: CashPlan) -> list[dict]:
    """One record a period: dates, every cash column (currency units), the reinvestment yield in
    percent, the period's accrual income, whether cash fell below the buffer (``tight``), the cash
    kept (buffer or liquidity floors) and the needs coverage (``covered``, ``by selling``, ``short``)."""
    pr = plan.projection
    buffer = plan.reinvestment.buffer
    status = plan.coverage.status
    records = []
    for p in range(len(pr.periods)):
        records.append({
            "start": str(pr.periods.start[p]), "end": str(pr.periods.end[p]),
            "opening_cash": _money(pr.opening_cash[p]), "coupons": _money(pr.coupons[p]),
            "principal": _money(pr.principal[p]), "needs": _money(pr.needs[p]),
            "reinvested": _money(pr.reinvested[p]), "closing_cash": _money(pr.closing_cash[p]),
            "shortfall": _money(pr.shortfall[p]), "fund_income": _money(pr.fund_income[p]),
            "called": _money(pr.called[p]), "sales": _money(pr.sales[p]), "unfunded": _money(pr.unfunded[p]),
            "cash_before_sales": _money(pr.available[p]), "income": _money(pr.income[p]),
            "reinvest_yield_pct": clean_number(100 * pr.reinvest_yield[p], 6),
            "tight": bool(pr.available[p] < buffer),
            "cash_kept": _money(pr.floor[p]), "needs_status": str(status[p]),
        })
    return records


def sale_records(plan: CashPlan, period: int | None = None) -> list[dict]:
    """The sales (of one period, or all), in selling order; money in currency units, prices per 100."""
    pr = plan.projection
    return [{"period_end": str(pr.periods.end[s.period]), "id": s.id, "maturity_date": str(s.maturity),
             "face": _money(s.face), "clean_price": clean_number(s.clean_price, 6),
             "accrued": clean_number(s.accrued, 6), "proceeds": _money(s.proceeds),
             "realized_gain": _money(s.realized_gain)}
            for s in pr.sale_list if period is None or s.period == period]


def income_records(plan: CashPlan) -> list[dict]:
    """The income-at-risk table: one record a scenario, base first."""
    base = plan.base.income if plan.income_at_risk else float("nan")
    return [{"scenario": r.scenario, "income_12m": _money(r.income), "income_change": _money(r.income - base),
             "price_change_12m": _money(r.horizon.price_change), "total_return_12m": _money(r.horizon.gain),
             "total_return_12m_pct": clean_number(r.horizon.return_pct, 6),
             "calls": [c.id for c in r.calls]} for r in plan.income_at_risk]


def plan_document(plan: CashPlan) -> dict:
    """The ``ladder plan --format json`` document."""
    pr = plan.projection
    first = plan.first_shortfall
    tight = pr.tightest
    r = plan.reinvestment
    return {
        "as_of": str(plan.as_of), "scenario": plan.scenario,
        "periods": period_records(plan),
        "income_12m": {x.scenario: _money(x.income) for x in plan.income_at_risk},
        "total_return_12m_pct": {x.scenario: clean_number(x.horizon.return_pct, 6) for x in plan.income_at_risk},
        "first_shortfall": None if first is None else {
            "start": str(pr.periods.start[first]), "end": str(pr.periods.end[first]),
            "amount": _money(pr.shortfall[first]), "unfunded": _money(pr.unfunded[first])},
        "sales_needed": sale_records(plan, first) if first is not None else [],
        "all_sales": sale_records(plan),
        "tightest": {"start": str(pr.periods.start[tight]), "end": str(pr.periods.end[tight]),
                     "net_flow": _money(pr.net_flow[tight]), "cash_before_sales": _money(pr.available[tight])},
        "reinvestment": {"rule": r.rule, "tenor": r.tenor, "sector": r.sector, "spread_bp": clean_number(r.spread_bp, 4),
                         "min_cash_buffer": _money(r.buffer), "rates": plan.options.rates,
                         "period": plan.options.period},
        "expected_calls": [{"id": c.id, "date": str(c.date), "call_price": clean_number(c.price, 6)} for c in plan.calls],
        "income_at_risk": income_records(plan),
        "policy_crossings": crossing_records(plan.crossings),
        "notes": list(plan.notes),
    }


def crossing_records(crossings) -> list[dict]:
    """The limits a projection crosses, by period end."""
    value = lambda x: clean_number(x, 6) if isinstance(x, float) else x  # noqa: E731
    return [{"period_end": str(c.period_end), "rule": c.rule, "group": c.group, "actual": value(c.actual),
             "limit": value(c.limit), "status": c.status} for c in crossings]
