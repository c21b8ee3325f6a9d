"""Callable fixed-coupon bonds on the Hull-White trinomial tree, many bonds at once.

Conventions
- Time is curve time: ACT/365F years from the valuation date t = 0, which is both the curve date and
  the settlement date (for a later settlement pass ``lambda t: D(t_s + t) / D(t_s)`` as the curve).
- Prices are per 100 face. Values at t = 0 are dirty (full) prices.
- The option-adjusted spread (OAS) is a continuously compounded decimal added to the short rate at
  every node, so a cash flow at time t carries an extra exp(-OAS t).
- Calls are discrete, on the dates given (the issuer's notice period is ignored: the call is decided
  and settled on the call date). On a call date the issuer calls when the dirty continuation value,
  the value of the flows after the call date, exceeds the call price plus the accrued interest at the
  call date (the usual dirty-to-dirty comparison); a coupon paid on the call date is paid either way.
- Grid: one uniform grid t_i = i / steps_per_year shared by all bonds, independent of the bonds, so a
  bond's price does not depend on the others. A cash flow between grid times is discounted over its
  stub with its node's own rate, fitted so zero-coupon bonds at any date reprice exactly
  (``HullWhiteTree.stub_weights``). A call between grid times is decided at the grid time at or
  before it, with the call price discounted back over the stub the same way: the decision uses the
  information of up to one step (a week at the default grid) before the call date.

Hot path: one lattice for every curve (``ladder.pricing.hull_white_tree``); values are (tree nodes x
lanes) arrays, a lane being one bond on one curve at one OAS, rolled back one step at a time by one
sparse product for all lanes together; the loop is over time steps only.
"""

from __future__ import annotations

import math
import os
import weakref
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass

import numpy as np
from ladder.errors import Problems
from ladder.market.dates import add_months
from ladder.pricing.hull_white_tree import Discount, HullWhiteTree
from ladder.pricing.roots import decreasing_roots

# Float slack when placing an event time on the grid (in steps): an event within 1e-9 of a step of
# a grid time is on it.
_ON_GRID = 1e-9


@dataclass(frozen=True)
class HullWhiteParams:
    """Hull-White parameters and the tree's grid.

    Defaults (from memory, not from a published calibration): mean reversion a = 0.03 a year and
    absolute volatility sigma = 0.01 (100 bp a year, normal), in the range that calibrations of the
    model to US dollar swaption volatilities have produced in recent years. QuantLib's HullWhite class
    defaults to a = 0.1, sigma = 0.01 (ql/models/shortrate/onefactormodels/hullwhite.hpp). 52 steps a
    year keeps tree prices within about 0.005 per 100 of the converged value and of QuantLib's tree
    (tests/pricing/test_callable_quantlib.py) and 1,000 bonds well inside a second.
    """

    mean_reversion: float = 0.03
    volatility: float = 0.01
    steps_per_year: int = 52

    @property
    def dt(self) -> float:
        return 1.0 / self.steps_per_year

    def problems(self, ids=(), file: str = "book.toml") -> Problems:
        """Problems with the parameters; ``ids`` are the holdings that need the model (named in messages)."""
        problems = Problems()
        who = f" (needed to price callable holdings {', '.join(map(str, ids[:5]))}" \
              f"{' ...' if len(ids) > 5 else ''})" if len(ids) else ""
        checks = (
            ("mean_reversion", self.mean_reversion, 0.0, "zero or positive"),
            ("volatility", self.volatility, 0.0, "zero or positive"),
            ("steps_per_year", self.steps_per_year, 1.0, "at least 1"),
        )
        for name, value, low, want in checks:
            if not (math.isfinite(value) and value >= low):
                problems.add(file, 0, 0, f"hull_white.{name} is {value}; it must be {want}{who}")
        return problems


