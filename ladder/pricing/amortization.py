"""Amortized cost by the effective-interest method: schedules, book yield and interest earned.

Method (the effective-interest, or constant-yield, method): a holding's carrying amount on each of
its accrual dates is the present value of its remaining cash flows at the yield that reproduces its
purchase price (the effective yield), so each accrual period earns the carrying amount times that
yield, and the amortization of premium or discount is that interest less the coupon. It is the
"interest method" of US GAAP (FASB ASC 310-20-35, from memory) and the effective interest method of
IFRS 9 (Appendix A, from memory). Between two accrual dates the period's amortization is allocated
ratably to each day, as the constant-yield rules for original issue discount allocate an accrual
period's discount (Treas. Reg. 1.1272-1(b)(1)(iv), "daily portions"; from memory), so a bond bought
at par carries at par every day.

Conventions
- Money per 100 face; amortized cost is clean (without accrued interest); dates ``datetime64[D]``.
- Accrual dates are the unadjusted coupon dates of ``ladder.pricing.cashflows``; cash paid on a
  holiday still accrues to its coupon date.
- Coupon bonds and zeros: the effective yield is compounded at the coupon frequency with time in
  coupon periods by the bond's own day count, the street convention of ``ladder.pricing.yield_math``
  (simple interest inside the final period), so the book yield here is ``value``'s book yield.
- Single-payment instruments (discount, interest at maturity): one accrual period from purchase to
  maturity, so the discount accretes ratably (a bill or CD runs a year or less).
- Funds carry at their balance (100 per 100) and earn their stated yield on ACT/365F.
- Callables (ASU 2017-08, "Premium Amortization on Purchased Callable Debt Securities", from
  memory): while the amortized cost exceeds the amount repayable at a later call date, the premium
  is amortized to the first such call date at that call price; if the bond is not called then, the
  schedule is reset on that date from the call price to the next such call date, or to maturity
  (where a discount, if any, is accreted). ``redeemed_on`` ends a schedule on a call date.

Interest earned over (a, b] = coupon accrual + amortization, with
  coupon accrual = accrued(b) - accrued(a) + coupons due in (a, b],
  amortization   = cost(b) - cost(a) + principal due in (a, b]   (cost is 0 once redeemed),
so over the whole life the amortization sums to the redemption price less the clean purchase price:
the discount, or minus the premium.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from ladder.book.holdings import Holdings
from ladder.market.calendar import roll_following
from ladder.market.dates import NAT, days_between, to_days
from ladder.pricing.callable import call_dates
from ladder.pricing.cashflows import CashFlows, cash_flows
from ladder.pricing.quotes import measures_from_dirty
from ladder.pricing.yield_math import yield_from_dirty

FUND_YEAR_DAYS = 365.0          # funds accrue ACT/365F (ladder.book.holdings.SECTOR_DEFAULTS)
_KEY = 1 << 20                  # row offset for searching many rows' dates at once (days < 2**20)


@dataclass(frozen=True, eq=False)
class CallSchedule:
    """Call dates (n, m) ``datetime64[D]`` (NaT where none), clean call prices per 100, and a mask."""

    dates: np.ndarray
    prices: np.ndarray
    mask: np.ndarray

    @staticmethod
    def of(h: Holdings, source: str = "holdings.csv") -> "CallSchedule":
        """The holdings' own calls: from the first call every 12 / call_frequency months, at ``call_price``."""
        dates, mask = call_dates(h.id, h.first_call, h.call_frequency, h.maturity, rows=h.row, source=source)
        return CallSchedule(dates, np.where(mask, h.call_price[:, None], np.nan), mask)


@dataclass(frozen=True, eq=False)
class Earned:
    """Interest earned per period, per 100 face: (n, P) coupon accrual and amortization."""

    coupon: np.ndarray
    amortization: np.ndarray

    @property
    def total(self) -> np.ndarray:
        return self.coupon + self.amortization


