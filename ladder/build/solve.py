"""Solving the builder's program with HiGHS, and explaining the answer.

- ``solve``: the mixed-integer program, to a relative gap of ``MIP_GAP``, through HiGHS's own Python
  interface (``highspy``), which reports each better plan found while it runs and can be stopped: a
  ``watch`` callback hears the elapsed time, the best plan's income and its proven gap; a ``stop``
  flag ends the search with the best plan found so far (marked as not proven optimal).
  A semi-continuous or semi-integer variable (a fund: 0 or lb <= x <= ub) is given to the solver as
  x with a binary z beside it, lb z <= x <= ub z (``indicator_form``, the textbook form): HiGHS stops
  with a solve error on its own semi-variable types at a fund's upper bound (hundreds of millions).
- ``semi_milp``: the same through ``scipy.optimize.milp``, for the diagnosis's program.
- ``relaxation``: the linear relaxation (``scipy.optimize.linprog``, method "highs"): lots may be
  fractional and a semi-integer lot count may take any value from 0 to its maximum. Its dual values
  (``marginals``) say how much income a year one more unit of each row's right-hand side would
  buy; with the row's sensitivity to its limit they price each binding limit (the linear
  programming duality theorem; e.g. Chvatal, "Linear Programming", 1983, ch. 5 and 10). They are the
  relaxation's, so the figures for the integer program are approximate.
- ``diagnose``: when no ladder exists, every row but the budget gets a slack variable in the limit's
  own unit, penalised by its size relative to the limit; the mixed-integer program that minimizes the
  sum of relative slacks is always feasible and names the smallest relaxation, grouped by rule.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, replace
from typing import Callable

import numpy as np
from scipy import sparse

from ladder.build.program import BUDGET, SENS_BUYS, SENS_ONE, Program
from ladder.build.quiet import solver_output_filtered

MIP_GAP = 1e-6             # relative optimality gap of the integer program
TIME_LIMIT_S = 120.0
DIAGNOSE_GAP = 1e-4
DIAGNOSE_TIME_LIMIT_S = 30.0
WATCH_EVERY_S = 0.25       # seconds between two calls of ``watch`` (and two looks at ``stop``)
_BINDING_DUAL = 1e-9


@dataclass(frozen=True, eq=False)
class Solution:
    """``status``: "optimal" (proven to ``MIP_GAP``), "stopped" (by the ``stop`` flag), "time_limit",
    "infeasible" or "error". A stopped or timed-out search keeps its best plan in ``x`` (None if it had
    found none) and ``gap``, the relative gap to the proven bound on income."""

    status: str
    x: np.ndarray | None  # variable values (lots rounded to integers)
    income: float         # objective, currency a year
    message: str
    seconds: float
    gap: float | None = None

    @property
    def proven_optimal(self) -> bool:
        return self.status == "optimal"


@dataclass(frozen=True)
class SolveProgress:
    """Where a running search stands: ``income`` of the best plan so far (currency a year; None before
    the first), ``bound`` the most any plan can earn as proven so far, ``gap`` (bound - income) / income
    (None before the first plan)."""

    seconds: float
    income: float | None
    bound: float | None
    gap: float | None


Watch = Callable[[SolveProgress], None]


def _row_scale(p: Program) -> np.ndarray:
    """Each row divided by its largest coefficient (HiGHS works best with rows of unit size)."""
    size = np.abs(p.A).max(axis=1) if p.A.size else np.ones(0)
    return np.where(size > 0, size, 1.0)


def _row_bounds(p: Program, b: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Lower and upper bounds of the rows ``A x <= b`` (``== b`` where ``p.eq``)."""
    return np.where(p.eq, b, -np.inf), b


def indicator_form(c, integrality, lb, ub, A, row_lower, row_upper) -> tuple:
    """The program with each semi-variable (integrality 2, 3) as x with a binary z beside it,
    lb z <= x <= ub z (module docstring): (c, integrality, lb, ub, A as CSR, row_lower, row_upper),
    the indicators after the original columns."""
    A = sparse.csr_matrix(A)
    semi = np.flatnonzero(integrality >= 2)
    k, m = len(c), len(semi)
    if not m:
        return c, integrality, lb, ub, A, row_lower, row_upper
    scale = np.maximum(ub[semi], 1.0)
    pick = np.zeros((2 * m, k + m))
    pick[np.arange(m), semi] = 1.0 / scale                  # x / ub - z <= 0
    pick[np.arange(m), k + np.arange(m)] = -ub[semi] / scale
    pick[m + np.arange(m), semi] = -1.0 / scale              # -x / ub + (lb / ub) z <= 0
    pick[m + np.arange(m), k + np.arange(m)] = lb[semi] / scale
    A = sparse.vstack([sparse.hstack([A, sparse.csr_matrix((A.shape[0], m))]), sparse.csr_matrix(pick)]).tocsr()
    return (np.concatenate([c, np.zeros(m)]),
            np.concatenate([np.where(integrality == 3, 1, np.where(integrality == 2, 0, integrality)),
                            np.ones(m, np.int64)]),
            np.concatenate([np.where(np.isin(np.arange(k), semi), 0.0, lb), np.zeros(m)]),
            np.concatenate([ub, np.ones(m)]), A,
            np.concatenate([row_lower, np.full(2 * m, -np.inf)]), np.concatenate([row_upper, np.zeros(2 * m)]))


