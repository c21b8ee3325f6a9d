"""Income and liquidity at risk over simulated rate paths and uncertain cash needs (``ladder risk``).

What it does (formulas and sources in docs/methods.md, "Income and liquidity at risk"):
- simulates ``paths`` Hull-White paths of the short rate (``ladder.risk.short_rate``; mean reversion
  and volatility of book.toml ``[model]``, the callable model's), fitted exactly to today's curve,
  at every period end of the horizon, seeded and antithetic;
- draws the cash needs on each path around the forecast (``draw_needs``): each row's amount plus its
  standard deviation below or above (``cash_needs.csv`` ``low``/``high`` or ``stdev``) times a
  standard normal of its period; the period normals are correlated month to month (an AR(1) with
  correlation ``needs_correlation``); rows without them are certain;
- on each path and for each reinvestment rule runs the cash plan itself (``ladder.plan.projection``,
  through the plan's ``_Planner``) with the path as the curve on every later date
  (``ladder.plan.model_path``): holdings, calls, reinvestment (``match_needs`` included), the fund's
  yield and sales are priced on that path's curves;
- gathers per path: interest income over the first 12 months (accrual), the horizon value (holdings
  and purchases still held at their dirty value on the path's last curve at their spreads, callables
  on their flows to the call expected on the path, plus cash), whether anything was sold to cover a
  shortfall, the net realized loss of those sales, and each period's cash before sales.
Paths are run in chunks of ``CHUNK`` (``run_chunk``) so that a result holds only per-path summaries.
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Callable
from dataclasses import dataclass, replace

import numpy as np

from ladder.analysis.plan import INCOME_MONTHS, PlanOptions, _Planner, resolve_scenario
from ladder.analysis.records import clean_number
from ladder.analysis.valuation import value_book
from ladder.errors import InputError, Problems
from ladder.folder.book_file import REINVEST_RULES, Book
from ladder.market.dates import to_days
from ladder.plan.model_path import PathCurves, SimulatedPath
from ladder.plan.periods import Periods, horizon_end, make_periods
from ladder.plan.projection import project
from ladder.plan.reinvestment import Reinvestment, resolve_reinvestment, with_spread
from ladder.risk.short_rate import HullWhite, ShortRatePaths, simulate

DEFAULT_PATHS = 2000
MIN_PATHS, MAX_PATHS = 100, 1_000_000
DEFAULT_SEED = 1
RISK_MONTHS = 24
MAX_RISK_MONTHS = 120
NEEDS_CORRELATION = 0.5        # month-to-month correlation of the needs' surprises (a stated assumption)
SHORTFALL_CHANCE = 0.05        # the first risky month: a shortfall more likely than this
CHUNK = 250


@dataclass(frozen=True)
class RiskOptions:
    """Paths (100 to 1,000,000, rounded up to even for antithetic pairs), seed, horizon in months,
    the needs' month-to-month correlation (-1 to 1), and the rules (None: every rule)."""

    paths: int = DEFAULT_PATHS
    seed: int = DEFAULT_SEED
    months: int = RISK_MONTHS
    needs_correlation: float = NEEDS_CORRELATION
    rules: tuple[str, ...] | None = None


@dataclass(frozen=True, eq=False)
class PathOutcomes:
    """One rule's per-path figures (N paths, P periods), currency units.

    ``income_12m`` (N,) accrual income over the first min(12, P) periods; ``horizon_value`` (N,);
    ``sold`` (N,) any sale to cover a shortfall; ``realized_loss`` (N,) net loss of those sales (0 for
    a net gain); ``available`` (N, P) cash before sales (negative: a shortfall); ``closing`` (N, P)
    closing cash; ``income`` (N, P) accrual income; ``needs`` (N, P) the drawn net needs."""

    income_12m: np.ndarray
    horizon_value: np.ndarray
    sold: np.ndarray
    realized_loss: np.ndarray
    available: np.ndarray
    closing: np.ndarray
    income: np.ndarray
    needs: np.ndarray

    @staticmethod
    def join(parts: list["PathOutcomes"]) -> "PathOutcomes":
        return PathOutcomes(*(np.concatenate([getattr(p, f) for p in parts])
                              for f in PathOutcomes.__dataclass_fields__))


