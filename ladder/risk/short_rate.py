"""Hull-White one-factor short-rate paths fitted exactly to today's curve, simulated without a time step.

Model (D. Brigo and F. Mercurio, *Interest Rate Models: Theory and Practice*, 2nd ed., 2006, ch. 3,
sec. 3.3, the G1++ form of Hull-White): under the risk-neutral measure
  r(t) = x(t) + phi(t),   dx = -a x dt + sigma dW,   x(0) = 0,
  phi(t) = f(0, t) + sigma^2 / (2 a^2) (1 - e^{-a t})^2,
with f(0, t) today's instantaneous forward, so that every discount factor of today's curve is
reproduced exactly. Moments of the short rate (their eq. 3.37 in this notation):
  E r(t) = phi(t),   Var r(t) = sigma^2 / (2a) (1 - e^{-2 a t}).
Zero-coupon bond prices in closed form (their sec. 3.3.2, eq. 3.39 with V below):
  P(t, T) = P(0, T) / P(0, t) exp(1/2 [V(t, T) - V(0, T) + V(0, t)] - B(t, T) x(t)),
  B(t, T) = (1 - e^{-a (T - t)}) / a,
  V(t, T) = sigma^2 / a^3 g(a (T - t)),   g(u) = u + 2 e^{-u} - e^{-2u} / 2 - 3/2.
Simulation: from one date t to the next, h = t' - t years, the state moves by its exact Gaussian
transition jointly with I(t) = int_0^t x(u) du (P. Glasserman, *Monte Carlo Methods in Financial
Engineering*, 2004, sec. 3.3.2, there for the Vasicek model; the same for x):
  x(t') = x(t) e^{-a h} + e1,   I(t') = I(t) + x(t) B(h) + e2,
  Var e1 = sigma^2 (1 - e^{-2 a h}) / (2a),   Var e2 = sigma^2 / a^3 g(a h),
  Cov(e1, e2) = sigma^2 B(h)^2 / 2.
The money-market account's discount to t along a path is exp(-int_0^t phi - I(t)), with
int_0^t phi = -ln P(0, t) + V(0, t) / 2. Normals come from ``numpy.random.default_rng(seed)``;
antithetic: the second half of the paths uses the first half's normals negated.
Times are ACT/365F years from the curve date (``ladder.pricing.curve``). For small a u the function
g is summed as its power series (g(u) = sum_{n>=3} (-1)^n (2 - 2^{n-1}) u^n / n!), where the closed
form would cancel.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ladder.pricing.curve import Curve

_SERIES_BELOW = 0.5
_SERIES_TERMS = np.arange(3, 24)
_SERIES_COEF = np.array([(-1.0) ** n * (2.0 - 2.0 ** (n - 1)) / math.factorial(n) for n in _SERIES_TERMS])


def _g(u) -> np.ndarray:
    """g(u) = u + 2 e^{-u} - e^{-2u}/2 - 3/2 (see the module docstring), u >= 0."""
    u = np.asarray(u, dtype=np.float64)
    out = u + 2.0 * np.exp(-u) - 0.5 * np.exp(-2.0 * u) - 1.5
    small = np.abs(u) < _SERIES_BELOW
    if small.any():
        out = np.array(out, copy=True)
        out[small] = (_SERIES_COEF * u[small][:, None] ** _SERIES_TERMS).sum(axis=-1)
    return out


@dataclass(frozen=True)
class HullWhite:
    """Mean reversion ``a`` (per year, > 0) and absolute volatility ``sigma`` (decimal a year, >= 0)."""

    a: float
    sigma: float

    def B(self, tau) -> np.ndarray:
        """B over ``tau`` years: (1 - e^{-a tau}) / a."""
        return -np.expm1(-self.a * np.asarray(tau, dtype=np.float64)) / self.a

    def V(self, tau) -> np.ndarray:
        """V over ``tau`` years: sigma^2 / a^3 g(a tau)."""
        return self.sigma ** 2 / self.a ** 3 * _g(self.a * np.asarray(tau, dtype=np.float64))

    def short_rate_mean(self, curve: Curve, t) -> np.ndarray:
        """E r(t) = phi(t), decimal, ``t`` years."""
        t = np.asarray(t, dtype=np.float64)
        return curve.instantaneous_forward(t) + 0.5 * self.sigma ** 2 * self.B(t) ** 2

    def short_rate_variance(self, t) -> np.ndarray:
        """Var r(t) = sigma^2 (1 - e^{-2 a t}) / (2a)."""
        return self.sigma ** 2 * -np.expm1(-2.0 * self.a * np.asarray(t, dtype=np.float64)) / (2.0 * self.a)


@dataclass(frozen=True, eq=False)
class ShortRatePaths:
    """Simulated states: ``times`` (K,) years (the first 0, the curve date); ``x`` and ``integral``
    (N, K): x(t_k) and I(t_k) on each path."""

    model: HullWhite
    curve: Curve
    times: np.ndarray
    x: np.ndarray
    integral: np.ndarray

    def __len__(self) -> int:
        return self.x.shape[0]

    def short_rate(self) -> np.ndarray:
        """r(t_k) on each path (N, K), decimal."""
        return self.x + self.model.short_rate_mean(self.curve, self.times)[None, :]

    def deflator(self) -> np.ndarray:
        """The money-market account's discount to each t_k on each path (N, K)."""
        t = self.times
        phi_integral = -np.log(self.curve.discount(t)) + 0.5 * self.model.V(t)
        return np.exp(-phi_integral[None, :] - self.integral)

    def bond(self, k: int, maturity) -> np.ndarray:
        """P(t_k, T) on each path for each ``maturity`` T (years >= t_k): (N, len(T))."""
        T = np.atleast_1d(np.asarray(maturity, dtype=np.float64))
        return log_bond_ratio(self.model, self.curve, self.times[k], self.x[:, k, None], self.times[k], T[None, :],
                              exp=True)

    def take(self, rows) -> "ShortRatePaths":
        return ShortRatePaths(self.model, self.curve, self.times, self.x[rows], self.integral[rows])