@dataclass(frozen=True, eq=False)
class Amortization:
    """Effective-interest schedules of n holdings (see the module docstring).

    ``node_dates`` / ``node_cost`` (n, K): the schedule's nodes (purchase, each accrual date, each
    reset, the redemption), clean amortized cost per 100 on each, NaT/NaN padded at the end; cost is
    linear in days between nodes. ``end_date`` (n,): redemption (maturity or the call);
    ``redemption`` (n,): principal paid then per 100. ``flow_*`` (n, k): the coupons and principal
    due after purchase up to the redemption, by accrual date. ``book_yield`` (n,): effective yield
    of the first schedule segment on the holding's own basis (decimal); ``workout`` (n,): the date
    that segment amortizes to. ``fund`` (n,): rows carried at their balance.
    """

    holdings: Holdings
    purchase_date: np.ndarray
    purchase_clean: np.ndarray
    purchase_accrued: np.ndarray
    node_dates: np.ndarray
    node_cost: np.ndarray
    end_date: np.ndarray
    redemption: np.ndarray
    flow_dates: np.ndarray
    flow_coupon: np.ndarray
    flow_principal: np.ndarray
    book_yield: np.ndarray
    workout: np.ndarray
    fund: np.ndarray

    def __len__(self) -> int:
        return len(self.holdings)

    def cost(self, dates) -> np.ndarray:
        """Clean amortized cost per 100 on each of ``dates`` ((m,) for every holding, or (n, m), a row
        of dates per holding): (n, m); NaN before purchase, 0 on and after the redemption date, 100
        for funds."""
        q = self._per_row(dates)
        out = _interpolate(self.node_dates, self.node_cost, q)
        out = np.where(q < self.purchase_date[:, None], np.nan, np.where(q >= self.end_date[:, None], 0.0, out))
        return np.where(self.fund[:, None], 100.0, out)

    def accrued(self, dates) -> np.ndarray:
        """Accrued coupon interest per 100 on each of ``dates`` ((m,) or (n, m), as ``cost``): (n, m);
        NaN before purchase, 0 on and after redemption and for funds (a fund's income is paid into
        its balance)."""
        q = self._per_row(dates)
        out = np.zeros(q.shape)
        held = ~self.fund[:, None] & (self.purchase_date[:, None] <= q) & (q < self.end_date[:, None])
        rows, cols = np.nonzero(held)
        if len(rows):                            # one cash-flow matrix for every (holding, date) pair
            out[rows, cols] = cash_flows(self.holdings.take(rows), q[rows, cols]).accrued
        return np.where(~self.fund[:, None] & (q < self.purchase_date[:, None]), np.nan, out)

    def _per_row(self, dates) -> np.ndarray:
        q = to_days(dates)
        return np.broadcast_to(q[None, :], (len(self), len(q))) if q.ndim == 1 else q

    def earned(self, boundaries, accrued: np.ndarray | None = None) -> Earned:
        """Interest earned in each period (b[p-1], b[p]] of ``boundaries`` (P+1,) ascending: per 100.

        A period that starts before the purchase counts from the purchase date (the accrued interest
        bought is not income); a fund earns its stated yield on ACT/365F over the days it spans.
        ``accrued``: ``self.accrued(boundaries)`` if the caller has it (it is the costly part).
        """
        b = to_days(boundaries)
        start = np.maximum(b[None, :-1], self.purchase_date[:, None])
        end = b[None, 1:]
        start = np.where(np.isnat(self.purchase_date)[:, None], b[None, :-1], start)
        span = np.maximum(days_between(start, end), 0.0)
        # each holding's cost and accrued on the boundaries and on its own purchase date (column P+1)
        own = np.where(np.isnat(self.purchase_date), b[0], self.purchase_date)
        edges = np.concatenate([np.broadcast_to(b[None, :], (len(self), len(b))), own[:, None]], axis=1)
        cost = self.cost(edges)
        accrued = (self.accrued(edges) if accrued is None
                   else np.concatenate([accrued, self.accrued(edges[:, -1:])], axis=1))
        rows = np.arange(len(self))[:, None]
        P = len(b) - 1
        s_idx = np.where(start > b[None, :-1], P + 1, np.arange(P)[None, :])
        e_idx = np.broadcast_to(np.arange(1, P + 1)[None, :], s_idx.shape)
        alive = span > 0
        coupon_due = self._due(self.flow_coupon, b, start)
        principal_due = self._due(self.flow_principal, b, start)
        d_cost = np.where(alive, cost[rows, e_idx] - cost[rows, s_idx], 0.0)
        d_accrued = np.where(alive, accrued[rows, e_idx] - accrued[rows, s_idx], 0.0)
        coupon = np.nan_to_num(d_accrued) + coupon_due
        amortization = np.nan_to_num(d_cost) + principal_due
        fund_interest = 100.0 * np.nan_to_num(self.holdings.quote)[:, None] * span / FUND_YEAR_DAYS
        coupon = np.where(self.fund[:, None], fund_interest, coupon)
        return Earned(coupon, np.where(self.fund[:, None], 0.0, amortization))

    def _due(self, amounts: np.ndarray, b: np.ndarray, start: np.ndarray) -> np.ndarray:
        """Sum of ``amounts`` (n, k) due (accrual date) in each period (start, b[p]]: (n, P)."""
        n, P = len(self), len(b) - 1
        dates = self.flow_dates
        ok = ~np.isnat(dates) & (dates > b[0]) & (dates <= b[-1])
        period = np.clip(np.searchsorted(b, np.where(ok, dates, b[0]), side="left") - 1, 0, max(P - 1, 0))
        ok &= dates > start[np.arange(n)[:, None], period]
        flat = (np.arange(n)[:, None] * P + period)[ok]
        return np.bincount(flat, weights=amounts[ok], minlength=n * P).reshape(n, P)