@dataclass(frozen=True)
class Spread:
    """Mean and percentiles (5th, 95th) of a figure over the paths."""

    mean: float
    p05: float
    p95: float

    @staticmethod
    def of(values: np.ndarray) -> "Spread":
        p05, p95 = np.percentile(values, [5.0, 95.0])
        return Spread(float(values.mean()), float(p05), float(p95))


@dataclass(frozen=True, eq=False)
class RuleRisk:
    """One reinvestment rule over every path."""

    reinvestment: Reinvestment
    outcomes: PathOutcomes

    @property
    def rule(self) -> str:
        return self.reinvestment.rule

    @property
    def forced_sale_probability(self) -> float:
        return float(self.outcomes.sold.mean())

    @property
    def income_12m(self) -> Spread:
        return Spread.of(self.outcomes.income_12m)

    @property
    def income_at_risk(self) -> float:
        """Mean 12-month income less its 5th percentile."""
        s = self.income_12m
        return s.mean - s.p05

    @property
    def horizon_value(self) -> Spread:
        return Spread.of(self.outcomes.horizon_value)

    @property
    def realized_loss(self) -> tuple[float, float]:
        """(mean, 95th percentile) of the net realized loss from forced sales."""
        loss = self.outcomes.realized_loss
        return float(loss.mean()), float(np.percentile(loss, 95.0))

    @property
    def shortfall_chance(self) -> np.ndarray:
        """Share of paths with cash short of the needs in each period (P,)."""
        return (self.outcomes.available < 0).mean(axis=0)

    @property
    def first_risky(self) -> int | None:
        """The first period whose chance of a shortfall exceeds ``SHORTFALL_CHANCE`` (index), or None."""
        hit = np.flatnonzero(self.shortfall_chance > SHORTFALL_CHANCE)
        return int(hit[0]) if len(hit) else None

    def fan(self, quantiles=(5.0, 25.0, 50.0, 75.0, 95.0)) -> np.ndarray:
        """Percentiles of the cash before sales in each period: (len(quantiles), P)."""
        return np.percentile(self.outcomes.available, quantiles, axis=0)


@dataclass(frozen=True, eq=False)
class RiskResult:
    """The simulation's outcome: options, periods, the model, and one ``RuleRisk`` a rule."""

    book_name: str
    as_of: dt.date
    options: RiskOptions
    periods: Periods
    model: HullWhite
    rules: tuple[RuleRisk, ...]
    notes: tuple[str, ...]

    @property
    def income_months(self) -> int:
        return min(INCOME_MONTHS, len(self.periods))


def option_problems(book: Book, options: RiskOptions, as_of: dt.date) -> Problems:
    """Every problem with the options, each naming its option."""
    problems = Problems()
    if not MIN_PATHS <= options.paths <= MAX_PATHS:
        problems.add("--paths", 0, 0, f"the number of paths must be {MIN_PATHS:,} to {MAX_PATHS:,}, not {options.paths:,}")
    if not 0 <= options.seed < 2 ** 63:
        problems.add("--seed", 0, 0, f"the seed must be a whole number from 0, not {options.seed}")
    if not 1 <= options.months <= MAX_RISK_MONTHS:
        problems.add("--months", 0, 0, f"the horizon must be 1 to {MAX_RISK_MONTHS} months, not {options.months}")
    else:
        end = horizon_end(np.datetime64(as_of, "D"), options.months)
        dates = to_days(book.cash_needs.date)
        last = dates.max() if len(dates) else None
        if last is None or last.astype("datetime64[M]") < end.astype("datetime64[M]"):
            problems.add("--months", 0, 0, f"{options.months} months run to {end}, beyond the cash-needs forecast "
                                           f"(last need {last if last is not None else 'none'}); shorten the "
                                           "horizon or extend cash_needs.csv")
    if not (np.isfinite(options.needs_correlation) and -1.0 <= options.needs_correlation <= 1.0):
        problems.add("--needs-correlation", 0, 0, f"a correlation is between -1 and 1, not {options.needs_correlation:g}")
    unknown = [r for r in (options.rules or ()) if r not in REINVEST_RULES]
    if unknown:
        problems.add("--reinvest", 0, 0, f"{', '.join(unknown)}: not a reinvestment rule; use {', '.join(REINVEST_RULES)}")
    return problems


