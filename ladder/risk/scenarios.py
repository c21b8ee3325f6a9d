"""Rate and credit scenarios: moves of the quoted par yields, in basis points, one number per curve
tenor, and moves of the holdings' spreads by sector and rating bucket, in basis points.

A scenario moves the par yields of ``curve.csv``, and the curve is then rebuilt from them
(``Curve.shifted``): "+100 bp" means every par yield 100 bp higher, as a treasurer reads it.
Shapes are piecewise linear in nominal tenor years (months / 12) and flat beyond their end points.

Built-in shapes and their documented default sizes:
- parallel: the same move at every tenor; default set -300 to +300 bp in 100 bp steps plus
  +/-25 and +/-50 bp (``DEFAULT_PARALLEL_BP``);
- twist: a rotation about a pivot tenor (default 2Y): 0 at the pivot, ``short_bp`` at the shortest
  curve tenor, ``long_bp`` at the longest, linear in tenor years on each side;
- steepener / flattener: twists of ``size_bp`` (default 100 bp) between the ends: the shortest tenor
  moves -size/2 and the longest +size/2 (steepener), or the reverse (flattener);
- short end: ``bp`` at tenors up to 1Y, fading linearly to 0 at 2Y;
- long end: 0 up to 2Y, rising linearly to ``bp`` at 5Y and beyond;
- key-rate bumps: a triangular bump at each curve tenor, peaking there and zero at the neighbouring
  tenors; on the curve's own tenor grid bump k is ``bp`` at tenor k and 0 elsewhere, so the bumps
  add up to the parallel move exactly. The rebuilt curves add up only to first order: measured on
  zero-coupon prices of the demo curve (tests/risk/test_scenarios.py), key-rate durations from
  +/-bp bumps sum to the effective duration within 0.04% at 0.01 bp, 1.6% at 0.1 bp, 9% at 1 bp and
  19% at 25 bp under monotone convex (not linear in its inputs), and within 0.13% at 25 bp under
  log-linear; so take key-rate durations from small bumps (0.01 bp) on a monotone convex curve;
- user scenarios from ``scenarios.csv`` (``scenario,tenor,shift_bp[,sector,bucket]``): each
  scenario's points, named by curve tenors, interpolated linearly across the other tenors and flat
  beyond its ends; rows naming a sector are spread moves (below);
- credit: the standard credit set (``ladder.risk.credit``).

A spread move (``SpreadMove``) adds basis points to the spread (z-spread, or OAS for a callable) of
every holding of a sector, or of one rating bucket of it, at every tenor. A holding takes the move
of its long-term bucket, else of its short-term bucket, else the sector's move for every bucket,
else none (the order the spread table is read in).
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

import numpy as np

from ladder.book.holdings import SECTORS, Holdings
from ladder.errors import Problems
from ladder.market.tenors import tenor_label, tenor_months
from ladder.pricing.curve import ParCurve
from ladder.pricing.spreads import RATING_BUCKETS, rating_buckets
from ladder.book.cells import parse_number
from ladder.book.table_file import read_rows

DEFAULT_PARALLEL_BP = (-300.0, -200.0, -100.0, -50.0, -25.0, 0.0, 25.0, 50.0, 100.0, 200.0, 300.0)
DEFAULT_PIVOT = "2Y"
DEFAULT_ROTATION_BP = 100.0
SHORT_END = ("1Y", "2Y")     # full move up to the first, none from the second
LONG_END = ("2Y", "5Y")      # none up to the first, full move from the second
MAX_SHIFT_BP = 1000.0        # a larger move is taken as a typing error
SCENARIO_COLUMNS = ("scenario", "tenor", "shift_bp", "sector", "bucket")
REQUIRED_COLUMNS = ("scenario", "tenor", "shift_bp")
KINDS = ("parallel", "twist", "steepener", "flattener", "short_end", "long_end", "key_rate", "credit", "user")


@dataclass(frozen=True)
class SpreadMove:
    """``bp`` added to the spreads of ``sector``'s holdings in ``bucket`` (one of RATING_BUCKETS), or
    in every bucket when ``bucket`` is ""."""

    sector: str
    bucket: str
    bp: float

    def __post_init__(self) -> None:
        if self.sector not in SECTORS or self.bucket not in ("", *RATING_BUCKETS) or not math.isfinite(self.bp):
            raise ValueError(f"bad spread move {self!r}")


@dataclass(frozen=True, eq=False)
class Scenario:
    """A named move of the par yields: ``shift_bp_by_tenor`` float64 (n,) aligned to the curve's
    tenors, in basis points; ``parallel_bp`` the size of a parallel move, else None; and the moves of
    the spreads, ``spread_moves`` (none for a pure rate move)."""

    name: str
    kind: str
    shift_bp_by_tenor: np.ndarray
    parallel_bp: float | None = None
    spread_moves: tuple[SpreadMove, ...] = ()

    def __post_init__(self) -> None:
        shift = np.asarray(self.shift_bp_by_tenor, dtype=np.float64)
        if self.kind not in KINDS:
            raise ValueError(f"unknown scenario kind {self.kind!r}; known: {', '.join(KINDS)}")
        if shift.ndim != 1 or not np.all(np.isfinite(shift)):
            raise ValueError("shift_bp_by_tenor must be a finite 1-D array (one value per tenor)")
        keys = [(m.sector, m.bucket) for m in self.spread_moves]
        if len(set(keys)) != len(keys):
            raise ValueError(f"scenario {self.name!r} moves one sector and bucket twice")
        object.__setattr__(self, "shift_bp_by_tenor", shift)
        object.__setattr__(self, "spread_moves", tuple(self.spread_moves))

    def spread_shift_bp(self, holdings: Holdings) -> np.ndarray:
        """Each holding's spread move, bp (n,): see the module docstring for which move applies."""
        out = np.zeros(len(holdings))
        if not self.spread_moves:
            return out
        long_, short = rating_buckets(holdings)
        done = np.zeros(len(holdings), dtype=bool)
        for bucket_of in (long_, short, None):          # the long bucket's move first, the sector's last
            for m in self.spread_moves:
                if (m.bucket == "") != (bucket_of is None):
                    continue
                rows = ~done & (holdings.sector == m.sector) & (True if bucket_of is None else bucket_of == m.bucket)
                out[rows] = m.bp
                done |= rows
        return out


