"""The builder on a small invented book: the optimum confirmed by brute-force enumeration (each
combination of lots graded by the policy checker itself), the naive even ladder computed here, the
dual values checked against a re-solve, and an infeasible request named."""

import itertools
from dataclasses import replace

import numpy as np
import pytest

from build_books import RUNGS, make_book
from ladder.analysis.build import build_ladder
from ladder.analysis.check import check_proposed
from ladder.analysis.valuation import value_book
from ladder.folder.book_file import load_book
from ladder.book.holdings import Holdings
from ladder.build.candidates import read_offerings
from ladder.build.rungs import make_rungs
from ladder.build.solve import MIP_GAP
from ladder.policy.checker import check
from ladder.policy.measures import PositionMeasures, cash_by_month

CASH = 8_000_000.0
UNIT = 1e6


@pytest.fixture(scope="module")
def small(tmp_path_factory):
    folder = make_book(tmp_path_factory.mktemp("small") / "book", duration=0.75, need=5_000_000)
    return folder, load_book(folder)


@pytest.fixture(scope="module")
def built(small):
    folder, book = small
    return build_ladder(book, CASH, rungs=RUNGS, offerings=folder / "offerings.csv")


class Market:
    """Every offering and holding valued once, per unit of face, independently of the builder."""

    def __init__(self, folder, book):
        offers = read_offerings(folder / "offerings.csv", book)
        self.offers = offers
        n0 = len(book.holdings)
        h = Holdings.concat([book.holdings, replace(offers.holdings, face=np.full(len(offers), UNIT))])
        v = value_book(book.with_holdings(h))
        self.h, self.n0, self.book = h, n0, book
        face = h.face
        self.mv = v.market_value / face
        self.duration, self.days = v.effective_duration, v.days_to_maturity
        self.cash = cash_by_month(v.pricer.cash_flows, face, v.as_of, 6) / face[:, None]
        self.yld = np.where(h.kind == "fund", h.quote, v.measures.bey)
        self.as_of = np.datetime64(v.as_of)
        self.rung = make_rungs(RUNGS, book.policy, book.valuation_date).index(h.maturity)

    def grade(self, faces):
        keep = faces > 0
        m = PositionMeasures(replace(self.h, face=faces).take(keep), self.as_of, (self.mv * faces)[keep],
                             (self.mv * faces)[keep], self.duration[keep], self.days[keep],
                             (self.cash * faces[:, None])[keep])
        return check(self.book.policy, m, self.book.cash_needs).status

    def rungs_ok(self, faces, low=0.125, high=0.375):
        bought = np.zeros_like(faces)
        bought[self.n0:] = faces[self.n0:]
        mv = self.mv * bought * (self.h.kind != "fund")
        total = mv.sum()
        shares = np.array([mv[self.rung == k].sum() for k in range(4)]) / total
        return bool(np.all(shares >= low) and np.all(shares <= high))

    def income(self, faces):
        bought = faces.copy()
        bought[:self.n0] = 0.0
        return float((self.yld * self.mv * bought).sum())

    def faces_for(self, lots, fund):
        faces = np.concatenate([self.book.holdings.face, np.zeros(len(self.offers))])
        faces[self.n0:self.n0 + 4] = np.asarray(lots) * UNIT
        faces[self.n0 + 4] = fund
        return faces

    def residual(self, lots):
        return CASH - float((self.mv[self.n0:self.n0 + 4] * np.asarray(lots) * UNIT).sum())


@pytest.fixture(scope="module")
def market(small):
    return Market(*small)