def semi_milp(c, integrality, lb, ub, A, row_lower, row_upper, options):
    """``scipy.optimize.milp`` with the semi-variables in the indicator form; returns the result with
    the indicators dropped from ``x``."""
    from scipy.optimize import Bounds, LinearConstraint, milp

    c2, kind, lower, upper, A, row_lower, row_upper = indicator_form(c, integrality, lb, ub, A, row_lower, row_upper)
    res = milp(c2, integrality=kind, bounds=Bounds(lower, upper),
               constraints=LinearConstraint(A, row_lower, row_upper), options=options)
    if res.x is not None:
        res.x = res.x[:len(c)]
    return res


def _highs_model(p: Program):
    """``p`` as a HiGHS model minimizing -income, rows scaled to unit size, semi-variables in the
    indicator form (HiGHS refuses its own semi-continuous type above an upper bound far below a
    fund's), columns stored by column."""
    import highspy   # here, not at the top: the commands start without it

    scale = _row_scale(p)
    c, kind, lower, upper, A, row_lower, row_upper = indicator_form(
        -p.c, p.integrality, p.lb.astype(float), p.ub.astype(float), p.A / scale[:, None],
        *_row_bounds(p, p.b / scale))
    A = A.tocsc()
    lp = highspy.HighsLp()
    lp.num_col_, lp.num_row_ = len(c), A.shape[0]
    lp.col_cost_, lp.col_lower_, lp.col_upper_ = c, lower, upper
    lp.row_lower_, lp.row_upper_ = np.where(np.isinf(row_lower), -highspy.kHighsInf, row_lower), row_upper
    lp.a_matrix_.format_ = highspy.MatrixFormat.kColwise
    lp.a_matrix_.start_, lp.a_matrix_.index_, lp.a_matrix_.value_ = A.indptr, A.indices, A.data
    lp.integrality_ = [highspy.HighsVarType(int(k)) for k in kind]
    return lp


def _progress(data, seconds: float) -> SolveProgress:
    """A ``SolveProgress`` from HiGHS's callback data (its objective is -income)."""
    income, bound = -data.mip_primal_bound, -data.mip_dual_bound
    found = np.isfinite(income)
    return SolveProgress(seconds, float(income) if found else None, float(bound) if np.isfinite(bound) else None,
                         float(max(data.mip_gap, 0.0)) if found and np.isfinite(data.mip_gap) else None)


def solve(p: Program, time_limit: float = TIME_LIMIT_S, watch: Watch | None = None,
          stop: Callable[[], bool] | None = None) -> Solution:
    """The mixed-integer optimum of ``p``, or the best plan found when the search is stopped.

    HiGHS searches in a thread of its own; the calling thread calls ``watch`` with a ``SolveProgress``
    every ``WATCH_EVERY_S`` seconds and polls ``stop``; when ``stop()`` turns true, or ctrl+c
    (KeyboardInterrupt) reaches the calling thread, the search ends at HiGHS's next check (a fraction
    of a second to a few seconds) and the best plan so far is returned with status "stopped". Rows
    are scaled to unit size; the objective is kept in currency a year (an objective scaled to tiny
    numbers falls under the solver's optimality tolerances and its search stalls)."""
    import threading

    import highspy

    start = time.perf_counter()
    stopping = threading.Event()
    latest = [SolveProgress(0.0, None, None, None)]

    def heard(event) -> None:   # in HiGHS's thread
        latest[0] = _progress(event.data_out, time.perf_counter() - start)
        if stopping.is_set() and event.data_in is not None:
            event.interrupt()

    with solver_output_filtered():
        h = highspy.Highs()
        h.setOptionValue("output_flag", False)
        h.passModel(_highs_model(p))
        for name, value in (("mip_rel_gap", MIP_GAP), ("time_limit", float(time_limit)), ("presolve", "on")):
            h.setOptionValue(name, value)
        h.cbMipImprovingSolution.subscribe(heard)
        h.cbMipInterrupt.subscribe(heard)
        done = threading.Event()   # not Thread.join: a ctrl+c during join can mark a running thread as ended

        def search() -> None:
            try:
                h.run()
            finally:
                done.set()

        threading.Thread(target=search, name="ladder-build-solve", daemon=True).start()
        while not done.is_set():
            try:
                if done.wait(WATCH_EVERY_S):
                    break
                if stop is not None and stop():
                    stopping.set()
                if watch is not None:
                    watch(replace(latest[0], seconds=time.perf_counter() - start))
            except KeyboardInterrupt:
                stopping.set()
        model, info = h.getModelStatus(), h.getInfo()
        found = info.primal_solution_status == 2     # kSolutionStatusFeasible
        x = np.asarray(h.getSolution().col_value)[:len(p.c)] if found else None
    seconds = time.perf_counter() - start
    status = {highspy.HighsModelStatus.kOptimal: "optimal", highspy.HighsModelStatus.kInfeasible: "infeasible",
              highspy.HighsModelStatus.kTimeLimit: "time_limit",
              highspy.HighsModelStatus.kInterrupt: "stopped"}.get(model, "error")
    message = h.modelStatusToString(model)
    if x is None:
        return Solution(status, None, float("nan"), message, seconds)
    x = np.where(np.isin(p.integrality, (1, 3)), np.round(x), x)
    semi = p.integrality == 2                     # a fund the solver left at round-off above 0 is none
    x = _within_budget(p, np.where(semi & (x < 0.5 * p.lb), 0.0, x))
    return Solution(status, x, float(p.c @ x), message, seconds, float(max(info.mip_gap, 0.0)))