def _bp_name(bp: float) -> str:
    return "0 bp" if bp == 0 else f"{bp:+g} bp"


def _tenor_years(tenor: str) -> float:
    return tenor_months(tenor) / 12.0


def parallel(par_curve: ParCurve, bp: float) -> Scenario:
    """Every par yield moved by ``bp``."""
    bp = float(bp)
    return Scenario(_bp_name(bp), "parallel", np.full(len(par_curve), bp), bp)


def parallel_set(par_curve: ParCurve, shifts_bp: Iterable[float] = DEFAULT_PARALLEL_BP) -> tuple[Scenario, ...]:
    """Parallel moves of the distinct sizes in ``shifts_bp``, smallest first."""
    return tuple(parallel(par_curve, bp) for bp in sorted({float(bp) for bp in shifts_bp}))


def twist(par_curve: ParCurve, short_bp: float, long_bp: float, pivot: str = DEFAULT_PIVOT,
          kind: str = "twist") -> Scenario:
    """A rotation about ``pivot``: ``short_bp`` at the shortest tenor, 0 at the pivot, ``long_bp`` at
    the longest, linear in tenor years between. The pivot must lie strictly inside the curve."""
    years = par_curve.years
    pivot = tenor_label(tenor_months(pivot))
    at = _tenor_years(pivot)
    if not years[0] < at < years[-1]:
        raise ValueError(f"pivot {pivot} must lie between the curve's first and last tenors "
                         f"({par_curve.tenors[0]}, {par_curve.tenors[-1]})")
    shift = np.interp(years, [years[0], at, years[-1]], [short_bp, 0.0, long_bp])
    size = {"twist": f"{short_bp:+g}/{long_bp:+g}", "steepener": f"{long_bp - short_bp:g}",
            "flattener": f"{short_bp - long_bp:g}"}[kind]
    return Scenario(f"{kind} {size} bp about {pivot}", kind, shift)


def steepener(par_curve: ParCurve, size_bp: float = DEFAULT_ROTATION_BP, pivot: str = DEFAULT_PIVOT) -> Scenario:
    """The spread from the shortest to the longest tenor widens by ``size_bp``, turning about ``pivot``."""
    return twist(par_curve, -size_bp / 2, size_bp / 2, pivot, "steepener")


