"""The ladder builder's façade: a book, cash to invest and options -> a ``BuildResult``.

``build_ladder`` chooses candidates (an offerings file or generic ones), values them, builds and
solves the mixed-integer program (``ladder.build``), and explains the answer: the trades, the ladder
before and after, the what-if policy check of the trades, the binding limits and what each costs in
yield (from the linear relaxation's duals), the naive even ladder for comparison, or, when no ladder
exists, the smallest relaxation that would admit one. ``apply_build`` gives the book after the trades and ``save_build`` writes it.

While the solver runs, ``progress`` hears "solving: elapsed, best plan so far and its gap"
(``solving_text``) and ``watch`` the same as a ``SolveProgress``; ``stop`` (a callable, e.g. a
``threading.Event``'s ``is_set``) ends the search early, and the result is then the best plan found,
marked as not proven optimal (``BuildResult.optimality_note``).
"""

from __future__ import annotations

import datetime as dt
import time
from dataclasses import dataclass, replace
from typing import Callable

import numpy as np

from ladder.analysis.booking import Booked, book_trades, settled_holdings
from ladder.analysis.check import BookCheck, TradeWhatIf, check_book, check_proposed, coverage_months
from ladder.analysis.records import clean_number
from ladder.analysis.valuation import Valuation, settlement_date, value_book
from ladder.folder.book_file import Book
from ladder.book.cells import MAX_FACE, parse_number
from ladder.book.holdings import Holdings
from ladder.folder.save import holdings_rows
from ladder.build.candidates import (Candidates, eligible, fund_candidates, generic_candidates, read_offerings,
                                    with_tickets)
from ladder.build.naive import feasible, naive_ladder
from ladder.build.positions import Positions
from ladder.build.program import RUNG_BAND, Program, build_program
from ladder.build.rungs import Rungs, make_rungs
from ladder.build.solve import (Binding, Conflict, Relaxation, Solution, SolveProgress, binding, diagnose, relaxation,
                                solve)
from ladder.errors import Problems
from ladder.policy.measures import cash_by_month
from ladder.policy.trades import NEW_MONEY, Trades

VALUATION_FACE = 1_000_000.0   # face the candidates are valued at (results are per unit face)
GENERIC_NOTE = ("generic: a stand-in for a security of that sector, rating and maturity from the curve and spread "
                "table, not an offering; source a real issue (and issuer) before trading")
Progress = Callable[[float, str], None]
NOT_FOUND = ("time_limit", "stopped")   # statuses of a search that ended without a plan and without a proof


@dataclass(frozen=True)
class LadderSummary:
    """A portfolio's figures: yields decimal (market-value weighted), durations years, shares percent."""

    market_value: float
    yield_to_worst: float       # the portfolio's yield, as Totals.yield_to_worst (the builder's objective)
    effective_duration: float
    effective_convexity: float
    wam_days: float
    rung_shares: tuple[tuple[str, float], ...]   # (rung, % of market value); plus "fund" and "beyond"

    def to_json(self) -> dict:
        return {"market_value": clean_number(self.market_value, 2),
                "yield_to_worst_pct": clean_number(100 * self.yield_to_worst, 8),
                "effective_duration": clean_number(self.effective_duration, 8),
                "effective_convexity": clean_number(self.effective_convexity, 8),
                "wam_days": clean_number(self.wam_days, 4),
                "rung_shares_pct": {k: clean_number(v, 6) for k, v in self.rung_shares}}


