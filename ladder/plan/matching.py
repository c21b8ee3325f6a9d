"""The ``match_needs`` reinvestment: a linear program solved at each period's end (rolling horizon).

At the end of period p the cash C above the buffer is placed among the menu's tenors
(``ladder.plan.menu``). Variables: x_j >= 0, the amount bought of tenor j (at 100, so face = cost),
and a slack for each soft row. The book is followed over the later periods q of the plan, with
e_q the days from now to q's end, k = C - sum x the cash kept and
  cash_q = C - sum_j x_j + B_q + sum_j x_j a_jq,
where a_jq is what one unit of tenor j has paid back by q (coupons and principal), and B_q the cash
the book already expects by q less the needs by q; T_q = T + (coupons expected by q) - (needs by q)
is the book's value then (price moves left out). Rows (all linear in x):
- budget: sum x <= C - buffer (hard);
- purchase-time limits at p, as in the ladder builder (``ladder.build.program``): the bought
  sector's share, sum x + S <= cap T (hard);
- coverage, each q: cash_q >= buffer + ``COVER_MARGIN`` (soft, ``PENALTY``): the needs the ladder
  does not cover;
- the policy's limits on the book at each q (soft, ``LIMIT_PENALTY``): each liquidity floor
  (pct % within d days) cash_q + sum of x_j repaid within (q, q + d] + M_qd >= pct T_q, with M_qd what
  the book already has maturing then; the weighted average maturity
  sum_i v_i (d_i - e_q)^+ + cash_q + sum_j x_j (days_j - e_q)^+ <= W T_q (cash at 1 day); the average
  effective duration, aged the same way in years; the fund cap k <= cap T now (later cash is placed by
  later purchases, so the cap is not imposed on it here). Holdings age by the elapsed days and keep
  today's values v_i.
Objective (maximize): sum_j x_j (y_j - r_fund + bonus_j) less the slacks' penalties: income a year
over keeping the cash in the fund, with ``LONG_BONUS`` a unit for the long-end tenor so that money no
need claims goes to the ladder's long end (a lexicographic order: cover the needs, keep the policy,
then lengthen, then earn); an uncovered need or a crossed limit costs far more than any income, so the
plan never buys past a need it could otherwise meet. Linear programming with HiGHS through
``scipy.optimize.linprog`` (Huangfu and Hall, "Parallelizing the dual revised simplex method",
Math. Prog. Comp. 10, 2018). Amounts are solved in millions so that the rows are of unit size.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.optimize import linprog

SCALE = 1e6
LONG_BONUS = 1.0
PENALTY = 1000.0
LIMIT_PENALTY = 100.0
MARGIN = 1e-5           # limits kept this share of the book inside (the checker grades the same book)
COVER_MARGIN = 1.0      # currency: needs covered with this to spare (the solver's tolerances are ~0.1 of it)


@dataclass(frozen=True, eq=False)
class Outlook:
    """The book over the later periods (H,) as it stands before this period's purchase, currency.

    ``base``: B_q; ``total``: T_q; ``elapsed``: e_q days; ``maturing``: (floors, H) M_qd; ``wam``:
    sum_i v_i (d_i - e_q)^+; ``duration``: sum_i v_i (D_i - e_q / 365)^+."""

    base: np.ndarray
    total: np.ndarray
    elapsed: np.ndarray
    maturing: np.ndarray
    wam: np.ndarray
    duration: np.ndarray


@dataclass(frozen=True)
class PolicyLimits:
    """The purchase-time limits the plan keeps, from the policy (None: not set). ``floors``:
    (within days, min pct) liquidity floors; ``sector_cap_pct``: the bought sector's cap; WAM in days,
    duration in years, the fund cap in percent."""

    floors: tuple[tuple[int, float], ...] = ()
    sector_cap_pct: float | None = None
    wam_days: float | None = None
    duration_years: float | None = None
    fund_cap_pct: float | None = None


@dataclass(frozen=True, eq=False)
class Tenors:
    """The menu at this period's end (J,): ``y`` yields, ``days`` to maturity, ``duration`` years,
    ``back`` (J, H) paid back by each later period, ``repaid`` (J, H) days from now to repayment,
    ``long_end`` the long-end index (-1 none)."""

    y: np.ndarray
    days: np.ndarray
    duration: np.ndarray
    back: np.ndarray
    long_end: int


def place(cash: float, buffer: float, fund_rate: float, menu: Tenors, book: Outlook, policy: PolicyLimits,
          sector_room: float | None) -> np.ndarray:
    """Amounts to buy of each tenor (J,), currency units, with ``sector_room`` the bought sector's room
    now (None: no cap); see the module docstring."""
    J, H = menu.back.shape
    spare = cash - buffer
    if J == 0 or spare <= 0:
        return np.zeros(J)
    hard_a, hard_b, soft_a, soft_b, soft_c = [], [], [], [], []

    def soft(coef, rhs, penalty):
        soft_a.append(coef)
        soft_b.append(rhs)
        soft_c.append(np.full(len(rhs), penalty))

    # cash_q = C + B_q + sum_j x_j (a_jq - 1): the coefficients of x in cash_q, (H, J)
    in_cash = (menu.back - 1.0).T
    cash_q = cash + book.base
    soft(-in_cash, cash_q - buffer - COVER_MARGIN, PENALTY)           # cash_q >= buffer
    hard_a.append(np.ones((1, J)))
    hard_b.append([spare])
    if sector_room is not None:
        hard_a.append(np.ones((1, J)))
        hard_b.append([max(sector_room, 0.0)])
    margin = MARGIN * book.total
    for (within, pct), maturing in zip(policy.floors, book.maturing):
        # repaid within (q, q + d]: the tenor's days to repayment in (e_q, e_q + d]
        liquid = ((menu.days[None, :] > book.elapsed[:, None])
                  & (menu.days[None, :] <= book.elapsed[:, None] + within)).astype(float)
        soft(-(in_cash + liquid), cash_q + maturing - pct / 100.0 * book.total - margin, LIMIT_PENALTY)
    if policy.wam_days is not None:
        left = np.maximum(menu.days[None, :] - book.elapsed[:, None], 0.0)
        soft(left + in_cash, policy.wam_days * book.total - book.wam - cash_q - margin * policy.wam_days, LIMIT_PENALTY)
    if policy.duration_years is not None:
        left = np.maximum(menu.duration[None, :] - book.elapsed[:, None] / 365.0, 0.0)
        soft(left, policy.duration_years * book.total - book.duration - margin * policy.duration_years,
             LIMIT_PENALTY)
    if policy.fund_cap_pct is not None:                               # now only: later purchases place later cash
        soft(in_cash[:1], policy.fund_cap_pct / 100.0 * book.total[:1] - cash_q[:1] - margin[:1], LIMIT_PENALTY)
    A_soft, b_soft, c_soft = np.vstack(soft_a), np.concatenate(soft_b), np.concatenate(soft_c)
    m = len(b_soft)
    A_hard = np.vstack(hard_a)
    A = np.block([[A_hard, np.zeros((len(A_hard), m))], [A_soft, -np.eye(m)]])
    b = np.concatenate([np.concatenate(hard_b), b_soft]) / SCALE
    c = np.concatenate([-(menu.y - fund_rate), c_soft])
    if menu.long_end >= 0:
        c[menu.long_end] -= LONG_BONUS
    result = linprog(c, A_ub=A, b_ub=b, bounds=(0, None), method="highs")
    if result.status != 0:
        return np.zeros(J)
    return np.maximum(result.x[:J], 0.0) * SCALE