def flattener(par_curve: ParCurve, size_bp: float = DEFAULT_ROTATION_BP, pivot: str = DEFAULT_PIVOT) -> Scenario:
    """The spread from the shortest to the longest tenor narrows by ``size_bp``, turning about ``pivot``."""
    return twist(par_curve, size_bp / 2, -size_bp / 2, pivot, "flattener")


def _ramp(par_curve: ParCurve, start: str, end: str, at_start: float, at_end: float) -> np.ndarray:
    a, b = _tenor_years(start), _tenor_years(end)
    if not a < b:
        raise ValueError(f"tenor {start} must be shorter than {end}")
    return np.interp(par_curve.years, [a, b], [at_start, at_end])


def short_end_move(par_curve: ParCurve, bp: float, full_to: str = SHORT_END[0],
                   zero_from: str = SHORT_END[1]) -> Scenario:
    """``bp`` at tenors up to ``full_to``, fading linearly to 0 at ``zero_from`` and beyond."""
    return Scenario(f"short end {_bp_name(bp)}", "short_end", _ramp(par_curve, full_to, zero_from, bp, 0.0))


def long_end_move(par_curve: ParCurve, bp: float, zero_to: str = LONG_END[0],
                  full_from: str = LONG_END[1]) -> Scenario:
    """0 at tenors up to ``zero_to``, rising linearly to ``bp`` at ``full_from`` and beyond."""
    return Scenario(f"long end {_bp_name(bp)}", "long_end", _ramp(par_curve, zero_to, full_from, 0.0, bp))


def standard_non_parallel(par_curve: ParCurve) -> tuple[Scenario, ...]:
    """The default non-parallel set: steepener and flattener of 100 bp about 2Y, short-end and
    long-end moves of +/-100 bp, and a twist of +50 bp at the short end and -50 bp at the long end
    about 5Y. A rotation is left out of the set where the curve has no tenor on one side of its
    pivot (a curve of 3M and 1Y only has no steepener about 2Y): it could not turn about it."""
    def inside(pivot: str) -> bool:
        return par_curve.years[0] < _tenor_years(pivot) < par_curve.years[-1]

    scenarios = [steepener(par_curve), flattener(par_curve)] if inside(DEFAULT_PIVOT) else []
    scenarios += [short_end_move(par_curve, 100.0), short_end_move(par_curve, -100.0),
                  long_end_move(par_curve, 100.0), long_end_move(par_curve, -100.0)]
    if inside("5Y"):
        scenarios.append(twist(par_curve, 50.0, -50.0, "5Y"))
    return tuple(scenarios)


def key_rate_bumps(par_curve: ParCurve, bp: float = 1.0) -> tuple[Scenario, ...]:
    """One triangular bump of ``bp`` per curve tenor (see the module docstring); they sum to parallel."""
    return tuple(Scenario(f"key rate {tenor} {_bp_name(bp)}", "key_rate", bp * row)
                 for tenor, row in zip(par_curve.tenors, np.eye(len(par_curve))))


def shift_matrix(scenarios: Sequence[Scenario]) -> np.ndarray:
    """The scenarios' shifts stacked, (S, n) basis points: the input of ``Curve.shifted_many``."""
    return np.stack([s.shift_bp_by_tenor for s in scenarios])


def _shift(text: str) -> float | None:
    try:
        return parse_number(text)
    except ValueError:
        return None


def _checked_shift(name: str, r: int, c: int, text: str, problems: Problems) -> float | None:
    """The shift in bp of a cell, or None with the problem added."""
    value = _shift(text)
    if value is None:
        problems.add(name, r, c, f"shift {text!r} is not a number of basis points")
    elif abs(value) > MAX_SHIFT_BP:
        problems.add(name, r, c, f"shift {text} bp is beyond +/-{MAX_SHIFT_BP:g} bp")
        return None
    return value


def parse_bp_list(text: str, source: str = "--bp") -> tuple[float, ...]:
    """A comma-separated list of parallel shifts (``"-300,-100,0,100,300"``), distinct and sorted.

    Problems name ``source`` as the file, row 0 and the item's position as the column.
    """
    problems = Problems()
    values = []
    items = text.split(",")
    for c, item in enumerate(items, start=1):
        value = _shift(item.strip())
        if value is None:
            problems.add(source, 0, c, f"{item.strip()!r} is not a number of basis points")
        elif abs(value) > MAX_SHIFT_BP:
            problems.add(source, 0, c, f"shift {value:g} bp is beyond +/-{MAX_SHIFT_BP:g} bp")
        else:
            values.append(value)
    problems.raise_if_any()
    return tuple(sorted(set(values)))


