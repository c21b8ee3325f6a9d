"""Exact revaluation under rate scenarios, beside the duration and duration-plus-convexity estimates.

Units: money in currency units; shifts are decimals inside (1 bp = 0.0001), one per curve tenor;
durations in years, convexities in years^2. Arrays: n holdings, S scenarios, K curve tenors.

Estimates of a holding's change in value V under a scenario (docs/methods.md, "Rate scenarios"):
- parallel move of every par yield by dy: the second-order Taylor expansion of price in the rate,
  dP/P ~ -D dy + C dy^2 / 2, with the effective duration D and effective convexity C (the
  textbook estimate, e.g. F. J. Fabozzi, Bond Markets, Analysis, and Strategies, chapter on
  duration and convexity; cited from memory):
  duration only ``-V D dy``; duration plus convexity ``-V D dy + V C dy^2 / 2``;
- any other move, dy_k at tenor k: the first-order term is the key-rate expansion
  ``-V sum_k KRD_k dy_k`` (every scenario is a combination of the key-rate bumps on the curve's own
  tenor grid, so where the price is smooth in the par yields this is its first-order term); the
  convexity term is ``V C e^2 / 2`` on the
  holding's exposure-weighted shift ``e = sum_k |KRD_k| dy_k / sum_k |KRD_k|``, which is dy for a
  parallel move. That takes the holding's convexity across tenors as C w w' with w its duration
  weights: exact for a parallel move and for a holding whose rate risk sits at one tenor.
- a move ds of the holding's spread (a credit scenario, alone or with a rate move) adds
  ``-V SD ds`` to the duration estimate and ``-V SD ds + V SC ds^2 / 2`` to the duration-plus-
  convexity estimate, with the spread duration SD and spread convexity SC (``ladder.risk.credit``);
  the cross term of rate and spread moves is left out.
Errors are estimate minus exact: positive when the estimate overstates the value.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


def key_rate_durations(base, down, up, shift: float) -> np.ndarray:
    """Key-rate durations (n, K), years, from prices per 100 under cumulative key-rate bumps.

    ``base`` (n,) on the base curve; ``down`` and ``up`` (K, n) with the par yields of the first
    k + 1 tenors (row k) moved by -``shift`` and +``shift`` (decimal), each by its triangular bump.
    With D_k = (P_down_k - P_up_k) / (2 P shift), the duration of the curve moved up to tenor k,
    KRD_k = D_k - D_(k-1) (D_(-1) = 0): the sum is D_(K-1), the duration of the parallel move, by
    construction. 0 where P is 0.
    """
    base = np.asarray(base, dtype=np.float64)
    with np.errstate(invalid="ignore", divide="ignore"):
        cumulative = (np.asarray(down) - np.asarray(up)) / (2.0 * base * shift)
    cumulative = np.where(base != 0, cumulative, 0.0)
    return np.diff(cumulative, axis=0, prepend=0.0).T


def exposure_weighted_shifts(krd, tenor_shifts) -> np.ndarray:
    """Each holding's average tenor shift weighted by |KRD| (S, n), decimal; 0 with no rate exposure.

    ``krd`` (n, K) years; ``tenor_shifts`` (S, K) decimal. Equals dy for a parallel move dy.
    """
    weight = np.abs(np.asarray(krd, dtype=np.float64))
    total = weight.sum(axis=1)
    shifts = np.asarray(tenor_shifts, dtype=np.float64) @ weight.T
    return np.divide(shifts, total, out=np.zeros_like(shifts), where=total > 0)


def is_parallel(tenor_shifts) -> np.ndarray:
    """Scenarios (S,) that move every tenor by the same amount."""
    shifts = np.atleast_2d(tenor_shifts)
    return np.all(shifts == shifts[:, :1], axis=1)


def estimated_changes(base_value, duration, convexity, krd, tenor_shifts, spread_duration=None,
                      spread_convexity=None, spread_shifts=None) -> tuple[np.ndarray, np.ndarray]:
    """(duration-only, duration-plus-convexity) estimated changes in value, (S, n) each.

    ``base_value`` (n,) currency; ``duration``, ``convexity`` (n,) effective; ``krd`` (n, K);
    ``tenor_shifts`` (S, K) decimal. Parallel scenarios use D dy, the others the key-rate sum
    (module docstring); both add C e^2 / 2 on the exposure-weighted shift e. With
    ``spread_shifts`` (S, n) decimal, the spread terms with ``spread_duration`` and
    ``spread_convexity`` (n,) are added.
    """
    base_value = np.asarray(base_value, dtype=np.float64)
    tenor_shifts = np.atleast_2d(np.asarray(tenor_shifts, dtype=np.float64))
    parallel = is_parallel(tenor_shifts)[:, None]
    key_rate = tenor_shifts @ np.asarray(krd, dtype=np.float64).T                 # (S, n)
    first = -base_value * np.where(parallel, duration * tenor_shifts[:, :1], key_rate)
    shift = np.where(parallel, tenor_shifts[:, :1], exposure_weighted_shifts(krd, tenor_shifts))
    second = first + 0.5 * base_value * convexity * shift**2
    if spread_shifts is None:
        return first, second
    ds = np.asarray(spread_shifts, dtype=np.float64)
    spread_first = -base_value * spread_duration * ds
    return first + spread_first, second + spread_first + 0.5 * base_value * spread_convexity * ds**2


class _EstimateErrors:
    """Error of each estimate against the exact ``value`` (estimate - exact), same shape as ``value``."""

    value: np.ndarray
    est_duration: np.ndarray
    est_duration_convexity: np.ndarray

    @property
    def error_duration(self) -> np.ndarray:
        return self.est_duration - self.value

    @property
    def error_duration_convexity(self) -> np.ndarray:
        return self.est_duration_convexity - self.value


@dataclass(frozen=True, eq=False)
class ScenarioTotals(_EstimateErrors):
    """Sums over holdings, per group: ``base`` (G,); ``value`` and the two estimates (G, S), currency."""

    groups: tuple[str, ...]
    base: np.ndarray
    value: np.ndarray
    est_duration: np.ndarray
    est_duration_convexity: np.ndarray

    @property
    def change(self) -> np.ndarray:
        return self.value - self.base[:, None]

    @property
    def relative_change(self) -> np.ndarray:
        """Change as a fraction of the base value (decimal); NaN for an empty group."""
        with np.errstate(invalid="ignore", divide="ignore"):
            return np.where(self.base[:, None] != 0, self.change / self.base[:, None], np.nan)


@dataclass(frozen=True, eq=False)
class Revaluation(_EstimateErrors):
    """Every holding's exact value under every scenario beside its estimates, currency units.

    ``base`` (n,); ``value``, ``est_duration``, ``est_duration_convexity`` (S, n).
    """

    base: np.ndarray
    value: np.ndarray
    est_duration: np.ndarray
    est_duration_convexity: np.ndarray

    @property
    def change(self) -> np.ndarray:
        return self.value - self.base

    def totals(self, index=None, groups: tuple[str, ...] = ("portfolio",)) -> ScenarioTotals:
        """Sums by group: ``index`` (n,) int into ``groups`` (default: one group, every holding)."""
        n = len(self.base)
        index = np.zeros(n, dtype=np.int64) if index is None else np.asarray(index, dtype=np.int64)
        one_hot = np.zeros((len(groups), n))
        one_hot[index, np.arange(n)] = 1.0
        return ScenarioTotals(groups, one_hot @ self.base, one_hot @ self.value.T, one_hot @ self.est_duration.T,
                              one_hot @ self.est_duration_convexity.T)


def revalue(base_value, base_price, prices, face, duration, convexity, krd, tenor_shifts, spread_duration=None,
            spread_convexity=None, spread_shifts=None) -> Revaluation:
    """The Revaluation of n holdings from their repriced dirty prices per 100.

    ``base_value`` (n,) market value; ``base_price`` (n,) the engine's price on the base curve;
    ``prices`` (S, n) on the scenario curves (at the scenarios' spreads); ``face`` (n,) currency. The
    exact value is the base value plus the engine's change in price, so a zero move changes nothing.
    The spread arguments are those of ``estimated_changes``.
    """
    base_value = np.asarray(base_value, dtype=np.float64)
    value = base_value + (np.asarray(prices) - base_price) * (np.asarray(face, dtype=np.float64) / 100.0)
    first, second = estimated_changes(base_value, duration, convexity, krd, tenor_shifts, spread_duration,
                                      spread_convexity, spread_shifts)
    return Revaluation(base_value, value, base_value + first, base_value + second)
