"""The government curve: par yields bootstrapped to discount factors, zero and forward rates.

Curve measure: time ``t`` is ACT/365F years from the curve date; ``DF(t) = exp(-F(t))`` where
``F(t)`` is the integral of the instantaneous forward rate from 0 to ``t``. Rates are decimals.

Par instruments (what each quoted tenor means; government par yields, semiannual bond-equivalent):
- tenors of 6M and below are single-payment bills, ``DF(T) = 1 / (1 + y * T)``: the bond-equivalent
  yield of 31 CFR 356 App. B VI.D.1, a simple rate on ACT/365F;
- longer tenors (whole half-years) are semiannual par bonds priced at 100: a coupon of ``y / 2`` per
  unit face every half-year (31 CFR 356 App. B I.A: half the annual rate, whatever the days), the
  dates stepped back from the maturity in 6-month steps, unadjusted; ``sum(y/2 * DF(t_i)) + DF(T) = 1``.
Maturities are the curve date plus the tenor in months, with the end-of-month rule (a month-end curve
date gives month-end dates; common practice, as in ``ladder.market.schedule``). Payment dates are
not rolled to business days: the curve prices the quoted instruments on their nominal dates.

Interpolation between the maturities (the nodes), and extrapolation past the last one with a flat
instantaneous forward equal to the last interval's average (discrete) forward, as QuantLib's
piecewise curves do; it is positive whenever that discrete forward is:
- ``"monotone_convex"`` (default): the monotone convex method of P. S. Hagan and G. West,
  "Interpolation Methods for Curve Construction", Applied Mathematical Finance 13(2), 2006, with
  their positivity bound on the node forwards (within [0, 2 * min(adjacent discrete forwards)]).
  Where discrete forwards are negative we apply its mirror image ([2 * max, 0]), and where they
  change sign the node forward is 0: our extension, which keeps each interval's forward on the sign
  of its discrete forward and the curve continuous in its inputs. The instantaneous forward is
  continuous, reproduces every discrete forward between nodes exactly, is positive when the
  discrete forwards are, and monotone where they are; where the bound is inactive it equals
  QuantLib's ``ConvexMonotone(quadraticity=0, monotonicity=1, forcePositive=False)``, which that
  library documents as the basic Hagan-West method. The method is not linear in its inputs, so
  responses to separate bumps add up only to first order in small bumps (see ``ladder.risk``).
- ``"log_linear"``: ``ln DF`` linear in ``t`` between nodes (piecewise-constant forwards).

Bootstrap: the node discount factors solve "every par instrument prices exactly at par" as one
system (Newton's method, finite-difference Jacobian, step halving), vectorized across any number of
scenarios; monotone convex is non-local (a node's forward depends on both neighbouring intervals),
so the nodes are solved together rather than one after another. Residuals are below 1e-13 per unit
face. Par yields that leave no positive discount factors (e.g. a 30Y far above a 20Y) raise
ValueError.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass, field

import numpy as np

from ladder.market.dates import add_months, days_between, is_month_end, to_days
from ladder.market.tenors import tenor_label, tenor_months

METHODS = ("monotone_convex", "log_linear")
BILL_MAX_MONTHS = 6          # tenors at or below are single-payment bills
MAX_TENOR_MONTHS = 600       # 50Y: a longer government tenor is taken as a typing error
_TOLERANCE = 1e-13           # largest pricing error of a par instrument, per unit face
_MAX_ITERATIONS = 40
_HALVINGS = 12
_BUMP = 1e-6                 # finite-difference step on F(node) for the Jacobian


def tenor_problems(months: Sequence[int]) -> list[tuple[int, str]]:
    """Why a list of tenors (in months, file order) cannot make a curve: ``(index, message)`` pairs.

    Tenors must be strictly increasing, start at or below 6M (a bill), be whole half-years beyond 6M
    (semiannual par bonds) and not exceed 50Y. An empty list is a problem at index 0.
    """
    if len(months) == 0:
        return [(0, "no tenors: a curve needs at least one par yield")]
    problems = []
    seen: dict[int, int] = {}
    for i, m in enumerate(months):
        label = tenor_label(m)
        if m > MAX_TENOR_MONTHS:
            problems.append((i, f"tenor {label} is beyond {tenor_label(MAX_TENOR_MONTHS)}"))
        elif m > BILL_MAX_MONTHS and m % 6:
            problems.append((i, f"tenor {label}: tenors beyond {BILL_MAX_MONTHS}M are semiannual par bonds "
                                "and must be whole half-years (1Y, 18M, 2Y, ...)"))
        if m in seen:
            problems.append((i, f"tenor {label} appears twice (also entry {seen[m] + 1})"))
        elif i and m < months[i - 1]:
            problems.append((i, f"tenor {label} comes after {tenor_label(months[i - 1])}: "
                                "list tenors from shortest to longest"))
        seen.setdefault(m, i)
    if months[0] > BILL_MAX_MONTHS:
        problems.append((0, f"the curve must start at or below {BILL_MAX_MONTHS}M (a bill tenor); "
                            f"its first tenor is {tenor_label(months[0])}"))
    return problems


@dataclass(frozen=True, eq=False)
class ParCurve:
    """Quoted government par yields by tenor.

    ``tenors``: labels such as ``"3M"``, ``"2Y"`` (normalized: ``"12M"`` becomes ``"1Y"``);
    ``months``: int64 (n,), derived; ``par_yields``: float64 (n,), decimals, semiannual bond-equivalent
    (bill tenors: simple ACT/365F). Raises ValueError on tenors that break ``tenor_problems``.
    """

    tenors: tuple[str, ...]
    par_yields: np.ndarray
    months: np.ndarray = field(init=False)

    def __post_init__(self) -> None:
        months = np.array([tenor_months(t) for t in self.tenors], dtype=np.int64)
        problems = tenor_problems(list(months))
        if problems:
            raise ValueError("; ".join(message for _, message in problems))
        yields = np.array(self.par_yields, dtype=np.float64)
        if yields.shape != months.shape or not np.all(np.isfinite(yields)):
            raise ValueError(f"need one finite par yield per tenor ({len(months)}), got {yields.shape}")
        object.__setattr__(self, "tenors", tuple(tenor_label(m) for m in months))
        object.__setattr__(self, "months", months)
        object.__setattr__(self, "par_yields", yields)

    def __len__(self) -> int:
        return len(self.tenors)

    @property
    def years(self) -> np.ndarray:
        """Nominal tenor in years (months / 12), float64 (n,): the axis of scenario shapes."""
        return self.months / 12.0

    def shifted(self, shift_bp) -> "ParCurve":
        """The same tenors with every par yield moved by ``shift_bp`` (scalar or (n,), basis points)."""
        return ParCurve(self.tenors, self.par_yields + np.asarray(shift_bp, dtype=np.float64) / 1e4)


def _years_from(curve_date, dates) -> np.ndarray:
    """ACT/365F years from ``curve_date`` to ``dates`` (float64, NaN where NaT)."""
    return days_between(curve_date, dates) / 365.0


@dataclass(frozen=True, eq=False)
class ParInstruments:
    """Terms of the par instruments behind a curve on a curve date (no quotes), on one time grid.

    ``maturity_dates`` (n,) datetime64[D]; ``maturity_times`` (n,) ACT/365F years; ``is_bill`` (n,);
    ``times`` (m,) sorted unique cash-flow times of all instruments; ``coupon_flows`` (n, m): 1 where
    a par bond pays a coupon at ``times[k]``; ``maturity_flows`` (n, m): 1 at each instrument's maturity.
    """

    curve_date: np.datetime64
    tenors: tuple[str, ...]
    maturity_dates: np.ndarray
    maturity_times: np.ndarray
    is_bill: np.ndarray
    times: np.ndarray
    coupon_flows: np.ndarray
    maturity_flows: np.ndarray

    def cash_flows(self, par_yields) -> np.ndarray:
        """Cash flows per unit face, shape (S, n, m), for par yields of shape (S, n) (decimals)."""
        y = np.atleast_2d(np.asarray(par_yields, dtype=np.float64))
        coupon = np.where(self.is_bill, 0.0, y / 2.0)
        redemption = np.where(self.is_bill, 1.0 + y * self.maturity_times, 1.0)
        return coupon[..., None] * self.coupon_flows + redemption[..., None] * self.maturity_flows


def par_instruments(par_curve: ParCurve, curve_date) -> ParInstruments:
    """The par instruments of ``par_curve`` quoted on ``curve_date`` (see the module docstring)."""
    curve_date = np.datetime64(curve_date, "D")
    months = par_curve.months
    maturity = add_months(np.full(months.shape, curve_date), months, is_month_end(curve_date))
    is_bill = months <= BILL_MAX_MONTHS
    steps = np.arange(max(1, int(months.max()) // 6))
    has_coupon = ~is_bill[:, None] & (steps[None, :] < (months // 6)[:, None])
    coupon_dates = add_months(maturity[:, None], -6 * steps[None, :], is_month_end(maturity)[:, None])
    coupon_times = _years_from(curve_date, coupon_dates)
    maturity_times = _years_from(curve_date, maturity)
    times, inverse = np.unique(np.concatenate([coupon_times[has_coupon], maturity_times]),
                               return_inverse=True)
    n, m = len(months), len(times)
    rows = np.nonzero(has_coupon)[0]
    coupon_flows = np.zeros((n, m))
    coupon_flows[rows, inverse[:len(rows)]] = 1.0
    maturity_flows = np.zeros((n, m))
    maturity_flows[np.arange(n), inverse[len(rows):]] = 1.0
    return ParInstruments(curve_date, par_curve.tenors, maturity, maturity_times, is_bill, times,
                          coupon_flows, maturity_flows)


# ---- interpolation: F(t), the integrated forward, from F at the nodes ------------------------------
# Every function takes node_times (n+1,) with node_times[0] = 0, node values F (B, n+1) with
# F[:, 0] = 0, and times t (m,); it returns (B, m). Past the last node the forward is flat.

def _locate(node_times: np.ndarray, t: np.ndarray):
    """Interval i (1..n) of each time, its position x in [0, 1], length, and the time past the end."""
    n = len(node_times) - 1
    i = np.clip(np.searchsorted(node_times, t, side="left"), 1, n)
    width = node_times[i] - node_times[i - 1]
    x = (np.minimum(t, node_times[-1]) - node_times[i - 1]) / width
    return i, x, width, np.maximum(t - node_times[-1], 0.0)


def _discrete_forwards(node_times: np.ndarray, F: np.ndarray) -> np.ndarray:
    """Average forward over each interval, (B, n)."""
    return np.diff(F, axis=-1) / np.diff(node_times)


def _log_linear_integral(node_times, F, t):
    i, x, _, past = _locate(node_times, t)
    fd = _discrete_forwards(node_times, F)
    return F[:, i - 1] + (F[:, i] - F[:, i - 1]) * x + fd[:, -1:] * past


def _log_linear_forward(node_times, F, t):
    i, _, _, past = _locate(node_times, t)
    fd = _discrete_forwards(node_times, F)
    return np.where(past > 0, fd[:, -1:], fd[:, i - 1])


def _node_forwards(node_times: np.ndarray, fd: np.ndarray) -> np.ndarray:
    """Hagan-West instantaneous forwards at the nodes, (B, n+1), with the sign-preserving bound.

    A node's forward is kept within [0, 2 * min] of its adjacent discrete forwards when they are
    positive (Hagan and West's positivity bound), within [2 * max, 0] when they are negative, and
    at 0 where the discrete forward changes sign; the bound is continuous in the forwards.
    """
    if fd.shape[1] == 1:
        return np.repeat(fd, 2, axis=1)
    w = np.diff(node_times)
    f = np.empty((fd.shape[0], fd.shape[1] + 1))
    f[:, 1:-1] = (w[:-1] * fd[:, 1:] + w[1:] * fd[:, :-1]) / (w[:-1] + w[1:])
    f[:, 0] = fd[:, 0] - 0.5 * (f[:, 1] - fd[:, 0])
    f[:, -1] = fd[:, -1] - 0.5 * (f[:, -2] - fd[:, -1])
    low = np.concatenate([fd[:, :1], np.minimum(fd[:, :-1], fd[:, 1:]), fd[:, -1:]], axis=1)
    high = np.concatenate([fd[:, :1], np.maximum(fd[:, :-1], fd[:, 1:]), fd[:, -1:]], axis=1)
    return np.clip(f, 2.0 * np.minimum(high, 0.0), 2.0 * np.maximum(low, 0.0))


def _shape_terms(g0: np.ndarray, g1: np.ndarray):
    """Hagan-West's four sectors for g = f - f_discrete on an interval, g(0) = g0, g(1) = g1.

    Sector (i) is the quadratic ``g0 (1 - 4x + 3x^2) + g1 (3x^2 - 2x)``; sectors (ii)-(iv) have the
    form ``A + (g0 - A) (max(eta - x, 0) / eta)^2 + (g1 - A) (max(x - eta, 0) / (1 - eta))^2``.
    Returns (quadratic mask, A, eta); every shape integrates to zero over [0, 1].
    """
    quadratic = (((g0 > 0) & (g1 <= -0.5 * g0) & (g1 >= -2 * g0))
                 | ((g0 < 0) & (g1 >= -0.5 * g0) & (g1 <= -2 * g0)))
    flat_start = ((g0 < 0) & (g1 > -2 * g0)) | ((g0 > 0) & (g1 < -2 * g0))
    flat_end = ((g0 > 0) & (g1 < 0) & (g1 > -0.5 * g0)) | ((g0 < 0) & (g1 > 0) & (g1 < -0.5 * g0))
    with np.errstate(divide="ignore", invalid="ignore"):
        eta = np.select([flat_start, flat_end], [(g1 + 2 * g0) / (g1 - g0), 3 * g1 / (g1 - g0)],
                        g1 / (g0 + g1))
        a = np.select([flat_start, flat_end], [g0, g1], -g0 * g1 / (g0 + g1))
    # Unused where the quadratic applies, or 0/0 where g0 = g1 = 0 (then g = 0 everywhere).
    return quadratic, np.where(np.isfinite(a), a, 0.0), np.where(np.isfinite(eta), eta, 0.5)


def _shape_polynomials(node_times: np.ndarray, F: np.ndarray):
    """Each interval's g as a quadratic in y = x - eta on each side of eta (side 0: x < eta, side 1:
    x >= eta): g = c0 + c1 y + c2 y^2, and its integral from 0 to x is G(eta) + c0 y + c1 y^2/2 + c2 y^3/3.

    Returns the discrete forwards (B, n), the forward held past the last node (the last discrete
    forward, (B, 1)), eta (B, n) and terms
    (B, n, 2, 4) = [G(eta), c0, c1, c2]. Expanding about eta keeps every term bounded by the g's.
    """
    fd = _discrete_forwards(node_times, F)
    f = _node_forwards(node_times, fd)
    g0, g1 = f[:, :-1] - fd, f[:, 1:] - fd
    quadratic, a, eta = _shape_terms(g0, g1)
    with np.errstate(divide="ignore", invalid="ignore"):
        curvature = np.stack([(g0 - a) / eta**2, (g1 - a) / (1.0 - eta) ** 2], axis=-1)
    curvature = np.where(np.isfinite(curvature), curvature, 0.0)     # a side of zero width is unused
    zero = np.zeros(eta.shape)
    pieces = np.stack([np.stack([a * eta + (g0 - a) * eta / 3.0, a, zero, curvature[..., side]], axis=-1)
                       for side in (0, 1)], axis=-2)
    # Sector (i), expanded about x = 1 on both sides: g(1) = g1, g'(1) = 2 g0 + 4 g1, g'' = 6 (g0 + g1).
    quad = np.stack([zero, g1, 2.0 * g0 + 4.0 * g1, 3.0 * (g0 + g1)], axis=-1)[..., None, :]
    terms = np.where(quadratic[..., None, None], quad, pieces)
    return fd, fd[:, -1:], np.where(quadratic, 1.0, eta), terms


def _monotone_convex_at(node_times, F, t):
    """Per time: interval i, y = x - eta, width, time past the end, fd, f_end and [G(eta), c0, c1, c2]."""
    i, x, width, past = _locate(node_times, t)
    fd, f_end, eta, terms = _shape_polynomials(node_times, F)
    eta_i = eta[:, i - 1]
    side = (x >= eta_i).astype(np.intp)
    c = terms[np.arange(len(F))[:, None], i - 1, side]                 # (B, m, 4)
    return i, x, x - eta_i, width, past, fd[:, i - 1], f_end, c


def _monotone_convex_integral(node_times, F, t):
    i, x, y, width, past, fd_i, f_end, c = _monotone_convex_at(node_times, F, t)
    shape = c[..., 0] + y * (c[..., 1] + y * (c[..., 2] / 2.0 + y * c[..., 3] / 3.0))
    return F[:, i - 1] + width * (fd_i * x + shape) + f_end * past


def _monotone_convex_forward(node_times, F, t):
    _, _, y, _, past, fd_i, f_end, c = _monotone_convex_at(node_times, F, t)
    return np.where(past > 0, f_end, fd_i + c[..., 1] + y * (c[..., 2] + y * c[..., 3]))


_Interpolator = Callable[[np.ndarray, np.ndarray, np.ndarray], np.ndarray]
_INTEGRAL: dict[str, _Interpolator] = {
    "monotone_convex": _monotone_convex_integral, "log_linear": _log_linear_integral}
_FORWARD: dict[str, _Interpolator] = {
    "monotone_convex": _monotone_convex_forward, "log_linear": _log_linear_forward}


# ---- bootstrap --------------------------------------------------------------------------------------

def _node_times(instruments: ParInstruments) -> np.ndarray:
    return np.concatenate([[0.0], instruments.maturity_times])


def _solve_nodes(method: str, instruments: ParInstruments, par_yields: np.ndarray) -> np.ndarray:
    """F at the nodes (S, n+1) that prices every par instrument at par.

    Newton's method with a finite-difference Jacobian, all scenarios at once; a scenario whose
    pricing error does not fall takes half the step (up to ``_HALVINGS`` times), since the
    monotone convex shape is only piecewise smooth in the node values.
    """
    integral = _INTEGRAL[method]
    node_times = _node_times(instruments)
    flows = instruments.cash_flows(par_yields)                          # (S, n, m)

    def integrated(u):                                                  # (B, n) -> (B, m)
        return integral(node_times, np.pad(u, ((0, 0), (1, 0))), instruments.times)

    def pricing_error(F):                                               # (S, m) -> (S, n)
        return np.einsum("sjm,sm->sj", flows, np.exp(-F)) - 1.0

    tau = instruments.maturity_times
    bill = instruments.is_bill
    u = np.where(bill, np.log1p(np.where(bill, par_yields * tau, 0.0)), 2.0 * np.log1p(par_yields / 2.0) * tau)
    s, n = u.shape
    bumps = np.vstack([np.zeros(n), _BUMP * np.eye(n)])                 # (n+1, n)
    with np.errstate(all="ignore"):                                     # trial steps may overflow
        for _ in range(_MAX_ITERATIONS):
            F = integrated((u[:, None, :] + bumps[None]).reshape(s * (n + 1), n)).reshape(s, n + 1, -1)
            residual = pricing_error(F[:, 0])
            error = np.max(np.abs(residual), axis=1)
            if np.all(error <= _TOLERANCE):
                return np.pad(u, ((0, 0), (1, 0)))
            sensitivity = (F[:, 1:] - F[:, :1]) / _BUMP                 # (S, n, m): dF(t_m)/du_k
            jacobian = -np.einsum("sjm,sm,skm->sjk", flows, np.exp(-F[:, 0]), sensitivity)
            try:
                step = np.linalg.solve(jacobian, residual[..., None])[..., 0]
            except np.linalg.LinAlgError:
                break
            scale = np.ones(s)
            for _ in range(_HALVINGS):
                trial = u - scale[:, None] * step
                worse = (error > _TOLERANCE) & ~(np.max(np.abs(pricing_error(integrated(trial))), axis=1) < error)
                if not worse.any():
                    break
                scale = np.where(worse, scale / 2, scale)
            u = u - scale[:, None] * step
    worst = int(np.argmax(np.where(np.isnan(error), np.inf, error)))
    raise ValueError(f"no curve prices these par yields at par (scenario {worst + 1}: the bootstrap "
                     f"stopped at a pricing error of {error[worst]:.2e} per unit face); "
                     "par yields this far apart leave no positive discount factors")


def _check_method(method: str) -> None:
    if method not in METHODS:
        raise ValueError(f"unknown interpolation {method!r}; known: {', '.join(METHODS)}")


def bootstrap(par_curve: ParCurve, curve_date, method: str = "monotone_convex") -> "Curve":
    """The curve that prices every par instrument of ``par_curve`` at par on ``curve_date``."""
    return bootstrap_many(par_curve, curve_date, par_curve.par_yields[None, :], method)[0]


def bootstrap_many(par_curve: ParCurve, curve_date, par_yields, method: str = "monotone_convex") -> "CurveSet":
    """S curves at once: ``par_yields`` (S, n) decimals on ``par_curve``'s tenors (its yields unused)."""
    return _bootstrap_set(par_instruments(par_curve, curve_date), par_yields, method)