@dataclass(frozen=True, eq=False)
class BuildResult:
    """The outcome of a build. ``status``: "built" (proven optimal unless ``optimality_note`` says
    otherwise); "infeasible" (then ``conflicts`` says why); "time_limit" or "stopped" (the search
    ended, at its time limit or when stopped, before it found a ladder or proved there is none)."""

    status: str
    as_of: dt.date
    cash: float
    fresh: bool
    allow_sales: bool
    rungs: Rungs
    candidates: Candidates
    program: Program
    solution: Solution
    relaxation: Relaxation
    trades: Trades | None
    invested: float                      # market value bought less sold, currency
    before: LadderSummary | None
    after: LadderSummary | None
    compliance: TradeWhatIf | BookCheck | None
    binding: tuple[Binding, ...]
    conflicts: tuple[Conflict, ...]
    naive_yield: float | None            # yield to worst of the portfolio after the naive even ladder
    naive_feasible: bool | None          # whether the naive ladder meets every row of the program
    seconds: float
    min_fund: float = 0.0                # a fund purchase is none or at least this ([build].min_fund), currency

    @property
    def compliance_status(self) -> str | None:
        if self.compliance is None:
            return None
        return self.compliance.check.status if isinstance(self.compliance, TradeWhatIf) else self.compliance.result.status

    @property
    def proven_optimal(self) -> bool:
        return self.solution.proven_optimal

    @property
    def optimality_note(self) -> str | None:
        """None for a proven optimum; else why the plan is not proven optimal and how far it may be."""
        s = self.solution
        if self.status != "built" or s.proven_optimal:
            return None
        why = {"stopped": f"the search was stopped after {s.seconds:.1f} s",
               "time_limit": f"the search reached its time limit ({s.seconds:.0f} s)"}.get(s.status, s.message)
        gap = "" if s.gap is None else f"; a better plan could earn at most {100 * s.gap:.3g}% more income"
        return f"NOT PROVEN OPTIMAL: {why}; this is the best plan found{gap}"

    @property
    def trade_yields(self) -> np.ndarray | None:
        """Each trade's yield to worst (decimal; as ``LadderSummary.yield_to_worst``), in trade order."""
        if self.trades is None or self.solution.x is None:
            return None
        return self.program.positions.yld[self.program.var_pos[_traded(self.program, self.solution.x)]]

    @property
    def gain_over_naive_bp(self) -> float | None:
        """The built portfolio's yield to worst less the naive even ladder's, basis points."""
        if self.naive_yield is None or self.after is None:
            return None
        return (self.after.yield_to_worst - self.naive_yield) * 1e4

    @property
    def generic_trades(self) -> np.ndarray:
        """(t,) bool: which trades buy a generic candidate (a stand-in, see ``GENERIC_NOTE``)."""
        if self.trades is None:
            return np.zeros(0, bool)
        return np.isin(self.trades.holdings.id, self.candidates.holdings.id[self.candidates.generic])

    @property
    def left_as_cash(self) -> float:
        """Cash not invested (currency): what no lot fits and is under the fund minimum (``[build].min_fund``)."""
        return max(self.cash - self.invested, 0.0) if self.status == "built" else 0.0

    @property
    def largest_lot(self) -> float:
        """Market value of the largest single lot among the candidates bought (currency)."""
        p, x = self.program, self.solution.x
        if x is None:
            return 0.0
        used = p.buys & (x > 0) & ~p.positions.fund[p.var_pos]
        return float((p.positions.mv[p.var_pos] * p.var_unit)[used].max(initial=0.0))

    def to_json(self) -> dict:
        doc = {"as_of": str(self.as_of), "status": self.status, "cash": clean_number(self.cash, 2),
               "fresh": self.fresh, "allow_sales": self.allow_sales, "rungs": self.rungs.spec,
               "rung_labels": list(self.rungs.labels), "candidates": {
                   "source": self.candidates.source, "count": len(self.candidates),
                   "generic": int(self.candidates.generic.sum()),
                   "left_out": [{"reason": r, "count": n} for r, n in self.candidates.left_out]},
               "solver": {"status": self.solution.status, "seconds": round(self.solution.seconds, 4),
                          "relaxation_seconds": round(self.relaxation.seconds, 4),
                          "income": clean_number(self.solution.income, 2),
                          "proven_optimal": self.proven_optimal,
                          "gap_pct": None if self.solution.gap is None else clean_number(100 * self.solution.gap, 8),
                          "note": self.optimality_note,
                          "relaxation_income": clean_number(self.relaxation.income, 2)}}
        if self.status != "built":
            doc["conflicts"] = [{"rule": c.group, "text": c.text, "unit": c.unit,
                                 "members": [{"label": m[0], "limit": clean_number(m[1]),
                                              "relaxation": clean_number(m[2])} for m in c.members]}
                                for c in self.conflicts]
            return doc
        doc.update({
            "invested": clean_number(self.invested, 2), "left_as_cash": clean_number(self.left_as_cash, 2),
            "min_fund": clean_number(self.min_fund, 2),
            "trades": [{**row, "generic": bool(g)} for row, g in zip(trade_records(self.trades), self.generic_trades)],
            "generic_note": GENERIC_NOTE if self.generic_trades.any() else None,
            "before": self.before.to_json() if self.before else None, "after": self.after.to_json(),
            "naive_even_ladder": {"yield_to_worst_pct": clean_number(100 * self.naive_yield, 8)
                                  if self.naive_yield is not None else None, "meets_every_rule": self.naive_feasible},
            "compliance": self.compliance.check.to_json() if isinstance(self.compliance, TradeWhatIf)
            else self.compliance.result.to_json() if self.compliance else None,
            "binding": [{"rule": b.group, "member": b.label, "text": b.text, "limit": clean_number(b.limit),
                         "unit": b.unit, "step": b.step, "income_per_step": clean_number(b.income_per_step, 2),
                         "yield_bp_per_step": clean_number(b.yield_bp_per_step, 6)} for b in self.binding]})
        return doc


