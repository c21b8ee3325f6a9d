"""Rate and credit shocks: the whole book revalued exactly under scenarios, beside the estimates.

A scenario moves the quoted par yields (``ladder.risk.scenarios``); each scenario curve is rebuilt
from them and every holding is repriced on it at its held spread by ``Valuation.pricer`` (z-spread,
or option-adjusted spread through the Hull-White tree for callables). All scenarios and the key-rate
bumps are bootstrapped together and repriced in one call; a scenario that moves spreads (alone or
with rates) is repriced at its moved spreads through the same pricer, and each holding's spread
duration and convexity come from its own spread moved by +/- 1 bp (``ladder.risk.credit``).
Estimates and their errors:
``ladder.risk.revaluation``; breakdowns by maturity rung (``ladder.risk.rungs``) and by sector.

Key-rate durations (T. S. Y. Ho, "Key Rate Durations: Measures of Interest Rate Risks", Journal of
Fixed Income 2(2), 1992, 29-44, with the quoted par yields as the key rates) are measured with the
triangular bumps of ``key_rate_bumps`` at the effective duration's size (``EFFECTIVE_SHIFT_BP``),
applied cumulatively from the short end: KRD_k is the duration of the curve with tenors 1..k moved,
less that with tenors 1..k-1 moved (``ladder.risk.revaluation.key_rate_durations``). Where a price
is smooth in the par yields this is the usual one-bump-at-a-time key-rate duration to second order
in the bump; it is used because the monotone convex curve's response to one par yield is only
piecewise smooth (a bump at one tenor can switch the Hagan-West shape of the neighbouring forward
intervals; on a flat curve at the very point of the base curve), so one-at-a-time bumps, of any
size, need not add up: on the demo book 25 bp bumps miss the effective duration by up to 0.59 years,
0.01 bp bumps on a flat curve by more than half a year. The cumulative bumps end on the parallel move of the
effective duration, so the key-rate durations add up to it for every holding, callables included,
to rounding (``KEY_RATE_SUM_TOLERANCE``).
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from ladder.analysis.records import clean_number
from ladder.analysis.valuation import EFFECTIVE_SHIFT_BP, Valuation, value_book
from ladder.folder.book_file import Book
from ladder.book.holdings import SECTORS
from ladder.errors import Problems
from ladder.pricing.curve import Curve, CurveSet
from ladder.pricing.spreads import rating_buckets
from ladder.risk.credit import credit_set, scenario_prices, spread_risk, spread_shifts
from ladder.risk.revaluation import (Revaluation, ScenarioTotals, exposure_weighted_shifts, is_parallel,
                                     key_rate_durations, revalue)
from ladder.risk.rungs import RUNGS, rung_index
from ladder.risk.scenarios import (Scenario, key_rate_bumps, parallel_set, read_scenarios, shift_matrix,
                                   standard_non_parallel)

# |sum of key-rate durations - effective duration| of any holding, years: float rounding of the
# telescoping sum (tests/analysis/test_shock_key_rates.py).
KEY_RATE_SUM_TOLERANCE = 1e-9

# The 12-month interest income change under each scenario comes from the cash plan: a function of
# (book, settlement date, scenarios) returning one change per scenario, currency units.
IncomeModel = Callable[[Book, dt.date, tuple[Scenario, ...]], np.ndarray]


def shock_scenarios(book: Book, shifts_bp: Sequence[float] | None = None, scenarios_file=None) -> tuple[Scenario, ...]:
    """The scenarios to run: by default the default parallel set, the standard non-parallel set, the
    standard credit set and the book's own scenarios.csv; given ``shifts_bp`` (parallel moves, bp)
    and/or ``scenarios_file`` (``scenario,tenor,shift_bp[,sector,bucket]``), exactly those. Raises
    InputError for a bad scenarios file."""
    if shifts_bp is None and scenarios_file is None:
        return (parallel_set(book.curve) + standard_non_parallel(book.curve) + credit_set(book.curve)
                + tuple(book.scenarios))
    chosen = parallel_set(book.curve, shifts_bp) if shifts_bp is not None else ()
    return chosen + (read_scenarios(scenarios_file, book.curve) if scenarios_file is not None else ())


def _scenario_curves(base: Curve, shifts_bp: np.ndarray, names: Sequence[str], source: str) -> CurveSet:
    """All scenario curves at once; a move the bootstrap cannot build is an input problem by name."""
    try:
        return base.shifted_many(shifts_bp)
    except ValueError:
        problems = Problems()
        for row, name in zip(shifts_bp, names):
            try:
                base.shifted(row)
            except ValueError as error:
                problems.add(source, 0, 0, f"scenario {name!r}: {error}")
        problems.raise_if_any()
        raise


def _shift_matrix(scenarios: Sequence[Scenario], tenors: int) -> np.ndarray:
    """(S, K) basis points; (0, K) for no scenarios."""
    return shift_matrix(scenarios) if len(scenarios) else np.zeros((0, tenors))


@dataclass(frozen=True, eq=False)
class ShockResult:
    """The book under every scenario. Per holding: ``key_rate_durations`` (n, K) years (K =
    ``tenors``), ``rung`` (n,) index into RUNGS, ``revaluation`` (S, n) values, ``spread_duration``
    (n,) years and ``spread_convexity`` (n,) years^2, ``spread_shifts`` (S, n) each scenario's move
    of its spread, decimal; per scenario: ``income_change`` (S,) from the cash plan's model, or None
    when none was given."""

    book_name: str
    valuation: Valuation
    scenarios: tuple[Scenario, ...]
    tenors: tuple[str, ...]
    key_rate_durations: np.ndarray
    revaluation: Revaluation
    rung: np.ndarray
    spread_duration: np.ndarray
    spread_convexity: np.ndarray
    spread_shifts: np.ndarray
    income_change: np.ndarray | None = None

    @property
    def as_of(self) -> dt.date:
        return self.valuation.as_of

    @property
    def tenor_shifts(self) -> np.ndarray:
        """(S, K) decimal."""
        return _shift_matrix(self.scenarios, len(self.tenors)) / 1e4

    @property
    def parallel_bp(self) -> list[float | None]:
        """The size of each parallel rate scenario (every tenor moved alike, no spread moved), bp; None
        for the others."""
        return [float(s.shift_bp_by_tenor[0]) if p and not s.spread_moves else None
                for s, p in zip(self.scenarios, is_parallel(self.tenor_shifts))]

    @property
    def portfolio_spread_duration(self) -> float:
        """Years, market-value weighted like the effective duration."""
        weights = self.revaluation.base
        return float(weights @ self.spread_duration / weights.sum())

    @property
    def portfolio_spread_convexity(self) -> float:
        """Years^2, market-value weighted."""
        weights = self.revaluation.base
        return float(weights @ self.spread_convexity / weights.sum())

    @property
    def equivalent_spread_shift(self) -> np.ndarray:
        """Each scenario's spread move weighted by the holdings' spread exposure, market value times
        spread duration (S,), decimal; 0 for a book without spread exposure."""
        exposure = self.revaluation.base * self.spread_duration
        total = exposure.sum()
        return self.spread_shifts @ exposure / total if total else np.zeros(len(self.scenarios))

    @cached_property
    def portfolio(self) -> ScenarioTotals:
        return self.revaluation.totals()

    @cached_property
    def by_rung(self) -> ScenarioTotals:
        """Every rung, empty ones too (base 0)."""
        return self.revaluation.totals(self.rung, RUNGS)

    @cached_property
    def by_sector(self) -> ScenarioTotals:
        """The sectors the book holds, in the order of ``SECTORS``."""
        present = tuple(s for s in SECTORS if s in set(self.valuation.holdings.sector))
        index = np.array([present.index(s) for s in self.valuation.holdings.sector], dtype=np.int64)
        return self.revaluation.totals(index, present)

    @property
    def base_value(self) -> float:
        return float(self.revaluation.base.sum())

    @property
    def effective_duration(self) -> float:
        return self.valuation.totals.effective_duration

    @property
    def effective_convexity(self) -> float:
        return self.valuation.totals.effective_convexity

    @cached_property
    def portfolio_key_rate_durations(self) -> np.ndarray:
        """(K,) years, market-value weighted like the effective duration."""
        weights = self.revaluation.base
        return weights @ self.key_rate_durations / weights.sum()

    @property
    def equivalent_shift(self) -> np.ndarray:
        """The portfolio's exposure-weighted shift per scenario (S,), decimal: the move itself for a
        parallel scenario (``ladder.risk.revaluation.exposure_weighted_shifts``)."""
        return exposure_weighted_shifts(self.portfolio_key_rate_durations[None, :], self.tenor_shifts)[:, 0]


def shock_book(book: Book, at: dt.date | None = None, scenarios: Sequence[Scenario] | None = None,
               income: IncomeModel | None = None) -> ShockResult:
    """Revalue ``book`` at ``at`` (default: its valuation date) under ``scenarios`` (default:
    ``shock_scenarios(book)``); ``income`` fills ``ShockResult.income_change``."""
    valuation = value_book(book, at)
    scenarios = tuple(shock_scenarios(book) if scenarios is None else scenarios)
    tenors = book.curve.tenors
    k = len(tenors)
    bumps = key_rate_bumps(book.curve, EFFECTIVE_SHIFT_BP)
    cumulative = np.cumsum(shift_matrix(bumps), axis=0)                     # tenors 1..k moved
    shifts = np.vstack([_shift_matrix(scenarios, k), -cumulative, cumulative])
    names = [s.name for s in scenarios] + [f"key rates {tenors[0]} to {t}" for t in tenors] * 2
    curves = _scenario_curves(valuation.curve, shifts, names, str(book.files["curve"]))
    pricer = valuation.pricer
    base_price = pricer.dirty(valuation.curve)
    s = len(scenarios)
    moves = spread_shifts(scenarios, book.holdings)
    prices = scenario_prices(pricer, curves, np.vstack([moves, np.zeros((2 * k, len(book.holdings)))]))
    krd = key_rate_durations(base_price, prices[s:s + k], prices[s + k:], EFFECTIVE_SHIFT_BP / 1e4)
    spread_duration, spread_convexity = spread_risk(pricer, valuation.curve)
    revaluation = revalue(valuation.market_value, base_price, prices[:s], book.holdings.face,
                          valuation.effective_duration, valuation.effective_convexity, krd, shifts[:s] / 1e4,
                          spread_duration, spread_convexity, moves)
    income_change = None if income is None else np.asarray(income(book, valuation.as_of, scenarios), float)
    return ShockResult(book.name, valuation, scenarios, tenors, krd, revaluation,
                       rung_index(np.datetime64(valuation.as_of), book.holdings.maturity), spread_duration,
                       spread_convexity, moves, income_change)


# ---- records for json and csv (percent and bp on output) ---------------------------------------

def _numbers(values, digits: int) -> list:
    """A float array as a JSON-ready list: rounded, None for NaN/inf."""
    values = np.asarray(values, dtype=np.float64)
    return np.where(np.isfinite(values), np.round(values, digits) + 0.0, None).tolist()   # no -0.0


def _group_table(t: ScenarioTotals) -> dict[str, np.ndarray]:
    """Each output field of ``t``, (groups, scenarios) float arrays rounded for output."""
    return {"base_value": (np.broadcast_to(t.base[:, None], t.value.shape), 2), "value": (t.value, 2),
            "change": (t.change, 2), "change_pct": (100 * t.relative_change, 8), "est_duration": (t.est_duration, 2),
            "est_duration_convexity": (t.est_duration_convexity, 2), "error_duration": (t.error_duration, 2),
            "error_duration_convexity": (t.error_duration_convexity, 2)}


def _nested(t: ScenarioTotals) -> dict[str, list]:
    """``_group_table`` as nested lists [group][scenario] of JSON-ready numbers."""
    return {key: _numbers(values, digits) for key, (values, digits) in _group_table(t).items()}


def _record(table: dict[str, list], g: int, s: int) -> dict:
    return {key: values[g][s] for key, values in table.items()}


def scenario_records(r: ShockResult) -> list[dict]:
    """One record a scenario: the portfolio's exact value and estimates, and the breakdowns."""
    portfolio, rungs, sectors = (_nested(t) for t in (r.portfolio, r.by_rung, r.by_sector))
    records = []
    for s, (scenario, bp) in enumerate(zip(r.scenarios, r.parallel_bp)):
        record = {"name": scenario.name, "kind": scenario.kind, "shift_bp": bp,
                  "equivalent_shift_bp": clean_number(r.equivalent_shift[s] * 1e4, 6),
                  "shifts_bp": dict(zip(r.tenors, _numbers(scenario.shift_bp_by_tenor, 6))),
                  "spread_moves_bp": [{"sector": m.sector, "bucket": m.bucket, "bp": clean_number(m.bp, 6)}
                                      for m in scenario.spread_moves],
                  "equivalent_spread_shift_bp": clean_number(r.equivalent_spread_shift[s] * 1e4, 6),
                  **_record(portfolio, 0, s)}
        if r.income_change is not None:
            record["income_change_12m"] = clean_number(r.income_change[s], 2)
        record["by_rung"] = {g: _record(rungs, i, s) for i, g in enumerate(r.by_rung.groups)}
        record["by_sector"] = {g: _record(sectors, i, s) for i, g in enumerate(r.by_sector.groups)}
        records.append(record)
    return records


