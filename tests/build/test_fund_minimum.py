"""No dust into a fund: the builder's fund purchase is none or at least ``[build].min_fund``, and what
no purchase takes stays as cash and is stated."""

from __future__ import annotations

import numpy as np
import pytest

from ladder.analysis.build import build_ladder
from ladder.build.solve import semi_milp
from ladder.demo import write_demo
from ladder.folder.book_file import DEFAULT_MIN_FUND, load_book


def test_a_semi_continuous_variable_is_zero_or_at_least_its_minimum():
    # Hand-solved: maximize f + 4 y with f + 3 y <= 10.5, y whole in [0, 10], f in {0} or [m, 100].
    # m = 2: y=3 leaves 1.5 < 2 (f=0, 12); y=2 leaves 4.5 (8 + 4.5 = 12.5); y=1 leaves 7.5 (11.5);
    # y=0 gives 10.5: the optimum is y=2, f=4.5. Without the minimum it would be y=3, f=1.5 (13.5).
    # m = 5: y=3 gives 12; y=2 leaves 4.5 < 5 (8); y=1 leaves 7.5 (11.5): y=3, f=0, 1.5 left.
    A = np.array([[1.0, 3.0]])
    for minimum, expected in ((2.0, (4.5, 2.0)), (5.0, (0.0, 3.0)), (0.0, (1.5, 3.0))):
        res = semi_milp(np.array([-1.0, -4.0]), np.array([2 if minimum else 0, 1]), np.array([minimum, 0.0]),
                        np.array([100.0, 10.0]), A, np.array([-np.inf]), np.array([10.5]), {})
        assert res.status == 0
        # hand arithmetic above; the solver's feasibility tolerance is about 1e-7
        np.testing.assert_allclose(res.x, expected, rtol=0, atol=1e-6)


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    folder = tmp_path_factory.mktemp("demo")
    write_demo(folder)
    return folder


@pytest.mark.parametrize("cash", [7_000_022.88, 50_000_022.88])
def test_a_build_buys_no_fund_dust_and_states_the_cash_left(demo, cash):
    # 7,000,022.88: seven 1,000,000-face lots leave 2.85, which a fund took before the minimum existed.
    r = build_ladder(load_book(demo), cash)
    assert r.status == "built" and r.min_fund == DEFAULT_MIN_FUND == 100_000.0
    h = r.trades.holdings
    fund = h.kind == "fund"
    assert (h.face[fund] >= DEFAULT_MIN_FUND).all()
    # hand arithmetic: what was spent is the sum of face x price per 100 over the securities, plus the fund
    price = np.where(fund, 100.0, r.program.positions.mv[r.program.var_pos][r.solution.x > 1e-9] * 100.0)
    spent = float((h.face * price / 100.0).sum())
    assert spent + r.left_as_cash == pytest.approx(cash, rel=0, abs=0.02)      # to the cent
    assert r.left_as_cash < DEFAULT_MIN_FUND or fund.any()
    doc = r.to_json()
    assert doc["left_as_cash"] == pytest.approx(r.left_as_cash, rel=0, abs=0.005) and doc["min_fund"] == 100_000.0
    if cash == 7_000_022.88:
        assert not fund.any() and 0 < r.left_as_cash < DEFAULT_MIN_FUND


def test_without_a_minimum_the_fund_takes_the_residual(demo, tmp_path):
    folder = tmp_path / "book"
    write_demo(folder)
    toml = folder / "book.toml"
    toml.write_text(toml.read_text().replace("[reinvest]", "[build]\nmin_fund = 0\n\n[reinvest]"))
    r = build_ladder(load_book(folder), 7_000_022.88)
    h = r.trades.holdings
    assert r.min_fund == 0 and (h.kind == "fund").sum() == 1
    assert r.left_as_cash == pytest.approx(0.0, rel=0, abs=0.01)    # the fund took the dust to the cent