def trade_records(trades: Trades | None) -> list[dict]:
    """The trades as rows of the trades file: the holdings columns plus ``action`` and ``funded_from``."""
    if trades is None:
        return []
    funded = trades.funded_from if trades.funded_from is not None else [""] * len(trades)
    return [{**row, "action": a, "funded_from": f} for row, a, f in zip(holdings_rows(trades.holdings), trades.action,
                                                                         funded)]


def parse_cash(text) -> float:
    """Cash to invest from user text ("50,000,000" or 5e7); InputError unless a finite number >= 0."""
    problems = Problems()
    try:
        value = parse_number(str(text))
    except ValueError as why:
        value = None
        problems.add("--cash", 0, 0, f"{why}; write the cash to invest in currency units, "
                                     "e.g. 25000000 or 25,000,000")
    if value is not None and value < 0:
        problems.add("--cash", 0, 0, f"{text!r} is negative; the cash to invest must be zero or more")
    elif value is not None and value > MAX_FACE:
        problems.add("--cash", 0, 0, f"{text!r} is out of range; the cash to invest is at most {MAX_FACE:,.0f}")
    problems.raise_if_any()
    return float(value)


def _positions(v: Valuation, months: int, purchase: bool) -> Positions:
    h = v.holdings
    face = h.face
    yld = v.yield_to_worst
    book = v.clean / 100.0 if purchase else v.book_value / face
    return Positions(h, v.dirty / 100.0, book, yld, v.effective_duration, v.days_to_maturity,
                     cash_by_month(v.pricer.cash_flows, np.ones(len(h)), v.as_of, months))


def _value_candidates(book: Book, c: Candidates, at: dt.date) -> tuple[Candidates, Positions]:
    h = replace(c.holdings, face=np.full(len(c), VALUATION_FACE))
    v = value_book(book.with_holdings(h), at)
    pos = _positions(v, coverage_months(book), purchase=True)
    ok = np.isfinite(pos.mv) & np.isfinite(pos.yld) & np.isfinite(pos.duration) & (pos.mv > 0)
    if not ok.all():
        c = replace(c, left_out=c.left_out + (("could not be priced", int((~ok).sum())),))
    return c.take(ok), pos.take(ok)


def candidates_for(book: Book, rungs: Rungs, at: dt.date, offerings=None) -> Candidates:
    """The eligible candidates: the offerings (or generic ones) plus where the residual goes."""
    base = read_offerings(offerings, book) if offerings is not None else generic_candidates(book, rungs, at)
    if not base.fund.any():
        base = Candidates.concat([base, fund_candidates(book, at)])
    return eligible(book.policy, with_tickets(base, book.build), rungs, at)


def _traded(p: Program, x: np.ndarray) -> np.ndarray:
    """Positions of the solution's variables that trade (the trades' order): a solver's round-off of a
    cent of face or less is no trade."""
    return np.flatnonzero(np.round(p.faces(x), 2) > 0)