def holding_shock_records(r: ShockResult) -> list[dict]:
    """One record a holding: its risk and its values under the scenarios, in scenario order."""
    v, rv, h = r.valuation, r.revaluation, r.valuation.holdings
    krd = np.round(r.key_rate_durations, 8).tolist()
    columns = {"value": _numbers(rv.value.T, 2), "est_duration": _numbers(rv.est_duration.T, 2),
               "est_duration_convexity": _numbers(rv.est_duration_convexity.T, 2)}
    ed, ec, base = _numbers(v.effective_duration, 8), _numbers(v.effective_convexity, 8), _numbers(rv.base, 2)
    sd, sc, spread = _numbers(r.spread_duration, 8), _numbers(r.spread_convexity, 8), _numbers(v.spread * 1e4, 6)
    return [{"id": h.id[i], "sector": h.sector[i], "rung": RUNGS[r.rung[i]], "base_value": base[i],
             "effective_duration": ed[i], "effective_convexity": ec[i],
             "key_rate_durations": dict(zip(r.tenors, krd[i])),
             "spread_bp": spread[i], "spread_duration": sd[i], "spread_convexity": sc[i],
             **{key: column[i] for key, column in columns.items()}} for i in range(len(h))]


def spread_duration_records(r: ShockResult) -> list[dict]:
    """One record a holding with spread exposure: sector, rating bucket, spread (bp), spread duration
    (years) and convexity (years^2), market value."""
    v, h = r.valuation, r.valuation.holdings
    long_, short = rating_buckets(h)
    rows = np.flatnonzero(r.spread_duration != 0)
    return [{"id": h.id[i], "sector": h.sector[i], "bucket": long_[i] or short[i] or "unrated",
             "spread_bp": clean_number(v.spread[i] * 1e4, 4), "spread_duration": clean_number(r.spread_duration[i], 8),
             "spread_convexity": clean_number(r.spread_convexity[i], 8),
             "base_value": clean_number(r.revaluation.base[i], 2)} for i in rows]