def _bootstrap_set(instruments: ParInstruments, par_yields, method: str) -> "CurveSet":
    _check_method(method)
    y = np.atleast_2d(np.asarray(par_yields, dtype=np.float64))
    if y.ndim != 2 or y.shape[1] != len(instruments.tenors) or not np.all(np.isfinite(y)):
        raise ValueError(f"par_yields must be finite, shape (scenarios, {len(instruments.tenors)}); got {y.shape}")
    return CurveSet(instruments, method, y, np.exp(-_solve_nodes(method, instruments, y)))


# ---- curves -----------------------------------------------------------------------------------------

class _CurveFunctions:
    """Curve functions shared by ``Curve`` and ``CurveSet``; all times are ACT/365F years, t >= 0."""

    instruments: ParInstruments
    method: str
    node_discount: np.ndarray

    def _take(self, values: np.ndarray) -> np.ndarray:
        return values

    @property
    def curve_date(self) -> np.datetime64:
        return self.instruments.curve_date

    @property
    def node_times(self) -> np.ndarray:
        """Node times (n+1,): 0 and each par instrument's maturity, ACT/365F years."""
        return _node_times(self.instruments)

    def _evaluate(self, functions: dict[str, _Interpolator], t) -> np.ndarray:
        t = np.asarray(t, dtype=np.float64)
        if np.any(t < 0):
            raise ValueError("curve times must be on or after the curve date (t >= 0)")
        F = -np.log(np.atleast_2d(self.node_discount))
        return functions[self.method](self.node_times, F, t.ravel()).reshape((-1,) + t.shape)

    def years(self, dates) -> np.ndarray:
        """ACT/365F years from the curve date to ``dates`` (NaN where NaT)."""
        return _years_from(self.curve_date, to_days(dates))

    def discount(self, t) -> np.ndarray:
        """Discount factors at times ``t`` (any shape; NaN stays NaN)."""
        return self._take(np.exp(-self._evaluate(_INTEGRAL, t)))

    def discount_on(self, dates) -> np.ndarray:
        """Discount factors on ``dates`` (datetime64[D], any shape; NaT gives NaN)."""
        return self.discount(self.years(dates))

    def zero_rate(self, t, compounding: str = "continuous") -> np.ndarray:
        """Zero rate to ``t``: ``"continuous"`` (DF = e^(-z t)) or ``"semiannual"`` (DF = (1 + z/2)^(-2t)).

        At t = 0 the continuous zero rate is its limit, the instantaneous forward at 0.
        """
        t = np.asarray(t, dtype=np.float64)
        integral = self._evaluate(_INTEGRAL, t)
        with np.errstate(divide="ignore", invalid="ignore"):
            z = np.where(t > 0, integral / t, self._evaluate(_FORWARD, t))
        if compounding == "continuous":
            return self._take(z)
        if compounding == "semiannual":
            return self._take(2.0 * np.expm1(z / 2.0))
        raise ValueError(f"unknown compounding {compounding!r}; use 'continuous' or 'semiannual'")

    def forward_rate(self, t1, t2) -> np.ndarray:
        """Continuously compounded forward rate from ``t1`` to ``t2`` (broadcast; needs t2 > t1)."""
        t1, t2 = np.broadcast_arrays(np.asarray(t1, dtype=np.float64), np.asarray(t2, dtype=np.float64))
        if np.any(t2 <= t1):
            raise ValueError("forward_rate needs t2 > t1")
        return self._take((self._evaluate(_INTEGRAL, t2) - self._evaluate(_INTEGRAL, t1)) / (t2 - t1))

    def instantaneous_forward(self, t) -> np.ndarray:
        """Instantaneous forward rate f(t), continuously compounded (left limit at a node)."""
        return self._take(self._evaluate(_FORWARD, t))