def _trades(p: Program, x: np.ndarray, at: dt.date) -> Trades:
    pos, face = p.positions, p.faces(x)
    used = _traded(p, x)
    h = pos.holdings.take(p.var_pos[used])
    traded = np.round(face[used], 2)
    buy = p.var_sign[used] > 0
    clean = np.where(buy, 100.0 * pos.book[p.var_pos[used]], h.book_price)
    rating_now = np.array(["/".join(x for x in (a, b) if x) for a, b in zip(h.rating, h.short_rating)], dtype=object)
    h = replace(h, face=traded, row=np.arange(2, len(used) + 2, dtype=np.int64),
                book_price=np.where(buy & (h.kind != "fund"), np.round(clean, 6), np.where(buy, np.nan, clean)),
                purchase_date=np.where(buy & (h.kind != "fund"), np.datetime64(at, "D"), h.purchase_date),
                rating_at_purchase=np.where(buy, rating_now, h.rating_at_purchase))
    # The builder invests the new cash it was given (--cash) and, with sales, their proceeds: every trade is
    # new money (a sale's proceeds go back out to pay the buys), so the cash account is left as it is.
    return Trades(h, np.where(buy, "buy", "sell").astype(object), "build",
                  funded_from=np.full(len(h), NEW_MONEY, dtype=object))


def _summary(holdings: Holdings, v: Valuation, pos: Positions, faces: np.ndarray, rungs: Rungs) -> LadderSummary:
    mv = pos.mv * faces
    total = mv.sum()
    rung = rungs.index(holdings.maturity)
    fund = holdings.kind == "fund"
    shares = [(label, 100 * mv[(rung == k) & ~fund].sum() / total) for k, label in enumerate(rungs.labels)]
    shares += [("fund", 100 * mv[fund].sum() / total), ("beyond", 100 * mv[(rung < 0) & ~fund].sum() / total)]
    t = v.totals
    return LadderSummary(float(total), t.yield_to_worst, t.effective_duration,
                         t.effective_convexity, t.wam_days, tuple(shares))


def _yield_to_worst(p: Program, x: np.ndarray) -> float:
    pos = p.positions
    faces = p.face0.copy()
    np.add.at(faces, p.var_pos, p.faces(x) * p.var_sign)
    mv = pos.mv * faces
    return float((pos.yld * mv).sum() / mv.sum()) if mv.sum() > 0 else float("nan")


def _no_trades_summary(book: Book, v: Valuation, months: int, rungs: Rungs) -> LadderSummary:
    pos = _positions(v, months, purchase=False)
    return _summary(book.holdings, v, pos, book.holdings.face, rungs)


def solving_text(g: SolveProgress) -> str:
    """A running search in words: elapsed time, the best plan's income and its proven gap."""
    if g.income is None:
        return f"solving: {g.seconds:.1f} s, no plan yet"
    gap = "" if g.gap is None else f", within {100 * g.gap:.2g}% of the best possible"
    return f"solving: {g.seconds:.1f} s, best so far {g.income:,.0f} a year{gap}"