def test_optimum_matches_brute_force_enumeration(built, market):
    # lots of 1,000,000 face: OF-BILL 0-4, OF-CORP-Y 0 or 2-3 (minimum lot 2,000,000), OF-CORP-X and OF-AGY 0-3
    best, best_lots = -np.inf, None
    for lots in itertools.product(range(5), (0, 2, 3), range(4), range(4)):
        fund = market.residual(lots)
        if fund < 0:
            continue
        faces = market.faces_for(lots, fund)
        if market.grade(faces) not in ("pass", "near") or not market.rungs_ok(faces):
            continue
        income = market.income(faces)
        if income > best:
            best, best_lots = income, lots
    assert best_lots is not None
    assert built.status == "built"
    # the solver stops within MIP_GAP of the best bound; it cannot beat the enumerated optimum
    assert best * (1 - MIP_GAP) <= built.solution.income <= best * (1 + 1e-12)
    bought = dict(zip(built.trades.holdings.id, built.trades.holdings.face))
    lots = tuple(int(round(bought.get(i, 0) / UNIT)) for i in ("OF-BILL", "OF-CORP-Y", "OF-CORP-X", "OF-AGY"))
    faces = market.faces_for(lots, market.residual(lots))
    assert market.grade(faces) in ("pass", "near") and market.rungs_ok(faces)
    assert market.income(faces) == pytest.approx(built.solution.income, rel=1e-9, abs=0)


def test_yield_beats_the_naive_even_ladder(built, market):
    # naive: CASH / 4 per rung, one offering per rung, whole lots rounded down, the rest in the fund
    lots = [int(CASH / 4 // (market.mv[market.n0 + j] * UNIT)) for j in range(4)]
    lots = [min(n, 3 if j else 4) if n >= (2 if j == 1 else 1) else 0 for j, n in enumerate(lots)]
    faces = market.faces_for(lots, market.residual(lots))
    naive_yield = float((market.yld * market.mv * faces).sum() / (market.mv * faces).sum())
    assert market.grade(faces) in ("pass", "near")           # the naive ladder is a fair yardstick here
    assert built.after.yield_to_worst >= naive_yield
    assert built.naive_yield == pytest.approx(naive_yield, rel=1e-12, abs=0)


def test_trades_comply_cover_the_needs_and_invest_the_cash(small, built):
    _, book = small
    what_if = check_proposed(book, built.trades)
    assert what_if.check.status != "breach" and not what_if.check.new_breaches
    assert what_if.check.after.rule("portfolio.cash_needs_horizon_months").status in ("pass", "near")
    spent = float(what_if.after.market_value.sum() - what_if.before.market_value.sum())
    assert spent == pytest.approx(CASH, abs=built.largest_lot, rel=0)
    assert built.invested == pytest.approx(CASH, abs=0.02, rel=0)   # the fund takes the residual to the cent


def test_duals_price_the_binding_duration_cap(tmp_path, built):
    # Relaxation re-solved with the cap 0.001 years looser: the income gained matches the dual's estimate.
    item = next(b for b in built.binding if b.group == "portfolio.max_effective_duration")
    looser = make_book(tmp_path / "looser", duration=0.751, need=5_000_000)
    again = build_ladder(load_book(looser), CASH, rungs=RUNGS, offerings=looser / "offerings.csv")
    gained = (again.relaxation.income - built.relaxation.income) / 0.001 * item.step
    assert gained > 0
    assert item.income_per_step == pytest.approx(gained, rel=0.02, abs=0)


def test_infeasible_request_names_the_conflict(tmp_path):
    # fresh: 3,000,000 of cash cannot meet a 5,000,000 need in February 2027
    folder = make_book(tmp_path / "b", need=5_000_000)
    result = build_ladder(load_book(folder), 3_000_000, rungs=RUNGS, offerings=folder / "offerings.csv", fresh=True)
    assert result.status == "infeasible" and result.trades is None
    conflict = {c.group: c for c in result.conflicts}["portfolio.cash_needs_horizon_months"]
    february = dict((label, need) for label, _, need in conflict.members)["2027-02"]
    # at most the 3,000,000 can mature or sit in the fund by then: short by at least 2,000,000; the fund
    # alone may take 40% (sectors.fund.max_pct) of it, so the shortfall is at most 5,000,000 - 1,200,000
    assert 2_000_000 <= february <= 3_800_000
    assert result.to_json()["conflicts"][0]["rule"]