def _within_budget(p: Program, x: np.ndarray) -> np.ndarray:
    """``x`` with the buys that may take any amount (funds) cut by what the solver's feasibility
    tolerance overspent of the budget (a currency unit or so); a fund left under its minimum goes to 0."""
    row = p.A[np.flatnonzero(p.group == BUDGET)[0]]
    over = float(row @ x - p.b[p.group == BUDGET][0])
    x = x.copy()
    for j in np.flatnonzero((p.integrality % 2 == 0) & (p.var_sign > 0) & (x > 0) & (row > 0)):
        if over <= 0:
            break
        cut = min(x[j], over / row[j])
        x[j] -= cut
        over -= cut * row[j]
        if p.integrality[j] == 2 and x[j] < p.lb[j]:
            over -= x[j] * row[j]
            x[j] = 0.0
    return x


@dataclass(frozen=True, eq=False)
class Relaxation:
    status: str
    x: np.ndarray | None
    income: float
    duals: np.ndarray        # (m,) d income / d rhs of each row (>= 0 for a <= row that binds)
    bound_duals: np.ndarray  # (k,) d income / d upper bound of each variable
    seconds: float


def relaxation(p: Program) -> Relaxation:
    """The linear relaxation of ``p`` and its dual values (income a year per unit of right-hand side)."""
    from scipy.optimize import linprog

    scale = _row_scale(p)
    A, b = p.A / scale[:, None], p.b / scale
    ineq = ~p.eq
    start = time.perf_counter()
    with solver_output_filtered():
        res = linprog(-p.c, A_ub=A[ineq] if ineq.any() else None, b_ub=b[ineq] if ineq.any() else None,
                      A_eq=A[p.eq] if p.eq.any() else None, b_eq=b[p.eq] if p.eq.any() else None,
                      bounds=np.column_stack([np.zeros(len(p.c)), p.ub]), method="highs")
    seconds = time.perf_counter() - start
    m = len(p.b)
    if res.status != 0:
        return Relaxation("infeasible" if res.status == 2 else "error", None, float("nan"), np.zeros(m),
                          np.zeros(len(p.c)), seconds)
    duals = np.zeros(m)
    if ineq.any():
        duals[ineq] = -res.ineqlin.marginals / scale[ineq]
    if p.eq.any():
        duals[p.eq] = -res.eqlin.marginals / scale[p.eq]
    return Relaxation("optimal", res.x, float(-res.fun), duals, -res.upper.marginals, seconds)


@dataclass(frozen=True)
class Binding:
    """A limit the relaxation presses against, and about what moving it by one ``step`` is worth."""

    group: str
    label: str
    text: str
    limit: float
    unit: str
    step: float               # in the limit's unit
    income_per_step: float    # currency a year gained by relaxing the limit one step
    yield_bp_per_step: float  # the same as basis points of the portfolio's yield


STEP = {"pct": 1.0, "years": 0.1, "days": 30.0, "currency": 1_000_000.0, "buys_pct": 1.0, "face": 1_000_000.0}
OFFERED = "available face"


def _sensitivity(p: Program, r: Relaxation) -> np.ndarray:
    """d rhs / d limit of each row at the relaxation's solution (see ``ladder.build.program``)."""
    after = p.positions.mv @ p.face0 + p.cash
    buys = float((p.positions.mv[p.var_pos] * p.var_unit * r.x * p.buys).sum())
    return np.select([p.sens == SENS_ONE, p.sens == SENS_BUYS], [1.0, buys / 100.0], default=after)