def _interpolate(node_dates: np.ndarray, node_cost: np.ndarray, q: np.ndarray) -> np.ndarray:
    """Each row's node costs interpolated linearly in days at that row's dates ``q`` (n, m); flat
    beyond the last node, NaN before the first. All rows are searched at once (row-offset keys)."""
    n, width = node_dates.shape
    valid = ~np.isnat(node_dates)
    offset = _KEY * np.arange(n, dtype=np.int64)[:, None]
    keys = (np.where(valid, node_dates.astype(np.int64), _KEY - 1) + offset).ravel()
    cost = np.where(valid, node_cost, np.nan).ravel()
    qk = q.astype(np.int64) + offset
    pos = np.searchsorted(keys, qk, side="right") - 1
    lo = np.clip(pos, 0, keys.size - 1)
    hi = np.clip(pos + 1, 0, keys.size - 1)
    row = np.arange(n)[:, None]
    inside = (pos >= row * width) & (lo // width == row)
    usable = inside & (hi // width == row) & np.isfinite(cost[hi]) & (keys[hi] > keys[lo])
    with np.errstate(invalid="ignore", divide="ignore"):
        w = np.where(usable, (qk - keys[lo]) / np.where(usable, keys[hi] - keys[lo], 1), 0.0)
        out = cost[lo] + w * np.where(usable, cost[hi] - cost[lo], 0.0)
    return np.where(inside, out, np.nan)


# ---- construction -------------------------------------------------------------------------------

def workout_flows(h: Holdings, cf: CashFlows, end, price) -> CashFlows:
    """The cash flows ``cf`` of ``h`` ended at a workout date ``end`` (n,) on or before maturity, with
    ``price`` (n,) clean per 100 repaid then plus, when ``end`` is not a coupon date, the interest
    accrued to it (paid as a coupon, on ``end`` rolled to a business day). One slot more than ``cf``."""
    n, k = cf.mask.shape
    end, price = to_days(end), np.asarray(price, dtype=np.float64)
    keep = cf.mask & (cf.dates <= end[:, None])
    on_flow = (keep & (cf.dates == end[:, None])).any(axis=1)
    extra = ~on_flow
    pad = lambda a, fill: np.concatenate([a, np.full((n, 1), fill, dtype=a.dtype)], axis=1)  # noqa: E731
    dates, pay = pad(np.where(keep, cf.dates, NAT), NAT), pad(np.where(keep, cf.pay_dates, NAT), NAT)
    coupon, principal = pad(np.where(keep, cf.coupon, 0.0), 0.0), pad(np.zeros((n, k)), 0.0)
    periods, years = pad(np.where(keep, cf.periods, 0.0), 0.0), pad(np.where(keep, cf.years, 0.0), 0.0)
    mask = pad(keep, False)
    last = keep & (cf.dates == end[:, None])
    principal[:, :k] = np.where(last, price[:, None], 0.0)
    rows = np.flatnonzero(extra)
    if len(rows):
        at_end = cash_flows(h.take(rows), end[rows])
        nxt = np.argmax(cf.mask[rows] & (cf.dates[rows] > end[rows, None]), axis=1)
        dates[rows, k], pay[rows, k] = end[rows], roll_following(end[rows])
        coupon[rows, k], principal[rows, k] = at_end.accrued, price[rows]
        periods[rows, k] = cf.periods[rows, nxt] - at_end.periods[:, 0]
        years[rows, k] = days_between(cf.settle[rows], end[rows]) / 365.0
        mask[rows, k] = True
    return replace(cf, dates=dates, pay_dates=pay, coupon=coupon, principal=principal, mask=mask,
                   periods=periods, years=years)


def _node_values(cf: CashFlows, y: np.ndarray, f: np.ndarray) -> np.ndarray:
    """Dirty value per 100 just after each flow of ``cf`` at yield ``y`` (n, k): the flows after it
    discounted over the periods between, simple interest when one flow is left (street convention)."""
    dp = cf.periods[:, None, :] - cf.periods[:, :, None]                     # (n, j, k): p_k - p_j
    later = cf.mask[:, None, :] & cf.mask[:, :, None] & (dp > 0)
    left = later.sum(axis=2, keepdims=True)
    rate = (y / f)[:, None, None]
    with np.errstate(invalid="ignore", over="ignore"):
        df = np.where(left == 1, 1.0 / (1.0 + rate * dp), (1.0 + rate) ** -dp)
    return np.where(later, cf.amount[:, None, :] * df, 0.0).sum(axis=2)


def _coupon_segment(h: Holdings, start, clean, end, price):
    """One effective-interest segment of coupon bonds: from ``start`` at ``clean`` to ``end`` at ``price``.

    Returns (yield, accrued at start, node dates (n, k), node costs (n, k)), start and end nodes included.
    """
    cf = cash_flows(h, start)
    dirty = clean + cf.accrued
    work = workout_flows(h, cf, end, price)
    f = np.where(h.frequency > 0, h.frequency, 2).astype(np.float64)
    y = yield_from_dirty(work, dirty, f)
    values = _node_values(work, y, f)
    is_end = work.mask & (work.dates == to_days(end)[:, None])
    cost = np.where(is_end, price[:, None], values)
    dates = np.concatenate([to_days(start)[:, None], np.where(work.mask, work.dates, NAT)], axis=1)
    costs = np.concatenate([clean[:, None], np.where(work.mask, cost, np.nan)], axis=1)
    return y, cf.accrued, dates, costs


def _workouts(calls: CallSchedule, rows, start, clean, maturity):
    """Next workout after ``start``: the first call whose price is below ``clean``, else maturity."""
    d, p, m = calls.dates[rows], calls.prices[rows], calls.mask[rows]
    premium = m & (d > start[:, None]) & (p < clean[:, None] - 1e-12)
    has = premium.any(axis=1)
    j = np.argmax(premium, axis=1)
    pick = np.arange(len(rows))
    return has, np.where(has, d[pick, j], maturity), np.where(has, p[pick, j], 100.0)


def _sorted_nodes(parts, n):
    """Stack segments' (rows, dates, costs), each in date order and in order of the segments, into
    (n, K) date-ordered rows, NaT/NaN padded."""
    counts = np.zeros(n, dtype=np.int64)
    for rows, dates, _ in parts:
        counts[rows] += (~np.isnat(dates)).sum(axis=1)
    width = max(int(counts.max(initial=1)), 1)
    out_d, out_c = np.full((n, width), NAT), np.full((n, width), np.nan)
    fill = np.zeros(n, dtype=np.int64)
    for rows, dates, costs in parts:
        valid = ~np.isnat(dates)
        r, c = np.nonzero(valid)
        order = np.cumsum(valid, axis=1) - 1
        out_d[rows[r], fill[rows[r]] + order[r, c]] = dates[r, c]
        out_c[rows[r], fill[rows[r]] + order[r, c]] = costs[r, c]
        fill[rows] += valid.sum(axis=1)
    return out_d, out_c


def amortize(h: Holdings, *, purchase_price=None, purchase_date=None, calls: CallSchedule | None = None,
             redeemed_on=None, source: str = "holdings.csv") -> Amortization:
    """Effective-interest schedules of ``h`` (see the module docstring).

    ``purchase_price`` (clean per 100) and ``purchase_date`` (n,) default to the holdings' book price
    and purchase date; NaN/NaT entries there are taken from ``h``. A holding must be bought before it
    matures. ``calls`` defaults to the holdings' own call terms; ``redeemed_on`` (n,) gives the call
    date on which a holding is redeemed (NaT: not called).
    """
    n = len(h)
    price = h.book_price.copy() if purchase_price is None else np.where(
        np.isnan(purchase_price), h.book_price, purchase_price)
    bought = h.purchase_date.copy() if purchase_date is None else np.where(
        np.isnat(to_days(purchase_date)), h.purchase_date, to_days(purchase_date))
    fund = h.kind == "fund"
    calls = CallSchedule.of(h, source) if calls is None else calls
    redeemed = np.full(n, NAT) if redeemed_on is None else to_days(redeemed_on)
    book_yield, workout = np.full(n, np.nan), np.where(fund, NAT, h.maturity)
    accrued0 = np.zeros(n)
    parts = []
    coupon_rows = np.flatnonzero(np.isin(h.kind, ("fixed", "zero")))
    single_rows = np.flatnonzero(np.isin(h.kind, ("discount", "at_maturity")))
    if len(single_rows):
        sub = h.take(single_rows)
        cf = cash_flows(sub, bought[single_rows])
        accrued0[single_rows] = cf.accrued
        book_yield[single_rows] = measures_from_dirty(sub, cf, price[single_rows] + cf.accrued).ytm
        parts.append((single_rows, np.stack([bought[single_rows], sub.maturity], axis=1),
                      np.stack([price[single_rows], np.full(len(single_rows), 100.0)], axis=1)))
    rows, start, clean = coupon_rows, bought[coupon_rows], price[coupon_rows]
    first = True
    while len(rows):
        has, end, at = _workouts(calls, rows, start, clean, h.maturity[rows])
        y, accrued, dates, costs = _coupon_segment(h.take(rows), start, clean, end, at)
        if first:
            book_yield[rows], workout[rows], accrued0[rows] = y, end, accrued
            first = False
        else:                                    # the reset's start node repeats the last end node
            dates, costs = dates[:, 1:], costs[:, 1:]
        parts.append((rows, dates, costs))
        go_on = has & ~(redeemed[rows] <= end)
        rows, start, clean = rows[go_on], end[go_on], at[go_on]
    node_dates, node_cost = _sorted_nodes(parts, n)
    called = ~np.isnat(redeemed) & ~fund
    end_date = np.where(fund, NAT, np.where(called, redeemed, h.maturity))
    on_call = calls.mask & (calls.dates == redeemed[:, None])
    redemption = np.where(called, np.where(on_call.any(axis=1), np.nansum(np.where(on_call, calls.prices, 0.0),
                                                                           axis=1), h.call_price), 100.0)
    if called.any():
        node_dates, node_cost = _cut(node_dates, node_cost, called, redeemed)
    flow_dates, flow_coupon, flow_principal = np.full((n, 1), NAT), np.zeros((n, 1)), np.zeros((n, 1))
    held = np.flatnonzero(~fund)
    if len(held):
        sub = h.take(held)
        work = workout_flows(sub, cash_flows(sub, bought[held]), end_date[held], redemption[held])
        k = work.mask.shape[1]
        flow_dates, flow_coupon, flow_principal = np.full((n, k), NAT), np.zeros((n, k)), np.zeros((n, k))
        flow_dates[held] = np.where(work.mask, work.dates, NAT)
        flow_coupon[held] = np.where(work.mask, work.coupon, 0.0)
        flow_principal[held] = np.where(work.mask, work.principal, 0.0)
    return Amortization(h, np.where(fund, NAT, bought), np.where(fund, 100.0, price), accrued0, node_dates,
                        node_cost, end_date, redemption, flow_dates, flow_coupon, flow_principal,
                        np.where(fund, h.quote, book_yield), workout, fund)


def _cut(node_dates, node_cost, rows_mask, on):
    """Schedules ended on ``on`` (n,) where ``rows_mask``: later nodes dropped, a node added on ``on``
    at the schedule's cost that day (the amortized cost just before the redemption)."""
    at = _interpolate(node_dates, node_cost, on[:, None])[:, 0]
    keep = ~rows_mask[:, None] | (node_dates < on[:, None])
    dates = np.concatenate([np.where(keep, node_dates, NAT), np.where(rows_mask, on, NAT)[:, None]], axis=1)
    costs = np.concatenate([np.where(keep, node_cost, np.nan), np.where(rows_mask, at, np.nan)[:, None]], axis=1)
    key = np.where(np.isnat(dates), np.datetime64("9999-12-31"), dates)
    order = np.argsort(key, axis=1, kind="stable")
    return np.take_along_axis(dates, order, 1), np.take_along_axis(costs, order, 1)
