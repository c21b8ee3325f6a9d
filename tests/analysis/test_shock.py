"""The shock façade: which scenarios run, how the results add up, the income hook, the json shape."""

import numpy as np
import pytest

from ladder.analysis.shock import shock_book, shock_document, shock_rows, shock_scenarios
from ladder.errors import InputError
from ladder.risk.rungs import RUNGS
from ladder.risk.scenarios import Scenario, parallel_set

from shock_books import demo_book


@pytest.fixture(scope="module")
def demo_result():
    return shock_book(demo_book())


def test_default_scenarios_are_parallel_non_parallel_credit_and_the_books_own():
    names = [s.name for s in shock_scenarios(demo_book())]
    assert names[:11] == ["-300 bp", "-200 bp", "-100 bp", "-50 bp", "-25 bp", "0 bp", "+25 bp", "+50 bp",
                          "+100 bp", "+200 bp", "+300 bp"]
    assert names[11:18] == ["steepener 100 bp about 2Y", "flattener 100 bp about 2Y", "short end +100 bp",
                            "short end -100 bp", "long end +100 bp", "long end -100 bp",
                            "twist +50/-50 bp about 5Y"]
    assert names[18:21] == ["credit +50 bp", "credit +100 bp", "credit +200 bp"]
    assert names[21:] == ["bear-flattener", "recession-rally", "inflation-scare", "flight-to-quality"]   # demo file


def test_bp_list_and_scenario_file_replace_the_defaults(tmp_path):
    book = demo_book()
    path = tmp_path / "moves.csv"
    path.write_text("scenario,tenor,shift_bp\nbull steepener,3M,-80\nbull steepener,10Y,-20\n")
    assert [s.name for s in shock_scenarios(book, (100.0, -100.0))] == ["-100 bp", "+100 bp"]
    assert [s.name for s in shock_scenarios(book, scenarios_file=path)] == ["bull steepener"]
    assert [s.name for s in shock_scenarios(book, (50.0,), path)] == ["+50 bp", "bull steepener"]


def test_a_scenario_file_naming_an_unknown_tenor_is_refused(tmp_path):
    path = tmp_path / "moves.csv"
    path.write_text("scenario,tenor,shift_bp\nodd,4Y,10\nodd,2Y,abc\n")
    with pytest.raises(InputError) as caught:
        shock_scenarios(demo_book(), scenarios_file=path)
    messages = [str(p) for p in caught.value.problems]
    assert messages[0].startswith(f"{path}:2:2: tenor 4Y is not on the curve")
    assert messages[1] == f"{path}:3:3: shift 'abc' is not a number of basis points"


def test_a_move_no_curve_can_price_is_an_input_problem_naming_the_scenario():
    # A 20Y par yield of -5.6% then a 30Y par yield of 14.4%: the 30Y par bond's coupons on the
    # 20Y bond's large discount factors already exceed par, so no positive DF(30Y) exists.
    book = demo_book()
    shift = np.zeros(len(book.curve))
    shift[-2], shift[-1] = -1000.0, 1000.0
    with pytest.raises(InputError) as caught:
        shock_book(book, scenarios=parallel_set(book.curve, (100.0,)) + (Scenario("whipsaw", "user", shift),))
    [problem] = caught.value.problems
    assert problem.file.endswith("curve.csv") and "scenario 'whipsaw'" in problem.message


def test_totals_add_up_and_a_zero_move_changes_nothing(demo_result):
    r = demo_result
    rv = r.revaluation
    # relative 1e-12: exact in real arithmetic, so only round-off (~1e-15) separates the two
    assert r.base_value == pytest.approx(r.valuation.totals.market_value, rel=1e-12, abs=0)
    zero = [s.name for s in r.scenarios].index("0 bp")
    np.testing.assert_allclose(rv.change[zero], 0.0, atol=1e-6, rtol=0)
    for totals in (r.by_rung, r.by_sector):
        np.testing.assert_allclose(totals.base.sum(), r.base_value, rtol=1e-12, atol=0)
        for field in ("value", "est_duration", "est_duration_convexity"):
            np.testing.assert_allclose(getattr(totals, field).sum(axis=0), getattr(r.portfolio, field)[0],
                                       rtol=1e-12, atol=0)
    np.testing.assert_allclose(r.portfolio.value[0], rv.value.sum(axis=1), rtol=1e-12, atol=0)
    assert r.by_rung.groups == RUNGS and r.by_rung.base[-1] == 0.0        # the demo holds nothing past 5Y
    assert set(r.by_sector.groups) == set(demo_book().holdings.sector)
    # Rates up, value down (every holding's value falls or stays under +100 bp).
    up = [s.name for s in r.scenarios].index("+100 bp")
    assert np.all(rv.change[up] <= 1e-9) and r.portfolio.change[0, up] < 0


def test_the_portfolio_duration_estimate_is_the_sum_of_the_holdings(demo_result):
    r = demo_result
    up = [s.name for s in r.scenarios].index("+100 bp")
    expected = r.base_value * (1 - r.effective_duration * 0.01)        # -V D dy with MV-weighted D
    assert r.portfolio.est_duration[0, up] == pytest.approx(expected, rel=1e-12, abs=0)


def test_income_hook_fills_the_income_change():
    book = demo_book()
    seen = {}

    def income(b, at, scenarios):
        seen.update(book=b, at=at, count=len(scenarios))
        return np.arange(len(scenarios), dtype=float) * 1000.0

    scenarios = parallel_set(book.curve, (-100.0, 0.0, 100.0))
    r = shock_book(book, scenarios=scenarios, income=income)
    assert seen == {"book": book, "at": book.valuation_date, "count": 3}
    assert [s["income_change_12m"] for s in shock_document(r)["scenarios"]] == [0.0, 1000.0, 2000.0]
    assert "income_change_12m" not in shock_document(shock_book(book, scenarios=scenarios))["scenarios"][0]


def test_document_and_rows_shape(demo_result):
    r = demo_result
    doc = shock_document(r)
    assert {"as_of", "base_value", "effective_duration", "effective_convexity", "key_rate_durations",
            "scenarios"} <= set(doc)
    assert list(doc["key_rate_durations"]) == list(demo_book().curve.tenors)
    first, steep = doc["scenarios"][0], doc["scenarios"][11]
    assert {"name", "shift_bp", "value", "change", "change_pct", "est_duration", "est_duration_convexity",
            "error_duration", "error_duration_convexity", "by_rung", "by_sector"} <= set(first)
    assert first["shift_bp"] == -300.0 and steep["shift_bp"] is None
    assert first["equivalent_shift_bp"] == -300.0
    assert first["change"] == pytest.approx(first["value"] - doc["base_value"], abs=0.011, rel=0)
    assert first["change_pct"] == pytest.approx(100 * first["change"] / doc["base_value"], rel=1e-6, abs=0)
    assert list(first["by_rung"]) == list(RUNGS)
    assert len(doc["holdings"]) == len(demo_book().holdings)
    assert len(doc["holdings"][0]["value"]) == len(r.scenarios)
    rows = shock_rows(r)
    n, s = len(demo_book().holdings), len(r.scenarios)
    assert len(rows) == s * (1 + len(RUNGS) + len(r.by_sector.groups) + n)
    assert {row["level"] for row in rows} == {"portfolio", "rung", "sector", "holding"}