def binding(p: Program, r: Relaxation, basis_total: float) -> tuple[Binding, ...]:
    """Rows whose dual value is non-zero, most valuable first; ``basis_total`` is the portfolio's value
    after the trades (currency) for converting income into basis points of yield."""
    if r.x is None:
        return ()
    sens = _sensitivity(p, r)
    # A cap moves its rhs by +sensitivity when raised (a floor, coverage: by -); direction is in the
    # sign of the dual, so the value of relaxing is |dual| x sensitivity per unit of limit.
    value = np.abs(r.duals) * sens
    out = []
    for i in np.argsort(-value):
        if value[i] <= _BINDING_DUAL * max(p.cash, 1.0) or p.group[i] == BUDGET:
            continue
        step = STEP[p.unit[i]]
        income = float(value[i] * step)
        out.append(Binding(str(p.group[i]), str(p.label[i]), p.text.get(p.group[i], ""), float(p.limit[i]),
                           str(p.unit[i]), step, income, 1e4 * income / basis_total if basis_total else 0.0))
    # offerings bought up to the face on offer: what another 1,000,000 face of each would earn
    per_face = np.where(p.var_offered, r.bound_duals, 0.0) / p.var_unit
    for j in np.argsort(-per_face):
        income = float(per_face[j] * STEP["face"])
        if income <= _BINDING_DUAL * max(p.cash, 1.0):
            break
        out.append(Binding(OFFERED, str(p.positions.holdings.id[p.var_pos[j]]), "the face on offer",
                           float(p.ub[j] * p.var_unit[j]), "face", STEP["face"], income,
                           1e4 * income / basis_total if basis_total else 0.0))
    return tuple(sorted(out, key=lambda b: -b.income_per_step))


@dataclass(frozen=True)
class Conflict:
    """A group of rows that must give for any ladder to exist, and by how much (in the limit's unit)."""

    group: str
    text: str
    unit: str
    members: tuple[tuple[str, float, float], ...]   # (label, limit, relaxation needed)

    @property
    def worst(self) -> float:
        return max(m[2] for m in self.members)


def diagnose(p: Program, integer: bool = True, time_limit: float = DIAGNOSE_TIME_LIMIT_S) -> tuple[Conflict, ...]:
    """The smallest relaxation (sum of relaxations relative to each limit) that admits a ladder.

    With ``integer`` False (when even the linear relaxation has no solution) lots may be fractional:
    a linear program, solved exactly and fast; else the integer program to ``DIAGNOSE_GAP``."""
    soft = np.flatnonzero(p.group != BUDGET)
    sens = np.select([p.sens == SENS_ONE, p.sens == SENS_BUYS], [1.0, max(p.cash, 1.0) / 100.0],
                     default=max(p.positions.mv @ p.face0 + p.cash, 1.0))
    # one slack per soft row, in the limit's unit: row - sens * slack <= b
    S = np.zeros((len(p.b), len(soft)))
    S[soft, np.arange(len(soft))] = -sens[soft]
    A = np.hstack([p.A, S])
    weight = 1.0 / np.maximum(np.abs(p.limit[soft]), np.where(p.unit[soft] == "currency", 1e6, 1e-1))
    k = len(p.c)
    c = np.concatenate([-1e-9 * p.c / max(p.cash, 1.0), weight])
    scale = np.where(np.abs(A).max(axis=1) > 0, np.abs(A).max(axis=1), 1.0)
    integrality = np.concatenate([p.integrality if integer else np.zeros(k, np.int64), np.zeros(len(soft), np.int64)])
    lower = np.concatenate([p.lb if integer else np.zeros(k), np.zeros(len(soft))])
    with solver_output_filtered():
        res = semi_milp(c, integrality, lower, np.concatenate([p.ub, np.full(len(soft), np.inf)]), A / scale[:, None],
                    *_row_bounds(p, p.b / scale), {"mip_rel_gap": DIAGNOSE_GAP, "time_limit": time_limit})
    if res.x is None:
        return (Conflict(BUDGET, "no purchase fits the cash to invest", "currency", (("", p.cash, np.nan),)),)
    slack = res.x[k:]
    out: dict[str, list] = {}
    for j, i in enumerate(soft):
        if slack[j] * weight[j] > 1e-7:
            out.setdefault(str(p.group[i]), []).append((str(p.label[i]), float(p.limit[i]), float(slack[j])))
    return tuple(Conflict(g, p.text.get(g, ""), str(p.unit[np.flatnonzero(p.group == g)[0]]), tuple(members))
                 for g, members in out.items())