@dataclass(frozen=True, eq=False)
class CallableBonds:
    """Fixed-coupon bonds with discrete calls, one row each, on curve time (see the module docstring).

    flow_years (n, k): ACT/365F years of each future cash flow (> 0); flow_amounts (n, k): coupon plus
    principal per 100 face; flow_mask (n, k): which slots hold a flow. call_years (n, m): call dates
    (>= 0, before the last flow); call_prices (n, m): clean call prices per 100; call_accrued (n, m):
    accrued interest per 100 at each call date (0 on a coupon date); call_mask (n, m). A row with no
    call is a bullet. ``rows`` are the holdings-file rows (1-based) used in messages, ``source`` that
    file's name.
    """

    ids: np.ndarray
    flow_years: np.ndarray
    flow_amounts: np.ndarray
    flow_mask: np.ndarray
    call_years: np.ndarray
    call_prices: np.ndarray
    call_accrued: np.ndarray
    call_mask: np.ndarray
    rows: np.ndarray | None = None
    source: str = "holdings.csv"

    def __len__(self) -> int:
        return len(self.ids)

    @property
    def maturity_years(self) -> np.ndarray:
        """Time of each bond's last cash flow (-inf for a bond without flows)."""
        return np.where(self.flow_mask, self.flow_years, -np.inf).max(axis=1, initial=-np.inf)

    def problems(self, dt: float | None) -> Problems:
        """Every problem with the bonds, each naming the holding; ``dt`` is the tree step in years
        (None skips the check that calls fall in different tree steps)."""
        calls, maturity = self.call_mask, self.maturity_years[:, None]
        years = np.where(calls, self.call_years, np.inf)
        first = years.min(axis=1, initial=np.inf)
        has_flows = self.flow_mask.any(axis=1)
        price_bad = calls & ~(np.isfinite(self.call_prices) & (self.call_prices > 0))
        checks = [
            (~has_flows, lambda n: "no future cash flows to price"),
            ((self.flow_mask & ~((self.flow_years > 0) & np.isfinite(self.flow_amounts))).any(axis=1),
             lambda n: "a cash flow is not after the valuation date or its amount is not a number"),
            (has_flows & np.isfinite(first) & (first >= maturity[:, 0]),
             lambda n: f"first call ({first[n]:.4f} y) is not before maturity ({maturity[n, 0]:.4f} y)"),
            (has_flows & (first < maturity[:, 0]) & (calls & (years >= maturity)).any(axis=1),
             lambda n: "a call date is not before maturity"),
            ((calls & (years < 0)).any(axis=1), lambda n: "a call date is before the valuation date"),
            (price_bad.any(axis=1),
             lambda n: f"call price {self.call_prices[n][price_bad[n]][0]} is not a positive price per 100"),
            ((calls & ~np.isfinite(self.call_accrued)).any(axis=1),
             lambda n: "accrued interest at a call date is not a number"),
        ]
        if dt is not None:
            step = np.sort(np.where(calls, np.floor(years / dt + _ON_GRID), np.inf), axis=1)
            crowded = ((step[:, 1:] == step[:, :-1]) & np.isfinite(step[:, 1:])).any(axis=1)
            checks.append((crowded, lambda n: f"two call dates fall within one tree step of "
                                              f"{dt * 365:.1f} days; raise hull_white.steps_per_year"))
        problems = Problems()
        rows = np.zeros(len(self), dtype=int) if self.rows is None else self.rows
        for flagged, message in checks:
            for n in np.flatnonzero(flagged):
                problems.add(self.source, int(rows[n]), 0, f"holding {self.ids[n]}: {message(n)}")
        return problems


@dataclass(frozen=True, eq=False)
class CallableValues:
    """Model results per bond (per 100 face; spreads decimal; duration in years; convexity in years^2).

    ``bullet_price`` is the same bond without its calls at the same OAS on the same tree, and
    ``option_value`` = bullet_price - dirty_price, the value of the issuer's call. Effective duration
    and convexity come from dirty prices with the curve shifted by +/- ``shift`` (a parallel shift of
    continuously compounded zero rates) and the OAS held.
    """

    ids: np.ndarray
    oas: np.ndarray
    dirty_price: np.ndarray
    bullet_price: np.ndarray
    option_value: np.ndarray
    effective_duration: np.ndarray
    effective_convexity: np.ndarray
    shift: float