def draw_needs(dates, amounts, below, above, periods: Periods, paths: int, rho: float, seed: int) -> np.ndarray:
    """Net needs by period on each path (paths, P): each row's amount plus ``below`` or ``above``
    (its standard deviations, currency units) times its period's standard normal, chosen by the
    normal's sign (a two-piece normal with the amount as its median); the period normals follow an
    AR(1) with correlation ``rho`` from one period to the next."""
    P = len(periods)
    rows = periods.within(dates)
    index = periods.index(dates[rows])
    amounts, below, above = amounts[rows], below[rows], above[rows]
    if not ((below > 0) | (above > 0)).any():
        return np.broadcast_to(periods.total(dates[rows], amounts), (paths, P)).copy()
    rng = np.random.default_rng([seed, 1])
    e = rng.standard_normal((paths, P))
    z = np.empty((paths, P))
    z[:, 0] = e[:, 0]
    for p in range(1, P):
        z[:, p] = rho * z[:, p - 1] + np.sqrt(1.0 - rho * rho) * e[:, p]
    zr = z[:, index]                                                       # (paths, rows)
    drawn = amounts[None, :] + np.where(zr < 0, below[None, :], above[None, :]) * zr
    out = np.zeros((paths, P))
    for p in range(P):
        out[:, p] = drawn[:, index == p].sum(axis=1)
    return out


@dataclass(frozen=True, eq=False)
class Engine:
    """What every chunk shares: the planner, the base scenario, the rules and the horizon."""

    planner: _Planner
    base: object
    rules: tuple[Reinvestment, ...]
    months: int


def run_chunk(engine: Engine, paths: ShortRatePaths, needs: np.ndarray) -> list[PathOutcomes]:
    """The plan on each of ``paths`` with ``needs`` (n, P), for each rule: one ``PathOutcomes`` a rule.
    A pure function of its arguments, so that any scheduler can run chunks in parallel. What does not
    depend on the rule (calls, holdings' values on the path) is built once a path."""
    n, P = needs.shape
    J = len(engine.rules)
    income_12m, horizon_value, realized_loss = np.zeros((J, n)), np.zeros((J, n)), np.zeros((J, n))
    sold = np.zeros((J, n), bool)
    avail, closing, income = np.zeros((J, n, P)), np.zeros((J, n, P)), np.zeros((J, n, P))
    curves = PathCurves(paths)
    planner = engine.planner
    for i in range(n):
        path = SimulatedPath(planner.valuation.curve, "forward", curves, i)
        common, _, _ = planner.setup(engine.base, engine.months, engine.rules[0], path=path)
        common = replace(common, needs=needs[i])
        for j, r in enumerate(engine.rules):
            setup = common if j == 0 else planner.with_rule(common, engine.base, path, r)
            pr = project(setup)
            held = float(pr.face_path[:, -1] @ setup.dirty[:, -1]) / 100.0
            if pr.menu is not None:
                held += float((pr.lot_path[-1] * pr.menu.dirty[:, :, -1]).sum()) / 100.0
            income_12m[j, i] = pr.income[:INCOME_MONTHS].sum()
            horizon_value[j, i] = held + pr.closing_cash[-1]
            realized_loss[j, i] = max(-pr.realized_gain, 0.0)
            sold[j, i] = bool(pr.sale_list)
            avail[j, i], closing[j, i], income[j, i] = pr.available, pr.closing_cash, pr.income
    return [PathOutcomes(income_12m[j], horizon_value[j], sold[j], realized_loss[j], avail[j], closing[j], income[j],
                         needs.copy()) for j in range(J)]