def shock_document(r: ShockResult) -> dict:
    """The ``ladder shock --format json`` document."""
    krd = r.portfolio_key_rate_durations
    return {"as_of": str(r.as_of), "book": r.book_name, "base_value": clean_number(r.base_value, 2),
            "effective_duration": clean_number(r.effective_duration, 8),
            "effective_convexity": clean_number(r.effective_convexity, 8),
            "key_rate_durations": dict(zip(r.tenors, _numbers(krd, 8))),
            "key_rate_duration_sum": clean_number(krd.sum(), 8),
            "spread_duration": clean_number(r.portfolio_spread_duration, 8),
            "spread_convexity": clean_number(r.portfolio_spread_convexity, 8),
            "scenarios": scenario_records(r), "holdings": holding_shock_records(r)}


def shock_rows(r: ShockResult) -> list[dict]:
    """The csv form: one row per scenario and portfolio, rung, sector or holding (``level``, ``group``)."""
    rv = r.revaluation
    holdings = ScenarioTotals(tuple(r.valuation.holdings.id), rv.base, rv.value.T, rv.est_duration.T,
                              rv.est_duration_convexity.T)
    names, parallel, equivalent = [x.name for x in r.scenarios], r.parallel_bp, _numbers(r.equivalent_shift * 1e4, 6)
    spread_equivalent = _numbers(r.equivalent_spread_shift * 1e4, 6)
    rows = []
    for level, totals in (("portfolio", r.portfolio), ("rung", r.by_rung), ("sector", r.by_sector),
                          ("holding", holdings)):
        g, s = np.meshgrid(np.arange(len(totals.groups)), np.arange(len(r.scenarios)), indexing="ij")
        g, s = g.ravel().tolist(), s.ravel().tolist()
        columns = {"scenario": [names[j] for j in s], "shift_bp": [parallel[j] for j in s],
                   "equivalent_shift_bp": [equivalent[j] for j in s],
                   "equivalent_spread_shift_bp": [spread_equivalent[j] for j in s], "level": [level] * len(g),
                   "group": [totals.groups[i] for i in g],
                   **{key: _numbers(np.ravel(values), digits) for key, (values, digits) in _group_table(totals).items()}}
        rows.extend(dict(zip(columns, values)) for values in zip(*columns.values()))
    return rows