def callable_prices(bonds: CallableBonds, discount: Discount, oas, params: HullWhiteParams = HullWhiteParams(),
                    *, calls: bool = True, workers: int | None = None) -> np.ndarray:
    """Dirty price per 100 of each bond at its ``oas`` (decimal, scalar or (n,)), on the tree fitted to ``discount``.

    ``discount`` is any vectorized function from ACT/365F years (1-D) to discount factors: one curve
    (same shape out, prices (n,)) or S curves ((S, len(t)) out, prices (S, n)); every (bond, curve)
    pair is rolled back together on one lattice. ``calls=False`` rolls the same bonds back without
    their calls (the bullets). ``workers`` threads share the lanes (default: the machine's cores, at
    most 4).
    """
    lattice = _Lattice.fit(bonds, params)
    dfs = lattice.discounts(discount)
    n, s = len(bonds), dfs[0].shape[0]
    many = np.ndim(discount(np.zeros(1))) == 2
    spread = np.broadcast_to(np.asarray(oas, float), (n,))
    prices = lattice.values(dfs, np.tile(np.arange(n), s), np.repeat(np.arange(s), n), np.tile(spread, s),
                            np.full(n * s, calls), workers).reshape(s, n)
    return prices if many else prices[0]


def bullet_prices(bonds: CallableBonds, discount: Discount, oas) -> np.ndarray:
    """Dirty price per 100 of each bond without its calls at ``oas`` on one curve: sum amount * DF(t) *
    exp(-OAS t), which is exactly what the tree gives the bullet (it reprices every zero-coupon bond)."""
    n = len(bonds)
    mask = bonds.flow_mask
    t = np.where(mask, bonds.flow_years, 0.0)
    df = np.asarray(discount(t.ravel()), float).reshape(t.shape)
    oas = np.broadcast_to(np.asarray(oas, float), (n,))
    return np.where(mask, bonds.flow_amounts * df * np.exp(-oas[:, None] * t), 0.0).sum(axis=1)


def option_adjusted_spreads(bonds: CallableBonds, discount: Discount, dirty_prices,
                            params: HullWhiteParams = HullWhiteParams(), *, workers: int | None = None,
                            tolerance: float = 1e-11) -> np.ndarray:
    """OAS (decimal) of each bond from its market dirty price per 100, to ``tolerance`` in the spread.

    One vectorized bracketed search (``ladder.pricing.roots.decreasing_roots``) across all bonds;
    each iteration is one rollback of the bonds still unsolved. Price falls as the OAS rises, so the
    root is unique; the search starts from the bullet's z-spread, which is an upper bound.
    """
    lattice = _Lattice.fit(bonds, params)
    target = _checked_prices(bonds, dirty_prices)
    return lattice.spreads_for(discount, target, workers, tolerance)