def log_bond_ratio(model: HullWhite, curve: Curve, t, x, s, T, exp: bool = False) -> np.ndarray:
    """ln [P(t, T) / P(t, s)] seen at time ``t`` with state ``x`` (t <= s <= T, years; broadcast
    together), from the closed form of the module docstring; ``exp`` returns the ratio itself."""
    t, s, T = (np.asarray(v, dtype=np.float64) for v in (t, s, T))
    out = (np.log(curve.discount(T)) - np.log(curve.discount(s))
           + 0.5 * (model.V(T - t) - model.V(T) - model.V(s - t) + model.V(s))
           - (model.B(T - t) - model.B(s - t)) * x)
    return np.exp(out) if exp else out


def simulate(model: HullWhite, curve: Curve, times, paths: int, seed: int) -> ShortRatePaths:
    """``paths`` (even) antithetic paths of (x, I) at ``times`` (increasing years, the first >= 0; a
    first time 0 is added when missing) from ``seed``; see the module docstring."""
    times = np.asarray(times, dtype=np.float64)
    if times[0] > 0:
        times = np.concatenate([[0.0], times])
    if paths % 2:
        raise ValueError("antithetic paths come in pairs: give an even number of paths")
    rng = np.random.default_rng(seed)
    half = paths // 2
    z = rng.standard_normal((half, len(times) - 1, 2))
    z = np.concatenate([z, -z])
    x = np.zeros((paths, len(times)))
    integral = np.zeros((paths, len(times)))
    a, sigma = model.a, model.sigma
    for k, h in enumerate(np.diff(times)):
        v1 = sigma ** 2 * -np.expm1(-2.0 * a * h) / (2.0 * a)
        v2 = float(model.V(h))
        c = 0.5 * sigma ** 2 * float(model.B(h)) ** 2
        s1 = math.sqrt(v1)
        e1 = s1 * z[:, k, 0]
        rest = v2 - (c * c / v1 if v1 > 0 else 0.0)
        e2 = (c / s1 if s1 > 0 else 0.0) * z[:, k, 0] + math.sqrt(max(rest, 0.0)) * z[:, k, 1]
        x[:, k + 1] = x[:, k] * math.exp(-a * h) + e1
        integral[:, k + 1] = integral[:, k] + x[:, k] * float(model.B(h)) + e2
    return ShortRatePaths(model, curve, times, x, integral)