def _spread_row(name: str, r: int, cells: dict, problems: Problems) -> tuple[str, str] | None:
    """(sector, bucket) of a spread-move row, or None with the problems added."""
    c, sector = cells["sector"]
    ok = True
    if sector not in SECTORS:
        problems.add(name, r, c, f"unknown sector {sector!r}; known: {', '.join(SECTORS)}")
        ok = False
    c, bucket = cells["bucket"]
    if bucket not in ("", *RATING_BUCKETS):
        problems.add(name, r, c, f"unknown rating bucket {bucket!r}; known: {', '.join(RATING_BUCKETS)} "
                                 "(or blank for every bucket of the sector)")
        ok = False
    c, tenor = cells["tenor"]
    if tenor:
        problems.add(name, r, c, "a spread move applies at every tenor: leave tenor blank on a row with a sector")
        ok = False
    return (sector, bucket) if ok else None


def read_scenarios(path, par_curve: ParCurve) -> tuple[Scenario, ...]:
    """User scenarios from ``path`` (``scenario,tenor,shift_bp[,sector,bucket]``), in order of first
    appearance.

    A row with no sector moves the par yield at ``tenor``, which must be one of the curve's own; each
    scenario's shifts are interpolated linearly (in tenor years) across the curve's other tenors and
    held flat beyond its first and last named tenor (no rate rows: no rate move). A row with a sector
    (and optionally a bucket, tenor blank) moves those spreads by ``shift_bp``. Raises
    ``InputError`` with every problem.
    """
    name = str(path)
    problems = Problems()
    rows = read_rows(path, SCENARIO_COLUMNS, problems, REQUIRED_COLUMNS)
    on_curve = {m: i for i, m in enumerate(par_curve.months)}
    points: dict[str, dict[int, tuple[int, float]]] = {}     # scenario -> curve index -> (row, bp)
    spread_points: dict[str, dict[tuple[str, str], tuple[int, float]]] = {}   # -> (sector, bucket) -> (row, bp)
    for r, cells in rows:
        c, label = cells["scenario"]
        if not label:
            problems.add(name, r, c, "the scenario has no name")
        points.setdefault(label, {})
        if cells["sector"][1] or cells["bucket"][1]:
            key = _spread_row(name, r, cells, problems)
            c, text = cells["shift_bp"]
            value = _checked_shift(name, r, c, text, problems)
            if not label or key is None or value is None:
                continue
            seen = spread_points.setdefault(label, {})
            if key in seen:
                problems.add(name, r, cells["sector"][0], f"scenario {label!r} moves {' '.join(filter(None, key))} "
                                                          f"twice (also row {seen[key][0]})")
            else:
                seen[key] = (r, value)
            continue
        c, text = cells["tenor"]
        try:
            index = on_curve.get(tenor_months(text))
            if index is None:
                problems.add(name, r, c, f"tenor {text} is not on the curve; its tenors are "
                                         f"{', '.join(par_curve.tenors)}")
        except ValueError as error:
            index = None
            problems.add(name, r, c, str(error))
        c, text = cells["shift_bp"]
        value = _checked_shift(name, r, c, text, problems)
        if not label or index is None or value is None:
            continue
        seen = points[label]
        if index in seen:
            problems.add(name, r, cells["tenor"][0], f"scenario {label!r} gives tenor "
                                                     f"{par_curve.tenors[index]} twice (also row {seen[index][0]})")
        else:
            seen[index] = (r, value)
    if not rows and not problems:
        problems.add(name, 0, 0, "no scenarios: the file has a header but no rows")
    problems.raise_if_any()
    years = par_curve.years
    scenarios = []
    for label, by_index in points.items():
        index = np.array(sorted(by_index), dtype=np.int64)
        shifts = np.array([by_index[i][1] for i in index])
        rates = np.interp(years, years[index], shifts) if len(index) else np.zeros(len(years))
        moves = tuple(SpreadMove(sector, bucket, bp) for (sector, bucket), (_, bp)
                      in spread_points.get(label, {}).items())
        scenarios.append(Scenario(label, "user", rates, spread_moves=moves))
    return tuple(scenarios)