def value_callables(bonds: CallableBonds, discount: Discount, params: HullWhiteParams = HullWhiteParams(),
                    *, oas=None, dirty_prices=None, shift: float = 0.0025,
                    workers: int | None = None) -> CallableValues:
    """Price, OAS, option value, effective duration and convexity of each bond (one curve).

    Give either ``oas`` (decimal) or market ``dirty_prices`` (per 100, the OAS is solved first).
    ``shift`` (decimal, default 25 bp) moves every continuously compounded zero rate up and down with
    the OAS held. In the Hull-White tree a parallel shift of the curve by d adds exactly d to every
    fitted alpha (forward induction is linear in it), so the shifted prices are the base tree's prices
    at OAS +/- d; they are rolled back together with the base price in one pass.
    """
    if (oas is None) == (dirty_prices is None):
        raise ValueError("give exactly one of oas and dirty_prices")
    lattice = _Lattice.fit(bonds, params)
    n = len(bonds)
    if oas is None:
        oas = lattice.spreads_for(discount, _checked_prices(bonds, dirty_prices), workers)
    oas = np.broadcast_to(np.asarray(oas, float), (n,)).copy()
    idx = np.arange(n)
    stacked = lattice.values(lattice.discounts(discount), np.tile(idx, 3), np.zeros(3 * n, int),
                             np.concatenate((oas, oas + shift, oas - shift)), np.ones(3 * n, bool), workers)
    price, up, down = stacked.reshape(3, n)
    bullet = lattice.bullet_values(discount, oas)
    return CallableValues(
        ids=bonds.ids, oas=oas, dirty_price=price, bullet_price=bullet, option_value=bullet - price,
        effective_duration=(down - up) / (2 * price * shift),
        effective_convexity=(up + down - 2 * price) / (price * shift * shift), shift=shift,
    )


def _rows(bonds: CallableBonds, rows: np.ndarray) -> CallableBonds:
    """The flows of the bonds at ``rows`` (enough for ``bullet_prices``)."""
    return CallableBonds(bonds.ids[rows], bonds.flow_years[rows], bonds.flow_amounts[rows], bonds.flow_mask[rows],
                         bonds.call_years[rows], bonds.call_prices[rows], bonds.call_accrued[rows],
                         bonds.call_mask[rows])


def _checked_prices(bonds: CallableBonds, dirty_prices) -> np.ndarray:
    target = np.broadcast_to(np.asarray(dirty_prices, float), (len(bonds),))
    problems = Problems()
    rows = np.zeros(len(bonds), dtype=int) if bonds.rows is None else bonds.rows
    for n in np.flatnonzero(~(np.isfinite(target) & (target > 0))):
        problems.add(bonds.source, int(rows[n]), 0,
                     f"holding {bonds.ids[n]}: price {target[n]} is not a positive price per 100")
    problems.raise_if_any()
    return target


@dataclass(frozen=True, eq=False)
class _Events:
    """Cash flows or calls of all bonds, sorted by the tree step they fall in.

    ``start[i]:start[i + 1]`` are the events of step i; ``stubs[i]`` (events of step i, nodes_i) are
    their curve-free stub weights (``HullWhiteTree.stub_weights``). For flows, ``after_call`` marks those
    paid on or before a call of the same bond in the step (they are added after the call decision);
    ``repeats[i]`` says whether a bond has two events in step i.
    """

    step: np.ndarray
    bond: np.ndarray
    years: np.ndarray
    amount: np.ndarray
    after_call: np.ndarray
    start: np.ndarray
    stubs: tuple
    repeats: np.ndarray