@dataclass(frozen=True, eq=False)
class CurveSet(_CurveFunctions):
    """S curves on the same tenors and curve date (scenarios). Every function returns (S,) + shape(t).

    ``par_yields`` (S, n) decimals; ``node_discount`` (S, n+1) discount factors at ``node_times``.
    """

    instruments: ParInstruments
    method: str
    par_yields: np.ndarray
    node_discount: np.ndarray

    def __len__(self) -> int:
        return len(self.par_yields)

    def __getitem__(self, s: int) -> "Curve":
        return Curve(self.instruments, self.method, ParCurve(self.instruments.tenors, self.par_yields[s]),
                     self.node_discount[s])


@dataclass(frozen=True, eq=False)
class Curve(_CurveFunctions):
    """One bootstrapped curve. ``node_discount`` (n+1,): DF at ``node_times`` (1 at t = 0)."""

    instruments: ParInstruments
    method: str
    par_curve: ParCurve
    node_discount: np.ndarray

    def _take(self, values: np.ndarray) -> np.ndarray:
        return values[0]

    def shifted(self, shift_bp) -> "Curve":
        """The curve rebuilt from par yields moved by ``shift_bp`` (scalar or (n,), basis points)."""
        return self.shifted_many(np.broadcast_to(np.asarray(shift_bp, dtype=np.float64),
                                                 (1, len(self.par_curve))))[0]

    def shifted_many(self, shifts_bp) -> CurveSet:
        """Curves rebuilt from par yields moved by each row of ``shifts_bp`` (S, n), basis points."""
        shifts = np.atleast_2d(np.asarray(shifts_bp, dtype=np.float64))
        return _bootstrap_set(self.instruments, self.par_curve.par_yields + shifts / 1e4, self.method)