def risk_book(book: Book, at: dt.date | None = None, options: RiskOptions = RiskOptions(),
              progress: Callable[[int, int], None] | None = None,
              run: Callable | None = None, chunk: int = CHUNK) -> RiskResult:
    """Income and liquidity at risk of ``book`` at ``at`` (default: the valuation date); see the module
    docstring. ``progress`` is called with (paths done, paths in all); ``run`` maps ``run_chunk`` over
    the chunks of ``chunk`` paths (default: one after another; ``ladder.analysis.risk_dask.dask_runner``
    for dask).
    Raises ``InputError`` with every problem in the options."""
    as_of = at or book.valuation_date
    problems = option_problems(book, options, as_of)
    names = options.rules or REINVEST_RULES
    rules = []
    for name in names:
        try:
            rules.append(resolve_reinvestment(book, as_of, name))
        except InputError as error:           # gathered with every other problem
            problems.extend(error)
    problems.raise_if_any()
    valuation = value_book(book, at)
    rules = tuple(with_spread(r, book, valuation.spread) for r in rules)
    planner = _Planner(book, valuation, PlanOptions(months=options.months, rates="forward"), rules[0])
    periods = make_periods(planner.as_of, options.months)
    model = HullWhite(book.model.mean_reversion, book.model.volatility)
    n = options.paths + options.paths % 2
    paths = simulate(model, valuation.curve, valuation.curve.years(periods.boundaries), n, options.seed)
    keep = to_days(book.cash_needs.date) > planner.actual_until
    below, above = (side[keep] for side in book.cash_needs.spread())
    needs = draw_needs(planner.need_dates, planner.need_amounts, below, above, periods, n,
                       options.needs_correlation, options.seed)
    engine = Engine(planner, resolve_scenario(book), rules, options.months)
    chunks = [np.arange(i, min(i + chunk, n)) for i in range(0, n, chunk)]
    jobs = [(paths.take(c), needs[c]) for c in chunks]
    if run is None:
        results = []
        for done, (p, d) in enumerate(jobs, start=1):
            results.append(run_chunk(engine, p, d))
            if progress is not None:
                progress(min(done * chunk, n), n)
    else:
        results = run(engine, jobs)
    outcomes = tuple(RuleRisk(r, PathOutcomes.join([res[j] for res in results])) for j, r in enumerate(rules))
    notes = []
    if book.model.volatility == 0:
        notes.append("volatility 0: every path is today's forward curve")
    if not ((below > 0) | (above > 0)).any():
        notes.append("cash_needs.csv gives no low/high or stdev: the needs are certain on every path")
    return RiskResult(book.name, as_of, replace(options, paths=n), periods, model, outcomes, tuple(notes))


# ---- records for json and csv --------------------------------------------------------------------

def _money(x) -> float | None:
    return clean_number(x, 2)


def rule_record(result: RiskResult, r: RuleRisk) -> dict:
    """One rule's summary, the json contract's entry."""
    inc, hv = r.income_12m, r.horizon_value
    loss_mean, loss_p95 = r.realized_loss
    first = r.first_risky
    return {"rule": r.rule, "forced_sale_probability": clean_number(r.forced_sale_probability, 6),
            "income_12m": {"mean": _money(inc.mean), "p05": _money(inc.p05), "p95": _money(inc.p95),
                           "at_risk": _money(r.income_at_risk)},
            "realized_loss": {"mean": _money(loss_mean), "p95": _money(loss_p95)},
            "horizon_value": {"mean": _money(hv.mean), "p05": _money(hv.p05), "p95": _money(hv.p95)},
            "first_risky_month": None if first is None else str(result.periods.end[first])}


def fan_records(result: RiskResult, r: RuleRisk) -> list[dict]:
    """Cash before sales by period end: percentiles, the mean needs, and the chance of a shortfall."""
    fan = r.fan()
    chance = r.shortfall_chance
    needs = r.outcomes.needs.mean(axis=0)
    return [{"period_end": str(result.periods.end[p]), "needs_mean": _money(needs[p]),
             "cash_p05": _money(fan[0, p]), "cash_p25": _money(fan[1, p]), "cash_p50": _money(fan[2, p]),
             "cash_p75": _money(fan[3, p]), "cash_p95": _money(fan[4, p]),
             "shortfall_chance": clean_number(chance[p], 6)} for p in range(len(result.periods))]


def risk_document(result: RiskResult) -> dict:
    """The ``ladder risk --format json`` document."""
    o = result.options
    return {"as_of": str(result.as_of), "paths": o.paths, "seed": o.seed, "months": o.months,
            "income_months": result.income_months, "needs_correlation": o.needs_correlation,
            "model": {"mean_reversion": result.model.a, "volatility": result.model.sigma},
            "rules": [rule_record(result, r) for r in result.rules],
            "fan": {r.rule: fan_records(result, r) for r in result.rules},
            "notes": list(result.notes)}


def risk_records(result: RiskResult) -> list[dict]:
    """One flat record a rule (csv)."""
    out = []
    for r in result.rules:
        rec = rule_record(result, r)
        flat = {"rule": rec["rule"], "forced_sale_probability": rec["forced_sale_probability"]}
        for key in ("income_12m", "realized_loss", "horizon_value"):
            flat.update({f"{key}_{k}": v for k, v in rec[key].items()})
        flat["first_risky_month"] = rec["first_risky_month"]
        out.append(flat)
    return out