def build_ladder(book: Book, cash, rungs: str | None = None, offerings=None, allow_sales: bool = False,
                 fresh: bool = False, at: dt.date | None = None, progress: Progress | None = None,
                 rung_band: tuple[float, float] = RUNG_BAND, watch: Callable[[SolveProgress], None] | None = None,
                 stop: Callable[[], bool] | None = None) -> BuildResult:
    """Design the best policy-compliant ladder for ``cash`` (see the module docstring).

    ``rungs``: a specification (``12x3M``, ``5x1Y``, ``3M,6M,1Y,2Y``; default an even ladder to the
    policy's maximum maturity); ``offerings``: a path to an offerings file (default: generic
    candidates); ``rung_band``: each rung's share of what is bought, as multiples of the even share.
    ``progress(fraction, text)`` hears each step, and while solving ``solving_text`` about every
    0.25 s; ``watch(SolveProgress)`` the same figures as numbers; ``stop()`` true ends the search with
    the best plan so far (called from the thread that runs the build). Raises ``InputError`` on bad
    input (nothing is computed)."""
    started = time.perf_counter()
    report = progress or (lambda fraction, text: None)
    cash = parse_cash(cash)
    settle = settlement_date(book, at)
    spec = make_rungs(rungs, book.policy, settle)
    report(0.05, "candidates")
    cands = candidates_for(book, spec, settle, offerings)
    report(0.15, f"valuing {len(cands)} candidates")
    cands, cand_pos = _value_candidates(book, cands, settle)
    months = coverage_months(book)
    v_before = value_book(book, settle) if len(book.holdings) else None
    if v_before is not None and not fresh:
        check_book(book, settle, valuation=v_before)   # refuses a book the policy's rules cannot read
    existing = _positions(v_before, months, purchase=False) if v_before is not None else cand_pos.take([])
    report(0.35, "building the program")
    program = build_program(book.policy, book.cash_needs, settle, spec, existing, cands, cand_pos, cash,
                            allow_sales=allow_sales, fresh=fresh, rung_band=rung_band, families=book.families)
    report(0.45, "solving")
    relaxed = relaxation(program)

    def heard(g: SolveProgress) -> None:
        report(0.45, solving_text(g))
        if watch is not None:
            watch(g)

    solution = solve(program, watch=heard, stop=stop) if relaxed.status == "optimal" else Solution(
        "infeasible", None, float("nan"), "the linear relaxation has no solution", 0.0)
    common = dict(as_of=settle, cash=cash, fresh=fresh, allow_sales=allow_sales and not fresh, rungs=spec,
                  candidates=cands, program=program, solution=solution, relaxation=relaxed, min_fund=book.build.min_fund)
    if solution.x is None and solution.status in NOT_FOUND:
        report(1.0, "done")
        return BuildResult(solution.status, trades=None, invested=0.0, before=None, after=None, compliance=None,
                           binding=(), conflicts=(), naive_yield=None, naive_feasible=None,
                           seconds=time.perf_counter() - started, **common)
    if solution.x is None:
        report(0.7, "no ladder fits: finding the smallest relaxation")
        conflicts = diagnose(program, integer=relaxed.status == "optimal")
        report(1.0, "done")
        return BuildResult("infeasible", trades=None, invested=0.0, before=None, after=None, compliance=None,
                           binding=(), conflicts=conflicts, naive_yield=None, naive_feasible=None,
                           seconds=time.perf_counter() - started, **common)
    report(0.7, "checking the trades against the policy")
    x = solution.x
    trades = _trades(program, x, settle)
    invested = float((program.positions.mv[program.var_pos] * program.faces(x) * program.var_sign).sum())
    before = after = compliance = None
    if fresh or v_before is None:
        bought = trades.holdings
        if len(bought):
            compliance = check_book(book.with_holdings(bought), settle)
            after_v = compliance.valuation
            after = _summary(bought, after_v, _positions(after_v, months, purchase=True), bought.face, spec)
    else:
        compliance = check_proposed(book, trades, settle, before=v_before) if len(trades) else None
        before = _no_trades_summary(book, v_before, months, spec)
        if compliance is not None:
            after_v = compliance.after
            pos_after = _positions(after_v, months, purchase=False)
            after = _summary(after_v.holdings, after_v, pos_after, after_v.holdings.face, spec)
        else:
            after = before
    report(0.9, "explaining")
    naive_x = naive_ladder(program, spec)
    total_after = float(program.positions.mv @ program.face0 + cash)
    result = BuildResult("built", trades=trades, invested=invested, before=before, after=after, compliance=compliance,
                         binding=binding(program, relaxed, total_after), conflicts=(),
                         naive_yield=_yield_to_worst(program, naive_x),
                         naive_feasible=bool(feasible(program, naive_x).all()),
                         seconds=time.perf_counter() - started, **common)
    report(1.0, "done")
    return result


def apply_build(book: Book, result: BuildResult) -> Book:
    """The book with the build's trades applied (buys appended as new holdings, sales reduce face).

    Refuses (InputError) a build that is not "built", a fresh build (it ignored these holdings) and
    one settled after the book's valuation date (its purchases cannot be booked yet)."""
    problems = Problems()
    if result.status != "built" or result.trades is None:
        problems.add("build", 0, 0, "there is no ladder to apply: the build found none")
    elif result.fresh:
        problems.add("--fresh", 0, 0, "a fresh build ignores the book's holdings, so it cannot be added to them; "
                                      "write it with --out and review it first")
    elif result.as_of > book.valuation_date:
        problems.add("--at", 0, 0, f"the build settles {result.as_of}, after the book's valuation date "
                                   f"{book.valuation_date}; its purchases cannot be booked yet")
    problems.raise_if_any()
    return book.with_holdings(settled_holdings(book, result.trades, where="--apply").holdings)


def save_build(book: Book, result: BuildResult) -> Booked:
    """Apply the build: replace the book's holdings file and journal every trade, one transaction
    (the previous file kept as a version); returns what was booked."""
    apply_build(book, result)            # refuses what cannot be booked
    return book_trades(book, result.trades, f"ladder builder: {result.invested:,.2f} invested", where="--apply")