class _Lattice:
    """The tree for a set of bonds, with every bond's flows and calls placed on its grid; no curve.

    Lanes are (bond, curve, OAS, calls on or off) and are rolled back together: values are kept
    deflated (U = V D_i exp(-OAS t_i), see ``HullWhiteTree``), so one step is the same sparse product for
    every lane, and a lane's curve and OAS only scale its flows and call prices by DF(t) exp(-OAS t).
    """

    def __init__(self, bonds: CallableBonds, tree: HullWhiteTree, n_steps: int):
        self.bonds, self.tree, self.n_steps = bonds, tree, n_steps
        dt = tree.dt
        b_f, k_f = np.nonzero(bonds.flow_mask)
        t_f = bonds.flow_years[b_f, k_f]
        step_f = np.maximum(np.ceil(t_f / dt - _ON_GRID).astype(int) - 1, 0)
        b_c, k_c = np.nonzero(bonds.call_mask)
        t_c = bonds.call_years[b_c, k_c]
        step_c = np.minimum(np.floor(t_c / dt + _ON_GRID).astype(int), n_steps - 1)
        redemption = bonds.call_prices[b_c, k_c] + bonds.call_accrued[b_c, k_c]
        # a flow paid on or before a call in the same step is kept whether or not the bond is called
        call_time_in_step = np.full((len(bonds), n_steps), np.nan)
        call_time_in_step[b_c, step_c] = t_c
        after = t_f <= call_time_in_step[b_f, step_f] + _ON_GRID * dt
        self.last_step = np.full(len(bonds), -1)
        np.maximum.at(self.last_step, b_f, step_f)
        self.flows = self._events(step_f, b_f, t_f, bonds.flow_amounts[b_f, k_f], after)
        self.calls = self._events(step_c, b_c, t_c, redemption, np.zeros(len(b_c), bool))

    @staticmethod
    def fit(bonds: CallableBonds, params: HullWhiteParams) -> "_Lattice":
        """Check the inputs (raising InputError with every problem) and place the bonds on the tree."""
        problems = params.problems(list(bonds.ids[bonds.call_mask.any(axis=1)]))
        problems.extend(bonds.problems(None if problems else params.dt))
        problems.raise_if_any()
        cached = _LATTICES.get(bonds, {}).get(params)
        if cached is not None:
            return cached
        horizon = max(float(bonds.maturity_years.max(initial=0.0)), params.dt)
        n_steps = math.ceil(horizon / params.dt - _ON_GRID)
        lattice = _Lattice(bonds, _tree(params.mean_reversion, params.volatility, params.dt, n_steps), n_steps)
        _LATTICES.setdefault(bonds, {})[params] = lattice
        return lattice

    def _events(self, step, bond, years, amount, after) -> _Events:
        order = np.lexsort((bond, step))
        step, bond, years, amount, after = step[order], bond[order], years[order], amount[order], after[order]
        start = np.searchsorted(step, np.arange(self.n_steps + 1))
        stubs = tuple(self.tree.stub_weights(i, years[start[i]:start[i + 1]]) for i in range(self.n_steps))
        repeats = np.zeros(self.n_steps, bool)
        same = (np.diff(step) == 0) & (np.diff(bond) == 0)
        repeats[step[1:][same]] = True
        return _Events(step, bond, years, amount, after, start, stubs, repeats)

    def discounts(self, discount: Discount) -> tuple[np.ndarray, np.ndarray]:
        """DF(t) at every flow and every call time: two (S, events) arrays, S = 1 for one curve."""
        times = np.concatenate((self.flows.years, self.calls.years))
        df = np.atleast_2d(np.asarray(discount(times), float))
        return df[:, :len(self.flows.years)], df[:, len(self.flows.years):]

    def spreads_for(self, discount: Discount, target: np.ndarray, workers: int | None,
                    tolerance: float = 1e-11) -> np.ndarray:
        """OAS of each bond for dirty prices ``target`` on one curve: bracket below the bullet z-spread,
        then a bracketed search (``decreasing_roots``)."""
        calls_on = np.ones(len(target), bool)
        dfs = self.discounts(discount)

        def excess(s, b):
            return self.values(dfs, b, np.zeros(len(b), int), s, calls_on[b], workers) - target[b]

        z = self.bullet_spreads(discount, target)
        return decreasing_roots(excess, z - 0.01, z, xtol=tolerance, xmax=z + 1e-6)

    def bullet_spreads(self, discount: Discount, target: np.ndarray) -> np.ndarray:
        """z-spread of each bullet (calls ignored) for dirty prices ``target``; an upper bound on the OAS."""
        excess = lambda z, b: self._bullet_rows(discount, b, z) - target[b]
        n = len(target)
        return decreasing_roots(excess, np.full(n, -0.05), np.full(n, 0.05), xtol=1e-12)

    def bullet_values(self, discount: Discount, oas: np.ndarray) -> np.ndarray:
        """Dirty prices without the calls: sum of amount * DF(t) * exp(-OAS t).

        This is the tree's own value of the bullet, not an approximation: the tree reprices every
        zero-coupon bond on the curve exactly, and the OAS enters as exp(-OAS t) per flow.
        """
        return self._bullet_rows(discount, np.arange(len(self.bonds)), oas)

    def _bullet_rows(self, discount: Discount, rows: np.ndarray, oas: np.ndarray) -> np.ndarray:
        return bullet_prices(_rows(self.bonds, rows), discount, oas)

    def values(self, dfs, bond: np.ndarray, curve: np.ndarray, spread: np.ndarray, with_calls: np.ndarray,
               workers: int | None) -> np.ndarray:
        """Dirty value at t = 0 of each lane: bond index ``bond`` on curve ``curve`` (a row of ``dfs``,
        from ``discounts``) at OAS ``spread``, calls on or off.

        Lanes are sorted by their bond's last step and cut into chunks of about ``_CHUNK`` lanes of
        similar length, shared by ``workers`` threads (default: the machine's cores, at most 4).
        """
        workers = workers or min(os.cpu_count() or 1, 4)
        order = np.lexsort((curve, bond, -self.last_step[bond]))   # a bond's lanes side by side
        count = max(math.ceil(len(bond) / _CHUNK), min(workers, max(len(bond) // 64, 1)))
        chunks = np.array_split(order, count)
        out = np.empty(len(bond))
        run = lambda c: self._roll(dfs, bond[c], curve[c], spread[c], with_calls[c])
        if workers == 1 or len(chunks) == 1:
            for c in chunks:
                out[c] = run(c)
            return out
        with ThreadPoolExecutor(min(workers, len(chunks))) as pool:
            for c, v in zip(chunks, pool.map(run, chunks)):
                out[c] = v
        return out

    def _roll(self, dfs, bond, curve, spread, with_calls) -> np.ndarray:
        """Backward induction of one chunk of lanes; values are (nodes, lanes)."""
        tree = self.tree
        lanes_of = _LaneIndex(bond, len(self.bonds))
        flows = _LaneEvents(self.flows, lanes_of, dfs[0], curve, spread)
        calls = _LaneEvents(self.calls, lanes_of, dfs[1], curve, spread, with_calls)
        top = int(self.last_step[bond].max(initial=-1))
        values = np.zeros((2 * tree.width(max(top, 0)) + 1, len(bond)))
        for i in range(top, -1, -1):
            if i < top:
                values = tree.roll_back(i, values)
            paid, called = flows.at(i), calls.at(i)
            after = None if paid is None else self.flows.after_call[paid[1]]
            if paid is not None:
                flows.add(i, paid, values, ~after)
            if called is not None:
                calls.cap(called, values)
            if paid is not None:
                flows.add(i, paid, values, after)
        return values[0]


class _LaneEvents:
    """The events of a chunk's lanes: (lane, event) pairs sorted by step, each with its amount scaled
    by the lane's DF(t) exp(-OAS t)."""

    def __init__(self, events: _Events, lanes_of, df, curve, spread, keep=None):
        self.events = events
        lane, ev = lanes_of(events.bond)
        if keep is not None:
            lane, ev = lane[keep[lane]], ev[keep[lane]]
        self.lane, self.ev = lane, ev
        self.scale = events.amount[ev] * df[curve[lane], ev] * np.exp(-spread[lane] * events.years[ev])
        self.start = np.searchsorted(ev, events.start)

    def at(self, i: int):
        """(lanes, events, amounts (pairs, nodes_i) in deflated values) of step ``i``, or None."""
        s = slice(self.start[i], self.start[i + 1])
        if s.start == s.stop:
            return None
        lane, ev = self.lane[s], self.ev[s]
        return lane, ev, self.events.stubs[i][ev - self.events.start[i]] * self.scale[s][:, None]

    def add(self, i: int, step, values: np.ndarray, pick: np.ndarray) -> None:
        """Add the ``pick``ed flows of ``step`` (from ``at``) to the lanes' values."""
        lane, _, x = step
        if not pick.any():
            return
        if self.events.repeats[i]:
            np.add.at(values.T, lane[pick], x[pick])
        else:
            values[:, lane[pick]] += x[pick].T

    @staticmethod
    def cap(step, values: np.ndarray) -> None:
        """Apply calls (``step`` from ``at``): each lane's value is at most its discounted call price."""
        lane, _, x = step
        values[:, lane] = np.minimum(values[:, lane], x.T)


class _LaneIndex:
    """Maps bond indices of events to the positions of the lanes that hold those bonds."""

    def __init__(self, bond: np.ndarray, n_bonds: int):
        self.by_bond = np.argsort(bond, kind="stable")
        self.count = np.bincount(bond, minlength=n_bonds)
        self.start = np.concatenate(([0], np.cumsum(self.count)[:-1]))

    def __call__(self, event_bond: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(lane positions, event indices): one pair for each lane holding each event's bond, by event."""
        counts = self.count[event_bond]
        ev = np.repeat(np.arange(len(event_bond)), counts)
        offset = np.arange(len(ev)) - np.repeat(np.cumsum(counts) - counts, counts)
        return self.by_bond[self.start[event_bond][ev] + offset], ev


# Lanes rolled back together in one array (nodes x lanes): about 1 MB at 250 nodes, so a step stays
# in the cache (measured best of 256 to 4096 on 1,000 bonds x 61 curves).
_CHUNK = 512
# Lattices by bonds (held while the bonds are) and parameters: valuation and every scenario share one.
_LATTICES: "weakref.WeakKeyDictionary[CallableBonds, dict]" = weakref.WeakKeyDictionary()


_TREES: dict = {}


def _tree(a: float, sigma: float, dt: float, n_steps: int) -> HullWhiteTree:
    """The lattice with at least ``n_steps`` steps. Its first steps do not depend on how many follow
    (widths, branching and pruning are per step), so one tree serves every shorter horizon."""
    tree = _TREES.get((a, sigma, dt))
    if tree is None or tree.n_steps < n_steps:
        tree = _TREES[(a, sigma, dt)] = HullWhiteTree.build(a, sigma, dt, n_steps)
    return tree


@dataclass(frozen=True, eq=False)
class WorkoutYields:
    """Street-convention yields (decimal, compounded at the coupon frequency) to each workout date.

    ``to_call`` (n, m) is NaN where there is no call or the call is today; ``worst_call`` is the index
    of the call that gives ``to_worst``, or -1 when the worst is maturity.
    """

    to_call: np.ndarray
    to_maturity: np.ndarray
    to_first_call: np.ndarray
    to_worst: np.ndarray
    worst_call: np.ndarray


def workout_yields(dirty_prices, frequency, flow_periods, flow_amounts, flow_mask,
                   call_periods, call_prices, call_accrued, call_mask) -> WorkoutYields:
    """Yield to each call date, to maturity, to the first call and to worst, from dirty prices per 100.

    Street convention: time is counted in coupon periods from settlement by the bond's own day count
    (``flow_periods`` (n, k), ``call_periods`` (n, m), fractional for a broken first period) and
    price = sum CF / (1 + y/f)^periods with f = ``frequency`` (n,) coupons a year. To a call date the
    flows are the coupons paid up to and on that date plus the call price and the accrued interest at
    the call date; to maturity, every flow. Yield to worst is the lowest of them (common practice).
    All yields are solved together with one vectorized bracketed search (``decreasing_roots``).
    """
    price = np.asarray(dirty_prices, float)
    n = len(price)
    f = np.broadcast_to(np.asarray(frequency, float), (n,))
    m = call_periods.shape[1]
    # workout w < m is call w, workout m is maturity
    horizon = np.concatenate((np.where(call_mask, call_periods, np.nan),
                              np.where(flow_mask, flow_periods, -np.inf).max(axis=1, keepdims=True)), axis=1)
    redemption = np.concatenate((call_prices + call_accrued, np.zeros((n, 1))), axis=1)
    bond, work = np.nonzero(horizon > 0)
    periods = np.where(flow_mask, flow_periods, np.inf)
    included = periods[bond] <= horizon[bond, work][:, None] + _ON_GRID
    amounts = flow_amounts[bond]

    def excess(y, p):
        p = p.astype(int)
        v = 1.0 + y / f[bond[p]]
        with np.errstate(invalid="ignore", over="ignore"):   # slots past the workout (inf periods) are left out
            pv = (amounts[p] * v[:, None] ** -periods[bond[p]]).sum(axis=1, where=included[p])
        return pv + redemption[bond[p], work[p]] * v ** -horizon[bond[p], work[p]] - price[bond[p]]

    yields = np.full((n, m + 1), np.nan)
    yields[bond, work] = decreasing_roots(excess, np.zeros(len(bond)), np.full(len(bond), 0.10), xtol=1e-12,
                                          xmin=-0.999 * f[bond])
    to_call = yields[:, :m]
    first = np.argmax(np.isfinite(to_call), axis=1)
    has_call = np.isfinite(to_call).any(axis=1)
    worst = np.where(np.isnan(yields), np.inf, yields).argmin(axis=1)
    return WorkoutYields(
        to_call=to_call, to_maturity=yields[:, m],
        to_first_call=np.where(has_call, to_call[np.arange(n), first], np.nan),
        to_worst=yields[np.arange(n), worst], worst_call=np.where(worst == m, -1, worst),
    )


def call_dates(ids, first_call, call_frequency, maturity, after=None, rows=None,
               source: str = "holdings.csv") -> tuple[np.ndarray, np.ndarray]:
    """Discrete call dates (n, m) ``datetime64[D]`` (NaT where none) and their mask.

    The first call, then every 12 / ``call_frequency`` months on the first call's day of the month
    (the month's last day when shorter), while before ``maturity``; ``call_frequency`` 0 = callable
    once; a NaT first call = not callable. Dates are unadjusted. Calls before ``after`` (settlement)
    are dropped. Raises InputError naming each holding whose first call is on or after maturity or
    whose call frequency is not 0, 1, 2, 4 or 12.
    """
    first_call = np.asarray(first_call, "datetime64[D]")
    maturity = np.asarray(maturity, "datetime64[D]")
    freq = np.asarray(call_frequency, int)
    callable_ = ~np.isnat(first_call)
    problems = Problems()
    rows = np.zeros(len(first_call), dtype=int) if rows is None else rows
    for n in np.flatnonzero(callable_ & ~(first_call < maturity)):
        problems.add(source, int(rows[n]), 0, f"holding {ids[n]}: first call date {first_call[n]} "
                                              f"is not before maturity {maturity[n]}")
    for n in np.flatnonzero(callable_ & ~np.isin(freq, (0, 1, 2, 4, 12))):
        problems.add(source, int(rows[n]), 0, f"holding {ids[n]}: call frequency {freq[n]} is not "
                                              "0 (once), 1, 2, 4 or 12 a year")
    problems.raise_if_any()
    step = np.where(freq > 0, 12 // np.maximum(freq, 1), 0)
    start = np.where(callable_, first_call, maturity)
    span = (maturity.astype("datetime64[M]") - start.astype("datetime64[M]")).astype(int)
    count = np.where(callable_, np.where(step > 0, span // np.maximum(step, 1) + 1, 1), 0)
    k = np.arange(max(int(count.max(initial=0)), 1))
    dates = add_months(start[:, None], k[None, :] * step[:, None])
    mask = (k[None, :] < count[:, None]) & (dates < maturity[:, None])
    if after is not None:
        mask &= dates >= np.asarray(after, "datetime64[D]")
    return np.where(mask, dates, np.datetime64("NaT")), mask
